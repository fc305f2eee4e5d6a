/*
 * spray.c - spray-tower hydraulics (see spray.h for the model and sources).
 *
 * Both root problems are solved the same way: a fixed number of bisection
 * steps on ln Re inside one piece of the drag table. The two functions
 * bisected, Cd Re^2 and Re / Cd, rise with Re within each piece, but drop a
 * little where the pieces meet, so the answer is defined as the first Re
 * that reaches the target (see solve_re); 64 halvings of a ln-width of at
 * most 48 leave ~3e-18 relative, below double precision. A fixed count
 * keeps the per-sample cost bounded and the result deterministic. The warm
 * variants (spray.h) find the same first crossing from the last answer.
 */
#include "spray.h"

#include <assert.h>
#include <math.h>
#include <stdbool.h>

#include "section.h"
#include "solve.h"

#define RE_LO 1.0e-12
#define RE_HI 1.0e9
#define BISECT_STEPS 64

/* The pieces of the drag curve: piece k holds for PIECE_LO[k] <= Re <
 * PIECE_LO[k + 1]. */
#define PIECE_COUNT 7
static const double PIECE_LO[PIECE_COUNT + 1] = {0.0, 0.01, 20.0, 260.0, 1500.0, 1.2e4, 4.4e4,
						 INFINITY};

static int piece_of(double re)
{
	int k = 0;
	while (k < PIECE_COUNT - 1 && re >= PIECE_LO[k + 1])
		k++;
	return k;
}

/* Clift, Grace & Weber (1978) Table 5.2, piece k at Re (w = log10 Re). */
static double cd_piece(int k, double re)
{
	double w = log10(re);
	switch (k) {
	case 0: return 24.0 / re + 3.0 / 16.0;
	case 1: return 24.0 / re * (1.0 + 0.1315 * pow(re, 0.82 - 0.05 * w));
	case 2: return 24.0 / re * (1.0 + 0.1935 * pow(re, 0.6305));
	case 3: return pow(10.0, 1.6435 - 1.1242 * w + 0.1558 * w * w);
	case 4: return pow(10.0, -2.4571 + 2.5558 * w - 0.9295 * w * w + 0.1049 * w * w * w);
	case 5: return pow(10.0, -1.9181 + 0.6370 * w - 0.0636 * w * w);
	default: return pow(10.0, -4.3390 + 1.5809 * w - 0.1546 * w * w);
	}
}

double spray_drag_coefficient(double re)
{
	if (!(re > 0.0) || !isfinite(re))
		return NAN;
	return cd_piece(piece_of(re), re);
}

/* ln(Cd Re^2) or ln(Re / Cd) with piece k's drag: both rise with Re. */
static double group_ln(int k, double re, bool per_cd)
{
	assert(re > 0.0);
	double cd = cd_piece(k, re);
	assert(cd > 0.0);
	return per_cd ? log(re / cd) : log(cd * re * re);
}

struct group_target {
	double ln;
	bool per_cd;
	int piece;
};

static double group_resid(double ln_re, const void *ctx)
{
	const struct group_target *g = ctx;
	return group_ln(g->piece, exp(ln_re), g->per_cd) - g->ln;
}

/* The ends of the search in piece k, ln Re. */
static double piece_ln_lo(int k)
{
	return k == 0 ? log(RE_LO) : log(PIECE_LO[k]);
}

static double piece_ln_hi(int k)
{
	return k == PIECE_COUNT - 1 ? log(RE_HI) : log(PIECE_LO[k + 1]);
}

/*
 * Re at which the chosen group equals exp(target_ln): the smallest Re where
 * the group reaches the target. The table's pieces do not join exactly (the
 * group drops by up to 0.75 % at Re = 20), so near a joint the target can be
 * met two or three times; taking the first makes the answer one number, the
 * same for the cold and the warm solve. Each piece is continuous and rising:
 * the first piece whose upper end reaches the target holds the answer, at
 * its lower joint when the target fell in the drop, else by bisection on
 * ln Re inside it.
 */
