/*
 * test_bubble.c - behaviour of the bubble-column model. Published check
 * values are in tests/ref/test_ref_spray_bubble.c.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>

#include "bubble.h"
#include "section.h"

/* Air and water at about 20 degC and 1 atm. */
#define RHO_G 1.19
#define RHO_L 998.2
#define MU_L 1.002e-3
#define SIGMA 0.0728
#define G BUBBLE_G_MS2

static bool close_rel(double a, double b, double rel)
{
	return fabs(a - b) <= rel * fabs(b);
}

static struct section_geom bubble_geom(void)
{
	struct section_geom g = {0};
	g.type = SECTION_BUBBLE;
	g.diameter_m = 0.4;
	g.bubble.tap_spacing_m = 1.0;
	g.bubble.clear_liquid_height_m = 3.0;
	g.bubble.overflow_height_m = 4.5;
	g.bubble.electrolyte = false;
	g.bubble.holdup_method = BUBBLE_HOLDUP_AKITA_YOSHIDA;
	return g;
}

static struct fluid_state air_water(void)
{
	struct fluid_state f = {RHO_G, RHO_L, 1.8e-5, MU_L, SIGMA};
	return f;
}

static void eval_at(const struct section_geom *g, const struct fluid_state *f, double ug,
		    double dp_pa, double level_m, struct section_result *r)
{
	result_clear(r);
	r->v[RF_GAS_VELOCITY] = ug;
	struct section_point p = {NAN, 0.0, dp_pa, 101325.0, 293.15, level_m, NAN, NAN, NAN, NAN, NAN};
	bubble_eval(g, f, &p, r);
}

static void test_tap_holdup_is_one_minus_relative_head(void **state)
{
	(void)state;
	/* eps = 1 - dp / (rho_l g dz) with rho_g = 0. */
	double eps = bubble_holdup_dp_frac(0.8 * RHO_L * G * 1.5, 1.5, RHO_L, 0.0, NULL, NULL);
	assert_true(fabs(eps - 0.2) <= 1e-12);
	assert_true(fabs(bubble_holdup_dp_frac(RHO_L * G * 2.0, 2.0, RHO_L, 0.0, NULL, NULL)) <=
		    1e-12);
}

static void test_tap_holdup_accounts_for_gas_head(void **state)
{
	(void)state;
	double rho_g = 50.0; /* a high-pressure column */
	double dp = (RHO_L * 0.7 + rho_g * 0.3) * G * 1.2;
	double eps = bubble_holdup_dp_frac(dp, 1.2, RHO_L, rho_g, NULL, NULL);
	assert_true(fabs(eps - 0.3) <= 1e-12);
}

static void test_tap_holdup_clamps_impossible_dp_never_nan(void **state)
{
	(void)state;
	bool clamped = false;
	struct fg_extrap x = {0, NULL};
	double high = bubble_holdup_dp_frac(1.2 * RHO_L * G, 1.0, RHO_L, RHO_G, &clamped, &x);
	assert_true(high == 0.0);
	assert_true(clamped);
	assert_int_equal(x.count, 1);
	double low = bubble_holdup_dp_frac(-500.0, 1.0, RHO_L, RHO_G, &clamped, &x);
	assert_true(low == 1.0);
	assert_true(clamped);
	assert_int_equal(x.count, 2);
	(void)bubble_holdup_dp_frac(0.9 * RHO_L * G, 1.0, RHO_L, RHO_G, &clamped, &x);
	assert_false(clamped);
	assert_true(isnan(bubble_holdup_dp_frac(NAN, 1.0, RHO_L, RHO_G, &clamped, &x)));
	assert_true(isnan(bubble_holdup_dp_frac(5000.0, 0.0, RHO_L, RHO_G, &clamped, &x)));
	assert_true(isnan(bubble_holdup_dp_frac(5000.0, 1.0, RHO_G, RHO_G, &clamped, &x)));
}

static void test_akita_yoshida_solves_its_implicit_equation(void **state)
{
	(void)state;
	for (double ug = 0.01; ug < 0.4; ug *= 1.6) {
		double eps = bubble_akita_yoshida_frac(ug, 0.3, RHO_L, MU_L, SIGMA, false, NULL);
		double nu = MU_L / RHO_L;
		double rhs = 0.20 * pow(G * 0.09 * RHO_L / SIGMA, 0.125) *
			     pow(G * 0.027 / (nu * nu), 1.0 / 12.0) * ug / sqrt(G * 0.3);
		double lhs = eps / pow(1.0 - eps, 4.0);
		assert_true(close_rel(lhs, rhs, 1e-12));
	}
}

