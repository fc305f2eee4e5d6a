/*
 * test_alarm.c - unit tests of monitor/alarm.c, one behaviour each.
 *
 * Where the expected behaviour comes from, beside each test:
 * - "ISA-18.2": the alarm state transition diagram of ANSI/ISA-18.2-2016 and
 *   IEC 62682:2014 (states NORM, UNACK, ACKED, RTNUN, SHLVD, DSUPR, OOSRV and
 *   the transitions between them), and their definitions of setpoint,
 *   deadband, on-delay and off-delay; from memory, the standards are not in
 *   front of us.
 * - "alarm.h": a choice the standards leave open, documented there.
 * - Rate alarms: expected times are hand calculations from the ramp, shown in
 *   the test; times are exact to the sample (1 s) because the comparison is
 *   made at samples only.
 * - JSON: RFC 8259 (from memory) for escaping; cJSON 1.7.15 (Debian 12) as an
 *   independent parser that must read back what we wrote.
 * Values are compared exactly where the arithmetic is exact (setpoints hit on
 * samples, integer ms); tolerances are stated where it is not.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include <cJSON.h>

#include "alarm.h"

/* 2026-01-01T00:00:00Z, ms since the Unix epoch (date -d @1767225600). */
#define T0_MS INT64_C(1767225600000)

static int64_t at_s(double s)
{
	return T0_MS + (int64_t)llround(s * 1000.0);
}

static struct alarm_cfg make_cfg(enum alarm_kind kind, double setpoint, double deadband)
{
	struct alarm_cfg c;
	alarm_cfg_defaults(&c);
	snprintf(c.name, sizeof c.name, "T1_%s", alarm_kind_name(kind));
	c.kind = kind;
	c.field = kind == ALARM_KIND_DIAGNOSTIC ? ALARM_FIELD_QUALITY : RF_FLOOD_INDEX;
	if (kind == ALARM_KIND_DEVIATION) {
		c.field = RF_DP_PA;
		c.reference_field = RF_DP_MODEL_PA;
	}
	c.setpoint = setpoint;
	c.deadband = deadband;
	c.priority = ALARM_PRIORITY_HIGH;
	return c;
}

static struct alarm make_alarm(enum alarm_kind kind, double setpoint, double deadband)
{
	struct alarm_cfg c = make_cfg(kind, setpoint, deadband);
	assert_int_equal(alarm_cfg_check(&c, NULL, 0), 0);
	struct alarm a;
	alarm_init(&a, &c, 3);
	return a;
}

static struct alarm_input good(double v)
{
	struct alarm_input in = {.value = v, .reference = 0.0, .quality = FG_QUALITY_GOOD,
				 .suppressed = false, .diag_reason = NULL};
	return in;
}

static int step(struct alarm *a, double v, double t_s, struct alarm_event *ev)
{
	struct alarm_input in = good(v);
	return alarm_step(a, &in, at_s(t_s), ev);
}

static int step_in(struct alarm *a, struct alarm_input in, double t_s, struct alarm_event *ev)
{
	return alarm_step(a, &in, at_s(t_s), ev);
}

static void assert_event(const struct alarm_event *ev, enum alarm_state prev,
			 enum alarm_state state)
{
	assert_string_equal(alarm_state_name(ev->prev), alarm_state_name(prev));
	assert_string_equal(alarm_state_name(ev->state), alarm_state_name(state));
}

/* Drives a high alarm (setpoint 80, deadband 2) into the given state. */
static struct alarm alarm_in_state(enum alarm_state s)
{
	struct alarm a = make_alarm(ALARM_KIND_HIGH, 80.0, 2.0);
	struct alarm_event ev;
	step(&a, 50.0, 0, &ev);
	if (s == ALARM_STATE_NORM)
		return a;
	if (s == ALARM_STATE_DSUPR) {
		struct alarm_input in = good(50.0);
		in.suppressed = true;
		assert_int_equal(step_in(&a, in, 1, &ev), 1);
		return a;
	}
	if (s == ALARM_STATE_OOSRV) {
		assert_int_equal(alarm_set_out_of_service(&a, true, at_s(1), &ev), 0);
		return a;
	}
	assert_int_equal(step(&a, 90.0, 1, &ev), 1);
	if (s == ALARM_STATE_ACKED)
		assert_int_equal(alarm_ack(&a, at_s(2), &ev), 0);
	if (s == ALARM_STATE_RTNUN)
		assert_int_equal(step(&a, 50.0, 2, &ev), 1);
	if (s == ALARM_STATE_SHLVD)
		assert_int_equal(alarm_shelve(&a, 600.0, at_s(2), &ev), 0);
	assert_int_equal(a.state, s);
	return a;
}

/* ---- setpoint and deadband ------------------------------------------------- */

/* ISA-18.2: a high alarm activates when the value reaches the setpoint. */
static void test_high_activates_at_setpoint(void **state)
{
	(void)state;
	struct alarm a = make_alarm(ALARM_KIND_HIGH, 80.0, 2.0);
	struct alarm_event ev;
	assert_int_equal(step(&a, 79.99, 0, &ev), 0);
	assert_int_equal(a.state, ALARM_STATE_NORM);
	assert_int_equal(step(&a, 80.0, 1, &ev), 1);
	assert_event(&ev, ALARM_STATE_NORM, ALARM_STATE_UNACK);
	assert_true(ev.t_ms == at_s(1));
	assert_int_equal(ev.alarm_index, 3);
	assert_true(ev.value == 80.0);
	assert_true(ev.setpoint == 80.0);
	assert_null(ev.reason);
}

/* ISA-18.2 deadband: clears only below setpoint - deadband (80 - 2 = 78). */
static void test_high_clears_below_setpoint_minus_deadband(void **state)
{
	(void)state;
	struct alarm a = make_alarm(ALARM_KIND_HIGH, 80.0, 2.0);
	struct alarm_event ev;
	assert_int_equal(step(&a, 85.0, 0, &ev), 1);
	assert_int_equal(step(&a, 79.0, 1, &ev), 0);
	assert_int_equal(step(&a, 78.0, 2, &ev), 0);
	assert_int_equal(a.state, ALARM_STATE_UNACK);
	assert_int_equal(step(&a, 77.99, 3, &ev), 1);
	assert_event(&ev, ALARM_STATE_UNACK, ALARM_STATE_RTNUN);
}

/* ISA-18.2, mirrored for low: on at <= 20, off above 20 + 1. */
static void test_low_activates_at_setpoint_and_clears_above_deadband(void **state)
{
	(void)state;
	struct alarm a = make_alarm(ALARM_KIND_LOW, 20.0, 1.0);
	struct alarm_event ev;
	assert_int_equal(step(&a, 20.01, 0, &ev), 0);
	assert_int_equal(step(&a, 20.0, 1, &ev), 1);
	assert_event(&ev, ALARM_STATE_NORM, ALARM_STATE_UNACK);
	assert_int_equal(step(&a, 21.0, 2, &ev), 0);
	assert_int_equal(step(&a, 21.01, 3, &ev), 1);
	assert_event(&ev, ALARM_STATE_UNACK, ALARM_STATE_RTNUN);
}

