/*
 * alarm.h - the lifecycle of one alarm, after ISA-18.2 / IEC 62682.
 *
 * The engine calls alarm_step() once per evaluation for every alarm, with the
 * value the alarm watches, its quality and the time of the sample. Operator
 * commands (acknowledge, shelve, unshelve, out of service) are separate calls.
 * Every call that changes the state the operator sees writes one struct
 * alarm_event; the caller formats it (alarm_event_json) for events.jsonl and
 * MQTT. No I/O, no clock, no allocation: the same inputs and times always give
 * the same events, live or replayed.
 *
 * How it is built. An alarm is three layers:
 *   1. a condition detector: setpoint, deadband, on-delay and off-delay turn
 *      the samples into one bool, `active` (for a rate alarm the compared
 *      quantity is a rate estimated over a fixed ring of samples);
 *   2. the alarm lifecycle proper, two bits: active and unacked.
 *        NORM  = !active && !unacked     UNACK = active && unacked
 *        ACKED = active && !unacked      RTNUN = !active && unacked
 *      A rising condition sets unacked; an acknowledgement clears it;
 *   3. three masks, in order of precedence: out of service (OOSRV, a command),
 *      shelved (SHLVD, a command with an expiry), suppressed by design (DSUPR,
 *      an input: the section is out of service). While any mask is on, the
 *      detector keeps running but the lifecycle is held at "no unacknowledged
 *      occurrence"; when the last mask goes, the alarm takes the state its
 *      condition calls for: UNACK if the condition is active, NORM if not,
 *      with one event and no burst.
 * The visible state is computed from these; it is cached in struct alarm
 * only to detect a change.
 *
 * It is an advisory tool, not a safety system: these alarms never act on the
 * plant.
 */
#ifndef ALARM_H
#define ALARM_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include "fg_limits.h"
#include "fg_result.h"

enum alarm_kind {
	ALARM_KIND_HIGH,       /* value >= setpoint; clears below setpoint - deadband */
	ALARM_KIND_HIGH_HIGH,  /* the same as HIGH, with its own (higher) setpoint */
	ALARM_KIND_LOW,        /* value <= setpoint; clears above setpoint + deadband */
	ALARM_KIND_RATE,       /* rate of rise, signal units per minute, >= setpoint */
	ALARM_KIND_DEVIATION,  /* |value - reference| >= setpoint (both directions) */
	ALARM_KIND_DIAGNOSTIC, /* input quality flag (struct alarm_input.diag_reason) */
	ALARM_KIND_COUNT
};

enum alarm_priority {
	ALARM_PRIORITY_LOW,
	ALARM_PRIORITY_MEDIUM,
	ALARM_PRIORITY_HIGH,
	ALARM_PRIORITY_URGENT,
	ALARM_PRIORITY_COUNT
};

/* Visible states. Their names (alarm_state_name) are the words of ISA-18.2,
 * in one spelling everywhere: events, MQTT payloads, the state file, the live
 * view and the report. The enum constants keep the short codes for brevity
 * in the code only. */
enum alarm_state {
	ALARM_STATE_NORM,  /* normal, nothing to acknowledge */
	ALARM_STATE_UNACK, /* active, unacknowledged */
	ALARM_STATE_ACKED, /* active, acknowledged */
	ALARM_STATE_RTNUN, /* returned to normal, unacknowledged */
	ALARM_STATE_SHLVD, /* shelved by the operator, until an expiry */
	ALARM_STATE_DSUPR, /* suppressed by design (section out of service) */
	ALARM_STATE_OOSRV, /* removed from service (maintenance) */
	ALARM_STATE_COUNT
};

/* alarm_cfg.field for a diagnostic alarm: it watches quality, not a result. */
#define ALARM_FIELD_QUALITY (-1)
/* alarm_cfg.reference_field when there is none. */
#define ALARM_FIELD_NONE (-1)

/* Default estimation window of a rate alarm, s. */
#define ALARM_RATE_WINDOW_DEFAULT_S 60.0
/* Window limits, s: under 1 s a rate over a ring of samples is noise; a day
 * is far beyond any column transient worth a rate alarm. */
