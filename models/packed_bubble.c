/*
 * packed_bubble.c - packed bubble columns (see packed_bubble.h for the holdup
 * bases, the impulse-line convention and the correlation).
 *
 * packed_bubble_eval prefers the tap holdup, as bubble_eval does, and
 * reports: gas_holdup_dp_frac and gas_holdup_frac per FREE volume (taps and
 * correlation), gas_holdup_column_frac per COLUMN volume (of the holdup
 * used), liquid_holdup_frac per column volume of the bed, liquid_holdup_m3 the
 * liquid held below the ungassed level, the expanded level against the
 * overflow (flood_pct) and the carry-over margin (overflow - expanded level).
 */
#include "packed_bubble.h"

#include <assert.h>
#include <math.h>

#include "bubble.h"
#include "section.h"
#include "solve.h"

static bool positive(double v)
{
	return isfinite(v) && v > 0.0;
}

static bool voidage_ok(double phi)
{
	return positive(phi) && phi <= 1.0;
}

double packed_bubble_tap_dp_pa(double dp_read_pa, double rho_fill_kgm3, double dz_m)
{
	if (!isfinite(dp_read_pa) || !isfinite(dz_m))
		return NAN;
	if (!isfinite(rho_fill_kgm3))
		return dp_read_pa;
	return dp_read_pa + rho_fill_kgm3 * BUBBLE_G_MS2 * dz_m;
}

static double holdup_free_frac_w(double ug_ms, double phi, double d_m, double rho_l_kgm3,
				 double mu_l_pas, double sigma_nm, bool electrolyte, bool hughmark,
				 struct fg_extrap *x, double *guess);

double packed_bubble_holdup_free_frac(double ug_ms, double phi, double d_m, double rho_l_kgm3,
				      double mu_l_pas, double sigma_nm, bool electrolyte,
				      bool hughmark, struct fg_extrap *x)
{
	return holdup_free_frac_w(ug_ms, phi, d_m, rho_l_kgm3, mu_l_pas, sigma_nm, electrolyte,
				  hughmark, x, NULL);
}

/* packed_bubble_holdup_free_frac with the Akita-Yoshida solve warm-started
 * from *guess (updated; NULL: cold), as bubble columns do. */
static double holdup_free_frac_w(double ug_ms, double phi, double d_m, double rho_l_kgm3,
				 double mu_l_pas, double sigma_nm, bool electrolyte, bool hughmark,
				 struct fg_extrap *x, double *guess)
{
	if (!voidage_ok(phi) || !isfinite(ug_ms) || ug_ms < 0.0)
		return NAN;
	double ui = ug_ms / phi;
	if (hughmark)
		return bubble_hughmark_frac(ui, d_m, rho_l_kgm3, sigma_nm, x);
	return bubble_akita_yoshida_frac_warm(ui, d_m, rho_l_kgm3, mu_l_pas, sigma_nm,
					      electrolyte, x, guess);
}

static double bed_top(double bed_m)
{
	return positive(bed_m) ? bed_m : INFINITY;
}

double packed_bubble_liquid_m(double h0_m, double phi, double bed_m)
{
	if (!isfinite(h0_m) || h0_m < 0.0 || !voidage_ok(phi))
		return NAN;
	double b = bed_top(bed_m);
	return phi * fmin(h0_m, b) + fmax(0.0, h0_m - b);
}

double packed_bubble_expanded_level_m(double h0_m, double eps_free, double phi, double bed_m)
{
	double liq = packed_bubble_liquid_m(h0_m, phi, bed_m);
	if (!isfinite(liq) || !isfinite(eps_free) || eps_free < 0.0 || !(eps_free < 1.0))
		return NAN;
	double b = bed_top(bed_m);
	double in_bed = phi * (1.0 - eps_free); /* liquid per height inside the bed */
	if (liq <= in_bed * b)
		return liq / in_bed;
	return b + (liq - in_bed * b) / (1.0 - eps_free);
}

