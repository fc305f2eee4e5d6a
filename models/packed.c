/*
 * packed.c - packed-bed hydraulics: Stichlmair-Bravo-Fair, Billet-Schultes,
 * Kister-Gill and Robbins, and the section evaluator packed_eval().
 *
 * How the Stichlmair model is solved. With y the irrigated DP per metre and
 * t = (y / (rho_l g))^2, the model is the fixed point
 *     y = D * Phi(h_T),   h_T = h0 (1 + 20 t)
 * where D is the dry DP per metre. Phi grows without bound as h_T -> epsilon,
 * so below flooding the equation has two roots (the lower one is the
 * operating point) and above flooding none. Flooding is where the two roots
 * meet: the paper's d(dP)/d(holdup) condition, which in t reads
 *     1/t = 40 ((2+c)/3) h0/(1 - eps + h_T) + 186 h0/(eps - h_T).
 * We solve that condition for t_f by bisection (it is +inf at t -> 0 and
 * -inf as h_T -> eps, so the bracket always holds), then:
 *   - irrigated DP: if y_f = rho_l g sqrt(t_f) satisfies y_f >= D Phi, the
 *     lower root lies in [D, y_f] and is found by bisection; otherwise the
 *     gas rate is above flooding and there is no steady value (NAN);
 *   - flood velocity: bisection on ln u_g of the residual at t_f, which rises
 *     with u_g because D does.
 * Every loop has a fixed iteration cap; nothing allocates.
 *
 * The *_warm variants solve the same equations from the last sample's
 * answers (struct solve_warm, see solve.h): a bracket found near the guess
 * and closed by Brent's method, on ln t, ln y and ln u to 1e-12 relative,
 * and the cold bisections above whenever the guess brackets nothing. They
 * agree with the cold functions to 1e-9 relative (tests/unit/test_warm.c).
 */
#include "packed.h"

#include <assert.h>
#include <math.h>
#include <stddef.h>

#include "solve.h"

#ifndef M_LN10
#define M_LN10 2.30258509299404568402
#endif

#define BISECT_MAX 200          /* hard cap; intervals collapse well before */
#define FLOOD_U_LO_MS 1e-6      /* search range of the flood solve, m/s */
#define FLOOD_U_HI_MS 1e3
#define BS_PHI_SWITCH 0.4       /* Billet-Schultes branch at this flow parameter */
#define LB_PER_KG 2.2046226218487757
#define FT_M 0.3048

static bool pos_finite(double v)
{
	return isfinite(v) && v > 0.0;
}

static bool nonneg_finite(double v)
{
	return isfinite(v) && v >= 0.0;
}

static bool has_geometry(const struct packing_constants *c)
{
	return pos_finite(c->area_m2m3) && isfinite(c->void_frac) && c->void_frac > 0.0 &&
	       c->void_frac < 1.0;
}

static bool has_stichlmair(const struct packing_constants *c)
{
	return has_geometry(c) && isfinite(c->stichlmair_c1) && isfinite(c->stichlmair_c2) &&
	       isfinite(c->stichlmair_c3);
}

static bool fluids_ok(const struct fluid_state *f)
{
	return pos_finite(f->rho_g_kgm3) && pos_finite(f->rho_l_kgm3) &&
	       f->rho_l_kgm3 > f->rho_g_kgm3 && pos_finite(f->mu_g_pas) && pos_finite(f->mu_l_pas);
}

/* ---- Stichlmair, Bravo & Fair (1989) ------------------------------------ */

/* Source: Stichlmair, Bravo & Fair (1989), Gas Sep. Purif. 3(1) 19-28, the
 * dry DP (eqs. 1-3), h0, the irrigated DP with the loading enhancement of
 * the holdup, and the flooding condition. The irrigated form is the one that
 * reproduces the paper's worked example (as python3-fluids also notes,
 * after Piche et al. 2001). Units SI. Validity: the packings and constants
 * of the paper's Table 1, gas loads from zero up to the flood point, the
 * systems of its data base (air/water and distillation, from memory).
 * Outside: no steady solution above flooding (NAN, noted); non-physical
 * constants (f0 <= 0) NAN, noted. */

/* What the Stichlmair equations need at one gas and liquid rate. */
struct stich {
	double eps;      /* void fraction */
	double dry_pam;  /* dry DP per metre, Pa/m */
	double p;        /* (2 + c)/3, c = d ln f0 / d ln Re */
	double h0;       /* holdup without gas effect */
	double rlg;      /* rho_l g, Pa/m */
	double ln_d_rlg; /* ln(dry_pam / rlg): the residual's constant part */
};

/* Dry-bed friction: equivalent particle diameter d_p = 6 (1 - eps)/a,
 * Re = u rho_g d_p / mu_g, f0 = C1/Re + C2/Re^0.5 + C3, and
 * dP/H = 3/4 f0 (1 - eps)/eps^4.65 rho_g u^2 / d_p (eqs. 1-3 of the paper).
 * c is the local exponent of f0 in Re, used by the irrigated model. */
static void stich_dry(const struct packing_constants *c, double u, double rho_g, double mu_g,
		      double *dry_pam, double *c_exp)
{
	assert(u > 0.0);
	double eps = c->void_frac;
	double dp = 6.0 * (1.0 - eps) / c->area_m2m3;
	double re = u * rho_g * dp / mu_g;
	double sre = sqrt(re);
	double f0 = c->stichlmair_c1 / re + c->stichlmair_c2 / sre + c->stichlmair_c3;
	*dry_pam = 0.75 * f0 * (1.0 - eps) / pow(eps, 4.65) * rho_g * u * u / dp;
	*c_exp = (-c->stichlmair_c1 / re - 0.5 * c->stichlmair_c2 / sre) / f0;
}

double packed_stichlmair_dry_pam(const struct packing_constants *c, double u_g_ms,
				 double rho_g_kgm3, double mu_g_pas, struct fg_extrap *x)
{
	assert(c != NULL);
	if (!nonneg_finite(u_g_ms) || !pos_finite(rho_g_kgm3) || !pos_finite(mu_g_pas))
		return NAN;
	if (!has_stichlmair(c)) {
		fg_extrap_note(x, "stichlmair: packing constants C1..C3, a or epsilon missing");
		return NAN;
	}
	if (u_g_ms == 0.0)
		return 0.0;
	double dry, ce;
	stich_dry(c, u_g_ms, rho_g_kgm3, mu_g_pas, &dry, &ce);
	if (!(dry > 0.0)) {
		/* Negative constants can make f0 <= 0: no physical friction. */
		fg_extrap_note(x, "stichlmair: friction factor not positive at this Re");
		return NAN;
	}
	return dry;
}

/* h0 = 0.555 Fr_L^(1/3), Fr_L = u_l^2 a / (g eps^4.65) (Stichlmair et al.
 * 1989, liquid holdup below the loading point). */
double packed_stichlmair_h0(const struct packing_constants *c, double u_l_ms)
{
	assert(c != NULL);
	if (!nonneg_finite(u_l_ms) || !has_geometry(c))
		return NAN;
	double fr = u_l_ms * u_l_ms * c->area_m2m3 / (PACKED_G_MS2 * pow(c->void_frac, 4.65));
	return 0.555 * cbrt(fr);
}

static double stich_ht(const struct stich *s, double t)
{
	return s->h0 * (1.0 + 20.0 * t);
}

/* ln(D Phi(h_T(t))) - ln y(t), y = rho_l g sqrt(t), with ln t given too
 * (the warm solves work on logarithms and have it): zero on the model,
 * negative between the roots. */
static double stich_resid_ln(const struct stich *s, double t, double ln_t)
{
	double ht = stich_ht(s, t);
	if (ht >= s->eps)
		return INFINITY;
	double eps = s->eps;
	return s->ln_d_rlg + s->p * log((1.0 - eps + ht) / (1.0 - eps)) +
	       4.65 * log(eps / (eps - ht)) - 0.5 * ln_t;
}

static double stich_resid(const struct stich *s, double t)
{
	return stich_resid_ln(s, t, log(t));
}

/* The flooding condition of the paper (d(dP)/d(h_T) infinite), as a
 * function of t; positive below the tangency point. */
static double stich_flood_cond(const struct stich *s, double t)
{
	double ht = stich_ht(s, t);
	if (ht >= s->eps)
		return -INFINITY;
	return 1.0 / t - 40.0 * s->p * s->h0 / (1.0 - s->eps + ht) -
	       186.0 * s->h0 / (s->eps - ht);
}

/* t at which the flooding condition holds, by bisection on ln t over
 * (t_lim 1e-15, t_lim), t_lim being where h_T reaches epsilon. */
