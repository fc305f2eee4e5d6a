/*
 * test_alarmperf.c - alarm performance figures on hand-counted event
 * sequences. Every expected number below was counted by hand from the
 * sequence beside it, with the definitions of alarmperf.h.
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>

#include <cmocka.h>
#include <cjson/cJSON.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "alarmperf.h"

#define T0_MS 1767225600000LL /* 2026-01-01T00:00:00Z, on a 10-minute boundary */
#define S(x) (T0_MS + (int64_t)((x) * 1000.0))

static void near(double got, double want, double tol)
{
	if (!(fabs(got - want) <= tol)) {
		fprintf(stderr, "got %.17g, want %.17g\n", got, want);
		fail();
	}
}

/* An activation at t lasting d seconds (normal -> unacknowledged -> normal is
 * not what the engine does without an ack, but the figures only look at the
 * active states; returned_unacknowledged is the usual end). */
static void pulse(struct alarmperf *ap, unsigned ai, double t, double d)
{
	alarmperf_on_change(ap, ai, S(t), ALARM_STATE_NORM, ALARM_STATE_UNACK);
	alarmperf_on_change(ap, ai, S(t + d), ALARM_STATE_UNACK, ALARM_STATE_RTNUN);
}

/* Starts at 0, 20, 40, 50, 200, 210, 220 s (5 s each) and 1000 s (100 s).
 * Chatter (>= 2 others in the preceding 60 s): 40 (0, 20), 50 (20, 40) ->
 * one run; 200 (50 is 150 s back) no; 210 (200, 50) no; 220 (210, 200) yes ->
 * second run; 1000 no. Episodes 2. Fleeting (< 10 s): the seven 5 s ones.
 * Time in alarm 7 x 5 + 100 = 135 s, longest 100 s. */
static void test_chattering_and_fleeting_counted_by_hand(void **state)
{
	(void)state;
	struct alarmperf ap;
	enum alarm_priority pr[1] = {ALARM_PRIORITY_HIGH};
	assert_int_equal(alarmperf_init(&ap, 1, pr, NULL, 0), 0);
	const double starts[] = {0, 20, 40, 50, 200, 210, 220};
	for (size_t i = 0; i < 7; i++)
		pulse(&ap, 0, starts[i], 5);
	pulse(&ap, 0, 1000, 100);
	alarmperf_finish(&ap, S(0), S(1800));
	const struct alarmperf_alarm *a = &ap.a[0];
	assert_int_equal(a->activations, 8);
	assert_int_equal(a->chattering_episodes, 2);
	assert_int_equal(a->fleeting, 7);
	near(a->time_in_alarm_s, 135.0, 1e-9);
	near(a->longest_active_s, 100.0, 1e-9);
	assert_true(a->first_activation_t_ms == S(0));
	/* Periods 00:00, 00:10, 00:20, 00:30 (the last sample at 00:30:00 opens
	 * the fourth): 7 + 1 + 0 + 0 activations. */
	struct alarmperf_overall o;
	alarmperf_overall(&ap, &o);
	near(o.rate_per_10min_avg, 8.0 / 4.0, 1e-12);
	near(o.rate_per_10min_max, 7.0, 0.0);
	near(o.pct_10min_over_10, 0.0, 0.0);
	assert_int_equal(o.standing_alarms, 0);
	near(o.priority_share[ALARM_PRIORITY_HIGH], 1.0, 0.0);
	near(o.priority_share[ALARM_PRIORITY_LOW], 0.0, 0.0);
}

/* 12 starts 30 s apart from 5 s: 5, 35, ..., 335, all in the 00:00 period.
 * The third (65 s) has 5 s exactly 60 s back: the window is inclusive, so it
 * chatters, and so does every later one: one episode. Data 00:00..00:19:59:
 * two periods, one with 12 > 10 activations -> 50 %. */
static void test_busy_period_and_inclusive_chatter_window(void **state)
{
	(void)state;
	struct alarmperf ap;
	enum alarm_priority pr[1] = {ALARM_PRIORITY_LOW};
	assert_int_equal(alarmperf_init(&ap, 1, pr, NULL, 0), 0);
	for (int i = 0; i < 12; i++)
		pulse(&ap, 0, 5 + 30 * i, 1);
	alarmperf_finish(&ap, S(0), S(1199));
	assert_int_equal(ap.a[0].activations, 12);
	assert_int_equal(ap.a[0].chattering_episodes, 1);
	assert_int_equal(ap.a[0].fleeting, 12);
	struct alarmperf_overall o;
	alarmperf_overall(&ap, &o);
	near(o.rate_per_10min_avg, 6.0, 1e-12);
	near(o.rate_per_10min_max, 12.0, 0.0);
	near(o.pct_10min_over_10, 50.0, 1e-12);
	/* 10 in a period is not "more than 10". */
	assert_int_equal(alarmperf_init(&ap, 1, pr, NULL, 0), 0);
	for (int i = 0; i < 10; i++)
		pulse(&ap, 0, 5 + 30 * i, 1);
	alarmperf_finish(&ap, S(0), S(599));
	alarmperf_overall(&ap, &o);
	near(o.pct_10min_over_10, 0.0, 0.0);
	near(o.rate_per_10min_max, 10.0, 0.0);
}

