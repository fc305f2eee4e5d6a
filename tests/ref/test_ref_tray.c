/*
 * test_ref_tray.c - the tray models against values from outside the project.
 *
 * Each check names its source beside the expected value, says "from memory"
 * where the value is recalled rather than read from a source in front of us,
 * and states its tolerance and why. Three kinds of check:
 *  - chart readings: a published digitisation of Fair's (1961) flooding
 *    chart, and readings of the charts used in the sieve-plate worked
 *    example of Sinnott, Coulson & Richardson's Chemical Engineering Vol. 6
 *    (4th ed., Example 11.11, from memory);
 *  - the original equations evaluated by hand (with /usr/bin/python3, not
 *    with this code) at a stated point: guards our typing of the equations;
 *  - one comparison between the two flood methods against a published
 *    comparison of their spread;
 *  - the whole section through section_eval: Fair and Kister-Haas on the
 *    base plate of the worked example (an aqueous, low gas density system)
 *    and against the measured hole-area and hole-size trends Kister
 *    (Distillation Design, 1992, sec. 6.2) draws from test data.
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

static int close_rel(double a, double b, double rel)
{
	return fabs(a - b) <= rel * fabs(b);
}

/* Fair's chart as digitised (384 points) and fitted by a cubic in ln(FLV)
 * with coefficients linear in tray spacing, published in "Sieve tray
 * flooding correlation", libpf.com technical note, 2012-03-05 (read in front
 * of us). Returns C_SB in m/s for FLV (-) and spacing in mm. */
static double fair_chart_digitised(double flv, double ts_mm)
{
	double x = log(flv);
	double a = 1.10748e-06 * ts_mm + 0.00045284;
	double b = 4.04865e-06 * ts_mm + 0.000799395;
	double c = -3.09381e-05 * ts_mm - 0.00625024;
	double d = 3.00232e-05 * ts_mm + 0.0140453;
	return ((a * x + b) * x + c) * x + d;
}

/* Lygeros-Magoulas against the digitised chart over FLV 0.02..1.0 and
 * spacings 150..900 mm. Tolerance 12 %: the digitisation's own fit is
 * within 2.9 % of the chart on average and 7.1 % on the 600 mm curve (its
 * note); the Lygeros-Magoulas fit carries an error of the same order (the
 * note calls it "not accurate"); the two add up to about 12 %. */
static void test_fair_fit_matches_digitised_chart(void **state)
{
	(void)state;
	static const double flv[] = {0.02, 0.05, 0.1, 0.2, 0.5, 1.0};
	static const double ts_mm[] = {150.0, 225.0, 300.0, 450.0, 600.0, 900.0};
	double worst = 0.0;
	for (size_t i = 0; i < sizeof flv / sizeof flv[0]; i++)
		for (size_t j = 0; j < sizeof ts_mm / sizeof ts_mm[0]; j++) {
			double ours = tray_fair_csb_ms(flv[i], ts_mm[j] / 1000.0, NULL);
			double chart = fair_chart_digitised(flv[i], ts_mm[j]);
			double dev = fabs(ours / chart - 1.0);
			worst = fmax(worst, dev);
		}
	print_message("# worst deviation from digitised Fair chart: %.1f %%\n", 100.0 * worst);
	assert_true(worst <= 0.12);
}

/* The known weakness: at FLV = 0.01 the chart curves droop and the
 * Lygeros-Magoulas fit does not (same note). The fit must read high there,
 * and by more than at FLV = 0.02, for spacings up to 600 mm; this pins the
 * known behaviour so that a change to the fit shows. */
static void test_fair_fit_reads_high_at_lowest_flow_parameter(void **state)
{
	(void)state;
	static const double ts_mm[] = {150.0, 300.0, 450.0, 600.0};
	for (size_t j = 0; j < sizeof ts_mm / sizeof ts_mm[0]; j++) {
		double r01 = tray_fair_csb_ms(0.01, ts_mm[j] / 1000.0, NULL) /
			     fair_chart_digitised(0.01, ts_mm[j]);
		double r02 = tray_fair_csb_ms(0.02, ts_mm[j] / 1000.0, NULL) /
			     fair_chart_digitised(0.02, ts_mm[j]);
		assert_true(r01 > 1.0);
		assert_true(r01 > r02);
	}
}