static double stich_flood_t(const struct stich *s)
{
	assert(s->h0 > 0.0);
	assert(s->h0 < s->eps);
	double t_lim = (s->eps / s->h0 - 1.0) / 20.0;
	double lo = t_lim * 1e-15, hi = t_lim;
	for (int i = 0; i < BISECT_MAX && hi > lo * (1.0 + 1e-15); i++) {
		double mid = sqrt(lo * hi);
		if (stich_flood_cond(s, mid) > 0.0)
			lo = mid;
		else
			hi = mid;
	}
	return sqrt(lo * hi);
}

static double flood_cond_ln(double ln_t, const void *ctx)
{
	return stich_flood_cond(ctx, exp(ln_t));
}

/* Newton's method on ln t for the flooding condition, from *ln_t, with its
 * derivative in closed form (d/dt of each term of stich_flood_cond; h_T
 * rises as 20 h0 t). Converged when a step is below SOLVE_TOL_LN; gives up
 * (false, *ln_t untouched) after 6 steps or on leaving h_T < epsilon: the
 * bracketed solve takes over. From the last sample's answer it needs two
 * or three steps, where a bracket costs six to ten evaluations. */
static bool flood_t_newton(const struct stich *s, double *ln_t)
{
	double y = *ln_t;
	if (!isfinite(y))
		return false;
	double h0 = s->h0;
	for (int i = 0; i < 6; i++) {
		double t = exp(y), ht = stich_ht(s, t);
		if (!(ht < s->eps))
			return false;
		double a = 1.0 - s->eps + ht, b = s->eps - ht;
		double g = 1.0 / t - 40.0 * s->p * h0 / a - 186.0 * h0 / b;
		double dg_dt = -1.0 / (t * t) + 800.0 * s->p * h0 * h0 / (a * a) -
			       3720.0 * h0 * h0 / (b * b);
		double step = g / (dg_dt * t);
		if (!isfinite(step))
			return false;
		y -= step;
		if (fabs(step) <= SOLVE_TOL_LN) {
			*ln_t = y;
			return true;
		}
	}
	return false;
}

/*
 * The flooding condition in closed form. With A = 1 - eps + h0, B = eps - h0
 * and k = 20 h0 (so h_T = h0 + k t), multiplying the condition by
 * t (A + k t)(B - k t) > 0 leaves the quadratic
 *     Q(t) = A B + [k (B - A) - 40 p h0 B - 186 h0 A] t + k h0 (40 p - 206) t^2,
 * which has the sign of the condition on (0, t_lim): Q(0) = A B > 0 and
 * Q(t_lim) < 0, so exactly one root lies there and it is t_f. For p < 5.15
 * (always: p = (2 + c)/3 and c = d ln f0/d ln Re lies in [-1, 0] for
 * positive C1..C3) the t^2 term is negative and the root is the positive one,
 * taken in the form that does not cancel. Returns NAN when the root is not
 * inside (0, t_lim) (odd constants): the caller then solves by bracketing.
 */
static double stich_flood_t_closed(double p, double h0, double eps)
{
	double a = 1.0 - eps + h0, b = eps - h0, k = 20.0 * h0;
	double c0 = a * b;
	double c1 = k * (b - a) - 40.0 * p * h0 * b - 186.0 * h0 * a;
	double c2 = k * h0 * (40.0 * p - 206.0);
	if (!(c2 < 0.0) || !(c0 > 0.0))
		return NAN;
	double sq = sqrt(c1 * c1 - 4.0 * c0 * c2);
	double t = c1 <= 0.0 ? 2.0 * c0 / (sq - c1) : (c1 + sq) / (-2.0 * c2);
	double t_lim = b / k;
	return t > 0.0 && t < t_lim ? t : NAN;
}

/* stich_flood_t from the guess *ln_t (updated); cold when ln_t is NULL. */
static double stich_flood_t_w(const struct stich *s, double *ln_t)
{
	if (ln_t == NULL)
		return stich_flood_t(s);
	double tc = stich_flood_t_closed(s->p, s->h0, s->eps);
	if (isfinite(tc)) {
		*ln_t = log(tc);
		return tc;
	}
	if (flood_t_newton(s, ln_t))
		return exp(*ln_t);
	double t_lim = (s->eps / s->h0 - 1.0) / 20.0;
	double lo = log(t_lim * 1e-15), hi = log(t_lim);
	double root;
	if (solve_near(flood_cond_ln, s, lo, hi, false, *ln_t, 1e-4, SOLVE_TOL_LN, &root, NULL)) {
		*ln_t = root;
		return exp(root);
	}
	double t = stich_flood_t(s);
	*ln_t = log(t);
	return t;
}

/* ---- Stichlmair: the per-sample solves by Newton's method ---------------
 *
 * The warm path solves both Stichlmair problems by Newton's method with
 * derivatives in closed form, from the last sample's answer, and hands over
 * to the bracketed solves above when a step leaves the range, a value is
 * not finite or SOLVE_NEWTON_STEPS pass without convergence:
 *   - the flood point, on x = ln u_g: R(x) = F(x, t_f(x)) with F the
 *     residual ln(D Phi) - ln y and t_f its flooding condition (closed
 *     form). The flooding condition is dF/dt = 0, so dR/dx = dF/dx at fixed
 *     t: c + 2 + (dp/dx) ln((1 - eps + h_T)/(1 - eps)), with
 *     dc/dx = (C1/Re + C2/(4 sqrt Re))/f0 - c^2 and p = (2 + c)/3;
 *   - the irrigated DP at the operating gas rate, on s = ln t, by Halley's
 *     variant (cubic; solve_halley_done):
 *     dF/ds = t (20 p h0/(1 - eps + h_T) + 93 h0/(eps - h_T)) - 1/2, which is
 *     negative below t_f; a root is accepted only below t_f (the lower root,
 *     the operating point), which also says the gas is below flooding.
 * Converged by solve_newton_done to SOLVE_TOL_LN (1e-12 relative in u or t).
 */

/* What stays fixed while u_g or t is iterated. */
struct stich_fast {
	double eps, h0, c1, c2, c3;
	double k_re;      /* Re per m/s: rho_g d_p / mu_g */
	double ln_kd_rlg; /* ln(K_D/(rho_l g)), the dry DP being K_D f0 u^2 */
	double ln_1me;    /* ln(1 - eps) */
	double ln_eps;    /* ln eps */
};

/* The constants of the solves at this packing, liquid rate and fluid: from
 * w's cache when every input is bitwise the same as last time (the flood
 * and the DP solve of one sample share them; a packed bed whose liquid rate
 * and fluids hold still shares them across samples). */
static bool stich_fast_setup(struct stich_fast *k, const struct packing_constants *c,
			     double u_l, const struct fluid_state *f, struct solve_warm *w)
{
	/* eps^4.65, ln(1 - eps), ln eps and d_p depend on the packing alone
	 * and hit every sample; the rest follows the liquid rate and gas. */
	double gkey[2] = {c->void_frac, c->area_m2m3};
	double *gv = w->stich_geo.val;
	if (!solve_memo_hit(&w->stich_geo, gkey, 2)) {
		gv[0] = pow(c->void_frac, 4.65);
		gv[1] = log(1.0 - c->void_frac);
		gv[2] = log(c->void_frac);
		gv[3] = 6.0 * (1.0 - c->void_frac) / c->area_m2m3;
	}
	double key[9] = {c->void_frac, c->area_m2m3, c->stichlmair_c1, c->stichlmair_c2,
			 c->stichlmair_c3, u_l, f->rho_g_kgm3, f->mu_g_pas, f->rho_l_kgm3};
	double *v = w->stich.val;
	if (!solve_memo_hit(&w->stich, key, 9)) {
		double eps = c->void_frac, e465 = gv[0], dp = gv[3];
		double fr = u_l * u_l * c->area_m2m3 / (PACKED_G_MS2 * e465);
		v[0] = 0.555 * cbrt(fr);
		v[1] = f->rho_g_kgm3 * dp / f->mu_g_pas;
		v[2] = log(0.75 * (1.0 - eps) / e465 * f->rho_g_kgm3 / dp /
			   (f->rho_l_kgm3 * PACKED_G_MS2));
		v[3] = gv[1];
		v[4] = gv[2];
	}
	k->eps = c->void_frac;
	k->c1 = c->stichlmair_c1;
	k->c2 = c->stichlmair_c2;
	k->c3 = c->stichlmair_c3;
	k->h0 = v[0];
	k->k_re = v[1];
	k->ln_kd_rlg = v[2];
	k->ln_1me = v[3];
	k->ln_eps = v[4];
	return k->h0 > 0.0 && k->h0 < k->eps;
}

