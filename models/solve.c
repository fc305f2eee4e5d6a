/*
 * solve.c - see solve.h.
 */
#include "solve.h"

#include <assert.h>
#include <float.h>
#include <math.h>
#include <stddef.h>
#include <string.h>

static bool same_sign(double a, double b)
{
	return (a > 0.0 && b > 0.0) || (a < 0.0 && b < 0.0);
}

/* Brent's zero finder in the form of Brent (1973), ch. 4, "zero": b is the
 * best estimate, a the previous one, c the other end of the bracket. An
 * infinite f at an end forbids interpolation (bisection instead). */
double solve_brent(solve_fn f, const void *ctx, double a, double fa, double b, double fb,
		   double tol, int *evals)
{
	assert(f != NULL);
	assert(tol > 0.0);
	assert(!same_sign(fa, fb));
	double c = a, fc = fa, d = b - a, e = d;
	for (int i = 0; i < SOLVE_BRENT_MAX; i++) {
		if (same_sign(fb, fc)) {
			c = a;
			fc = fa;
			d = e = b - a;
		}
		if (fabs(fc) < fabs(fb)) {
			a = b;
			b = c;
			c = a;
			fa = fb;
			fb = fc;
			fc = fa;
		}
		double tol1 = 2.0 * DBL_EPSILON * fabs(b) + 0.5 * tol;
		double xm = 0.5 * (c - b);
		if (fabs(xm) <= tol1 || fb == 0.0)
			return b;
		bool interp = fabs(e) >= tol1 && fabs(fa) > fabs(fb) && isfinite(fa) &&
			      isfinite(fc);
		if (interp) {
			double s = fb / fa, p, q;
			if (a == c) {
				p = 2.0 * xm * s;
				q = 1.0 - s;
			} else {
				double qa = fa / fc, r = fb / fc;
				p = s * (2.0 * xm * qa * (qa - r) - (b - a) * (r - 1.0));
				q = (qa - 1.0) * (r - 1.0) * (s - 1.0);
			}
			if (p > 0.0)
				q = -q;
			p = fabs(p);
			double m1 = 3.0 * xm * q - fabs(tol1 * q), m2 = fabs(e * q);
			if (isfinite(p / q) && 2.0 * p < fmin(m1, m2)) {
				e = d;
				d = p / q;
			} else {
				d = e = xm;
			}
		} else {
			d = e = xm;
		}
		a = b;
		fa = fb;
		b += fabs(d) > tol1 ? d : copysign(tol1, xm);
		fb = f(b, ctx);
		if (evals != NULL)
			(*evals)++;
	}
	return b;
}

static double eval(solve_fn f, const void *ctx, double x, int *evals)
{
	if (evals != NULL)
		(*evals)++;
	return f(x, ctx);
}

bool solve_near(solve_fn f, const void *ctx, double lo, double hi, bool rising, double guess,
		double step, double tol, double *root, int *evals)
{
	assert(f != NULL);
	assert(lo < hi);
	assert(step > 0.0);
	assert(root != NULL);
	if (!(isfinite(guess) && guess >= lo && guess <= hi))
		return false;
	double x0 = guess, f0 = eval(f, ctx, guess, evals);
	if (f0 == 0.0) {
		*root = guess;
		return true;
	}
	if (isnan(f0))
		return false;
	/* The root is above the guess when f is still below zero there (rising). */
	double dir = (rising ? f0 < 0.0 : f0 > 0.0) ? 1.0 : -1.0;
	double xp = NAN, fp = NAN;
	for (int k = 0; k < SOLVE_WARM_STEPS; k++) {
		if ((dir > 0.0 && x0 >= hi) || (dir < 0.0 && x0 <= lo))
			return false;
		/* First a probe of one step; then the secant through the last two
		 * points, overshooting by a tenth so that the root is bracketed
		 * tightly; the plain doubling step when the secant points back. */
		double d = step * ldexp(1.0, k);
		if (k > 0 && isfinite(fp) && isfinite(f0) && f0 != fp) {
			double ds = -f0 * (x0 - xp) / (f0 - fp);
			if (isfinite(ds) && ds * dir > 0.0)
				d = fmin(fabs(ds) * 1.1 + 4.0 * tol, d * 16.0);
		}
		double x1 = dir > 0.0 ? fmin(x0 + d, hi) : fmax(x0 - d, lo);
		double f1 = eval(f, ctx, x1, evals);
		if (isnan(f1))
			return false;
		if (!same_sign(f0, f1)) {
			*root = dir > 0.0 ? solve_brent(f, ctx, x0, f0, x1, f1, tol, evals)
					  : solve_brent(f, ctx, x1, f1, x0, f0, tol, evals);
			return true;
		}
		xp = x0;
		fp = f0;
		x0 = x1;
		f0 = f1;
	}
	return false;
}