/* Sinnott Example 11.11 (from memory), readings of Fig. 11.27 (Fair's chart)
 * at 0.5 m spacing: K1 = 7.5e-2 m/s at FLV 0.15 (column base) and 9.0e-2 m/s
 * at FLV 0.032 (top). Tolerance 6 %: a chart reading is good to about
 * +-0.003 m/s here (4 %), plus the fit's few per cent. */
static void test_fair_fit_matches_sinnott_example_readings(void **state)
{
	(void)state;
	assert_true(close_rel(tray_fair_csb_ms(0.15, 0.5, NULL), 7.5e-2, 0.06));
	assert_true(close_rel(tray_fair_csb_ms(0.032, 0.5, NULL), 9.0e-2, 0.06));
}

/* Lygeros-Magoulas equation evaluated by hand at FLV 0.1, TS 600 mm:
 * 0.0105 + 8.127e-4 * 600^0.755 * exp(-1.463 * 0.1^0.842) = 0.0929171 m/s
 * (python3). Tolerance 1e-5 relative: arithmetic only. */
static void test_fair_fit_hand_evaluation(void **state)
{
	(void)state;
	assert_true(close_rel(tray_fair_csb_ms(0.1, 0.6, NULL), 0.0929171, 1e-5));
}

/* Sinnott Example 11.11 (from memory): surface-tension correction of K1 for
 * the base liquid, sigma = 57 mN/m: (57/20)^0.2 x 7.5e-2 printed as 9.3e-2
 * m/s. Tolerance 1.2 %: both printed figures have two significant figures,
 * so each is good to about +-0.6 %. */
static void test_sigma_correction_matches_sinnott_example(void **state)
{
	(void)state;
	assert_true(close_rel(7.5e-2 * tray_sigma_factor(0.057), 9.3e-2, 0.012));
}

/* Francis weir, Sinnott eq. 11.85 (form confirmed in front of us): how = 750
 * (Lw/(rho_l lw))^(2/3) mm. Hand evaluation at Lw 7.2 kg/s, rho_l 954 kg/m3,
 * lw 0.76 m: 34.6504 mm (python3). Tolerance 1e-5: arithmetic only. */
static void test_weir_crest_hand_evaluation(void **state)
{
	(void)state;
	double how = tray_weir_crest_m(7.2 / 954.0, 0.76);
	assert_true(close_rel(how, 34.6504e-3, 1e-5));
}

/* Sinnott Example 11.11 (from memory): C0 = 0.84 read from Fig. 11.34 at
 * plate thickness / hole diameter 1.0 and Ah/Ap 0.10. Tolerance 0.02: the
 * chart reads to about 0.01 and the fit adds about as much. */
static void test_orifice_coefficient_matches_sinnott_reading(void **state)
{
	(void)state;
	assert_true(fabs(tray_orifice_coefficient(0.10, 1.0, NULL) - 0.84) <= 0.02);
}

/* The orifice-coefficient fit (from memory) evaluated by hand: Ah/Aa 0.10,
 * t/d 1.0 gives 0.837379; Ah/Aa 0.15, t/d 0.6 gives 0.790771 (python3).
 * Tolerance 1e-5: arithmetic only; guards our typing of the equations. */
static void test_orifice_coefficient_hand_evaluation(void **state)
{
	(void)state;
	assert_true(close_rel(tray_orifice_coefficient(0.10, 1.0, NULL), 0.837379, 1e-5));
	assert_true(close_rel(tray_orifice_coefficient(0.15, 0.6, NULL), 0.790771, 1e-5));
}