/* The same constants computed afresh (the cold path's exponent). */
static bool stich_fast_fill(struct stich_fast *k, const struct packing_constants *c, double u_l,
			    const struct fluid_state *f)
{
	double eps = c->void_frac, e465 = pow(eps, 4.65);
	double dp = 6.0 * (1.0 - eps) / c->area_m2m3;
	double fr = u_l * u_l * c->area_m2m3 / (PACKED_G_MS2 * e465);
	k->eps = eps;
	k->c1 = c->stichlmair_c1;
	k->c2 = c->stichlmair_c2;
	k->c3 = c->stichlmair_c3;
	k->h0 = 0.555 * cbrt(fr);
	k->k_re = f->rho_g_kgm3 * dp / f->mu_g_pas;
	k->ln_kd_rlg = log(0.75 * (1.0 - eps) / e465 * f->rho_g_kgm3 / dp /
			   (f->rho_l_kgm3 * PACKED_G_MS2));
	k->ln_1me = log(1.0 - eps);
	k->ln_eps = log(eps);
	return k->h0 < k->eps;
}

/* The dry-bed terms at u = exp(x): f0, c and dc/dx. False when f0 <= 0. */
static bool fast_dry(const struct stich_fast *k, double x, double *f0, double *ce, double *dce)
{
	double re = exp(x) * k->k_re, sre = sqrt(re);
	double a = k->c1 / re, b = k->c2 / sre;
	*f0 = a + b + k->c3;
	if (!(*f0 > 0.0))
		return false;
	*ce = (-a - 0.5 * b) / *f0;
	*dce = (a + 0.25 * b) / *f0 - *ce * *ce;
	return true;
}

/* Newton on ln u_g for the flood point, from *ln_u (updated on success). */
static bool fast_flood_newton(const struct stich_fast *k, double *ln_u)
{
	double x = *ln_u, prev = NAN;
	if (!isfinite(x))
		return false;
	for (int i = 0; i < SOLVE_NEWTON_STEPS; i++) {
		double f0, ce, dce;
		if (!fast_dry(k, x, &f0, &ce, &dce))
			return false;
		double p = (2.0 + ce) / 3.0;
		double t = stich_flood_t_closed(p, k->h0, k->eps);
		if (!isfinite(t))
			return false;
		double ht = k->h0 * (1.0 + 20.0 * t);
		double l1 = log(1.0 - k->eps + ht) - k->ln_1me;
		double r = k->ln_kd_rlg + log(f0 / sqrt(t)) + 2.0 * x + p * l1 +
			   4.65 * (k->ln_eps - log(k->eps - ht));
		double step = r / (ce + 2.0 + dce / 3.0 * l1);
		x -= step;
		if (!isfinite(x) || x < log(FLOOD_U_LO_MS) || x > log(FLOOD_U_HI_MS))
			return false;
		if (solve_newton_done(step, prev, SOLVE_TOL_LN)) {
			*ln_u = x;
			return true;
		}
		prev = step;
	}
	return false;
}

/*
 * d ln DP / d ln u_g of the irrigated DP at ln u_g = x, where the lower root
 * is t (DP = rho_l g sqrt(t)), at fixed liquid rate and fluids: implicit
 * differentiation of the residual fast_wet_newton solves,
 *   F(s, x) = ln(K_D/(rho_l g)) + ln f0 + 2x + p ln((1 - eps + h_T)/(1 - eps))
 *             + 4.65 ln(eps/(eps - h_T)) - s/2 = 0,   s = ln t,
 * with p = (2 + c)/3 and c = d ln f0 / d ln Re (so dp/dx = (dc/dx)/3), h_T
 * a function of s alone: ds/dx = -F_x / F_s, and the exponent is
 * (1/2) ds/dx. With no liquid it is the dry bed's 2 + c. NAN when the dry
 * terms are not usable or the point is a turning point (F_s = 0: flood).
 */
static double wet_exponent_at(const struct stich_fast *k, double ce, double dce, double t)
{
	double p = (2.0 + ce) / 3.0;
	double ht = k->h0 * (1.0 + 20.0 * t);
	double a = 1.0 - k->eps + ht, b = k->eps - ht;
	double f_s = t * (20.0 * p * k->h0 / a + 93.0 * k->h0 / b) - 0.5;
	double f_x = ce + 2.0 + dce / 3.0 * (log(a) - k->ln_1me);
	double n = f_s < 0.0 ? -0.5 * f_x / f_s : NAN;
	return isfinite(n) ? n : NAN;
}

static double fast_wet_exponent(const struct stich_fast *k, double x, double t)
{
	double f0, ce, dce;
	if (!fast_dry(k, x, &f0, &ce, &dce))
		return NAN;
	return wet_exponent_at(k, ce, dce, t);
}

/* Newton on ln t for the lower root at ln u_g = x, from *ln_t (updated on
 * success), below the flood t_f. *t_out gets t. */
static bool fast_wet_newton(const struct stich_fast *k, double x, double *ln_t, double *t_out,
			    double *exponent)
{
	double s = *ln_t, prev = NAN;
	if (!isfinite(s))
		return false;
	double f0, ce, dce;
	if (!fast_dry(k, x, &f0, &ce, &dce))
		return false;
	double p = (2.0 + ce) / 3.0;
	double t_f = stich_flood_t_closed(p, k->h0, k->eps);
	if (!isfinite(t_f))
		return false;
	double base = k->ln_kd_rlg + log(f0) + 2.0 * x - p * k->ln_1me + 4.65 * k->ln_eps;
	for (int i = 0; i < SOLVE_NEWTON_STEPS; i++) {
		double t = exp(s);
		if (!(t < t_f))
			return false;
		double ht = k->h0 * (1.0 + 20.0 * t);
		double a = 1.0 - k->eps + ht, b = k->eps - ht;
		double r = base + p * log(a) - 4.65 * log(b) - 0.5 * s;
		double q = 20.0 * p * k->h0 / a + 93.0 * k->h0 / b;
		double d = t * q - 0.5;
		/* Halley's correction with F'' = t q + t^2 dq/dt (cubic
		 * convergence: one evaluation fewer from a warm start). */
		double dq = 20.0 * k->h0 * k->h0 * (93.0 / (b * b) - 20.0 * p / (a * a));
		double d2 = t * q + t * t * dq;
		double step = r / d / (1.0 - 0.5 * r * d2 / (d * d));
		s -= step;
		if (!isfinite(s))
			return false;
		if (solve_halley_done(step, prev, SOLVE_TOL_LN)) {
			t = exp(s);
			if (!(t < t_f))
				return false;
			*ln_t = s;
			*t_out = t;
			if (exponent != NULL) /* the dry terms at this x, from above */
				*exponent = wet_exponent_at(k, ce, dce, t);
			return true;
		}
		prev = step;
	}
	return false;
}

static bool stich_setup(struct stich *s, const struct packing_constants *c, double u_g,
			double u_l, const struct fluid_state *f)
{
	assert(u_g > 0.0);
	double ce;
	stich_dry(c, u_g, f->rho_g_kgm3, f->mu_g_pas, &s->dry_pam, &ce);
	s->eps = c->void_frac;
	s->p = (2.0 + ce) / 3.0;
	s->h0 = packed_stichlmair_h0(c, u_l);
	s->rlg = f->rho_l_kgm3 * PACKED_G_MS2;
	s->ln_d_rlg = log(s->dry_pam / s->rlg);
	return s->dry_pam > 0.0 && s->h0 < s->eps;
}

static double wet_resid_ln(double ln_y, const void *ctx)
{
	const struct stich *s = ctx;
	double ln_t = 2.0 * (ln_y - log(s->rlg));
	return stich_resid_ln(s, exp(ln_t), ln_t);
}

/* The lower root in y between the dry DP (residual >= 0) and y_f (<= 0). */
static double stich_wet_root(const struct stich *s, double t_f, struct solve_warm *w)
{
	double lo = s->dry_pam, hi = s->rlg * sqrt(t_f);
	double root;
	if (w != NULL && solve_near(wet_resid_ln, s, log(lo), log(hi), false, w->stich_wet_ln_y,
				    1e-4, SOLVE_TOL_LN, &root, NULL)) {
		w->stich_wet_ln_y = root;
		return exp(root);
	}
	for (int i = 0; i < BISECT_MAX && hi - lo > 1e-15 * hi; i++) {
		double mid = 0.5 * (lo + hi);
		double t = (mid / s->rlg) * (mid / s->rlg);
		if (stich_resid(s, t) > 0.0)
			lo = mid;
		else
			hi = mid;
	}
	double y = 0.5 * (lo + hi);
	if (w != NULL)
		w->stich_wet_ln_y = log(y);
	return y;
}

static double wet_pam(const struct packing_constants *c, double u_g_ms, double u_l_ms,
		      const struct fluid_state *f, double *holdup, double *exponent,
		      struct fg_extrap *x, struct solve_warm *w);

