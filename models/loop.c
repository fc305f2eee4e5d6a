/*
 * loop.c - natural-circulation loops (see loop.h for the models, their
 * sources and how holdup varies with depth).
 *
 * loop_eval takes the riser and downcomer holdups from their DP cells (taps
 * tap_spacing_m apart, default the loop height; the DP signals are tap to
 * tap: p(lower) - p(upper), impulse-line heads already removed, as for the
 * bubble column), and neglects the friction of the liquid flowing past the
 * taps against the hydrostatic head (small at the velocities of these loops,
 * 0.1..1 m/s over a few metres). The circulation velocity follows from
 * Chisti's balance with those holdups.
 */
#include "loop.h"

#include <assert.h>
#include <math.h>

#include "bubble.h"
#include "section.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

#define LOOP_G_MS2 9.80665
#define CHISTI_ADAB_MIN 0.2
#define CHISTI_ADAB_MAX 5.0
#define LOOP_EPS_MAX 0.9

static bool positive(double v)
{
	return isfinite(v) && v > 0.0;
}

double loop_bottom_loss(double ad_over_ab, struct fg_extrap *x)
{
	if (!positive(ad_over_ab))
		return NAN;
	if (ad_over_ab < CHISTI_ADAB_MIN || ad_over_ab > CHISTI_ADAB_MAX)
		fg_extrap_note(x, "Chisti: A_d/A_b outside 0.2..5");
	return 11.402 * pow(ad_over_ab, 0.789);
}

double loop_bottom_area_m2(double riser_area_m2, double clearance_m)
{
	if (!positive(riser_area_m2) || !positive(clearance_m))
		return NAN;
	double d_r = sqrt(4.0 * riser_area_m2 / M_PI);
	return M_PI * d_r * clearance_m;
}

static double clamp_eps(double eps, struct fg_extrap *x)
{
	if (eps < 0.0) {
		fg_extrap_note(x, "Chisti: negative holdup, taken as 0");
		return 0.0;
	}
	if (eps > LOOP_EPS_MAX) {
		fg_extrap_note(x, "Chisti: holdup above 0.9, held");
		return LOOP_EPS_MAX;
	}
	return eps;
}

double loop_circulation_ms(double h_m, double eps_r, double eps_d, double riser_area_m2,
			   double downcomer_area_m2, double k_top, double k_bottom,
			   struct fg_extrap *x)
{
	if (!positive(h_m) || !isfinite(eps_r) || !isfinite(eps_d) || !positive(riser_area_m2) ||
	    !positive(downcomer_area_m2) || !isfinite(k_top) || !isfinite(k_bottom) ||
	    k_top < 0.0 || k_bottom < 0.0 || !(k_top + k_bottom > 0.0))
		return NAN;
	double er = clamp_eps(eps_r, x);
	double ed = clamp_eps(eps_d, x);
	if (er <= ed)
		return 0.0;
	double ratio = riser_area_m2 / downcomer_area_m2;
	double omr = 1.0 - er;
	double omd = 1.0 - ed;
	double resist = k_top / (omr * omr) + k_bottom * ratio * ratio / (omd * omd);
	return sqrt(2.0 * LOOP_G_MS2 * h_m * (er - ed) / resist);
}

double loop_carry_under_m3s(double u_lr_ms, double eps_d, double riser_area_m2,
			    double downcomer_area_m2, double slip_ms)
{
	if (!isfinite(u_lr_ms) || !isfinite(eps_d) || !positive(riser_area_m2) ||
	    !positive(downcomer_area_m2) || !isfinite(slip_ms))
		return NAN;
	if (eps_d <= 0.0 || u_lr_ms <= 0.0)
		return 0.0;
	double ed = eps_d < LOOP_EPS_MAX ? eps_d : LOOP_EPS_MAX;
	double v_down = u_lr_ms * riser_area_m2 / downcomer_area_m2 / (1.0 - ed);
	double v_gas = v_down - slip_ms;
	return v_gas > 0.0 ? v_gas * ed * downcomer_area_m2 : 0.0;
}