#define ALARM_RATE_WINDOW_MIN_S 1.0
#define ALARM_RATE_WINDOW_MAX_S 86400.0
/* Longest on- or off-delay, s (common practice: delays are seconds to
 * minutes; an hour is already far more than any alarm needs). */
#define ALARM_DELAY_MAX_S 3600.0
/* Longest shelve, s. A shelved alarm must come back by itself (ISA-18.2
 * requires shelving to be time-limited; the limit of one day is ours). */
#define ALARM_SHELVE_MAX_S 86400.0

/* Rate of rise: the two-point slope (v - v_old) / (t - t_old) between the
 * current sample and the newest kept sample at least rate_window_s old, in
 * signal units per minute. On a steady ramp it is the ramp's slope; a step of
 * size S reads S / window for one window (so a window also filters spikes).
 * There is no estimate, and the alarm holds as for bad input, during the first
 * window after start, restart or time going backwards, and when the newest
 * sample a window old is more than two windows old (a gap in the data: no
 * rate averaged over an outage). Bad samples are not kept.
 *
 * Samples kept by a rate alarm. A sample is kept when it is at least
 * window / (ALARM_RATE_SLOTS - 2) after the last kept one, so the ring always
 * spans more than one window; at the default 60 s window and a 1 s period
 * every sample is kept. 64 slots of 16 bytes = 1 KiB per alarm. */
#define ALARM_RATE_SLOTS 64

_Static_assert(ALARM_RATE_SLOTS >= 8, "rate ring too short to span its window");
_Static_assert(ALARM_STATE_COUNT == 7, "state names, state file and JSON list 7 states");

/* Reasons a diagnostic alarm accepts in struct alarm_input.diag_reason.
 * Any other string is reported as "other". */
#define ALARM_REASON_FROZEN "frozen"
#define ALARM_REASON_STALE "stale"
#define ALARM_REASON_OUT_OF_RANGE "out_of_range"
#define ALARM_REASON_COMM_FAIL "comm_fail"
#define ALARM_REASON_NAN "nan"
#define ALARM_REASON_SPIKE "spike"
#define ALARM_REASON_HISTORIAN_STATUS "historian_status" /* the historian marked it bad */
#define ALARM_REASON_MISSING_COLUMN "missing_column"     /* the data file has no column */
#define ALARM_REASON_OTHER "other"
/* A DP at the top of its range (validate.h): a process fact, reported as the
 * tag's reason but never raising a diagnostic alarm. */
#define ALARM_REASON_SATURATED "saturated"

/* Default delays of a diagnostic alarm when the config gives none, s: on
 * after 10 s of a bad input, off after 60 s of good input (common practice:
 * diagnostics are low priority and must not chatter; ISA-18.2 recommends
 * on/off delays against chattering alarms). */
#define ALARM_DIAG_ON_DELAY_DEFAULT_S 10.0
#define ALARM_DIAG_OFF_DELAY_DEFAULT_S 60.0

/* One alarm as configured ([alarm.NAME]). The config loader fills it, starting
 * from alarm_cfg_defaults(), and checks it with alarm_cfg_check(). */
struct alarm_cfg {
	char name[FG_NAME_MAX];     /* NAME of [alarm.NAME], the key in the state file */
	unsigned section_index;     /* the section whose result the alarm watches */
	int field;                  /* enum result_field, or ALARM_FIELD_QUALITY (diagnostic) */
	int reference_field;        /* deviation: the field subtracted; else ALARM_FIELD_NONE */
	enum alarm_kind kind;
	double setpoint;            /* signal units; rate: signal units per minute;
	                             * deviation: allowed |value - reference| */
	double deadband;            /* same units as setpoint, >= 0 */
	double on_delay_s;          /* condition must hold this long before activating */
	double off_delay_s;         /* clear condition must hold this long before clearing */
	double rate_window_s;       /* rate: estimation window, s */
	enum alarm_priority priority;
	bool out_of_service;        /* start out of service (OOSRV) */
};

/* Fixed ring of kept samples of a rate alarm. */
struct alarm_rate_ring {
	int64_t t_ms[ALARM_RATE_SLOTS]; /* sample time, ms since the Unix epoch */
	double v[ALARM_RATE_SLOTS];     /* sample value, signal units */
	unsigned newest_index;          /* slot of the newest kept sample */
	unsigned sample_count;          /* kept samples, <= ALARM_RATE_SLOTS */
};

