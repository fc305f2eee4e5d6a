/*
 * test_packed.c - behaviour of the packed-bed models and the packing table.
 *
 * Published check values are in tests/ref/test_ref_packed.c and the
 * python3-fluids comparison in tests/ref/fluids_packed.py; here we pin the
 * behaviour: trends, limits, edge cases, notes and quality. Where a test
 * re-evaluates a model equation to check a solution, the equation is written
 * out again here from the paper's form, not taken from packed.c.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <string.h>

#include "fg_result.h"
#include "packed.h"
#include "packing.h"
#include "section.h"

#define G PACKED_G_MS2

/* Saddle 25 mm: Stichlmair constants only (table row). */
static struct packing_constants saddle(void)
{
	bool s;
	const struct packing_constants *c = packing_lookup("ceramic-saddle-25mm", &s);
	assert_non_null(c);
	return *c;
}

/* 50 mm metal rings: Billet-Schultes constants only (table row). */
static struct packing_constants ring50(void)
{
	bool s;
	const struct packing_constants *c = packing_lookup("metal-slotted-ring-50mm", &s);
	assert_non_null(c);
	return *c;
}

static struct fluid_state air_water(void)
{
	struct fluid_state f = {.rho_g_kgm3 = 1.2, .rho_l_kgm3 = 1000.0, .mu_g_pas = 1.8e-5,
				.mu_l_pas = 1.0e-3, .sigma_nm = 0.072};
	return f;
}

static bool close_rel(double a, double b, double tol)
{
	return fabs(a - b) <= tol * fabs(b);
}

/* ---- packing table ---- */

static void test_packing_lookup_returns_row_and_structured_flag(void **state)
{
	(void)state;
	bool s = true;
	const struct packing_constants *c = packing_lookup("metal-slotted-ring-50mm", &s);
	assert_non_null(c);
	assert_false(s);
	assert_true(close_rel(c->area_m2m3, 112.6, 1e-12));
	c = packing_lookup("metal-sheet-250", &s);
	assert_non_null(c);
	assert_true(s);
	assert_true(isnan(c->stichlmair_c1));
}

static void test_packing_lookup_unknown_returns_null(void **state)
{
	(void)state;
	bool s = true;
	assert_null(packing_lookup("metal-pall-ring-51mm", &s));
	assert_true(s); /* untouched */
	assert_null(packing_lookup("", NULL));
}

static void test_packing_names_lists_every_row(void **state)
{
	(void)state;
	assert_true(packing_count() >= 7);
	for (unsigned i = 0; i < packing_count(); i++) {
		const char *n = packing_name_at(i);
		assert_non_null(strstr(packing_names(), n));
		assert_non_null(packing_lookup(n, NULL));
		const struct packing_constants *c = packing_lookup(n, NULL);
		assert_true(c->area_m2m3 > 0.0);
		assert_true(c->void_frac > 0.0 && c->void_frac < 1.0);
		/* Every row names where its constants come from. */
		bool mem = false;
		const char *src = packing_source(n, &mem);
		assert_non_null(src);
		assert_true(strlen(src) > 20);
		/* A row recalled from memory says so in its source text. */
		assert_true(!mem || strstr(src, "from memory") != NULL);
		assert_string_equal(packing_canonical_name(n), n);
	}
}

/* The names the table used before it named shapes only still resolve, to
 * the same row; trade-derived names are not listed. */
static void test_packing_old_names_are_aliases(void **state)
{
	(void)state;
	assert_ptr_equal(packing_lookup("metal-pall-ring-50mm", NULL),
			 packing_lookup("metal-slotted-ring-50mm", NULL));
	assert_ptr_equal(packing_lookup("ceramic-raschig-ring-25mm", NULL),
			 packing_lookup("ceramic-ring-25mm", NULL));
	assert_string_equal(packing_canonical_name("metal-sheet-250"),
			    "metal-corrugated-sheet-250");
	assert_null(strstr(packing_names(), "pall"));
	assert_null(strstr(packing_names(), "raschig"));
	assert_null(packing_source("no-such-packing", NULL));
}

/* Structured rows carry geometry only: the constants published for
 * corrugated sheets belong to single makers' products. */
static void test_structured_rows_have_no_product_constants(void **state)
{
	(void)state;
	for (unsigned i = 0; i < packing_count(); i++) {
		bool structured = false;
		const struct packing_constants *c = packing_lookup(packing_name_at(i), &structured);
		if (!structured)
			continue;
		assert_true(isnan(c->packing_factor_1pm));
		assert_true(isnan(c->billet_cfl));
		assert_true(isnan(c->stichlmair_c1));
	}
}

/* ---- Stichlmair ---- */

