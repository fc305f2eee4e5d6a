/*
 * opwindow.c - the limit lines of a section's operating window, see
 * opwindow.h.
 *
 * How it is built. The limits are found with the monitor's own models: the
 * recorded tag values of one row (pressure, temperature, density, level ...)
 * are kept, the gas and x loads are set in their tags' own units, and
 * point_from_tags + section_eval_warm give flood_pct (and weep_pct for a tray),
 * exactly as `floodgauge rate` would. For each x the gas load at flood_pct
 * 100 % (and at weep_pct 100 %) is found by bisection: flood_pct and weep_pct
 * both rise with the gas load at a fixed liquid load, which every model here
 * does (more gas: higher velocity, higher approach; higher hole velocity,
 * further from weeping).
 */
#include "opwindow.h"

#include <assert.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "point.h"

#define BISECT_STEPS 48   /* 2^-48 of the bracket: far below any plotted pixel */
#define EXPAND_STEPS 40   /* 1.5^40 = 1e7 times the recorded gas load at most */

static double field_at(const struct fg_config *cfg, unsigned si, const struct section_geom *geom,
		       double *vals, int gi, int xi, double g, double x, int field,
		       struct solve_warm *w)
{
	const struct section_cfg *s = &cfg->sections[si];
	vals[gi] = g;
	vals[xi] = x;
	struct section_point p;
	point_from_tags(cfg, si, vals, &p);
	p.dp_pa = NAN; /* the limits are the model's, not the measured DP's */
	struct section_result r;
	section_eval_warm(geom, &s->props, &p, &r, w);
	return r.v[field];
}

/* The gas load (tag unit) at which field reaches target at x, NAN when it
 * does not within reach. */
static double gas_at(const struct fg_config *cfg, unsigned si, const struct section_geom *geom,
		     double *vals, int gi, int xi, double x, double g_ref, int field, double target)
{
	double lo = 0.0, hi = g_ref > 0.0 ? g_ref : 1.0;
	/* One search walks along one liquid load: its solves start from the
	 * last evaluation's answers, as the engine's do from sample to sample
	 * (the same results to 1e-9; the cold solves made the report's window
	 * cost as much as 100 000 replayed rows). */
	struct solve_warm w;
	solve_warm_clear(&w);
	int n = 0;
	for (; n < EXPAND_STEPS; n++) {
		double v = field_at(cfg, si, geom, vals, gi, xi, hi, x, field, &w);
		if (isfinite(v) && v >= target)
			break;
		lo = hi;
		hi *= 1.5;
	}
	if (n == EXPAND_STEPS)
		return NAN;
	for (int i = 0; i < BISECT_STEPS; i++) {
		double mid = 0.5 * (lo + hi);
		double v = field_at(cfg, si, geom, vals, gi, xi, mid, x, field, &w);
		if (isfinite(v) && v >= target)
			hi = mid;
		else
			lo = mid;
	}
	return 0.5 * (lo + hi);
}

int opwindow_compute(const struct fg_config *cfg, unsigned si, const double *ref_values,
		     double x_max, struct report_window *w)
{
	assert(cfg != NULL);
	assert(si < cfg->section_count);
	assert(ref_values != NULL);
	assert(w != NULL);
	const struct section_cfg *s = &cfg->sections[si];
	int gi = s->signal[SIGNAL_GAS_FLOW];
	int xi = s->signal[SIGNAL_LIQUID_FLOW] >= 0 ? s->signal[SIGNAL_LIQUID_FLOW]
						    : s->signal[SIGNAL_LEVEL];
	if (gi < 0 || xi < 0 || !(x_max > 0.0) || !isfinite(ref_values[gi]))
		return -ENOENT;
	static double vals[FG_TAGS_MAX];
	memcpy(vals, ref_values, cfg->tag_count * sizeof(vals[0]));
	const bool tray = s->geom.type == SECTION_TRAY;
	/* the model's limit is the uncalibrated one; the calibrated limit uses the
	 * section's capacity_factor (which section_eval applies) */
	static struct section_geom model;
	model = s->geom;
	model.capacity_factor = 1.0;
	const double cf = section_capacity_factor(&s->geom);
	const bool cal = cf != 1.0;
	const bool level_x = s->signal[SIGNAL_LIQUID_FLOW] < 0;
	for (unsigned i = 0; i < REPORT_WINDOW_POINTS; i++) {
		/* a level of zero has no column to flood: start one step up */
		double x = x_max * (double)(level_x ? i + 1 : i) /
			   (double)(REPORT_WINDOW_POINTS - (level_x ? 0 : 1));
		w->x[i] = x;
		w->y_flood[i] = gas_at(cfg, si, &model, vals, gi, xi, x, ref_values[gi], RF_FLOOD_PCT,
				       100.0);
		w->y_weep[i] = tray ? gas_at(cfg, si, &s->geom, vals, gi, xi, x, ref_values[gi],
					     RF_WEEP_PCT, 100.0)
				    : NAN;
		w->y_cal[i] = cal ? gas_at(cfg, si, &s->geom, vals, gi, xi, x, ref_values[gi],
					   RF_FLOOD_PCT, 100.0)
				  : NAN;
	}
	w->has_weep = tray;
	w->has_cal = cal;
	if (cal)
		snprintf(w->note, sizeof(w->note),
			 "Limits from the models at the recorded pressure, temperature and "
			 "properties of the row named above (the highest flood_index of the "
			 "replay); calibrated limit with capacity_factor %.3g.", cf);
	else
		snprintf(w->note, sizeof(w->note),
			 "Limits from the models at the recorded pressure, temperature and "
			 "properties of the row named above (the highest flood_index of the "
			 "replay); no calibrated limit drawn: capacity_factor is 1 (not "
			 "calibrated; floodgauge calibrate fits it).");
	return 0;
}