/* ISA-18.2: the deadband exists to stop chatter; values wandering across the
 * setpoint but never below 78 give the one activation and nothing more. */
static void test_chatter_within_deadband_gives_no_extra_events(void **state)
{
	(void)state;
	static const double v[] = {80.5, 79.0, 80.2, 78.5, 81.0, 78.1, 80.0, 79.9, 78.0, 80.3};
	struct alarm a = make_alarm(ALARM_KIND_HIGH, 80.0, 2.0);
	struct alarm_event ev;
	int events = 0;
	for (size_t i = 0; i < sizeof v / sizeof v[0]; i++)
		events += step(&a, v[i], (double)i, &ev);
	assert_int_equal(events, 1);
	assert_int_equal(a.state, ALARM_STATE_UNACK);
}

/* The same wandering with no deadband chatters: the contrast shows the test
 * above would see extra events if the deadband were ignored. */
static void test_chatter_without_deadband_gives_events(void **state)
{
	(void)state;
	static const double v[] = {80.5, 79.0, 80.2, 78.5};
	struct alarm a = make_alarm(ALARM_KIND_HIGH, 80.0, 0.0);
	struct alarm_event ev;
	int events = 0;
	for (size_t i = 0; i < sizeof v / sizeof v[0]; i++)
		events += step(&a, v[i], (double)i, &ev);
	assert_int_equal(events, 4);
}

/* alarm.h: high-high is a high with its own setpoint. At 85 only the high
 * (80) is active; at 92 both are. */
static void test_high_high_uses_its_own_setpoint(void **state)
{
	(void)state;
	struct alarm hi = make_alarm(ALARM_KIND_HIGH, 80.0, 2.0);
	struct alarm hh = make_alarm(ALARM_KIND_HIGH_HIGH, 90.0, 2.0);
	struct alarm_event ev;
	assert_int_equal(step(&hi, 85.0, 0, &ev), 1);
	assert_int_equal(step(&hh, 85.0, 0, &ev), 0);
	assert_int_equal(step(&hh, 92.0, 1, &ev), 1);
	assert_event(&ev, ALARM_STATE_NORM, ALARM_STATE_UNACK);
	assert_true(ev.setpoint == 90.0);
	assert_int_equal(step(&hh, 88.5, 2, &ev), 0);  /* in its deadband, 88..90 */
	assert_int_equal(step(&hh, 87.9, 3, &ev), 1);
	assert_event(&ev, ALARM_STATE_UNACK, ALARM_STATE_RTNUN);
}

/* ---- delays ------------------------------------------------------------------ */

/* ISA-18.2 on-delay: with 10 s and 1 s samples from t = 0, the condition has
 * held 10 s at t = 10, not before. */
static void test_on_delay_requires_condition_for_its_duration(void **state)
{
	(void)state;
	struct alarm_cfg c = make_cfg(ALARM_KIND_HIGH, 80.0, 2.0);
	c.on_delay_s = 10.0;
	struct alarm a;
	alarm_init(&a, &c, 0);
	struct alarm_event ev;
	for (int t = 0; t < 10; t++)
		assert_int_equal(step(&a, 85.0, t, &ev), 0);
	assert_int_equal(step(&a, 85.0, 10, &ev), 1);
	assert_event(&ev, ALARM_STATE_NORM, ALARM_STATE_UNACK);
}

/* ISA-18.2 on-delay: "continuously"; one sample below the setpoint at t = 6
 * restarts it, so the alarm comes at t = 7 + 10 = 17. */
static void test_on_delay_restarts_after_interruption(void **state)
{
	(void)state;
	struct alarm_cfg c = make_cfg(ALARM_KIND_HIGH, 80.0, 2.0);
	c.on_delay_s = 10.0;
	struct alarm a;
	alarm_init(&a, &c, 0);
	struct alarm_event ev;
	int fired_at = -1;
	for (int t = 0; t <= 30 && fired_at < 0; t++)
		if (step(&a, t == 6 ? 79.0 : 85.0, t, &ev) == 1)
			fired_at = t;
	assert_int_equal(fired_at, 17);
}

/* ISA-18.2 off-delay: the clear condition (< 78) must hold 5 s; a return into
 * the deadband at t = 3 restarts it: clear at t = 4 + 5 = 9. */
static void test_off_delay_holds_alarm_until_clear_persists(void **state)
{
	(void)state;
	struct alarm_cfg c = make_cfg(ALARM_KIND_HIGH, 80.0, 2.0);
	c.off_delay_s = 5.0;
	struct alarm a;
	alarm_init(&a, &c, 0);
	struct alarm_event ev;
	assert_int_equal(step(&a, 85.0, 0, &ev), 1);
	int cleared_at = -1;
	for (int t = 1; t <= 30 && cleared_at < 0; t++)
		if (step(&a, t == 3 ? 79.0 : 70.0, t, &ev) == 1)
			cleared_at = t;
	assert_int_equal(cleared_at, 9);
	assert_event(&ev, ALARM_STATE_UNACK, ALARM_STATE_RTNUN);
}

/* ---- lifecycle ---------------------------------------------------------------- */

/* ISA-18.2: NORM -> UNACK -> (ack) ACKED -> (clear) NORM. */
static void test_ack_while_active_then_clear_returns_norm(void **state)
{
	(void)state;
	struct alarm a = make_alarm(ALARM_KIND_HIGH, 80.0, 2.0);
	struct alarm_event ev;
	assert_int_equal(step(&a, 85.0, 0, &ev), 1);
	assert_event(&ev, ALARM_STATE_NORM, ALARM_STATE_UNACK);
	assert_int_equal(alarm_ack(&a, at_s(1), &ev), 0);
	assert_event(&ev, ALARM_STATE_UNACK, ALARM_STATE_ACKED);
	assert_true(ev.t_ms == at_s(1));
	assert_int_equal(step(&a, 85.0, 2, &ev), 0);
	assert_int_equal(step(&a, 70.0, 3, &ev), 1);
	assert_event(&ev, ALARM_STATE_ACKED, ALARM_STATE_NORM);
}

/* ISA-18.2: NORM -> UNACK -> (clear) RTNUN -> (ack) NORM. */
static void test_clear_before_ack_goes_rtnun_then_ack_norm(void **state)
{
	(void)state;
	struct alarm a = make_alarm(ALARM_KIND_HIGH, 80.0, 2.0);
	struct alarm_event ev;
	assert_int_equal(step(&a, 85.0, 0, &ev), 1);
	assert_int_equal(step(&a, 70.0, 1, &ev), 1);
	assert_event(&ev, ALARM_STATE_UNACK, ALARM_STATE_RTNUN);
	assert_int_equal(alarm_ack(&a, at_s(2), &ev), 0);
	assert_event(&ev, ALARM_STATE_RTNUN, ALARM_STATE_NORM);
}

/* ISA-18.2: an alarm returning while RTNUN becomes UNACK again. */
static void test_rtnun_reactivates_to_unack(void **state)
{
	(void)state;
	struct alarm a = alarm_in_state(ALARM_STATE_RTNUN);
	struct alarm_event ev;
	assert_int_equal(step(&a, 85.0, 10, &ev), 1);
	assert_event(&ev, ALARM_STATE_RTNUN, ALARM_STATE_UNACK);
}