static void test_stichlmair_dry_rises_with_gas_rate(void **state)
{
	(void)state;
	struct packing_constants c = saddle();
	double prev = 0.0;
	for (double u = 0.1; u < 3.0; u *= 1.5) {
		double dp = packed_stichlmair_dry_pam(&c, u, 1.2, 1.8e-5, NULL);
		assert_true(dp > prev);
		prev = dp;
	}
	/* Between laminar (slope 1) and turbulent (slope 2) in log-log. */
	double s = log(packed_stichlmair_dry_pam(&c, 2.0, 1.2, 1.8e-5, NULL) /
		       packed_stichlmair_dry_pam(&c, 1.0, 1.2, 1.8e-5, NULL)) / log(2.0);
	assert_true(s > 1.0 && s < 2.0);
}

static void test_stichlmair_dry_zero_gas_is_zero(void **state)
{
	(void)state;
	struct packing_constants c = saddle();
	assert_true(packed_stichlmair_dry_pam(&c, 0.0, 1.2, 1.8e-5, NULL) == 0.0);
	assert_true(isnan(packed_stichlmair_dry_pam(&c, -1.0, 1.2, 1.8e-5, NULL)));
}

static void test_stichlmair_missing_constants_nan_and_noted(void **state)
{
	(void)state;
	struct packing_constants c = ring50();
	struct fluid_state f = air_water();
	struct fg_extrap x = {0, NULL};
	assert_true(isnan(packed_stichlmair_dry_pam(&c, 1.0, 1.2, 1.8e-5, &x)));
	assert_true(isnan(packed_stichlmair_wet_pam(&c, 1.0, 0.005, &f, NULL, &x)));
	assert_true(isnan(packed_stichlmair_flood_ms(&c, 0.005, &f, &x)));
	assert_int_equal(x.count, 3);
	assert_non_null(strstr(x.first, "missing"));
}

static void test_stichlmair_wet_exceeds_dry_and_rises_with_liquid(void **state)
{
	(void)state;
	struct packing_constants c = saddle();
	struct fluid_state f = air_water();
	double dry = packed_stichlmair_dry_pam(&c, 0.8, f.rho_g_kgm3, f.mu_g_pas, NULL);
	double prev = dry;
	for (double ul = 0.001; ul < 0.01; ul += 0.002) {
		double wet = packed_stichlmair_wet_pam(&c, 0.8, ul, &f, NULL, NULL);
		assert_true(wet > prev);
		prev = wet;
	}
}

static void test_stichlmair_wet_zero_liquid_equals_dry(void **state)
{
	(void)state;
	struct packing_constants c = saddle();
	struct fluid_state f = air_water();
	double h = -1.0;
	double wet = packed_stichlmair_wet_pam(&c, 1.0, 0.0, &f, &h, NULL);
	double dry = packed_stichlmair_dry_pam(&c, 1.0, f.rho_g_kgm3, f.mu_g_pas, NULL);
	assert_true(wet == dry);
	assert_true(h == 0.0);
}

/* Re-evaluates the irrigated-DP equation: y = D ((1-e+hT)/(1-e))^((2+c)/3)
 * (e/(e-hT))^4.65 with hT = h0 (1 + 20 (y/(rho_l g))^2). */
static void test_stichlmair_wet_satisfies_model_equation(void **state)
{
	(void)state;
	struct packing_constants c = saddle();
	struct fluid_state f = air_water();
	double ug = 1.0, ul = 0.004, ht = NAN;
	double y = packed_stichlmair_wet_pam(&c, ug, ul, &f, &ht, NULL);
	double e = c.void_frac, a = c.area_m2m3;
	double dp = 6 * (1 - e) / a, re = ug * f.rho_g_kgm3 * dp / f.mu_g_pas;
	double f0 = c.stichlmair_c1 / re + c.stichlmair_c2 / sqrt(re) + c.stichlmair_c3;
	double dry = 0.75 * f0 * (1 - e) / pow(e, 4.65) * f.rho_g_kgm3 * ug * ug / dp;
	double cc = (-c.stichlmair_c1 / re - c.stichlmair_c2 / (2 * sqrt(re))) / f0;
	double h0 = 0.555 * cbrt(ul * ul * a / (G * pow(e, 4.65)));
	double ht2 = h0 * (1 + 20 * pow(y / (f.rho_l_kgm3 * G), 2));
	double rhs = dry * pow((1 - e + ht2) / (1 - e), (2 + cc) / 3) * pow(e / (e - ht2), 4.65);
	assert_true(close_rel(rhs, y, 1e-10));
	assert_true(close_rel(ht, ht2, 1e-10));
	assert_true(ht > h0);
	assert_true(close_rel(packed_stichlmair_h0(&c, ul), h0, 1e-12));
}

static void test_stichlmair_flood_falls_with_liquid_rate(void **state)
{
	(void)state;
	struct packing_constants c = saddle();
	struct fluid_state f = air_water();
	double prev = INFINITY;
	for (double ul = 0.0005; ul < 0.03; ul *= 2.0) {
		double u = packed_stichlmair_flood_ms(&c, ul, &f, NULL);
		assert_true(isfinite(u));
		assert_true(u < prev);
		prev = u;
	}
}

