/*
 * test_ref_packed.c - packed-bed models against values from outside the
 * project. Each check names its source and says why its tolerance is what it
 * is. "from memory" marks a recalled value; "common practice" a rule of
 * thumb with no single source. The full-grid comparison with python3-fluids
 * is tests/ref/fluids_packed.py.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <string.h>

#include "packed.h"
#include "packing.h"
#include "section.h"

static bool close_rel(double a, double b, double tol)
{
	return fabs(a - b) <= tol * fabs(b);
}

/* The worked example of Stichlmair, Bravo & Fair (1989): 25 mm ceramic
 * saddles, a = 260 m2/m3, eps = 0.68, C1..C3 = 32, 7, 1; gas 0.4 m/s,
 * 5 kg/m3, 5e-5 Pa s; liquid 5e-3 m/s, 1200 kg/m3. Inputs and results as
 * printed in the python3-fluids 1.0.22 docstrings of Stichlmair_dry,
 * Stichlmair_wet and Stichlmair_flood (read), which state that the wet and
 * flood results match the paper's example. */
static struct packing_constants example_packing(void)
{
	struct packing_constants c = {.area_m2m3 = 260.0, .void_frac = 0.68,
				      .packing_factor_1pm = NAN, .dry_factor_1pm = NAN,
				      .stichlmair_c1 = 32.0, .stichlmair_c2 = 7.0,
				      .stichlmair_c3 = 1.0, .billet_ch = NAN, .billet_cp = NAN,
				      .billet_cs = NAN, .billet_cfl = NAN};
	return c;
}

static struct fluid_state example_fluids(void)
{
	struct fluid_state f = {.rho_g_kgm3 = 5.0, .rho_l_kgm3 = 1200.0, .mu_g_pas = 5e-5,
				.mu_l_pas = 1e-3, .sigma_nm = 0.07};
	return f;
}

/* Tolerance 1e-9 relative: the same closed form, so only rounding differs;
 * the docstring prints 17 significant digits. */
static void test_stichlmair_dry_matches_paper_example(void **state)
{
	(void)state;
	struct packing_constants c = example_packing();
	double dp = packed_stichlmair_dry_pam(&c, 0.4, 5.0, 5e-5, NULL);
	assert_true(close_rel(dp, 236.80904286559885, 1e-9)); /* Pa/m, fluids docstring */
}

/* Tolerance 1e-9 relative: both solve the same implicit equation, fluids by
 * secant to its default tolerance, we by bisection to ~1e-15. */
static void test_stichlmair_wet_matches_paper_example(void **state)
{
	(void)state;
	struct packing_constants c = example_packing();
	struct fluid_state f = example_fluids();
	double dp = packed_stichlmair_wet_pam(&c, 0.4, 5e-3, &f, NULL, NULL);
	assert_true(close_rel(dp, 539.876823725352, 1e-9)); /* Pa/m, fluids docstring */
}

/* Tolerance 1e-8 relative: fluids' 2-D Newton stops at ytol 1e-11; its own
 * test file and docstring differ from each other in the 11th digit. */
static void test_stichlmair_flood_matches_paper_example(void **state)
{
	(void)state;
	struct packing_constants c = example_packing();
	struct fluid_state f = example_fluids();
	double u = packed_stichlmair_flood_ms(&c, 5e-3, &f, NULL);
	assert_true(close_rel(u, 0.6394323542746928, 1e-8)); /* m/s, fluids docstring */
}

/* Robbins (1991) example from the handbook, as used in the python3-fluids
 * 1.0.22 Robbins docstring (read): L = 12.2, G = 2.03 kg/(s m2), water
 * 1000 kg/m3 and 1 mPa s, air 1.1853 kg/m3, Fpd = 24 1/ft, 2 m of bed:
 * 619.6624593438102 Pa. Tolerance 1e-6 relative: the same equation, but
 * fluids' unit-conversion constants are rounded at the 8th-9th digit. */
static void test_robbins_matches_handbook_example(void **state)
{
	(void)state;
	double pam = packed_robbins_pam(24.0 / 0.3048, 2.03, 12.2, 1.1853, 1000.0, 1e-3, NULL);
	assert_true(close_rel(2.0 * pam, 619.6624593438102, 1e-6));
}