/* alarm.h: ack with nothing to acknowledge is -EALREADY, masked -EPERM; the
 * state and the event buffer are left alone. */
static void test_ack_refused_where_it_does_not_apply(void **state)
{
	(void)state;
	static const struct {
		enum alarm_state s;
		int rc;
	} cases[] = {
		{ALARM_STATE_NORM, -EALREADY}, {ALARM_STATE_ACKED, -EALREADY},
		{ALARM_STATE_SHLVD, -EPERM},   {ALARM_STATE_DSUPR, -EPERM},
		{ALARM_STATE_OOSRV, -EPERM},
	};
	for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
		struct alarm a = alarm_in_state(cases[i].s);
		struct alarm_event ev, before;
		memset(&ev, 0x5a, sizeof ev);
		before = ev;
		assert_int_equal(alarm_ack(&a, at_s(20), &ev), cases[i].rc);
		assert_int_equal(a.state, cases[i].s);
		assert_memory_equal(&ev, &before, sizeof ev);
	}
}

/* alarm.h: a step without a state change returns 0 and leaves *ev alone. */
static void test_step_without_change_leaves_event_untouched(void **state)
{
	(void)state;
	struct alarm a = make_alarm(ALARM_KIND_HIGH, 80.0, 2.0);
	struct alarm_event ev, before;
	memset(&ev, 0x5a, sizeof ev);
	before = ev;
	assert_int_equal(step(&a, 50.0, 0, &ev), 0);
	assert_memory_equal(&ev, &before, sizeof ev);
}

/* ---- shelving ---------------------------------------------------------------- */

/* ISA-18.2: a shelved alarm returns by itself when the shelve expires; still
 * active, it comes back UNACK (even though it was acknowledged before). */
static void test_shelve_expiry_with_active_condition_returns_unack(void **state)
{
	(void)state;
	struct alarm a = alarm_in_state(ALARM_STATE_ACKED);
	struct alarm_event ev;
	assert_int_equal(alarm_shelve(&a, 60.0, at_s(10), &ev), 0);
	assert_event(&ev, ALARM_STATE_ACKED, ALARM_STATE_SHLVD);
	assert_int_equal(step(&a, 95.0, 69.999, &ev), 0);
	assert_int_equal(a.state, ALARM_STATE_SHLVD);
	assert_int_equal(step(&a, 95.0, 70.0, &ev), 1);   /* 10 s + 60 s */
	assert_event(&ev, ALARM_STATE_SHLVD, ALARM_STATE_UNACK);
}

/* ISA-18.2: after the shelve, a condition that cleared meanwhile gives NORM. */
static void test_shelve_expiry_with_clear_condition_returns_norm(void **state)
{
	(void)state;
	struct alarm a = alarm_in_state(ALARM_STATE_UNACK);
	struct alarm_event ev;
	assert_int_equal(alarm_shelve(&a, 30.0, at_s(10), &ev), 0);
	assert_int_equal(step(&a, 50.0, 20, &ev), 0);
	assert_int_equal(step(&a, 50.0, 40, &ev), 1);
	assert_event(&ev, ALARM_STATE_SHLVD, ALARM_STATE_NORM);
}

/* alarm.h: shelving applies from every state but OOSRV. */
static void test_shelve_from_every_state(void **state)
{
	(void)state;
	for (int s = 0; s < ALARM_STATE_COUNT; s++) {
		if (s == ALARM_STATE_SHLVD)
			continue;
		struct alarm a = alarm_in_state((enum alarm_state)s);
		struct alarm_event ev;
		int rc = alarm_shelve(&a, 60.0, at_s(10), &ev);
		if (s == ALARM_STATE_OOSRV) {
			assert_int_equal(rc, -EPERM);
			assert_int_equal(a.state, ALARM_STATE_OOSRV);
			continue;
		}
		assert_int_equal(rc, 0);
		assert_int_equal(ev.prev, s);
		assert_int_equal(ev.state, ALARM_STATE_SHLVD);
		assert_true(a.shelve_until_t_ms == at_s(70));
	}
}

/* alarm.h: a shelve must be time-limited, 0 < duration <= 86400 s. */
static void test_shelve_rejects_bad_duration(void **state)
{
	(void)state;
	static const double bad[] = {0.0, -1.0, NAN, INFINITY, ALARM_SHELVE_MAX_S + 1.0};
	for (size_t i = 0; i < sizeof bad / sizeof bad[0]; i++) {
		struct alarm a = alarm_in_state(ALARM_STATE_UNACK);
		struct alarm_event ev;
		assert_int_equal(alarm_shelve(&a, bad[i], at_s(10), &ev), -EINVAL);
		assert_int_equal(a.state, ALARM_STATE_UNACK);
	}
	struct alarm a = alarm_in_state(ALARM_STATE_UNACK);
	struct alarm_event ev;
	assert_int_equal(alarm_shelve(&a, ALARM_SHELVE_MAX_S, at_s(10), &ev), 0);
}

/* alarm.h: shelving a shelved alarm is -EALREADY and keeps the first expiry. */
static void test_shelve_twice_is_already(void **state)
{
	(void)state;
	struct alarm a = alarm_in_state(ALARM_STATE_SHLVD);
	int64_t until = a.shelve_until_t_ms;
	struct alarm_event ev;
	assert_int_equal(alarm_shelve(&a, 3000.0, at_s(20), &ev), -EALREADY);
	assert_true(a.shelve_until_t_ms == until);
}

/* ISA-18.2: while shelved, the condition coming and going gives no events. */
static void test_shelved_alarm_gives_no_events(void **state)
{
	(void)state;
	struct alarm a = alarm_in_state(ALARM_STATE_SHLVD);
	struct alarm_event ev;
	int events = 0;
	for (int t = 10; t < 100; t++)
		events += step(&a, (t / 5) % 2 ? 95.0 : 50.0, t, &ev);
	assert_int_equal(events, 0);
	assert_int_equal(a.state, ALARM_STATE_SHLVD);
}

/* ISA-18.2: unshelve returns the state the condition calls for; unshelving
 * an alarm that is not shelved is -EALREADY (alarm.h). */
static void test_unshelve_returns_state_condition_calls_for(void **state)
{
	(void)state;
	struct alarm a = alarm_in_state(ALARM_STATE_SHLVD); /* condition active */
	struct alarm_event ev;
	assert_int_equal(alarm_unshelve(&a, at_s(5), &ev), 0);
	assert_event(&ev, ALARM_STATE_SHLVD, ALARM_STATE_UNACK);
	assert_int_equal(alarm_unshelve(&a, at_s(6), &ev), -EALREADY);

	struct alarm b = alarm_in_state(ALARM_STATE_SHLVD);
	assert_int_equal(step(&b, 50.0, 5, &ev), 0);        /* clears while shelved */
	assert_int_equal(alarm_unshelve(&b, at_s(6), &ev), 0);
	assert_event(&ev, ALARM_STATE_SHLVD, ALARM_STATE_NORM);
}

/* alarm.h: changes due at one time make one event. The shelve ends at t = 70
 * on the sample that also crosses the setpoint: SHLVD -> UNACK, once. */
