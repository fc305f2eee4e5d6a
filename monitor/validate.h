/*
 * validate.h - per-tag signal validation and filtering.
 *
 * Every sample of a tag passes, in this order: read status (a failed read is
 * bad at once, "comm_fail"; a sample the historian marked bad,
 * "historian_status"; a tag the data file has no column for,
 * "missing_column"); a missing sample holds the last good value until it is
 * stale (no fresh read for stale_periods x period_s, or hold_s when that is
 * longer: bad, "stale");
 * non-finite (bad, "nan"); outside the tag's min..max (bad, "out_of_range");
 * a single step larger than spike_limit (rejected once, the last value held,
 * uncertain, "spike": a second sample that confirms the jump is accepted, as a
 * real step change would); frozen (no change beyond frozen_tolerance for
 * frozen_s: uncertain, "frozen"); then a short median and a first-order lag.
 * Fixed state, no allocation, time passed in.
 *
 * Saturation (tags marked saturable: the engine marks every DP tag). A DP
 * transmitter driven to the top of its span by a real high DP reads at or a
 * little above its max: a process fact ("the DP is at least max"), not a dead
 * transmitter. A reading in the band [max - VALIDATE_SAT_BELOW x span,
 * max + VALIDATE_SAT_ABOVE x span] (span = max - min) that was reached
 * without a jump (the last accepted value lay within VALIDATE_SAT_APPROACH x
 * span below max, or the tag was already saturated) is accepted as
 * `max` with quality uncertain and reason "saturated"; it is exempt from the
 * frozen check (a pegged reading does not move). Reached by a jump, or above
 * the band, it is bad ("out_of_range"), as before: a transmitter failing
 * high jumps there. The band follows NAMUR NE 43 (a 4-20 mA transmitter
 * signals a measurement up to 20.5 mA = 103.1 % of span; above that a
 * failure): 3 % of span above max; 0.5 % of span below max covers the
 * resolution of the reading at the end of its span (common practice).
 */
#ifndef VALIDATE_H
#define VALIDATE_H

#include <stdint.h>

#include "alarm.h"
#include "config.h"

/*
 * Frozen detection is on by default for every polled or recorded tag: 900 s
 * (15 min) without any change of the raw value. Why 15 min: a live
 * transmitter's noise moves the last digit of its reading within seconds to
 * a minute even at steady state, and historians that compress by deadband
 * still write a value at least every 10-15 min (a common "max time"
 * setting), so a value identical for 15 min is a stuck transmitter, a frozen
 * PLC register or a historian repeating its last value (common practice,
 * not a standard). Much shorter windows flag coarse-resolution tags (an
 * int16 temperature in 0.1 degC) at steady state; much longer ones let a
 * frozen DP hide the run-up to flooding, which takes tens of minutes. A tag
 * that may legitimately sit still longer sets its own frozen_s, or 0 (off).
 * A reading at or beyond the end of its span (min or max, where a
 * transmitter saturates) is exempt: a pegged reading does not move.
 */
#define VALIDATE_FROZEN_DEFAULT_S 900.0

enum tag_status {
	TAG_STATUS_FRESH,     /* a new reading this period */
	TAG_STATUS_MISSING,   /* no reading (empty historian field) */
	TAG_STATUS_COMM_FAIL, /* the read failed */
	TAG_STATUS_BAD,       /* the historian marked the sample bad ("historian_status") */
	TAG_STATUS_NO_COLUMN, /* the data file has no column for the tag ("missing_column") */
};

/* Saturation band and approach, fractions of the span (see above). */
#define VALIDATE_SAT_BELOW 0.005
#define VALIDATE_SAT_ABOVE 0.03
#define VALIDATE_SAT_APPROACH 0.15

struct tag_state {
	const struct tag_cfg *cfg;
	/* cfg's limits in the form the per-sample checks compare against, set
	 * by validate_init and validate_set_saturable (cfg must not change
	 * after): an open end as an infinity, a check that is off as a limit
	 * nothing passes. The same comparisons, on the same doubles. */
	double lo_lim, hi_lim;       /* min, max; -inf, +inf when open */
	double sat_lo, sat_hi;       /* the saturation band; +inf, -inf when it has none */
	double sat_from;             /* an accepted value from which max is reached without a jump */
	double spike_lim;            /* spike_limit; +inf when off */
	double frozen_ms;            /* frozen_s in ms; 0 when off */
	bool saturable;              /* a DP: may saturate at its max (see above) */
	bool saturated;              /* the current reading is "at least max" */
	int64_t stale_ms;            /* stale_periods x period, ms (0: never stale) */
	bool seen;                   /* any fresh sample yet */
	int64_t last_fresh_t_ms;
	int64_t last_t_ms;           /* last sample time (filter dt) */
	double accepted;             /* last accepted raw value, tag unit */
	bool spike_held;             /* the previous sample was rejected as a spike */
	double frozen_ref;           /* value at the start of the current flat run */
	int64_t frozen_since_t_ms;
	double med[FG_MEDIAN_MAX];   /* ring of accepted values */
	unsigned med_count, med_pos;
	bool lag_init;
	double lag_dt_s, lag_a;      /* the lag's weight lag_a for a step of lag_dt_s */
	double value;                /* validated, filtered, tag unit; NAN when never good */
	double value_si;             /* the same in SI */
	enum fg_quality quality;
	const char *reason;          /* static; NULL when good */
	char status_text[ALARM_STATUS_TEXT_MAX]; /* the historian's text with TAG_STATUS_BAD */
};

void validate_init(struct tag_state *s, const struct tag_cfg *cfg, double period_s);

/* Marks the tag as one that may saturate at its max (a DP). */
void validate_set_saturable(struct tag_state *s, bool saturable);

/* One sample at t_ms: v in the tag's unit (ignored unless status is FRESH). */
void validate_step(struct tag_state *s, int64_t t_ms, double v, enum tag_status status);

#endif