/* Flooding is where the operating solution ceases to exist. */
static void test_stichlmair_wet_above_flood_is_nan_and_noted(void **state)
{
	(void)state;
	struct packing_constants c = saddle();
	struct fluid_state f = air_water();
	double u_fl = packed_stichlmair_flood_ms(&c, 0.005, &f, NULL);
	struct fg_extrap x = {0, NULL};
	double h = 0.0;
	assert_true(isfinite(packed_stichlmair_wet_pam(&c, 0.999 * u_fl, 0.005, &f, NULL, &x)));
	assert_int_equal(x.count, 0);
	assert_true(isnan(packed_stichlmair_wet_pam(&c, 1.001 * u_fl, 0.005, &f, &h, &x)));
	assert_true(isnan(h));
	assert_int_equal(x.count, 1);
	assert_non_null(strstr(x.first, "flood"));
}

static void test_stichlmair_flood_dry_bed_infinite(void **state)
{
	(void)state;
	struct packing_constants c = saddle();
	struct fluid_state f = air_water();
	assert_true(isinf(packed_stichlmair_flood_ms(&c, 0.0, &f, NULL)));
	f.rho_l_kgm3 = 1.0; /* below the gas density: no value */
	assert_true(isnan(packed_stichlmair_flood_ms(&c, 0.005, &f, NULL)));
}

/* ---- Billet-Schultes ---- */

/* For Re_L >= 5, h ~ (u_l)^(1/3) (u_l^0.25 u_l^0.2)^(2/3) = u_l^0.6333. */
static void test_bs_preload_holdup_scales_with_liquid_rate(void **state)
{
	(void)state;
	struct packing_constants c = ring50();
	struct fluid_state f = air_water();
	double h1 = packed_bs_holdup_preload(&c, 0.004, &f, NULL);
	double h2 = packed_bs_holdup_preload(&c, 0.008, &f, NULL);
	assert_true(close_rel(h2 / h1, pow(2.0, 1.0 / 3.0 + 0.3), 1e-12));
	assert_true(packed_bs_holdup_preload(&c, 0.0, &f, NULL) == 0.0);
}

static void test_bs_holdup_constant_below_loading_rises_above(void **state)
{
	(void)state;
	struct packing_constants c = ring50();
	struct fluid_state f = air_water();
	double ul = 0.005;
	double u_s = packed_bs_loading_ms(&c, ul, &f, NULL);
	double u_fl = packed_bs_flood_ms(&c, ul, &f, NULL);
	double h_s = packed_bs_holdup_preload(&c, ul, &f, NULL);
	assert_true(u_s < u_fl);
	assert_true(packed_bs_holdup(&c, 0.0, ul, &f, NULL) == h_s);
	assert_true(packed_bs_holdup(&c, 0.99 * u_s, ul, &f, NULL) == h_s);
	double h_a = packed_bs_holdup(&c, 0.9 * u_fl, ul, &f, NULL);
	double h_b = packed_bs_holdup(&c, 0.95 * u_fl, ul, &f, NULL);
	assert_true(h_a > h_s);
	assert_true(h_b > h_a);
}

static void test_bs_holdup_reaches_flood_holdup_and_is_held_above(void **state)
{
	(void)state;
	struct packing_constants c = ring50();
	struct fluid_state f = air_water();
	double ul = 0.005;
	double u_fl = packed_bs_flood_ms(&c, ul, &f, NULL);
	double h_fl = packed_bs_flood_holdup(&c, ul, &f, NULL);
	struct fg_extrap x = {0, NULL};
	assert_true(close_rel(packed_bs_holdup(&c, u_fl, ul, &f, &x), h_fl, 1e-12));
	assert_int_equal(x.count, 0);
	assert_true(close_rel(packed_bs_holdup(&c, 1.5 * u_fl, ul, &f, &x), h_fl, 1e-12));
	assert_int_equal(x.count, 1);
}

static void test_bs_flood_holdup_satisfies_its_equation(void **state)
{
	(void)state;
	struct packing_constants c = ring50();
	struct fluid_state f = air_water();
	double ul = 0.01, e = c.void_frac, a = c.area_m2m3;
	double h = packed_bs_flood_holdup(&c, ul, &f, NULL);
	double rhs = 6.0 / G * a * a * e * f.mu_l_pas / f.rho_l_kgm3 * ul;
	assert_true(close_rel(h * h * h * (3 * h - e), rhs, 1e-9));
	assert_true(h > e / 3.0 && h < e);
	assert_true(close_rel(packed_bs_flood_holdup(&c, 0.0, &f, NULL), e / 3.0, 1e-12));
}

/* Re-evaluates the flood-point equation at the returned velocity, on the
 * branch the flow parameter selects. Covers both branches. */