static void test_akita_yoshida_rises_with_gas_rate_and_electrolyte(void **state)
{
	(void)state;
	double a = bubble_akita_yoshida_frac(0.05, 0.3, RHO_L, MU_L, SIGMA, false, NULL);
	double b = bubble_akita_yoshida_frac(0.10, 0.3, RHO_L, MU_L, SIGMA, false, NULL);
	double c = bubble_akita_yoshida_frac(0.10, 0.3, RHO_L, MU_L, SIGMA, true, NULL);
	assert_true(b > a);
	assert_true(c > b);
	assert_true(bubble_akita_yoshida_frac(0.0, 0.3, RHO_L, MU_L, SIGMA, false, NULL) == 0.0);
}

static void test_akita_yoshida_does_not_depend_on_diameter_but_notes_range(void **state)
{
	(void)state;
	struct fg_extrap x = {0, NULL};
	double in = bubble_akita_yoshida_frac(0.1, 0.3, RHO_L, MU_L, SIGMA, false, &x);
	assert_int_equal(x.count, 0);
	double big = bubble_akita_yoshida_frac(0.1, 3.0, RHO_L, MU_L, SIGMA, false, &x);
	assert_true(close_rel(big, in, 1e-12));
	assert_int_equal(x.count, 1);
	double fast = bubble_akita_yoshida_frac(0.6, 0.3, RHO_L, MU_L, SIGMA, false, &x);
	assert_true(isfinite(fast));
	assert_true(fast < 1.0);
	assert_int_equal(x.count, 2);
	assert_true(isnan(bubble_akita_yoshida_frac(-0.1, 0.3, RHO_L, MU_L, SIGMA, false, &x)));
}

static void test_hughmark_stays_below_one_half_and_notes_range(void **state)
{
	(void)state;
	struct fg_extrap x = {0, NULL};
	double prev = 0.0;
	for (double ug = 0.005; ug <= 0.4; ug *= 1.5) {
		double eps = bubble_hughmark_frac(ug, 0.3, RHO_L, SIGMA, &x);
		assert_true(eps > prev);
		assert_true(eps < 0.5);
		prev = eps;
	}
	assert_int_equal(x.count, 0);
	assert_true(bubble_hughmark_frac(0.0, 0.3, RHO_L, SIGMA, &x) == 0.0);
	(void)bubble_hughmark_frac(0.1, 0.05, RHO_L, SIGMA, &x);
	assert_int_equal(x.count, 1);
	(void)bubble_hughmark_frac(2.0, 0.3, RHO_L, SIGMA, &x);
	assert_int_equal(x.count, 2);
}

static void test_wilkinson_transition_rises_with_gas_density(void **state)
{
	(void)state;
	double u1 = bubble_wilkinson_transition_ms(RHO_L, 1.2, MU_L, SIGMA, NULL);
	double u2 = bubble_wilkinson_transition_ms(RHO_L, 12.0, MU_L, SIGMA, NULL);
	double u3 = bubble_wilkinson_transition_ms(RHO_L, 24.0, MU_L, SIGMA, NULL);
	assert_true(u2 > u1);
	assert_true(u3 > u2);
	double e = bubble_wilkinson_transition_frac(24.0, MU_L, SIGMA);
	double ub = bubble_wilkinson_small_bubble_ms(RHO_L, 24.0, MU_L, SIGMA);
	assert_true(close_rel(u3, e * ub, 1e-12));
	assert_true(e < 0.5);
}

static void test_regime_changes_at_transition_velocity(void **state)
{
	(void)state;
	assert_int_equal(bubble_regime_at(0.01, 0.02), BUBBLE_REGIME_HOMOGENEOUS);
	assert_int_equal(bubble_regime_at(0.02, 0.02), BUBBLE_REGIME_CHURN_TURBULENT);
	assert_int_equal(bubble_regime_at(0.05, 0.02), BUBBLE_REGIME_CHURN_TURBULENT);
	assert_int_equal(bubble_regime_at(NAN, 0.02), BUBBLE_REGIME_NONE);
}

static void test_expanded_level_is_clear_height_over_liquid_fraction(void **state)
{
	(void)state;
	assert_true(fabs(bubble_expanded_level_m(3.0, 0.25) - 4.0) <= 1e-12);
	assert_true(fabs(bubble_expanded_level_m(3.0, 0.0) - 3.0) <= 1e-12);
	assert_true(isnan(bubble_expanded_level_m(3.0, 1.0)));
	assert_true(isnan(bubble_expanded_level_m(NAN, 0.2)));
	assert_true(isnan(bubble_expanded_level_m(3.0, -0.1)));
}