/* Masks: an acknowledgement is not a new activation; a return to
 * unacknowledged from returned_unacknowledged is; changes while shelved or
 * suppressed make no activation; an alarm still active at a shelve's expiry
 * is annunciated then and counts; the alarm active at the end is standing,
 * counted to the last sample and not fleeting though short. */
static void test_masks_acks_and_standing_alarms(void **state)
{
	(void)state;
	struct alarmperf ap;
	enum alarm_priority pr[2] = {ALARM_PRIORITY_MEDIUM, ALARM_PRIORITY_URGENT};
	assert_int_equal(alarmperf_init(&ap, 2, pr, NULL, 0), 0);
	/* alarm 0 */
	alarmperf_on_change(&ap, 0, S(10), ALARM_STATE_NORM, ALARM_STATE_UNACK);  /* act 1 */
	alarmperf_on_change(&ap, 0, S(15), ALARM_STATE_UNACK, ALARM_STATE_ACKED); /* ack */
	alarmperf_on_change(&ap, 0, S(40), ALARM_STATE_ACKED, ALARM_STATE_NORM);  /* 30 s */
	alarmperf_on_change(&ap, 0, S(100), ALARM_STATE_NORM, ALARM_STATE_SHLVD); /* masked */
	alarmperf_on_change(&ap, 0, S(400), ALARM_STATE_SHLVD, ALARM_STATE_UNACK); /* act 2 */
	alarmperf_on_change(&ap, 0, S(460), ALARM_STATE_UNACK, ALARM_STATE_RTNUN); /* 60 s */
	alarmperf_on_change(&ap, 0, S(470), ALARM_STATE_RTNUN, ALARM_STATE_UNACK); /* act 3 */
	alarmperf_on_change(&ap, 0, S(475), ALARM_STATE_UNACK, ALARM_STATE_DSUPR); /* 5 s, fleeting */
	alarmperf_on_change(&ap, 0, S(900), ALARM_STATE_DSUPR, ALARM_STATE_NORM);
	/* alarm 1: suppressed and out of service, then standing from 1795 s */
	alarmperf_on_change(&ap, 1, S(50), ALARM_STATE_NORM, ALARM_STATE_DSUPR);
	alarmperf_on_change(&ap, 1, S(60), ALARM_STATE_DSUPR, ALARM_STATE_NORM);
	alarmperf_on_change(&ap, 1, S(70), ALARM_STATE_NORM, ALARM_STATE_OOSRV);
	alarmperf_on_change(&ap, 1, S(80), ALARM_STATE_OOSRV, ALARM_STATE_NORM);
	alarmperf_on_change(&ap, 1, S(1795), ALARM_STATE_NORM, ALARM_STATE_UNACK);
	alarmperf_finish(&ap, S(0), S(1800));
	assert_int_equal(ap.a[0].activations, 3);
	assert_int_equal(ap.a[0].fleeting, 1);
	near(ap.a[0].time_in_alarm_s, 30 + 60 + 5, 1e-9);
	near(ap.a[0].longest_active_s, 60.0, 1e-9);
	assert_int_equal(ap.a[0].chattering_episodes, 0); /* 10, 400, 470: never 3 in 60 s */
	assert_int_equal(ap.a[1].activations, 1);
	assert_int_equal(ap.a[1].fleeting, 0);
	near(ap.a[1].time_in_alarm_s, 5.0, 1e-9);
	struct alarmperf_overall o;
	alarmperf_overall(&ap, &o);
	assert_int_equal(o.standing_alarms, 1);
	near(o.priority_share[ALARM_PRIORITY_MEDIUM], 0.75, 1e-12);
	near(o.priority_share[ALARM_PRIORITY_URGENT], 0.25, 1e-12);
}

/* Events at 3600 s and 7200 s (given out of order: they are sorted).
 * Alarm 0 starts at 1000, 3000, 5000: lead before the first event
 * 3600 - 3000 = 600 s, before the second 7200 - 5000 = 2200 s.
 * Alarm 1 starts at 4000 only: no lead for the first, 3200 s for the second.
 * Alarm 2 starts exactly at 3600: not before the event, no lead. */