double packed_stichlmair_wet_pam(const struct packing_constants *c, double u_g_ms,
				 double u_l_ms, const struct fluid_state *f, double *holdup,
				 struct fg_extrap *x)
{
	return packed_stichlmair_wet_pam_warm(c, u_g_ms, u_l_ms, f, holdup, x, NULL);
}

double packed_stichlmair_wet_pam_warm(const struct packing_constants *c, double u_g_ms,
				      double u_l_ms, const struct fluid_state *f, double *holdup,
				      struct fg_extrap *x, struct solve_warm *w)
{
	return packed_stichlmair_wet_pam_n(c, u_g_ms, u_l_ms, f, holdup, NULL, x, w);
}

/* The exponent of the cold path's answer y (DP, Pa/m), from constants
 * computed afresh. */
static double cold_exponent(const struct packing_constants *c, double u_g, double u_l,
			    const struct fluid_state *f, double y)
{
	struct stich_fast k;
	double rlg = f->rho_l_kgm3 * PACKED_G_MS2;
	if (!(u_g > 0.0) || !(y > 0.0) || !stich_fast_fill(&k, c, u_l, f))
		return NAN;
	return fast_wet_exponent(&k, log(u_g), (y / rlg) * (y / rlg));
}

double packed_stichlmair_wet_pam_n(const struct packing_constants *c, double u_g_ms,
				   double u_l_ms, const struct fluid_state *f, double *holdup,
				   double *exponent, struct fg_extrap *x, struct solve_warm *w)
{
	assert(c != NULL);
	assert(f != NULL);
	if (holdup != NULL)
		*holdup = NAN;
	if (exponent != NULL)
		*exponent = NAN;
	double y = wet_pam(c, u_g_ms, u_l_ms, f, holdup, exponent, x, w);
	if (exponent != NULL && isnan(*exponent) && isfinite(y))
		*exponent = cold_exponent(c, u_g_ms, u_l_ms, f, y);
	return y;
}

/* packed_stichlmair_wet_pam_n's solve; *exponent is set on the warm path
 * only (the caller works it out from the answer otherwise). */
static double wet_pam(const struct packing_constants *c, double u_g_ms, double u_l_ms,
		      const struct fluid_state *f, double *holdup, double *exponent,
		      struct fg_extrap *x, struct solve_warm *w)
{
	if (!nonneg_finite(u_g_ms) || !nonneg_finite(u_l_ms) || !fluids_ok(f))
		return NAN;
	if (!has_stichlmair(c)) {
		fg_extrap_note(x, "stichlmair: packing constants C1..C3, a or epsilon missing");
		return NAN;
	}
	if (w != NULL && isfinite(w->stich_wet_ln_y) && u_g_ms > 0.0 && u_l_ms > 0.0) {
		struct stich_fast k;
		double rlg = f->rho_l_kgm3 * PACKED_G_MS2, ln_rlg = log(rlg);
		double ln_t = 2.0 * (w->stich_wet_ln_y - ln_rlg), t;
		double ln_u = log(u_g_ms);
		if (stich_fast_setup(&k, c, u_l_ms, f, w) &&
		    fast_wet_newton(&k, ln_u, &ln_t, &t, exponent)) {
			w->stich_wet_ln_y = ln_rlg + 0.5 * ln_t;
			if (holdup != NULL)
				*holdup = k.h0 * (1.0 + 20.0 * t);
			return rlg * sqrt(t);
		}
	}
	double h0 = packed_stichlmair_h0(c, u_l_ms);
	if (u_g_ms == 0.0 || h0 == 0.0) {
		/* No gas: no DP and no gas effect on the holdup. No liquid: dry bed. */
		if (holdup != NULL)
			*holdup = h0;
		return packed_stichlmair_dry_pam(c, u_g_ms, f->rho_g_kgm3, f->mu_g_pas, x);
	}
	struct stich s;
	if (!stich_setup(&s, c, u_g_ms, u_l_ms, f)) {
		fg_extrap_note(x, "stichlmair: liquid holdup fills the voids or f0 <= 0");
		return NAN;
	}
	double t_f = stich_flood_t_w(&s, w != NULL ? &w->stich_wet_ln_t : NULL);
	if (stich_resid(&s, t_f) > 0.0) {
		fg_extrap_note(x, "stichlmair: gas above the flood point, no steady irrigated DP");
		return NAN;
	}
	double y = stich_wet_root(&s, t_f, w);
	if (holdup != NULL)
		*holdup = stich_ht(&s, (y / s.rlg) * (y / s.rlg));
	return y;
}

/* What the outer flood solve needs: the residual at the flood condition as
 * a function of ln u_g, the inner solve warm-started from the last one. */
struct flood_ctx {
	const struct packing_constants *c;
	const struct fluid_state *f;
	double u_l;
	double *ln_t;
};

static double flood_resid_ln(double ln_u, const void *ctx)
{
	const struct flood_ctx *fc = ctx;
	struct stich s;
	if (!stich_setup(&s, fc->c, exp(ln_u), fc->u_l, fc->f))
		return INFINITY; /* treated as above flooding, as the cold solve does */
	double t = stich_flood_t_w(&s, fc->ln_t);
	return stich_resid_ln(&s, t, *fc->ln_t);
}

double packed_stichlmair_flood_ms_warm(const struct packing_constants *c, double u_l_ms,
				       const struct fluid_state *f, struct fg_extrap *x,
				       struct solve_warm *w)
{
	assert(c != NULL);
	assert(f != NULL);
	if (w != NULL && nonneg_finite(u_l_ms) && u_l_ms > 0.0 && fluids_ok(f) &&
	    has_stichlmair(c)) {
		struct stich_fast k;
		double ln_u = w->stich_flood_ln_u;
		if (stich_fast_setup(&k, c, u_l_ms, f, w) && fast_flood_newton(&k, &ln_u)) {
			w->stich_flood_ln_u = ln_u;
			return exp(ln_u);
		}
		struct flood_ctx fc = {.c = c, .f = f, .u_l = u_l_ms, .ln_t = &w->stich_flood_ln_t};
		double root;
		/* The residual's slope barely changes from sample to sample: the
		 * secant along the last one first, the bracket if it fails. */
		if (solve_secant(flood_resid_ln, &fc, log(FLOOD_U_LO_MS), log(FLOOD_U_HI_MS),
				 w->stich_flood_ln_u, &w->stich_flood_slope, 1e-3, SOLVE_TOL_LN,
				 &root) ||
		    solve_near(flood_resid_ln, &fc, log(FLOOD_U_LO_MS), log(FLOOD_U_HI_MS), true,
			       w->stich_flood_ln_u, 1e-3, SOLVE_TOL_LN, &root, NULL)) {
			w->stich_flood_ln_u = root;
			return exp(root);
		}
	}
	double u = packed_stichlmair_flood_ms(c, u_l_ms, f, x);
	if (w != NULL)
		w->stich_flood_ln_u = isfinite(u) && u > 0.0 ? log(u) : NAN;
	return u;
}

double packed_stichlmair_flood_ms(const struct packing_constants *c, double u_l_ms,
				  const struct fluid_state *f, struct fg_extrap *x)
{
	assert(c != NULL);
	assert(f != NULL);
	if (!nonneg_finite(u_l_ms) || !fluids_ok(f))
		return NAN;
	if (!has_stichlmair(c)) {
		fg_extrap_note(x, "stichlmair: packing constants C1..C3, a or epsilon missing");
		return NAN;
	}
	if (u_l_ms == 0.0)
		return INFINITY;
	struct stich s;
	double lo = FLOOD_U_LO_MS, hi = FLOOD_U_HI_MS;
	bool ok_lo = stich_setup(&s, c, lo, u_l_ms, f) && stich_resid(&s, stich_flood_t(&s)) < 0.0;
	bool ok_hi = stich_setup(&s, c, hi, u_l_ms, f) && stich_resid(&s, stich_flood_t(&s)) > 0.0;
	if (!ok_lo || !ok_hi) {
		fg_extrap_note(x, "stichlmair: no flood point between 1e-6 and 1e3 m/s");
		return NAN;
	}
	for (int i = 0; i < BISECT_MAX && hi > lo * (1.0 + 1e-15); i++) {
		double mid = sqrt(lo * hi);
		bool below = stich_setup(&s, c, mid, u_l_ms, f) &&
			     stich_resid(&s, stich_flood_t(&s)) <= 0.0;
		if (below)
			lo = mid;
		else
			hi = mid;
	}
	return sqrt(lo * hi);
}

/* ---- Billet & Schultes (1999) ------------------------------------------- */

