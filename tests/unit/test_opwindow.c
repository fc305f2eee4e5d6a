/*
 * test_opwindow.c - the operating window's limit lines: at each limit point
 * the model itself says flood_pct 100 % (weep_pct 100 %), evaluated the way
 * `floodgauge rate` evaluates a point; the weep limit lies below the flood
 * limit; a section without a liquid flow tag uses its level.
 *
 * The tolerance 1e-6 % is the bisection's: 48 halvings of a bracket of a few
 * times the design gas load leave far less than that.
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>

#include <cmocka.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "opwindow.h"
#include "point.h"

static struct fg_config cfg;
static double vals[FG_TAGS_MAX];

static int setup(void **state)
{
	(void)state;
	if (config_load(&cfg, "configs/demo.ini", stderr) != 0)
		return -1;
	for (unsigned i = 0; i < cfg.tag_count; i++)
		vals[i] = isfinite(cfg.tags[i].fixed_value) ? cfg.tags[i].fixed_value
							     : cfg.tags[i].nominal;
	return 0;
}

static double eval(unsigned si, int gi, int xi, double g, double x, int field)
{
	static double v[FG_TAGS_MAX];
	memcpy(v, vals, sizeof v);
	v[gi] = g;
	v[xi] = x;
	struct section_point p;
	point_from_tags(&cfg, si, v, &p);
	p.dp_pa = NAN;
	struct section_result r;
	section_eval(&cfg.sections[si].geom, &cfg.sections[si].props, &p, &r);
	return r.v[field];
}

static void test_tray_limits_are_where_the_model_says_100(void **state)
{
	(void)state;
	int si = config_section_index(&cfg, "C401");
	assert_true(si >= 0);
	const struct section_cfg *s = &cfg.sections[si];
	int gi = s->signal[SIGNAL_GAS_FLOW], xi = s->signal[SIGNAL_LIQUID_FLOW];
	struct report_window w;
	memset(&w, 0, sizeof w);
	assert_int_equal(opwindow_compute(&cfg, (unsigned)si, vals, 2.0 * vals[xi], &w), 0);
	assert_true(w.has_weep);
	assert_false(w.has_cal);
	assert_true(w.x[0] == 0.0);
	assert_true(fabs(w.x[REPORT_WINDOW_POINTS - 1] - 2.0 * vals[xi]) < 1e-9);
	unsigned checked = 0;
	for (unsigned i = 1; i < REPORT_WINDOW_POINTS; i += 8) {
		assert_true(isfinite(w.y_flood[i]));
		assert_true(fabs(eval((unsigned)si, gi, xi, w.y_flood[i], w.x[i], RF_FLOOD_PCT) -
				 100.0) < 1e-6);
		assert_true(isfinite(w.y_weep[i]));
		assert_true(fabs(eval((unsigned)si, gi, xi, w.y_weep[i], w.x[i], RF_WEEP_PCT) -
				 100.0) < 1e-6);
		assert_true(w.y_weep[i] < w.y_flood[i]);
		/* the design point lies inside the window (demo: about 75 % of flood) */
		checked++;
	}
	assert_int_equal(checked, 5);
	int mid = REPORT_WINDOW_POINTS / 2; /* x = the design liquid load */
	assert_true(fabs(w.x[mid] - vals[xi]) < 1e-9);
	assert_true(vals[gi] < w.y_flood[mid]);
	assert_true(vals[gi] > w.y_weep[mid]);
}

/* With a capacity_factor the calibrated flood limit is drawn too: there the
 * calibrated model says 100 %; the model's own limit stays uncalibrated, so
 * a factor above 1 (more capacity than the handbook's) puts the calibrated
 * limit above it. */
static void test_calibrated_limit_with_capacity_factor(void **state)
{
	(void)state;
	int si = config_section_index(&cfg, "C401");
	struct section_cfg *s = &cfg.sections[si];
	const double keep = s->geom.capacity_factor;
	s->geom.capacity_factor = 1.2;
	int gi = s->signal[SIGNAL_GAS_FLOW], xi = s->signal[SIGNAL_LIQUID_FLOW];
	struct report_window w;
	memset(&w, 0, sizeof w);
	assert_int_equal(opwindow_compute(&cfg, (unsigned)si, vals, 2.0 * vals[xi], &w), 0);
	assert_true(w.has_cal);
	for (unsigned i = 1; i < REPORT_WINDOW_POINTS; i += 10) {
		assert_true(fabs(eval((unsigned)si, gi, xi, w.y_cal[i], w.x[i], RF_FLOOD_PCT) -
				 100.0) < 1e-6);
		assert_true(w.y_cal[i] > w.y_flood[i]);
	}
	s->geom.capacity_factor = keep;
}

static void test_bubble_column_uses_its_level(void **state)
{
	(void)state;
	int si = config_section_index(&cfg, "R404");
	assert_true(si >= 0);
	const struct section_cfg *s = &cfg.sections[si];
	assert_true(s->signal[SIGNAL_LIQUID_FLOW] < 0);
	int gi = s->signal[SIGNAL_GAS_FLOW], xi = s->signal[SIGNAL_LEVEL];
	assert_true(xi >= 0);
	struct report_window w;
	memset(&w, 0, sizeof w);
	assert_int_equal(opwindow_compute(&cfg, (unsigned)si, vals, 1.25 * vals[xi], &w), 0);
	assert_false(w.has_weep);
	assert_true(w.x[0] > 0.0); /* no column at level zero */
	unsigned finite = 0;
	for (unsigned i = 0; i < REPORT_WINDOW_POINTS; i++) {
		if (!isfinite(w.y_flood[i]))
			continue;
		finite++;
		assert_true(fabs(eval((unsigned)si, gi, xi, w.y_flood[i], w.x[i], RF_FLOOD_PCT) -
				 100.0) < 1e-6);
	}
	assert_true(finite > 0);
}

static void test_section_without_gas_flow_is_refused(void **state)
{
	(void)state;
	struct report_window w;
	int si = config_section_index(&cfg, "C401");
	assert_int_equal(opwindow_compute(&cfg, (unsigned)si, vals, 0.0, &w), -ENOENT);
	static double none[FG_TAGS_MAX];
	for (unsigned i = 0; i < FG_TAGS_MAX; i++)
		none[i] = NAN;
	assert_int_equal(opwindow_compute(&cfg, (unsigned)si, none, 10.0, &w), -ENOENT);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_tray_limits_are_where_the_model_says_100),
		cmocka_unit_test(test_calibrated_limit_with_capacity_factor),
		cmocka_unit_test(test_bubble_column_uses_its_level),
		cmocka_unit_test(test_section_without_gas_flow_is_refused),
	};
	return cmocka_run_group_tests(tests, setup, NULL);
}