static void check_bs_flood_equation(double rho_g, double ul)
{
	struct packing_constants c = ring50();
	struct fluid_state f = air_water();
	f.rho_g_kgm3 = rho_g;
	double u = packed_bs_flood_ms(&c, ul, &f, NULL);
	double h = packed_bs_flood_holdup(&c, ul, &f, NULL);
	double e = c.void_frac, a = c.area_m2m3, mur = f.mu_l_pas / f.mu_g_pas;
	double lv = f.rho_l_kgm3 * ul / (rho_g * u);
	double phi = lv * sqrt(rho_g / f.rho_l_kgm3);
	double x = phi * pow(mur, 0.2);
	double cfl = phi <= 0.4 ? c.billet_cfl : 0.6244 * c.billet_cfl * pow(mur, 0.1028);
	double n = phi <= 0.4 ? -0.194 : -0.708;
	double psi = G / (cfl * cfl) * pow(x, -2.0 * n);
	double rhs = sqrt(2 * G / psi) * pow(e - h, 1.5) / sqrt(e) * sqrt(h / a) *
		     sqrt(f.rho_l_kgm3 / rho_g);
	assert_true(close_rel(u, rhs, 1e-9));
}

static void test_bs_flood_satisfies_its_equation_on_both_branches(void **state)
{
	(void)state;
	check_bs_flood_equation(1.2, 0.005);  /* flow parameter ~0.05 */
	check_bs_flood_equation(60.0, 0.03);  /* dense gas, flow parameter > 0.4 */
}

static void test_bs_loading_and_flood_fall_with_liquid_and_dry_bed_is_infinite(void **state)
{
	(void)state;
	struct packing_constants c = ring50();
	struct fluid_state f = air_water();
	assert_true(packed_bs_flood_ms(&c, 0.002, &f, NULL) > packed_bs_flood_ms(&c, 0.01, &f, NULL));
	assert_true(packed_bs_loading_ms(&c, 0.002, &f, NULL) >
		    packed_bs_loading_ms(&c, 0.01, &f, NULL));
	assert_true(isinf(packed_bs_flood_ms(&c, 0.0, &f, NULL)));
	assert_true(isinf(packed_bs_loading_ms(&c, 0.0, &f, NULL)));
	struct packing_constants s = saddle();
	struct fg_extrap x = {0, NULL};
	assert_true(isnan(packed_bs_flood_ms(&s, 0.005, &f, &x)));
	assert_true(isnan(packed_bs_loading_ms(&s, 0.005, &f, &x)));
	assert_true(isnan(packed_bs_holdup_preload(&s, 0.005, &f, &x)));
	assert_int_equal(x.count, 3);
}

/* ---- Kister-Gill, Robbins ---- */

static void test_kister_gill_scales_as_fp_to_the_0_7(void **state)
{
	(void)state;
	struct fg_extrap x = {0, NULL};
	double a = packed_kister_gill_flood_pam(20.0 / 0.3048, false, &x);
	double b = packed_kister_gill_flood_pam(40.0 / 0.3048, true, &x);
	assert_true(close_rel(b / a, pow(2.0, 0.7), 1e-12));
	assert_int_equal(x.count, 0);
	(void)packed_kister_gill_flood_pam(100.0 / 0.3048, false, &x);
	assert_int_equal(x.count, 1);
	assert_true(isnan(packed_kister_gill_flood_pam(NAN, false, &x)));
	assert_int_equal(x.count, 2);
}

static void test_robbins_dry_bed_is_quadratic_in_gas_and_rises_with_liquid(void **state)
{
	(void)state;
	double fpd = 24.0 / 0.3048;
	double d1 = packed_robbins_pam(fpd, 0.5, 0.0, 1.2, 1000.0, 1e-3, NULL);
	double d2 = packed_robbins_pam(fpd, 1.0, 0.0, 1.2, 1000.0, 1e-3, NULL);
	assert_true(close_rel(d2 / d1, 4.0, 1e-12));
	double w = packed_robbins_pam(fpd, 1.0, 5.0, 1.2, 1000.0, 1e-3, NULL);
	assert_true(w > d2);
	assert_true(packed_robbins_pam(fpd, 0.0, 5.0, 1.2, 1000.0, 1e-3, NULL) == 0.0);
}

static void test_robbins_notes_its_range(void **state)
{
	(void)state;
	struct fg_extrap x = {0, NULL};
	(void)packed_robbins_pam(24.0 / 0.3048, 1.0, 5.0, 1.2, 1000.0, 1e-3, &x);
	assert_int_equal(x.count, 0);
	(void)packed_robbins_pam(24.0 / 0.3048, 1.0, 40.0, 1.2, 1000.0, 1e-3, &x); /* Lf > 20000 */
	assert_int_equal(x.count, 1);
	(void)packed_robbins_pam(10.0 / 0.3048, 1.0, 5.0, 1.2, 1000.0, 1e-3, &x);  /* Fpd < 15 */
	assert_int_equal(x.count, 2);
	(void)packed_robbins_pam(24.0 / 0.3048, 1.0, 5.0, 10.0, 1000.0, 1e-3, &x); /* dense gas */
	assert_int_equal(x.count, 3);
	assert_true(isnan(packed_robbins_pam(NAN, 1.0, 5.0, 1.2, 1000.0, 1e-3, &x)));
	assert_int_equal(x.count, 4);
}

