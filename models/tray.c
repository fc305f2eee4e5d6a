/*
 * tray.c - hydraulics of cross-flow trays: jet flood, downcomer backup,
 * froth and clear liquid, tray pressure drop, weep margin and liquid holdup.
 *
 * The correlations are the standard published ones for sieve trays (Fair
 * 1961 via Lygeros & Magoulas 1986, Kister & Haas 1990, Bennett, Agrawal &
 * Cook 1983, the Francis weir and Eduljee weep forms as given by Sinnott,
 * Coulson & Richardson's Chemical Engineering Vol. 6, ch. 11). Valve and
 * bubble-cap trays are evaluated with the same sieve-tray correlations,
 * which is an extrapolation and is noted on every evaluation of such a tray.
 * Sinnott's equation and figure numbers are those of the 4th edition, quoted
 * from memory; "from memory" beside an equation means it was recalled, not
 * read from the source, and is marked so in tests/ref/test_ref_tray.c too.
 *
 * tray_eval() works from one private helper, hydraulics(), that evaluates
 * the tray at a given gas and liquid mass flow. It is called once at the
 * operating point and once at the gas rate that gives 100 % jet flood at the
 * current liquid rate (found by bisection), which is the basis of
 * dp_flood_pct. Nothing here allocates; the bisection is bounded.
 */
#include "tray.h"

#include <assert.h>
#include <math.h>
#include <stdbool.h>

#include "solve.h"

/* --- Extrapolation reasons (static strings, see fg_extrap_note) --- */
static const char WHY_FAIR_FLV[] = "tray: flow parameter outside Fair chart 0.01..1.0";
static const char WHY_FAIR_TS[] = "tray: tray spacing outside Fair chart 0.15..0.91 m";
static const char WHY_FAIR_HW[] = "tray: weir height above 15 % of tray spacing (Fair chart basis)";
static const char WHY_FAIR_DH[] = "tray: hole diameter above 12.7 mm (Fair chart basis)";
static const char WHY_HOLE_AREA[] = "tray: hole area below 6 % of active area (Fair correction)";
static const char WHY_KH_RANGE[] = "tray: outside Kister-Haas flood correlation range";
static const char WHY_KH_LOAD[] = "tray: weir load below 3 m3/(h m), Kister-Haas held there";
static const char WHY_CD[] =
	"tray: outside orifice-coefficient chart Ah/Aa 0.05..0.20, t/d 0.2..1.2";
static const char WHY_K2[] = "tray: clear liquid depth above Eduljee K2 chart (0.12 m)";
static const char WHY_WEEP_DH[] = "tray: hole diameter outside Eduljee weep correlation 2..25 mm";
static const char WHY_WEEPING[] =
	"tray: gas below the weep point; hL, DP and holdup assume no weeping";
static const char WHY_VALVE[] =
	"tray: sieve-tray flood, froth and dry-DP correlations used for a valve tray";
static const char WHY_VALVE_WEEP[] =
	"tray: Eduljee weep point is for sieve holes; valve weep % indicative";
static const char WHY_CAP[] =
	"tray: sieve-tray flood, froth and dry-DP correlations used for a bubble-cap tray";

static const char WHY_ABOVE_FLOOD[] = "tray: gas above the jet-flood point";

/* 1 m3/(h m) in m3/(s m). */
#define PER_HOUR (1.0 / 3600.0)

static bool finite_pos(double v)
{
	return isfinite(v) && v > 0.0;
}

static bool finite_nonneg(double v)
{
	return isfinite(v) && v >= 0.0;
}

/* The tray-spacing term of the Fair fit below, 8.127e-4 TS^0.755 (TS in mm). */
static double fair_ts_term(double spacing_m)
{
	return 8.127e-4 * pow(spacing_m * 1000.0, 0.755);
}

/* tray_fair_csb_ms with its spacing term ts_term given (a section computes
 * it once); the same notes and the same arithmetic. */
static double fair_csb(double flow_param, double spacing_m, double ts_term, struct fg_extrap *x)
{
	if (flow_param < 0.01 || flow_param > 1.0)
		fg_extrap_note(x, WHY_FAIR_FLV);
	if (spacing_m < 0.15 || spacing_m > 0.91)
		fg_extrap_note(x, WHY_FAIR_TS);
	return 0.0105 + ts_term * exp(-1.463 * pow(flow_param, 0.842));
}

double tray_fair_csb_ms(double flow_param, double spacing_m, struct fg_extrap *x)
{
	/* Lygeros, A. I. & Magoulas, K. G., Hydrocarbon Processing 65(12), 43
	 * (1986), fit of Fair's (1961) flooding chart, as quoted in Perry's
	 * Handbook (7th ed., p. 14-27), from memory:
	 *   C_SB = 0.0105 + 8.127e-4 TS^0.755 exp(-1.463 FLV^0.842),
	 * C_SB in m/s, TS in mm. The fit overestimates the chart at FLV near
	 * 0.01, where the chart curves droop (see tests/ref/test_ref_tray.c). */
	if (!finite_nonneg(flow_param) || !finite_pos(spacing_m))
		return NAN;
	return fair_csb(flow_param, spacing_m, fair_ts_term(spacing_m), x);
}

double tray_sigma_factor(double sigma_nm)
{
	/* Fair (1961): C_SB scales with (sigma/20 dyn/cm)^0.2 (Ludwig, Applied
	 * Process Design Vol. 2, notes to Fig. 8-137; Sinnott ch. 11). */
	if (!finite_pos(sigma_nm))
		return NAN;
	return pow(sigma_nm / 0.020, 0.2);
}