/* Tap holdup per free volume, NAN when no taps; *usable when in range. */
static double tap_free_frac(const struct section_geom *g, const struct fluid_state *f,
			    const struct section_point *p, bool *usable, struct fg_extrap *x)
{
	*usable = false;
	double dz = g->bubble.tap_spacing_m;
	if (!isfinite(p->dp_pa) || !positive(dz))
		return NAN;
	double dp = packed_bubble_tap_dp_pa(p->dp_pa, g->pbub.impulse_density_kgm3, dz);
	bool clamped = false;
	double eps = bubble_holdup_dp_frac(dp, dz, f->rho_l_kgm3, f->rho_g_kgm3, &clamped, x);
	*usable = isfinite(eps) && !clamped;
	return eps;
}

void packed_bubble_eval(const struct section_geom *g, const struct fluid_state *f,
			const struct section_point *p, struct section_result *r)
{
	packed_bubble_eval_warm(g, f, p, r, NULL);
}

void packed_bubble_eval_warm(const struct section_geom *g, const struct fluid_state *f,
			     const struct section_point *p, struct section_result *r,
			     struct solve_warm *w)
{
	assert(g != NULL);
	assert(f != NULL);
	assert(p != NULL);
	assert(r != NULL);
	const struct bubble_geom *b = &g->bubble;
	double phi = g->pbub.void_frac;
	double ug = r->v[RF_GAS_VELOCITY];
	r->basis = FLOOD_BASIS_LEVEL_SWELL;
	if (!voidage_ok(phi) || !isfinite(ug) || ug < 0.0 || !positive(f->rho_l_kgm3)) {
		fg_quality_raise(&r->quality, FG_QUALITY_BAD);
		return;
	}
	double eps_corr = holdup_free_frac_w(
		ug, phi, g->diameter_m, f->rho_l_kgm3, f->mu_l_pas, f->sigma_nm, b->electrolyte,
		b->holdup_method == BUBBLE_HOLDUP_HUGHMARK, &r->extrap,
		w != NULL ? &w->bubble_ay_eps : NULL);
	r->v[RF_GAS_HOLDUP_FRAC] = eps_corr;
	bool tap_ok = false;
	double eps_tap = tap_free_frac(g, f, p, &tap_ok, &r->extrap);
	r->v[RF_GAS_HOLDUP_DP_FRAC] = eps_tap;
	if (isfinite(eps_tap) && !tap_ok)
		fg_quality_raise(&r->quality, FG_QUALITY_UNCERTAIN);
	double eps = tap_ok ? eps_tap : eps_corr;
	if (isfinite(eps)) {
		r->v[RF_GAS_HOLDUP_COLUMN_FRAC] = phi * eps;
		r->v[RF_LIQUID_HOLDUP_FRAC] = phi * (1.0 - eps);
	}
	double u_trans = bubble_wilkinson_transition_ms(f->rho_l_kgm3, f->rho_g_kgm3,
							f->mu_l_pas, f->sigma_nm, NULL);
	r->regime = bubble_regime_at(ug / phi, u_trans);

	double h0 = isfinite(p->level_m) ? p->level_m : b->clear_liquid_height_m;
	double bed = g->pbub.bed_height_m;
	double liq = packed_bubble_liquid_m(h0, phi, bed);
	if (isfinite(liq))
		r->v[RF_LIQUID_HOLDUP_M3] = liq * section_area_m2(g);
	double level = packed_bubble_expanded_level_m(h0, eps, phi, bed);
	r->v[RF_EXPANDED_LEVEL_M] = level;
	if (!isfinite(level) || !positive(b->overflow_height_m)) {
		fg_quality_raise(&r->quality, FG_QUALITY_BAD);
		return;
	}
	r->v[RF_FLOOD_PCT] = 100.0 * level / b->overflow_height_m;
	r->v[RF_CARRYOVER_MARGIN_M] = b->overflow_height_m - level;
}
