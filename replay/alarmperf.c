/*
 * alarmperf.c - see alarmperf.h for the definitions.
 */
#include "alarmperf.h"

#include <assert.h>
#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "timefmt.h"

static bool state_is_active(enum alarm_state s)
{
	return s == ALARM_STATE_UNACK || s == ALARM_STATE_ACKED;
}

static int cmp_t(const void *a, const void *b)
{
	int64_t x = *(const int64_t *)a, y = *(const int64_t *)b;
	return (x > y) - (x < y);
}

/* Floor division: the clock-aligned period holding t_ms (also before 1970). */
static int64_t period_of(int64_t t_ms)
{
	int64_t q = t_ms / ALARMPERF_PERIOD_MS;
	if (t_ms % ALARMPERF_PERIOD_MS != 0 && t_ms < 0)
		q--;
	return q;
}

int alarmperf_init(struct alarmperf *ap, unsigned alarm_count,
		   const enum alarm_priority *priority, const int64_t *event_t_ms,
		   unsigned event_count)
{
	assert(ap != NULL);
	if (alarm_count > FG_ALARMS_MAX || event_count > ALARMPERF_EVENTS_MAX)
		return -EINVAL;
	assert(alarm_count == 0 || priority != NULL);
	assert(event_count == 0 || event_t_ms != NULL);
	memset(ap, 0, sizeof(*ap));
	ap->alarm_count = alarm_count;
	ap->chatter_window_s = ALARMPERF_CHATTER_WINDOW_S_DEFAULT;
	ap->fleeting_s = ALARMPERF_FLEETING_S_DEFAULT;
	ap->event_count = event_count;
	if (event_count > 0)
		memcpy(ap->event_t_ms, event_t_ms, event_count * sizeof(event_t_ms[0]));
	qsort(ap->event_t_ms, event_count, sizeof(ap->event_t_ms[0]), cmp_t);
	ap->period_index = ALARMPERF_T_NONE;
	for (unsigned i = 0; i < alarm_count; i++) {
		struct alarmperf_alarm *a = &ap->a[i];
		assert((unsigned)priority[i] < ALARM_PRIORITY_COUNT);
		a->priority = priority[i];
		a->first_activation_t_ms = ALARMPERF_T_NONE;
		for (unsigned k = 0; k < ALARMPERF_EVENTS_MAX; k++)
			a->last_start_before_t_ms[k] = ALARMPERF_T_NONE;
		for (unsigned k = 0; k < ALARMPERF_CHATTER_COUNT; k++)
			a->prev_start_t_ms[k] = ALARMPERF_T_NONE;
		a->active_since_t_ms = ALARMPERF_T_NONE;
	}
	return 0;
}

static void close_period(struct alarmperf *ap)
{
	if (ap->period_index == ALARMPERF_T_NONE)
		return;
	if (ap->period_count_now > ap->period_max)
		ap->period_max = ap->period_count_now;
	if (ap->period_count_now > ALARMPERF_PERIOD_BUSY)
		ap->periods_busy++;
}

static void count_in_period(struct alarmperf *ap, int64_t t_ms)
{
	int64_t p = period_of(t_ms);
	if (p != ap->period_index) {
		close_period(ap);
		ap->period_index = p;
		ap->period_count_now = 0;
	}
	ap->period_count_now++;
}

static void activation(struct alarmperf *ap, struct alarmperf_alarm *a, int64_t t_ms)
{
	a->activations++;
	ap->by_priority[a->priority]++;
	if (a->first_activation_t_ms == ALARMPERF_T_NONE)
		a->first_activation_t_ms = t_ms;
	for (unsigned k = 0; k < ap->event_count; k++)
		if (t_ms < ap->event_t_ms[k])
			a->last_start_before_t_ms[k] = t_ms;
	/* Chattering: the oldest of the last ALARMPERF_CHATTER_COUNT starts is
	 * within the window, so all of them are. */
	int64_t oldest = a->prev_start_t_ms[ALARMPERF_CHATTER_COUNT - 1];
	bool chatter = oldest != ALARMPERF_T_NONE &&
		       (double)(t_ms - oldest) <= ap->chatter_window_s * 1000.0;
	if (chatter && !a->in_chatter_run)
		a->chattering_episodes++;
	a->in_chatter_run = chatter;
	for (unsigned k = ALARMPERF_CHATTER_COUNT - 1; k > 0; k--)
		a->prev_start_t_ms[k] = a->prev_start_t_ms[k - 1];
	a->prev_start_t_ms[0] = t_ms;
	a->active = true;
	a->active_since_t_ms = t_ms;
	count_in_period(ap, t_ms);
}

static void end_active(struct alarmperf_alarm *a, int64_t t_ms, double fleeting_s, bool ended)
{
	double d = (double)(t_ms - a->active_since_t_ms) / 1000.0;
	if (d < 0.0)
		d = 0.0;
	a->time_in_alarm_s += d;
	if (d > a->longest_active_s)
		a->longest_active_s = d;
	if (ended && d < fleeting_s)
		a->fleeting++;
	a->active = !ended;
}