double tray_hole_area_factor(double hole_area_frac, struct fg_extrap *x)
{
	/* Fair (1961) hole-area correction, tabulated by Ludwig (Applied Process
	 * Design Vol. 2, notes to Fig. 8-137) and Sinnott ch. 11:
	 * Ah/Aa 0.10 -> 1.00, 0.08 -> 0.90, 0.06 -> 0.80. The three points lie on
	 * one line, 5 Ah/Aa + 0.5, used between them. Below 0.06 there is no
	 * published value: the line is continued, floored at 0.1 so the flooding
	 * velocity stays positive, and the extrapolation noted. */
	if (!finite_pos(hole_area_frac))
		return NAN;
	if (hole_area_frac >= 0.10)
		return 1.0;
	if (hole_area_frac < 0.06)
		fg_extrap_note(x, WHY_HOLE_AREA);
	return fmax(5.0 * hole_area_frac + 0.5, 0.1);
}

double tray_flood_velocity_ms(double c_ms, double rho_l_kgm3, double rho_g_kgm3)
{
	/* Souders & Brown (1934) form used by Fair: u_f = C sqrt((rho_l-rho_g)/rho_g). */
	if (!finite_nonneg(c_ms) || !finite_pos(rho_g_kgm3) || !isfinite(rho_l_kgm3))
		return NAN;
	if (rho_l_kgm3 <= rho_g_kgm3)
		return NAN;
	return c_ms * sqrt((rho_l_kgm3 - rho_g_kgm3) / rho_g_kgm3);
}

double tray_jet_flood_pct(double net_velocity_ms, double flood_velocity_ms)
{
	if (!finite_pos(flood_velocity_ms) || !finite_nonneg(net_velocity_ms))
		return NAN;
	return 100.0 * net_velocity_ms / flood_velocity_ms;
}

double tray_kh_transition_height_m(double hole_area_frac, double hole_diameter_m,
				   double weir_load_m2s, double rho_l_kgm3)
{
	/* Kister & Haas (1990), Chem. Eng. Prog. 86(9), 63, in the SI form
	 * quoted by Perry's Handbook (8th ed., section 14), from memory:
	 *   hct = hct,H2O (996/rho_l)^(0.5 (1 - n)),  n = 0.00091 dH/Af,
	 *   hct,H2O = 0.497 Af^-0.791 dH^0.833 / (1 + 0.013 QL^-0.59 Af^-1.79),
	 * hct and dH in mm, QL in m3/(h m) of weir, Af = Ah/Aa. */
	if (!finite_pos(hole_area_frac) || !finite_pos(hole_diameter_m) ||
	    !finite_pos(rho_l_kgm3) || !finite_nonneg(weir_load_m2s))
		return NAN;
	if (weir_load_m2s == 0.0)
		return 0.0;
	double af = hole_area_frac;
	double dh_mm = hole_diameter_m * 1000.0;
	double ql = weir_load_m2s / PER_HOUR;
	double water = 0.497 * pow(af, -0.791) * pow(dh_mm, 0.833) /
		       (1.0 + 0.013 * pow(ql, -0.59) * pow(af, -1.79));
	double n = 0.00091 * dh_mm / af;
	return water * pow(996.0 / rho_l_kgm3, 0.5 * (1.0 - n)) / 1000.0;
}

static void kh_range(const struct tray_geom *t, double sigma_nm, struct fg_extrap *x)
{
	/* Kister & Haas (1990) data base, from memory of the range table in
	 * Perry's: tray spacing 14..36 in, holes 1/8..1 in, Af 0.06..0.20,
	 * surface tension 5..80 mN/m. */
	assert(t != NULL);
	bool out = t->spacing_m < 0.36 || t->spacing_m > 0.91;
	out = out || t->hole_diameter_m < 0.003 || t->hole_diameter_m > 0.0254;
	out = out || t->hole_area_frac < 0.06 || t->hole_area_frac > 0.20;
	out = out || sigma_nm < 0.005 || sigma_nm > 0.080;
	if (out)
		fg_extrap_note(x, WHY_KH_RANGE);
}

double tray_kh_csb_ms(const struct tray_geom *t, const struct fluid_state *f,
		      double weir_load_m2s, struct fg_extrap *x)
{
	/* Kister & Haas (1990), SI form as quoted by Perry's (from memory):
	 *   C_SB = 0.0277 (dH^2 sigma/rho_l)^0.125 (rho_g/rho_l)^0.1 (TS/hct)^0.5,
	 * C_SB in m/s, dH, TS and hct in mm, sigma in mN/m, densities kg/m3.
	 * (The US form has 0.144 with ft/s, in, dyn/cm and lb/ft3: the same
	 * equation, which is how the constant was cross-checked.) */
	assert(t != NULL);
	assert(f != NULL);
	if (!finite_pos(f->rho_g_kgm3) || !isfinite(f->rho_l_kgm3) ||
	    f->rho_l_kgm3 <= f->rho_g_kgm3 || !finite_pos(f->sigma_nm) ||
	    !finite_pos(t->spacing_m) || !finite_nonneg(weir_load_m2s))
		return NAN;
	kh_range(t, f->sigma_nm, x);
	double load = weir_load_m2s;
	if (load < 3.0 * PER_HOUR) {
		fg_extrap_note(x, WHY_KH_LOAD);
		load = 3.0 * PER_HOUR;
	} else if (load > 100.0 * PER_HOUR) {
		fg_extrap_note(x, WHY_KH_RANGE);
	}
	double hct_m = tray_kh_transition_height_m(t->hole_area_frac, t->hole_diameter_m, load,
						   f->rho_l_kgm3);
	if (!finite_pos(hct_m))
		return NAN;
	double dh_mm = t->hole_diameter_m * 1000.0;
	double sigma_mnm = f->sigma_nm * 1000.0;
	return 0.0277 * pow(dh_mm * dh_mm * sigma_mnm / f->rho_l_kgm3, 0.125) *
	       pow(f->rho_g_kgm3 / f->rho_l_kgm3, 0.1) * sqrt(t->spacing_m / hct_m);
}