static double solve_re(double target_ln, bool per_cd)
{
	assert(isfinite(target_ln));
	if (group_ln(0, RE_LO, per_cd) >= target_ln)
		return RE_LO;
	int k = 0;
	while (k < PIECE_COUNT - 1 && group_ln(k, PIECE_LO[k + 1], per_cd) < target_ln)
		k++;
	if (k == PIECE_COUNT - 1 && group_ln(k, RE_HI, per_cd) <= target_ln)
		return RE_HI;
	if (k > 0 && group_ln(k, PIECE_LO[k], per_cd) >= target_ln)
		return PIECE_LO[k];
	double lo = piece_ln_lo(k), hi = piece_ln_hi(k);
	for (int i = 0; i < BISECT_STEPS; i++) {
		double mid = 0.5 * (lo + hi);
		if (group_ln(k, exp(mid), per_cd) < target_ln)
			lo = mid;
		else
			hi = mid;
	}
	return exp(0.5 * (lo + hi));
}

/* group_ln of piece k - 1 at its upper joint PIECE_LO[k] (index [per_cd][k]),
 * as group_ln computes it, printed to 17 digits: the test that a warm root
 * is the first crossing compares the target with it. Where the target lies
 * within 1e-9 of one, the test calls group_ln itself, so the table's last
 * digit can never decide it. */
static const double JOINT_LN[2][PIECE_COUNT] = {
	{NAN, -1.4270382336917444, 6.9901344567874926, 10.746474956607786, 13.808054558409712,
	 17.915153399968702, 20.620486710285917},
	{NAN, -12.388472324272529, 1.9970623638744802, 5.9355699364387977, 8.1316066028611935,
	 10.262832386341712, 11.45534802841528},
};

/* ln PIECE_LO[k] and the ends of the search, to 17 digits. */
static const double PIECE_LN[PIECE_COUNT + 1] = {
	-27.631021115928547, -4.6051701859880909, 2.9957322735539909, 5.5606816310155276,
	7.3132203870903014, 9.3926619287701367, 10.691944912900398, 20.72326583694641};

static bool first_crossing(int k, bool per_cd, double target_ln)
{
	if (k == 0)
		return true;
	double j = JOINT_LN[per_cd][k];
	if (fabs(target_ln - j) > 1e-9 * (1.0 + fabs(j)))
		return j < target_ln;
	return group_ln(k - 1, PIECE_LO[k], per_cd) < target_ln;
}

/*
 * The group of piece k at s = ln Re and its derivative d/ds, in closed form:
 * pieces 3..6 are ln Cd = ln 10 P(w), w = s/ln 10, so d ln Cd/ds = P'(w)
 * and no logarithm or power is needed; pieces 0..2 are 24/Re (1 + a Re^b)
 * forms (piece 0: 24/Re + 3/16) with one exp and one log.
 */
static double group_d(int k, double s, bool per_cd, double *dg)
{
	const double ln10 = 2.302585092994045684;
	double w = s / ln10, ln_cd, d;
	switch (k) {
	case 0: {
		double re = exp(s), cd = 24.0 / re + 3.0 / 16.0;
		ln_cd = log(cd);
		d = -24.0 / (re * cd);
		break;
	}
	case 1: {
		/* Re^(0.82 - 0.05 w): its log (0.82 - 0.05 w) s rises at 0.82 - 0.1 w */
		double q = 0.1315 * exp((0.82 - 0.05 * w) * s);
		ln_cd = log(24.0 * (1.0 + q)) - s;
		d = -1.0 + q * (0.82 - 0.1 * w) / (1.0 + q);
		break;
	}
	case 2: {
		double q = 0.1935 * exp(0.6305 * s);
		ln_cd = log(24.0 * (1.0 + q)) - s;
		d = -1.0 + q * 0.6305 / (1.0 + q);
		break;
	}
	case 3:
		ln_cd = ln10 * (1.6435 - 1.1242 * w + 0.1558 * w * w);
		d = -1.1242 + 0.3116 * w;
		break;
	case 4:
		ln_cd = ln10 * (-2.4571 + 2.5558 * w - 0.9295 * w * w + 0.1049 * w * w * w);
		d = 2.5558 - 1.859 * w + 0.3147 * w * w;
		break;
	case 5:
		ln_cd = ln10 * (-1.9181 + 0.6370 * w - 0.0636 * w * w);
		d = 0.6370 - 0.1272 * w;
		break;
	default:
		ln_cd = ln10 * (-4.3390 + 1.5809 * w - 0.1546 * w * w);
		d = 1.5809 - 0.3092 * w;
		break;
	}
	*dg = per_cd ? 1.0 - d : 2.0 + d;
	return per_cd ? s - ln_cd : ln_cd + 2.0 * s;
}