/* Dry-plate drop, Sinnott eq. 11.88: hd = 51 (uh/C0)^2 rho_v/rho_l mm. At uh
 * 13.4 m/s, C0 0.84, rho_v 0.72, rho_l 954: 9.7950 mm (python3). Ours uses
 * 1000/(2 g) = 50.986 where Sinnott rounds to 51: tolerance 0.05 %. */
static void test_dry_head_matches_sinnott_equation(void **state)
{
	(void)state;
	double hd = tray_dry_head_m(13.4, 0.84, 0.72, 954.0);
	assert_true(close_rel(hd, 9.7950e-3, 5e-4));
}

/* Downcomer apron loss, Sinnott eq. 11.92: hdc = 166 (Lwd/(rho_l Am))^2 mm;
 * 7.2 kg/s, 954 kg/m3, Am 0.030 m2: 10.5059 mm (python3). Tolerance 1e-5. */
static void test_apron_head_hand_evaluation(void **state)
{
	(void)state;
	assert_true(close_rel(tray_apron_head_m(7.2 / 954.0, 0.030), 10.5059e-3, 1e-5));
}

/* Eduljee, Sinnott eq. 11.84: uh,min = [K2 - 0.90 (25.4 - dh)]/rho_v^0.5.
 * K2 30.6, dh 5 mm, rho_v 0.72: 14.4250 m/s (python3). Tolerance 1e-5. */
static void test_weep_velocity_hand_evaluation(void **state)
{
	(void)state;
	double u = tray_weep_velocity_ms(30.6, 0.005, 0.72, NULL);
	assert_true(close_rel(u, 14.4250, 1e-5));
}

/* Bennett, Agrawal & Cook (1983) equations (from memory, as quoted in the
 * handbook literature) evaluated by hand at u_a 1.2 m/s, rho_g 2.5, rho_l 800,
 * hw 0.05 m, Q 0.0075 m3/s, lw 1.1 m (python3): Ks 0.0671871 m/s,
 * alpha_e 0.341242, C 0.501446, hL 0.0294985 m (exponent 0.67); residual with sigma 0.020
 * N/m, dh 5 mm: dBmax 4.24913 mm, hR 3.59974 mm. Tolerance 1e-5. */
static void test_bennett_hand_evaluation(void **state)
{
	(void)state;
	double ae = tray_froth_density(1.2, 800.0, 2.5);
	assert_true(close_rel(ae, 0.341242, 1e-5));
	assert_true(close_rel(tray_clear_liquid_m(ae, 0.05, 0.0075, 1.1), 0.0294985, 1e-5));
	assert_true(close_rel(tray_residual_head_m(0.020, 800.0, 2.5, 0.005), 3.59974e-3, 1e-5));
}

/* Kister & Haas (1990), SI form (from memory), by hand at dh 5 mm, Af 0.10,
 * weir load 24.5455 m3/(h m), rho_l 800, rho_g 2.5, sigma 20 mN/m, TS 600 mm
 * (python3): hct 11.6224 mm, C_SB 0.105409 m/s. Tolerance 1e-5. */
static void test_kister_haas_hand_evaluation(void **state)
{
	(void)state;
	struct tray_geom t;
	memset(&t, 0, sizeof t);
	t.spacing_m = 0.6;
	t.hole_area_frac = 0.10;
	t.hole_diameter_m = 0.005;
	struct fluid_state f = {.rho_g_kgm3 = 2.5, .rho_l_kgm3 = 800.0, .sigma_nm = 0.020};
	double load = 0.0075 / 1.1;
	assert_true(close_rel(tray_kh_transition_height_m(0.10, 0.005, load, 800.0),
			      11.6224e-3, 1e-5));
	assert_true(close_rel(tray_kh_csb_ms(&t, &f, load, NULL), 0.105409, 1e-5));
}