double tray_weir_crest_m(double liquid_m3s, double weir_length_m)
{
	/* Francis weir formula for a segmental weir, Sinnott eq. 11.85:
	 * how [mm] = 750 (Lw/(rho_l lw))^(2/3), i.e. 0.750 (Q/lw)^(2/3) m. */
	if (!finite_nonneg(liquid_m3s) || !finite_pos(weir_length_m))
		return NAN;
	return 0.750 * pow(liquid_m3s / weir_length_m, 2.0 / 3.0);
}

static void orifice_note(double hole_area_frac, double thickness_over_diameter,
			 struct fg_extrap *x)
{
	if (hole_area_frac < 0.05 || hole_area_frac > 0.20 || thickness_over_diameter < 0.2 ||
	    thickness_over_diameter > 1.2)
		fg_extrap_note(x, WHY_CD);
}

double tray_orifice_coefficient(double hole_area_frac, double thickness_over_diameter,
				struct fg_extrap *x)
{
	/* Fit of the discharge-coefficient chart of Liebson, Kelley & Bullington,
	 * Pet. Refiner 36(3), 288 (1957) (the same chart as Sinnott Fig. 11.34,
	 * which plots against Ah/Ap), in the form found in the handbook
	 * literature, from memory: Cd = 0.74 Ah/Aa + exp(0.29 t/d - 0.56). The
	 * chart spans Ah/Aa 0.05..0.20 and t/d 0.2..1.2. */
	if (!finite_pos(hole_area_frac) || !finite_nonneg(thickness_over_diameter))
		return NAN;
	orifice_note(hole_area_frac, thickness_over_diameter, x);
	return 0.74 * hole_area_frac + exp(0.29 * thickness_over_diameter - 0.56);
}

double tray_dry_head_m(double hole_velocity_ms, double cd, double rho_g_kgm3,
		       double rho_l_kgm3)
{
	/* Orifice equation: dry DP = rho_g u_h^2 / (2 Cd^2); as head of liquid
	 * divide by rho_l g. Sinnott eq. 11.88 (51 mm = 1000/(2 g)). */
	if (!finite_nonneg(hole_velocity_ms) || !finite_pos(cd) || !finite_pos(rho_g_kgm3) ||
	    !finite_pos(rho_l_kgm3))
		return NAN;
	double u = hole_velocity_ms / cd;
	return u * u / (2.0 * TRAY_G_MS2) * rho_g_kgm3 / rho_l_kgm3;
}

double tray_froth_density(double active_velocity_ms, double rho_l_kgm3, double rho_g_kgm3)
{
	/* Bennett, Agrawal & Cook, AIChE J. 29(3), 434 (1983), eq. for the
	 * effective relative froth density, from memory:
	 * alpha_e = exp(-12.55 Ks^0.91), Ks in m/s on the bubbling area. */
	if (!finite_nonneg(active_velocity_ms) || !finite_pos(rho_g_kgm3) ||
	    !isfinite(rho_l_kgm3) || rho_l_kgm3 <= rho_g_kgm3)
		return NAN;
	double ks = active_velocity_ms * sqrt(rho_g_kgm3 / (rho_l_kgm3 - rho_g_kgm3));
	return exp(-12.55 * pow(ks, 0.91));
}

/* C of the clear-liquid equation below. */
static double crest_coefficient(double weir_height_m)
{
	return 0.501 + 0.438 * exp(-137.8 * weir_height_m);
}

/* tray_clear_liquid_m with C given (a section computes it once). */
static double clear_liquid(double alpha_e, double weir_height_m, double liquid_m3s,
			   double weir_length_m, double c)
{
	if (!isfinite(alpha_e) || alpha_e <= 0.0 || alpha_e > 1.0 ||
	    !finite_nonneg(weir_height_m) || !finite_nonneg(liquid_m3s) ||
	    !finite_pos(weir_length_m))
		return NAN;
	double crest = c * pow(liquid_m3s / (weir_length_m * alpha_e), 0.67);
	return alpha_e * (weir_height_m + crest);
}

double tray_clear_liquid_m(double alpha_e, double weir_height_m, double liquid_m3s,
			   double weir_length_m)
{
	/* Bennett, Agrawal & Cook (1983), from memory:
	 * hL = alpha_e [hw + C (QL/(lw alpha_e))^0.67], C = 0.501 + 0.438 exp(-137.8 hw),
	 * SI (m, m3/s), with the exponent 0.67 as the paper prints it (not 2/3:
	 * the correlation was fitted with 0.67). */
	return clear_liquid(alpha_e, weir_height_m, liquid_m3s, weir_length_m,
			    crest_coefficient(weir_height_m));
}

double tray_residual_head_m(double sigma_nm, double rho_l_kgm3, double rho_g_kgm3,
			    double hole_diameter_m)
{
	/* Bennett, Agrawal & Cook (1983) surface-tension residual head, from
	 * memory: hR = 6 sigma/(g rho_l dBmax), dBmax = (6 sigma dH/(g (rho_l -
	 * rho_g)))^(1/3), the largest bubble a hole of diameter dH releases. */
	if (!finite_pos(sigma_nm) || !finite_pos(rho_g_kgm3) || !isfinite(rho_l_kgm3) ||
	    rho_l_kgm3 <= rho_g_kgm3 || !finite_pos(hole_diameter_m))
		return NAN;
	double db = cbrt(6.0 * sigma_nm * hole_diameter_m /
			 (TRAY_G_MS2 * (rho_l_kgm3 - rho_g_kgm3)));
	return 6.0 * sigma_nm / (TRAY_G_MS2 * rho_l_kgm3 * db);
}