/* Newton on ln Re inside piece k from *s (updated on success), to
 * SOLVE_TOL_LN by solve_newton_done. 0 on success; +1 or -1 when a step
 * leaves the piece upwards or downwards; 2 when it does not converge. */
static int piece_newton(int k, bool per_cd, double target_ln, double *s)
{
	double x = *s, prev = NAN;
	for (int i = 0; i < SOLVE_NEWTON_STEPS; i++) {
		double dg, g = group_d(k, x, per_cd, &dg);
		double step = (g - target_ln) / dg;
		x -= step;
		if (!isfinite(x))
			return 2;
		if (!(x > PIECE_LN[k]))
			return -1;
		if (!(x < PIECE_LN[k + 1]))
			return 1;
		if (solve_newton_done(step, prev, SOLVE_TOL_LN)) {
			*s = x;
			return 0;
		}
		prev = step;
	}
	return 2;
}

/* solve_re by Newton from ln Re = *s (updated): in the guess's piece k, and
 * when a step leaves it, in the next piece up or down from the joint (a
 * droplet near a joint crosses it from sample to sample). Gives the answer
 * solve_re defines: the root in the first piece that reaches the target, or
 * the joint itself when the target falls in the drop there. False after
 * three pieces or when Newton fails: the caller then solves by bracketing. */
static bool newton_re(int k, bool per_cd, double target_ln, double *s)
{
	double x = *s;
	for (int tries = 0; tries < 3; tries++) {
		int rc = piece_newton(k, per_cd, target_ln, &x);
		if (rc == 0) {
			if (!first_crossing(k, per_cd, target_ln))
				return false;
			*s = x;
			return true;
		}
		if (rc == 1 && k < PIECE_COUNT - 1) {
			k++;
			x = PIECE_LN[k];
		} else if (rc == -1 && k > 0) {
			if (first_crossing(k, per_cd, target_ln)) {
				/* Piece k - 1 does not reach the target; piece k starts
				 * above it: the target is in the drop at the joint. */
				if (!(group_ln(k, PIECE_LO[k], per_cd) >= target_ln))
					return false;
				*s = log(PIECE_LO[k]);
				return true;
			}
			x = PIECE_LN[k];
			k--;
		} else {
			return false;
		}
	}
	return false;
}

/* solve_re from the guess ln_re[0] (updated; ln_re[1] keeps the slope of
 * the group at the answer for the next secant), cold when ln_re is NULL or
 * the guess brackets nothing. The warm solve stays inside the guess's piece and
 * is accepted only when the piece below does not reach the target already
 * (so it is the first crossing, as solve_re defines it). */
static double solve_re_w(double target_ln, bool per_cd, double *ln_re)
{
	if (ln_re != NULL && isfinite(*ln_re) && *ln_re > PIECE_LN[0] &&
	    *ln_re < PIECE_LN[PIECE_COUNT]) {
		int k = 0;
		while (k < PIECE_COUNT - 1 && *ln_re >= PIECE_LN[k + 1])
			k++;
		double x = *ln_re;
		/* The piece of the guess, as piece_of(exp(guess)) would say,
		 * away from a joint; at a joint piece_of decides. */
		if (fabs(x - PIECE_LN[k]) < 1e-12 || fabs(x - PIECE_LN[k + 1]) < 1e-12)
			k = piece_of(exp(x));
		if (newton_re(k, per_cd, target_ln, &x)) {
			*ln_re = x;
			return exp(x);
		}
		struct group_target gt = {.ln = target_ln, .per_cd = per_cd, .piece = k};
		double root, lo = piece_ln_lo(k), hi = piece_ln_hi(k);
		double guess = fmin(fmax(*ln_re, lo), hi);
		bool first = first_crossing(k, per_cd, target_ln);
		if (first && (solve_secant(group_resid, &gt, lo, hi, guess, &ln_re[1], 1e-3,
					   SOLVE_TOL_LN, &root) ||
			      solve_near(group_resid, &gt, lo, hi, true, guess, 1e-3, SOLVE_TOL_LN,
					 &root, NULL))) {
			*ln_re = root;
			return exp(root);
		}
	}
	double re = solve_re(target_ln, per_cd);
	if (ln_re != NULL)
		*ln_re = log(re);
	return re;
}

