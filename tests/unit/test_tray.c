/*
 * test_tray.c - behaviour of the tray hydraulics models (models/tray.c):
 * monotonic trends, where corrections and notes switch on, edge cases, and
 * that tray_eval() puts together the public functions as documented.
 *
 * The numbers for outside checks are in tests/ref/test_ref_tray.c; here the
 * design point is an invented one (the stripper of an invented plant) and
 * the assertions are about behaviour, not about handbook values.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <string.h>

#include "fg_result.h"
#include "section.h"
#include "tray.h"

#define PI 3.14159265358979323846

/* Relative closeness for doubles (cmocka's float assert casts to float). */
static int close_rel(double a, double b, double rel)
{
	return fabs(a - b) <= rel * fabs(b);
}

/* Invented plant: the upper section of stripper S-3 at the (fictional)
 * Kestrel Ford solvent works. 1.5 m sieve trays at 0.6 m spacing. */
static struct section_geom geom(void)
{
	struct section_geom g;
	memset(&g, 0, sizeof g);
	g.type = SECTION_TRAY;
	g.diameter_m = 1.5;
	g.tray.trays = 20;
	g.tray.kind = TRAY_SIEVE;
	g.tray.spacing_m = 0.6;
	g.tray.weir_height_m = 0.05;
	g.tray.weir_length_m = 1.1;
	g.tray.active_area_frac = 0.76;
	g.tray.downcomer_area_frac = 0.12;
	g.tray.hole_area_frac = 0.10;
	g.tray.hole_diameter_m = 0.005;
	g.tray.deck_thickness_m = 0.003;
	g.tray.downcomer_clearance_m = 0.04;
	g.tray.flood_method = TRAY_FLOOD_FAIR;
	return g;
}

static struct fluid_state fluids(void)
{
	struct fluid_state f = {
		.rho_g_kgm3 = 2.5, .rho_l_kgm3 = 800.0, .mu_g_pas = 1e-5,
		.mu_l_pas = 3e-4, .sigma_nm = 0.020,
	};
	return f;
}

static struct section_point point(double gas_kgs, double liquid_kgs)
{
	struct section_point p = {
		.gas_kgs = gas_kgs, .liquid_kgs = liquid_kgs, .dp_pa = NAN,
		.pressure_pa = 2e5, .temperature_k = 350.0, .level_m = NAN,
		.gas_density_kgm3 = NAN,
	};
	return p;
}

static struct section_result eval(const struct section_geom *g, const struct fluid_state *f,
				  const struct section_point *p)
{
	struct section_result r;
	result_clear(&r);
	tray_eval(g, f, p, &r);
	return r;
}

/* ---- Fair / Lygeros-Magoulas ---- */

static void test_fair_csb_rises_with_tray_spacing(void **state)
{
	(void)state;
	double a = tray_fair_csb_ms(0.1, 0.45, NULL);
	double b = tray_fair_csb_ms(0.1, 0.60, NULL);
	double c = tray_fair_csb_ms(0.1, 0.90, NULL);
	assert_true(a < b);
	assert_true(b < c);
}

static void test_fair_csb_falls_with_flow_parameter(void **state)
{
	(void)state;
	double prev = INFINITY;
	for (double flv = 0.01; flv <= 1.0; flv *= 1.5) {
		double c = tray_fair_csb_ms(flv, 0.6, NULL);
		assert_true(c < prev);
		assert_true(c > 0.0105);
		prev = c;
	}
}

static void test_fair_csb_notes_only_outside_chart(void **state)
{
	(void)state;
	struct fg_extrap x = {0, NULL};
	assert_true(isfinite(tray_fair_csb_ms(0.1, 0.6, &x)));
	assert_int_equal(x.count, 0);
	assert_true(isfinite(tray_fair_csb_ms(0.005, 0.6, &x)));
	assert_int_equal(x.count, 1);
	assert_true(isfinite(tray_fair_csb_ms(2.0, 0.6, &x)));
	assert_int_equal(x.count, 2);
	assert_true(isfinite(tray_fair_csb_ms(0.1, 1.2, &x)));
	assert_int_equal(x.count, 3);
	assert_non_null(x.first);
}

static void test_fair_csb_nan_for_impossible_arguments(void **state)
{
	(void)state;
	assert_true(isnan(tray_fair_csb_ms(-0.1, 0.6, NULL)));
	assert_true(isnan(tray_fair_csb_ms(NAN, 0.6, NULL)));
	assert_true(isnan(tray_fair_csb_ms(0.1, 0.0, NULL)));
}

static void test_sigma_factor_is_one_at_twenty_mNm_and_fifth_power(void **state)
{
	(void)state;
	assert_true(fabs(tray_sigma_factor(0.020) - 1.0) <= 1e-12);
	assert_true(close_rel(tray_sigma_factor(0.040), pow(2.0, 0.2), 1e-12));
	assert_true(tray_sigma_factor(0.010) < 1.0);
	assert_true(isnan(tray_sigma_factor(0.0)));
}

