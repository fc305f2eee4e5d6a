/*
 * softsense.h - the soft sensors that make floodgauge a monitor rather than
 * a calculator. Per section, fixed state, time passed in.
 *
 * The learning gate. Every estimate below that "learns" does so only while
 * the section is in steady, normal operation, decided from the inputs alone
 * (never from alarm states, never from a fixed flood % rule):
 * - steady: the gas load's relative standard deviation over the steady
 *   window (an exponentially weighted window of time constant
 *   steady_window_s, default 600 s) is below steady_load_band (default
 *   0.015) and the current load lies within that band of the window's mean;
 * - normal: the section's result quality is good (every input good: none
 *   bad, frozen, spiked or saturated), it is in service, it has a measured
 *   and a model DP, and the measured DP lies within normal_dp_sigmas
 *   (default 4) standard deviations of its learned relation to load,
 *   DP = dp_correction x model DP. Until the relation has been learned for
 *   SOFTSENSE_WARMUP_S of steady normal operation (the warm-up) the DP band
 *   is the correction's own bounds, so a dp_factor left at 1 on a plant that
 *   reads 1.3 still learns.
 * The slow correction (hours) therefore never learns the fouling or foaming
 * it must show: a DP that leaves its relation by several standard deviations
 * stops all learning until it comes back.
 *
 * The estimates:
 * - DP correction: measured over model DP, starting at the section's
 *   dp_factor, fitted first-order (time constant SOFTSENSE_CORR_TAU_S, in the
 *   warm-up SOFTSENSE_WARMUP_TAU_S), bounded to SOFTSENSE_CORR_MIN..MAX. The
 *   standard deviation of the log residual ln(DP / (corr x model DP)) is
 *   learned alongside (time constant SOFTSENSE_SIGMA_TAU_S, floor
 *   SOFTSENSE_SIGMA_MIN, prior SOFTSENSE_SIGMA_PRIOR).
 * - DP noise: the coefficient of variation of DP / (corr x model DP) over a
 *   rolling window of SOFTSENSE_NOISE_WINDOW samples (the load's own effect
 *   on the DP taken out), divided by its baseline, learned in steady normal
 *   operation after half the warm-up. Without a model DP the DP itself is
 *   used, and "normal" is the input part alone.
 * - Load-response slope d ln DP / d ln F (F-factor) by recursive least
 *   squares with exponential forgetting, reported when the load has moved
 *   enough within the forgetting window; its normal value is learned from
 *   the estimates made in normal operation.
 * - Liquid inventory: with a level and liquid in and out flows, the change
 *   of liquid held in the section since start, by a volume balance; the
 *   flow meters' imbalance (in - out, m3/s) is learned in steady normal
 *   operation after the warm-up (time constant SOFTSENSE_INV_TAU_S) and
 *   taken out, so a meter bias does not read as liquid piling up.
 * - DP branch of flood_index (dp_load_pct): the gas load at which the
 *   learned relation would give the measured DP, as a percentage of the
 *   (calibrated) flood gas load: flood_pct x (DP / (corr x model DP))^(1/n),
 *   n the model's local d ln DP / d ln G (bounded 0.5..3), the result
 *   bounded to 0..SOFTSENSE_DP_LOAD_MAX_PCT, the load ratio smoothed over
 *   SOFTSENSE_DP_LOAD_TAU_S. A saturated DP is "at least" its value, so the
 *   branch is then at least what it gives.
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
/* Warm-up: the first 30 min of learning use a 5 min time constant, so the
 * correction reaches the plant's ratio from an uncalibrated start within the
 * warm-up (6 time constants: within 0.3 % of the ratio). */
#define SOFTSENSE_WARMUP_S 1800.0
#define SOFTSENSE_WARMUP_TAU_S 300.0
#define SOFTSENSE_CORR_MIN 0.5
#define SOFTSENSE_CORR_MAX 2.0
/* The residual's standard deviation: the noise baseline, floored at 1 %
 * (a DP transmitter's noise rarely goes below that: common practice), 5 %
 * until learned. */
#define SOFTSENSE_SIGMA_MIN 0.01
#define SOFTSENSE_SIGMA_PRIOR 0.05
/* Defaults of the per-section gate keys (config: steady_window_s,
 * steady_load_band, normal_dp_sigmas). A band of 1.5 % over a 10 min window
 * is common practice for steady-state detection on flows; it also makes a
 * load ramp of more than about 9 %/h of the load unsteady (an exponential
 * window lags a ramp by its slope x the window). 4 standard deviations keeps
 * false "not normal" to about 1 sample in 16 000 for normal noise. */
#define SOFTSENSE_STEADY_WINDOW_DEFAULT_S 600.0
#define SOFTSENSE_STEADY_BAND_DEFAULT 0.015
#define SOFTSENSE_NORMAL_SIGMAS_DEFAULT 4.0
/* Forgetting time constant of the slope estimate, s. */
#define SOFTSENSE_SLOPE_TAU_S 900.0
/* The slope needs ln F to have moved: a weighted standard deviation of at
 * least 0.03 (3 % load movement) within the window. */