/* One inch of water per foot in Pa/m: 1 inH2O (4 degC) = 249.08891 Pa
 * (NIST SP 811 Appendix B, from memory), 1 ft = 0.3048 m exactly. Tolerance
 * 1e-6: the constant is given to 8 digits. */
static void test_inh2o_per_ft_conversion(void **state)
{
	(void)state;
	assert_true(close_rel(PACKED_INH2O_PER_FT_PAM, 249.08891 / 0.3048, 1e-6));
}

/* Kister & Gill (1991): dP_flood = 0.12 Fp^0.7 inH2O/ft (from memory).
 * Check 1: at Fp = 20 1/ft the equation, evaluated by hand (python3), gives
 * 0.97702 inH2O/ft = 798.44 Pa/m with 1 inH2O = 249.08891 Pa; this guards
 * the unit conversions inside the function (Fp in 1/m in, Pa/m out).
 * Tolerance 1e-4: the hand value is rounded to 5 digits.
 * Check 2: high-packing-factor packings flood at about 2 inH2O/ft (from
 * memory; the flood line of the older generalised pressure-drop charts);
 * at Fp = 60 1/ft the equation gives 2.11. Tolerance 10 %: the recalled
 * figure is a rounded statement, and handbooks quote the coefficient as
 * 0.115 as well as 0.12 (4 % apart). */
static void test_kister_gill_flood_dp(void **state)
{
	(void)state;
	double a = packed_kister_gill_flood_pam(20.0 / 0.3048, false, NULL);
	assert_true(close_rel(a, 798.44, 1e-4));
	double b = packed_kister_gill_flood_pam(60.0 / 0.3048, false, NULL);
	assert_true(close_rel(b / PACKED_INH2O_PER_FT_PAM, 2.0, 0.10));
}

static struct fluid_state air_water(void)
{
	struct fluid_state f = {.rho_g_kgm3 = 1.2, .rho_l_kgm3 = 998.0, .mu_g_pas = 1.8e-5,
				.mu_l_pas = 1.0e-3, .sigma_nm = 0.072};
	return f;
}

/* Two independent published holdup correlations for the same bed should
 * agree: Billet & Schultes (1999) pre-loading holdup for 50 mm metal rings
 * against Stichlmair et al. (1989) h0 = 0.555 Fr_L^(1/3) with the same a and
 * epsilon (itself checked against python3-fluids through the irrigated DP),
 * air/water at 5, 10 and 20 m3/(m2 h). Tolerance 30 %: each correlation is
 * reported with mean deviations of the order of 10-20 % from data (common
 * practice), so two of them can differ by twice that. */
static void test_bs_holdup_agrees_with_stichlmair_h0(void **state)
{
	(void)state;
	const struct packing_constants *c = packing_lookup("metal-slotted-ring-50mm", NULL);
	assert_non_null(c);
	struct fluid_state f = air_water();
	const double loads_m3m2h[] = {5.0, 10.0, 20.0};
	for (unsigned i = 0; i < 3; i++) {
		double ul = loads_m3m2h[i] / 3600.0;
		double bs = packed_bs_holdup_preload(c, ul, &f, NULL);
		double st = packed_stichlmair_h0(c, ul);
		assert_true(close_rel(bs, st, 0.30));
	}
}

/* Capacity of 50 mm metal rings, air/water, 20 m3/(m2 h): flooding F-factor
 * u sqrt(rho_g) in 2.5..3.5 Pa^0.5, and the loading point at 60..80 % of
 * the flood velocity (both common practice for second-generation 50 mm
 * random packings; ranges rather than points because the statements are
 * generic). */
static void test_bs_capacity_of_50mm_rings_is_plausible(void **state)
{
	(void)state;
	const struct packing_constants *c = packing_lookup("metal-slotted-ring-50mm", NULL);
	assert_non_null(c);
	struct fluid_state f = air_water();
	double ul = 20.0 / 3600.0;
	double u_fl = packed_bs_flood_ms(c, ul, &f, NULL);
	double u_s = packed_bs_loading_ms(c, ul, &f, NULL);
	double ff = u_fl * sqrt(f.rho_g_kgm3);
	assert_true(ff > 2.5 && ff < 3.5);
	assert_true(u_s / u_fl > 0.60 && u_s / u_fl < 0.80);
}