double loop_stall_pct(double eps_r, double eps_d)
{
	if (!isfinite(eps_r) || !isfinite(eps_d) || eps_r < LOOP_RISER_HOLDUP_MIN)
		return NAN;
	return 100.0 * (eps_d > 0.0 ? eps_d : 0.0) / eps_r;
}

double loop_holdup_depth_ratio(double p_top_pa, double rho_l_kgm3, double z_m)
{
	if (!positive(p_top_pa) || !positive(rho_l_kgm3) || !isfinite(z_m) || z_m < 0.0)
		return NAN;
	return p_top_pa / (p_top_pa + rho_l_kgm3 * LOOP_G_MS2 * z_m);
}

/* Holdup from one DP cell; NAN when absent. A clamped value is kept (0 or 1)
 * and makes the result uncertain. */
static double holdup_from(double dp_pa, double dz_m, const struct fluid_state *f,
			  struct section_result *r)
{
	if (!isfinite(dp_pa))
		return NAN;
	bool clamped = false;
	double eps = bubble_holdup_dp_frac(dp_pa, dz_m, f->rho_l_kgm3, f->rho_g_kgm3, &clamped,
					   &r->extrap);
	if (clamped)
		fg_quality_raise(&r->quality, FG_QUALITY_UNCERTAIN);
	return eps;
}

void loop_eval(const struct section_geom *g, const struct fluid_state *f,
	       const struct section_point *p, struct section_result *r)
{
	assert(g != NULL);
	assert(f != NULL);
	assert(p != NULL);
	assert(r != NULL);
	const struct loop_geom *l = &g->loop;
	r->basis = FLOOD_BASIS_DOWNCOMER_GAS;
	double dz = positive(l->tap_spacing_m) ? l->tap_spacing_m : l->height_m;
	double er = holdup_from(p->dp_riser_pa, dz, f, r);
	double ed = holdup_from(p->dp_downcomer_pa, dz, f, r);
	r->v[RF_RISER_HOLDUP_FRAC] = er;
	r->v[RF_DOWNCOMER_HOLDUP_FRAC] = ed;
	if (!isfinite(er) || !isfinite(ed)) {
		fg_quality_raise(&r->quality, FG_QUALITY_BAD);
		return;
	}
	double ar = l->riser_area_m2, ad = l->downcomer_area_m2;
	double vol_m3 = (ar + ad) * l->height_m;
	r->v[RF_LIQUID_HOLDUP_M3] = l->height_m * (ar * (1.0 - er) + ad * (1.0 - ed));
	if (positive(vol_m3))
		r->v[RF_LIQUID_HOLDUP_FRAC] = r->v[RF_LIQUID_HOLDUP_M3] / vol_m3;
	double ab = loop_bottom_area_m2(ar, l->bottom_clearance_m);
	double kb = positive(ab) ? loop_bottom_loss(ad / ab, &r->extrap) : NAN;
	double kt = isfinite(l->top_loss) ? l->top_loss : 0.0;
	double u = loop_circulation_ms(l->height_m, er, ed, ar, ad, kt, kb, &r->extrap);
	r->v[RF_CIRCULATION_VELOCITY] = u;
	r->v[RF_CARRY_UNDER_M3S] = loop_carry_under_m3s(u, ed, ar, ad, LOOP_BUBBLE_SLIP_MS);
	if (positive(l->circulation_normal_ms) && isfinite(u))
		r->v[RF_CIRCULATION_PCT] = 100.0 * u / l->circulation_normal_ms;
	r->v[RF_FLOOD_PCT] = loop_stall_pct(er, ed);
	if (!isfinite(r->v[RF_FLOOD_PCT]) || !isfinite(u))
		fg_quality_raise(&r->quality, FG_QUALITY_UNCERTAIN);
}