#define SOFTSENSE_SLOPE_MIN_STD 0.03
/* DP noise: samples in the rolling window and the baseline time constant. */
#define SOFTSENSE_NOISE_WINDOW 60
#define SOFTSENSE_NOISE_BASE_TAU_S 3600.0
/* Inventory: the meters' imbalance is learned over two hours. */
#define SOFTSENSE_INV_TAU_S 7200.0
/* Upper bound of the DP branch of flood_index, %: a flooded section reads
 * as flooded, not as 350 %. */
#define SOFTSENSE_DP_LOAD_MAX_PCT 150.0
/* Smoothing of the DP branch, s: DP noise (1.5 % of reading, several times
 * more near flood) would otherwise move the index by a few points from
 * sample to sample; 30 s cuts that by about 4 at 1 s samples and delays a
 * real rise by half a minute. */
#define SOFTSENSE_DP_LOAD_TAU_S 30.0

_Static_assert(SOFTSENSE_NOISE_WINDOW <= FG_NOISE_WINDOW_MAX, "noise ring fits its limit");

/* The section's settings (config keys of the same names). */
struct softsense_cfg {
	double dp_factor;              /* the correction's start, measured / model DP */
	double steady_window_s;
	double steady_load_band;
	double normal_dp_sigmas;
};

struct softsense {
	struct softsense_cfg cfg;
	int64_t last_t_ms;
	bool started;
	double corr;                   /* DP correction factor, measured / model */
	double learned_s;              /* time spent learning, s (warm-up) */
	double plain_s;                /* time steady with normal inputs (no model DP), s */
	double g_mean, g_sq;           /* EWMA of gas flow and its square (steady test) */
	/* RLS on y = a + b x, x = ln F, y = ln DP */
	double theta[2];
	double p[2][2];
	double x_mean, x_sq, w_sum;    /* forgetting-weighted moments of x */
	double slope_normal;           /* learned normal slope, NAN until learned */
	/* DP noise */
	double ring[SOFTSENSE_NOISE_WINDOW];
	unsigned ring_count, ring_pos;
	/* the window's mean and sum of squared deviations, kept up as samples
	 * come and go (Welford's update) and worked out afresh once a window */
	double noise_mean, noise_m2;
	double cv_base;                /* baseline coefficient of variation, NAN until learned */
	/* inventory */
	double inventory_m3;
	double level0_m;
	double imbalance_m3s;          /* learned meter imbalance, m3/s */
	bool inv_started;
	/* the gate at the last step, for calibrate and tests */
	bool steady, normal, learning;
	double resid;                  /* ln(DP / (corr model DP)) at the last step, NAN if none */
	double load_ratio_ln;          /* smoothed ln(load implied by DP / load), NAN: none */
	double dp_exponent;            /* the input's dp_exponent at the last step */
	/* The averaging weights at the step length w_dt_s (NAN: none yet). Steps
	 * are nearly always the same length, so they are worked out once per
	 * length rather than per step: the same numbers, without a dozen exp(). */
	double w_dt_s;
	double w[8];
};

/* What the engine knows of the section at one step (SI). */
struct softsense_input {
	double gas_kgs;
	double dp_pa;                  /* measured, NAN if none */
	double dp_model_pa;            /* uncorrected model DP, NAN if none */
	double dp_exponent;            /* model's d ln DP / d ln G here, NAN if unknown */
	double flood_pct;              /* model flood_pct (calibrated), NAN if none */
	double f_factor;               /* gas load for the slope */
	double liquid_in_kgs, liquid_out_kgs, level_m, rho_l_kgm3, sump_area_m2;
	bool normal;                   /* the input part of "normal": result quality good
					* (nothing bad, frozen or saturated) and in service */
	bool dp_saturated;             /* the DP reads "at least" its value */
};

/* Takes ratio into the DP-noise window and returns the coefficient of
 * variation (sample standard deviation over mean) of its last
 * SOFTSENSE_NOISE_WINDOW values, NAN until the window is full or when the
 * mean is not positive; a non-finite ratio empties the window. Kept with
 * running sums, worked out afresh once a window; softsense_step calls it. */
double softsense_window_cv(struct softsense *s, double ratio);

/* Defaults for every field of c. */
void softsense_cfg_defaults(struct softsense_cfg *c);

/* c may be NULL (defaults). */
void softsense_init(struct softsense *s, const struct softsense_cfg *c);

/* One step at t_ms: updates the estimates and writes RF_DP_CORRECTION,
 * RF_DP_SLOPE, RF_DP_NOISE_RATIO, RF_INVENTORY_M3 and RF_DP_LOAD_PCT (NAN
 * where not defined) into r. */
void softsense_step(struct softsense *s, const struct softsense_input *in, int64_t t_ms,
		    struct section_result *r);

/* The learned standard deviation of the log residual. */
double softsense_sigma(const struct softsense *s);

#endif