/* ---- packed_eval ---- */

static struct section_geom geom(const char *packing, enum packed_flood_method m)
{
	struct section_geom g;
	memset(&g, 0, sizeof g);
	g.type = SECTION_PACKED;
	g.diameter_m = 1.2;
	g.packed.height_m = 6.0;
	strcpy(g.packed.packing, packing);
	const struct packing_constants *c = packing_lookup(packing, &g.packed.structured);
	assert_non_null(c);
	g.packed.c = *c;
	g.packed.flood_method = m;
	return g;
}

static struct section_point point(double gas_kgs, double liquid_kgs)
{
	struct section_point p = {.gas_kgs = gas_kgs, .liquid_kgs = liquid_kgs, .dp_pa = NAN,
				  .pressure_pa = 101325.0, .temperature_k = 293.15,
				  .level_m = NAN, .gas_density_kgm3 = NAN};
	return p;
}

static double area(const struct section_geom *g)
{
	return M_PI / 4.0 * g->diameter_m * g->diameter_m;
}

static void test_eval_fills_flood_holdup_and_dp_for_a_normal_point(void **state)
{
	(void)state;
	struct section_geom g = geom("ceramic-saddle-25mm", PACKED_FLOOD_STICHLMAIR);
	struct fluid_state f = air_water();
	double a = area(&g), ul = 0.004, ug = 0.6;
	struct section_point p = point(ug * f.rho_g_kgm3 * a, ul * f.rho_l_kgm3 * a);
	p.dp_pa = 2400.0;
	struct section_result r;
	result_clear(&r);
	packed_eval(&g, &f, &p, &r);
	double u_fl = packed_stichlmair_flood_ms(&g.packed.c, ul, &f, NULL);
	double h = NAN;
	double wet = packed_stichlmair_wet_pam(&g.packed.c, ug, ul, &f, &h, NULL);
	assert_true(close_rel(r.v[RF_FLOOD_PCT], 100.0 * ug / u_fl, 1e-9));
	assert_int_equal(r.basis, FLOOD_BASIS_GAS_VELOCITY);
	assert_true(close_rel(r.v[RF_DP_MODEL_PA], wet * 6.0, 1e-9));
	assert_true(close_rel(r.v[RF_LIQUID_HOLDUP_FRAC], h, 1e-9));
	assert_true(close_rel(r.v[RF_LIQUID_HOLDUP_M3], h * a * 6.0, 1e-9));
	double kg = packed_kister_gill_flood_pam(g.packed.c.packing_factor_1pm, false, NULL);
	assert_true(close_rel(r.v[RF_DP_FLOOD_PCT], 100.0 * 400.0 / kg, 1e-9));
	/* No B-S constants for this packing: no loading point, said so. */
	assert_true(isnan(r.v[RF_LOADING_PCT]));
	assert_true(r.missing.count >= 1);
	/* Its Fp (110 1/ft) lies above the Kister-Gill data: flagged, uncertain. */
	assert_true(r.extrap.count >= 1);
	assert_int_equal(r.quality, FG_QUALITY_UNCERTAIN);
	/* Without the DP signal the Kister-Gill part is not used: good. */
	p.dp_pa = NAN;
	result_clear(&r);
	packed_eval(&g, &f, &p, &r);
	assert_true(isnan(r.v[RF_DP_FLOOD_PCT]));
	assert_int_equal(r.quality, FG_QUALITY_GOOD);
}

static void test_eval_billet_schultes_packing_uses_bs_and_notes_missing_dp(void **state)
{
	(void)state;
	struct section_geom g = geom("metal-slotted-ring-50mm", PACKED_FLOOD_BILLET_SCHULTES);
	struct fluid_state f = air_water();
	double a = area(&g), ul = 0.005, ug = 1.5;
	struct section_point p = point(ug * f.rho_g_kgm3 * a, ul * f.rho_l_kgm3 * a);
	struct section_result r;
	result_clear(&r);
	packed_eval(&g, &f, &p, &r);
	double u_fl = packed_bs_flood_ms(&g.packed.c, ul, &f, NULL);
	double u_s = packed_bs_loading_ms(&g.packed.c, ul, &f, NULL);
	assert_true(close_rel(r.v[RF_FLOOD_PCT], 100.0 * ug / u_fl, 1e-9));
	assert_true(close_rel(r.v[RF_LOADING_PCT], 100.0 * ug / u_s, 1e-9));
	assert_true(close_rel(r.v[RF_LIQUID_HOLDUP_FRAC],
			      packed_bs_holdup(&g.packed.c, ug, ul, &f, NULL), 1e-12));
	/* Neither Stichlmair constants nor Fpd: no DP model, said so. */
	assert_true(isnan(r.v[RF_DP_MODEL_PA]));
	assert_true(isnan(r.v[RF_DP_FLOOD_PCT])); /* no dp signal */
	assert_int_equal(r.quality, FG_QUALITY_GOOD);
	assert_true(r.missing.count >= 1);
}