static void test_eval_prefers_tap_holdup_when_in_range(void **state)
{
	(void)state;
	struct section_geom g = bubble_geom();
	struct fluid_state f = air_water();
	struct section_result r;
	double dp = (RHO_L * 0.8 + RHO_G * 0.2) * G * 1.0; /* eps 0.2 over 1 m */
	eval_at(&g, &f, 0.08, dp, NAN, &r);
	assert_int_equal(r.quality, FG_QUALITY_GOOD);
	assert_true(fabs(r.v[RF_GAS_HOLDUP_DP_FRAC] - 0.2) <= 1e-12);
	double ay = bubble_akita_yoshida_frac(0.08, 0.4, RHO_L, MU_L, SIGMA, false, NULL);
	assert_true(fabs(r.v[RF_GAS_HOLDUP_FRAC] - ay) <= 1e-15);
	assert_true(fabs(r.v[RF_EXPANDED_LEVEL_M] - 3.0 / 0.8) <= 1e-12);
	assert_true(fabs(r.v[RF_FLOOD_PCT] - 100.0 * 3.75 / 4.5) <= 1e-10);
	assert_int_equal(r.basis, FLOOD_BASIS_LEVEL_SWELL);
	assert_true(fabs(r.v[RF_LIQUID_HOLDUP_FRAC] - 0.8) <= 1e-12);
	assert_true(fabs(r.v[RF_LIQUID_HOLDUP_M3] - 3.0 * M_PI * 0.04) <= 1e-12);
	double ut = bubble_wilkinson_transition_ms(RHO_L, RHO_G, MU_L, SIGMA, NULL);
	assert_int_equal(r.regime, bubble_regime_at(0.08, ut));
	assert_int_not_equal(r.regime, BUBBLE_REGIME_NONE);
}

static void test_eval_falls_back_to_correlation_without_taps(void **state)
{
	(void)state;
	struct section_geom g = bubble_geom();
	struct fluid_state f = air_water();
	struct section_result r;
	eval_at(&g, &f, 0.08, NAN, NAN, &r);
	assert_int_equal(r.quality, FG_QUALITY_GOOD);
	assert_true(isnan(r.v[RF_GAS_HOLDUP_DP_FRAC]));
	double ay = r.v[RF_GAS_HOLDUP_FRAC];
	assert_true(ay > 0.0);
	assert_true(fabs(r.v[RF_EXPANDED_LEVEL_M] - 3.0 / (1.0 - ay)) <= 1e-12);
	g.bubble.holdup_method = BUBBLE_HOLDUP_HUGHMARK;
	eval_at(&g, &f, 0.08, NAN, NAN, &r);
	double hm = bubble_hughmark_frac(0.08, 0.4, RHO_L, SIGMA, NULL);
	assert_true(fabs(r.v[RF_GAS_HOLDUP_FRAC] - hm) <= 1e-15);
	assert_true(fabs(r.v[RF_LIQUID_HOLDUP_FRAC] - (1.0 - hm)) <= 1e-15);
}

static void test_eval_clamped_tap_dp_uses_correlation_and_is_uncertain(void **state)
{
	(void)state;
	struct section_geom g = bubble_geom();
	struct fluid_state f = air_water();
	struct section_result r;
	eval_at(&g, &f, 0.08, 1.3 * RHO_L * G, NAN, &r);
	assert_int_equal(r.quality, FG_QUALITY_UNCERTAIN);
	assert_true(r.v[RF_GAS_HOLDUP_DP_FRAC] == 0.0);
	double eps = r.v[RF_GAS_HOLDUP_FRAC];
	assert_true(fabs(r.v[RF_EXPANDED_LEVEL_M] - 3.0 / (1.0 - eps)) <= 1e-12);
	assert_true(r.extrap.count >= 1);
}

static void test_eval_level_signal_overrides_configured_clear_height(void **state)
{
	(void)state;
	struct section_geom g = bubble_geom();
	struct fluid_state f = air_water();
	struct section_result r;
	double dp = RHO_L * 0.75 * G + RHO_G * 0.25 * G;
	eval_at(&g, &f, 0.08, dp, 2.4, &r);
	assert_true(fabs(r.v[RF_EXPANDED_LEVEL_M] - 3.2) <= 1e-9);
	assert_true(fabs(r.v[RF_LIQUID_HOLDUP_M3] - 2.4 * M_PI * 0.04) <= 1e-12);
}

static void test_eval_zero_gas_gives_clear_level_and_homogeneous(void **state)
{
	(void)state;
	struct section_geom g = bubble_geom();
	struct fluid_state f = air_water();
	struct section_result r;
	eval_at(&g, &f, 0.0, NAN, NAN, &r);
	assert_int_equal(r.quality, FG_QUALITY_GOOD);
	assert_true(r.v[RF_GAS_HOLDUP_FRAC] == 0.0);
	assert_true(fabs(r.v[RF_EXPANDED_LEVEL_M] - 3.0) <= 1e-12);
	assert_true(fabs(r.v[RF_FLOOD_PCT] - 100.0 * 3.0 / 4.5) <= 1e-10);
	assert_int_equal(r.regime, BUBBLE_REGIME_HOMOGENEOUS);
}

