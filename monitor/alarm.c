/*
 * alarm.c - alarm lifecycle (ISA-18.2 / IEC 62682 states), see alarm.h.
 *
 * Sources for the behaviour: the alarm states and transitions of ANSI/ISA-18.2
 * (Management of Alarm Systems for the Process Industries, 2016, the alarm
 * state transition diagram) and IEC 62682:2014, which share it; the terms
 * setpoint, deadband, on-delay and off-delay are those of the same standards.
 * Written from the standards' concepts as remembered, not copied from them.
 * Choices the standards leave open are ours and are documented in alarm.h.
 */
#include "alarm.h"
#include "numfmt.h"

#include <assert.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

static const char *const kind_names[ALARM_KIND_COUNT] = {
	[ALARM_KIND_HIGH] = "high",
	[ALARM_KIND_HIGH_HIGH] = "high-high",
	[ALARM_KIND_LOW] = "low",
	[ALARM_KIND_RATE] = "rate",
	[ALARM_KIND_DEVIATION] = "deviation",
	[ALARM_KIND_DIAGNOSTIC] = "diagnostic",
};

static const char *const priority_names[ALARM_PRIORITY_COUNT] = {
	[ALARM_PRIORITY_LOW] = "low",
	[ALARM_PRIORITY_MEDIUM] = "medium",
	[ALARM_PRIORITY_HIGH] = "high",
	[ALARM_PRIORITY_URGENT] = "urgent",
};

static const char *const state_names[ALARM_STATE_COUNT] = {
	[ALARM_STATE_NORM] = "normal",
	[ALARM_STATE_UNACK] = "unacknowledged",
	[ALARM_STATE_ACKED] = "acknowledged",
	[ALARM_STATE_RTNUN] = "returned_unacknowledged",
	[ALARM_STATE_SHLVD] = "shelved",
	[ALARM_STATE_DSUPR] = "suppressed_by_design",
	[ALARM_STATE_OOSRV] = "out_of_service",
};

/* The five-letter codes earlier versions wrote into state files. They are
 * read (so an upgrade keeps the alarm states across the restart) but never
 * written. */
static const char *const legacy_state_names[ALARM_STATE_COUNT] = {
	[ALARM_STATE_NORM] = "NORM",
	[ALARM_STATE_UNACK] = "UNACK",
	[ALARM_STATE_ACKED] = "ACKED",
	[ALARM_STATE_RTNUN] = "RTNUN",
	[ALARM_STATE_SHLVD] = "SHLVD",
	[ALARM_STATE_DSUPR] = "DSUPR",
	[ALARM_STATE_OOSRV] = "OOSRV",
};

static const char *const reason_names[] = {
	ALARM_REASON_FROZEN, ALARM_REASON_STALE, ALARM_REASON_OUT_OF_RANGE,
	ALARM_REASON_COMM_FAIL, ALARM_REASON_NAN, ALARM_REASON_SPIKE,
	ALARM_REASON_HISTORIAN_STATUS, ALARM_REASON_MISSING_COLUMN, ALARM_REASON_SATURATED, ALARM_REASON_OTHER,
};

/* ---- names ---------------------------------------------------------------- */

const char *alarm_kind_name(enum alarm_kind k)
{
	assert((unsigned)k < ALARM_KIND_COUNT);
	return kind_names[k];
}

const char *alarm_priority_name(enum alarm_priority p)
{
	assert((unsigned)p < ALARM_PRIORITY_COUNT);
	return priority_names[p];
}

const char *alarm_state_name(enum alarm_state s)
{
	assert((unsigned)s < ALARM_STATE_COUNT);
	return state_names[s];
}

static int parse_name(const char *name, const char *const *names, int count)
{
	assert(names != NULL);
	if (name == NULL)
		return -EINVAL;
	for (int i = 0; i < count; i++)
		if (strcmp(names[i], name) == 0)
			return i;
	return -EINVAL;
}

int alarm_kind_parse(const char *name, enum alarm_kind *out)
{
	assert(out != NULL);
	int i = parse_name(name, kind_names, ALARM_KIND_COUNT);
	if (i < 0)
		return i;
	*out = (enum alarm_kind)i;
	return 0;
}

int alarm_priority_parse(const char *name, enum alarm_priority *out)
{
	assert(out != NULL);
	int i = parse_name(name, priority_names, ALARM_PRIORITY_COUNT);
	if (i < 0)
		return i;
	*out = (enum alarm_priority)i;
	return 0;
}

