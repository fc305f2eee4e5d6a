/*
 * stirred.c - gassed stirred vessels (see stirred.h for the models and their
 * sources).
 *
 * stirred_eval works on the ungassed liquid height h (the level signal, or
 * clear_liquid_height_m, or the vessel diameter as the usual H = T), the gas
 * flow at the sparger's pressure (the head-space gas density scaled by the
 * sparger pressure, ideal gas at the same temperature), and the impeller
 * speed. Without a positive speed there is no flow number, no Froude number,
 * no flooding and no power: those fields stay absent and the quality is bad.
 */
#include "stirred.h"

#include <assert.h>
#include <math.h>

#define STIRRED_G_MS2 9.80665 /* standard gravity, m/s2 (CGPM 1901) */

/* Ranges, from memory (see stirred.h). */
#define NWS_DT_MIN 0.2
#define NWS_DT_MAX 0.5
#define CUI_FL_MAX 0.15
#define HOLDUP_PV_MIN_WM3 100.0
#define HOLDUP_PV_MAX_WM3 5000.0
#define HOLDUP_US_MIN_MS 0.002
#define HOLDUP_US_MAX_MS 0.05
#define HOLDUP_MAX 0.6
#define HOLLOW_FLOOD_FACTOR 2.5

static bool positive(double v)
{
	return isfinite(v) && v > 0.0;
}

double stirred_power_number_default(enum impeller_type t)
{
	switch (t) {
	case IMPELLER_DISC_TURBINE: return 5.0;
	case IMPELLER_HOLLOW_BLADE: return 3.2;
	case IMPELLER_TYPE_COUNT: break;
	}
	return NAN;
}

double stirred_flow_number(double q_m3s, double n_rps, double d_m)
{
	if (!isfinite(q_m3s) || q_m3s < 0.0 || !positive(n_rps) || !positive(d_m))
		return NAN;
	return q_m3s / (n_rps * d_m * d_m * d_m);
}

double stirred_froude_number(double n_rps, double d_m)
{
	if (!isfinite(n_rps) || n_rps < 0.0 || !positive(d_m))
		return NAN;
	return n_rps * n_rps * d_m / STIRRED_G_MS2;
}

static bool known_type(enum impeller_type t)
{
	return t == IMPELLER_DISC_TURBINE || t == IMPELLER_HOLLOW_BLADE;
}

static void note_dt(double d_over_t, struct fg_extrap *x)
{
	if (d_over_t < NWS_DT_MIN || d_over_t > NWS_DT_MAX)
		fg_extrap_note(x, "Nienow-Warmoeskerken-Smith: D/T outside 0.2..0.5");
}

double stirred_flood_flow_number(enum impeller_type t, double froude, double d_over_t,
				 struct fg_extrap *x)
{
	if (!known_type(t) || !positive(froude) || !positive(d_over_t))
		return NAN;
	note_dt(d_over_t, x);
	double fl = 30.0 * froude * pow(d_over_t, 3.5);
	return t == IMPELLER_HOLLOW_BLADE ? HOLLOW_FLOOD_FACTOR * fl : fl;
}

double stirred_dispersion_flow_number(enum impeller_type t, double froude, double d_over_t,
				      struct fg_extrap *x)
{
	if (!known_type(t) || !positive(froude) || !positive(d_over_t))
		return NAN;
	note_dt(d_over_t, x);
	return 0.2 * sqrt(froude) * sqrt(d_over_t);
}

double stirred_power_ratio_model(enum impeller_type t, double flow_number,
				 struct fg_extrap *x)
{
	if (!isfinite(flow_number) || flow_number < 0.0 || t != IMPELLER_DISC_TURBINE)
		return NAN;
	double fl = flow_number;
	if (fl > CUI_FL_MAX) {
		fg_extrap_note(x, "Cui-van der Lans-Luyben: flow number above 0.15, ratio held");
		fl = CUI_FL_MAX;
	}
	return fl < 0.035 ? 1.0 - 12.6 * fl : 0.62 - 1.85 * fl;
}

double stirred_ungassed_power_w(double power_number, double rho_l_kgm3, double n_rps,
				double d_m)
{
	if (!isfinite(power_number) || power_number < 0.0 || !isfinite(rho_l_kgm3) ||
	    rho_l_kgm3 < 0.0 || !isfinite(n_rps) || n_rps < 0.0 || !isfinite(d_m) || d_m < 0.0)
		return NAN;
	double d2 = d_m * d_m;
	return power_number * rho_l_kgm3 * n_rps * n_rps * n_rps * d2 * d2 * d_m;
}

double stirred_power_ratio_measured(double motor_w, double loss_w, double efficiency,
				    double p0_w, struct fg_extrap *x)
{
	if (!isfinite(motor_w) || !positive(p0_w) || !isfinite(loss_w) || !isfinite(efficiency))
		return NAN;
	double shaft_w = (motor_w - loss_w) * efficiency;
	if (shaft_w < 0.0) {
		fg_extrap_note(x, "stirred: motor power below the drive losses, ratio 0");
		return 0.0;
	}
	return shaft_w / p0_w;
}

double stirred_holdup_frac(double power_per_volume_wm3, double us_ms, struct fg_extrap *x)
{
	if (!isfinite(power_per_volume_wm3) || power_per_volume_wm3 < 0.0 || !isfinite(us_ms) ||
	    us_ms < 0.0)
		return NAN;
	if (us_ms == 0.0)
		return 0.0;
	if (power_per_volume_wm3 < HOLDUP_PV_MIN_WM3 || power_per_volume_wm3 > HOLDUP_PV_MAX_WM3)
		fg_extrap_note(x, "stirred holdup: Pg/V outside 100..5000 W/m3");
	if (us_ms < HOLDUP_US_MIN_MS || us_ms > HOLDUP_US_MAX_MS)
		fg_extrap_note(x, "stirred holdup: gas velocity outside 0.002..0.05 m/s");
	double eps = 0.13 * pow(power_per_volume_wm3, 0.33) * pow(us_ms, 0.67);
	if (eps > HOLDUP_MAX) {
		fg_extrap_note(x, "stirred holdup: above 0.6, held");
		eps = HOLDUP_MAX;
	}
	return eps;
}