static void test_lead_time_before_each_event(void **state)
{
	(void)state;
	struct alarmperf ap;
	enum alarm_priority pr[3] = {ALARM_PRIORITY_HIGH, ALARM_PRIORITY_LOW,
				     ALARM_PRIORITY_URGENT};
	int64_t ev[2] = {S(7200), S(3600)};
	assert_int_equal(alarmperf_init(&ap, 3, pr, ev, 2), 0);
	pulse(&ap, 0, 1000, 100);
	pulse(&ap, 0, 3000, 500);
	pulse(&ap, 2, 3600, 30);
	pulse(&ap, 1, 4000, 30);
	pulse(&ap, 0, 5000, 30);
	alarmperf_finish(&ap, S(0), S(9000));
	near(alarmperf_lead_s(&ap, 0, 0), 600.0, 1e-9);
	near(alarmperf_lead_s(&ap, 0, 1), 2200.0, 1e-9);
	assert_true(isnan(alarmperf_lead_s(&ap, 1, 0)));
	near(alarmperf_lead_s(&ap, 1, 1), 3200.0, 1e-9);
	assert_true(isnan(alarmperf_lead_s(&ap, 2, 0)));
	struct alarmperf_overall o;
	alarmperf_overall(&ap, &o);
	near(o.priority_share[ALARM_PRIORITY_HIGH], 0.6, 1e-12);
	near(o.priority_share[ALARM_PRIORITY_LOW], 0.2, 1e-12);
	near(o.priority_share[ALARM_PRIORITY_URGENT], 0.2, 1e-12);
	near(o.priority_share[ALARM_PRIORITY_MEDIUM], 0.0, 0.0);
}

static cJSON *item(const cJSON *o, const char *k)
{
	cJSON *i = cJSON_GetObjectItemCaseSensitive(o, k);
	assert_non_null(i);
	return i;
}

/* summary.json: exactly the keys of DESIGN.md, nulls where there is nothing. */
static void test_summary_json_has_the_contract_keys(void **state)
{
	(void)state;
	struct alarmperf ap;
	enum alarm_priority pr[2] = {ALARM_PRIORITY_HIGH, ALARM_PRIORITY_LOW};
	int64_t ev[1] = {S(3600)};
	assert_int_equal(alarmperf_init(&ap, 2, pr, ev, 1), 0);
	pulse(&ap, 0, 3000, 1234.5);
	alarmperf_finish(&ap, S(0), S(5999));
	char path[] = "/tmp/fg-alarmperf-XXXXXX";
	int fd = mkstemp(path);
	assert_true(fd >= 0);
	FILE *f = fdopen(fd, "w+");
	const char *names[2] = {"C401_FLOOD_H", "C401_WEEP_L"};
	assert_int_equal(alarmperf_write_summary(&ap, names, f), 0);
	rewind(f);
	char text[4096];
	size_t n = fread(text, 1, sizeof text - 1, f);
	text[n] = '\0';
	fclose(f);
	unlink(path);
	cJSON *j = cJSON_Parse(text);
	assert_non_null(j);
	assert_int_equal(cJSON_GetArraySize(j), 2);
	cJSON *alarms = item(j, "alarms"), *overall = item(j, "overall");
	assert_int_equal(cJSON_GetArraySize(alarms), 2);
	static const char *const akeys[] = {"activations", "chattering_episodes", "fleeting",
					    "time_in_alarm_s", "longest_active_s",
					    "first_activation", "lead_s"};
	cJSON *a = item(alarms, "C401_FLOOD_H"), *b = item(alarms, "C401_WEEP_L");
	assert_int_equal(cJSON_GetArraySize(a), 7);
	for (size_t i = 0; i < 7; i++) {
		item(a, akeys[i]);
		item(b, akeys[i]);
	}
	near(item(a, "activations")->valuedouble, 1, 0);
	near(item(a, "time_in_alarm_s")->valuedouble, 1234.5, 0);
	assert_string_equal(item(a, "first_activation")->valuestring, "2026-01-01T00:50:00Z");
	near(item(a, "lead_s")->valuedouble, 600, 0);
	assert_true(cJSON_IsNull(item(b, "first_activation")));
	assert_true(cJSON_IsNull(item(b, "lead_s")));
	static const char *const okeys[] = {"alarm_rate_per_10min_avg", "alarm_rate_per_10min_max",
					    "pct_10min_over_10", "standing_alarms",
					    "priority_share"};
	assert_int_equal(cJSON_GetArraySize(overall), 5);
	for (size_t i = 0; i < 5; i++)
		item(overall, okeys[i]);
	near(item(overall, "alarm_rate_per_10min_avg")->valuedouble, 0.1, 1e-15); /* 1 / 10 */
	near(item(item(overall, "priority_share"), "high")->valuedouble, 1.0, 0);
	cJSON_Delete(j);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_chattering_and_fleeting_counted_by_hand),
		cmocka_unit_test(test_busy_period_and_inclusive_chatter_window),
		cmocka_unit_test(test_masks_acks_and_standing_alarms),
		cmocka_unit_test(test_lead_time_before_each_event),
		cmocka_unit_test(test_summary_json_has_the_contract_keys),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
