/*
 * validate.c - see validate.h.
 */
#include "validate.h"

#include <assert.h>
#include <math.h>
#include <string.h>

#include "alarm.h"
#include "ewma.h"

/* The saturation band and approach (validate.h), or none. */
static void set_sat_limits(struct tag_state *s)
{
	const struct tag_cfg *c = s->cfg;
	if (!s->saturable || !isfinite(c->min) || !isfinite(c->max) || !(c->max > c->min)) {
		s->sat_lo = INFINITY;
		s->sat_hi = -INFINITY;
		s->sat_from = INFINITY;
		return;
	}
	double span = c->max - c->min;
	s->sat_lo = c->max - VALIDATE_SAT_BELOW * span;
	s->sat_hi = c->max + VALIDATE_SAT_ABOVE * span;
	s->sat_from = c->max - VALIDATE_SAT_APPROACH * (c->max - c->min);
}

void validate_init(struct tag_state *s, const struct tag_cfg *cfg, double period_s)
{
	assert(s != NULL);
	assert(cfg != NULL);
	assert(period_s > 0.0);
	memset(s, 0, sizeof(*s));
	s->cfg = cfg;
	s->stale_ms = (int64_t)llround(cfg->stale_periods * period_s * 1000.0);
	/* A tag recorded only on change keeps its last value fresh for hold_s. */
	if (cfg->hold_s > 0.0 && s->stale_ms > 0)
		s->stale_ms = (int64_t)llround(fmax(cfg->stale_periods * period_s, cfg->hold_s) * 1000.0);
	s->value = NAN;
	s->value_si = NAN;
	s->accepted = NAN;
	s->lag_dt_s = NAN; /* no weight kept yet */
	s->quality = FG_QUALITY_BAD;
	s->reason = ALARM_REASON_STALE; /* nothing read yet */
	s->lo_lim = isfinite(cfg->min) ? cfg->min : -INFINITY;
	s->hi_lim = isfinite(cfg->max) ? cfg->max : INFINITY;
	s->spike_lim = cfg->spike_limit > 0.0 ? cfg->spike_limit : INFINITY;
	s->frozen_ms = cfg->frozen_s > 0.0 ? cfg->frozen_s * 1000.0 : 0.0;
	set_sat_limits(s);
}

void validate_set_saturable(struct tag_state *s, bool saturable)
{
	assert(s != NULL);
	s->saturable = saturable;
	set_sat_limits(s);
}

static void set_bad(struct tag_state *s, const char *reason)
{
	s->saturated = false;
	s->quality = FG_QUALITY_BAD;
	s->reason = reason;
	s->value = NAN;
	s->value_si = NAN;
	s->lag_init = false;
	s->med_count = 0;
}

/* The middle of three, for the common `median = 3`: the same value as the
 * sort below except between a +0 and a -0, which compare equal but print
 * differently; a zero goes the long way. */
static double median3(double a, double b, double c)
{
	double lo = a < b ? a : b, hi = a < b ? b : a;
	double m = c < hi ? c : hi;
	return m > lo ? m : lo;
}

static double median_of(const struct tag_state *s)
{
	double w[FG_MEDIAN_MAX];
	unsigned n = s->med_count;
	assert(n >= 1);
	assert(n <= FG_MEDIAN_MAX);
	if (n == 3) {
		double m = median3(s->med[0], s->med[1], s->med[2]);
		if (m != 0.0)
			return m;
	}
	memcpy(w, s->med, n * sizeof(double));
	for (unsigned i = 1; i < n; i++) { /* insertion sort: n <= 15 */
		double x = w[i];
		unsigned j = i;
		for (; j > 0 && w[j - 1] > x; j--)
			w[j] = w[j - 1];
		w[j] = x;
	}
	return n % 2 ? w[n / 2] : 0.5 * (w[n / 2 - 1] + w[n / 2]);
}