/* Runtime state of one alarm. Fixed size; alarm_init fills every field. */
struct alarm {
	struct alarm_cfg cfg;        /* a copy, so a config reload cannot pull it away */
	unsigned index;              /* position in the engine's alarm table (events) */
	enum alarm_state state;      /* last visible state reported */
	bool active;                 /* detector output (after deadband and delays) */
	bool unacked;                /* an occurrence not yet acknowledged */
	bool shelved;
	bool out_of_service;
	bool suppressed;             /* last alarm_input.suppressed */
	int64_t shelve_until_t_ms;   /* expiry of the shelve, ms since epoch (0: none) */
	int64_t pending_since_t_ms;  /* start of the uninterrupted run of the condition
	                              * opposite to `active`; ALARM_T_NONE when none */
	int64_t last_t_ms;           /* time of the last alarm_step; ALARM_T_NONE before */
	int64_t on_delay_ms, off_delay_ms, rate_window_ms; /* from cfg, rounded to ms */
	double last_value;           /* last compared quantity (rate: per minute), NAN if bad */
	double last_raw;             /* last input value, NAN if not finite */
	const char *diag_reason;     /* static; last diagnostic reason, NULL when healthy */
	struct alarm_rate_ring rate; /* used by ALARM_KIND_RATE only */
};

#define ALARM_T_NONE INT64_MIN

/* A historian's status text kept in an event, with the NUL ("I/O Timeout",
 * "Comm Fail", "Bad Input" are all short; a longer one is cut). */
#define ALARM_STATUS_TEXT_MAX 40

/* What the engine passes for one evaluation. */
struct alarm_input {
	double value;               /* the watched result field, SI; NAN or inf = bad */
	double reference;           /* deviation: the reference field's value */
	enum fg_quality quality;    /* quality of value (BAD: never raises a process alarm) */
	bool suppressed;            /* section out of service: suppressed by design */
	const char *diag_reason;    /* DIAGNOSTIC: NULL = healthy, else one of ALARM_REASON_* */
};

/* One visible state change. */
struct alarm_event {
	int64_t t_ms;               /* ms since the Unix epoch (sample or command time) */
	unsigned alarm_index;       /* struct alarm.index */
	enum alarm_state state;     /* the new state */
	enum alarm_state prev;      /* the state before */
	double value;               /* compared quantity (rate: per minute; deviation:
	                             * value - reference; diagnostic: the input value), NAN
	                             * when unknown */
	double setpoint;            /* cfg.setpoint; NAN for a diagnostic alarm */
	const char *reason;         /* static or NULL: diagnostic reason at the change */
	char status_text[ALARM_STATUS_TEXT_MAX]; /* reason historian_status: the historian's
	                             * text ("Bad Input"), else "" */
};

/* Fills cfg with the defaults a config may leave out: empty name, field and
 * reference none, kind HIGH, setpoint NAN (must be given), deadband 0, no
 * delays, rate window 60 s, priority medium, in service. */
void alarm_cfg_defaults(struct alarm_cfg *cfg);

/* Checks a filled config. Returns 0, or -EINVAL with a one-line reason in err
 * (err may be NULL when err_size is 0). Leaves cfg unchanged. */
int alarm_cfg_check(const struct alarm_cfg *cfg, char *err, size_t err_size);

/* Initialises a in place from a valid cfg (asserts alarm_cfg_check passes):
 * state NORM, or OOSRV when cfg->out_of_service, with no event. */
void alarm_init(struct alarm *a, const struct alarm_cfg *cfg, unsigned index);

/* One evaluation at sample time t_ms. Returns 1 when the visible state
 * changed (and *ev holds the event), 0 otherwise (*ev untouched).
 *
 * At most one transition per call: everything due at t_ms (a shelve expiry,
 * a change of in->suppressed, the condition activating or clearing) is applied
 * first, and the one event goes from the state before the call to the state
 * after it (e.g. SHLVD -> UNACK when a shelve expires on an active condition).
 * Changes that cancel out give no event.
 *
 * Bad input (quality BAD, or a value, or a deviation's reference, that is NAN
 * or infinite): a process alarm holds its condition, active or not, and
 * forgets any running on- or off-delay, so a dead transmitter neither raises
 * nor clears an alarm, and a delay restarts on good data. UNCERTAIN input is
 * used as it is. A DIAGNOSTIC alarm ignores quality and follows
 * in->diag_reason. Time going backwards (t_ms < the last t_ms) is bad data:
 * delays and rate history are forgotten and the sample is then used. */