double tray_total_dp_pa(double dry_m, double clear_liquid_m, double residual_m,
			double rho_l_kgm3)
{
	/* Sum of heads (Bennett et al. 1983; Sinnott eq. 11.90), times rho_l g. */
	if (!finite_nonneg(dry_m) || !finite_nonneg(clear_liquid_m) ||
	    !finite_nonneg(residual_m) || !finite_pos(rho_l_kgm3))
		return NAN;
	return rho_l_kgm3 * TRAY_G_MS2 * (dry_m + clear_liquid_m + residual_m);
}

double tray_dp_exponent(double dry_m, double clear_liquid_m, double residual_m,
			double alpha_e, double weir_height_m)
{
	/* The derivative of the sum above in ln G, at fixed fluids and liquid
	 * rate, by the chain rule through the same equations:
	 *   dry head: the orifice equation, u_h^2, so d hd / d ln G = 2 hd;
	 *   froth density: alpha_e = exp(-12.55 Ks^0.91) with Ks in
	 *     proportion to G, so d alpha_e / d ln G = 0.91 alpha_e ln alpha_e;
	 *   clear liquid: hL = alpha_e hw + C (QL/lw)^0.67 alpha_e^0.33, so
	 *     d hL / d alpha_e = hw + 0.33 crest with crest = hL/alpha_e - hw;
	 *   residual head: no gas term.
	 * (test_tray checks it against central differences of the DP.) */
	double total = dry_m + clear_liquid_m + residual_m;
	if (!isfinite(total) || !(total > 0.0) || !(alpha_e > 0.0) || !(alpha_e <= 1.0))
		return NAN;
	double crest = clear_liquid_m / alpha_e - weir_height_m;
	double dhl = (weir_height_m + 0.33 * crest) * 0.91 * alpha_e * log(alpha_e);
	return (2.0 * dry_m + dhl) / total;
}

double tray_apron_head_m(double liquid_m3s, double apron_area_m2)
{
	/* Sinnott eq. 11.92: hdc = 166 (Lwd/(rho_l Am))^2 mm = 0.166 u^2 m, u the
	 * liquid velocity under the apron (m/s). */
	if (!finite_nonneg(liquid_m3s) || !finite_pos(apron_area_m2))
		return NAN;
	double u = liquid_m3s / apron_area_m2;
	return 0.166 * u * u;
}

double tray_dc_backup_m(double weir_height_m, double crest_m, double tray_head_m,
			double apron_head_m)
{
	/* Sinnott eq. 11.91: hb = (hw + how) + ht + hdc, clear liquid. */
	if (!finite_nonneg(weir_height_m) || !finite_nonneg(crest_m) ||
	    !finite_nonneg(tray_head_m) || !finite_nonneg(apron_head_m))
		return NAN;
	return weir_height_m + crest_m + tray_head_m + apron_head_m;
}

double tray_dc_backup_limit_m(double spacing_m, double weir_height_m)
{
	/* Common practice, as stated by Sinnott (ch. 11): keep the clear
	 * liquid backup below half of (spacing + weir height), which allows for
	 * an aerated downcomer froth of relative density about 0.5 in normal,
	 * non-foaming systems. Foaming systems need a lower limit. */
	if (!finite_pos(spacing_m) || !finite_nonneg(weir_height_m))
		return NAN;
	return 0.5 * (spacing_m + weir_height_m);
}

double tray_weep_k2(double clear_depth_m, struct fg_extrap *x)
{
	/* Fit of Eduljee's K2 curve (Sinnott Fig. 11.30) made for this project:
	 *   K2 = 31.2 - 4.2 exp(-h/30 mm),
	 * chosen to follow our reading of the curve, from memory: about 27 at
	 * zero depth, 30.6 at about 58 mm (the value Sinnott's worked sieve-plate
	 * example reads), flattening to about 31 at 100..120 mm. Above the chart
	 * (0.12 m) the value is held at its 0.12 m value. Only these recalled
	 * readings stand behind it: no independent check of the curve is in the
	 * tests (a test against the readings it was fitted to could not fail). */
	if (!finite_nonneg(clear_depth_m))
		return NAN;
	double h = clear_depth_m;
	if (h > 0.12) {
		fg_extrap_note(x, WHY_K2);
		h = 0.12;
	}
	return 31.2 - 4.2 * exp(-h / 0.030);
}

double tray_weep_velocity_ms(double k2, double hole_diameter_m, double rho_g_kgm3,
			     struct fg_extrap *x)
{
	/* Eduljee (1959), Brit. Chem. Eng. 4, 320, as Sinnott eq. 11.84:
	 * u_h,min = [K2 - 0.90 (25.4 - dh)] / rho_v^0.5, dh in mm. */
	if (!isfinite(k2) || !finite_pos(hole_diameter_m) || !finite_pos(rho_g_kgm3))
		return NAN;
	double dh_mm = hole_diameter_m * 1000.0;
	if (dh_mm < 2.0 || dh_mm > 25.0)
		fg_extrap_note(x, WHY_WEEP_DH);
	return (k2 - 0.90 * (25.4 - dh_mm)) / sqrt(rho_g_kgm3);
}

double tray_weep_pct(double hole_velocity_ms, double weep_velocity_ms)
{
	if (!finite_pos(weep_velocity_ms) || !finite_nonneg(hole_velocity_ms))
		return NAN;
	return 100.0 * hole_velocity_ms / weep_velocity_ms;
}

double tray_liquid_per_tray_m3(double clear_liquid_m, double active_area_m2,
			       double dc_backup_m, double dc_area_m2)
{
	/* Liquid on the deck: clear liquid height over the active area; in the
	 * downcomer: the clear-liquid backup over the downcomer area (the froth
	 * there holds the same liquid, only taller). Inlet-area liquid is left
	 * out (small next to these two). */
	if (!finite_nonneg(clear_liquid_m) || !finite_nonneg(active_area_m2) ||
	    !finite_nonneg(dc_backup_m) || !finite_nonneg(dc_area_m2))
		return NAN;
	return clear_liquid_m * active_area_m2 + dc_backup_m * dc_area_m2;
}