static void test_hole_area_factor_switches_on_below_ten_percent(void **state)
{
	(void)state;
	struct fg_extrap x = {0, NULL};
	assert_true(tray_hole_area_factor(0.12, &x) == 1.0);
	assert_true(tray_hole_area_factor(0.10, &x) == 1.0);
	assert_true(close_rel(tray_hole_area_factor(0.08, &x), 0.90, 1e-12));
	assert_true(close_rel(tray_hole_area_factor(0.06, &x), 0.80, 1e-12));
	assert_true(close_rel(tray_hole_area_factor(0.07, &x), 0.85, 1e-12));
	assert_int_equal(x.count, 0);
	double f = tray_hole_area_factor(0.04, &x);
	assert_int_equal(x.count, 1);
	assert_true(f > 0.0);
	assert_true(f < 0.8);
	assert_true(tray_hole_area_factor(0.001, NULL) >= 0.1);
	assert_true(isnan(tray_hole_area_factor(0.0, NULL)));
}

static void test_flood_velocity_nan_unless_liquid_denser(void **state)
{
	(void)state;
	assert_true(close_rel(tray_flood_velocity_ms(0.1, 802.5, 2.5), 0.1 * sqrt(320.0), 1e-12));
	assert_true(isnan(tray_flood_velocity_ms(0.1, 2.5, 2.5)));
	assert_true(isnan(tray_flood_velocity_ms(0.1, 1.0, 2.5)));
	assert_true(isnan(tray_flood_velocity_ms(0.1, 800.0, 0.0)));
}

static void test_jet_flood_pct_is_velocity_ratio(void **state)
{
	(void)state;
	assert_true(close_rel(tray_jet_flood_pct(1.2, 1.6), 75.0, 1e-12));
	assert_true(tray_jet_flood_pct(0.0, 1.6) == 0.0);
	assert_true(isnan(tray_jet_flood_pct(1.0, 0.0)));
}

/* ---- Kister & Haas ---- */

static void test_kh_transition_height_rises_with_liquid_load(void **state)
{
	(void)state;
	double a = tray_kh_transition_height_m(0.1, 0.005, 5.0 / 3600.0, 800.0);
	double b = tray_kh_transition_height_m(0.1, 0.005, 20.0 / 3600.0, 800.0);
	double c = tray_kh_transition_height_m(0.1, 0.005, 60.0 / 3600.0, 800.0);
	assert_true(a > 0.0);
	assert_true(a < b);
	assert_true(b < c);
	assert_true(tray_kh_transition_height_m(0.1, 0.005, 0.0, 800.0) == 0.0);
	assert_true(isnan(tray_kh_transition_height_m(0.0, 0.005, 0.001, 800.0)));
	assert_true(isnan(tray_kh_transition_height_m(0.1, 0.005, -0.001, 800.0)));
}

static void test_kh_csb_holds_low_weir_load_and_notes(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	struct fg_extrap x = {0, NULL};
	double at_min = tray_kh_csb_ms(&g.tray, &f, 3.0 / 3600.0, &x);
	assert_int_equal(x.count, 0);
	double zero = tray_kh_csb_ms(&g.tray, &f, 0.0, &x);
	assert_int_equal(x.count, 1);
	assert_true(isfinite(zero));
	assert_true(close_rel(zero, at_min, 1e-12));
}

static void test_kh_csb_falls_with_liquid_load_and_notes_range(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	struct fg_extrap x = {0, NULL};
	double lo = tray_kh_csb_ms(&g.tray, &f, 10.0 / 3600.0, &x);
	double hi = tray_kh_csb_ms(&g.tray, &f, 50.0 / 3600.0, &x);
	assert_true(hi < lo);
	assert_int_equal(x.count, 0);
	g.tray.spacing_m = 0.30; /* below the 14 in of the data base */
	assert_true(isfinite(tray_kh_csb_ms(&g.tray, &f, 10.0 / 3600.0, &x)));
	assert_int_equal(x.count, 1);
	f.rho_l_kgm3 = 2.0;
	assert_true(isnan(tray_kh_csb_ms(&g.tray, &f, 10.0 / 3600.0, NULL)));
}

/* ---- weir, orifice, froth, heads ---- */

static void test_weir_crest_scales_with_two_thirds_power(void **state)
{
	(void)state;
	double a = tray_weir_crest_m(0.005, 1.1);
	double b = tray_weir_crest_m(0.010, 1.1);
	assert_true(close_rel(b / a, pow(2.0, 2.0 / 3.0), 1e-12));
	assert_true(tray_weir_crest_m(0.005, 2.2) < a);
	assert_true(tray_weir_crest_m(0.0, 1.1) == 0.0);
	assert_true(isnan(tray_weir_crest_m(-0.001, 1.1)));
	assert_true(isnan(tray_weir_crest_m(0.001, 0.0)));
}

