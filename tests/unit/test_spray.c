/*
 * test_spray.c - behaviour of the spray-tower model. Published check values
 * are in tests/ref/test_ref_spray_bubble.c and tests/ref/fluids_spray.py.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>

#include "section.h"
#include "spray.h"

/* Air at about 20 degC and 1 atm, water droplets (demo-like values). */
#define RHO_G 1.204
#define MU_G 1.813e-5
#define RHO_L 998.2
#define SIGMA 0.0728

static bool close_rel(double a, double b, double rel)
{
	return fabs(a - b) <= rel * fabs(b);
}

static struct section_geom spray_geom(void)
{
	struct section_geom g = {0};
	g.type = SECTION_SPRAY;
	g.diameter_m = 3.0;
	g.spray.height_m = 8.0;
	g.spray.design_droplet_m = 1.0e-3;
	g.spray.droplet_spread = 2.5;
	return g;
}

static struct fluid_state air_water(void)
{
	struct fluid_state f = {RHO_G, RHO_L, MU_G, 1.0e-3, SIGMA};
	return f;
}

static struct section_point point(double liquid_kgs)
{
	struct section_point p = {NAN, liquid_kgs, NAN, 101325.0, 293.15, NAN, NAN, NAN, NAN, NAN, NAN};
	return p;
}

/* Runs spray_eval as section_eval would: result cleared, gas velocity set. */
static void eval_at(const struct section_geom *g, const struct fluid_state *f, double ug,
		    double liquid_kgs, struct section_result *r)
{
	result_clear(r);
	r->v[RF_GAS_VELOCITY] = ug;
	struct section_point p = point(liquid_kgs);
	spray_eval(g, f, &p, r);
}

static void test_terminal_velocity_rises_with_droplet_size(void **state)
{
	(void)state;
	double prev = 0.0;
	for (double d = 20e-6; d <= 5e-3; d *= 1.5) {
		double vt = spray_terminal_velocity_ms(d, RHO_L, RHO_G, MU_G, NULL);
		assert_true(vt > prev);
		prev = vt;
	}
}

static void test_terminal_velocity_falls_with_gas_density(void **state)
{
	(void)state;
	double low = spray_terminal_velocity_ms(1e-3, RHO_L, 1.2, MU_G, NULL);
	double high = spray_terminal_velocity_ms(1e-3, RHO_L, 12.0, MU_G, NULL);
	assert_true(high < low);
}

static void test_terminal_velocity_satisfies_force_balance(void **state)
{
	(void)state;
	/* Weight less buoyancy = drag: Cd = 4 g d (rho_l - rho_g) / (3 rho_g v^2). */
	for (double d = 30e-6; d <= 4e-3; d *= 2.0) {
		double vt = spray_terminal_velocity_ms(d, RHO_L, RHO_G, MU_G, NULL);
		double re = RHO_G * vt * d / MU_G;
		double cd_balance = 4.0 * SPRAY_G_MS2 * d * (RHO_L - RHO_G) / (3.0 * RHO_G * vt * vt);
		assert_true(close_rel(cd_balance, spray_drag_coefficient(re), 1e-9));
	}
}

static void test_terminal_velocity_invalid_inputs_give_nan(void **state)
{
	(void)state;
	assert_true(isnan(spray_terminal_velocity_ms(0.0, RHO_L, RHO_G, MU_G, NULL)));
	assert_true(isnan(spray_terminal_velocity_ms(1e-3, RHO_G, RHO_G, MU_G, NULL)));
	assert_true(isnan(spray_terminal_velocity_ms(1e-3, 0.5, RHO_G, MU_G, NULL)));
	assert_true(isnan(spray_terminal_velocity_ms(1e-3, RHO_L, RHO_G, 0.0, NULL)));
	assert_true(isnan(spray_terminal_velocity_ms(NAN, RHO_L, RHO_G, MU_G, NULL)));
	assert_true(isnan(spray_drag_coefficient(0.0)));
	assert_true(isnan(spray_drag_coefficient(-3.0)));
}

