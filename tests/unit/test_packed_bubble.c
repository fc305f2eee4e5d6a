/*
 * test_packed_bubble.c - behaviour of the packed bubble column model.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>

#include "bubble.h"
#include "packed_bubble.h"
#include "section.h"

#define RHO_L 998.0
#define G BUBBLE_G_MS2

static struct section_geom column(void)
{
	struct section_geom g = {0};
	g.type = SECTION_PACKED_BUBBLE;
	g.diameter_m = 0.6;
	g.bubble.tap_spacing_m = 2.0;
	g.bubble.clear_liquid_height_m = 3.0;
	g.bubble.overflow_height_m = 4.0;
	g.bubble.holdup_method = BUBBLE_HOLDUP_AKITA_YOSHIDA;
	g.pbub.void_frac = 0.9;
	g.pbub.bed_height_m = NAN;
	g.pbub.impulse_density_kgm3 = NAN;
	return g;
}

static void eval(const struct section_geom *g, double gas_kgs, double dp_pa,
		 struct section_result *r)
{
	struct section_props pr = {0};
	pr.gas_molar_mass_kgkmol = 28.96;
	pr.gas_compressibility = 1.0;
	pr.gas_viscosity_pas = (struct prop_table){1, {0}, {1.8e-5}};
	pr.liquid_density_kgm3 = (struct prop_table){1, {0}, {RHO_L}};
	pr.liquid_viscosity_pas = (struct prop_table){1, {0}, {1.0e-3}};
	pr.surface_tension_nm = (struct prop_table){1, {0}, {0.072}};
	struct section_point p;
	section_point_clear(&p);
	p.gas_kgs = gas_kgs;
	p.pressure_pa = 101325.0;
	p.temperature_k = 293.15;
	p.dp_pa = dp_pa;
	section_eval(g, &pr, &p, r);
}

static void test_wet_legs_add_their_head(void **state)
{
	(void)state;
	assert_true(packed_bubble_tap_dp_pa(-2000.0, NAN, 2.0) == -2000.0);
	double dp = packed_bubble_tap_dp_pa(-2000.0, 1000.0, 2.0);
	assert_true(fabs(dp - (-2000.0 + 1000.0 * G * 2.0)) < 1e-9);
	assert_true(isnan(packed_bubble_tap_dp_pa(NAN, 1000.0, 2.0)));
}

static void test_correlation_uses_interstitial_velocity(void **state)
{
	(void)state;
	double a = packed_bubble_holdup_free_frac(0.045, 0.9, 0.6, RHO_L, 1e-3, 0.072, false,
						  false, NULL);
	double b = bubble_akita_yoshida_frac(0.05, 0.6, RHO_L, 1e-3, 0.072, false, NULL);
	assert_true(fabs(a - b) < 1e-12);
	assert_true(packed_bubble_holdup_free_frac(0.0, 0.9, 0.6, RHO_L, 1e-3, 0.072, false,
						   true, NULL) == 0.0);
	assert_true(isnan(packed_bubble_holdup_free_frac(0.05, 0.0, 0.6, RHO_L, 1e-3, 0.072,
							 false, false, NULL)));
	assert_true(isnan(packed_bubble_holdup_free_frac(0.05, 1.2, 0.6, RHO_L, 1e-3, 0.072,
							 false, false, NULL)));
}

static void test_expanded_level_inside_and_above_bed(void **state)
{
	(void)state;
	/* Bed everywhere: same as an open column on the free volume. */
	assert_true(fabs(packed_bubble_expanded_level_m(3.0, 0.2, 0.9, NAN) - 3.0 / 0.8) < 1e-12);
	/* Bed of 2 m, phi 0.5, level 3 m: liquid 0.5*2 + 1 = 2 m per area;
	 * in the bed 0.5*0.8 per m holds 0.8 m, the rest 1.2 m over 0.8 = 1.5 m. */
	assert_true(fabs(packed_bubble_liquid_m(3.0, 0.5, 2.0) - 2.0) < 1e-12);
	assert_true(fabs(packed_bubble_expanded_level_m(3.0, 0.2, 0.5, 2.0) - 3.5) < 1e-12);
	/* Level within the bed. */
	assert_true(fabs(packed_bubble_expanded_level_m(1.0, 0.2, 0.5, 2.0) - 1.25) < 1e-12);
	assert_true(isnan(packed_bubble_expanded_level_m(3.0, 1.0, 0.5, 2.0)));
	assert_true(isnan(packed_bubble_expanded_level_m(-1.0, 0.1, 0.5, 2.0)));
}