static void test_orifice_coefficient_rises_with_thickness_and_hole_area(void **state)
{
	(void)state;
	struct fg_extrap x = {0, NULL};
	double thin = tray_orifice_coefficient(0.10, 0.4, &x);
	double thick = tray_orifice_coefficient(0.10, 1.0, &x);
	double open = tray_orifice_coefficient(0.15, 1.0, &x);
	assert_true(thin < thick);
	assert_true(thick < open);
	assert_int_equal(x.count, 0);
	assert_true(isfinite(tray_orifice_coefficient(0.10, 0.1, &x)));
	assert_int_equal(x.count, 1);
	assert_true(isfinite(tray_orifice_coefficient(0.30, 0.5, &x)));
	assert_int_equal(x.count, 2);
	assert_true(isnan(tray_orifice_coefficient(0.0, 0.5, NULL)));
}

static void test_dry_head_is_quadratic_in_hole_velocity(void **state)
{
	(void)state;
	double a = tray_dry_head_m(10.0, 0.8, 2.5, 800.0);
	double b = tray_dry_head_m(20.0, 0.8, 2.5, 800.0);
	assert_true(close_rel(b, 4.0 * a, 1e-12));
	assert_true(close_rel(a, 100.0 / (2.0 * TRAY_G_MS2 * 0.64) * 2.5 / 800.0, 1e-12));
	assert_true(tray_dry_head_m(0.0, 0.8, 2.5, 800.0) == 0.0);
	assert_true(isnan(tray_dry_head_m(10.0, 0.0, 2.5, 800.0)));
}

static void test_froth_density_is_one_at_zero_gas_and_falls_with_gas(void **state)
{
	(void)state;
	assert_true(tray_froth_density(0.0, 800.0, 2.5) == 1.0);
	double a = tray_froth_density(0.5, 800.0, 2.5);
	double b = tray_froth_density(1.5, 800.0, 2.5);
	assert_true(a < 1.0);
	assert_true(b < a);
	assert_true(b > 0.0);
	assert_true(isnan(tray_froth_density(1.0, 2.0, 2.5)));
}

static void test_clear_liquid_rises_with_liquid_and_froth_density(void **state)
{
	(void)state;
	double hl0 = tray_clear_liquid_m(1.0, 0.05, 0.0, 1.1);
	assert_true(close_rel(hl0, 0.05, 1e-12));
	double a = tray_clear_liquid_m(0.4, 0.05, 0.005, 1.1);
	double b = tray_clear_liquid_m(0.4, 0.05, 0.010, 1.1);
	double c = tray_clear_liquid_m(0.6, 0.05, 0.010, 1.1);
	assert_true(a < b);
	assert_true(b < c);
	assert_true(isnan(tray_clear_liquid_m(0.0, 0.05, 0.01, 1.1)));
	assert_true(isnan(tray_clear_liquid_m(1.5, 0.05, 0.01, 1.1)));
}

static void test_residual_head_falls_with_hole_diameter(void **state)
{
	(void)state;
	double small = tray_residual_head_m(0.02, 800.0, 2.5, 0.003);
	double big = tray_residual_head_m(0.02, 800.0, 2.5, 0.012);
	assert_true(small > big);
	assert_true(big > 0.0);
	assert_true(tray_residual_head_m(0.04, 800.0, 2.5, 0.005) >
		    tray_residual_head_m(0.02, 800.0, 2.5, 0.005));
	assert_true(isnan(tray_residual_head_m(0.02, 800.0, 2.5, 0.0)));
}

static void test_total_dp_sums_heads(void **state)
{
	(void)state;
	double dp = tray_total_dp_pa(0.01, 0.03, 0.004, 800.0);
	assert_true(close_rel(dp, 800.0 * TRAY_G_MS2 * 0.044, 1e-12));
	assert_true(isnan(tray_total_dp_pa(-0.01, 0.03, 0.004, 800.0)));
}

static void test_apron_head_is_quadratic_in_flow(void **state)
{
	(void)state;
	double a = tray_apron_head_m(0.005, 0.044);
	assert_true(close_rel(tray_apron_head_m(0.010, 0.044), 4.0 * a, 1e-12));
	assert_true(tray_apron_head_m(0.0, 0.044) == 0.0);
	assert_true(isnan(tray_apron_head_m(0.005, 0.0)));
}

static void test_dc_backup_sums_terms_and_limit_is_half_spacing_plus_weir(void **state)
{
	(void)state;
	assert_true(close_rel(tray_dc_backup_m(0.05, 0.02, 0.08, 0.01), 0.16, 1e-12));
	assert_true(isnan(tray_dc_backup_m(0.05, -0.02, 0.08, 0.01)));
	assert_true(close_rel(tray_dc_backup_limit_m(0.6, 0.05), 0.325, 1e-12));
	assert_true(isnan(tray_dc_backup_limit_m(0.0, 0.05)));
}