/* ---- consistency of the two flood indicators, through section_eval ------ */

/* Air/water at 20 degC, 1.013 bar, as section properties. */
static struct section_props cons_props(void)
{
	struct section_props pr;
	memset(&pr, 0, sizeof pr);
	pr.gas_molar_mass_kgkmol = 28.96;
	pr.gas_compressibility = 1.0;
	struct prop_table one = {.point_count = 1};
	one.value[0] = 1.81e-5;
	pr.gas_viscosity_pas = one;
	one.value[0] = 998.0;
	pr.liquid_density_kgm3 = one;
	one.value[0] = 1.0e-3;
	pr.liquid_viscosity_pas = one;
	one.value[0] = 0.072;
	pr.surface_tension_nm = one;
	return pr;
}

static struct section_geom cons_geom(const char *packing, double fpd_1ft)
{
	struct section_geom g;
	memset(&g, 0, sizeof g);
	g.type = SECTION_PACKED;
	g.diameter_m = 1.2;
	g.packed.height_m = 8.0;
	const struct packing_constants *c = packing_lookup(packing, &g.packed.structured);
	assert_non_null(c);
	g.packed.c = *c;
	if (isfinite(fpd_1ft))
		g.packed.c.dry_factor_1pm = fpd_1ft / 0.3048;
	g.packed.flood_method = isfinite(c->billet_cfl) ? PACKED_FLOOD_BILLET_SCHULTES
							: PACKED_FLOOD_STICHLMAIR;
	return g;
}

/* dp_flood_pct at the model's own flood point, fed the model's own DP, at a
 * liquid load in m3/(m2 h); NAN when the row cannot give it. Also returns
 * the gas load (as % of the model flood load) at which the model DP reaches
 * the Kister-Gill flood DP, or NAN when it does not below 300 %. */
static double dp_pct_at_model_flood(const struct section_geom *g, double load_m3m2h,
				    double *crossing_pct)
{
	struct section_props pr = cons_props();
	double area = M_PI / 4.0 * g->diameter_m * g->diameter_m;
	double rho_g = 101325.0 * 28.96 / (8314.462618 * 293.15);
	struct section_point p = {.gas_kgs = 1.0 * rho_g * area,
				  .liquid_kgs = load_m3m2h / 3600.0 * 998.0 * area,
				  .dp_pa = NAN, .pressure_pa = 101325.0, .temperature_k = 293.15,
				  .level_m = NAN, .gas_density_kgm3 = NAN};
	struct section_result r;
	section_eval(g, &pr, &p, &r);
	*crossing_pct = NAN;
	if (!isfinite(r.v[RF_FLOOD_PCT]) || !(r.v[RF_FLOOD_PCT] > 0.0))
		return NAN;
	double g_flood = p.gas_kgs * 100.0 / r.v[RF_FLOOD_PCT];
	/* Just below the flood point: Stichlmair has no steady DP above it. */
	p.gas_kgs = g_flood * 0.99999;
	section_eval(g, &pr, &p, &r);
	assert_true(fabs(r.v[RF_FLOOD_PCT] - 99.999) < 1e-6);
	if (!isfinite(r.v[RF_DP_MODEL_PA]))
		return NAN;
	p.dp_pa = r.v[RF_DP_MODEL_PA];
	section_eval(g, &pr, &p, &r);
	double pct = r.v[RF_DP_FLOOD_PCT];
	/* Where does the model DP reach the flood DP? Scan up in 1 % steps. */
	for (double f = 0.50; f <= 3.0 && isfinite(pct); f += 0.01) {
		struct section_point q = p;
		q.gas_kgs = g_flood * f;
		q.dp_pa = NAN;
		section_eval(g, &pr, &q, &r);
		if (!isfinite(r.v[RF_DP_MODEL_PA]))
			break;
		q.dp_pa = r.v[RF_DP_MODEL_PA];
		section_eval(g, &pr, &q, &r);
		if (r.v[RF_DP_FLOOD_PCT] >= 100.0) {
			*crossing_pct = 100.0 * f;
			break;
		}
	}
	return pct;
}

/* What the test expects of one case: agreement within CONS_TOL, or the
 * disagreement reported in the README ("Two flood indicators on a packed
 * bed"), pinned so that a change of model or constant makes us look again. */