static void test_eval_tap_holdup_per_free_and_column_volume(void **state)
{
	(void)state;
	struct section_geom g = column();
	struct section_result r;
	double dp = RHO_L * 0.85 * G * 2.0; /* 15 % gas in the pores */
	eval(&g, 0.01, dp, &r);
	double rho_g = 101325.0 * 28.96 / (8314.462618 * 293.15);
	double eps = (RHO_L - dp / (G * 2.0)) / (RHO_L - rho_g);
	assert_true(fabs(r.v[RF_GAS_HOLDUP_DP_FRAC] - eps) < 1e-12);
	assert_true(fabs(r.v[RF_GAS_HOLDUP_COLUMN_FRAC] - 0.9 * eps) < 1e-12);
	assert_true(fabs(r.v[RF_LIQUID_HOLDUP_FRAC] - 0.9 * (1.0 - eps)) < 1e-12);
	assert_true(fabs(r.v[RF_EXPANDED_LEVEL_M] - 3.0 / (1.0 - eps)) < 1e-9);
	assert_true(fabs(r.v[RF_FLOOD_PCT] - 100.0 * 3.0 / (1.0 - eps) / 4.0) < 1e-9);
	assert_true(fabs(r.v[RF_CARRYOVER_MARGIN_M] - (4.0 - 3.0 / (1.0 - eps))) < 1e-9);
	double area = M_PI * 0.36 / 4.0;
	assert_true(fabs(r.v[RF_LIQUID_HOLDUP_M3] - 0.9 * 3.0 * area) < 1e-9);
	assert_int_equal(r.basis, FLOOD_BASIS_LEVEL_SWELL);
}

static void test_eval_wet_legs_same_holdup(void **state)
{
	(void)state;
	struct section_geom g = column();
	struct section_result a, b;
	double dp = RHO_L * 0.85 * G * 2.0;
	eval(&g, 0.01, dp, &a);
	g.pbub.impulse_density_kgm3 = 1000.0;
	eval(&g, 0.01, dp - 1000.0 * G * 2.0, &b);
	assert_true(fabs(a.v[RF_GAS_HOLDUP_DP_FRAC] - b.v[RF_GAS_HOLDUP_DP_FRAC]) < 1e-12);
}

static void test_eval_zero_gas_and_no_taps(void **state)
{
	(void)state;
	struct section_geom g = column();
	struct section_result r;
	eval(&g, 0.0, NAN, &r);
	assert_true(r.v[RF_GAS_HOLDUP_FRAC] == 0.0);
	assert_true(isnan(r.v[RF_GAS_HOLDUP_DP_FRAC]));
	assert_true(fabs(r.v[RF_FLOOD_PCT] - 75.0) < 1e-12);
	assert_int_equal(r.quality, FG_QUALITY_GOOD);
}

static void test_eval_impossible_dp_clamped_uncertain(void **state)
{
	(void)state;
	struct section_geom g = column();
	struct section_result r;
	eval(&g, 0.01, RHO_L * 1.3 * G * 2.0, &r);
	assert_true(r.v[RF_GAS_HOLDUP_DP_FRAC] == 0.0);
	assert_true(r.quality >= FG_QUALITY_UNCERTAIN);
	assert_true(isfinite(r.v[RF_FLOOD_PCT])); /* from the correlation */
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_wet_legs_add_their_head),
		cmocka_unit_test(test_correlation_uses_interstitial_velocity),
		cmocka_unit_test(test_expanded_level_inside_and_above_bed),
		cmocka_unit_test(test_eval_tap_holdup_per_free_and_column_volume),
		cmocka_unit_test(test_eval_wet_legs_same_holdup),
		cmocka_unit_test(test_eval_zero_gas_and_no_taps),
		cmocka_unit_test(test_eval_impossible_dp_clamped_uncertain),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