static void test_weep_k2_rises_then_holds_above_chart(void **state)
{
	(void)state;
	struct fg_extrap x = {0, NULL};
	double prev = -1.0;
	for (double h = 0.0; h <= 0.12; h += 0.01) {
		double k2 = tray_weep_k2(h, &x);
		assert_true(k2 > prev);
		prev = k2;
	}
	assert_int_equal(x.count, 0);
	assert_true(tray_weep_k2(0.20, &x) == tray_weep_k2(0.12, NULL));
	assert_int_equal(x.count, 1);
	assert_true(isnan(tray_weep_k2(-0.01, NULL)));
}

static void test_weep_velocity_rises_with_hole_size_and_falls_with_gas_density(void **state)
{
	(void)state;
	struct fg_extrap x = {0, NULL};
	double small = tray_weep_velocity_ms(30.0, 0.003, 2.5, &x);
	double big = tray_weep_velocity_ms(30.0, 0.012, 2.5, &x);
	assert_true(small < big);
	assert_true(tray_weep_velocity_ms(30.0, 0.005, 10.0, &x) <
		    tray_weep_velocity_ms(30.0, 0.005, 2.5, &x));
	assert_int_equal(x.count, 0);
	assert_true(isfinite(tray_weep_velocity_ms(30.0, 0.030, 2.5, &x)));
	assert_int_equal(x.count, 1);
	assert_true(isnan(tray_weep_velocity_ms(30.0, 0.005, 0.0, NULL)));
}

static void test_weep_pct_is_velocity_ratio(void **state)
{
	(void)state;
	assert_true(close_rel(tray_weep_pct(9.0, 12.0), 75.0, 1e-12));
	assert_true(tray_weep_pct(0.0, 12.0) == 0.0);
	assert_true(isnan(tray_weep_pct(9.0, 0.0)));
}

static void test_liquid_per_tray_adds_deck_and_downcomer(void **state)
{
	(void)state;
	assert_true(close_rel(tray_liquid_per_tray_m3(0.03, 1.3, 0.2, 0.2), 0.079, 1e-12));
	assert_true(isnan(tray_liquid_per_tray_m3(-0.03, 1.3, 0.2, 0.2)));
}

/* ---- tray_eval ---- */

static void test_jet_flood_rises_with_gas_rate(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	for (int m = 0; m < 2; m++) {
		g.tray.flood_method = m ? TRAY_FLOOD_KISTER_HAAS : TRAY_FLOOD_FAIR;
		double prev = -1.0;
		for (double gas = 0.5; gas <= 9.0; gas += 0.5) {
			struct section_point p = point(gas, 6.0);
			struct section_result r = eval(&g, &f, &p);
			assert_true(r.v[RF_JET_FLOOD_PCT] > prev);
			prev = r.v[RF_JET_FLOOD_PCT];
		}
	}
}

static void test_jet_flood_rises_with_liquid_rate(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	for (int m = 0; m < 2; m++) {
		g.tray.flood_method = m ? TRAY_FLOOD_KISTER_HAAS : TRAY_FLOOD_FAIR;
		double prev = -1.0;
		for (double liq = 1.0; liq <= 20.0; liq += 1.0) {
			struct section_point p = point(4.0, liq);
			struct section_result r = eval(&g, &f, &p);
			assert_true(r.v[RF_JET_FLOOD_PCT] > prev);
			prev = r.v[RF_JET_FLOOD_PCT];
		}
	}
}

static void test_dc_backup_and_holdup_rise_with_liquid_rate(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	double prev_dc = -1.0, prev_hold = -1.0;
	for (double liq = 0.0; liq <= 20.0; liq += 2.0) {
		struct section_point p = point(4.0, liq);
		struct section_result r = eval(&g, &f, &p);
		assert_true(r.v[RF_DC_BACKUP_PCT] > prev_dc);
		assert_true(r.v[RF_LIQUID_HOLDUP_M3] > prev_hold);
		prev_dc = r.v[RF_DC_BACKUP_PCT];
		prev_hold = r.v[RF_LIQUID_HOLDUP_M3];
	}
}

static void test_dp_model_rises_with_gas_rate_above_weep(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	double prev = -1.0;
	for (double gas = 3.0; gas <= 9.0; gas += 0.5) {
		struct section_point p = point(gas, 6.0);
		struct section_result r = eval(&g, &f, &p);
		assert_true(r.v[RF_DP_MODEL_PA] > prev);
		prev = r.v[RF_DP_MODEL_PA];
	}
}

static void test_flood_pct_is_larger_of_jet_and_downcomer_with_basis(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	struct section_point p = point(6.0, 6.0);
	struct section_result r = eval(&g, &f, &p);
	assert_true(r.v[RF_JET_FLOOD_PCT] > r.v[RF_DC_BACKUP_PCT]);
	assert_true(r.v[RF_FLOOD_PCT] == r.v[RF_JET_FLOOD_PCT]);
	assert_int_equal(r.basis, FLOOD_BASIS_JET);

	p = point(1.0, 30.0); /* little gas, a lot of liquid: the downcomer limits */
	r = eval(&g, &f, &p);
	assert_true(r.v[RF_DC_BACKUP_PCT] > r.v[RF_JET_FLOOD_PCT]);
	assert_true(r.v[RF_FLOOD_PCT] == r.v[RF_DC_BACKUP_PCT]);
	assert_int_equal(r.basis, FLOOD_BASIS_DOWNCOMER);
}