int alarm_step(struct alarm *a, const struct alarm_input *in, int64_t t_ms,
	       struct alarm_event *ev);

/* Operator commands, at time t_ms. Each returns 0 when it was carried out,
 * which always changes the visible state and writes *ev, or a negative errno
 * with a, and *ev, unchanged:
 *   alarm_ack:    UNACK -> ACKED, RTNUN -> NORM. -EALREADY in NORM or ACKED
 *                 (nothing to acknowledge); -EPERM in SHLVD, DSUPR, OOSRV.
 *   alarm_shelve: any state but OOSRV -> SHLVD until t_ms + duration_s.
 *                 -EINVAL unless 0 < duration_s <= ALARM_SHELVE_MAX_S;
 *                 -EALREADY when already shelved (unshelve, then shelve, to
 *                 change the expiry); -EPERM when out of service.
 *   alarm_unshelve: SHLVD -> the state the condition calls for (or DSUPR).
 *                 -EALREADY when not shelved.
 *   alarm_set_out_of_service: true: any state -> OOSRV (a shelve is
 *                 cancelled); false: OOSRV -> the state the condition calls
 *                 for (or DSUPR). -EALREADY when already in that service state.
 */
int alarm_ack(struct alarm *a, int64_t t_ms, struct alarm_event *ev);
int alarm_shelve(struct alarm *a, double duration_s, int64_t t_ms, struct alarm_event *ev);
int alarm_unshelve(struct alarm *a, int64_t t_ms, struct alarm_event *ev);
int alarm_set_out_of_service(struct alarm *a, bool out_of_service, int64_t t_ms,
			     struct alarm_event *ev);

/* The visible state, computed from the layers (equals a->state between calls). */
enum alarm_state alarm_state_of(const struct alarm *a);

/* True when every field of a is within its domain and a->state agrees with
 * the layers. For paired assertions before writing and after reading state. */
bool alarm_is_consistent(const struct alarm *a);

/* Names (static strings) and parsers (0, or -EINVAL for an unknown name; *out
 * untouched then). Kind names: "high", "high-high", "low", "rate",
 * "deviation", "diagnostic"; priorities: "low", "medium", "high", "urgent";
 * states: "normal", "unacknowledged", "acknowledged",
 * "returned_unacknowledged", "shelved", "suppressed_by_design",
 * "out_of_service" (alarm_state_parse also reads the codes NORM, UNACK,
 * ACKED, RTNUN, SHLVD, DSUPR, OOSRV that older state files hold). */
const char *alarm_kind_name(enum alarm_kind k);
const char *alarm_priority_name(enum alarm_priority p);
const char *alarm_state_name(enum alarm_state s);
int alarm_kind_parse(const char *name, enum alarm_kind *out);
int alarm_priority_parse(const char *name, enum alarm_priority *out);
int alarm_state_parse(const char *name, enum alarm_state *out);

/* The static string for a diagnostic reason: the matching ALARM_REASON_*, or
 * ALARM_REASON_OTHER for an unknown one; NULL for NULL. */
const char *alarm_reason_static(const char *reason);

/* Formats ev as one JSON object, without a newline:
 *   {"t":T_ISO,"alarm":NAME,"section":SECTION,"kind":"high","priority":"high",
 *    "state":"unacknowledged","value":N,"setpoint":N}
 * with ,"reason":"frozen" (or null) before the closing brace for diagnostic
 * alarms, and ,"status_text":"Bad Input" after it when the event has one. Numbers are %.6g in the C locale (the engine never calls
 * setlocale), NAN and infinities are null, strings are JSON-escaped. Returns
 * the length written (excluding the NUL), or -ENOSPC when buf_size is too
 * small (buf then holds a NUL-terminated prefix, or nothing if buf_size is 0). */
int alarm_event_json(const struct alarm_event *ev, const struct alarm_cfg *cfg,
		     const char *section_name, const char *t_iso, char *buf, size_t buf_size);

#endif