void alarmperf_on_change(struct alarmperf *ap, unsigned ai, int64_t t_ms,
			 enum alarm_state prev, enum alarm_state state)
{
	assert(ap != NULL);
	assert(!ap->finished);
	assert(ai < ap->alarm_count);
	(void)prev; /* the running state knows whether the alarm was active */
	struct alarmperf_alarm *a = &ap->a[ai];
	bool now = state_is_active(state);
	if (now && !a->active)
		activation(ap, a, t_ms);
	else if (!now && a->active)
		end_active(a, t_ms, ap->fleeting_s, true);
}

void alarmperf_finish(struct alarmperf *ap, int64_t first_t_ms, int64_t last_t_ms)
{
	assert(ap != NULL);
	assert(!ap->finished);
	assert(last_t_ms >= first_t_ms);
	close_period(ap);
	for (unsigned i = 0; i < ap->alarm_count; i++)
		if (ap->a[i].active)
			end_active(&ap->a[i], last_t_ms, ap->fleeting_s, false);
	ap->first_t_ms = first_t_ms;
	ap->last_t_ms = last_t_ms;
	ap->periods = (uint64_t)(period_of(last_t_ms) - period_of(first_t_ms) + 1);
	ap->finished = true;
}

double alarmperf_lead_s(const struct alarmperf *ap, unsigned ai, unsigned k)
{
	assert(ap != NULL);
	assert(ai < ap->alarm_count);
	if (k >= ap->event_count)
		return NAN;
	int64_t s = ap->a[ai].last_start_before_t_ms[k];
	if (s == ALARMPERF_T_NONE)
		return NAN;
	return (double)(ap->event_t_ms[k] - s) / 1000.0;
}

void alarmperf_overall(const struct alarmperf *ap, struct alarmperf_overall *o)
{
	assert(ap != NULL);
	assert(o != NULL);
	assert(ap->finished);
	memset(o, 0, sizeof(*o));
	for (int p = 0; p < ALARM_PRIORITY_COUNT; p++)
		o->activations += ap->by_priority[p];
	double periods = (double)(ap->periods > 0 ? ap->periods : 1);
	o->rate_per_10min_avg = (double)o->activations / periods;
	o->rate_per_10min_max = (double)ap->period_max;
	o->pct_10min_over_10 = 100.0 * (double)ap->periods_busy / periods;
	for (unsigned i = 0; i < ap->alarm_count; i++)
		if (ap->a[i].active)
			o->standing_alarms++;
	for (int p = 0; p < ALARM_PRIORITY_COUNT; p++)
		o->priority_share[p] = o->activations == 0
					       ? NAN
					       : (double)ap->by_priority[p] / (double)o->activations;
}

void alarmperf_alarm_json(const struct alarmperf *ap, unsigned ai, struct jsonw *w)
{
	assert(ap != NULL);
	assert(ai < ap->alarm_count);
	const struct alarmperf_alarm *a = &ap->a[ai];
	jsonw_num(w, "activations", (double)a->activations);
	jsonw_num(w, "chattering_episodes", (double)a->chattering_episodes);
	jsonw_num(w, "fleeting", (double)a->fleeting);
	jsonw_num(w, "time_in_alarm_s", a->time_in_alarm_s);
	jsonw_num(w, "longest_active_s", a->longest_active_s);
	char ts[TIMEFMT_BUF_SIZE];
	if (a->first_activation_t_ms != ALARMPERF_T_NONE &&
	    timefmt_format(a->first_activation_t_ms, ts, sizeof ts) >= 0)
		jsonw_str(w, "first_activation", ts);
	else
		jsonw_null(w, "first_activation");
	jsonw_num(w, "lead_s", alarmperf_lead_s(ap, ai, 0));
}

int alarmperf_write_summary(const struct alarmperf *ap, const char *const *names, FILE *f)
{
	assert(ap != NULL);
	assert(f != NULL);
	assert(ap->alarm_count == 0 || names != NULL);
	/* About 250 bytes an alarm with names of FG_NAME_MAX, plus the overall. */
	size_t cap = 1024 + (size_t)ap->alarm_count * 512;
	char *buf = malloc(cap);
	if (buf == NULL)
		return -ENOMEM;
	struct jsonw w;
	jsonw_init(&w, buf, cap);
	jsonw_open(&w);
	jsonw_open_key(&w, "alarms");
	for (unsigned i = 0; i < ap->alarm_count; i++) {
		jsonw_open_key(&w, names[i]);
		alarmperf_alarm_json(ap, i, &w);
		jsonw_close(&w);
	}
	jsonw_close(&w);
	struct alarmperf_overall o;
	alarmperf_overall(ap, &o);
	jsonw_open_key(&w, "overall");
	jsonw_num(&w, "alarm_rate_per_10min_avg", o.rate_per_10min_avg);
	jsonw_num(&w, "alarm_rate_per_10min_max", o.rate_per_10min_max);
	jsonw_num(&w, "pct_10min_over_10", o.pct_10min_over_10);
	jsonw_num(&w, "standing_alarms", (double)o.standing_alarms);
	jsonw_open_key(&w, "priority_share");
	for (int p = 0; p < ALARM_PRIORITY_COUNT; p++)
		jsonw_num(&w, alarm_priority_name((enum alarm_priority)p), o.priority_share[p]);
	jsonw_close(&w);
	jsonw_close(&w);
	jsonw_close(&w);
	int rc = 0;
	if (jsonw_finish(&w) < 0)
		rc = -ENOMEM;
	else if (fprintf(f, "%s\n", buf) < 0 || ferror(f))
		rc = -EIO;
	free(buf);
	return rc;
}
