/*
 * test_capacity.c - capacity_factor through section_eval on the demo
 * sections: it scales the gas-capacity limits only (tray jet flood, packed
 * flood and loading velocity, spray terminal velocity) and nothing else.
 *
 * Every expected value is arithmetic on the same evaluation without the
 * factor: with the limit velocity scaled by k, a percentage of it is divided
 * by k exactly. Tolerance 1e-9 relative (the tray's flood point is found by
 * bisection to 1e-10; everything else is a single division).
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "config.h"
#include "point.h"

static struct fg_config *cfg;

static int setup(void **state)
{
	(void)state;
	cfg = calloc(1, sizeof(*cfg));
	return cfg != NULL && config_load(cfg, "configs/demo.ini", stderr) == 0 ? 0 : -1;
}

static int teardown(void **state)
{
	(void)state;
	free(cfg);
	return 0;
}

/* Section si at its design point (the tags' nominal values), with its
 * capacity_factor set to k. */
static void eval_at(unsigned si, double k, double dp_pa, struct section_result *r)
{
	double vals[FG_TAGS_MAX];
	for (unsigned i = 0; i < cfg->tag_count; i++)
		vals[i] = isfinite(cfg->tags[i].fixed_value) ? cfg->tags[i].fixed_value
							      : cfg->tags[i].nominal;
	struct section_point p;
	point_from_tags(cfg, si, vals, &p);
	p.dp_pa = dp_pa;
	struct section_geom g = cfg->sections[si].geom;
	g.capacity_factor = k;
	section_eval(&g, &cfg->sections[si].props, &p, r);
}

static void assert_rel(double got, double want)
{
	if (!(fabs(got - want) <= 1e-9 * fabs(want)))
		fail_msg("got %.12g, want %.12g", got, want);
}

static void test_tray_jet_flood_scales_downcomer_and_weep_do_not(void **state)
{
	(void)state;
	struct section_result a, b;
	eval_at(0, 1.0, NAN, &a);
	eval_at(0, 0.85, NAN, &b);
	assert_rel(b.v[RF_JET_FLOOD_PCT], a.v[RF_JET_FLOOD_PCT] / 0.85);
	assert_rel(b.v[RF_DC_BACKUP_PCT], a.v[RF_DC_BACKUP_PCT]);
	assert_rel(b.v[RF_WEEP_PCT], a.v[RF_WEEP_PCT]);
	assert_rel(b.v[RF_DP_MODEL_PA], a.v[RF_DP_MODEL_PA]);
	/* A zeroed factor (a struct built without the config) means 1. */
	eval_at(0, 0.0, NAN, &b);
	assert_rel(b.v[RF_JET_FLOOD_PCT], a.v[RF_JET_FLOOD_PCT]);
}

static void test_tray_dp_flood_point_moves_with_the_capacity(void **state)
{
	(void)state;
	/* The flood DP is the model's DP at the (calibrated) flood gas rate: a
	 * lower capacity floods at a lower gas rate and a lower DP, so the same
	 * measured DP is a larger share of it. */
	struct section_result a, b;
	eval_at(0, 1.0, 20000.0, &a);
	eval_at(0, 0.85, 20000.0, &b);
	assert_true(b.v[RF_DP_FLOOD_PCT] > a.v[RF_DP_FLOOD_PCT]);
}

static void test_packed_flood_and_loading_scale(void **state)
{
	(void)state;
	struct section_result a, b;
	eval_at(1, 1.0, NAN, &a);
	eval_at(1, 1.2, NAN, &b);
	assert_rel(b.v[RF_FLOOD_PCT], a.v[RF_FLOOD_PCT] / 1.2);
	assert_true(isfinite(a.v[RF_LOADING_PCT]));
	assert_rel(b.v[RF_LOADING_PCT], a.v[RF_LOADING_PCT] / 1.2);
	assert_rel(b.v[RF_DP_MODEL_PA], a.v[RF_DP_MODEL_PA]);
	assert_rel(b.v[RF_LIQUID_HOLDUP_FRAC], a.v[RF_LIQUID_HOLDUP_FRAC]);
}

static void test_spray_approach_scales_holdup_does_not(void **state)
{
	(void)state;
	struct section_result a, b;
	eval_at(2, 1.0, NAN, &a);
	eval_at(2, 0.9, NAN, &b);
	assert_rel(b.v[RF_FLOOD_PCT], a.v[RF_FLOOD_PCT] / 0.9);
	assert_rel(b.v[RF_CARRYOVER_FRAC], a.v[RF_CARRYOVER_FRAC]);
	assert_true(isfinite(a.v[RF_LIQUID_HOLDUP_FRAC]));
	assert_rel(b.v[RF_LIQUID_HOLDUP_FRAC], a.v[RF_LIQUID_HOLDUP_FRAC]);
}

static void test_bubble_level_swell_is_not_a_capacity(void **state)
{
	(void)state;
	struct section_result a, b;
	eval_at(3, 1.0, NAN, &a);
	eval_at(3, 0.8, NAN, &b);
	assert_rel(b.v[RF_FLOOD_PCT], a.v[RF_FLOOD_PCT]);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_tray_jet_flood_scales_downcomer_and_weep_do_not),
		cmocka_unit_test(test_tray_dp_flood_point_moves_with_the_capacity),
		cmocka_unit_test(test_packed_flood_and_loading_scale),
		cmocka_unit_test(test_spray_approach_scales_holdup_does_not),
		cmocka_unit_test(test_bubble_level_swell_is_not_a_capacity),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