static void test_two_changes_at_once_give_one_event(void **state)
{
	(void)state;
	struct alarm a = make_alarm(ALARM_KIND_HIGH, 80.0, 2.0);
	struct alarm_event ev;
	step(&a, 50.0, 0, &ev);
	assert_int_equal(alarm_shelve(&a, 60.0, at_s(10), &ev), 0);
	assert_int_equal(step(&a, 50.0, 69, &ev), 0);
	assert_int_equal(step(&a, 85.0, 70, &ev), 1);
	assert_event(&ev, ALARM_STATE_SHLVD, ALARM_STATE_UNACK);
	assert_int_equal(step(&a, 85.0, 71, &ev), 0);
}

/* ---- suppression by design and out of service ------------------------------ */

static struct alarm_input suppressed(double v)
{
	struct alarm_input in = good(v);
	in.suppressed = true;
	return in;
}

/* ISA-18.2: suppressed by design shows DSUPR, and nothing else, meanwhile. */
static void test_suppressed_by_design_holds_dsupr_without_events(void **state)
{
	(void)state;
	struct alarm a = alarm_in_state(ALARM_STATE_UNACK);
	struct alarm_event ev;
	assert_int_equal(step_in(&a, suppressed(95.0), 10, &ev), 1);
	assert_event(&ev, ALARM_STATE_UNACK, ALARM_STATE_DSUPR);
	int events = 0;
	for (int t = 11; t < 60; t++)
		events += step_in(&a, suppressed(t % 2 ? 95.0 : 50.0), t, &ev);
	assert_int_equal(events, 0);
	assert_int_equal(a.state, ALARM_STATE_DSUPR);
}

/* alarm.h: on release the alarm takes the state its condition calls for,
 * with exactly one event: still high -> DSUPR -> UNACK and nothing after. */
static void test_suppression_release_active_gives_one_unack(void **state)
{
	(void)state;
	struct alarm a = alarm_in_state(ALARM_STATE_NORM);
	struct alarm_event ev;
	assert_int_equal(step_in(&a, suppressed(50.0), 10, &ev), 1);
	assert_int_equal(step_in(&a, suppressed(95.0), 11, &ev), 0);
	int events = 0;
	for (int t = 12; t < 20; t++)
		events += step(&a, 95.0, t, &ev);
	assert_int_equal(events, 1);
	assert_int_equal(a.state, ALARM_STATE_UNACK);
}

/* alarm.h: a condition that came and went during suppression raises nothing
 * on release: DSUPR -> NORM, once. */
static void test_suppression_release_clear_gives_one_norm(void **state)
{
	(void)state;
	struct alarm a = alarm_in_state(ALARM_STATE_NORM);
	struct alarm_event ev;
	step_in(&a, suppressed(50.0), 10, &ev);
	step_in(&a, suppressed(95.0), 11, &ev);
	step_in(&a, suppressed(50.0), 12, &ev);
	assert_int_equal(step(&a, 50.0, 13, &ev), 1);
	assert_event(&ev, ALARM_STATE_DSUPR, ALARM_STATE_NORM);
	assert_int_equal(step(&a, 50.0, 14, &ev), 0);
}

/* ISA-18.2 out of service: OOSRV masks everything until returned. */
static void test_out_of_service_masks_alarm_until_returned(void **state)
{
	(void)state;
	struct alarm a = alarm_in_state(ALARM_STATE_ACKED);
	struct alarm_event ev;
	assert_int_equal(alarm_set_out_of_service(&a, true, at_s(10), &ev), 0);
	assert_event(&ev, ALARM_STATE_ACKED, ALARM_STATE_OOSRV);
	assert_int_equal(alarm_set_out_of_service(&a, true, at_s(11), &ev), -EALREADY);
	int events = 0;
	for (int t = 11; t < 40; t++)
		events += step(&a, t % 3 ? 95.0 : 50.0, t, &ev);
	assert_int_equal(events, 0);
	assert_int_equal(alarm_shelve(&a, 60.0, at_s(40), &ev), -EPERM);
	assert_int_equal(step(&a, 95.0, 41, &ev), 0);
	assert_int_equal(alarm_set_out_of_service(&a, false, at_s(42), &ev), 0);
	assert_event(&ev, ALARM_STATE_OOSRV, ALARM_STATE_UNACK);
	assert_int_equal(alarm_set_out_of_service(&a, false, at_s(43), &ev), -EALREADY);
}

/* alarm.h: cfg.out_of_service starts the alarm OOSRV. */
static void test_out_of_service_in_config_starts_oosrv(void **state)
{
	(void)state;
	struct alarm_cfg c = make_cfg(ALARM_KIND_HIGH, 80.0, 2.0);
	c.out_of_service = true;
	struct alarm a;
	alarm_init(&a, &c, 0);
	assert_int_equal(a.state, ALARM_STATE_OOSRV);
	struct alarm_event ev;
	assert_int_equal(step(&a, 95.0, 0, &ev), 0);
}

/* alarm.h: removal from service cancels a shelve, so returning to service
 * does not bring back an old expiry. */
static void test_out_of_service_cancels_shelve(void **state)
{
	(void)state;
	struct alarm a = alarm_in_state(ALARM_STATE_SHLVD);
	struct alarm_event ev;
	assert_int_equal(alarm_set_out_of_service(&a, true, at_s(10), &ev), 0);
	assert_event(&ev, ALARM_STATE_SHLVD, ALARM_STATE_OOSRV);
	assert_false(a.shelved);
	assert_int_equal(alarm_set_out_of_service(&a, false, at_s(11), &ev), 0);
	assert_event(&ev, ALARM_STATE_OOSRV, ALARM_STATE_UNACK);
}

/* ---- quality ------------------------------------------------------------------ */

static struct alarm_input bad(double v)
{
	struct alarm_input in = good(v);
	in.quality = FG_QUALITY_BAD;
	return in;
}

/* DESIGN.md "Signal quality": a bad input raises no process alarm. */
static void test_bad_quality_never_raises_process_alarm(void **state)
{
	(void)state;
	struct alarm a = make_alarm(ALARM_KIND_HIGH, 80.0, 2.0);
	struct alarm_event ev;
	int events = 0;
	for (int t = 0; t < 100; t++)
		events += step_in(&a, bad(120.0), t, &ev);
	assert_int_equal(events, 0);
	assert_int_equal(a.state, ALARM_STATE_NORM);
	assert_true(isnan(a.last_value));
}

/* alarm.h: a bad input holds an active alarm too (a dead transmitter reading
 * 0 must not clear a flood alarm). */
static void test_bad_quality_holds_active_alarm(void **state)
{
	(void)state;
	struct alarm a = alarm_in_state(ALARM_STATE_UNACK);
	struct alarm_event ev;
	for (int t = 10; t < 50; t++)
		assert_int_equal(step_in(&a, bad(0.0), t, &ev), 0);
	assert_int_equal(a.state, ALARM_STATE_UNACK);
}

/* alarm.h: a bad sample restarts the on-delay: 10 s delay, good high from
 * t = 0, bad at t = 5, good high again from t = 6: alarm at t = 16. */
