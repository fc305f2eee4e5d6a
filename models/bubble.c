/*
 * bubble.c - bubble-column hydraulics (see bubble.h for models and sources).
 *
 * bubble_eval prefers the holdup measured by the tap DP when it is in range:
 * it is this plant's own liquid, sparger and column. The correlation is the
 * fallback when the taps are absent, bad, or give an impossible DP.
 */
#include "bubble.h"

#include <assert.h>
#include <math.h>

#include "section.h"
#include "solve.h"

#define AY_BISECT_STEPS 60

/* Ranges, from memory of the papers (see bubble.h). */
#define AY_D_MIN_M 0.152
#define AY_D_MAX_M 0.6
#define AY_UG_MAX_MS 0.4
#define HM_D_MIN_M 0.1
#define HM_UG_MIN_MS 0.004
#define HM_UG_MAX_MS 0.45
#define HM_RHO_MIN 780.0
#define HM_RHO_MAX 1700.0
#define HM_SIGMA_MIN 0.025
#define HM_SIGMA_MAX 0.076
#define WSD_MU_MIN_PAS 0.3e-3
#define WSD_MU_MAX_PAS 25e-3

static bool positive(double v)
{
	return isfinite(v) && v > 0.0;
}

double bubble_holdup_dp_frac(double dp_pa, double dz_m, double rho_l_kgm3, double rho_g_kgm3,
			     bool *clamped, struct fg_extrap *x)
{
	if (clamped != NULL)
		*clamped = false;
	if (!isfinite(dp_pa) || !positive(dz_m) || !positive(rho_l_kgm3) ||
	    !isfinite(rho_g_kgm3) || rho_g_kgm3 < 0.0 || !(rho_l_kgm3 > rho_g_kgm3))
		return NAN;
	double eps = (rho_l_kgm3 - dp_pa / (BUBBLE_G_MS2 * dz_m)) / (rho_l_kgm3 - rho_g_kgm3);
	if (eps >= 0.0 && eps <= 1.0)
		return eps;
	/* A DP above the all-liquid head (friction, foam on the upper tap, a
	 * wrong tap spacing) or below the all-gas head (tap uncovered,
	 * plugged line) is no holdup at all. */
	fg_extrap_note(x, "bubble: tap DP outside the hydrostatic range, holdup clamped");
	if (clamped != NULL)
		*clamped = true;
	return eps < 0.0 ? 0.0 : 1.0;
}

static double ay_resid(double eps, const void *ctx)
{
	double rhs = *(const double *)ctx, om = 1.0 - eps;
	return eps - rhs * om * om * om * om;
}

/* Newton on eps - rhs (1 - eps)^4 from *guess (0 when it is not in [0, 1]),
 * *guess updated on success. The residual rises (slope 1 + 4 rhs (1-eps)^3)
 * and is concave, so a Newton step never passes the root from below, and
 * from above lands below it. Converged by solve_newton_done to 1e-15. */
static bool ay_newton(double rhs, double *guess)
{
	double x = isfinite(*guess) && *guess >= 0.0 && *guess <= 1.0 ? *guess : 0.0, prev = NAN;
	for (int i = 0; i < 2 * SOLVE_NEWTON_STEPS; i++) {
		double om = 1.0 - x, om3 = om * om * om;
		double step = (x - rhs * om3 * om) / (1.0 + 4.0 * rhs * om3);
		x -= step;
		if (!isfinite(x) || x < 0.0 || x > 1.0)
			return false;
		if (solve_newton_done(step, prev, 1e-15)) {
			*guess = x;
			return true;
		}
		prev = step;
	}
	return false;
}

double bubble_akita_yoshida_frac(double ug_ms, double d_m, double rho_l_kgm3, double mu_l_pas,
				 double sigma_nm, bool electrolyte, struct fg_extrap *x)
{
	return bubble_akita_yoshida_frac_warm(ug_ms, d_m, rho_l_kgm3, mu_l_pas, sigma_nm,
					      electrolyte, x, NULL);
}

