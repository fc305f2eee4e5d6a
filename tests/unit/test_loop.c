/*
 * test_loop.c - behaviour of the natural-circulation loop model. Published
 * check values are in tests/ref/test_ref_contactors.c.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>

#include "loop.h"
#include "section.h"

#define RHO_L 998.0
#define G 9.80665

static struct section_geom loop_geom(void)
{
	struct section_geom g = {0};
	g.type = SECTION_LOOP;
	g.diameter_m = 1.6;
	g.loop.riser_area_m2 = 0.8;
	g.loop.downcomer_area_m2 = 1.2;
	g.loop.height_m = 8.0;
	g.loop.bottom_clearance_m = 0.4;
	g.loop.tap_spacing_m = NAN;
	g.loop.top_loss = NAN;
	g.loop.circulation_normal_ms = NAN;
	return g;
}

static struct section_props water(void)
{
	struct section_props pr = {0};
	pr.gas_molar_mass_kgkmol = 28.96;
	pr.gas_compressibility = 1.0;
	pr.gas_viscosity_pas = (struct prop_table){1, {0}, {1.8e-5}};
	pr.liquid_density_kgm3 = (struct prop_table){1, {0}, {RHO_L}};
	pr.liquid_viscosity_pas = (struct prop_table){1, {0}, {1.0e-3}};
	pr.surface_tension_nm = (struct prop_table){1, {0}, {0.072}};
	return pr;
}

/* DP of a span of 8 m holding gas fraction eps (gas density neglected). */
static double dp_for(double eps)
{
	return RHO_L * (1.0 - eps) * G * 8.0;
}

static void eval(const struct section_geom *g, double gas_kgs, double dp_r, double dp_d,
		 struct section_result *r)
{
	struct section_props pr = water();
	struct section_point p;
	section_point_clear(&p);
	p.gas_kgs = gas_kgs;
	p.pressure_pa = 101325.0;
	p.temperature_k = 293.15;
	p.dp_riser_pa = dp_r;
	p.dp_downcomer_pa = dp_d;
	section_eval(g, &pr, &p, r);
}

static void test_circulation_zero_without_driving_force(void **state)
{
	(void)state;
	assert_true(loop_circulation_ms(8.0, 0.05, 0.05, 0.8, 1.2, 0.0, 10.0, NULL) == 0.0);
	assert_true(loop_circulation_ms(8.0, 0.0, 0.0, 0.8, 1.2, 0.0, 10.0, NULL) == 0.0);
	assert_true(loop_circulation_ms(8.0, 0.02, 0.05, 0.8, 1.2, 0.0, 10.0, NULL) == 0.0);
}

static void test_circulation_rises_with_holdup_difference(void **state)
{
	(void)state;
	double a = loop_circulation_ms(8.0, 0.04, 0.01, 0.8, 1.2, 0.0, 10.0, NULL);
	double b = loop_circulation_ms(8.0, 0.08, 0.01, 0.8, 1.2, 0.0, 10.0, NULL);
	assert_true(a > 0.0);
	assert_true(b > a);
	/* More bottom loss, slower loop. */
	double c = loop_circulation_ms(8.0, 0.04, 0.01, 0.8, 1.2, 0.0, 20.0, NULL);
	assert_true(c < a);
}

static void test_circulation_bad_input_nan_and_wild_holdup_flagged(void **state)
{
	(void)state;
	assert_true(isnan(loop_circulation_ms(0.0, 0.04, 0.01, 0.8, 1.2, 0.0, 10.0, NULL)));
	assert_true(isnan(loop_circulation_ms(8.0, NAN, 0.01, 0.8, 1.2, 0.0, 10.0, NULL)));
	assert_true(isnan(loop_circulation_ms(8.0, 0.04, 0.01, 0.8, 1.2, 0.0, 0.0, NULL)));
	struct fg_extrap x = {0, NULL};
	double u = loop_circulation_ms(8.0, 1.0, -0.1, 0.8, 1.2, 0.0, 10.0, &x);
	assert_true(isfinite(u));
	assert_int_equal(x.count, 2);
}

static void test_bottom_loss_and_area(void **state)
{
	(void)state;
	assert_true(fabs(loop_bottom_loss(1.0, NULL) - 11.402) < 1e-12);
	struct fg_extrap x = {0, NULL};
	assert_true(isfinite(loop_bottom_loss(20.0, &x)));
	assert_int_equal(x.count, 1);
	assert_true(isnan(loop_bottom_loss(0.0, NULL)));
	/* A riser of 1 m diameter, 0.25 m clearance: pi * 1 * 0.25. */
	double a = loop_bottom_area_m2(M_PI / 4.0, 0.25);
	assert_true(fabs(a - M_PI * 0.25) < 1e-12);
}