static void test_critical_droplet_is_inverse_of_terminal_velocity(void **state)
{
	(void)state;
	for (double u = 0.05; u < 12.0; u *= 1.7) {
		double d = spray_critical_droplet_m(u, RHO_L, RHO_G, MU_G, NULL);
		double vt = spray_terminal_velocity_ms(d, RHO_L, RHO_G, MU_G, NULL);
		if (!close_rel(vt, u, 1e-9))
			fail_msg("u %g: d %g, vt %.12g", u, d, vt);
	}
	assert_true(spray_critical_droplet_m(0.0, RHO_L, RHO_G, MU_G, NULL) == 0.0);
	assert_true(isnan(spray_critical_droplet_m(-0.1, RHO_L, RHO_G, MU_G, NULL)));
}

static void test_approach_is_gas_over_terminal_velocity(void **state)
{
	(void)state;
	assert_true(fabs(spray_approach_pct(2.0, 4.0) - 50.0) <= 1e-12);
	assert_true(fabs(spray_approach_pct(0.0, 4.0)) <= 1e-12);
	assert_true(isnan(spray_approach_pct(1.0, 0.0)));
	assert_true(isnan(spray_approach_pct(NAN, 3.0)));
}

static void test_rosin_rammler_gives_63_percent_finer_than_size_parameter(void **state)
{
	(void)state;
	/* Rosin & Rammler (1933): F(d_size) = 1 - 1/e for every spread n. */
	for (double n = 0.8; n < 6.0; n += 1.1)
		assert_true(fabs(spray_rosin_rammler_finer(1e-3, 1e-3, n) - (1.0 - exp(-1.0))) <=
			    1e-12);
	assert_true(spray_rosin_rammler_finer(0.0, 1e-3, 2.0) == 0.0);
	assert_true(spray_rosin_rammler_finer(0.5e-3, 1e-3, 4.0) <
		    spray_rosin_rammler_finer(0.5e-3, 1e-3, 2.0));
	assert_true(isnan(spray_rosin_rammler_finer(1e-3, 0.0, 2.0)));
	assert_true(isnan(spray_rosin_rammler_finer(1e-3, 1e-3, 0.0)));
}

static void test_holdup_is_liquid_velocity_over_fall_velocity(void **state)
{
	(void)state;
	struct fg_extrap x = {0, NULL};
	assert_true(fabs(spray_holdup_frac(0.004, 3.0, 1.0, &x) - 0.002) <= 1e-15);
	assert_int_equal(x.count, 0);
	assert_true(isnan(spray_holdup_frac(0.004, 1.0, 1.0, &x)));
	assert_true(isnan(spray_holdup_frac(0.004, 0.9, 1.0, &x)));
	/* 0.05/(1.2 - 1.0) = 0.25: no longer a dilute spray, no value. */
	assert_true(isnan(spray_holdup_frac(0.05, 1.2, 1.0, &x)));
	assert_int_equal(x.count, 1);
}

/* Near the terminal velocity u_L/(v_t - u_G) runs away (1394 at the demo
 * quench's flood load before the fix): a volume fraction above the dilute
 * limit is never published; the field is absent and the quality uncertain. */
static void test_holdup_near_terminal_velocity_is_absent_not_above_one(void **state)
{
	(void)state;
	struct section_geom g = spray_geom();
	struct fluid_state f = air_water();
	double vt = spray_terminal_velocity_ms(1e-3, RHO_L, RHO_G, MU_G, NULL);
	static const double frac_of_vt[] = {0.99, 0.999, 0.99999};
	for (size_t i = 0; i < sizeof frac_of_vt / sizeof frac_of_vt[0]; i++) {
		struct section_result r;
		eval_at(&g, &f, frac_of_vt[i] * vt, 50.0, &r);
		double h = r.v[RF_LIQUID_HOLDUP_FRAC];
		assert_true(isnan(h));
		assert_true(isnan(r.v[RF_LIQUID_HOLDUP_M3]));
		assert_int_equal(r.quality, FG_QUALITY_UNCERTAIN);
		assert_true(isfinite(r.v[RF_FLOOD_PCT]));
	}
}