static bool positive(double v)
{
	return isfinite(v) && v > 0.0;
}

double spray_terminal_velocity_ms(double d_m, double rho_l_kgm3, double rho_g_kgm3,
				  double mu_g_pas, struct fg_extrap *x)
{
	return spray_terminal_velocity_ms_warm(d_m, rho_l_kgm3, rho_g_kgm3, mu_g_pas, x, NULL);
}

double spray_terminal_velocity_ms_warm(double d_m, double rho_l_kgm3, double rho_g_kgm3,
				       double mu_g_pas, struct fg_extrap *x, double *ln_re)
{
	if (!positive(d_m) || !positive(rho_l_kgm3) || !positive(rho_g_kgm3) ||
	    !positive(mu_g_pas) || !(rho_l_kgm3 > rho_g_kgm3))
		return NAN;
	/* Archimedes number; the force balance is Cd Re^2 = 4/3 Ar. */
	double ar = rho_g_kgm3 * (rho_l_kgm3 - rho_g_kgm3) * SPRAY_G_MS2 * d_m * d_m * d_m /
		    (mu_g_pas * mu_g_pas);
	double re = solve_re_w(log(4.0 / 3.0 * ar), false, ln_re);
	if (re > SPRAY_RE_MAX)
		fg_extrap_note(x, "spray: droplet Reynolds number above 3.38e5 (drag crisis)");
	return re * mu_g_pas / (rho_g_kgm3 * d_m);
}

double spray_critical_droplet_m(double ug_ms, double rho_l_kgm3, double rho_g_kgm3,
				double mu_g_pas, struct fg_extrap *x)
{
	return spray_critical_droplet_m_warm(ug_ms, rho_l_kgm3, rho_g_kgm3, mu_g_pas, x, NULL);
}

double spray_critical_droplet_m_warm(double ug_ms, double rho_l_kgm3, double rho_g_kgm3,
				     double mu_g_pas, struct fg_extrap *x, double *ln_re)
{
	if (!isfinite(ug_ms) || ug_ms < 0.0 || !positive(rho_l_kgm3) || !positive(rho_g_kgm3) ||
	    !positive(mu_g_pas) || !(rho_l_kgm3 > rho_g_kgm3))
		return NAN;
	if (ug_ms == 0.0)
		return 0.0;
	double k = 3.0 * rho_g_kgm3 * rho_g_kgm3 * ug_ms * ug_ms * ug_ms /
		   (4.0 * mu_g_pas * SPRAY_G_MS2 * (rho_l_kgm3 - rho_g_kgm3));
	double re = solve_re_w(log(k), true, ln_re);
	if (re > SPRAY_RE_MAX)
		fg_extrap_note(x, "spray: droplet Reynolds number above 3.38e5 (drag crisis)");
	return re * mu_g_pas / (rho_g_kgm3 * ug_ms);
}

double spray_approach_pct(double ug_ms, double vt_ms)
{
	if (!isfinite(ug_ms) || !positive(vt_ms))
		return NAN;
	return 100.0 * ug_ms / vt_ms;
}

double spray_rosin_rammler_finer(double d_m, double d_size_m, double n)
{
	if (!positive(d_size_m) || !positive(n) || !isfinite(d_m) || d_m < 0.0)
		return NAN;
	return 1.0 - exp(-pow(d_m / d_size_m, n));
}

double spray_holdup_frac(double ul_ms, double vt_ms, double ug_ms, struct fg_extrap *x)
{
	if (!isfinite(ul_ms) || ul_ms < 0.0 || !isfinite(vt_ms) || !isfinite(ug_ms) ||
	    ug_ms < 0.0)
		return NAN;
	if (!(vt_ms > ug_ms))
		return NAN;
	double h = ul_ms / (vt_ms - ug_ms);
	if (h > SPRAY_DILUTE_MAX) {
		fg_extrap_note(x, "spray: liquid in flight above 10 % (not a dilute spray); "
				  "holdup undefined");
		return NAN;
	}
	return h;
}

