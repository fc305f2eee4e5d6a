/*
 * spray.c - spray-tower hydraulics (see spray.h for the model and sources).
 *
 * Both root problems are solved the same way: a fixed number of bisection
 * steps on ln Re between RE_LO and RE_HI. The two functions bisected,
 * Cd Re^2 and Re / Cd, rise monotonically with Re over the subcritical
 * drag curve, so the bracket always holds the single root; 64 halvings of a
 * ln-width of 48 leave ~3e-18 relative, below double precision. A fixed
 * count keeps the per-sample cost bounded and the result deterministic.
 */
#include "spray.h"

#include <assert.h>
#include <math.h>
#include <stdbool.h>

#include "section.h"

#define RE_LO 1.0e-12
#define RE_HI 1.0e9
#define BISECT_STEPS 64

double spray_drag_coefficient(double re)
{
	if (!(re > 0.0) || !isfinite(re))
		return NAN;
	double w = log10(re);
	/* Clift, Grace & Weber (1978) Table 5.2, piece by piece. */
	if (re < 0.01)
		return 24.0 / re + 3.0 / 16.0;
	if (re < 20.0)
		return 24.0 / re * (1.0 + 0.1315 * pow(re, 0.82 - 0.05 * w));
	if (re < 260.0)
		return 24.0 / re * (1.0 + 0.1935 * pow(re, 0.6305));
	if (re < 1500.0)
		return pow(10.0, 1.6435 - 1.1242 * w + 0.1558 * w * w);
	if (re < 1.2e4)
		return pow(10.0, -2.4571 + 2.5558 * w - 0.9295 * w * w + 0.1049 * w * w * w);
	if (re < 4.4e4)
		return pow(10.0, -1.9181 + 0.6370 * w - 0.0636 * w * w);
	return pow(10.0, -4.3390 + 1.5809 * w - 0.1546 * w * w);
}

/* ln(Cd Re^2) or ln(Re / Cd): both rise with Re. */
static double force_group_ln(double re, bool per_cd)
{
	assert(re > 0.0);
	double cd = spray_drag_coefficient(re);
	assert(cd > 0.0);
	return per_cd ? log(re / cd) : log(cd * re * re);
}

/* Re at which the chosen group equals exp(target_ln), by bisection on ln Re. */
static double solve_re(double target_ln, bool per_cd)
{
	assert(isfinite(target_ln));
	double lo = log(RE_LO);
	double hi = log(RE_HI);
	if (force_group_ln(RE_LO, per_cd) >= target_ln)
		return RE_LO;
	if (force_group_ln(RE_HI, per_cd) <= target_ln)
		return RE_HI;
	for (int i = 0; i < BISECT_STEPS; i++) {
		double mid = 0.5 * (lo + hi);
		if (force_group_ln(exp(mid), per_cd) < target_ln)
			lo = mid;
		else
			hi = mid;
	}
	return exp(0.5 * (lo + hi));
}

static bool positive(double v)
{
	return isfinite(v) && v > 0.0;
}

double spray_terminal_velocity_ms(double d_m, double rho_l_kgm3, double rho_g_kgm3,
				  double mu_g_pas, struct fg_extrap *x)
{
	if (!positive(d_m) || !positive(rho_l_kgm3) || !positive(rho_g_kgm3) ||
	    !positive(mu_g_pas) || !(rho_l_kgm3 > rho_g_kgm3))
		return NAN;
	/* Archimedes number; the force balance is Cd Re^2 = 4/3 Ar. */
	double ar = rho_g_kgm3 * (rho_l_kgm3 - rho_g_kgm3) * SPRAY_G_MS2 * d_m * d_m * d_m /
		    (mu_g_pas * mu_g_pas);
	double re = solve_re(log(4.0 / 3.0 * ar), false);
	if (re > SPRAY_RE_MAX)
		fg_extrap_note(x, "spray: droplet Reynolds number above 3.38e5 (drag crisis)");
	return re * mu_g_pas / (rho_g_kgm3 * d_m);
}

double spray_critical_droplet_m(double ug_ms, double rho_l_kgm3, double rho_g_kgm3,
				double mu_g_pas, struct fg_extrap *x)
{
	if (!isfinite(ug_ms) || ug_ms < 0.0 || !positive(rho_l_kgm3) || !positive(rho_g_kgm3) ||
	    !positive(mu_g_pas) || !(rho_l_kgm3 > rho_g_kgm3))
		return NAN;
	if (ug_ms == 0.0)
		return 0.0;
	double k = 3.0 * rho_g_kgm3 * rho_g_kgm3 * ug_ms * ug_ms * ug_ms /
		   (4.0 * mu_g_pas * SPRAY_G_MS2 * (rho_l_kgm3 - rho_g_kgm3));
	double re = solve_re(log(k), true);
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
	double vt = spray_terminal_velocity_ms(s->design_droplet_m, f->rho_l_kgm3, f->rho_g_kgm3,
					       f->mu_g_pas, &r->extrap);
	note_deformation(s, f, &r->extrap);
	r->v[RF_FLOOD_PCT] = spray_approach_pct(ug, vt);
	r->basis = FLOOD_BASIS_DROPLET;
	double dc = spray_critical_droplet_m(ug, f->rho_l_kgm3, f->rho_g_kgm3, f->mu_g_pas,
					     &r->extrap);
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