static void test_eval_fills_flood_carryover_and_holdup(void **state)
{
	(void)state;
	struct section_geom g = spray_geom();
	struct fluid_state f = air_water();
	struct section_result r;
	eval_at(&g, &f, 1.5, 20.0, &r);
	double vt = spray_terminal_velocity_ms(1e-3, RHO_L, RHO_G, MU_G, NULL);
	assert_int_equal(r.quality, FG_QUALITY_GOOD);
	assert_int_equal(r.basis, FLOOD_BASIS_DROPLET);
	assert_true(close_rel(r.v[RF_FLOOD_PCT], 100.0 * 1.5 / vt, 1e-12));
	double dc = spray_critical_droplet_m(1.5, RHO_L, RHO_G, MU_G, NULL);
	assert_true(close_rel(r.v[RF_CARRYOVER_FRAC], 1.0 - exp(-pow(dc / 1e-3, 2.5)), 1e-12));
	double area = M_PI * 9.0 / 4.0;
	double ul = 20.0 / (RHO_L * area);
	assert_true(close_rel(r.v[RF_LIQUID_HOLDUP_FRAC], ul / (vt - 1.5), 1e-12));
	assert_true(close_rel(r.v[RF_LIQUID_HOLDUP_M3], ul / (vt - 1.5) * area * 8.0, 1e-12));
	assert_true(isnan(r.v[RF_DP_MODEL_PA]));
	assert_int_equal(r.extrap.count, 0);
}

static void test_flood_and_carryover_rise_with_gas_rate(void **state)
{
	(void)state;
	struct section_geom g = spray_geom();
	struct fluid_state f = air_water();
	struct section_result a, b;
	eval_at(&g, &f, 1.0, 10.0, &a);
	eval_at(&g, &f, 2.0, 10.0, &b);
	assert_true(b.v[RF_FLOOD_PCT] > a.v[RF_FLOOD_PCT]);
	assert_true(b.v[RF_CARRYOVER_FRAC] > a.v[RF_CARRYOVER_FRAC]);
	assert_true(b.v[RF_LIQUID_HOLDUP_FRAC] > a.v[RF_LIQUID_HOLDUP_FRAC]);
}

static void test_zero_gas_gives_zero_flood_and_no_carryover(void **state)
{
	(void)state;
	struct section_geom g = spray_geom();
	struct fluid_state f = air_water();
	struct section_result r;
	eval_at(&g, &f, 0.0, 10.0, &r);
	assert_int_equal(r.quality, FG_QUALITY_GOOD);
	assert_true(r.v[RF_FLOOD_PCT] == 0.0);
	assert_true(r.v[RF_CARRYOVER_FRAC] == 0.0);
	assert_true(r.v[RF_LIQUID_HOLDUP_FRAC] > 0.0);
}

static void test_zero_liquid_gives_zero_holdup(void **state)
{
	(void)state;
	struct section_geom g = spray_geom();
	struct fluid_state f = air_water();
	struct section_result r;
	eval_at(&g, &f, 1.0, 0.0, &r);
	assert_int_equal(r.quality, FG_QUALITY_GOOD);
	assert_true(r.v[RF_LIQUID_HOLDUP_FRAC] == 0.0);
	assert_true(r.v[RF_LIQUID_HOLDUP_M3] == 0.0);
	assert_true(r.v[RF_FLOOD_PCT] > 0.0);
}

static void test_design_droplet_carried_over_is_said_and_holdup_absent(void **state)
{
	(void)state;
	struct section_geom g = spray_geom();
	struct fluid_state f = air_water();
	struct section_result r;
	eval_at(&g, &f, 6.0, 10.0, &r); /* 1 mm drop falls at ~4 m/s */
	assert_true(r.v[RF_FLOOD_PCT] > 100.0);
	assert_true(r.v[RF_CARRYOVER_FRAC] > 0.632);
	assert_true(r.v[RF_CARRYOVER_FRAC] <= 1.0);
	assert_true(isnan(r.v[RF_LIQUID_HOLDUP_FRAC]));
	assert_true(isnan(r.v[RF_LIQUID_HOLDUP_M3]));
	assert_int_equal(r.quality, FG_QUALITY_UNCERTAIN);
	assert_true(r.extrap.count >= 1);
	assert_non_null(r.extrap.first);
}

static void test_deformed_design_droplet_is_noted(void **state)
{
	(void)state;
	struct section_geom g = spray_geom();
	g.spray.design_droplet_m = 3.0e-3; /* Eo = 1.2 for water in air */
	struct fluid_state f = air_water();
	struct section_result r;
	eval_at(&g, &f, 1.0, 10.0, &r);
	assert_true(r.extrap.count >= 1);
	assert_true(isfinite(r.v[RF_FLOOD_PCT]));
}