int alarm_state_parse(const char *name, enum alarm_state *out)
{
	assert(out != NULL);
	int i = parse_name(name, state_names, ALARM_STATE_COUNT);
	if (i < 0)
		i = parse_name(name, legacy_state_names, ALARM_STATE_COUNT);
	if (i < 0)
		return i;
	*out = (enum alarm_state)i;
	return 0;
}

const char *alarm_reason_static(const char *reason)
{
	if (reason == NULL)
		return NULL;
	int n = (int)(sizeof reason_names / sizeof reason_names[0]);
	int i = parse_name(reason, reason_names, n);
	return i < 0 ? ALARM_REASON_OTHER : reason_names[i];
}

/* ---- configuration -------------------------------------------------------- */

void alarm_cfg_defaults(struct alarm_cfg *cfg)
{
	assert(cfg != NULL);
	memset(cfg, 0, sizeof *cfg);
	cfg->field = ALARM_FIELD_NONE;
	cfg->reference_field = ALARM_FIELD_NONE;
	cfg->kind = ALARM_KIND_HIGH;
	cfg->setpoint = NAN;
	cfg->deadband = 0.0;
	cfg->on_delay_s = 0.0;
	cfg->off_delay_s = 0.0;
	cfg->rate_window_s = ALARM_RATE_WINDOW_DEFAULT_S;
	cfg->priority = ALARM_PRIORITY_MEDIUM;
	cfg->out_of_service = false;
}

static bool in_range(double x, double lo, double hi)
{
	return isfinite(x) && x >= lo && x <= hi;
}

static bool name_ok(const char *name)
{
	size_t n = strnlen(name, FG_NAME_MAX);
	if (n == 0 || n == FG_NAME_MAX)
		return false;
	for (size_t i = 0; i < n; i++)
		if ((unsigned char)name[i] < 0x20 || name[i] == 0x7f)
			return false; /* the state file is line-based */
	return true;
}

/* Returns NULL when the kind-specific settings are right, else why not. */
static const char *kind_problem(const struct alarm_cfg *c)
{
	bool field_ok = c->field >= 0 && c->field < RF_COUNT;
	if (c->kind == ALARM_KIND_DIAGNOSTIC) {
		if (c->field != ALARM_FIELD_QUALITY)
			return "a diagnostic alarm takes signal = quality";
		return c->reference_field == ALARM_FIELD_NONE ? NULL
			: "only a deviation alarm has a reference";
	}
	if (!field_ok)
		return "signal must be a result field";
	if (!isfinite(c->setpoint))
		return "setpoint must be a finite number";
	if (!in_range(c->deadband, 0.0, HUGE_VAL))
		return "deadband must be >= 0";
	if (c->kind == ALARM_KIND_DEVIATION) {
		if (c->reference_field < 0 || c->reference_field >= RF_COUNT ||
		    c->reference_field == c->field)
			return "a deviation alarm needs a reference field other than its signal";
		if (!(c->setpoint > 0.0) || !(c->deadband < c->setpoint))
			return "deviation: setpoint must be > 0 and deadband below it";
		return NULL;
	}
	if (c->reference_field != ALARM_FIELD_NONE)
		return "only a deviation alarm has a reference";
	if (c->kind == ALARM_KIND_RATE) {
		if (!(c->setpoint > 0.0))
			return "rate of rise: setpoint (per minute) must be > 0";
		if (!in_range(c->rate_window_s, ALARM_RATE_WINDOW_MIN_S, ALARM_RATE_WINDOW_MAX_S))
			return "rate_window_s must be within 1..86400";
	}
	return NULL;
}

int alarm_cfg_check(const struct alarm_cfg *cfg, char *err, size_t err_size)
{
	assert(cfg != NULL);
	assert(err != NULL || err_size == 0);
	const char *why = NULL;
	if (!name_ok(cfg->name))
		why = "name must be 1..47 printable characters";
	else if ((unsigned)cfg->kind >= ALARM_KIND_COUNT)
		why = "unknown kind";
	else if ((unsigned)cfg->priority >= ALARM_PRIORITY_COUNT)
		why = "unknown priority";
	else if (!in_range(cfg->on_delay_s, 0.0, ALARM_DELAY_MAX_S) ||
		 !in_range(cfg->off_delay_s, 0.0, ALARM_DELAY_MAX_S))
		why = "on_delay_s and off_delay_s must be within 0..3600";
	else
		why = kind_problem(cfg);
	if (why == NULL)
		return 0;
	if (err_size > 0)
		snprintf(err, err_size, "%s", why);
	return -EINVAL;
}