bool solve_secant(solve_fn f, const void *ctx, double lo, double hi, double guess,
		  double *slope, double step, double tol, double *root)
{
	assert(f != NULL);
	assert(slope != NULL);
	assert(root != NULL);
	double x0 = guess;
	if (!(isfinite(x0) && x0 > lo && x0 < hi))
		return false;
	double f0 = f(x0, ctx);
	if (!isfinite(f0))
		return false;
	double x1 = isfinite(*slope) && *slope != 0.0 ? x0 - f0 / *slope : x0 + step;
	for (int i = 0; i < SOLVE_SECANT_STEPS; i++) {
		if (!(x1 > lo && x1 < hi))
			return false;
		double f1 = f(x1, ctx);
		if (!isfinite(f1) || f1 == f0)
			return false;
		double s = (f1 - f0) / (x1 - x0);
		double x2 = x1 - f1 / s;
		if (!isfinite(x2))
			return false;
		if (fabs(x2 - x1) <= tol) {
			*slope = s;
			*root = x2;
			return true;
		}
		x0 = x1;
		f0 = f1;
		x1 = x2;
	}
	return false;
}

double solve_warm(solve_fn f, const void *ctx, double lo, double flo, double hi, double fhi,
		  bool rising, double guess, double step, double tol, int *evals)
{
	double root;
	if (solve_near(f, ctx, lo, hi, rising, guess, step, tol, &root, evals))
		return root;
	return solve_brent(f, ctx, lo, flo, hi, fhi, tol, evals);
}

void solve_warm_clear(struct solve_warm *w)
{
	assert(w != NULL);
	w->stich_flood_ln_u = NAN;
	w->stich_flood_ln_t = NAN;
	w->stich_flood_slope = NAN;
	w->stich_wet_ln_y = NAN;
	w->bs_flood_h = NAN;
	w->tray_flood_ln_gas = NAN;
	w->tray_flood_slope = NAN;
	w->spray_vt_ln_re[0] = w->spray_vt_ln_re[1] = NAN;
	w->spray_crit_ln_re[0] = w->spray_crit_ln_re[1] = NAN;
	w->bubble_ay_eps = NAN;
	w->stich_wet_ln_t = NAN;
	solve_warm_drop_cache(w);
}

void solve_warm_drop_cache(struct solve_warm *w)
{
	assert(w != NULL);
	w->stich.valid = false;
	w->stich_geo.valid = false;
	w->kg.valid = false;
	w->tray_geom.valid = false;
	w->tray_sigma.valid = false;
	w->tray_hr.valid = false;
	w->bs_pow.valid = false;
}

bool solve_halley_done(double step, double prev_step, double tol)
{
	double a = fabs(step), b = fabs(prev_step);
	if (a <= tol)
		return true;
	if (!(a < 1e-4) || !(a < b))
		return false;
	return a / (b * b * b) * a * a * a <= 0.1 * tol;
}

bool solve_newton_done(double step, double prev_step, double tol)
{
	double a = fabs(step), b = fabs(prev_step);
	if (a <= tol)
		return true;
	if (!(a < 1e-6) || !(a < b))
		return false;
	return a / (b * b) * a * a <= 0.1 * tol;
}