static void test_liquid_not_denser_than_gas_is_bad(void **state)
{
	(void)state;
	struct section_geom g = spray_geom();
	struct fluid_state f = air_water();
	f.rho_l_kgm3 = f.rho_g_kgm3;
	struct section_result r;
	eval_at(&g, &f, 1.0, 10.0, &r);
	assert_int_equal(r.quality, FG_QUALITY_BAD);
	assert_true(isnan(r.v[RF_FLOOD_PCT]));
	assert_true(isnan(r.v[RF_CARRYOVER_FRAC]));
	assert_true(isnan(r.v[RF_LIQUID_HOLDUP_FRAC]));
}

static void test_non_positive_geometry_or_viscosity_is_bad(void **state)
{
	(void)state;
	struct fluid_state f = air_water();
	struct section_result r;
	struct section_geom g = spray_geom();
	g.spray.design_droplet_m = 0.0;
	eval_at(&g, &f, 1.0, 10.0, &r);
	assert_int_equal(r.quality, FG_QUALITY_BAD);
	assert_true(isnan(r.v[RF_FLOOD_PCT]));
	g = spray_geom();
	g.spray.droplet_spread = -1.0;
	eval_at(&g, &f, 1.0, 10.0, &r);
	assert_int_equal(r.quality, FG_QUALITY_BAD);
	g = spray_geom();
	f.mu_g_pas = 0.0;
	eval_at(&g, &f, 1.0, 10.0, &r);
	assert_int_equal(r.quality, FG_QUALITY_BAD);
	assert_true(isnan(r.v[RF_FLOOD_PCT]));
}

static void test_missing_gas_velocity_is_bad(void **state)
{
	(void)state;
	struct section_geom g = spray_geom();
	struct fluid_state f = air_water();
	struct section_result r;
	eval_at(&g, &f, NAN, 10.0, &r);
	assert_int_equal(r.quality, FG_QUALITY_BAD);
	assert_true(isnan(r.v[RF_FLOOD_PCT]));
}

static void test_very_high_gas_velocity_stays_finite(void **state)
{
	(void)state;
	struct section_geom g = spray_geom();
	struct fluid_state f = air_water();
	struct section_result r;
	eval_at(&g, &f, 80.0, 10.0, &r);
	assert_true(isfinite(r.v[RF_FLOOD_PCT]));
	assert_true(r.v[RF_CARRYOVER_FRAC] > 0.999);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_terminal_velocity_rises_with_droplet_size),
		cmocka_unit_test(test_terminal_velocity_falls_with_gas_density),
		cmocka_unit_test(test_terminal_velocity_satisfies_force_balance),
		cmocka_unit_test(test_terminal_velocity_invalid_inputs_give_nan),
		cmocka_unit_test(test_critical_droplet_is_inverse_of_terminal_velocity),
		cmocka_unit_test(test_approach_is_gas_over_terminal_velocity),
		cmocka_unit_test(test_rosin_rammler_gives_63_percent_finer_than_size_parameter),
		cmocka_unit_test(test_holdup_is_liquid_velocity_over_fall_velocity),
		cmocka_unit_test(test_holdup_near_terminal_velocity_is_absent_not_above_one),
		cmocka_unit_test(test_eval_fills_flood_carryover_and_holdup),
		cmocka_unit_test(test_flood_and_carryover_rise_with_gas_rate),
		cmocka_unit_test(test_zero_gas_gives_zero_flood_and_no_carryover),
		cmocka_unit_test(test_zero_liquid_gives_zero_holdup),
		cmocka_unit_test(test_design_droplet_carried_over_is_said_and_holdup_absent),
		cmocka_unit_test(test_deformed_design_droplet_is_noted),
		cmocka_unit_test(test_liquid_not_denser_than_gas_is_bad),
		cmocka_unit_test(test_non_positive_geometry_or_viscosity_is_bad),
		cmocka_unit_test(test_missing_gas_velocity_is_bad),
		cmocka_unit_test(test_very_high_gas_velocity_stays_finite),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