/* ---------------------------------------------------------------------- */
/* Section evaluation                                                      */
/* ---------------------------------------------------------------------- */

/* Areas of one tray, m2. */
struct areas {
	double tower;   /* tower cross-section */
	double net;     /* tower minus one downcomer (jet-flood basis) */
	double active;  /* bubbling area */
	double hole;    /* hole (or open valve/slot) area */
	double dc;      /* one downcomer's area */
	double apron;   /* clearance under the downcomer apron */
};

/* Everything about one tray at one gas and liquid rate. Heads in m. */
struct hyd {
	double jet_pct;
	double weep_pct;
	double how, alpha_e, hl, hd, hr, ht, hdc, hb;
	double dp_pa;     /* one tray */
	double dc_pct;
};

static bool geometry_ok(const struct section_geom *g)
{
	const struct tray_geom *t = &g->tray;
	bool ok = finite_pos(g->diameter_m) && t->trays >= 1 && finite_pos(t->spacing_m);
	ok = ok && finite_nonneg(t->weir_height_m) && finite_pos(t->weir_length_m);
	ok = ok && finite_pos(t->active_area_frac) && finite_pos(t->downcomer_area_frac);
	ok = ok && t->active_area_frac + t->downcomer_area_frac <= 1.0;
	ok = ok && finite_pos(t->hole_area_frac) && t->hole_area_frac < 1.0;
	ok = ok && finite_pos(t->hole_diameter_m) && finite_nonneg(t->deck_thickness_m);
	return ok && finite_pos(t->downcomer_clearance_m);
}

static struct areas areas_of(const struct section_geom *g)
{
	assert(g != NULL);
	struct areas a;
	a.tower = section_area_m2(g);
	a.dc = a.tower * g->tray.downcomer_area_frac;
	a.net = a.tower - a.dc;
	a.active = a.tower * g->tray.active_area_frac;
	a.hole = a.active * g->tray.hole_area_frac;
	a.apron = g->tray.downcomer_clearance_m * g->tray.weir_length_m;
	return a;
}

/* The terms of one evaluation that do not depend on the flows. With warm
 * memory w they are kept between samples, each group keyed bitwise on what
 * it is computed from (solve.h's solve_memo): the geometry terms, the
 * surface-tension factor and the residual head. Without w, computed afresh:
 * the same numbers either way. */
struct tray_k {
	double ts_term;   /* Fair: 8.127e-4 TS^0.755 */
	double cd;        /* orifice coefficient */
	double c_crest;   /* Bennett et al. crest coefficient */
	double sigma_f;   /* Fair: (sigma/20 mN/m)^0.2 */
	double hr;        /* residual head, m */
};

static void tray_k_fill(const struct section_geom *g, const struct fluid_state *f,
			struct solve_warm *w, struct tray_k *k)
{
	const struct tray_geom *t = &g->tray;
	double tod = t->deck_thickness_m / t->hole_diameter_m;
	double gkey[3] = {t->spacing_m, t->hole_area_frac, t->weir_height_m};
	if (w == NULL || !solve_memo_hit(&w->tray_geom, (double[4]){gkey[0], gkey[1], gkey[2],
								  tod}, 4)) {
		k->ts_term = fair_ts_term(t->spacing_m);
		k->cd = tray_orifice_coefficient(t->hole_area_frac, tod, NULL);
		k->c_crest = crest_coefficient(t->weir_height_m);
		if (w != NULL) {
			w->tray_geom.val[0] = k->ts_term;
			w->tray_geom.val[1] = k->cd;
			w->tray_geom.val[2] = k->c_crest;
		}
	} else {
		k->ts_term = w->tray_geom.val[0];
		k->cd = w->tray_geom.val[1];
		k->c_crest = w->tray_geom.val[2];
	}
	if (w == NULL || !solve_memo_hit(&w->tray_sigma, &f->sigma_nm, 1)) {
		k->sigma_f = tray_sigma_factor(f->sigma_nm);
		if (w != NULL)
			w->tray_sigma.val[0] = k->sigma_f;
	} else {
		k->sigma_f = w->tray_sigma.val[0];
	}
	double hkey[4] = {f->sigma_nm, f->rho_l_kgm3, f->rho_g_kgm3, t->hole_diameter_m};
	if (w == NULL || !solve_memo_hit(&w->tray_hr, hkey, 4)) {
		k->hr = tray_residual_head_m(f->sigma_nm, f->rho_l_kgm3, f->rho_g_kgm3,
					     t->hole_diameter_m);
		if (w != NULL)
			w->tray_hr.val[0] = k->hr;
	} else {
		k->hr = w->tray_hr.val[0];
	}
}

/* Flooding velocity on the net area, m/s, by the section's method. */
static double flood_velocity(const struct section_geom *g, const struct fluid_state *f,
			     const struct tray_k *k, double gas_kgs, double liq_kgs,
			     struct fg_extrap *x)
{
	const struct tray_geom *t = &g->tray;
	double c;
	if (t->flood_method == TRAY_FLOOD_KISTER_HAAS) {
		double load = liq_kgs / f->rho_l_kgm3 / t->weir_length_m;
		c = tray_kh_csb_ms(t, f, load, x);
	} else {
		assert(gas_kgs > 0.0);
		double flv = liq_kgs / gas_kgs * sqrt(f->rho_g_kgm3 / f->rho_l_kgm3);
		/* tray_fair_csb_ms with the section's spacing term */
		c = finite_nonneg(flv) ? fair_csb(flv, t->spacing_m, k->ts_term, x) : NAN;
		c *= k->sigma_f * tray_hole_area_factor(t->hole_area_frac, x);
	}
	/* The calibrated plant capacity scales the capacity factor (C_sb). */
	return tray_flood_velocity_ms(c * section_capacity_factor(g), f->rho_l_kgm3,
				      f->rho_g_kgm3);
}