double bubble_akita_yoshida_frac_warm(double ug_ms, double d_m, double rho_l_kgm3,
				      double mu_l_pas, double sigma_nm, bool electrolyte,
				      struct fg_extrap *x, double *guess)
{
	if (!isfinite(ug_ms) || ug_ms < 0.0 || !positive(d_m) || !positive(rho_l_kgm3) ||
	    !positive(mu_l_pas) || !positive(sigma_nm))
		return NAN;
	if (d_m < AY_D_MIN_M || d_m > AY_D_MAX_M)
		fg_extrap_note(x, "Akita-Yoshida: column diameter outside 0.152..0.6 m");
	if (ug_ms > AY_UG_MAX_MS)
		fg_extrap_note(x, "Akita-Yoshida: gas velocity above 0.4 m/s");
	if (ug_ms == 0.0)
		return 0.0;
	const double g = BUBBLE_G_MS2;
	double nu = mu_l_pas / rho_l_kgm3;
	double bond = g * d_m * d_m * rho_l_kgm3 / sigma_nm;
	double galileo = g * d_m * d_m * d_m / (nu * nu);
	double froude = ug_ms / sqrt(g * d_m);
	double c = electrolyte ? 0.25 : 0.20;
	double rhs = c * pow(bond, 1.0 / 8.0) * pow(galileo, 1.0 / 12.0) * froude;
	assert(rhs > 0.0);
	/* eps / (1 - eps)^4 rises from 0 to infinity on 0..1: one root. */
	double lo = 0.0;
	double hi = 1.0;
	double root;
	/* 1e-15 absolute: the cold 60-step bisection leaves 1e-18. */
	if (guess != NULL && ay_newton(rhs, guess))
		return *guess;
	if (guess != NULL &&
	    solve_near(ay_resid, &rhs, lo, hi, true, *guess, 1e-6, 1e-15, &root, NULL)) {
		*guess = root;
		return root;
	}
	for (int i = 0; i < AY_BISECT_STEPS; i++) {
		double mid = 0.5 * (lo + hi);
		double om = 1.0 - mid;
		if (mid < rhs * om * om * om * om)
			lo = mid;
		else
			hi = mid;
	}
	if (guess != NULL)
		*guess = 0.5 * (lo + hi);
	return 0.5 * (lo + hi);
}

double bubble_hughmark_frac(double ug_ms, double d_m, double rho_l_kgm3, double sigma_nm,
			    struct fg_extrap *x)
{
	if (!isfinite(ug_ms) || ug_ms < 0.0 || !positive(d_m) || !positive(rho_l_kgm3) ||
	    !positive(sigma_nm))
		return NAN;
	if (d_m < HM_D_MIN_M)
		fg_extrap_note(x, "Hughmark: column diameter below 0.1 m");
	if (ug_ms > 0.0 && (ug_ms < HM_UG_MIN_MS || ug_ms > HM_UG_MAX_MS))
		fg_extrap_note(x, "Hughmark: gas velocity outside 0.004..0.45 m/s");
	if (rho_l_kgm3 < HM_RHO_MIN || rho_l_kgm3 > HM_RHO_MAX)
		fg_extrap_note(x, "Hughmark: liquid density outside 780..1700 kg/m3");
	if (sigma_nm < HM_SIGMA_MIN || sigma_nm > HM_SIGMA_MAX)
		fg_extrap_note(x, "Hughmark: surface tension outside 25..76 mN/m");
	if (ug_ms == 0.0)
		return 0.0;
	double rho_gcm3 = rho_l_kgm3 * 1.0e-3;
	double sigma_dyncm = sigma_nm * 1.0e3;
	return 1.0 / (2.0 + 0.35 / ug_ms * cbrt(rho_gcm3 * sigma_dyncm / 72.0));
}

double bubble_wilkinson_small_bubble_ms(double rho_l_kgm3, double rho_g_kgm3, double mu_l_pas,
					double sigma_nm)
{
	if (!positive(rho_l_kgm3) || !positive(rho_g_kgm3) || !positive(mu_l_pas) ||
	    !positive(sigma_nm))
		return NAN;
	double mu2 = mu_l_pas * mu_l_pas;
	double group = sigma_nm * sigma_nm * sigma_nm * rho_l_kgm3 / (BUBBLE_G_MS2 * mu2 * mu2);
	return sigma_nm / mu_l_pas * 2.25 * pow(group, -0.273) * pow(rho_l_kgm3 / rho_g_kgm3, 0.03);
}

double bubble_wilkinson_transition_frac(double rho_g_kgm3, double mu_l_pas, double sigma_nm)
{
	if (!positive(rho_g_kgm3) || !positive(mu_l_pas) || !positive(sigma_nm))
		return NAN;
	return 0.5 * exp(-193.0 * pow(rho_g_kgm3, -0.61) * sqrt(mu_l_pas) * pow(sigma_nm, 0.11));
}

double bubble_wilkinson_transition_ms(double rho_l_kgm3, double rho_g_kgm3, double mu_l_pas,
				      double sigma_nm, struct fg_extrap *x)
{
	double ub = bubble_wilkinson_small_bubble_ms(rho_l_kgm3, rho_g_kgm3, mu_l_pas, sigma_nm);
	double et = bubble_wilkinson_transition_frac(rho_g_kgm3, mu_l_pas, sigma_nm);
	if (!isfinite(ub) || !isfinite(et))
		return NAN;
	if (mu_l_pas < WSD_MU_MIN_PAS || mu_l_pas > WSD_MU_MAX_PAS)
		fg_extrap_note(x, "Wilkinson: liquid viscosity outside 0.3..25 mPa s");
	return et * ub;
}

enum bubble_regime bubble_regime_at(double ug_ms, double u_trans_ms)
{
	if (!isfinite(ug_ms) || !isfinite(u_trans_ms))
		return BUBBLE_REGIME_NONE;
	return ug_ms < u_trans_ms ? BUBBLE_REGIME_HOMOGENEOUS : BUBBLE_REGIME_CHURN_TURBULENT;
}