static int64_t s_to_ms(double s)
{
	assert(isfinite(s));
	assert(s >= 0.0);
	return (int64_t)llround(s * 1000.0);
}

void alarm_init(struct alarm *a, const struct alarm_cfg *cfg, unsigned index)
{
	assert(a != NULL);
	assert(cfg != NULL);
	assert(alarm_cfg_check(cfg, NULL, 0) == 0);
	memset(a, 0, sizeof *a);
	a->cfg = *cfg;
	a->index = index;
	a->out_of_service = cfg->out_of_service;
	a->shelve_until_t_ms = 0;
	a->pending_since_t_ms = ALARM_T_NONE;
	a->last_t_ms = ALARM_T_NONE;
	a->on_delay_ms = s_to_ms(cfg->on_delay_s);
	a->off_delay_ms = s_to_ms(cfg->off_delay_s);
	a->rate_window_ms = cfg->kind == ALARM_KIND_RATE ? s_to_ms(cfg->rate_window_s) : 0;
	a->last_value = NAN;
	a->last_raw = NAN;
	a->diag_reason = NULL;
	a->state = alarm_state_of(a);
	assert(alarm_is_consistent(a));
}

/* ---- state ---------------------------------------------------------------- */

static bool is_masked(const struct alarm *a)
{
	return a->out_of_service || a->shelved || a->suppressed;
}

static bool is_masked_state(enum alarm_state s)
{
	return s == ALARM_STATE_SHLVD || s == ALARM_STATE_DSUPR || s == ALARM_STATE_OOSRV;
}

enum alarm_state alarm_state_of(const struct alarm *a)
{
	assert(a != NULL);
	if (a->out_of_service)
		return ALARM_STATE_OOSRV;
	if (a->shelved)
		return ALARM_STATE_SHLVD;
	if (a->suppressed)
		return ALARM_STATE_DSUPR;
	if (a->active)
		return a->unacked ? ALARM_STATE_UNACK : ALARM_STATE_ACKED;
	return a->unacked ? ALARM_STATE_RTNUN : ALARM_STATE_NORM;
}

bool alarm_is_consistent(const struct alarm *a)
{
	assert(a != NULL);
	if ((unsigned)a->state >= ALARM_STATE_COUNT)
		return false;
	if ((unsigned)a->cfg.kind >= ALARM_KIND_COUNT)
		return false;
	if ((unsigned)a->cfg.priority >= ALARM_PRIORITY_COUNT)
		return false;
	if (is_masked(a) && a->unacked)
		return false; /* a masked alarm holds no unacknowledged occurrence */
	if (!a->shelved && a->shelve_until_t_ms != 0)
		return false;
	if (a->shelved && a->out_of_service)
		return false; /* out of service cancels a shelve */
	if (a->rate.sample_count > ALARM_RATE_SLOTS || a->rate.newest_index >= ALARM_RATE_SLOTS)
		return false;
	return a->state == alarm_state_of(a);
}

/* Writes the event for a change from prev to the current state. */
static void fill_event(const struct alarm *a, enum alarm_state prev, int64_t t_ms,
		       struct alarm_event *ev)
{
	assert(ev != NULL);
	assert(a->state != prev);
	ev->t_ms = t_ms;
	ev->alarm_index = a->index;
	ev->state = a->state;
	ev->prev = prev;
	ev->value = a->last_value;
	ev->setpoint = a->cfg.kind == ALARM_KIND_DIAGNOSTIC ? NAN : a->cfg.setpoint;
	ev->reason = a->cfg.kind == ALARM_KIND_DIAGNOSTIC ? a->diag_reason : NULL;
	ev->status_text[0] = '\0';
}

/* Recomputes the visible state after a change of the layers; 1 and *ev when
 * it differs from prev. The paired assertion checks the state before it is
 * stored. */
static int publish(struct alarm *a, enum alarm_state prev, int64_t t_ms, struct alarm_event *ev)
{
	enum alarm_state s = alarm_state_of(a);
	assert((unsigned)s < ALARM_STATE_COUNT);
	a->state = s;
	assert(alarm_is_consistent(a));
	if (s == prev)
		return 0;
	fill_event(a, prev, t_ms, ev);
	return 1;
}