static void test_eval_falls_back_to_robbins_and_other_flood_method(void **state)
{
	(void)state;
	struct section_geom g = geom("metal-slotted-ring-50mm", PACKED_FLOOD_STICHLMAIR);
	g.packed.c.dry_factor_1pm = 24.0 / 0.3048;
	struct fluid_state f = air_water();
	double a = area(&g), ul = 0.005, ug = 1.5;
	struct section_point p = point(ug * f.rho_g_kgm3 * a, ul * f.rho_l_kgm3 * a);
	struct section_result r;
	result_clear(&r);
	packed_eval(&g, &f, &p, &r);
	double rob = packed_robbins_pam(24.0 / 0.3048, ug * f.rho_g_kgm3, ul * f.rho_l_kgm3,
					f.rho_g_kgm3, f.rho_l_kgm3, f.mu_l_pas, NULL);
	assert_true(close_rel(r.v[RF_DP_MODEL_PA], rob * 6.0, 1e-9));
	double u_fl = packed_bs_flood_ms(&g.packed.c, ul, &f, NULL);
	assert_true(close_rel(r.v[RF_FLOOD_PCT], 100.0 * ug / u_fl, 1e-9));
	assert_non_null(strstr(r.missing.first, "Billet-Schultes"));
}

static void test_eval_dry_bed_does_not_flood(void **state)
{
	(void)state;
	struct section_geom g = geom("metal-slotted-ring-50mm", PACKED_FLOOD_BILLET_SCHULTES);
	struct fluid_state f = air_water();
	struct section_point p = point(2.0, 0.0);
	struct section_result r;
	result_clear(&r);
	packed_eval(&g, &f, &p, &r);
	assert_true(r.v[RF_FLOOD_PCT] == 0.0);
	assert_true(r.v[RF_LOADING_PCT] == 0.0);
	assert_true(r.v[RF_LIQUID_HOLDUP_FRAC] == 0.0);
	assert_true(r.v[RF_LIQUID_HOLDUP_M3] == 0.0);
	assert_int_equal(r.quality, FG_QUALITY_GOOD);
}

static void test_eval_zero_gas_gives_zero_flood_and_preload_holdup(void **state)
{
	(void)state;
	struct section_geom g = geom("ceramic-saddle-25mm", PACKED_FLOOD_STICHLMAIR);
	struct fluid_state f = air_water();
	double a = area(&g), ul = 0.004;
	struct section_point p = point(0.0, ul * f.rho_l_kgm3 * a);
	struct section_result r;
	result_clear(&r);
	packed_eval(&g, &f, &p, &r);
	assert_true(r.v[RF_FLOOD_PCT] == 0.0);
	assert_true(r.v[RF_DP_MODEL_PA] == 0.0);
	assert_true(close_rel(r.v[RF_LIQUID_HOLDUP_FRAC], packed_stichlmair_h0(&g.packed.c, ul),
			      1e-12));
}

static void test_eval_gas_above_flood_is_finite_over_100_and_uncertain(void **state)
{
	(void)state;
	struct section_geom g = geom("metal-slotted-ring-50mm", PACKED_FLOOD_BILLET_SCHULTES);
	struct fluid_state f = air_water();
	double a = area(&g), ul = 0.005;
	double u_fl = packed_bs_flood_ms(&g.packed.c, ul, &f, NULL);
	struct section_point p = point(1.2 * u_fl * f.rho_g_kgm3 * a, ul * f.rho_l_kgm3 * a);
	struct section_result r;
	result_clear(&r);
	packed_eval(&g, &f, &p, &r);
	assert_true(isfinite(r.v[RF_FLOOD_PCT]));
	assert_true(close_rel(r.v[RF_FLOOD_PCT], 120.0, 1e-9));
	assert_int_equal(r.quality, FG_QUALITY_UNCERTAIN);
	/* Holdup held at the flood holdup, not a runaway number. */
	assert_true(close_rel(r.v[RF_LIQUID_HOLDUP_FRAC],
			      packed_bs_flood_holdup(&g.packed.c, ul, &f, NULL), 1e-12));
}