/* The two flood methods at an ordinary design point (the one above, with
 * FLV 0.0839 for Fair). Ujile & Iminabo, Chem. Process Eng. Res. 25 (2014)
 * (abstract in front of us) report 0.104 and 0.121 m/s from the two methods
 * for one refinery column, a 14 % spread. Tolerance 25 %: that spread plus
 * the stated accuracy of either correlation (about +-10..15 %, from memory). */
static void test_kister_haas_and_fair_agree_within_published_spread(void **state)
{
	(void)state;
	struct tray_geom t;
	memset(&t, 0, sizeof t);
	t.spacing_m = 0.6;
	t.hole_area_frac = 0.10;
	t.hole_diameter_m = 0.005;
	struct fluid_state f = {.rho_g_kgm3 = 2.5, .rho_l_kgm3 = 800.0, .sigma_nm = 0.020};
	double kh = tray_kh_csb_ms(&t, &f, 0.0075 / 1.1, NULL);
	double flv = 6.0 / 4.0 * sqrt(2.5 / 800.0);
	double fair = tray_fair_csb_ms(flv, 0.6, NULL);
	print_message("# Kister-Haas / Fair C_SB = %.3f\n", kh / fair);
	assert_true(fabs(kh / fair - 1.0) <= 0.25);
}

/* Jet flood % of a whole tray section, evaluated by hand from the equations
 * (python3): invented column, D 1.5 m, downcomer 12 % of the area, TS 0.6 m,
 * Ah/Aa 0.10, sigma 0.020 N/m, gas 4 kg/s at 2.5 kg/m3, liquid 6 kg/s at
 * 800 kg/m3: FLV 0.0838525, C_SB 0.0953429 m/s, jet flood 60.4200 %.
 * Tolerance 1e-5: arithmetic only. */
static void test_section_jet_flood_hand_evaluation(void **state)
{
	(void)state;
	struct section_geom g;
	memset(&g, 0, sizeof g);
	g.type = SECTION_TRAY;
	g.diameter_m = 1.5;
	g.tray.trays = 10;
	g.tray.spacing_m = 0.6;
	g.tray.weir_height_m = 0.05;
	g.tray.weir_length_m = 1.1;
	g.tray.active_area_frac = 0.76;
	g.tray.downcomer_area_frac = 0.12;
	g.tray.hole_area_frac = 0.10;
	g.tray.hole_diameter_m = 0.005;
	g.tray.deck_thickness_m = 0.003;
	g.tray.downcomer_clearance_m = 0.04;
	struct fluid_state f = {2.5, 800.0, 1e-5, 3e-4, 0.020};
	struct section_point p = {4.0, 6.0, NAN, 2e5, 350.0, NAN, NAN, NAN, NAN, NAN, NAN};
	struct section_result r;
	result_clear(&r);
	tray_eval(&g, &f, &p, &r);
	assert_true(close_rel(r.v[RF_JET_FLOOD_PCT], 60.4200, 1e-5));
}

/* ---- the whole section, through section_eval ---------------------------- */

static struct section_props props_const(double rho_l, double mu_g, double mu_l, double sigma)
{
	struct section_props pr;
	memset(&pr, 0, sizeof pr);
	pr.gas_molar_mass_kgkmol = 18.0;
	pr.gas_compressibility = 1.0;
	struct prop_table one = {.point_count = 1};
	one.value[0] = mu_g;
	pr.gas_viscosity_pas = one;
	one.value[0] = rho_l;
	pr.liquid_density_kgm3 = one;
	one.value[0] = mu_l;
	pr.liquid_viscosity_pas = one;
	one.value[0] = sigma;
	pr.surface_tension_nm = one;
	return pr;
}

/* The base plate of Sinnott's sieve-plate worked example (Coulson &
 * Richardson's Chemical Engineering Vol. 6, 4th ed., Example 11.11, from
 * memory): an acetone stripper whose base is nearly all water, a low gas
 * density aqueous system. 0.79 m column, downcomers 12 % of the area each,
 * active area = column - 2 downcomers, holes 5 mm in a 5 mm plate over 10 %
 * of the active area, 50 mm weir 0.6 m long, 0.5 m spacing; vapour 0.72
 * kg/m3, liquid 954 kg/m3, surface tension 57 mN/m. */