/* ---- rate of rise --------------------------------------------------------- */

/* Rate of rise, signal units per minute, as the two-point slope between the
 * current sample and the newest kept sample at least one window old:
 * (v - v_old) / (t - t_old). On a steady ramp this is the ramp's slope; after
 * a step it reads step / window for one window. Returns false (no estimate)
 * until a window of history exists, or when the newest sample a window old is
 * more than two windows old (a gap in the data). Then keeps the sample when it
 * is at least window / (ALARM_RATE_SLOTS - 2) after the last kept one, so the
 * ring always spans more than a window (ALARM_RATE_SLOTS - 1 gaps). */
static bool rate_per_min(struct alarm_rate_ring *r, int64_t window_ms, double v, int64_t t_ms,
			 double *out)
{
	assert(window_ms > 0);
	assert(r->sample_count <= ALARM_RATE_SLOTS);
	bool ok = false;
	unsigned idx = r->newest_index;
	for (unsigned n = 0; n < r->sample_count; n++) {
		int64_t age_ms = t_ms - r->t_ms[idx];
		if (age_ms >= window_ms) {
			if (age_ms <= 2 * window_ms) {
				*out = (v - r->v[idx]) / ((double)age_ms / 60000.0);
				ok = true;
			}
			break;
		}
		idx = (idx + ALARM_RATE_SLOTS - 1) % ALARM_RATE_SLOTS;
	}
	int64_t spacing_ms = window_ms / (ALARM_RATE_SLOTS - 2);
	if (r->sample_count == 0 || t_ms - r->t_ms[r->newest_index] >= spacing_ms) {
		r->newest_index = (r->newest_index + 1) % ALARM_RATE_SLOTS;
		r->t_ms[r->newest_index] = t_ms;
		r->v[r->newest_index] = v;
		if (r->sample_count < ALARM_RATE_SLOTS)
			r->sample_count++;
	}
	return ok;
}

/* ---- condition detector --------------------------------------------------- */

/* The quantity compared with the setpoint, from a good input. Returns false
 * when the input cannot be used (bad, or no rate estimate yet). */
static bool compared_quantity(struct alarm *a, const struct alarm_input *in, int64_t t_ms,
			      double *q)
{
	assert(a->cfg.kind != ALARM_KIND_DIAGNOSTIC);
	if (in->quality == FG_QUALITY_BAD || !isfinite(in->value))
		return false;
	switch (a->cfg.kind) {
	case ALARM_KIND_HIGH:
	case ALARM_KIND_HIGH_HIGH:
	case ALARM_KIND_LOW:
		*q = in->value;
		return true;
	case ALARM_KIND_DEVIATION:
		*q = in->value - in->reference;
		return isfinite(*q);
	case ALARM_KIND_RATE:
		return rate_per_min(&a->rate, a->rate_window_ms, in->value, t_ms, q);
	case ALARM_KIND_DIAGNOSTIC:
	case ALARM_KIND_COUNT:
		break;
	}
	return false;
}

/* True when q calls for the opposite of the current `active`: reaching the
 * setpoint when inactive, passing the deadband when active. */
static bool wants_change(const struct alarm *a, double q)
{
	assert(a->cfg.kind != ALARM_KIND_DIAGNOSTIC);
	double sp = a->cfg.setpoint, db = a->cfg.deadband;
	switch (a->cfg.kind) {
	case ALARM_KIND_HIGH:
	case ALARM_KIND_HIGH_HIGH:
	case ALARM_KIND_RATE:
		return a->active ? q < sp - db : q >= sp;
	case ALARM_KIND_LOW:
		return a->active ? q > sp + db : q <= sp;
	case ALARM_KIND_DEVIATION:
		return a->active ? fabs(q) < sp - db : fabs(q) >= sp;
	case ALARM_KIND_DIAGNOSTIC:
	case ALARM_KIND_COUNT:
		break;
	}
	return false;
}

/* The on-delay (or off-delay) runs while the condition for a change holds
 * without interruption; any sample against it, or an unusable one, restarts
 * it. A delay of 0 changes on the first sample. */