static void test_zero_gas_gives_zero_flood_and_weep(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	struct section_point p = point(0.0, 6.0);
	p.dp_pa = 100.0;
	struct section_result r = eval(&g, &f, &p);
	assert_int_equal(r.quality, FG_QUALITY_GOOD);
	assert_true(r.v[RF_JET_FLOOD_PCT] == 0.0);
	assert_true(r.v[RF_WEEP_PCT] == 0.0);
	assert_true(r.v[RF_DP_MODEL_PA] == 0.0);
	assert_true(isfinite(r.v[RF_DC_BACKUP_PCT]));
	assert_true(r.v[RF_DC_BACKUP_PCT] > 0.0);
	assert_true(isfinite(r.v[RF_DP_FLOOD_PCT]));
	assert_true(r.v[RF_LIQUID_HOLDUP_M3] > 0.0);
	assert_true(r.extrap.count > 0); /* sieve tray below its weep point */
}

static void test_zero_liquid_is_finite(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	for (int m = 0; m < 2; m++) {
		g.tray.flood_method = m ? TRAY_FLOOD_KISTER_HAAS : TRAY_FLOOD_FAIR;
		struct section_point p = point(4.0, 0.0);
		p.dp_pa = 8000.0;
		struct section_result r = eval(&g, &f, &p);
		assert_int_equal(r.quality, FG_QUALITY_GOOD);
		assert_true(r.v[RF_JET_FLOOD_PCT] > 0.0);
		assert_true(isfinite(r.v[RF_JET_FLOOD_PCT]));
		assert_true(isfinite(r.v[RF_DC_BACKUP_PCT]));
		assert_true(isfinite(r.v[RF_DP_FLOOD_PCT]));
		assert_true(r.v[RF_CLEAR_LIQUID_M] > 0.0);
		assert_true(r.extrap.count > 0); /* FLV below the chart / KH load held */
	}
}

static void test_gas_above_flood_is_finite_above_100_and_noted(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	struct section_point p = point(12.0, 6.0);
	struct section_result r = eval(&g, &f, &p);
	assert_true(isfinite(r.v[RF_JET_FLOOD_PCT]));
	assert_true(r.v[RF_JET_FLOOD_PCT] > 100.0);
	assert_true(r.v[RF_FLOOD_PCT] > 100.0);
	assert_true(r.extrap.count > 0);
	p = point(4.0, 6.0);
	r = eval(&g, &f, &p);
	assert_true(r.v[RF_JET_FLOOD_PCT] < 100.0);
	assert_int_equal(r.extrap.count, 0);
}

/* The flood-point evaluation behind dp_flood_pct runs the tray at a higher gas
 * rate, where the flow parameter is lower. Its range notes are about that
 * other point and must not reach the operating point's result: at FLV 0.012
 * (inside Fair's chart) the result is not extrapolated whether or not a DP is
 * measured. Before the fix the DP case read "flow parameter outside Fair
 * chart" (the flood point lies at FLV 0.008). */
static void test_flood_point_evaluation_leaves_no_notes(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	double gas = 5.0, liq = 5.0 * 0.012 / sqrt(2.5 / 800.0);
	struct section_point p = point(gas, liq);
	struct section_result plain = eval(&g, &f, &p);
	double jet = plain.v[RF_JET_FLOOD_PCT];
	assert_true(jet > 60.0);
	assert_true(jet < 100.0);
	assert_true(0.012 * jet / 100.0 < 0.01); /* the flood point is off the chart */
	assert_int_equal(plain.extrap.count, 0);
	p.dp_pa = 8000.0;
	struct section_result with_dp = eval(&g, &f, &p);
	assert_true(isfinite(with_dp.v[RF_DP_FLOOD_PCT]));
	assert_int_equal(with_dp.extrap.count, 0);
	assert_int_equal(with_dp.quality, FG_QUALITY_GOOD);
	assert_true(with_dp.v[RF_JET_FLOOD_PCT] == jet);
}

static void assert_all_tray_fields_nan(const struct section_result *r)
{
	assert_int_equal(r->quality, FG_QUALITY_BAD);
	assert_true(isnan(r->v[RF_FLOOD_PCT]));
	assert_true(isnan(r->v[RF_JET_FLOOD_PCT]));
	assert_true(isnan(r->v[RF_DC_BACKUP_PCT]));
	assert_true(isnan(r->v[RF_WEEP_PCT]));
	assert_true(isnan(r->v[RF_CLEAR_LIQUID_M]));
	assert_true(isnan(r->v[RF_DP_MODEL_PA]));
	assert_true(isnan(r->v[RF_DP_FLOOD_PCT]));
	assert_true(isnan(r->v[RF_LIQUID_HOLDUP_M3]));
	assert_true(isnan(r->v[RF_LIQUID_HOLDUP_FRAC]));
	assert_int_equal(r->basis, FLOOD_BASIS_NONE);
}