static void test_bad_quality_restarts_on_delay(void **state)
{
	(void)state;
	struct alarm_cfg c = make_cfg(ALARM_KIND_HIGH, 80.0, 2.0);
	c.on_delay_s = 10.0;
	struct alarm a;
	alarm_init(&a, &c, 0);
	struct alarm_event ev;
	int fired_at = -1;
	for (int t = 0; t <= 30 && fired_at < 0; t++)
		if (step_in(&a, t == 5 ? bad(85.0) : good(85.0), t, &ev) == 1)
			fired_at = t;
	assert_int_equal(fired_at, 16);
}

/* DESIGN.md: NaN or inf is bad, whatever the quality says. */
static void test_nan_value_treated_as_bad(void **state)
{
	(void)state;
	struct alarm a = make_alarm(ALARM_KIND_LOW, 20.0, 1.0);
	struct alarm_event ev;
	assert_int_equal(step(&a, NAN, 0, &ev), 0);
	assert_int_equal(step(&a, -INFINITY, 1, &ev), 0);
	assert_int_equal(a.state, ALARM_STATE_NORM);
	assert_int_equal(step(&a, 10.0, 2, &ev), 1);
	assert_int_equal(step(&a, NAN, 3, &ev), 0);          /* held, not cleared */
	assert_int_equal(a.state, ALARM_STATE_UNACK);
}

/* alarm.h: uncertain input (e.g. an extrapolated correlation) is still used. */
static void test_uncertain_quality_is_used(void **state)
{
	(void)state;
	struct alarm a = make_alarm(ALARM_KIND_HIGH, 80.0, 2.0);
	struct alarm_input in = good(85.0);
	in.quality = FG_QUALITY_UNCERTAIN;
	struct alarm_event ev;
	assert_int_equal(step_in(&a, in, 0, &ev), 1);
}

/* DESIGN.md: a dead transmitter raises a diagnostic alarm, not a process one;
 * the reason is carried as our static string. */
static void test_diagnostic_raises_on_flag_while_process_alarm_holds(void **state)
{
	(void)state;
	struct alarm hi = make_alarm(ALARM_KIND_HIGH, 80.0, 2.0);
	struct alarm dg = make_alarm(ALARM_KIND_DIAGNOSTIC, 0.0, 0.0);
	char reason[] = "stale";  /* not a literal: must not be kept by pointer */
	struct alarm_input in = bad(NAN);
	in.diag_reason = reason;
	struct alarm_event ev;
	assert_int_equal(step_in(&hi, in, 0, &ev), 0);
	assert_int_equal(step_in(&dg, in, 0, &ev), 1);
	assert_event(&ev, ALARM_STATE_NORM, ALARM_STATE_UNACK);
	assert_ptr_equal(ev.reason, alarm_reason_static(ALARM_REASON_STALE));
	assert_string_equal(ev.reason, "stale");
	assert_true(isnan(ev.setpoint));
	in = good(42.0);
	assert_int_equal(step_in(&dg, in, 1, &ev), 1);
	assert_event(&ev, ALARM_STATE_UNACK, ALARM_STATE_RTNUN);
	assert_null(ev.reason);
	assert_true(ev.value == 42.0);
}

/* alarm.h: an unknown reason is reported as "other". */
static void test_diagnostic_unknown_reason_reported_as_other(void **state)
{
	(void)state;
	struct alarm dg = make_alarm(ALARM_KIND_DIAGNOSTIC, 0.0, 0.0);
	struct alarm_input in = good(1.0);
	in.diag_reason = "gremlins";
	struct alarm_event ev;
	assert_int_equal(step_in(&dg, in, 0, &ev), 1);
	assert_string_equal(ev.reason, "other");
	assert_string_equal(alarm_reason_static("frozen"), "frozen");
	assert_string_equal(alarm_reason_static("out_of_range"), "out_of_range");
	assert_string_equal(alarm_reason_static("comm_fail"), "comm_fail");
	assert_string_equal(alarm_reason_static("nan"), "nan");
	assert_string_equal(alarm_reason_static("spike"), "spike");
	assert_null(alarm_reason_static(NULL));
}

/* ---- rate of rise ------------------------------------------------------------- */

static struct alarm make_rate(double sp_per_min, double db, double window_s, double on_delay_s)
{
	struct alarm_cfg c = make_cfg(ALARM_KIND_RATE, sp_per_min, db);
	c.rate_window_s = window_s;
	c.on_delay_s = on_delay_s;
	assert_int_equal(alarm_cfg_check(&c, NULL, 0), 0);
	struct alarm a;
	alarm_init(&a, &c, 0);
	return a;
}

/* Flat at 50 for 120 s, then a ramp of 2 units/min from t0 = 120 s, 1 s
 * samples. Over a 60 s window the estimate at t0 + tau (tau <= 60 s) is
 * 2 * tau / 60 per minute (hand calculation), which reaches the 1.05/min
 * setpoint at tau = 31.5 s: the first sample at or after it is tau = 32 s.
 * Returns the tau of the first event, -1 when none within 200 s. */
static int ramp_fires_at(struct alarm *a, double slope_per_min, struct alarm_event *ev)
{
	for (int t = 0; t < 120; t++)
		assert_int_equal(step(a, 50.0, t, ev), 0);
	for (int tau = 0; tau <= 200; tau++)
		if (step(a, 50.0 + slope_per_min * tau / 60.0, 120 + tau, ev) == 1)
			return tau;
	return -1;
}

static void test_rate_alarm_fires_after_expected_time_on_ramp(void **state)
{
	(void)state;
	struct alarm a = make_rate(1.05, 0.2, 60.0, 0.0);
	struct alarm_event ev;
	assert_int_equal(ramp_fires_at(&a, 2.0, &ev), 32);
	assert_event(&ev, ALARM_STATE_NORM, ALARM_STATE_UNACK);
	/* 2 * 32 / 60 = 1.0667 per minute; rounding of the sample values only:
	 * 1e-9 */
	assert_true(fabs(ev.value - 2.0 * 32.0 / 60.0) <= 1e-9);
}

/* The same ramp with a 10 s on-delay: 32 + 10 = 42 s. */
static void test_rate_alarm_on_delay_adds_to_detection_time(void **state)
{
	(void)state;
	struct alarm a = make_rate(1.05, 0.2, 60.0, 10.0);
	struct alarm_event ev;
	assert_int_equal(ramp_fires_at(&a, 2.0, &ev), 42);
}

/* Rate of rise only: a falling ramp of the same size never fires. */
static void test_rate_alarm_ignores_falling_ramp(void **state)
{
	(void)state;
	struct alarm a = make_rate(1.05, 0.2, 60.0, 0.0);
	struct alarm_event ev;
	assert_int_equal(ramp_fires_at(&a, -2.0, &ev), -1);
}

/* After the ramp (2/min) has run a full window the estimate is 2/min; when it
 * stops at t1 the estimate is 2 * (60 - s) / 60 at s seconds after t1, below
 * the clear limit 1.05 - 0.2 = 0.85 from s > 34.5, i.e. the sample s = 35. */
