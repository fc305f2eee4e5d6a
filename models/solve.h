/*
 * solve.h - one-dimensional root finding with a warm start, for the solves
 * on the per-sample path (Stichlmair flood point and irrigated DP,
 * Billet-Schultes flood holdup, Fair's flood gas rate, droplet terminal
 * velocity, Akita-Yoshida holdup).
 *
 * A monitor evaluates the same section once a second at nearly the same
 * operating point, so the last answer is an excellent first guess. Each
 * solve here:
 *   1. brackets the root near the guess: it evaluates f at the guess, then
 *      steps towards the sign change: a first probe of the caller's step,
 *      then the secant through the last two points with a 10 % overshoot
 *      (or a doubled step when the secant points back), at most
 *      SOLVE_WARM_STEPS times, never beyond the caller's [lo, hi];
 *   2. closes the bracket with Brent's method (R. P. Brent, "Algorithms for
 *      Minimization without Derivatives", 1973, ch. 4: inverse quadratic
 *      interpolation and secant steps, bisection whenever those would not
 *      shrink the bracket fast enough) to an absolute tolerance in x;
 *   3. falls back to Brent on the whole [lo, hi] when there is no guess
 *      (NAN: the first sample, or after a failed solve) or no sign change
 *      was found near it.
 * Every path is bracketed, so a solve cannot diverge, and it makes at most
 * SOLVE_WARM_STEPS + 2 + SOLVE_BRENT_MAX evaluations of f.
 *
 * Tolerance: callers solve on a logarithm (ln u, ln t, ln Re) with
 * SOLVE_TOL_LN = 1e-12, i.e. 1e-12 relative in the quantity; the cold
 * bisections they replace stop at 1e-15..1e-10 relative, so warm and cold
 * answers agree to about 1e-10 relative at worst, inside the 1e-9 the
 * replay promises (tests/unit/test_solve.c, test_warm.c).
 *
 * Pure C, no allocation, no globals.
 */
#ifndef SOLVE_H
#define SOLVE_H

#include <stdbool.h>
#include <stdint.h>
#include <string.h>

/* Steps out from a warm guess before giving up on it (the step doubles:
 * 2^12 times the first step reaches any change a sample can bring). */
#define SOLVE_WARM_STEPS 12

/* Brent iterations: far more than a bracket ever needs (bisection alone
 * halves a 100-wide log interval to 1e-13 in 50 steps). */
#define SOLVE_BRENT_MAX 120

/* Steps of solve_secant before it gives the problem to the bracket. */
#define SOLVE_SECANT_STEPS 6

/* Absolute tolerance on a logarithm: 1e-12 relative in the quantity. */
#define SOLVE_TOL_LN 1e-12

/* Steps of the Newton solves (analytic derivatives) before they hand over
 * to a bracketed solve: from a warm start they need two or three. */
#define SOLVE_NEWTON_STEPS 8

/*
 * Has Newton's method converged? Yes when the last step is within tol, or
 * when the iteration is plainly in its quadratic phase (the step below 1e-6
 * and smaller than the one before) and the error it leaves, estimated as
 * K step^2 with K = |step| / prev_step^2 from the last two steps (Newton:
 * e_{k+1} = K e_k^2), is below tol / 10. The second test saves the last,
 * confirming evaluation; where convergence is only linear with ratio r it
 * still holds the error to r/(1-r) times the estimate, under tol for r up to
 * 0.9. prev_step is NAN for the first step.
 */
bool solve_newton_done(double step, double prev_step, double tol);

/* The same for Halley's method (e_{k+1} = K e_k^3): converged when the step
 * is within tol, or below 1e-4, smaller than the last, and K step^3 with
 * K = |step| / prev_step^3 is below tol / 10. */
bool solve_halley_done(double step, double prev_step, double tol);

/* f(x, ctx). May return +-INFINITY where the model has no value (beyond a
 * limit); it must be monotone over the bracket. */
typedef double (*solve_fn)(double x, const void *ctx);

/* Brent's method on [a, b], fa = f(a) and fb = f(b) of opposite signs (or
 * one of them zero). Returns x within tol of the sign change. Evaluations
 * are added to *evals when evals is not NULL. */
double solve_brent(solve_fn f, const void *ctx, double a, double fa, double b, double fb,
		   double tol, int *evals);

/*
 * The warm part alone: looks for a sign change of f near guess (steps as
 * above, f evaluated at lo or hi when a step reaches them) and closes it
 * with Brent. Returns true with *root, or false (no guess, or no sign change
 * within SOLVE_WARM_STEPS steps): the caller then solves cold.
 */