double stirred_sparger_pressure_pa(double p_top_pa, double rho_l_kgm3, double level_m,
				   double clearance_m)
{
	if (!isfinite(p_top_pa) || !isfinite(rho_l_kgm3) || !isfinite(level_m) ||
	    !isfinite(clearance_m))
		return NAN;
	double head_m = level_m - clearance_m;
	if (head_m < 0.0)
		head_m = 0.0;
	return p_top_pa + rho_l_kgm3 * STIRRED_G_MS2 * head_m;
}

/* Ungassed liquid height: the level signal, else the configured height, else
 * the vessel diameter (the usual H = T). */
static double liquid_height_m(const struct section_geom *g, const struct section_point *p)
{
	if (isfinite(p->level_m) && p->level_m >= 0.0)
		return p->level_m;
	if (positive(g->stirred.clear_liquid_height_m))
		return g->stirred.clear_liquid_height_m;
	return g->diameter_m;
}

/* Gas volume flow at the sparger, m3/s. */
static double sparger_gas_m3s(const struct section_geom *g, const struct fluid_state *f,
			      const struct section_point *p, double h_m)
{
	double rho_g = f->rho_g_kgm3;
	double p_sp = stirred_sparger_pressure_pa(p->pressure_pa, f->rho_l_kgm3, h_m,
						  g->stirred.impeller_clearance_m);
	/* Without a pressure signal (gas density tag) the head-space density is used. */
	if (positive(p_sp) && positive(p->pressure_pa))
		rho_g *= p_sp / p->pressure_pa;
	return p->gas_kgs / rho_g;
}

static void power_fields(const struct section_geom *g, const struct fluid_state *f,
			 const struct section_point *p, double fl, double *pg_w,
			 struct section_result *r)
{
	const struct stirred_geom *s = &g->stirred;
	double po = isfinite(s->power_number) ? s->power_number
					      : stirred_power_number_default(s->impeller);
	double p0 = stirred_ungassed_power_w(po, f->rho_l_kgm3, p->agitator_speed_rps,
					     s->impeller_diameter_m);
	double model = stirred_power_ratio_model(s->impeller, fl, &r->extrap);
	double eff = isfinite(s->drive_efficiency) ? s->drive_efficiency : 1.0;
	double loss = isfinite(s->drive_loss_w) ? s->drive_loss_w : 0.0;
	double meas = stirred_power_ratio_measured(p->motor_power_w, loss, eff, p0, &r->extrap);
	r->v[RF_POWER_RATIO_MODEL] = model;
	r->v[RF_POWER_RATIO_MEASURED] = meas;
	/* The plant's own power where it is measured, else the correlation's. */
	double ratio = isfinite(meas) ? meas : (isfinite(model) ? model : 1.0);
	*pg_w = ratio * p0;
}

void stirred_eval(const struct section_geom *g, const struct fluid_state *f,
		  const struct section_point *p, struct section_result *r)
{
	assert(g != NULL);
	assert(f != NULL);
	assert(p != NULL);
	assert(r != NULL);
	const struct stirred_geom *s = &g->stirred;
	double area_m2 = section_area_m2(g);
	double h_m = liquid_height_m(g, p);
	r->v[RF_LIQUID_HOLDUP_M3] = h_m * area_m2;
	r->basis = FLOOD_BASIS_IMPELLER;
	double n = p->agitator_speed_rps;
	double d = s->impeller_diameter_m;
	if (!positive(n) || !positive(d) || !positive(g->diameter_m) || !positive(f->rho_l_kgm3)) {
		/* Standing or unknown impeller: nothing that needs a speed exists. */
		fg_quality_raise(&r->quality, FG_QUALITY_BAD);
		return;
	}
	double q = sparger_gas_m3s(g, f, p, h_m);
	double fl = stirred_flow_number(q, n, d);
	double fr = stirred_froude_number(n, d);
	double dt = d / g->diameter_m;
	r->v[RF_FLOW_NUMBER] = fl;
	r->v[RF_FROUDE_NUMBER] = fr;
	double fl_f = stirred_flood_flow_number(s->impeller, fr, dt, &r->extrap);
	double fl_cd = stirred_dispersion_flow_number(s->impeller, fr, dt, NULL);
	if (isfinite(fl) && positive(fl_f))
		r->v[RF_FLOOD_PCT] = 100.0 * fl / fl_f;
	if (isfinite(fl) && positive(fl_cd))
		r->v[RF_DISPERSION_PCT] = 100.0 * fl / fl_cd;
	double pg_w = NAN;
	power_fields(g, f, p, fl, &pg_w, r);
	double v_m3 = h_m * area_m2;
	double us = p->gas_kgs / f->rho_g_kgm3 / area_m2;
	if (positive(v_m3)) {
		double eps = stirred_holdup_frac(pg_w / v_m3, us, &r->extrap);
		r->v[RF_GAS_HOLDUP_FRAC] = eps;
		if (isfinite(eps))
			r->v[RF_LIQUID_HOLDUP_FRAC] = 1.0 - eps;
	}
	if (!isfinite(r->v[RF_FLOOD_PCT]))
		fg_quality_raise(&r->quality, FG_QUALITY_BAD);
}