enum cons_expect { CONS_AGREE, CONS_DP_READS_LOW, CONS_DP_READS_HIGH, CONS_NO_DP_MODEL };

struct cons_case {
	const char *packing;
	double fpd_1ft;        /* Robbins' Fpd as a config gives it, NAN: table */
	double load_m3m2h;
	enum cons_expect expect;
};

/* Tolerance 25 % of the flood DP: the flood velocities of Stichlmair et al.
 * and of Billet & Schultes carry about +-10..12 % against their data (from
 * memory), and near flooding the DP rises at least with the square of the
 * gas load, so a flood point that is right within its own accuracy still
 * moves the DP there by (1.12)^2 - 1 = 25 %. Kister & Gill's flood DP has
 * its own scatter on top (not recalled), which we do not add. */
#define CONS_TOL_PCT 25.0

/* For every table packing at the model's flood point: the DP-based
 * indicator (dp_flood_pct, measured DP against the Kister & Gill flood DP,
 * fed the model's own DP) against the model flood % (100). Rows without a
 * DP model in the table are run with the Fpd the demo (C402, 20 1/ft) and
 * site template (K701, 40 1/ft) configs give, both from memory. Findings,
 * explained in the README:
 *  - Stichlmair rows agree at low liquid load and read low above it: the
 *    model's flood point (where the DP-holdup curve turns vertical) comes at
 *    a DP that falls with liquid load, while Kister & Gill's flood DP does
 *    not depend on it;
 *  - Billet-Schultes rows with Robbins' DP agree at 5 m3/(m2 h) (the 25 mm
 *    ring reads high there: Robbins' DP is so steep near flooding that 6 %
 *    of gas load is 36 % of DP) and read low at 20 and 40: Robbins reaches
 *    the Kister-Gill flood DP only at 1.1..1.4 times the Billet-Schultes
 *    flood gas load (printed), i.e. the recalled C_Fl, Fp and Fpd imply
 *    capacities that far apart; we do not edit any of them to agree;
 *  - corrugated-sheet rows carry no constants at all. */
static void test_dp_flood_indicator_agrees_with_model_flood(void **state)
{
	(void)state;
	static const struct cons_case cases[] = {
		{"ceramic-saddle-25mm", NAN, 5.0, CONS_AGREE},
		{"ceramic-saddle-25mm", NAN, 10.0, CONS_AGREE},
		{"ceramic-saddle-25mm", NAN, 20.0, CONS_DP_READS_LOW},
		{"ceramic-saddle-25mm", NAN, 40.0, CONS_DP_READS_LOW},
		{"ceramic-ring-25mm", NAN, 5.0, CONS_DP_READS_LOW},
		{"ceramic-ring-25mm", NAN, 10.0, CONS_DP_READS_LOW},
		{"ceramic-ring-25mm", NAN, 20.0, CONS_DP_READS_LOW},
		{"ceramic-ring-25mm", NAN, 40.0, CONS_DP_READS_LOW},
		{"metal-slotted-ring-25mm", NAN, 20.0, CONS_NO_DP_MODEL},
		{"metal-slotted-ring-25mm", 40.0, 5.0, CONS_DP_READS_HIGH},
		{"metal-slotted-ring-25mm", 40.0, 20.0, CONS_DP_READS_LOW},
		{"metal-slotted-ring-25mm", 40.0, 40.0, CONS_DP_READS_LOW},
		{"metal-slotted-ring-50mm", NAN, 20.0, CONS_NO_DP_MODEL},
		{"metal-slotted-ring-50mm", 20.0, 5.0, CONS_AGREE},
		{"metal-slotted-ring-50mm", 20.0, 20.0, CONS_DP_READS_LOW},
		{"metal-slotted-ring-50mm", 20.0, 40.0, CONS_DP_READS_LOW},
		{"plastic-slotted-ring-50mm", NAN, 20.0, CONS_NO_DP_MODEL},
		{"plastic-slotted-ring-50mm", 20.0, 5.0, CONS_AGREE},
		{"plastic-slotted-ring-50mm", 20.0, 20.0, CONS_DP_READS_LOW},
		{"plastic-slotted-ring-50mm", 20.0, 40.0, CONS_DP_READS_LOW},
		{"metal-corrugated-sheet-250", NAN, 20.0, CONS_NO_DP_MODEL},
		{"metal-corrugated-sheet-500", NAN, 20.0, CONS_NO_DP_MODEL},
	};
	/* Every table row appears at least once. */
	for (unsigned i = 0; i < packing_count(); i++) {
		bool seen = false;
		for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++)
			seen = seen || strcmp(cases[k].packing, packing_name_at(i)) == 0;
		assert_true(seen);
	}
	for (size_t k = 0; k < sizeof cases / sizeof cases[0]; k++) {
		const struct cons_case *cc = &cases[k];
		struct section_geom g = cons_geom(cc->packing, cc->fpd_1ft);
		double cross = NAN;
		double pct = dp_pct_at_model_flood(&g, cc->load_m3m2h, &cross);
		print_message("# %-26s Fpd %4.0f  L %4.0f m3/(m2 h): dp_flood_pct %6.1f at the "
			      "model flood point; DP reaches the flood DP at %5.1f %% of the model "
			      "flood load\n", cc->packing, cc->fpd_1ft, cc->load_m3m2h, pct, cross);
		switch (cc->expect) {
		case CONS_AGREE:
			assert_true(fabs(pct - 100.0) <= CONS_TOL_PCT);
			break;
		case CONS_DP_READS_LOW:
			assert_true(pct < 100.0 - CONS_TOL_PCT);
			break;
		case CONS_DP_READS_HIGH:
			assert_true(pct > 100.0 + CONS_TOL_PCT);
			break;
		case CONS_NO_DP_MODEL:
			assert_true(isnan(pct));
			break;
		}
	}
}