bool solve_near(solve_fn f, const void *ctx, double lo, double hi, bool rising, double guess,
		double step, double tol, double *root, int *evals);

/*
 * The secant method from guess, its first step along *slope (the last
 * solve's slope of f, NAN for none: then a probe of `step`), for a smooth
 * monotone f whose root moved little since the last sample. Converged when
 * a step is below tol within SOLVE_SECANT_STEPS steps, every value finite
 * and inside (lo, hi): true with *root, and *slope updated. Otherwise false
 * (nothing is bracketed here: the caller then runs solve_near or cold).
 */
bool solve_secant(solve_fn f, const void *ctx, double lo, double hi, double guess,
		  double *slope, double step, double tol, double *root);

/*
 * Root of f on [lo, hi], f rising with x when rising is true (falling
 * otherwise), with f(lo) and f(hi) already known to bracket the root
 * (flo, fhi: the caller evaluated them or knows their signs; pass +-INFINITY
 * for a known sign). guess is the warm start (NAN for none) and step the
 * first step away from it. Returns the root to within tol.
 */
double solve_warm(solve_fn f, const void *ctx, double lo, double flo, double hi, double fhi,
		  bool rising, double guess, double step, double tol, int *evals);

/* A small cache of values computed from a few inputs (the key). A hit needs
 * every key value bitwise equal to the stored one, so a changed input (T,
 * P, flows, a reloaded configuration) never reads a stale value, and a hit
 * returns exactly what recomputing would. */
#define SOLVE_MEMO_KEYS 10
#define SOLVE_MEMO_VALS 8
struct solve_memo {
	bool valid;
	double key[SOLVE_MEMO_KEYS];
	double val[SOLVE_MEMO_VALS];
};

/* True when m holds the values for these n key values. Otherwise stores
 * the key, marks m valid and returns false: the caller then fills m->val
 * before anything else can read m. */
static inline bool solve_memo_hit(struct solve_memo *m, const double *key, unsigned n)
{
	/* bit for bit (NAN keys alike, -0 apart from 0), word by word: inline,
	 * as it runs several times per section and sample */
	uint64_t diff = !m->valid;
	for (unsigned i = 0; i < n; i++) {
		uint64_t a, b;
		memcpy(&a, &m->key[i], sizeof a);
		memcpy(&b, &key[i], sizeof b);
		diff |= a ^ b;
	}
	if (diff == 0)
		return true;
	memcpy(m->key, key, n * sizeof key[0]);
	m->valid = true;
	return false;
}

/* The warm-start memory of one section: the last answer of each solve, NAN
 * when there is none (cold). Owned by the engine, one per section; the
 * models read and update it. */
struct solve_warm {
	double stich_flood_ln_u;   /* Stichlmair flood gas velocity, ln(m/s) */
	double stich_flood_ln_t;   /* Stichlmair flooding condition, ln t */
	double stich_flood_slope;  /* d residual / d ln u at the last flood point */
	double stich_wet_ln_y;     /* Stichlmair irrigated DP, ln(Pa/m) */
	double bs_flood_h;         /* Billet-Schultes flood holdup, - */
	double tray_flood_ln_gas;  /* gas rate at 100 % jet flood, ln(kg/s) */
	double tray_flood_slope;   /* d (jet % - 100) / d ln G there */
	double spray_vt_ln_re[2];  /* droplet terminal velocity: ln Re, and the slope there */
	double spray_crit_ln_re[2];/* critical (carried-over) droplet: ln Re, slope */
	double bubble_ay_eps;      /* Akita-Yoshida gas holdup, - (bubble and packed bubble) */
	double stich_wet_ln_t;     /* Stichlmair flooding condition at the operating gas rate */
	/* Values that depend only on their keys, kept between samples (each
	 * file says what it keeps). */
	struct solve_memo stich;   /* Stichlmair solve constants (packed.c) */
	struct solve_memo stich_geo; /* Stichlmair terms of the packing alone (packed.c) */
	struct solve_memo kg;      /* Kister-Gill flood DP (packed.c) */
	struct solve_memo tray_geom; /* tray terms of the geometry alone (tray.c) */
	struct solve_memo tray_sigma;/* Fair surface-tension factor (tray.c) */
	struct solve_memo tray_hr;   /* residual head (tray.c) */
	struct solve_memo bs_pow;    /* Billet-Schultes powers of a and mu_l/mu_g (packed.c) */
};

/* Sets every memory to NAN (cold). */
void solve_warm_clear(struct solve_warm *w);

/* Forgets the cached values only, keeping the warm starts: the next
 * evaluation computes them afresh (the tests compare it with a cached one). */
void solve_warm_drop_cache(struct solve_warm *w);

#endif