static void test_eval_stichlmair_above_flood_leaves_dp_nan_and_uncertain(void **state)
{
	(void)state;
	struct section_geom g = geom("ceramic-saddle-25mm", PACKED_FLOOD_STICHLMAIR);
	struct fluid_state f = air_water();
	double a = area(&g), ul = 0.004;
	double u_fl = packed_stichlmair_flood_ms(&g.packed.c, ul, &f, NULL);
	struct section_point p = point(1.1 * u_fl * f.rho_g_kgm3 * a, ul * f.rho_l_kgm3 * a);
	struct section_result r;
	result_clear(&r);
	packed_eval(&g, &f, &p, &r);
	assert_true(close_rel(r.v[RF_FLOOD_PCT], 110.0, 1e-9));
	assert_true(isnan(r.v[RF_DP_MODEL_PA]));
	assert_true(isnan(r.v[RF_LIQUID_HOLDUP_FRAC]));
	assert_true(isnan(r.v[RF_LIQUID_HOLDUP_M3]));
	assert_int_equal(r.quality, FG_QUALITY_UNCERTAIN);
}

static void test_eval_liquid_lighter_than_gas_is_bad_and_all_nan(void **state)
{
	(void)state;
	struct section_geom g = geom("ceramic-saddle-25mm", PACKED_FLOOD_STICHLMAIR);
	struct fluid_state f = air_water();
	f.rho_l_kgm3 = 1.0;
	struct section_point p = point(1.0, 1.0);
	p.dp_pa = 500.0;
	struct section_result r;
	result_clear(&r);
	packed_eval(&g, &f, &p, &r);
	assert_int_equal(r.quality, FG_QUALITY_BAD);
	assert_true(isnan(r.v[RF_FLOOD_PCT]));
	assert_true(isnan(r.v[RF_LOADING_PCT]));
	assert_true(isnan(r.v[RF_DP_MODEL_PA]));
	assert_true(isnan(r.v[RF_DP_FLOOD_PCT]));
	assert_true(isnan(r.v[RF_LIQUID_HOLDUP_FRAC]));
	assert_true(isnan(r.v[RF_LIQUID_HOLDUP_M3]));
	assert_int_equal(r.basis, FLOOD_BASIS_NONE);
}

static void test_eval_missing_liquid_flow_is_bad(void **state)
{
	(void)state;
	struct section_geom g = geom("ceramic-saddle-25mm", PACKED_FLOOD_STICHLMAIR);
	struct fluid_state f = air_water();
	struct section_point p = point(1.0, NAN);
	struct section_result r;
	result_clear(&r);
	packed_eval(&g, &f, &p, &r);
	assert_int_equal(r.quality, FG_QUALITY_BAD);
	assert_true(isnan(r.v[RF_FLOOD_PCT]));
}

static void test_eval_missing_all_constants_leaves_fields_nan_with_notes(void **state)
{
	(void)state;
	struct section_geom g = geom("metal-corrugated-sheet-500", PACKED_FLOOD_STICHLMAIR);
	struct fluid_state f = air_water();
	struct section_point p = point(1.0, 2.0);
	p.dp_pa = 300.0;
	struct section_result r;
	result_clear(&r);
	packed_eval(&g, &f, &p, &r);
	assert_true(isnan(r.v[RF_FLOOD_PCT]));
	assert_true(isnan(r.v[RF_LOADING_PCT]));
	assert_true(isnan(r.v[RF_DP_MODEL_PA]));
	assert_true(isnan(r.v[RF_DP_FLOOD_PCT]));
	assert_true(isnan(r.v[RF_LIQUID_HOLDUP_FRAC]));
	assert_int_equal(r.basis, FLOOD_BASIS_NONE);
	assert_int_equal(r.missing.count, 5);
	assert_int_equal(r.extrap.count, 0);
	assert_int_equal(r.quality, FG_QUALITY_GOOD);
}

static struct section_props air_water_props(void)
{
	struct section_props pr;
	memset(&pr, 0, sizeof pr);
	pr.gas_molar_mass_kgkmol = 28.96;
	pr.gas_compressibility = 1.0;
	struct prop_table one = {.point_count = 1};
	one.value[0] = 1.8e-5;
	pr.gas_viscosity_pas = one;
	one.value[0] = 1000.0;
	pr.liquid_density_kgm3 = one;
	one.value[0] = 1.0e-3;
	pr.liquid_viscosity_pas = one;
	one.value[0] = 0.072;
	pr.surface_tension_nm = one;
	return pr;
}

/* A packing without an optional constant (the saddle has no Billet-Schultes
 * C_S, so no loading point) is not an extrapolation: through the whole
 * section evaluation the result stays good and not extrapolated, the
 * loading field is absent and the reason is kept apart from the
 * extrapolation notes. Before the fix section_eval made every such section
 * "uncertain" for good, and the engine's DP correction never learned on it. */