static void test_rate_alarm_clears_after_ramp_stops(void **state)
{
	(void)state;
	struct alarm a = make_rate(1.05, 0.2, 60.0, 0.0);
	struct alarm_event ev;
	assert_int_equal(ramp_fires_at(&a, 2.0, &ev), 32);
	double v = 50.0;
	for (int tau = 33; tau <= 100; tau++) {
		v = 50.0 + 2.0 * tau / 60.0;
		assert_int_equal(step(&a, v, 120 + tau, &ev), 0);
	}
	int cleared_at = -1;
	for (int s = 1; s <= 100 && cleared_at < 0; s++)
		if (step(&a, v, 220 + s, &ev) == 1)
			cleared_at = s;
	assert_int_equal(cleared_at, 35);
	assert_event(&ev, ALARM_STATE_UNACK, ALARM_STATE_RTNUN);
}

/* A 600 s window with 1 s samples keeps only every 10th sample (spacing
 * 600/62 s = 9.68 s, met first 10 s after a kept one). On a ramp of 3/min
 * from t = 0 there is no estimate before t = 600 s; at 600 s the sample from
 * t = 0 is exactly a window old and the estimate is the slope, 3/min >= 2.5.
 * Exact in ms; the estimate to 1e-9 (rounding of the values). */
static void test_rate_alarm_long_window_fires_once_window_covered(void **state)
{
	(void)state;
	struct alarm a = make_rate(2.5, 0.5, 600.0, 0.0);
	struct alarm_event ev;
	int fired_at = -1;
	for (int t = 0; t <= 900 && fired_at < 0; t++)
		if (step(&a, 10.0 + 3.0 * t / 60.0, t, &ev) == 1)
			fired_at = t;
	assert_int_equal(fired_at, 600);
	assert_true(fabs(ev.value - 3.0) <= 1e-9);
	assert_true(a.rate.sample_count <= ALARM_RATE_SLOTS);
}

/* alarm.h: a gap of more than two windows gives no estimate (hold), rather
 * than a rate averaged over the outage. A jump of +50 after a 10 min gap
 * would read 5/min averaged over the gap; it raises nothing. */
static void test_rate_alarm_holds_across_data_gap(void **state)
{
	(void)state;
	struct alarm a = make_rate(1.0, 0.2, 60.0, 0.0);
	struct alarm_event ev;
	for (int t = 0; t < 120; t++)
		assert_int_equal(step(&a, 50.0, t, &ev), 0);
	assert_int_equal(step(&a, 100.0, 720, &ev), 0);
	assert_int_equal(a.state, ALARM_STATE_NORM);
}

/* ---- deviation ------------------------------------------------------------------ */

/* alarm.h: deviation uses |value - reference| >= setpoint, both directions;
 * clears below setpoint - deadband; the event value is the signed deviation. */
static void test_deviation_alarm_uses_absolute_difference(void **state)
{
	(void)state;
	struct alarm up = make_alarm(ALARM_KIND_DEVIATION, 50.0, 10.0);
	struct alarm dn = make_alarm(ALARM_KIND_DEVIATION, 50.0, 10.0);
	struct alarm_input in = good(1049.0);
	in.reference = 1000.0;
	struct alarm_event ev;
	assert_int_equal(step_in(&up, in, 0, &ev), 0);
	in.value = 1050.0;
	assert_int_equal(step_in(&up, in, 1, &ev), 1);
	assert_true(ev.value == 50.0);
	in.value = 950.0;
	assert_int_equal(step_in(&dn, in, 1, &ev), 1);
	assert_true(ev.value == -50.0);
	in.value = 1040.0;   /* |40| is not below 50 - 10 */
	assert_int_equal(step_in(&up, in, 2, &ev), 0);
	in.value = 1039.0;
	assert_int_equal(step_in(&up, in, 3, &ev), 1);
	assert_event(&ev, ALARM_STATE_UNACK, ALARM_STATE_RTNUN);
}

/* A NaN reference makes the deviation unknown: bad, held. */
static void test_deviation_with_nan_reference_is_bad(void **state)
{
	(void)state;
	struct alarm a = make_alarm(ALARM_KIND_DEVIATION, 50.0, 10.0);
	struct alarm_input in = good(5000.0);
	in.reference = NAN;
	struct alarm_event ev;
	assert_int_equal(step_in(&a, in, 0, &ev), 0);
	assert_int_equal(a.state, ALARM_STATE_NORM);
}

/* ---- time and determinism -------------------------------------------------------- */

/* alarm.h: time going backwards restarts a running delay. */
static void test_time_going_backwards_restarts_delay(void **state)
{
	(void)state;
	struct alarm_cfg c = make_cfg(ALARM_KIND_HIGH, 80.0, 2.0);
	c.on_delay_s = 10.0;
	struct alarm a;
	alarm_init(&a, &c, 0);
	struct alarm_event ev;
	for (int t = 100; t < 108; t++)
		assert_int_equal(step(&a, 85.0, t, &ev), 0);
	/* back to t = 50: the 8 s already run are forgotten */
	for (int t = 50; t < 60; t++)
		assert_int_equal(step(&a, 85.0, t, &ev), 0);
	assert_int_equal(step(&a, 85.0, 60, &ev), 1);
}

/* DESIGN.md: the same samples and times give the same events. */
static void test_same_samples_give_same_events(void **state)
{
	(void)state;
	char out[2][4096];
	for (int run = 0; run < 2; run++) {
		struct alarm a = make_rate(1.05, 0.2, 60.0, 0.0);
		struct alarm_event ev;
		size_t len = 0;
		out[run][0] = '\0';
		for (int t = 0; t < 400; t++) {
			double v = 50.0 + (t > 100 && t < 250 ? 2.0 * (t - 100) / 60.0 : 0.0);
			if (t >= 250)
				v = 50.0 + 2.0 * 150.0 / 60.0;
			if (step(&a, v, t, &ev) == 1) {
				int n = alarm_event_json(&ev, &a.cfg, "T1", "t", out[run] + len,
							 sizeof out[run] - len);
				assert_true(n > 0);
				len += (size_t)n;
			}
		}
		assert_true(len > 0);
	}
	assert_string_equal(out[0], out[1]);
}

/* ---- names and configuration ---------------------------------------------------- */

/* The config and event names of DESIGN.md, both ways. */
static void test_names_parse_back_to_their_values(void **state)
{
	(void)state;
	static const char *const kinds[] = {"high", "high-high", "low", "rate", "deviation",
					    "diagnostic"};
	static const char *const prios[] = {"low", "medium", "high", "urgent"};
	static const char *const states[] = {"normal", "unacknowledged", "acknowledged",
					     "returned_unacknowledged", "shelved",
					     "suppressed_by_design", "out_of_service"};
	/* The codes of older state files are still read, never written. */
	static const char *const legacy[] = {"NORM", "UNACK", "ACKED", "RTNUN",
					     "SHLVD", "DSUPR", "OOSRV"};
	for (int i = 0; i < ALARM_KIND_COUNT; i++) {
		enum alarm_kind k;
		assert_int_equal(alarm_kind_parse(kinds[i], &k), 0);
		assert_int_equal(k, i);
		assert_string_equal(alarm_kind_name(k), kinds[i]);
	}
	for (int i = 0; i < ALARM_PRIORITY_COUNT; i++) {
		enum alarm_priority p;
		assert_int_equal(alarm_priority_parse(prios[i], &p), 0);
		assert_int_equal(p, i);
		assert_string_equal(alarm_priority_name(p), prios[i]);
	}
	for (int i = 0; i < ALARM_STATE_COUNT; i++) {
		enum alarm_state s;
		assert_int_equal(alarm_state_parse(states[i], &s), 0);
		assert_int_equal(s, i);
		assert_string_equal(alarm_state_name(s), states[i]);
		enum alarm_state l;
		assert_int_equal(alarm_state_parse(legacy[i], &l), 0);
		assert_int_equal(l, i);
	}
	enum alarm_kind k = ALARM_KIND_LOW;
	assert_int_equal(alarm_kind_parse("High", &k), -EINVAL);
	assert_int_equal(alarm_kind_parse("", &k), -EINVAL);
	assert_int_equal(k, ALARM_KIND_LOW);
	enum alarm_state s = ALARM_STATE_NORM;
	assert_int_equal(alarm_state_parse("norm", &s), -EINVAL);
}