static void run_delay(struct alarm *a, bool usable, bool change, int64_t t_ms)
{
	if (!usable || !change) {
		a->pending_since_t_ms = ALARM_T_NONE;
		return;
	}
	if (a->pending_since_t_ms == ALARM_T_NONE)
		a->pending_since_t_ms = t_ms;
	int64_t delay_ms = a->active ? a->off_delay_ms : a->on_delay_ms;
	if (t_ms - a->pending_since_t_ms >= delay_ms) {
		a->active = !a->active;
		a->pending_since_t_ms = ALARM_T_NONE;
	}
}

static void detect(struct alarm *a, const struct alarm_input *in, int64_t t_ms)
{
	a->last_raw = isfinite(in->value) ? in->value : NAN;
	if (a->cfg.kind == ALARM_KIND_DIAGNOSTIC) {
		a->diag_reason = alarm_reason_static(in->diag_reason);
		a->last_value = a->last_raw;
		run_delay(a, true, (a->diag_reason != NULL) != a->active, t_ms);
		return;
	}
	double q = NAN;
	bool usable = compared_quantity(a, in, t_ms, &q);
	a->last_value = usable ? q : NAN;
	run_delay(a, usable, usable && wants_change(a, q), t_ms);
}

/* ---- one evaluation ------------------------------------------------------- */

int alarm_step(struct alarm *a, const struct alarm_input *in, int64_t t_ms,
	       struct alarm_event *ev)
{
	assert(a != NULL);
	assert(in != NULL);
	assert(ev != NULL);
	assert(alarm_is_consistent(a));
	enum alarm_state prev = a->state;
	bool was_active = a->active;

	if (a->last_t_ms != ALARM_T_NONE && t_ms < a->last_t_ms) {
		a->pending_since_t_ms = ALARM_T_NONE;
		a->rate.sample_count = 0;
	}
	a->last_t_ms = t_ms;
	if (a->shelved && t_ms >= a->shelve_until_t_ms) {
		a->shelved = false;
		a->shelve_until_t_ms = 0;
	}
	a->suppressed = in->suppressed;
	detect(a, in, t_ms);

	if (is_masked(a))
		a->unacked = false;
	else if (is_masked_state(prev))
		a->unacked = a->active; /* back to what the condition calls for */
	else if (a->active && !was_active)
		a->unacked = true;      /* a new occurrence: NORM/RTNUN -> UNACK */
	return publish(a, prev, t_ms, ev);
}

/* ---- commands ------------------------------------------------------------- */

/* Every command that is carried out changes the visible state (alarm.h). */
static int command_done(struct alarm *a, enum alarm_state prev, int64_t t_ms,
			struct alarm_event *ev)
{
	int changed = publish(a, prev, t_ms, ev);
	assert(changed == 1);
	(void)changed;
	return 0;
}

int alarm_ack(struct alarm *a, int64_t t_ms, struct alarm_event *ev)
{
	assert(a != NULL);
	assert(ev != NULL);
	assert(alarm_is_consistent(a));
	if (is_masked(a))
		return -EPERM;
	if (!a->unacked)
		return -EALREADY;
	enum alarm_state prev = a->state;
	a->unacked = false;
	return command_done(a, prev, t_ms, ev);
}

int alarm_shelve(struct alarm *a, double duration_s, int64_t t_ms, struct alarm_event *ev)
{
	assert(a != NULL);
	assert(ev != NULL);
	assert(alarm_is_consistent(a));
	if (!(isfinite(duration_s) && duration_s > 0.0 && duration_s <= ALARM_SHELVE_MAX_S))
		return -EINVAL;
	if (a->out_of_service)
		return -EPERM;
	if (a->shelved)
		return -EALREADY;
	enum alarm_state prev = a->state;
	a->shelved = true;
	/* Round up: a shelve never ends before the time asked for, and lasts at
	 * least 1 ms (so shelve_until_t_ms is never 0 next to the epoch). */
	a->shelve_until_t_ms = t_ms + (int64_t)ceil(duration_s * 1000.0);
	if (a->shelve_until_t_ms == 0)
		a->shelve_until_t_ms = 1;
	a->unacked = false;
	return command_done(a, prev, t_ms, ev);
}

/* After a mask was lifted by command: the state the condition calls for. */
static void unmasked(struct alarm *a)
{
	if (!is_masked(a))
		a->unacked = a->active;
}

int alarm_unshelve(struct alarm *a, int64_t t_ms, struct alarm_event *ev)
{
	assert(a != NULL);
	assert(ev != NULL);
	assert(alarm_is_consistent(a));
	if (!a->shelved)
		return -EALREADY;
	enum alarm_state prev = a->state;
	a->shelved = false;
	a->shelve_until_t_ms = 0;
	unmasked(a);
	return command_done(a, prev, t_ms, ev);
}