static double jet_pct_at(const struct section_geom *g, const struct fluid_state *f,
			 const struct tray_k *k, const struct areas *a, double gas_kgs,
			 double liq_kgs, struct fg_extrap *x)
{
	if (gas_kgs <= 0.0)
		return 0.0;
	double un = gas_kgs / f->rho_g_kgm3 / a->net;
	return tray_jet_flood_pct(un, flood_velocity(g, f, k, gas_kgs, liq_kgs, x));
}

/* Weep % at the operating point; NAN for bubble caps, whose risers keep the
 * liquid out of the gas passages, so the Eduljee weep point does not apply. */
static double weep_pct_at(const struct section_geom *g, const struct fluid_state *f,
			  double uh, double clear_depth_m, struct fg_extrap *x)
{
	const struct tray_geom *t = &g->tray;
	if (t->kind == TRAY_BUBBLE_CAP)
		return NAN;
	if (t->kind == TRAY_VALVE)
		fg_extrap_note(x, WHY_VALVE_WEEP);
	double k2 = tray_weep_k2(clear_depth_m, x);
	double uw = tray_weep_velocity_ms(k2, t->hole_diameter_m, f->rho_g_kgm3, x);
	double pct = tray_weep_pct(uh, uw);
	if (t->kind == TRAY_SIEVE && pct < 100.0)
		fg_extrap_note(x, WHY_WEEPING);
	return pct;
}

/* Froth density, clear liquid and DP of one tray (the part of hydraulics()
 * the flood point needs). */
static void tray_dp(const struct section_geom *g, const struct fluid_state *f,
		    const struct tray_k *k, const struct areas *a, double gas_kgs, double liq_kgs,
		    struct hyd *h)
{
	const struct tray_geom *t = &g->tray;
	double ql = liq_kgs / f->rho_l_kgm3;
	double qg = gas_kgs / f->rho_g_kgm3;
	double uh = qg / a->hole;
	h->alpha_e = tray_froth_density(qg / a->active, f->rho_l_kgm3, f->rho_g_kgm3);
	h->hl = clear_liquid(h->alpha_e, t->weir_height_m, ql, t->weir_length_m, k->c_crest);
	h->hd = tray_dry_head_m(uh, finite_nonneg(t->deck_thickness_m / t->hole_diameter_m)
					    ? k->cd : NAN,
				f->rho_g_kgm3, f->rho_l_kgm3);
	h->hr = k->hr;
	if (gas_kgs > 0.0)
		h->dp_pa = tray_total_dp_pa(h->hd, h->hl, h->hr, f->rho_l_kgm3);
	else
		h->dp_pa = 0.0;
}

/* Evaluates one tray at the given flows. Zero gas carries no pressure drop:
 * the tray then drains, so dry, liquid and residual heads are all zero. */
static void hydraulics(const struct section_geom *g, const struct fluid_state *f,
		       const struct tray_k *k, const struct areas *a, double gas_kgs,
		       double liq_kgs, struct hyd *h, struct fg_extrap *x)
{
	assert(gas_kgs >= 0.0);
	assert(liq_kgs >= 0.0);
	const struct tray_geom *t = &g->tray;
	double ql = liq_kgs / f->rho_l_kgm3;
	double qg = gas_kgs / f->rho_g_kgm3;
	double uh = qg / a->hole;

	h->jet_pct = jet_pct_at(g, f, k, a, gas_kgs, liq_kgs, x);
	h->how = tray_weir_crest_m(ql, t->weir_length_m);
	orifice_note(t->hole_area_frac, t->deck_thickness_m / t->hole_diameter_m, x);
	tray_dp(g, f, k, a, gas_kgs, liq_kgs, h);
	h->ht = h->dp_pa / (f->rho_l_kgm3 * TRAY_G_MS2);
	h->hdc = tray_apron_head_m(ql, fmin(a->apron, a->dc));
	h->hb = tray_dc_backup_m(t->weir_height_m, h->how, h->ht, h->hdc);
	h->dc_pct = 100.0 * h->hb / tray_dc_backup_limit_m(t->spacing_m, t->weir_height_m);
	h->weep_pct = weep_pct_at(g, f, uh, t->weir_height_m + h->how, x);
}

/* Gas mass flow, kg/s, giving 100 % jet flood at this liquid rate. Jet % is
 * near proportional to the gas rate, so doubling brackets the root quickly;
 * bisection then closes it to 1e-10 relative. NAN if no bracket is found. */
static double flood_gas_kgs(const struct section_geom *g, const struct fluid_state *f,
			    const struct tray_k *k, const struct areas *a, double liq_kgs)
{
	double lo = 0.0;
	double hi = f->rho_g_kgm3 * a->net * 0.05;
	int i;
	for (i = 0; i < 200 && !(jet_pct_at(g, f, k, a, hi, liq_kgs, NULL) >= 100.0); i++) {
		lo = hi;
		hi *= 2.0;
	}
	if (i == 200)
		return NAN;
	for (i = 0; i < 200 && hi - lo > 1e-10 * hi; i++) {
		double mid = 0.5 * (lo + hi);
		if (jet_pct_at(g, f, k, a, mid, liq_kgs, NULL) >= 100.0)
			hi = mid;
		else
			lo = mid;
	}
	return 0.5 * (lo + hi);
}

struct jet_ctx {
	const struct section_geom *g;
	const struct fluid_state *f;
	const struct tray_k *k;
	const struct areas *a;
	double liq_kgs;
};