static int check(const struct alarm_cfg *c, char *err, size_t err_size)
{
	return alarm_cfg_check(c, err, err_size);
}

/* alarm.h: alarm_cfg_check refuses what the detector cannot use. */
static void test_cfg_check_rejects_bad_settings(void **state)
{
	(void)state;
	char err[128];
	struct alarm_cfg c = make_cfg(ALARM_KIND_HIGH, 80.0, 2.0);
	assert_int_equal(check(&c, err, sizeof err), 0);
	c.deadband = -1.0;
	assert_int_equal(check(&c, err, sizeof err), -EINVAL);
	assert_non_null(strstr(err, "deadband"));
	c = make_cfg(ALARM_KIND_HIGH, NAN, 2.0);
	assert_int_equal(check(&c, err, sizeof err), -EINVAL);
	c = make_cfg(ALARM_KIND_HIGH, 80.0, 2.0);
	c.on_delay_s = -1.0;
	assert_int_equal(check(&c, err, sizeof err), -EINVAL);
	c.on_delay_s = ALARM_DELAY_MAX_S + 1.0;
	assert_int_equal(check(&c, err, sizeof err), -EINVAL);
	c = make_cfg(ALARM_KIND_HIGH, 80.0, 2.0);
	c.name[0] = '\0';
	assert_int_equal(check(&c, err, sizeof err), -EINVAL);
	snprintf(c.name, sizeof c.name, "two\nlines");
	assert_int_equal(check(&c, err, sizeof err), -EINVAL);
	c = make_cfg(ALARM_KIND_HIGH, 80.0, 2.0);
	c.field = ALARM_FIELD_QUALITY;
	assert_int_equal(check(&c, err, sizeof err), -EINVAL);
	c = make_cfg(ALARM_KIND_DIAGNOSTIC, 0.0, 0.0);
	c.field = RF_DP_PA;
	assert_int_equal(check(&c, err, sizeof err), -EINVAL);
	c = make_cfg(ALARM_KIND_RATE, 1.0, 0.1);
	c.rate_window_s = 0.5;
	assert_int_equal(check(&c, err, sizeof err), -EINVAL);
	c = make_cfg(ALARM_KIND_RATE, 0.0, 0.0);
	assert_int_equal(check(&c, err, sizeof err), -EINVAL);
	c = make_cfg(ALARM_KIND_DEVIATION, 50.0, 50.0);  /* would never clear */
	assert_int_equal(check(&c, err, sizeof err), -EINVAL);
	c = make_cfg(ALARM_KIND_DEVIATION, 50.0, 10.0);
	c.reference_field = c.field;
	assert_int_equal(check(&c, err, sizeof err), -EINVAL);
	c = make_cfg(ALARM_KIND_HIGH, 80.0, 2.0);
	c.reference_field = RF_DP_PA;
	assert_int_equal(check(&c, err, sizeof err), -EINVAL);
}

/* alarm.h: the defaults the config may leave out. */
static void test_cfg_defaults_are_documented_values(void **state)
{
	(void)state;
	struct alarm_cfg c;
	memset(&c, 0x7f, sizeof c);
	alarm_cfg_defaults(&c);
	assert_string_equal(c.name, "");
	assert_int_equal(c.field, ALARM_FIELD_NONE);
	assert_int_equal(c.reference_field, ALARM_FIELD_NONE);
	assert_true(isnan(c.setpoint));
	assert_true(c.deadband == 0.0);
	assert_true(c.on_delay_s == 0.0);
	assert_true(c.off_delay_s == 0.0);
	assert_true(c.rate_window_s == 60.0);
	assert_int_equal(c.priority, ALARM_PRIORITY_MEDIUM);
	assert_false(c.out_of_service);
}

/* ---- event JSON ------------------------------------------------------------------- */

static struct alarm_event sample_event(void)
{
	struct alarm_event ev = {.t_ms = T0_MS, .alarm_index = 0, .state = ALARM_STATE_UNACK,
				 .prev = ALARM_STATE_NORM, .value = 81.23456789,
				 .setpoint = 80.0, .reason = NULL};
	return ev;
}

/* DESIGN.md "Alarm events": the keys in order, numbers in full precision. */
static void test_event_json_has_contract_keys(void **state)
{
	(void)state;
	struct alarm_cfg c = make_cfg(ALARM_KIND_HIGH_HIGH, 80.0, 2.0);
	snprintf(c.name, sizeof c.name, "T1_flood_hh");
	struct alarm_event ev = sample_event();
	char buf[512];
	int n = alarm_event_json(&ev, &c, "T1_top", "2026-01-01T00:00:00Z", buf, sizeof buf);
	const char *want = "{\"t\":\"2026-01-01T00:00:00Z\",\"alarm\":\"T1_flood_hh\","
			   "\"section\":\"T1_top\",\"kind\":\"high-high\",\"priority\":\"high\","
			   "\"state\":\"unacknowledged\",\"value\":81.23456789,\"setpoint\":80}";
	assert_string_equal(buf, want);
	assert_int_equal(n, (int)strlen(want));
	cJSON *j = cJSON_Parse(buf);
	assert_non_null(j);
	/* Machine files keep full precision: the value reads back exactly. */
	assert_true(cJSON_GetNumberValue(cJSON_GetObjectItemCaseSensitive(j, "value")) ==
		    81.23456789);
	assert_null(cJSON_GetObjectItemCaseSensitive(j, "reason"));
	cJSON_Delete(j);
}

/* RFC 8259 section 7: quote, backslash and control characters escaped; an
 * independent parser (cJSON) reads the names back unchanged. */
static void test_event_json_escapes_names(void **state)
{
	(void)state;
	struct alarm_cfg c = make_cfg(ALARM_KIND_HIGH, 80.0, 2.0);
	snprintf(c.name, sizeof c.name, "a\"b\\c");
	const char *section = "top\tbed\x01";
	struct alarm_event ev = sample_event();
	char buf[512];
	assert_true(alarm_event_json(&ev, &c, section, "2026", buf, sizeof buf) > 0);
	assert_non_null(strstr(buf, "\"a\\\"b\\\\c\""));
	assert_non_null(strstr(buf, "\"top\\u0009bed\\u0001\""));
	cJSON *j = cJSON_Parse(buf);
	assert_non_null(j);
	assert_string_equal(cJSON_GetStringValue(cJSON_GetObjectItemCaseSensitive(j, "alarm")),
			    c.name);
	assert_string_equal(cJSON_GetStringValue(cJSON_GetObjectItemCaseSensitive(j, "section")),
			    section);
	cJSON_Delete(j);
}