/* Source: Billet & Schultes (1999), Trans IChemE 77A 498-504 (the summary of
 * their method), equations from memory as written at each function. Units
 * SI; the constants C_h, C_S, C_Fl carry the units that make the equations
 * come out in m/s with SI inputs, as tabulated. Validity: the packings of
 * their tables, gas/liquid systems of their data base; the paper gives no
 * hard bounds in the summary, so we flag only where an equation loses its
 * meaning (holdup above the void fraction, a negative film term at the
 * loading point, a flood holdup with no root below epsilon, gas above
 * flooding), returning the limiting value or NAN as each function says. */

static bool has_bs_base(const struct packing_constants *c)
{
	return has_geometry(c);
}

/* h_L = (12 Fr_L / Re_L)^(1/3) (a_h/a)^(2/3), Fr_L = u_l^2 a/g,
 * Re_L = u_l rho_l/(a mu_l); a_h/a = C_h Re_L^0.15 Fr_L^0.1 for Re_L < 5,
 * 0.85 C_h Re_L^0.25 Fr_L^0.1 for Re_L >= 5 (from memory). Holdup of the
 * pre-loading region, independent of the gas rate. */
double packed_bs_holdup_preload(const struct packing_constants *c, double u_l_ms,
				const struct fluid_state *f, struct fg_extrap *x)
{
	assert(c != NULL);
	assert(f != NULL);
	if (!nonneg_finite(u_l_ms) || !fluids_ok(f))
		return NAN;
	if (!has_bs_base(c) || !pos_finite(c->billet_ch)) {
		fg_extrap_note(x, "billet-schultes: C_h, a or epsilon missing");
		return NAN;
	}
	if (u_l_ms == 0.0)
		return 0.0;
	double a = c->area_m2m3;
	double fr = u_l_ms * u_l_ms * a / PACKED_G_MS2;
	double re = u_l_ms * f->rho_l_kgm3 / (a * f->mu_l_pas);
	double ah = re < 5.0 ? c->billet_ch * pow(re, 0.15) * pow(fr, 0.1)
			     : 0.85 * c->billet_ch * pow(re, 0.25) * pow(fr, 0.1);
	double h = cbrt(12.0 * fr / re) * pow(ah, 2.0 / 3.0);
	if (h >= c->void_frac) {
		fg_extrap_note(x, "billet-schultes: predicted holdup exceeds the void fraction");
		return c->void_frac;
	}
	return h;
}

/* Both Billet-Schultes capacity equations have the form
 *     u = coef * X^n,   X = kx / u   (X the flow parameter with its
 * viscosity term, kx = u_l sqrt(rho_l/rho_g) (mu_l/mu_g)^m),
 * so at a fixed liquid rate u = (coef kx^n)^(1/(1+n)) on each branch. The
 * branch is chosen by the plain flow parameter (L/V) sqrt(rho_g/rho_l) =
 * (u_l/u) sqrt(rho_l/rho_g) at the answer; where the two branches leave a
 * gap at 0.4 the boundary itself is returned. */
static double bs_pick(double coef1, double n1, double coef2, double n2, double kx,
		      double phi_k)
{
	double u1 = pow(coef1 * pow(kx, n1), 1.0 / (1.0 + n1));
	if (phi_k / u1 <= BS_PHI_SWITCH)
		return u1;
	double u2 = pow(coef2 * pow(kx, n2), 1.0 / (1.0 + n2));
	if (phi_k / u2 > BS_PHI_SWITCH)
		return u2;
	return phi_k / BS_PHI_SWITCH;
}

/* Loading point (from memory):
 *   u_S = sqrt(g/psi_S) [eps/a^(1/6) - a^(1/2) B^(1/3)] B^(1/6) sqrt(rho_l/rho_g),
 *   B = 12 mu_l u_l / (g rho_l),
 *   sqrt(g/psi_S) = C_S X^n_S,  X = (L/V) sqrt(rho_g/rho_l) (mu_l/mu_g)^0.4,
 *   n_S = -0.326 with C_S for a flow parameter <= 0.4; n_S = -0.723 with
 *   0.695 C_S (mu_l/mu_g)^0.1588 above it. */
/* The powers of the packing and the fluids that the loading and flood
 * points use: with warm memory w they are kept between samples, keyed
 * bitwise on a, mu_l and mu_g; without, computed afresh (the same numbers). */
struct bs_pow {
	double a16;       /* a^(1/6) */
	double mur04;     /* (mu_l/mu_g)^0.4 */
	double mur01588;  /* (mu_l/mu_g)^0.1588 */
	double mur02;     /* (mu_l/mu_g)^0.2 */
	double mur01028;  /* (mu_l/mu_g)^0.1028 */
};

static void bs_pow_fill(const struct packing_constants *c, const struct fluid_state *f,
			struct solve_warm *w, struct bs_pow *bp)
{
	double key[3] = {c->area_m2m3, f->mu_l_pas, f->mu_g_pas};
	double *v = w != NULL ? w->bs_pow.val : NULL;
	if (w != NULL && solve_memo_hit(&w->bs_pow, key, 3)) {
		*bp = (struct bs_pow){v[0], v[1], v[2], v[3], v[4]};
		return;
	}
	double mur = f->mu_l_pas / f->mu_g_pas;
	*bp = (struct bs_pow){pow(c->area_m2m3, 1.0 / 6.0), pow(mur, 0.4), pow(mur, 0.1588),
			      pow(mur, 0.2), pow(mur, 0.1028)};
	if (v != NULL) {
		v[0] = bp->a16;
		v[1] = bp->mur04;
		v[2] = bp->mur01588;
		v[3] = bp->mur02;
		v[4] = bp->mur01028;
	}
}

static double bs_loading(const struct packing_constants *c, double u_l_ms,
			 const struct fluid_state *f, const struct bs_pow *bp,
			 struct fg_extrap *x);

double packed_bs_loading_ms(const struct packing_constants *c, double u_l_ms,
			    const struct fluid_state *f, struct fg_extrap *x)
{
	assert(c != NULL);
	assert(f != NULL);
	if (!nonneg_finite(u_l_ms) || !fluids_ok(f))
		return NAN;
	struct bs_pow bp;
	bs_pow_fill(c, f, NULL, &bp);
	return bs_loading(c, u_l_ms, f, &bp, x);
}

/* packed_bs_loading_ms with the powers bp. */
static double bs_loading(const struct packing_constants *c, double u_l_ms,
			 const struct fluid_state *f, const struct bs_pow *bp,
			 struct fg_extrap *x)
{
	if (!nonneg_finite(u_l_ms) || !fluids_ok(f))
		return NAN;
	if (!has_bs_base(c) || !pos_finite(c->billet_cs)) {
		fg_extrap_note(x, "billet-schultes: C_S, a or epsilon missing");
		return NAN;
	}
	if (u_l_ms == 0.0)
		return INFINITY;
	double a = c->area_m2m3;
	double b = 12.0 * f->mu_l_pas * u_l_ms / (PACKED_G_MS2 * f->rho_l_kgm3);
	double b13 = cbrt(b);
	double film = (c->void_frac / bp->a16 - sqrt(a) * b13) * sqrt(b13); /* b^(1/6) */
	if (!(film > 0.0)) {
		fg_extrap_note(x, "billet-schultes: liquid load beyond the loading-point equation");
		return NAN;
	}
	double sr = sqrt(f->rho_l_kgm3 / f->rho_g_kgm3);
	double kx = u_l_ms * sr * bp->mur04;
	double coef1 = c->billet_cs * film * sr;
	double coef2 = 0.695 * c->billet_cs * bp->mur01588 * film * sr;
	return bs_pick(coef1, -0.326, coef2, -0.723, kx, u_l_ms * sr);
}

/* Flood-point holdup (from memory): h^3 (3 h - eps) = (6/g) a^2 eps
 * (mu_l/rho_l) u_l, the liquid velocity at flooding being the current one.
 * The left side rises from 0 at h = eps/3 to 2 eps^4 at h = eps. */
static double bs_flood_poly(double h, const void *ctx)
{
	const double *k = ctx; /* eps, rhs */
	return h * h * h * (3.0 * h - k[0]) - k[1];
}

static double bs_flood_holdup_w(const struct packing_constants *c, double u_l_ms,
				const struct fluid_state *f, struct fg_extrap *x,
				struct solve_warm *w);

double packed_bs_flood_holdup(const struct packing_constants *c, double u_l_ms,
			      const struct fluid_state *f, struct fg_extrap *x)
{
	return bs_flood_holdup_w(c, u_l_ms, f, x, NULL);
}

/* Absolute tolerance of the warm flood-holdup solve: holdups are 0.01..1,
 * so 1e-14 is better than 1e-12 relative. */
#define BS_H_TOL 1e-14