/* Median then first-order lag of an accepted value. */
static void filter(struct tag_state *s, int64_t t_ms, double x)
{
	const struct tag_cfg *c = s->cfg;
	unsigned win = c->median > 0 ? c->median : 1;
	s->med[s->med_pos] = x;
	if (++s->med_pos >= win)
		s->med_pos = 0;
	if (s->med_count < win)
		s->med_count++;
	double m = win > 1 ? median_of(s) : x;
	if (!s->lag_init || c->filter_tau_s <= 0.0) {
		s->value = m;
		s->lag_init = true;
	} else {
		double dt_s = (double)(t_ms - s->last_t_ms) / 1000.0;
		if (dt_s != s->lag_dt_s) { /* the weight of the last step length, kept */
			s->lag_a = ewma_weight(dt_s, c->filter_tau_s);
			s->lag_dt_s = dt_s;
		}
		s->value += s->lag_a * (m - s->value);
	}
	s->value_si = config_tag_to_si(c, s->value);
}

/* Accepts a saturated reading as `max`: "at least max", uncertain. The
 * median and lag run on max so the value settles there; the frozen check is
 * restarted (a pegged reading does not move). */
static void saturate(struct tag_state *s, int64_t t_ms)
{
	double v = s->cfg->max;
	s->saturated = true;
	s->spike_held = false;
	s->accepted = v;
	s->seen = true;
	s->last_fresh_t_ms = t_ms;
	s->frozen_ref = v;
	s->frozen_since_t_ms = t_ms;
	filter(s, t_ms, v);
	s->quality = FG_QUALITY_UNCERTAIN;
	s->reason = ALARM_REASON_SATURATED;
}

static void fresh(struct tag_state *s, int64_t t_ms, double v)
{
	const struct tag_cfg *c = s->cfg;
	if (!isfinite(v)) {
		set_bad(s, ALARM_REASON_NAN);
		return;
	}
	bool had = s->quality != FG_QUALITY_BAD && isfinite(s->accepted);
	if (v >= s->sat_lo && v <= s->sat_hi) { /* in the saturation band */
		if (s->saturated || (had && s->accepted >= s->sat_from)) {
			saturate(s, t_ms);
			return;
		}
		if (v > s->hi_lim) { /* a jump above the span: a failed transmitter */
			set_bad(s, ALARM_REASON_OUT_OF_RANGE);
			return;
		}
	}
	s->saturated = false;
	if (v < s->lo_lim || v > s->hi_lim) {
		set_bad(s, ALARM_REASON_OUT_OF_RANGE);
		return;
	}
	if (had && fabs(v - s->accepted) > s->spike_lim && !s->spike_held) {
		s->spike_held = true; /* hold the last value once; quality uncertain */
		s->quality = FG_QUALITY_UNCERTAIN;
		s->reason = ALARM_REASON_SPIKE;
		return;
	}
	s->spike_held = false;
	if (!had || fabs(v - s->frozen_ref) > c->frozen_tolerance) {
		s->frozen_ref = v;
		s->frozen_since_t_ms = t_ms;
	}
	s->accepted = v;
	s->seen = true;
	s->last_fresh_t_ms = t_ms;
	filter(s, t_ms, v);
	/* a reading at either end of its span (saturated there) is exempt */
	bool frozen = s->frozen_ms > 0.0 && !(v <= s->lo_lim || v >= s->hi_lim) &&
		      (double)(t_ms - s->frozen_since_t_ms) >= s->frozen_ms;
	s->quality = frozen ? FG_QUALITY_UNCERTAIN : FG_QUALITY_GOOD;
	s->reason = frozen ? ALARM_REASON_FROZEN : NULL;
}

void validate_step(struct tag_state *s, int64_t t_ms, double v, enum tag_status status)
{
	assert(s != NULL);
	assert(s->cfg != NULL);
	switch (status) {
	case TAG_STATUS_COMM_FAIL:
		set_bad(s, ALARM_REASON_COMM_FAIL);
		break;
	case TAG_STATUS_BAD:
		set_bad(s, ALARM_REASON_HISTORIAN_STATUS);
		break;
	case TAG_STATUS_NO_COLUMN:
		set_bad(s, ALARM_REASON_MISSING_COLUMN);
		break;
	case TAG_STATUS_MISSING:
		/* Hold the last value (historians leave a field empty when nothing
		 * was recorded) until it is stale. */
		if (!s->seen || (s->stale_ms > 0 && t_ms - s->last_fresh_t_ms > s->stale_ms))
			set_bad(s, ALARM_REASON_STALE);
		break;
	case TAG_STATUS_FRESH:
		fresh(s, t_ms, v);
		break;
	}
	s->last_t_ms = t_ms;
}