/* alarm.h: NAN and infinities print as null. */
static void test_event_json_nan_is_null(void **state)
{
	(void)state;
	struct alarm_cfg c = make_cfg(ALARM_KIND_HIGH, 80.0, 2.0);
	struct alarm_event ev = sample_event();
	ev.value = NAN;
	ev.setpoint = INFINITY;
	char buf[512];
	assert_true(alarm_event_json(&ev, &c, "T1", "2026", buf, sizeof buf) > 0);
	assert_non_null(strstr(buf, "\"value\":null,\"setpoint\":null}"));
	cJSON *j = cJSON_Parse(buf);
	assert_non_null(j);
	assert_true(cJSON_IsNull(cJSON_GetObjectItemCaseSensitive(j, "value")));
	cJSON_Delete(j);
}

/* DESIGN.md: diagnostic events carry a reason (null once healthy). */
static void test_event_json_diagnostic_has_reason(void **state)
{
	(void)state;
	struct alarm_cfg c = make_cfg(ALARM_KIND_DIAGNOSTIC, 0.0, 0.0);
	c.priority = ALARM_PRIORITY_LOW;
	struct alarm_event ev = sample_event();
	ev.setpoint = NAN;
	ev.reason = ALARM_REASON_FROZEN;
	char buf[512];
	assert_true(alarm_event_json(&ev, &c, "T1", "2026", buf, sizeof buf) > 0);
	assert_non_null(strstr(buf, "\"kind\":\"diagnostic\",\"priority\":\"low\""));
	assert_non_null(strstr(buf, ",\"setpoint\":null,\"reason\":\"frozen\"}"));
	ev.reason = NULL;
	assert_true(alarm_event_json(&ev, &c, "T1", "2026", buf, sizeof buf) > 0);
	assert_non_null(strstr(buf, ",\"reason\":null}"));
}

/* alarm.h: -ENOSPC when the object and its NUL do not fit; exactly enough
 * room succeeds. */
static void test_event_json_reports_truncation(void **state)
{
	(void)state;
	struct alarm_cfg c = make_cfg(ALARM_KIND_HIGH, 80.0, 2.0);
	struct alarm_event ev = sample_event();
	char buf[512];
	int n = alarm_event_json(&ev, &c, "T1", "2026", buf, sizeof buf);
	assert_true(n > 0);
	char small[512];
	assert_int_equal(alarm_event_json(&ev, &c, "T1", "2026", small, (size_t)n), -ENOSPC);
	assert_true(strlen(small) < (size_t)n);
	assert_int_equal(alarm_event_json(&ev, &c, "T1", "2026", small, (size_t)n + 1), n);
	assert_string_equal(small, buf);
	assert_int_equal(alarm_event_json(&ev, &c, "T1", "2026", NULL, 0), -ENOSPC);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_high_activates_at_setpoint),
		cmocka_unit_test(test_high_clears_below_setpoint_minus_deadband),
		cmocka_unit_test(test_low_activates_at_setpoint_and_clears_above_deadband),
		cmocka_unit_test(test_chatter_within_deadband_gives_no_extra_events),
		cmocka_unit_test(test_chatter_without_deadband_gives_events),
		cmocka_unit_test(test_high_high_uses_its_own_setpoint),
		cmocka_unit_test(test_on_delay_requires_condition_for_its_duration),
		cmocka_unit_test(test_on_delay_restarts_after_interruption),
		cmocka_unit_test(test_off_delay_holds_alarm_until_clear_persists),
		cmocka_unit_test(test_ack_while_active_then_clear_returns_norm),
		cmocka_unit_test(test_clear_before_ack_goes_rtnun_then_ack_norm),
		cmocka_unit_test(test_rtnun_reactivates_to_unack),
		cmocka_unit_test(test_ack_refused_where_it_does_not_apply),
		cmocka_unit_test(test_step_without_change_leaves_event_untouched),
		cmocka_unit_test(test_shelve_expiry_with_active_condition_returns_unack),
		cmocka_unit_test(test_shelve_expiry_with_clear_condition_returns_norm),
		cmocka_unit_test(test_shelve_from_every_state),
		cmocka_unit_test(test_shelve_rejects_bad_duration),
		cmocka_unit_test(test_shelve_twice_is_already),
		cmocka_unit_test(test_shelved_alarm_gives_no_events),
		cmocka_unit_test(test_unshelve_returns_state_condition_calls_for),
		cmocka_unit_test(test_two_changes_at_once_give_one_event),
		cmocka_unit_test(test_suppressed_by_design_holds_dsupr_without_events),
		cmocka_unit_test(test_suppression_release_active_gives_one_unack),
		cmocka_unit_test(test_suppression_release_clear_gives_one_norm),
		cmocka_unit_test(test_out_of_service_masks_alarm_until_returned),
		cmocka_unit_test(test_out_of_service_in_config_starts_oosrv),
		cmocka_unit_test(test_out_of_service_cancels_shelve),
		cmocka_unit_test(test_bad_quality_never_raises_process_alarm),
		cmocka_unit_test(test_bad_quality_holds_active_alarm),
		cmocka_unit_test(test_bad_quality_restarts_on_delay),
		cmocka_unit_test(test_nan_value_treated_as_bad),
		cmocka_unit_test(test_uncertain_quality_is_used),
		cmocka_unit_test(test_diagnostic_raises_on_flag_while_process_alarm_holds),
		cmocka_unit_test(test_diagnostic_unknown_reason_reported_as_other),
		cmocka_unit_test(test_rate_alarm_fires_after_expected_time_on_ramp),
		cmocka_unit_test(test_rate_alarm_on_delay_adds_to_detection_time),
		cmocka_unit_test(test_rate_alarm_ignores_falling_ramp),
		cmocka_unit_test(test_rate_alarm_clears_after_ramp_stops),
		cmocka_unit_test(test_rate_alarm_long_window_fires_once_window_covered),
		cmocka_unit_test(test_rate_alarm_holds_across_data_gap),
		cmocka_unit_test(test_deviation_alarm_uses_absolute_difference),
		cmocka_unit_test(test_deviation_with_nan_reference_is_bad),
		cmocka_unit_test(test_time_going_backwards_restarts_delay),
		cmocka_unit_test(test_same_samples_give_same_events),
		cmocka_unit_test(test_names_parse_back_to_their_values),
		cmocka_unit_test(test_cfg_check_rejects_bad_settings),
		cmocka_unit_test(test_cfg_defaults_are_documented_values),
		cmocka_unit_test(test_event_json_has_contract_keys),
		cmocka_unit_test(test_event_json_escapes_names),
		cmocka_unit_test(test_event_json_nan_is_null),
		cmocka_unit_test(test_event_json_diagnostic_has_reason),
		cmocka_unit_test(test_event_json_reports_truncation),
	};
	return cmocka_run_group_tests_name("alarm", tests, NULL, NULL);
}
