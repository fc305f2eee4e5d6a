/*
 * alarmperf.h - alarm performance figures from a stream of alarm events.
 *
 * What an alarm management review asks of a recorded period, computed from
 * the visible state changes the engine writes to events.jsonl. Definitions
 * (each named where it is printed, in the report and in the README):
 *
 *   activation        a change of the visible state into an active state
 *                     (unacknowledged or acknowledged) from any state that is
 *                     not active. An alarm whose condition comes and goes while
 *                     it is shelved, suppressed by design or out of service
 *                     makes no visible change, so it is not counted; one that
 *                     is still active when such a mask ends is annunciated then
 *                     and counts once. (ISA-18.2 "alarm activation"; EEMUA 191
 *                     counts "alarms annunciated" the same way.)
 *   chattering episode a maximal run of consecutive activations of one alarm in
 *                     which each activation has at least 2 other activations of
 *                     the same alarm in the preceding chatter_window_s
 *                     (default 60 s; "3 or more in a minute", the common
 *                     rule of ISA-18.2 TR5 and EEMUA 191). The window is
 *                     inclusive: t - t_prev <= window.
 *   fleeting          an activation that returned to a non-active state less
 *                     than fleeting_s (default 10 s) after it began (EEMUA 191
 *                     "fleeting alarm"). One still active at the end is not
 *                     counted.
 *   time_in_alarm_s   total time in the active states; longest_active_s the
 *                     longest single activation. An alarm still active at the
 *                     end of the data counts until the last sample.
 *   first_activation  start of the first activation.
 *   lead_s            with events: the first event's time minus the start of
 *                     the last activation that began before it; NAN (null)
 *                     when none did. (Our definition; the standards have none.)
 *   alarm rates       over clock-aligned 10-minute periods (00:00, 00:10, ...
 *                     UTC) from the one holding the first sample to the one
 *                     holding the last, empty ones included:
 *                     alarm_rate_per_10min_avg = activations / periods,
 *                     alarm_rate_per_10min_max = the most in one period,
 *                     pct_10min_over_10 = 100 x share of periods with more
 *                     than 10 activations (ISA-18.2 table of alarm system
 *                     performance metrics; EEMUA 191 average rate per 10 min).
 *   standing_alarms   alarms active at the end of the data (EEMUA 191
 *                     "standing alarm"; our end-of-file snapshot).
 *   priority_share    activations per priority over all activations, a fraction
 *                     0..1 per priority (EEMUA 191 priority distribution);
 *                     NAN (null) when there were none.
 *
 * Events must come in time order (as the engine writes them). No allocation,
 * no I/O except alarmperf_write_summary.
 */
#ifndef ALARMPERF_H
#define ALARMPERF_H

#include <stdbool.h>
#include <stdint.h>
#include <stdio.h>

#include "alarm.h"
#include "fg_limits.h"
#include "jsonw.h"

/* Labelled events (--event) a replay can mark; more is not a replay but a
 * logbook. */
#define ALARMPERF_EVENTS_MAX 16
#define ALARMPERF_T_NONE INT64_MIN
#define ALARMPERF_CHATTER_WINDOW_S_DEFAULT 60.0
#define ALARMPERF_CHATTER_COUNT 2 /* others in the window that make one chatter */
#define ALARMPERF_FLEETING_S_DEFAULT 10.0
#define ALARMPERF_PERIOD_MS 600000 /* 10 min */
#define ALARMPERF_PERIOD_BUSY 10   /* more than this many activations: a busy period */

/* Figures and running state of one alarm. */
struct alarmperf_alarm {
	uint64_t activations;
	uint64_t chattering_episodes;
	uint64_t fleeting;
	double time_in_alarm_s;
	double longest_active_s;
	int64_t first_activation_t_ms;      /* ALARMPERF_T_NONE when none */
	int64_t last_start_before_t_ms[ALARMPERF_EVENTS_MAX]; /* per event; T_NONE */
	/* running state */
	bool active;                        /* in an active state now */
	int64_t active_since_t_ms;
	int64_t prev_start_t_ms[ALARMPERF_CHATTER_COUNT]; /* newest first, T_NONE */
	bool in_chatter_run;
	enum alarm_priority priority;
};

struct alarmperf {
	unsigned alarm_count;
	double chatter_window_s, fleeting_s;
	unsigned event_count;
	int64_t event_t_ms[ALARMPERF_EVENTS_MAX]; /* ascending */
	struct alarmperf_alarm a[FG_ALARMS_MAX];
	/* the 10-minute periods, streamed */
	int64_t period_index;               /* period of the latest activation, or T_NONE */
	uint64_t period_count_now;          /* activations in it */
	uint64_t period_max, periods_busy;
	uint64_t by_priority[ALARM_PRIORITY_COUNT];
	bool finished;
	/* set by alarmperf_finish */
	int64_t first_t_ms, last_t_ms;
	uint64_t periods;                   /* clock-aligned 10-min periods spanned */
};

/* The overall figures, from a finished alarmperf. */
struct alarmperf_overall {
	uint64_t activations;
	double rate_per_10min_avg, rate_per_10min_max, pct_10min_over_10;
	unsigned standing_alarms;
	double priority_share[ALARM_PRIORITY_COUNT]; /* NAN when no activations */
};

/* Sets ap up for alarm_count alarms with the given priorities and the default
 * windows. event_t_ms (event_count <= ALARMPERF_EVENTS_MAX) are sorted into
 * ascending order. Returns 0, or -EINVAL for too many alarms or events. */
int alarmperf_init(struct alarmperf *ap, unsigned alarm_count,
		   const enum alarm_priority *priority, const int64_t *event_t_ms,
		   unsigned event_count);

/* Takes one visible state change of alarm ai at t_ms (prev -> state). */
void alarmperf_on_change(struct alarmperf *ap, unsigned ai, int64_t t_ms,
			 enum alarm_state prev, enum alarm_state state);

/* Closes the period: first_t_ms and last_t_ms are the first and last sample
 * times of the data (last >= first). Call once, before reading figures. */
void alarmperf_finish(struct alarmperf *ap, int64_t first_t_ms, int64_t last_t_ms);

/* Lead time of alarm ai before event k, s; NAN when no activation began
 * before it. */
double alarmperf_lead_s(const struct alarmperf *ap, unsigned ai, unsigned k);

void alarmperf_overall(const struct alarmperf *ap, struct alarmperf_overall *o);

/* Writes alarm ai's figures as members of the open object w, with the keys of
 * summary.json: activations, chattering_episodes, fleeting, time_in_alarm_s,
 * longest_active_s, first_activation, lead_s. */
void alarmperf_alarm_json(const struct alarmperf *ap, unsigned ai, struct jsonw *w);

/* Writes summary.json: {"alarms":{NAME:{...},...},"overall":{...}}, names[i]
 * the name of alarm i. Returns 0, -ENOMEM, or -EIO. */
int alarmperf_write_summary(const struct alarmperf *ap, const char *const *names, FILE *f);

#endif