static void test_bad_properties_give_bad_quality_and_nan_fields(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct section_point p = point(4.0, 6.0);
	p.dp_pa = 8000.0;
	struct fluid_state f = fluids();
	f.rho_l_kgm3 = f.rho_g_kgm3; /* liquid not denser than gas */
	struct section_result r = eval(&g, &f, &p);
	assert_all_tray_fields_nan(&r);
	f = fluids();
	f.rho_g_kgm3 = NAN;
	r = eval(&g, &f, &p);
	assert_all_tray_fields_nan(&r);
	f = fluids();
	f.sigma_nm = 0.0;
	r = eval(&g, &f, &p);
	assert_all_tray_fields_nan(&r);
	f = fluids();
	f.rho_g_kgm3 = -1.0;
	r = eval(&g, &f, &p);
	assert_all_tray_fields_nan(&r);
}

static void test_bad_flows_or_geometry_give_bad_quality(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	struct section_point p = point(-1.0, 6.0);
	struct section_result r = eval(&g, &f, &p);
	assert_all_tray_fields_nan(&r);
	p = point(4.0, NAN);
	r = eval(&g, &f, &p);
	assert_all_tray_fields_nan(&r);
	p = point(4.0, 6.0);
	g.tray.hole_area_frac = 0.0;
	r = eval(&g, &f, &p);
	assert_all_tray_fields_nan(&r);
	g = geom();
	g.tray.trays = 0;
	r = eval(&g, &f, &p);
	assert_all_tray_fields_nan(&r);
}

static void test_dp_flood_pct_only_with_measured_dp(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	struct section_point p = point(4.0, 6.0);
	struct section_result r = eval(&g, &f, &p);
	assert_true(isnan(r.v[RF_DP_FLOOD_PCT]));
	p.dp_pa = 10000.0;
	r = eval(&g, &f, &p);
	assert_true(isfinite(r.v[RF_DP_FLOOD_PCT]));
	p.dp_pa = 20000.0;
	struct section_result r2 = eval(&g, &f, &p);
	assert_true(close_rel(r2.v[RF_DP_FLOOD_PCT], 2.0 * r.v[RF_DP_FLOOD_PCT], 1e-12));
}

/* The basis of dp_flood_pct: measured DP per tray over the model DP per tray
 * at the gas rate giving 100 % jet flood. Find that gas rate here by
 * bisection on tray_eval's own jet %, and feed the model's section DP there
 * back as the "measurement": the answer must be 100 %. */
static void test_dp_flood_pct_is_100_at_model_dp_at_flood(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	double lo = 1.0, hi = 20.0;
	for (int i = 0; i < 200; i++) {
		double mid = 0.5 * (lo + hi);
		struct section_point p = point(mid, 6.0);
		struct section_result r = eval(&g, &f, &p);
		if (r.v[RF_JET_FLOOD_PCT] >= 100.0)
			hi = mid;
		else
			lo = mid;
	}
	struct section_point p = point(0.5 * (lo + hi), 6.0);
	struct section_result at_flood = eval(&g, &f, &p);
	assert_true(fabs(at_flood.v[RF_JET_FLOOD_PCT] - 100.0) <= 1e-6);
	struct section_point q = point(4.0, 6.0);
	q.dp_pa = at_flood.v[RF_DP_MODEL_PA];
	struct section_result r = eval(&g, &f, &q);
	assert_true(fabs(r.v[RF_DP_FLOOD_PCT] - 100.0) <= 1e-6);
}

static void test_dp_model_scales_with_tray_count(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	struct section_point p = point(4.0, 6.0);
	struct section_result a = eval(&g, &f, &p);
	g.tray.trays = 40;
	struct section_result b = eval(&g, &f, &p);
	assert_true(close_rel(b.v[RF_DP_MODEL_PA], 2.0 * a.v[RF_DP_MODEL_PA], 1e-12));
	assert_true(close_rel(b.v[RF_LIQUID_HOLDUP_M3], 2.0 * a.v[RF_LIQUID_HOLDUP_M3], 1e-12));
	assert_true(close_rel(b.v[RF_LIQUID_HOLDUP_FRAC], a.v[RF_LIQUID_HOLDUP_FRAC], 1e-12));
}