static void test_eval_high_gas_is_churn_turbulent_and_noted(void **state)
{
	(void)state;
	struct section_geom g = bubble_geom();
	struct fluid_state f = air_water();
	struct section_result r;
	eval_at(&g, &f, 0.8, NAN, NAN, &r);
	assert_int_equal(r.regime, BUBBLE_REGIME_CHURN_TURBULENT);
	assert_true(isfinite(r.v[RF_FLOOD_PCT]));
	assert_true(r.extrap.count >= 1);
}

static void test_eval_liquid_not_denser_than_gas_is_bad(void **state)
{
	(void)state;
	struct section_geom g = bubble_geom();
	struct fluid_state f = air_water();
	f.rho_g_kgm3 = 1200.0;
	struct section_result r;
	eval_at(&g, &f, 0.05, 20000.0, NAN, &r);
	assert_int_equal(r.quality, FG_QUALITY_BAD);
	assert_true(isnan(r.v[RF_FLOOD_PCT]));
	assert_true(isnan(r.v[RF_GAS_HOLDUP_FRAC]));
	assert_true(isnan(r.v[RF_GAS_HOLDUP_DP_FRAC]));
	assert_int_equal(r.regime, BUBBLE_REGIME_NONE);
}

static void test_eval_non_positive_properties_are_bad(void **state)
{
	(void)state;
	struct section_geom g = bubble_geom();
	struct fluid_state f = air_water();
	struct section_result r;
	f.sigma_nm = 0.0;
	eval_at(&g, &f, 0.05, NAN, NAN, &r);
	assert_int_equal(r.quality, FG_QUALITY_BAD);
	assert_true(isnan(r.v[RF_EXPANDED_LEVEL_M]));
	f = air_water();
	f.mu_l_pas = -1.0;
	eval_at(&g, &f, 0.05, NAN, NAN, &r);
	assert_int_equal(r.quality, FG_QUALITY_BAD);
	f = air_water();
	eval_at(&g, &f, -0.05, NAN, NAN, &r);
	assert_int_equal(r.quality, FG_QUALITY_BAD);
}

static void test_eval_without_overflow_height_has_no_flood(void **state)
{
	(void)state;
	struct section_geom g = bubble_geom();
	g.bubble.overflow_height_m = NAN;
	struct fluid_state f = air_water();
	struct section_result r;
	eval_at(&g, &f, 0.05, NAN, NAN, &r);
	assert_true(isnan(r.v[RF_FLOOD_PCT]));
	assert_true(isfinite(r.v[RF_EXPANDED_LEVEL_M]));
	assert_int_equal(r.quality, FG_QUALITY_BAD);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_tap_holdup_is_one_minus_relative_head),
		cmocka_unit_test(test_tap_holdup_accounts_for_gas_head),
		cmocka_unit_test(test_tap_holdup_clamps_impossible_dp_never_nan),
		cmocka_unit_test(test_akita_yoshida_solves_its_implicit_equation),
		cmocka_unit_test(test_akita_yoshida_rises_with_gas_rate_and_electrolyte),
		cmocka_unit_test(test_akita_yoshida_does_not_depend_on_diameter_but_notes_range),
		cmocka_unit_test(test_hughmark_stays_below_one_half_and_notes_range),
		cmocka_unit_test(test_wilkinson_transition_rises_with_gas_density),
		cmocka_unit_test(test_regime_changes_at_transition_velocity),
		cmocka_unit_test(test_expanded_level_is_clear_height_over_liquid_fraction),
		cmocka_unit_test(test_eval_prefers_tap_holdup_when_in_range),
		cmocka_unit_test(test_eval_falls_back_to_correlation_without_taps),
		cmocka_unit_test(test_eval_clamped_tap_dp_uses_correlation_and_is_uncertain),
		cmocka_unit_test(test_eval_level_signal_overrides_configured_clear_height),
		cmocka_unit_test(test_eval_zero_gas_gives_clear_level_and_homogeneous),
		cmocka_unit_test(test_eval_high_gas_is_churn_turbulent_and_noted),
		cmocka_unit_test(test_eval_liquid_not_denser_than_gas_is_bad),
		cmocka_unit_test(test_eval_non_positive_properties_are_bad),
		cmocka_unit_test(test_eval_without_overflow_height_has_no_flood),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