static void test_carry_under_only_when_downflow_beats_slip(void **state)
{
	(void)state;
	/* U_Lr 0.3, A_r/A_d 2/3: downcomer liquid 0.2/(1-0.02) m/s < 0.25 slip. */
	assert_true(loop_carry_under_m3s(0.3, 0.02, 0.8, 1.2, 0.25) == 0.0);
	double q = loop_carry_under_m3s(0.9, 0.02, 0.8, 1.2, 0.25);
	double v = 0.9 * 0.8 / 1.2 / 0.98 - 0.25;
	assert_true(fabs(q - v * 0.02 * 1.2) < 1e-12);
	assert_true(loop_carry_under_m3s(0.9, 0.0, 0.8, 1.2, 0.25) == 0.0);
}

static void test_stall_pct_and_zero_gas(void **state)
{
	(void)state;
	assert_true(fabs(loop_stall_pct(0.08, 0.02) - 25.0) < 1e-12);
	assert_true(isnan(loop_stall_pct(0.0, 0.0)));
	assert_true(isnan(loop_stall_pct(0.001, 0.0)));
	assert_true(loop_stall_pct(0.05, -0.01) == 0.0);
}

static void test_depth_ratio_is_boyle(void **state)
{
	(void)state;
	assert_true(loop_holdup_depth_ratio(1e5, 1000.0, 0.0) == 1.0);
	double r = loop_holdup_depth_ratio(1e5, 1000.0, 100.0);
	assert_true(fabs(r - 1e5 / (1e5 + 1000.0 * G * 100.0)) < 1e-15);
	assert_true(isnan(loop_holdup_depth_ratio(0.0, 1000.0, 10.0)));
}

static void test_eval_from_dps(void **state)
{
	(void)state;
	struct section_geom g = loop_geom();
	struct section_result r;
	eval(&g, 0.05, dp_for(0.06), dp_for(0.015), &r);
	double rho_g = 101325.0 * 28.96 / (8314.462618 * 293.15);
	double er = (RHO_L - dp_for(0.06) / (G * 8.0)) / (RHO_L - rho_g);
	assert_true(fabs(r.v[RF_RISER_HOLDUP_FRAC] - er) < 1e-12);
	assert_true(fabs(r.v[RF_FLOOD_PCT] - 100.0 * r.v[RF_DOWNCOMER_HOLDUP_FRAC] / er) < 1e-9);
	assert_true(r.v[RF_CIRCULATION_VELOCITY] > 0.0);
	assert_true(isnan(r.v[RF_CIRCULATION_PCT])); /* no normal configured: the engine learns */
	assert_int_equal(r.basis, FLOOD_BASIS_DOWNCOMER_GAS);
	assert_int_equal(r.quality, FG_QUALITY_GOOD);
	g.loop.circulation_normal_ms = r.v[RF_CIRCULATION_VELOCITY] * 2.0;
	eval(&g, 0.05, dp_for(0.06), dp_for(0.015), &r);
	assert_true(fabs(r.v[RF_CIRCULATION_PCT] - 50.0) < 1e-9);
}

static void test_eval_zero_gas_is_stalled_not_nan(void **state)
{
	(void)state;
	struct section_geom g = loop_geom();
	struct section_result r;
	eval(&g, 0.0, dp_for(0.0), dp_for(0.0), &r);
	assert_true(r.v[RF_CIRCULATION_VELOCITY] == 0.0);
	assert_true(isnan(r.v[RF_FLOOD_PCT]));
	assert_int_equal(r.quality, FG_QUALITY_UNCERTAIN);
	for (int i = 0; i < RF_COUNT; i++)
		assert_false(isinf(r.v[i]));
}

static void test_eval_missing_dp_is_bad(void **state)
{
	(void)state;
	struct section_geom g = loop_geom();
	struct section_result r;
	eval(&g, 0.05, NAN, dp_for(0.01), &r);
	assert_int_equal(r.quality, FG_QUALITY_BAD);
	assert_true(isnan(r.v[RF_CIRCULATION_VELOCITY]));
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_circulation_zero_without_driving_force),
		cmocka_unit_test(test_circulation_rises_with_holdup_difference),
		cmocka_unit_test(test_circulation_bad_input_nan_and_wild_holdup_flagged),
		cmocka_unit_test(test_bottom_loss_and_area),
		cmocka_unit_test(test_carry_under_only_when_downflow_beats_slip),
		cmocka_unit_test(test_stall_pct_and_zero_gas),
		cmocka_unit_test(test_depth_ratio_is_boyle),
		cmocka_unit_test(test_eval_from_dps),
		cmocka_unit_test(test_eval_zero_gas_is_stalled_not_nan),
		cmocka_unit_test(test_eval_missing_dp_is_bad),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