static double jet_resid_ln(double ln_gas, const void *ctx)
{
	const struct jet_ctx *j = ctx;
	return jet_pct_at(j->g, j->f, j->k, j->a, exp(ln_gas), j->liq_kgs, NULL) - 100.0;
}

#define LN_GAS_LO (-27.631021115928547) /* ln 1e-12 */
#define LN_GAS_HI 27.631021115928547    /* ln 1e12 */

/*
 * Fair's flood gas rate by Newton's method on x = ln G, from *ln_gas
 * (updated on success). With jet % = 100 G / (rho_g A_net C_SB K) (K the
 * rest of the flood velocity, fixed at this liquid rate), the residual
 * ln(jet/100) = x - ln(rho_g A_net K) - ln C_SB has the derivative
 * 1 - d ln C_SB/dx, where C_SB = 0.0105 + T exp(-1.463 F^0.842) and the flow
 * parameter F falls as 1/G: d ln C_SB/dx = 1.463 * 0.842 F^0.842 (C_SB - 0.0105)/C_SB.
 * F^0.842 = exp(0.842 (ln(L s) - x)) with s = sqrt(rho_g/rho_l). Converged
 * by solve_newton_done to SOLVE_TOL_LN; false hands over to the bracketed
 * solve.
 */
static bool fair_flood_newton(const struct section_geom *g, const struct fluid_state *f,
			      const struct tray_k *k, const struct areas *a, double liq_kgs,
			      double *ln_gas)
{
	const struct tray_geom *t = &g->tray;
	double x = *ln_gas, prev = NAN;
	if (!isfinite(x) || !(liq_kgs > 0.0))
		return false;
	double hole_f = tray_hole_area_factor(t->hole_area_frac, NULL);
	double dens = sqrt((f->rho_l_kgm3 - f->rho_g_kgm3) / f->rho_g_kgm3);
	double ln_k = log(f->rho_g_kgm3 * a->net * k->sigma_f * hole_f *
			  section_capacity_factor(g) * dens);
	double ln_ls = log(liq_kgs * sqrt(f->rho_g_kgm3 / f->rho_l_kgm3));
	if (!isfinite(ln_k) || !isfinite(ln_ls))
		return false;
	for (int i = 0; i < SOLVE_NEWTON_STEPS; i++) {
		double fp = exp(0.842 * (ln_ls - x));
		double e = k->ts_term * exp(-1.463 * fp);
		double csb = 0.0105 + e;
		double step = (x - ln_k - log(csb)) / (1.0 - 1.231846 * fp * e / csb);
		x -= step;
		if (!isfinite(x) || x < LN_GAS_LO || x > LN_GAS_HI)
			return false;
		if (solve_newton_done(step, prev, SOLVE_TOL_LN)) {
			*ln_gas = x;
			return true;
		}
		prev = step;
	}
	return false;
}

/* flood_gas_kgs from the guess *ln_gas (updated), by Newton (Fair) or in
 * closed form (Kister-Haas: its C_SB does not depend on the gas rate, so
 * the flood gas rate is rho_g A_net u_flood), then solve.h's bracketed
 * Brent solve on ln G to 1e-12 relative; the cold doubling and bisection
 * when ln_gas is NULL or the guess brackets nothing. The first guess, when
 * there is no last answer, is the operating gas rate scaled to 100 % jet. */
static double flood_gas_kgs_w(const struct section_geom *g, const struct fluid_state *f,
			      const struct tray_k *k, const struct areas *a, double liq_kgs,
			      double *ln_gas, double *slope, double gas_at_100)
{
	if (ln_gas != NULL) {
		if (!isfinite(*ln_gas) && isfinite(gas_at_100) && gas_at_100 > 0.0)
			*ln_gas = log(gas_at_100);
		if (g->tray.flood_method == TRAY_FLOOD_KISTER_HAAS && isfinite(gas_at_100) &&
		    gas_at_100 > 0.0) {
			*ln_gas = log(gas_at_100);
			return gas_at_100;
		}
		if (g->tray.flood_method == TRAY_FLOOD_FAIR &&
		    fair_flood_newton(g, f, k, a, liq_kgs, ln_gas))
			return exp(*ln_gas);
		struct jet_ctx j = {.g = g, .f = f, .k = k, .a = a, .liq_kgs = liq_kgs};
		double root;
		/* The bounds are never reached from a guess (12 doubling steps
		 * from 1e-3 span a factor of e^8). */
		if (solve_secant(jet_resid_ln, &j, LN_GAS_LO, LN_GAS_HI, *ln_gas, slope, 1e-3,
				 SOLVE_TOL_LN, &root) ||
		    solve_near(jet_resid_ln, &j, LN_GAS_LO, LN_GAS_HI, true, *ln_gas, 1e-3,
			       SOLVE_TOL_LN, &root, NULL)) {
			*ln_gas = root;
			return exp(root);
		}
	}
	double gf = flood_gas_kgs(g, f, k, a, liq_kgs);
	if (ln_gas != NULL)
		*ln_gas = isfinite(gf) && gf > 0.0 ? log(gf) : NAN;
	return gf;
}

static bool inputs_ok(const struct section_geom *g, const struct fluid_state *f,
		      const struct section_point *p)
{
	bool ok = finite_pos(f->rho_g_kgm3) && isfinite(f->rho_l_kgm3);
	ok = ok && f->rho_l_kgm3 > f->rho_g_kgm3 && finite_pos(f->sigma_nm);
	ok = ok && finite_nonneg(p->gas_kgs) && finite_nonneg(p->liquid_kgs);
	return ok && geometry_ok(g);
}