static struct section_geom sinnott_plate(enum tray_flood_method m, double hole_diameter_m)
{
	struct section_geom g;
	memset(&g, 0, sizeof g);
	g.type = SECTION_TRAY;
	g.diameter_m = 0.79;
	g.tray.trays = 1;
	g.tray.kind = TRAY_SIEVE;
	g.tray.spacing_m = 0.5;
	g.tray.weir_height_m = 0.05;
	g.tray.weir_length_m = 0.6;
	g.tray.active_area_frac = 0.76;
	g.tray.downcomer_area_frac = 0.12;
	g.tray.hole_area_frac = 0.10;
	g.tray.hole_diameter_m = hole_diameter_m;
	g.tray.deck_thickness_m = 0.005;
	g.tray.downcomer_clearance_m = 0.04;
	g.tray.flood_method = m;
	return g;
}

/* Jet flood % through section_eval at net-area gas velocity un_ms and flow
 * parameter flv on the Sinnott base plate. */
static double sinnott_jet_pct(const struct section_geom *g, double un_ms, double flv)
{
	const double rho_g = 0.72, rho_l = 954.0;
	struct section_props pr = props_const(rho_l, 1.2e-5, 2.7e-4, 0.057);
	double a_tower = M_PI / 4.0 * g->diameter_m * g->diameter_m;
	double a_net = a_tower * (1.0 - g->tray.downcomer_area_frac);
	double gas = un_ms * rho_g * a_net;
	struct section_point p = {.gas_kgs = gas, .liquid_kgs = flv * gas / sqrt(rho_g / rho_l),
				  .dp_pa = NAN, .pressure_pa = 101325.0, .temperature_k = 373.0,
				  .level_m = NAN, .gas_density_kgm3 = rho_g};
	struct section_result r;
	section_eval(g, &pr, &p, &r);
	assert_true(r.quality != FG_QUALITY_BAD);
	assert_true(fabs(r.v[RF_FLOW_PARAM] - flv) < 1e-9);
	return r.v[RF_JET_FLOOD_PCT];
}

/* Sinnott Example 11.11 (from memory) at the column base: FLV 0.15, K1 read
 * as 7.5e-2 m/s, corrected for 57 mN/m to 9.3e-2, flooding velocity
 * u_f = 9.3e-2 ((954 - 0.72)/0.72)^0.5 = 3.38 m/s; the plate is sized for
 * 85 % of it. Through the whole section, Fair's method must put that design
 * velocity (0.85 x 3.38 m/s on the net area) at 85 % jet flood. Tolerance
 * 6 %: the chart reading (about +-4 %) plus the fit's few per cent, as in
 * test_fair_fit_matches_sinnott_example_readings. Kister & Haas on the same
 * plate must lie within the published spread of the two methods (25 %,
 * see test_kister_haas_and_fair_agree_within_published_spread); observed
 * values are printed. */
static void test_section_sinnott_base_plate_fair_and_kister_haas(void **state)
{
	(void)state;
	const double u_design = 0.85 * 3.38;
	struct section_geom fair = sinnott_plate(TRAY_FLOOD_FAIR, 0.005);
	struct section_geom kh = sinnott_plate(TRAY_FLOOD_KISTER_HAAS, 0.005);
	double pf = sinnott_jet_pct(&fair, u_design, 0.15);
	double pk = sinnott_jet_pct(&kh, u_design, 0.15);
	print_message("# Sinnott base plate at 85 %% of the example's flood velocity: "
		      "Fair %.1f %%, Kister-Haas %.1f %%\n", pf, pk);
	assert_true(close_rel(pf, 85.0, 0.06));
	assert_true(fabs(pk / pf - 1.0) <= 0.25);
}