/* Newton on the flood-holdup polynomial p(h) = h^3 (3h - eps) - rhs,
 * p' = 3 h^2 (4h - eps), from *h (or from eps when *h is not in
 * [eps/3, eps]); *h updated on success. On [eps/3, eps] p rises and is
 * convex (p'' = 6h (6h - eps) > 0), so from the right Newton descends
 * monotonically onto the root and from the left its first step lands to
 * the right of it. Converged by solve_newton_done to BS_H_TOL. */
static bool bs_flood_newton(double eps, double rhs, double *h)
{
	double x = isfinite(*h) && *h >= eps / 3.0 && *h <= eps ? *h : eps, prev = NAN;
	for (int i = 0; i < 2 * SOLVE_NEWTON_STEPS; i++) {
		double step = (x * x * x * (3.0 * x - eps) - rhs) / (3.0 * x * x * (4.0 * x - eps));
		x -= step;
		if (!isfinite(x) || x < eps / 3.0 || x > eps)
			return false;
		if (solve_newton_done(step, prev, BS_H_TOL)) {
			*h = x;
			return true;
		}
		prev = step;
	}
	return false;
}

static double bs_flood_holdup_w(const struct packing_constants *c, double u_l_ms,
				const struct fluid_state *f, struct fg_extrap *x,
				struct solve_warm *w)
{
	assert(c != NULL);
	assert(f != NULL);
	if (!nonneg_finite(u_l_ms) || !fluids_ok(f))
		return NAN;
	if (!has_bs_base(c)) {
		fg_extrap_note(x, "billet-schultes: a or epsilon missing");
		return NAN;
	}
	double eps = c->void_frac, a = c->area_m2m3;
	double rhs = 6.0 / PACKED_G_MS2 * a * a * eps * f->mu_l_pas / f->rho_l_kgm3 * u_l_ms;
	if (rhs >= 2.0 * pow(eps, 4.0)) {
		fg_extrap_note(x, "billet-schultes: liquid load alone fills the voids at flooding");
		return NAN;
	}
	double lo = eps / 3.0, hi = eps;
	double k[2] = {eps, rhs}, root;
	if (w != NULL && bs_flood_newton(eps, rhs, &w->bs_flood_h))
		return w->bs_flood_h;
	if (w != NULL && solve_near(bs_flood_poly, k, lo, hi, true, w->bs_flood_h, 1e-6, BS_H_TOL,
				    &root, NULL)) {
		w->bs_flood_h = root;
		return root;
	}
	for (int i = 0; i < BISECT_MAX && hi - lo > 1e-16; i++) {
		double mid = 0.5 * (lo + hi);
		if (mid * mid * mid * (3.0 * mid - eps) < rhs)
			lo = mid;
		else
			hi = mid;
	}
	if (w != NULL)
		w->bs_flood_h = 0.5 * (lo + hi);
	return 0.5 * (lo + hi);
}

/* Flood point (from memory):
 *   u_Fl = sqrt(2g/psi_Fl) (eps - h_Fl)^1.5 / eps^0.5 (h_Fl/a)^0.5 sqrt(rho_l/rho_g),
 *   sqrt(g/psi_Fl) = C_Fl X^n_Fl,  X = (L/V) sqrt(rho_g/rho_l) (mu_l/mu_g)^0.2,
 *   n_Fl = -0.194 with C_Fl for a flow parameter <= 0.4; n_Fl = -0.708 with
 *   0.6244 C_Fl (mu_l/mu_g)^0.1028 above it. */
static double bs_flood_ms_w(const struct packing_constants *c, double u_l_ms,
			    const struct fluid_state *f, struct fg_extrap *x, struct solve_warm *w);

double packed_bs_flood_ms(const struct packing_constants *c, double u_l_ms,
			  const struct fluid_state *f, struct fg_extrap *x)
{
	return bs_flood_ms_w(c, u_l_ms, f, x, NULL);
}

static double bs_flood_from_h(const struct packing_constants *c, double u_l_ms,
			      const struct fluid_state *f, double h, const struct bs_pow *bp);

static double bs_flood_ms_w(const struct packing_constants *c, double u_l_ms,
			    const struct fluid_state *f, struct fg_extrap *x, struct solve_warm *w)
{
	assert(c != NULL);
	assert(f != NULL);
	if (!nonneg_finite(u_l_ms) || !fluids_ok(f))
		return NAN;
	if (!has_bs_base(c) || !pos_finite(c->billet_cfl)) {
		fg_extrap_note(x, "billet-schultes: C_Fl, a or epsilon missing");
		return NAN;
	}
	if (u_l_ms == 0.0)
		return INFINITY;
	struct bs_pow bp;
	bs_pow_fill(c, f, w, &bp);
	return bs_flood_from_h(c, u_l_ms, f, bs_flood_holdup_w(c, u_l_ms, f, x, w), &bp);
}

/* The flood velocity from the flood holdup h (NAN: NAN). */
static double bs_flood_from_h(const struct packing_constants *c, double u_l_ms,
			      const struct fluid_state *f, double h, const struct bs_pow *bp)
{
	if (isnan(h))
		return NAN;
	double eps = c->void_frac;
	double sr = sqrt(f->rho_l_kgm3 / f->rho_g_kgm3);
	double q = sqrt(2.0) * ((eps - h) * sqrt(eps - h)) / sqrt(eps) * sqrt(h / c->area_m2m3) *
		   sr;
	double kx = u_l_ms * sr * bp->mur02;
	double coef1 = c->billet_cfl * q;
	double coef2 = 0.6244 * c->billet_cfl * bp->mur01028 * q;
	return bs_pick(coef1, -0.194, coef2, -0.708, kx, u_l_ms * sr);
}

/* Loading region (from memory): h = h_S + (h_Fl - h_S) (u_g/u_Fl)^13 for
 * u_S < u_g <= u_Fl, h_S the pre-loading holdup. At u_g = u_S the added
 * term is (u_S/u_Fl)^13, about 1 % of (h_Fl - h_S) for u_S = 0.7 u_Fl: the
 * small step the paper's form has at the loading point is kept. */
static double bs_holdup_w(const struct packing_constants *c, double u_g_ms, double u_l_ms,
			  const struct fluid_state *f, struct fg_extrap *x, struct solve_warm *w);

double packed_bs_holdup(const struct packing_constants *c, double u_g_ms, double u_l_ms,
			const struct fluid_state *f, struct fg_extrap *x)
{
	return bs_holdup_w(c, u_g_ms, u_l_ms, f, x, NULL);
}

static double bs_holdup_w(const struct packing_constants *c, double u_g_ms, double u_l_ms,
			  const struct fluid_state *f, struct fg_extrap *x, struct solve_warm *w)
{
	assert(c != NULL);
	assert(f != NULL);
	if (!nonneg_finite(u_g_ms))
		return NAN;
	double h_s = packed_bs_holdup_preload(c, u_l_ms, f, x);
	if (isnan(h_s) || u_l_ms == 0.0)
		return h_s;
	double u_s = packed_bs_loading_ms(c, u_l_ms, f, x);
	if (u_g_ms <= u_s)
		return h_s;
	double u_fl = bs_flood_ms_w(c, u_l_ms, f, x, w);
	double h_fl = bs_flood_holdup_w(c, u_l_ms, f, x, w);
	if (isnan(u_fl) || isnan(h_fl))
		return NAN;
	double ratio = u_g_ms / u_fl;
	if (ratio > 1.0) {
		fg_extrap_note(x, "billet-schultes: gas above the flood point, flood holdup held");
		ratio = 1.0;
	}
	if (h_fl < h_s)
		return h_s;
	return h_s + (h_fl - h_s) * pow(ratio, 13.0);
}

/* ---- Kister & Gill (1991), Robbins (1991) -------------------------------- */

static const char WHY_KG_RANGE[] = "kister-gill: packing factor outside 9..60 1/ft";

/* dP_flood = 0.12 Fp^0.7 inH2O/ft, Fp in 1/ft (from memory; the handbook
 * quotes a coefficient of 0.115 in places, 4 % lower). Kister & Gill give
 * the same equation for structured packings; we do not change the exponent.
 * The data behind it span Fp of about 9..60 1/ft (from memory): outside that
 * the value is returned and noted. */
double packed_kister_gill_flood_pam(double fp_1pm, bool structured, struct fg_extrap *x)
{
	(void)structured;
	if (!pos_finite(fp_1pm)) {
		if (isnan(fp_1pm))
			fg_extrap_note(x, "kister-gill: packing factor Fp missing");
		return NAN;
	}
	double fp_ft = fp_1pm * FT_M;
	if (fp_ft < 9.0 || fp_ft > 60.0)
		fg_extrap_note(x, WHY_KG_RANGE);
	return 0.12 * pow(fp_ft, 0.7) * PACKED_INH2O_PER_FT_PAM;
}

