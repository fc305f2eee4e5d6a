/*
 * softsense.h - the soft sensors that make floodgauge a monitor rather than
 * a calculator. Per section, fixed state, time passed in:
 *
 * - DP correction: the ratio of measured to predicted DP, fitted slowly
 *   (first-order, time constant SOFTSENSE_CORR_TAU_S) and only in steady
 *   normal operation (good quality, in service, flood index below
 *   SOFTSENSE_NORMAL_FLOOD_PCT, gas load steady), bounded to
 *   SOFTSENSE_CORR_MIN..MAX so a drifting transmitter cannot teach the model
 *   anything absurd. The engine reports the corrected model DP and the
 *   DP-based flood % on the corrected basis.
 * - Load-response slope d ln DP / d ln F (F-factor) by recursive least
 *   squares with exponential forgetting. Reported only when the load has
 *   moved enough within the forgetting window to estimate a slope.
 * - DP noise: coefficient of variation of the DP over a rolling window,
 *   divided by its own baseline (learned in steady normal operation).
 * - Liquid inventory: with a level and liquid in and out flows, the change
 *   of liquid held in the section since start, by a volume balance.
 */
#ifndef SOFTSENSE_H
#define SOFTSENSE_H

#include <stdbool.h>
#include <stdint.h>

#include "fg_limits.h"
#include "fg_result.h"

/* Time constant of the DP correction, s: an hour-scale fit follows fouling
 * and transmitter calibration, not a developing upset (common practice for
 * online model bias updates). */
#define SOFTSENSE_CORR_TAU_S 1800.0
#define SOFTSENSE_CORR_MIN 0.5
#define SOFTSENSE_CORR_MAX 2.0
/* Above this flood index the plant is not "normal" for learning. */
#define SOFTSENSE_NORMAL_FLOOD_PCT 70.0
/* Gas load is steady when its relative standard deviation over the steady
 * window is below this (2 %, common practice for steady-state detection). */
#define SOFTSENSE_STEADY_REL_STD 0.02
#define SOFTSENSE_STEADY_TAU_S 300.0
/* Forgetting time constant of the slope estimate, s. */
#define SOFTSENSE_SLOPE_TAU_S 900.0
/* The slope needs ln F to have moved: a weighted standard deviation of at
 * least 0.03 (3 % load movement) within the window. */
#define SOFTSENSE_SLOPE_MIN_STD 0.03
/* DP noise: samples in the rolling window and the baseline time constant. */
#define SOFTSENSE_NOISE_WINDOW 60
#define SOFTSENSE_NOISE_BASE_TAU_S 3600.0

_Static_assert(SOFTSENSE_NOISE_WINDOW <= FG_NOISE_WINDOW_MAX, "noise ring fits its limit");

struct softsense {
	int64_t last_t_ms;
	bool started;
	double corr;                   /* DP correction factor, measured / model */
	double g_mean, g_sq;           /* EWMA of gas flow and its square (steady test) */
	/* RLS on y = a + b x, x = ln F, y = ln DP */
	double theta[2];
	double p[2][2];
	double x_mean, x_sq, w_sum;    /* forgetting-weighted moments of x */
	/* DP noise */
	double ring[SOFTSENSE_NOISE_WINDOW];
	unsigned ring_count, ring_pos;
	double cv_base;                /* baseline coefficient of variation, NAN until learned */
	/* inventory */
	double inventory_m3;
	double level0_m;
	bool inv_started;
};

/* What the engine knows of the section at one step (SI). */
struct softsense_input {
	double gas_kgs;
	double dp_pa;                  /* measured, NAN if none */
	double dp_model_pa;            /* uncorrected model DP, NAN if none */
	double f_factor;               /* gas load for the slope */
	double liquid_in_kgs, liquid_out_kgs, level_m, rho_l_kgm3, sump_area_m2;
	bool normal;                   /* good quality, in service, below the normal flood index */
};

void softsense_init(struct softsense *s);

/* One step at t_ms: updates the estimates and writes RF_DP_CORRECTION,
 * RF_DP_SLOPE, RF_DP_NOISE_RATIO and RF_INVENTORY_M3 (NAN where not
 * defined) into r. */
void softsense_step(struct softsense *s, const struct softsense_input *in, int64_t t_ms,
		    struct section_result *r);

#endif