/* Measured trends of sieve-tray flooding, Kister, Distillation Design
 * (1992) sec. 6.2 (from FRI and other test data; the text read in front of
 * us): "when fractional hole area is between 0.05 and 0.08, an increase in
 * fractional hole area of the order of 0.01 will enhance C_SB by about 5
 * percent", and "C_SB increases with the reciprocal of hole diameter to a
 * power of 0.1 to 0.2". Through the whole section on the Sinnott plate:
 *  - hole area 0.06 -> 0.07: both methods' flood velocity must rise by
 *    3..8 % ("about 5 percent", read as +-3 points for "about");
 *  - holes 5 -> 12.7 mm: Kister-Haas must lower the flood velocity by a
 *    factor (12.7/5)^(0.1..0.2) = 1.10..1.20. Fair has no hole-size term
 *    (Ludwig, Applied Process Design Vol. 2, notes to Fig. 8-137, read:
 *    "correction factors for larger diameters not known"): its ratio is 1,
 *    outside the measured range; pinned here and said in the README. */
static void test_section_flood_trends_match_kister_measured_trends(void **state)
{
	(void)state;
	const double u = 2.5;
	for (int m = 0; m < 2; m++) {
		enum tray_flood_method meth = m ? TRAY_FLOOD_KISTER_HAAS : TRAY_FLOOD_FAIR;
		struct section_geom g6 = sinnott_plate(meth, 0.005);
		struct section_geom g7 = sinnott_plate(meth, 0.005);
		g6.tray.hole_area_frac = 0.06;
		g7.tray.hole_area_frac = 0.07;
		double gain = sinnott_jet_pct(&g6, u, 0.15) / sinnott_jet_pct(&g7, u, 0.15) - 1.0;
		print_message("# %s: C_SB gain from hole area 0.06 to 0.07: %.1f %%\n",
			      m ? "Kister-Haas" : "Fair", 100.0 * gain);
		assert_true(gain >= 0.03);
		assert_true(gain <= 0.08);
		struct section_geom big = sinnott_plate(meth, 0.0127);
		struct section_geom small = sinnott_plate(meth, 0.005);
		double ratio = sinnott_jet_pct(&big, u, 0.15) / sinnott_jet_pct(&small, u, 0.15);
		print_message("# %s: flood velocity 5 mm / 12.7 mm holes: %.3f (measured "
			      "1.10..1.20)\n", m ? "Kister-Haas" : "Fair", ratio);
		if (meth == TRAY_FLOOD_KISTER_HAAS) {
			assert_true(ratio >= 1.10);
			assert_true(ratio <= 1.20);
		} else {
			assert_true(fabs(ratio - 1.0) < 1e-9);
		}
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_fair_fit_matches_digitised_chart),
		cmocka_unit_test(test_fair_fit_reads_high_at_lowest_flow_parameter),
		cmocka_unit_test(test_fair_fit_matches_sinnott_example_readings),
		cmocka_unit_test(test_fair_fit_hand_evaluation),
		cmocka_unit_test(test_sigma_correction_matches_sinnott_example),
		cmocka_unit_test(test_weir_crest_hand_evaluation),
		cmocka_unit_test(test_orifice_coefficient_matches_sinnott_reading),
		cmocka_unit_test(test_orifice_coefficient_hand_evaluation),
		cmocka_unit_test(test_dry_head_matches_sinnott_equation),
		cmocka_unit_test(test_apron_head_hand_evaluation),
		cmocka_unit_test(test_weep_velocity_hand_evaluation),
		cmocka_unit_test(test_bennett_hand_evaluation),
		cmocka_unit_test(test_kister_haas_hand_evaluation),
		cmocka_unit_test(test_kister_haas_and_fair_agree_within_published_spread),
		cmocka_unit_test(test_section_jet_flood_hand_evaluation),
		cmocka_unit_test(test_section_sinnott_base_plate_fair_and_kister_haas),
		cmocka_unit_test(test_section_flood_trends_match_kister_measured_trends),
	};
	return cmocka_run_group_tests_name("ref_tray", tests, NULL, NULL);
}