int alarm_set_out_of_service(struct alarm *a, bool out_of_service, int64_t t_ms,
			     struct alarm_event *ev)
{
	assert(a != NULL);
	assert(ev != NULL);
	assert(alarm_is_consistent(a));
	if (a->out_of_service == out_of_service)
		return -EALREADY;
	enum alarm_state prev = a->state;
	a->out_of_service = out_of_service;
	if (out_of_service) {
		a->shelved = false;
		a->shelve_until_t_ms = 0;
		a->unacked = false;
	} else {
		unmasked(a);
	}
	return command_done(a, prev, t_ms, ev);
}

/* ---- JSON ------------------------------------------------------------------ */

/* A fixed output buffer that remembers when something did not fit. */
struct jbuf {
	char *p;
	size_t size;
	size_t len;
	bool full;
};

static void jput(struct jbuf *b, const char *s, size_t n)
{
	if (b->full)
		return;
	if (b->size == 0 || n >= b->size - b->len) {
		b->full = true;
		return;
	}
	memcpy(b->p + b->len, s, n);
	b->len += n;
	b->p[b->len] = '\0';
}

static void jraw(struct jbuf *b, const char *s)
{
	jput(b, s, strlen(s));
}

/* A JSON string (RFC 8259 section 7): quote, backslash and control characters
 * escaped; other bytes (UTF-8) copied. NULL gives null. */
static void jstr(struct jbuf *b, const char *s)
{
	if (s == NULL) {
		jraw(b, "null");
		return;
	}
	jraw(b, "\"");
	for (const char *c = s; *c != '\0'; c++) {
		char esc[8];
		if (*c == '"' || *c == '\\') {
			esc[0] = '\\';
			esc[1] = *c;
			jput(b, esc, 2);
		} else if ((unsigned char)*c < 0x20) {
			int n = snprintf(esc, sizeof esc, "\\u%04x", (unsigned)(unsigned char)*c);
			assert(n == 6);
			jput(b, esc, (size_t)n);
		} else {
			jput(b, c, 1);
		}
	}
	jraw(b, "\"");
}

static void jnum(struct jbuf *b, double v)
{
	if (!isfinite(v)) {
		jraw(b, "null");
		return;
	}
	char num[NUMFMT_FULL_SIZE];
	int n = numfmt_full(v, num, sizeof num);
	jput(b, num, (size_t)n);
}

static void jkey(struct jbuf *b, const char *key, bool first)
{
	jraw(b, first ? "{\"" : ",\"");
	jraw(b, key);
	jraw(b, "\":");
}

int alarm_event_json(const struct alarm_event *ev, const struct alarm_cfg *cfg,
		     const char *section_name, const char *t_iso, char *buf, size_t buf_size)
{
	assert(ev != NULL);
	assert(cfg != NULL);
	assert(buf != NULL || buf_size == 0);
	assert((unsigned)ev->state < ALARM_STATE_COUNT);
	struct jbuf b = {.p = buf, .size = buf_size, .len = 0, .full = false};
	if (buf_size > 0)
		buf[0] = '\0';
	jkey(&b, "t", true);
	jstr(&b, t_iso);
	jkey(&b, "alarm", false);
	jstr(&b, cfg->name);
	jkey(&b, "section", false);
	jstr(&b, section_name);
	jkey(&b, "kind", false);
	jstr(&b, alarm_kind_name(cfg->kind));
	jkey(&b, "priority", false);
	jstr(&b, alarm_priority_name(cfg->priority));
	jkey(&b, "state", false);
	jstr(&b, alarm_state_name(ev->state));
	jkey(&b, "value", false);
	jnum(&b, ev->value);
	jkey(&b, "setpoint", false);
	jnum(&b, ev->setpoint);
	if (cfg->kind == ALARM_KIND_DIAGNOSTIC) {
		jkey(&b, "reason", false);
		jstr(&b, ev->reason);
		if (ev->status_text[0] != '\0') {
			jkey(&b, "status_text", false);
			jstr(&b, ev->status_text);
		}
	}
	jraw(&b, "}");
	if (b.full)
		return -ENOSPC;
	assert(b.len <= (size_t)INT32_MAX);
	return (int)b.len;
}