static bool spray_inputs_usable(const struct section_geom *g, const struct fluid_state *f)
{
	return positive(g->diameter_m) && positive(g->spray.height_m) &&
	       positive(g->spray.design_droplet_m) && positive(g->spray.droplet_spread) &&
	       positive(f->rho_g_kgm3) && positive(f->rho_l_kgm3) && positive(f->mu_g_pas) &&
	       f->rho_l_kgm3 > f->rho_g_kgm3;
}

/* Notes a design droplet so large that it is no longer a rigid sphere. The
 * surface tension is only needed here; a missing one skips the check. */
static void note_deformation(const struct spray_geom *s, const struct fluid_state *f,
			     struct fg_extrap *x)
{
	if (!positive(f->sigma_nm))
		return;
	double eo = SPRAY_G_MS2 * (f->rho_l_kgm3 - f->rho_g_kgm3) * s->design_droplet_m *
		    s->design_droplet_m / f->sigma_nm;
	if (eo > SPRAY_EOTVOS_MAX)
		fg_extrap_note(x, "spray: design droplet deformed (Eotvos > 0.5), rigid-sphere "
				  "terminal velocity too high");
}

void spray_eval(const struct section_geom *g, const struct fluid_state *f,
		const struct section_point *p, struct section_result *r)
{
	spray_eval_warm(g, f, p, r, NULL);
}

void spray_eval_warm(const struct section_geom *g, const struct fluid_state *f,
		     const struct section_point *p, struct section_result *r,
		     struct solve_warm *w)
{
	assert(g != NULL);
	assert(f != NULL);
	assert(p != NULL);
	assert(r != NULL);
	double ug = r->v[RF_GAS_VELOCITY];
	if (!spray_inputs_usable(g, f) || !isfinite(ug) || ug < 0.0) {
		fg_quality_raise(&r->quality, FG_QUALITY_BAD);
		return;
	}
	const struct spray_geom *s = &g->spray;
	double vt = spray_terminal_velocity_ms_warm(s->design_droplet_m, f->rho_l_kgm3,
						    f->rho_g_kgm3, f->mu_g_pas, &r->extrap,
						    w != NULL ? w->spray_vt_ln_re : NULL);
	note_deformation(s, f, &r->extrap);
	/* The calibrated plant capacity scales the terminal velocity the gas
	 * is compared with (the liquid in flight below keeps the droplet's own). */
	r->v[RF_FLOOD_PCT] = spray_approach_pct(ug, vt * section_capacity_factor(g));
	r->basis = FLOOD_BASIS_DROPLET;
	double dc = spray_critical_droplet_m_warm(ug, f->rho_l_kgm3, f->rho_g_kgm3, f->mu_g_pas,
						  &r->extrap, w != NULL ? w->spray_crit_ln_re : NULL);
	r->v[RF_CARRYOVER_FRAC] = spray_rosin_rammler_finer(dc, s->design_droplet_m,
							   s->droplet_spread);
	/* Liquid in flight needs the liquid rate; section_eval guarantees it,
	 * a direct caller may not. */
	if (!isfinite(p->liquid_kgs) || p->liquid_kgs < 0.0) {
		fg_quality_raise(&r->quality, FG_QUALITY_BAD);
		return;
	}
	if (!(vt > ug)) {
		fg_extrap_note(&r->extrap, "spray: design droplet carried over (gas velocity at or "
					   "above its terminal velocity); liquid in flight undefined");
		fg_quality_raise(&r->quality, FG_QUALITY_UNCERTAIN);
		return;
	}
	double area_m2 = section_area_m2(g);
	double ul = p->liquid_kgs / (f->rho_l_kgm3 * area_m2);
	double h = spray_holdup_frac(ul, vt, ug, &r->extrap);
	if (isnan(h)) {
		/* Not a dilute spray: no value rather than a made-up one. */
		fg_quality_raise(&r->quality, FG_QUALITY_UNCERTAIN);
		return;
	}
	r->v[RF_LIQUID_HOLDUP_FRAC] = h;
	r->v[RF_LIQUID_HOLDUP_M3] = h * area_m2 * s->height_m;
}