/* tray_eval must be the public functions put together as documented. */
static void test_eval_matches_public_functions(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	const struct tray_geom *t = &g.tray;
	double gas = 4.0, liq = 6.0;
	struct section_point p = point(gas, liq);
	struct section_result r = eval(&g, &f, &p);

	double at = PI / 4.0 * g.diameter_m * g.diameter_m;
	double an = at * (1.0 - t->downcomer_area_frac), aa = at * t->active_area_frac;
	double ad = at * t->downcomer_area_frac;
	double qg = gas / f.rho_g_kgm3, ql = liq / f.rho_l_kgm3;
	double flv = liq / gas * sqrt(f.rho_g_kgm3 / f.rho_l_kgm3);
	double c = tray_fair_csb_ms(flv, t->spacing_m, NULL) * tray_sigma_factor(f.sigma_nm) *
		   tray_hole_area_factor(t->hole_area_frac, NULL);
	double jet = tray_jet_flood_pct(qg / an, tray_flood_velocity_ms(c, f.rho_l_kgm3,
									f.rho_g_kgm3));
	assert_true(close_rel(r.v[RF_JET_FLOOD_PCT], jet, 1e-12));

	double ae = tray_froth_density(qg / aa, f.rho_l_kgm3, f.rho_g_kgm3);
	double hl = tray_clear_liquid_m(ae, t->weir_height_m, ql, t->weir_length_m);
	assert_true(close_rel(r.v[RF_CLEAR_LIQUID_M], hl, 1e-12));
	double cd = tray_orifice_coefficient(t->hole_area_frac,
					     t->deck_thickness_m / t->hole_diameter_m, NULL);
	double hd = tray_dry_head_m(qg / (aa * t->hole_area_frac), cd, f.rho_g_kgm3,
				    f.rho_l_kgm3);
	double hr = tray_residual_head_m(f.sigma_nm, f.rho_l_kgm3, f.rho_g_kgm3,
					 t->hole_diameter_m);
	double dp = tray_total_dp_pa(hd, hl, hr, f.rho_l_kgm3);
	assert_true(close_rel(r.v[RF_DP_MODEL_PA], dp * t->trays, 1e-12));

	double how = tray_weir_crest_m(ql, t->weir_length_m);
	double hdc = tray_apron_head_m(ql, t->downcomer_clearance_m * t->weir_length_m);
	double hb = tray_dc_backup_m(t->weir_height_m, how, dp / (f.rho_l_kgm3 * TRAY_G_MS2), hdc);
	double dc = 100.0 * hb / tray_dc_backup_limit_m(t->spacing_m, t->weir_height_m);
	assert_true(close_rel(r.v[RF_DC_BACKUP_PCT], dc, 1e-12));

	double k2 = tray_weep_k2(t->weir_height_m + how, NULL);
	double uw = tray_weep_velocity_ms(k2, t->hole_diameter_m, f.rho_g_kgm3, NULL);
	assert_true(close_rel(r.v[RF_WEEP_PCT],
			      tray_weep_pct(qg / (aa * t->hole_area_frac), uw), 1e-12));

	double per_tray = tray_liquid_per_tray_m3(hl, aa, hb, ad);
	assert_true(close_rel(r.v[RF_LIQUID_HOLDUP_M3], per_tray * t->trays, 1e-12));
	assert_true(close_rel(r.v[RF_LIQUID_HOLDUP_FRAC],
			      per_tray * t->trays / (at * t->spacing_m * t->trays), 1e-12));
	assert_int_equal(r.quality, FG_QUALITY_GOOD);
}

static void test_kister_haas_method_is_used_when_selected(void **state)
{
	(void)state;
	struct section_geom g = geom();
	g.tray.flood_method = TRAY_FLOOD_KISTER_HAAS;
	struct fluid_state f = fluids();
	struct section_point p = point(4.0, 6.0);
	struct section_result r = eval(&g, &f, &p);
	double at = PI / 4.0 * g.diameter_m * g.diameter_m;
	double an = at * (1.0 - g.tray.downcomer_area_frac);
	double load = 6.0 / f.rho_l_kgm3 / g.tray.weir_length_m;
	double c = tray_kh_csb_ms(&g.tray, &f, load, NULL);
	double jet = tray_jet_flood_pct(4.0 / f.rho_g_kgm3 / an,
					tray_flood_velocity_ms(c, f.rho_l_kgm3, f.rho_g_kgm3));
	assert_true(close_rel(r.v[RF_JET_FLOOD_PCT], jet, 1e-12));
}

static void test_valve_and_bubble_cap_trays_note_extrapolation(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	struct section_point p = point(4.0, 6.0);
	struct section_result sieve = eval(&g, &f, &p);
	assert_int_equal(sieve.extrap.count, 0);

	g.tray.kind = TRAY_VALVE;
	struct section_result valve = eval(&g, &f, &p);
	assert_true(valve.extrap.count > 0);
	assert_non_null(strstr(valve.extrap.first, "valve"));
	assert_true(isfinite(valve.v[RF_WEEP_PCT]));
	assert_true(valve.v[RF_JET_FLOOD_PCT] == sieve.v[RF_JET_FLOOD_PCT]);

	g.tray.kind = TRAY_BUBBLE_CAP;
	struct section_result cap = eval(&g, &f, &p);
	assert_true(cap.extrap.count > 0);
	assert_non_null(strstr(cap.extrap.first, "bubble-cap"));
	assert_true(isnan(cap.v[RF_WEEP_PCT])); /* risers: no weep point */
	assert_int_equal(cap.quality, FG_QUALITY_GOOD);
}