/* Robbins (1991), in its own units (lb/(h ft2), lb/ft3, cP, inH2O/ft):
 *   dP = C3 Gf^2 10^(C4 Lf) + 0.4 (Lf/20000)^0.1 (C3 Gf^2 10^(C4 Lf))^4,
 *   Gf = G (0.075/rho_g)^0.5 (Fpd/20)^0.5,  Lf = L (62.4/rho_l) (Fpd/20)^0.5 mu_l^0.1,
 *   C3 = 7.4e-8, C4 = 2.7e-5.
 * Validity (Kister 1992, Distillation Design, as quoted on a copy of its
 * section 8 we read): the equation only for Lf <= 20 000; Fpd >= 15 1/ft for
 * the Lf form above; near-atmospheric pressure and vacuum, not above about
 * 3 bar (we flag rho_g > 3.6 kg/m3, air at 3 bar and 20 degC). Outside:
 * value returned and noted. */
double packed_robbins_pam(double fpd_1pm, double gas_kgsm2, double liquid_kgsm2,
			  double rho_g_kgm3, double rho_l_kgm3, double mu_l_pas,
			  struct fg_extrap *x)
{
	return packed_robbins_pam_n(fpd_1pm, gas_kgsm2, liquid_kgsm2, rho_g_kgm3, rho_l_kgm3,
				    mu_l_pas, NULL, x);
}

double packed_robbins_pam_n(double fpd_1pm, double gas_kgsm2, double liquid_kgsm2,
			    double rho_g_kgm3, double rho_l_kgm3, double mu_l_pas,
			    double *exponent, struct fg_extrap *x)
{
	if (exponent != NULL)
		*exponent = NAN;
	if (!nonneg_finite(gas_kgsm2) || !nonneg_finite(liquid_kgsm2) ||
	    !pos_finite(rho_g_kgm3) || !pos_finite(rho_l_kgm3) || !pos_finite(mu_l_pas))
		return NAN;
	if (!pos_finite(fpd_1pm)) {
		fg_extrap_note(x, "robbins: dry packing factor Fpd missing");
		return NAN;
	}
	double flux = LB_PER_KG * 3600.0 * FT_M * FT_M;        /* kg/(s m2) -> lb/(h ft2) */
	double dens = LB_PER_KG * FT_M * FT_M * FT_M;          /* kg/m3 -> lb/ft3 */
	double fpd_ft = fpd_1pm * FT_M;
	double root = sqrt(fpd_ft / 20.0);
	double lf = liquid_kgsm2 * flux * (62.4 / (rho_l_kgm3 * dens)) * root *
		    pow(mu_l_pas * 1000.0, 0.1);
	double gf = gas_kgsm2 * flux * sqrt(0.075 / (rho_g_kgm3 * dens)) * root;
	if (lf > 20000.0)
		fg_extrap_note(x, "robbins: Lf above 20000, outside the equation");
	if (fpd_ft < 15.0)
		fg_extrap_note(x, "robbins: Fpd below 15 1/ft");
	if (rho_g_kgm3 > 3.6)
		fg_extrap_note(x, "robbins: gas density above about 3 bar air");
	double term = 7.4e-8 * gf * gf * exp(2.7e-5 * M_LN10 * lf); /* 10^(2.7e-5 Lf) */
	double t2 = term * term;
	double high = 0.4 * pow(lf / 20000.0, 0.1) * (t2 * t2);
	double dp = term + high;
	/* term goes as G^2 and the second as G^8: d ln DP / d ln G */
	if (exponent != NULL)
		*exponent = dp > 0.0 ? (2.0 * term + 8.0 * high) / dp : NAN;
	return dp * PACKED_INH2O_PER_FT_PAM;
}

/* ---- packed_eval --------------------------------------------------------- */

/* A value computed once per evaluation, and the notes that made. */
struct once {
	bool done;
	double v;
	struct fg_extrap notes;
};

/* Rates and notes shared by the parts of one evaluation. */
struct pe {
	const struct packing_constants *c;
	const struct fluid_state *f;
	double u_g, u_l;          /* superficial velocities, m/s */
	double gas_flux, liq_flux;/* mass fluxes, kg/(s m2) */
	double area_m2, height_m;
	struct solve_warm *w;     /* warm-start memory, NULL for a cold evaluation */
	double stich_holdup;      /* Stichlmair irrigated holdup of eval_dp, NAN if none */
	/* Billet-Schultes values at this liquid rate, each computed once per
	 * evaluation (flood % and the holdup both need them) with the notes
	 * its computation made, repeated wherever it is used again. */
	struct once hs, us, hfl, ufl;
	bool bp_done;
	struct bs_pow bp;
};

static const struct bs_pow *pe_bs_pow(struct pe *e)
{
	if (!e->bp_done) {
		bs_pow_fill(e->c, e->f, e->w, &e->bp);
		e->bp_done = true;
	}
	return &e->bp;
}

/* Adds the notes n made (its count and first reason) to x, as if the
 * computation that made them had run again. */
static void notes_repeat(struct fg_extrap *x, const struct fg_extrap *n)
{
	if (x == NULL || n->count == 0)
		return;
	if (x->count == 0)
		x->first = n->first;
	x->count += n->count;
}

static bool has_bs_flood(const struct packing_constants *c)
{
	return has_geometry(c) && pos_finite(c->billet_cfl);
}

/* A constant the table or config does not give: the field is left out or
 * another method stands in. Kept apart from the extrapolation notes. */
static void note_missing(struct pe *e, struct section_result *r, const char *why)
{
	(void)e;
	fg_extrap_note(&r->missing, why);
}

static double pe_preload(struct pe *e, struct fg_extrap *x)
{
	if (!e->hs.done) {
		e->hs = (struct once){.done = true};
		e->hs.v = packed_bs_holdup_preload(e->c, e->u_l, e->f, &e->hs.notes);
	}
	notes_repeat(x, &e->hs.notes);
	return e->hs.v;
}

static double pe_loading(struct pe *e, struct fg_extrap *x)
{
	if (!e->us.done) {
		e->us = (struct once){.done = true};
		if (!nonneg_finite(e->u_l) || !fluids_ok(e->f))
			e->us.v = NAN;
		else
			e->us.v = bs_loading(e->c, e->u_l, e->f, pe_bs_pow(e), &e->us.notes);
	}
	notes_repeat(x, &e->us.notes);
	return e->us.v;
}

static double pe_flood_holdup(struct pe *e, struct fg_extrap *x)
{
	if (!e->hfl.done) {
		e->hfl = (struct once){.done = true};
		e->hfl.v = bs_flood_holdup_w(e->c, e->u_l, e->f, &e->hfl.notes, e->w);
	}
	notes_repeat(x, &e->hfl.notes);
	return e->hfl.v;
}

/* bs_flood_ms_w at this evaluation's liquid rate, its flood holdup shared
 * with pe_flood_holdup. */
static double pe_flood(struct pe *e, struct fg_extrap *x)
{
	if (!e->ufl.done) {
		const struct packing_constants *c = e->c;
		struct fg_extrap *n = &e->ufl.notes;
		e->ufl = (struct once){.done = true};
		if (!nonneg_finite(e->u_l) || !fluids_ok(e->f)) {
			e->ufl.v = NAN;
		} else if (!has_bs_base(c) || !pos_finite(c->billet_cfl)) {
			fg_extrap_note(n, "billet-schultes: C_Fl, a or epsilon missing");
			e->ufl.v = NAN;
		} else if (e->u_l == 0.0) {
			e->ufl.v = INFINITY;
		} else {
			e->ufl.v = bs_flood_from_h(c, e->u_l, e->f, pe_flood_holdup(e, n),
						   pe_bs_pow(e));
		}
	}
	notes_repeat(x, &e->ufl.notes);
	return e->ufl.v;
}

/* bs_holdup_w with this evaluation's shared values. */
static double pe_holdup(struct pe *e, struct fg_extrap *x)
{
	if (!nonneg_finite(e->u_g))
		return NAN;
	double h_s = pe_preload(e, x);
	if (isnan(h_s) || e->u_l == 0.0)
		return h_s;
	double u_s = pe_loading(e, x);
	if (e->u_g <= u_s)
		return h_s;
	double u_fl = pe_flood(e, x);
	double h_fl = pe_flood_holdup(e, x);
	if (isnan(u_fl) || isnan(h_fl))
		return NAN;
	double ratio = e->u_g / u_fl;
	if (ratio > 1.0) {
		fg_extrap_note(x, "billet-schultes: gas above the flood point, flood holdup held");
		ratio = 1.0;
	}
	if (h_fl < h_s)
		return h_s;
	double r2 = ratio * ratio, r4 = r2 * r2;
	return h_s + (h_fl - h_s) * (r4 * r4 * r4 * ratio); /* ratio^13 */
}