/* The worked example of Stichlmair, Bravo & Fair (1989) through the whole
 * section (section_eval): the same packing and fluids as the tests above on
 * a 1 m column with a 2 m bed, gas 0.4 m/s at a measured density of
 * 5 kg/m3, liquid 5e-3 m/s. flood_pct must be 100 x 0.4 / 0.6394323542746928
 * and dp_model_pa 2 m x 539.876823725352 Pa/m (python3-fluids 1.0.22
 * docstrings, read). Tolerance 1e-8 relative, as for the flood velocity
 * above: the section adds only the areas and the conversions of mass flow
 * to velocity. */
static void test_section_stichlmair_example_end_to_end(void **state)
{
	(void)state;
	struct section_geom g;
	memset(&g, 0, sizeof g);
	g.type = SECTION_PACKED;
	g.diameter_m = 1.0;
	g.packed.height_m = 2.0;
	g.packed.c = example_packing();
	g.packed.flood_method = PACKED_FLOOD_STICHLMAIR;
	struct section_props pr = cons_props();
	pr.gas_viscosity_pas.value[0] = 5e-5;
	pr.liquid_density_kgm3.value[0] = 1200.0;
	double area = M_PI / 4.0;
	struct section_point p = {.gas_kgs = 0.4 * 5.0 * area, .liquid_kgs = 5e-3 * 1200.0 * area,
				  .dp_pa = NAN, .pressure_pa = 101325.0, .temperature_k = 293.15,
				  .level_m = NAN, .gas_density_kgm3 = 5.0};
	struct section_result r;
	section_eval(&g, &pr, &p, &r);
	assert_true(close_rel(r.v[RF_FLOOD_PCT], 100.0 * 0.4 / 0.6394323542746928, 1e-8));
	assert_true(close_rel(r.v[RF_DP_MODEL_PA], 2.0 * 539.876823725352, 1e-8));
	assert_int_equal(r.quality, FG_QUALITY_GOOD);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_stichlmair_dry_matches_paper_example),
		cmocka_unit_test(test_stichlmair_wet_matches_paper_example),
		cmocka_unit_test(test_stichlmair_flood_matches_paper_example),
		cmocka_unit_test(test_robbins_matches_handbook_example),
		cmocka_unit_test(test_inh2o_per_ft_conversion),
		cmocka_unit_test(test_kister_gill_flood_dp),
		cmocka_unit_test(test_bs_holdup_agrees_with_stichlmair_h0),
		cmocka_unit_test(test_bs_capacity_of_50mm_rings_is_plausible),
		cmocka_unit_test(test_dp_flood_indicator_agrees_with_model_flood),
		cmocka_unit_test(test_section_stichlmair_example_end_to_end),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