double bubble_expanded_level_m(double h0_m, double eps)
{
	if (!isfinite(h0_m) || h0_m < 0.0 || !isfinite(eps) || eps < 0.0 || !(eps < 1.0))
		return NAN;
	return h0_m / (1.0 - eps);
}

static bool bubble_fluids_usable(const struct fluid_state *f)
{
	return positive(f->rho_g_kgm3) && positive(f->rho_l_kgm3) && positive(f->mu_l_pas) &&
	       positive(f->sigma_nm) && f->rho_l_kgm3 > f->rho_g_kgm3;
}

static double correlation_frac(const struct section_geom *g, const struct fluid_state *f,
			       double ug, struct fg_extrap *x, struct solve_warm *w)
{
	const struct bubble_geom *b = &g->bubble;
	if (b->holdup_method == BUBBLE_HOLDUP_HUGHMARK)
		return bubble_hughmark_frac(ug, g->diameter_m, f->rho_l_kgm3, f->sigma_nm, x);
	assert(b->holdup_method == BUBBLE_HOLDUP_AKITA_YOSHIDA);
	return bubble_akita_yoshida_frac_warm(ug, g->diameter_m, f->rho_l_kgm3, f->mu_l_pas,
					      f->sigma_nm, b->electrolyte, x,
					      w != NULL ? &w->bubble_ay_eps : NULL);
}

/* Tap holdup when the DP and the tap spacing are known and the DP is within
 * the hydrostatic range; NAN otherwise. *usable says whether to prefer it. */
static double tap_frac(const struct section_geom *g, const struct fluid_state *f,
		       const struct section_point *p, bool *usable, struct fg_extrap *x)
{
	*usable = false;
	if (!isfinite(p->dp_pa) || !positive(g->bubble.tap_spacing_m))
		return NAN;
	bool clamped = false;
	double eps = bubble_holdup_dp_frac(p->dp_pa, g->bubble.tap_spacing_m, f->rho_l_kgm3,
					   f->rho_g_kgm3, &clamped, x);
	*usable = isfinite(eps) && !clamped;
	return eps;
}

void bubble_eval(const struct section_geom *g, const struct fluid_state *f,
		 const struct section_point *p, struct section_result *r)
{
	bubble_eval_warm(g, f, p, r, NULL);
}

void bubble_eval_warm(const struct section_geom *g, const struct fluid_state *f,
		      const struct section_point *p, struct section_result *r,
		      struct solve_warm *w)
{
	assert(g != NULL);
	assert(f != NULL);
	assert(p != NULL);
	assert(r != NULL);
	double ug = r->v[RF_GAS_VELOCITY];
	if (!bubble_fluids_usable(f) || !positive(g->diameter_m) || !isfinite(ug) || ug < 0.0) {
		fg_quality_raise(&r->quality, FG_QUALITY_BAD);
		return;
	}
	double eps_corr = correlation_frac(g, f, ug, &r->extrap, w);
	r->v[RF_GAS_HOLDUP_FRAC] = eps_corr;
	bool tap_ok = false;
	double eps_tap = tap_frac(g, f, p, &tap_ok, &r->extrap);
	r->v[RF_GAS_HOLDUP_DP_FRAC] = eps_tap;
	if (isfinite(eps_tap) && !tap_ok)
		fg_quality_raise(&r->quality, FG_QUALITY_UNCERTAIN);
	double eps = tap_ok ? eps_tap : eps_corr;

	double u_trans = bubble_wilkinson_transition_ms(f->rho_l_kgm3, f->rho_g_kgm3,
							f->mu_l_pas, f->sigma_nm, &r->extrap);
	r->regime = bubble_regime_at(ug, u_trans);

	double h0 = isfinite(p->level_m) ? p->level_m : g->bubble.clear_liquid_height_m;
	double area_m2 = section_area_m2(g);
	double level = bubble_expanded_level_m(h0, eps);
	r->v[RF_EXPANDED_LEVEL_M] = level;
	if (isfinite(eps) && eps <= 1.0)
		r->v[RF_LIQUID_HOLDUP_FRAC] = 1.0 - eps;
	if (isfinite(h0) && h0 >= 0.0)
		r->v[RF_LIQUID_HOLDUP_M3] = h0 * area_m2;
	r->basis = FLOOD_BASIS_LEVEL_SWELL;
	if (!isfinite(level) || !positive(g->bubble.overflow_height_m)) {
		/* No clear height, no overflow height, or a holdup of 1: the
		 * carryover margin, this type's flood basis, is unknown. */
		fg_quality_raise(&r->quality, FG_QUALITY_BAD);
		return;
	}
	r->v[RF_FLOOD_PCT] = 100.0 * level / g->bubble.overflow_height_m;
	r->v[RF_CARRYOVER_MARGIN_M] = g->bubble.overflow_height_m - level;
}