/* Flood % by the configured method, falling back to the other one when the
 * configured method's constants are missing. */
static void eval_flood(struct pe *e, const struct section_geom *g, struct section_result *r)
{
	bool stich = g->packed.flood_method == PACKED_FLOOD_STICHLMAIR;
	if (stich && !has_stichlmair(e->c) && has_bs_flood(e->c)) {
		note_missing(e, r, "packed: Stichlmair constants missing, flood by Billet-Schultes");
		stich = false;
	} else if (!stich && !has_bs_flood(e->c) && has_stichlmair(e->c)) {
		note_missing(e, r, "packed: Billet-Schultes C_Fl missing, flood by Stichlmair");
		stich = true;
	} else if (!has_stichlmair(e->c) && !has_bs_flood(e->c)) {
		note_missing(e, r, "packed: no flood constants (Stichlmair C1..C3 or C_Fl)");
		return;
	}
	double u_fl = stich ? packed_stichlmair_flood_ms_warm(e->c, e->u_l, e->f, &r->extrap, e->w)
			    : pe_flood(e, &r->extrap);
	if (isnan(u_fl) || u_fl <= 0.0)
		return;
	u_fl *= section_capacity_factor(g); /* the calibrated plant capacity */
	/* A dry bed (u_fl infinite) cannot flood: 0 %. */
	double pct = 100.0 * e->u_g / u_fl;
	if (pct > 100.0)
		fg_extrap_note(&r->extrap, "packed: gas above the flooding velocity");
	r->v[RF_FLOOD_PCT] = pct;
	r->basis = FLOOD_BASIS_GAS_VELOCITY;
}

static void eval_loading(struct pe *e, const struct section_geom *g, struct section_result *r)
{
	if (!has_geometry(e->c) || !pos_finite(e->c->billet_cs)) {
		note_missing(e, r, "packed: Billet-Schultes C_S missing, no loading point");
		return;
	}
	double u_s = pe_loading(e, &r->extrap);
	if (isnan(u_s) || u_s <= 0.0)
		return;
	r->v[RF_LOADING_PCT] = 100.0 * e->u_g / (u_s * section_capacity_factor(g));
}

/* Model DP: Stichlmair irrigated DP when its constants are known (it covers
 * loading up to the flood point); otherwise Robbins with Fpd. */
static void eval_dp(struct pe *e, struct section_result *r)
{
	double pam = NAN;
	if (has_stichlmair(e->c)) {
		pam = packed_stichlmair_wet_pam_n(e->c, e->u_g, e->u_l, e->f, &e->stich_holdup,
						  &r->dp_model_exponent, &r->extrap, e->w);
	} else if (pos_finite(e->c->dry_factor_1pm)) {
		pam = packed_robbins_pam_n(e->c->dry_factor_1pm, e->gas_flux, e->liq_flux,
					   e->f->rho_g_kgm3, e->f->rho_l_kgm3, e->f->mu_l_pas,
					   &r->dp_model_exponent, &r->extrap);
	} else {
		note_missing(e, r, "packed: no DP constants (Stichlmair C1..C3 or Fpd)");
	}
	r->v[RF_DP_MODEL_PA] = pam * e->height_m;
}

static void eval_dp_flood(struct pe *e, const struct section_geom *g,
			  const struct section_point *p, struct section_result *r)
{
	if (!isfinite(p->dp_pa))
		return;
	if (!pos_finite(e->c->packing_factor_1pm)) {
		note_missing(e, r, "packed: packing factor Fp missing, no flood DP");
		return;
	}
	double flood_pam;
	struct solve_warm *w = e->w;
	double key[2] = {e->c->packing_factor_1pm, g->packed.structured ? 1.0 : 0.0};
	if (w != NULL && solve_memo_hit(&w->kg, key, 2)) {
		/* Its range note depends on the key alone: repeat it. */
		flood_pam = w->kg.val[0];
		double fp_ft = key[0] * FT_M;
		if (fp_ft < 9.0 || fp_ft > 60.0)
			fg_extrap_note(&r->extrap, WHY_KG_RANGE);
	} else {
		flood_pam = packed_kister_gill_flood_pam(key[0], g->packed.structured, &r->extrap);
		if (w != NULL)
			w->kg.val[0] = flood_pam;
	}
	r->v[RF_DP_FLOOD_PCT] = 100.0 * (p->dp_pa / e->height_m) / flood_pam;
}

/* Holdup: Billet-Schultes when C_h is known (with the loading-region rise
 * when C_S and C_Fl are known too), else Stichlmair's irrigated holdup. */
static void eval_holdup(struct pe *e, struct section_result *r)
{
	const struct packing_constants *c = e->c;
	double h = NAN;
	if (has_geometry(c) && pos_finite(c->billet_ch)) {
		if (pos_finite(c->billet_cs) && pos_finite(c->billet_cfl)) {
			h = pe_holdup(e, &r->extrap);
		} else {
			note_missing(e, r, "packed: C_S or C_Fl missing, pre-loading holdup only");
			h = pe_preload(e, &r->extrap);
		}
	} else if (has_stichlmair(c)) {
		/* eval_dp solved the same point (and noted its range problems). */
		h = e->stich_holdup;
	} else {
		note_missing(e, r, "packed: no holdup constants (C_h or Stichlmair C1..C3)");
	}
	r->v[RF_LIQUID_HOLDUP_FRAC] = h;
	r->v[RF_LIQUID_HOLDUP_M3] = h * e->area_m2 * e->height_m;
}

static bool eval_inputs_ok(const struct section_geom *g, const struct fluid_state *f,
			   const struct section_point *p)
{
	return pos_finite(g->diameter_m) && pos_finite(g->packed.height_m) && fluids_ok(f) &&
	       nonneg_finite(p->gas_kgs) && nonneg_finite(p->liquid_kgs);
}

/* The operating point in the terms the evaluations use. */
static void pe_init(struct pe *e, const struct section_geom *g, const struct fluid_state *f,
		    const struct section_point *p, struct solve_warm *w)
{
	*e = (struct pe){.c = &g->packed.c, .f = f, .w = w, .stich_holdup = NAN};
	/* The tower cross-section, computed here so this file needs only the
	 * geometry (section_area_m2 gives the same pi d^2/4). */
	e->area_m2 = section_area_m2(g);
	e->height_m = g->packed.height_m;
	e->gas_flux = p->gas_kgs / e->area_m2;
	e->liq_flux = p->liquid_kgs / e->area_m2;
	e->u_g = e->gas_flux / f->rho_g_kgm3;
	e->u_l = e->liq_flux / f->rho_l_kgm3;
}

double packed_dp_model_pa(const struct section_geom *g, const struct fluid_state *f,
			  const struct section_point *p, struct solve_warm *w)
{
	assert(g != NULL);
	assert(f != NULL);
	assert(p != NULL);
	if (!eval_inputs_ok(g, f, p))
		return NAN;
	struct pe e;
	pe_init(&e, g, f, p, w);
	struct section_result scratch; /* packed_eval_warm notes this point's range */
	result_clear(&scratch);
	eval_dp(&e, &scratch);
	return scratch.v[RF_DP_MODEL_PA];
}

void packed_eval(const struct section_geom *g, const struct fluid_state *f,
		 const struct section_point *p, struct section_result *r)
{
	packed_eval_warm(g, f, p, r, NULL);
}

void packed_eval_warm(const struct section_geom *g, const struct fluid_state *f,
		      const struct section_point *p, struct section_result *r,
		      struct solve_warm *w)
{
	assert(g != NULL);
	assert(f != NULL);
	assert(p != NULL);
	assert(r != NULL);
	static const enum result_field mine[] = {
		RF_FLOOD_PCT, RF_LOADING_PCT, RF_DP_MODEL_PA, RF_DP_FLOOD_PCT,
		RF_LIQUID_HOLDUP_FRAC, RF_LIQUID_HOLDUP_M3,
	};
	for (size_t i = 0; i < sizeof mine / sizeof mine[0]; i++)
		r->v[mine[i]] = NAN;
	if (!eval_inputs_ok(g, f, p)) {
		/* rho_l <= rho_g, missing flows or properties: nothing here is a value. */
		fg_quality_raise(&r->quality, FG_QUALITY_BAD);
		return;
	}
	struct pe e;
	pe_init(&e, g, f, p, w);
	unsigned before = r->extrap.count;
	eval_flood(&e, g, r);
	eval_loading(&e, g, r);
	eval_dp(&e, r);
	eval_dp_flood(&e, g, p, r);
	eval_holdup(&e, r);
	/* Missing constants go to r->missing; what reaches r->extrap here is
	 * a real extrapolation: uncertain. */
	if (r->extrap.count > before)
		fg_quality_raise(&r->quality, FG_QUALITY_UNCERTAIN);
}