static void kind_notes(const struct section_geom *g, struct fg_extrap *x)
{
	const struct tray_geom *t = &g->tray;
	if (t->kind == TRAY_VALVE)
		fg_extrap_note(x, WHY_VALVE);
	else if (t->kind == TRAY_BUBBLE_CAP)
		fg_extrap_note(x, WHY_CAP);
	if (t->flood_method == TRAY_FLOOD_FAIR) {
		if (t->weir_height_m > 0.15 * t->spacing_m)
			fg_extrap_note(x, WHY_FAIR_HW);
		if (t->hole_diameter_m > 0.0127)
			fg_extrap_note(x, WHY_FAIR_DH);
	}
}

static const enum result_field tray_fields[] = {
	RF_FLOOD_PCT, RF_JET_FLOOD_PCT, RF_DC_BACKUP_PCT, RF_WEEP_PCT, RF_CLEAR_LIQUID_M,
	RF_DP_MODEL_PA, RF_DP_FLOOD_PCT, RF_LIQUID_HOLDUP_M3,
	RF_LIQUID_HOLDUP_FRAC,
};

/* Every field this evaluator owns: NAN, and quality bad. */
static void mark_bad(struct section_result *r)
{
	for (size_t i = 0; i < sizeof tray_fields / sizeof tray_fields[0]; i++)
		r->v[tray_fields[i]] = NAN;
	r->basis = FLOOD_BASIS_NONE;
	fg_quality_raise(&r->quality, FG_QUALITY_BAD);
}

/* A field that claims a value must be finite; if a correlation still gave
 * a NaN (a case the checks above missed) the result is bad, not a NaN. */
static void check_finite(struct section_result *r)
{
	static const enum result_field must[] = {
		RF_FLOOD_PCT, RF_JET_FLOOD_PCT, RF_DC_BACKUP_PCT, RF_CLEAR_LIQUID_M,
		RF_DP_MODEL_PA, RF_LIQUID_HOLDUP_M3, RF_LIQUID_HOLDUP_FRAC,
	};
	for (size_t i = 0; i < sizeof must / sizeof must[0]; i++)
		if (!isfinite(r->v[must[i]])) {
			mark_bad(r);
			return;
		}
}

void tray_eval(const struct section_geom *g, const struct fluid_state *f,
	       const struct section_point *p, struct section_result *r)
{
	tray_eval_warm(g, f, p, r, NULL);
}

void tray_eval_warm(const struct section_geom *g, const struct fluid_state *f,
		    const struct section_point *p, struct section_result *r,
		    struct solve_warm *w)
{
	assert(g != NULL);
	assert(f != NULL);
	assert(p != NULL);
	assert(r != NULL);
	assert(g->type == SECTION_TRAY);
	if (!inputs_ok(g, f, p)) {
		mark_bad(r);
		return;
	}
	struct areas a = areas_of(g);
	struct tray_k k;
	tray_k_fill(g, f, w, &k);
	struct hyd h;
	kind_notes(g, &r->extrap);
	hydraulics(g, f, &k, &a, p->gas_kgs, p->liquid_kgs, &h, &r->extrap);

	double trays = (double)g->tray.trays;
	r->v[RF_JET_FLOOD_PCT] = h.jet_pct;
	r->v[RF_DC_BACKUP_PCT] = h.dc_pct;
	bool jet = h.jet_pct >= h.dc_pct;
	r->v[RF_FLOOD_PCT] = jet ? h.jet_pct : h.dc_pct;
	r->basis = jet ? FLOOD_BASIS_JET : FLOOD_BASIS_DOWNCOMER;
	r->v[RF_WEEP_PCT] = h.weep_pct;
	r->v[RF_CLEAR_LIQUID_M] = h.hl;
	r->v[RF_DP_MODEL_PA] = h.dp_pa * trays;
	r->dp_model_exponent = p->gas_kgs > 0.0 ? tray_dp_exponent(h.hd, h.hl, h.hr, h.alpha_e,
								     g->tray.weir_height_m)
						 : NAN;
	double per_tray = tray_liquid_per_tray_m3(h.hl, a.active, h.hb, a.dc);
	r->v[RF_LIQUID_HOLDUP_M3] = per_tray * trays;
	r->v[RF_LIQUID_HOLDUP_FRAC] = per_tray / (a.tower * g->tray.spacing_m);

	if (isfinite(p->dp_pa)) {
		/* The flood point is another operating point (more gas, a lower
		 * flow parameter): its range notes describe that point, not this
		 * one, so they go to a scratch record and are dropped. */
		struct hyd hf;
		double at_100 = p->gas_kgs * 100.0 / h.jet_pct;
		double gf = flood_gas_kgs_w(g, f, &k, &a, p->liquid_kgs,
					    w != NULL ? &w->tray_flood_ln_gas : NULL,
					    w != NULL ? &w->tray_flood_slope : NULL, at_100);
		if (isfinite(gf)) {
			tray_dp(g, f, &k, &a, gf, p->liquid_kgs, &hf);
			r->v[RF_DP_FLOOD_PCT] = 100.0 * (p->dp_pa / trays) / hf.dp_pa;
		}
	}
	if (h.jet_pct > 100.0)
		fg_extrap_note(&r->extrap, WHY_ABOVE_FLOOD);
	check_finite(r);
}

double tray_dp_model_pa(const struct section_geom *g, const struct fluid_state *f,
			const struct section_point *p, struct solve_warm *w)
{
	assert(g != NULL);
	assert(f != NULL);
	assert(p != NULL);
	assert(g->type == SECTION_TRAY);
	if (!inputs_ok(g, f, p))
		return NAN;
	struct areas a = areas_of(g);
	struct tray_k k;
	tray_k_fill(g, f, w, &k); /* from the cache the sample's evaluation filled */
	struct hyd h;
	/* tray_eval_warm notes this point's range; tray_dp makes no notes */
	tray_dp(g, f, &k, &a, p->gas_kgs, p->liquid_kgs, &h);
	double dp = h.dp_pa * (double)g->tray.trays;
	return isfinite(dp) ? dp : NAN;
}