static void test_section_missing_optional_constant_is_not_extrapolation(void **state)
{
	(void)state;
	struct section_geom g = geom("ceramic-saddle-25mm", PACKED_FLOOD_STICHLMAIR);
	struct section_props pr = air_water_props();
	struct section_point p = point(0.6 * 1.2 * area(&g), 0.004 * 1000.0 * area(&g));
	struct section_result r;
	section_eval(&g, &pr, &p, &r);
	assert_true(isfinite(r.v[RF_FLOOD_PCT]));
	assert_true(r.v[RF_FLOOD_PCT] < 90.0);
	assert_true(isnan(r.v[RF_LOADING_PCT]));
	assert_int_equal(r.extrap.count, 0);
	assert_int_equal(r.quality, FG_QUALITY_GOOD);
	assert_true(r.missing.count >= 1);
	assert_non_null(strstr(r.missing.first, "C_S"));
	/* A real extrapolation still makes it uncertain: gas above flooding. */
	p.gas_kgs *= 3.0;
	section_eval(&g, &pr, &p, &r);
	assert_true(r.extrap.count >= 1);
	assert_int_equal(r.quality, FG_QUALITY_UNCERTAIN);
}

static void test_eval_flood_rises_with_gas_rate(void **state)
{
	(void)state;
	struct section_geom g = geom("metal-slotted-ring-50mm", PACKED_FLOOD_BILLET_SCHULTES);
	struct fluid_state f = air_water();
	double prev = -1.0;
	for (double gas = 0.5; gas < 4.0; gas += 0.5) {
		struct section_point p = point(gas, 3.0);
		struct section_result r;
		result_clear(&r);
		packed_eval(&g, &f, &p, &r);
		assert_true(r.v[RF_FLOOD_PCT] > prev);
		prev = r.v[RF_FLOOD_PCT];
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_packing_lookup_returns_row_and_structured_flag),
		cmocka_unit_test(test_packing_lookup_unknown_returns_null),
		cmocka_unit_test(test_packing_names_lists_every_row),
		cmocka_unit_test(test_packing_old_names_are_aliases),
		cmocka_unit_test(test_structured_rows_have_no_product_constants),
		cmocka_unit_test(test_stichlmair_dry_rises_with_gas_rate),
		cmocka_unit_test(test_stichlmair_dry_zero_gas_is_zero),
		cmocka_unit_test(test_stichlmair_missing_constants_nan_and_noted),
		cmocka_unit_test(test_stichlmair_wet_exceeds_dry_and_rises_with_liquid),
		cmocka_unit_test(test_stichlmair_wet_zero_liquid_equals_dry),
		cmocka_unit_test(test_stichlmair_wet_satisfies_model_equation),
		cmocka_unit_test(test_stichlmair_flood_falls_with_liquid_rate),
		cmocka_unit_test(test_stichlmair_wet_above_flood_is_nan_and_noted),
		cmocka_unit_test(test_stichlmair_flood_dry_bed_infinite),
		cmocka_unit_test(test_bs_preload_holdup_scales_with_liquid_rate),
		cmocka_unit_test(test_bs_holdup_constant_below_loading_rises_above),
		cmocka_unit_test(test_bs_holdup_reaches_flood_holdup_and_is_held_above),
		cmocka_unit_test(test_bs_flood_holdup_satisfies_its_equation),
		cmocka_unit_test(test_bs_flood_satisfies_its_equation_on_both_branches),
		cmocka_unit_test(test_bs_loading_and_flood_fall_with_liquid_and_dry_bed_is_infinite),
		cmocka_unit_test(test_kister_gill_scales_as_fp_to_the_0_7),
		cmocka_unit_test(test_robbins_dry_bed_is_quadratic_in_gas_and_rises_with_liquid),
		cmocka_unit_test(test_robbins_notes_its_range),
		cmocka_unit_test(test_eval_fills_flood_holdup_and_dp_for_a_normal_point),
		cmocka_unit_test(test_eval_billet_schultes_packing_uses_bs_and_notes_missing_dp),
		cmocka_unit_test(test_eval_falls_back_to_robbins_and_other_flood_method),
		cmocka_unit_test(test_eval_dry_bed_does_not_flood),
		cmocka_unit_test(test_eval_zero_gas_gives_zero_flood_and_preload_holdup),
		cmocka_unit_test(test_eval_gas_above_flood_is_finite_over_100_and_uncertain),
		cmocka_unit_test(test_eval_stichlmair_above_flood_leaves_dp_nan_and_uncertain),
		cmocka_unit_test(test_eval_liquid_lighter_than_gas_is_bad_and_all_nan),
		cmocka_unit_test(test_eval_missing_liquid_flow_is_bad),
		cmocka_unit_test(test_eval_missing_all_constants_leaves_fields_nan_with_notes),
		cmocka_unit_test(test_section_missing_optional_constant_is_not_extrapolation),
		cmocka_unit_test(test_eval_flood_rises_with_gas_rate),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