static void test_weep_pct_below_100_at_low_gas(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	struct section_point p = point(1.0, 6.0);
	struct section_result low = eval(&g, &f, &p);
	p = point(6.0, 6.0);
	struct section_result high = eval(&g, &f, &p);
	assert_true(low.v[RF_WEEP_PCT] < 100.0);
	assert_true(high.v[RF_WEEP_PCT] > 100.0);
	assert_true(low.extrap.count > 0);
}

static void test_eval_keeps_common_fields(void **state)
{
	(void)state;
	struct section_geom g = geom();
	struct fluid_state f = fluids();
	struct section_point p = point(4.0, 6.0);
	struct section_result r;
	result_clear(&r);
	r.v[RF_GAS_DENSITY] = 2.5;
	r.v[RF_FLOW_PARAM] = 0.0839;
	r.quality = FG_QUALITY_UNCERTAIN;
	tray_eval(&g, &f, &p, &r);
	assert_true(r.v[RF_GAS_DENSITY] == 2.5);
	assert_true(r.v[RF_FLOW_PARAM] == 0.0839);
	assert_int_equal(r.quality, FG_QUALITY_UNCERTAIN); /* never lowered */
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_fair_csb_rises_with_tray_spacing),
		cmocka_unit_test(test_fair_csb_falls_with_flow_parameter),
		cmocka_unit_test(test_fair_csb_notes_only_outside_chart),
		cmocka_unit_test(test_fair_csb_nan_for_impossible_arguments),
		cmocka_unit_test(test_sigma_factor_is_one_at_twenty_mNm_and_fifth_power),
		cmocka_unit_test(test_hole_area_factor_switches_on_below_ten_percent),
		cmocka_unit_test(test_flood_velocity_nan_unless_liquid_denser),
		cmocka_unit_test(test_jet_flood_pct_is_velocity_ratio),
		cmocka_unit_test(test_kh_transition_height_rises_with_liquid_load),
		cmocka_unit_test(test_kh_csb_holds_low_weir_load_and_notes),
		cmocka_unit_test(test_kh_csb_falls_with_liquid_load_and_notes_range),
		cmocka_unit_test(test_weir_crest_scales_with_two_thirds_power),
		cmocka_unit_test(test_orifice_coefficient_rises_with_thickness_and_hole_area),
		cmocka_unit_test(test_dry_head_is_quadratic_in_hole_velocity),
		cmocka_unit_test(test_froth_density_is_one_at_zero_gas_and_falls_with_gas),
		cmocka_unit_test(test_clear_liquid_rises_with_liquid_and_froth_density),
		cmocka_unit_test(test_residual_head_falls_with_hole_diameter),
		cmocka_unit_test(test_total_dp_sums_heads),
		cmocka_unit_test(test_apron_head_is_quadratic_in_flow),
		cmocka_unit_test(test_dc_backup_sums_terms_and_limit_is_half_spacing_plus_weir),
		cmocka_unit_test(test_weep_k2_rises_then_holds_above_chart),
		cmocka_unit_test(test_weep_velocity_rises_with_hole_size_and_falls_with_gas_density),
		cmocka_unit_test(test_weep_pct_is_velocity_ratio),
		cmocka_unit_test(test_liquid_per_tray_adds_deck_and_downcomer),
		cmocka_unit_test(test_jet_flood_rises_with_gas_rate),
		cmocka_unit_test(test_jet_flood_rises_with_liquid_rate),
		cmocka_unit_test(test_dc_backup_and_holdup_rise_with_liquid_rate),
		cmocka_unit_test(test_dp_model_rises_with_gas_rate_above_weep),
		cmocka_unit_test(test_flood_pct_is_larger_of_jet_and_downcomer_with_basis),
		cmocka_unit_test(test_zero_gas_gives_zero_flood_and_weep),
		cmocka_unit_test(test_zero_liquid_is_finite),
		cmocka_unit_test(test_gas_above_flood_is_finite_above_100_and_noted),
		cmocka_unit_test(test_flood_point_evaluation_leaves_no_notes),
		cmocka_unit_test(test_bad_properties_give_bad_quality_and_nan_fields),
		cmocka_unit_test(test_bad_flows_or_geometry_give_bad_quality),
		cmocka_unit_test(test_dp_flood_pct_only_with_measured_dp),
		cmocka_unit_test(test_dp_flood_pct_is_100_at_model_dp_at_flood),
		cmocka_unit_test(test_dp_model_scales_with_tray_count),
		cmocka_unit_test(test_eval_matches_public_functions),
		cmocka_unit_test(test_kister_haas_method_is_used_when_selected),
		cmocka_unit_test(test_valve_and_bubble_cap_trays_note_extrapolation),
		cmocka_unit_test(test_weep_pct_below_100_at_low_gas),
		cmocka_unit_test(test_eval_keeps_common_fields),
	};
	return cmocka_run_group_tests_name("tray", tests, NULL, NULL);
}
