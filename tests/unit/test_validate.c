/*
 * test_validate.c - each signal validation rule and filter of validate.c.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <string.h>

#include "alarm.h"
#include "validate.h"

static struct tag_cfg tag(void)
{
	struct tag_cfg t;
	memset(&t, 0, sizeof(t));
	strcpy(t.name, "T1");
	t.source_index = 0;
	t.fixed_value = NAN;
	t.unit = units_lookup("mbar");
	t.min = 0.0;
	t.max = 500.0;
	t.stale_periods = 3.0;
	t.median = 1;
	return t;
}

#define S(ms) ((int64_t)(ms))

static void test_fresh_value_is_good_and_in_si(void **state)
{
	(void)state;
	struct tag_cfg c = tag();
	struct tag_state s;
	validate_init(&s, &c, 1.0);
	assert_int_equal(s.quality, FG_QUALITY_BAD); /* nothing read yet */
	validate_step(&s, S(1000), 12.5, TAG_STATUS_FRESH);
	assert_int_equal(s.quality, FG_QUALITY_GOOD);
	assert_null(s.reason);
	assert_true(s.value == 12.5);
	assert_true(fabs(s.value_si - 1250.0) < 1e-9); /* 1 mbar = 100 Pa (NIST SP 811) */
}

static void test_comm_fail_is_bad_at_once(void **state)
{
	(void)state;
	struct tag_cfg c = tag();
	struct tag_state s;
	validate_init(&s, &c, 1.0);
	validate_step(&s, S(1000), 10.0, TAG_STATUS_FRESH);
	validate_step(&s, S(2000), 0.0, TAG_STATUS_COMM_FAIL);
	assert_int_equal(s.quality, FG_QUALITY_BAD);
	assert_string_equal(s.reason, ALARM_REASON_COMM_FAIL);
	assert_true(isnan(s.value_si));
}

static void test_missing_holds_until_stale(void **state)
{
	(void)state;
	struct tag_cfg c = tag();
	struct tag_state s;
	validate_init(&s, &c, 1.0); /* stale after 3 periods = 3 s */
	validate_step(&s, S(1000), 10.0, TAG_STATUS_FRESH);
	validate_step(&s, S(3000), NAN, TAG_STATUS_MISSING);
	validate_step(&s, S(4000), NAN, TAG_STATUS_MISSING);
	assert_int_equal(s.quality, FG_QUALITY_GOOD);
	assert_true(s.value == 10.0);
	validate_step(&s, S(4001), NAN, TAG_STATUS_MISSING);
	assert_int_equal(s.quality, FG_QUALITY_BAD);
	assert_string_equal(s.reason, ALARM_REASON_STALE);
	validate_step(&s, S(5000), 11.0, TAG_STATUS_FRESH); /* recovers on a fresh read */
	assert_int_equal(s.quality, FG_QUALITY_GOOD);
}

static void test_nan_and_out_of_range_are_bad(void **state)
{
	(void)state;
	struct tag_cfg c = tag();
	struct tag_state s;
	validate_init(&s, &c, 1.0);
	validate_step(&s, S(1000), INFINITY, TAG_STATUS_FRESH);
	assert_string_equal(s.reason, ALARM_REASON_NAN);
	validate_step(&s, S(2000), 500.5, TAG_STATUS_FRESH);
	assert_int_equal(s.quality, FG_QUALITY_BAD);
	assert_string_equal(s.reason, ALARM_REASON_OUT_OF_RANGE);
	validate_step(&s, S(3000), -0.1, TAG_STATUS_FRESH);
	assert_string_equal(s.reason, ALARM_REASON_OUT_OF_RANGE);
	validate_step(&s, S(4000), 500.0, TAG_STATUS_FRESH); /* the limit itself is valid */
	assert_int_equal(s.quality, FG_QUALITY_GOOD);
}

static void test_single_spike_is_rejected_a_step_is_accepted(void **state)
{
	(void)state;
	struct tag_cfg c = tag();
	c.spike_limit = 20.0;
	struct tag_state s;
	validate_init(&s, &c, 1.0);
	validate_step(&s, S(1000), 100.0, TAG_STATUS_FRESH);
	validate_step(&s, S(2000), 300.0, TAG_STATUS_FRESH); /* spike */
	assert_int_equal(s.quality, FG_QUALITY_UNCERTAIN);
	assert_string_equal(s.reason, ALARM_REASON_SPIKE);
	assert_true(s.value == 100.0);
	validate_step(&s, S(3000), 101.0, TAG_STATUS_FRESH); /* back: the spike is gone */
	assert_int_equal(s.quality, FG_QUALITY_GOOD);
	assert_true(s.value == 101.0);
	validate_step(&s, S(4000), 200.0, TAG_STATUS_FRESH); /* a real step, held once */
	assert_true(s.value == 101.0);
	validate_step(&s, S(5000), 201.0, TAG_STATUS_FRESH); /* ...then accepted */
	assert_true(s.value == 201.0);
	assert_int_equal(s.quality, FG_QUALITY_GOOD);
}

static void test_frozen_value_turns_uncertain_after_frozen_s(void **state)
{
	(void)state;
	struct tag_cfg c = tag();
	c.frozen_s = 10.0;
	c.frozen_tolerance = 0.05;
	struct tag_state s;
	validate_init(&s, &c, 1.0);
	for (int i = 0; i <= 9; i++)
		validate_step(&s, S(1000 * i), 50.0 + (i % 2) * 0.04, TAG_STATUS_FRESH);
	assert_int_equal(s.quality, FG_QUALITY_GOOD); /* 9 s flat */
	validate_step(&s, S(10000), 50.0, TAG_STATUS_FRESH);
	assert_int_equal(s.quality, FG_QUALITY_UNCERTAIN);
	assert_string_equal(s.reason, ALARM_REASON_FROZEN);
	validate_step(&s, S(11000), 50.2, TAG_STATUS_FRESH); /* moves again */
	assert_int_equal(s.quality, FG_QUALITY_GOOD);
}

static void test_median_removes_an_outlier(void **state)
{
	(void)state;
	struct tag_cfg c = tag();
	c.median = 3;
	struct tag_state s;
	validate_init(&s, &c, 1.0);
	validate_step(&s, S(1000), 10.0, TAG_STATUS_FRESH);
	validate_step(&s, S(2000), 11.0, TAG_STATUS_FRESH);
	validate_step(&s, S(3000), 90.0, TAG_STATUS_FRESH);
	assert_true(s.value == 11.0); /* median of 10, 11, 90 */
	validate_step(&s, S(4000), 12.0, TAG_STATUS_FRESH);
	assert_true(s.value == 12.0); /* median of 11, 90, 12 */
}

/* A median-3 window against its definition, bit for bit: the middle of the
 * ring's three values after a plain stable insertion sort. Values come from
 * a small set, so ties are common, with +0 and -0 among them (equal as
 * numbers, different in print). */
static double stable_middle(const double *ring)
{
	double w[3] = {ring[0], ring[1], ring[2]};
	for (int i = 1; i < 3; i++)
		for (int j = i; j > 0 && w[j - 1] > w[j]; j--) {
			double x = w[j];
			w[j] = w[j - 1];
			w[j - 1] = x;
		}
	return w[1];
}

static void test_median_of_three_equals_the_sorted_middle_bit_for_bit(void **state)
{
	(void)state;
	static const double pool[] = {-0.0, 0.0, 1.5, 1.5, 2.25, -3.0, 7.0, 300.0};
	struct tag_cfg c = tag();
	c.median = 3;
	c.min = -10.0;
	struct tag_state s;
	validate_init(&s, &c, 1.0);
	uint32_t rng = 12345u;
	unsigned zeros = 0;
	for (int i = 0; i < 20000; i++) {
		rng = rng * 1664525u + 1013904223u; /* Numerical Recipes' LCG */
		double v = pool[(rng >> 24) % (sizeof pool / sizeof pool[0])];
		validate_step(&s, S(1000) * (i + 1), v, TAG_STATUS_FRESH);
		if (i < 2)
			continue;
		double mid = stable_middle(s.med);
		assert_memory_equal(&s.value, &mid, sizeof mid);
		zeros += mid == 0.0;
	}
	assert_true(zeros > 1000); /* the zero case was exercised */
}

static void test_first_order_lag_follows_its_time_constant(void **state)
{
	(void)state;
	struct tag_cfg c = tag();
	c.filter_tau_s = 10.0;
	struct tag_state s;
	validate_init(&s, &c, 1.0);
	validate_step(&s, S(0), 0.0, TAG_STATUS_FRESH);
	for (int i = 1; i <= 10; i++)
		validate_step(&s, S(1000 * i), 100.0, TAG_STATUS_FRESH);
	/* A first-order lag reaches 1 - e^-1 = 63.2 % of a step after one time
	 * constant, whatever the sampling (exact discretisation). */
	assert_true(fabs(s.value - 100.0 * (1.0 - exp(-1.0))) < 1e-9);
}

static void test_historian_bad_and_missing_column_are_bad(void **state)
{
	(void)state;
	struct tag_cfg c = tag();
	struct tag_state s;
	validate_init(&s, &c, 1.0);
	validate_step(&s, S(1000), 10.0, TAG_STATUS_FRESH);
	validate_step(&s, S(2000), NAN, TAG_STATUS_BAD);
	assert_int_equal(s.quality, FG_QUALITY_BAD);
	assert_string_equal(s.reason, ALARM_REASON_HISTORIAN_STATUS);
	validate_step(&s, S(3000), 10.0, TAG_STATUS_FRESH);
	assert_int_equal(s.quality, FG_QUALITY_GOOD);
	validate_step(&s, S(4000), NAN, TAG_STATUS_NO_COLUMN);
	assert_string_equal(s.reason, ALARM_REASON_MISSING_COLUMN);
}

/* hold_s: a tag recorded on change stays fresh for hold_s, not 3 periods. */
static void test_hold_s_keeps_an_on_change_tag_fresh(void **state)
{
	(void)state;
	struct tag_cfg c = tag();
	c.hold_s = 600.0;
	struct tag_state s;
	validate_init(&s, &c, 1.0);
	validate_step(&s, S(1000), 10.0, TAG_STATUS_FRESH);
	validate_step(&s, S(601000), NAN, TAG_STATUS_MISSING);
	assert_int_equal(s.quality, FG_QUALITY_GOOD);
	validate_step(&s, S(601001), NAN, TAG_STATUS_MISSING);
	assert_int_equal(s.quality, FG_QUALITY_BAD);
	assert_string_equal(s.reason, ALARM_REASON_STALE);
}

/* The default window: good until 900 s without any change, then frozen; a
 * reading pegged at the end of its span is exempt. */
static void test_frozen_default_window_and_span_end_exempt(void **state)
{
	(void)state;
	struct tag_cfg c = tag();
	c.frozen_s = VALIDATE_FROZEN_DEFAULT_S;
	struct tag_state s;
	validate_init(&s, &c, 10.0);
	for (int k = 0; k <= 89; k++)
		validate_step(&s, S(10000 * k), 42.0, TAG_STATUS_FRESH);
	assert_int_equal(s.quality, FG_QUALITY_GOOD); /* 890 s unchanged */
	validate_step(&s, S(900000), 42.0, TAG_STATUS_FRESH);
	assert_int_equal(s.quality, FG_QUALITY_UNCERTAIN);
	assert_string_equal(s.reason, ALARM_REASON_FROZEN);
	validate_step(&s, S(910000), 42.001, TAG_STATUS_FRESH); /* any change: live again */
	assert_int_equal(s.quality, FG_QUALITY_GOOD);
	struct tag_state p;
	validate_init(&p, &c, 10.0);
	for (int k = 0; k <= 300; k++)
		validate_step(&p, S(10000 * k), 500.0, TAG_STATUS_FRESH); /* at max for 50 min */
	assert_null(p.reason);
}

/* A DP rising into the top of its 0..500 mbar span and pegging there. */
static void test_dp_reaching_its_max_without_a_jump_is_saturated(void **state)
{
	(void)state;
	struct tag_cfg c = tag();
	c.frozen_s = 60.0;
	c.frozen_tolerance = 0.01;
	struct tag_state s;
	validate_init(&s, &c, 1.0);
	validate_set_saturable(&s, true);
	int64_t t = 0;
	for (double v = 400.0; v < 496.0; v += 2.0) /* 2 mbar/s: no jump */
		validate_step(&s, S(t += 1000), v, TAG_STATUS_FRESH);
	assert_int_equal(s.quality, FG_QUALITY_GOOD);
	/* At max, then 1 % of span above it (inside the 3 % band): saturated,
	 * "at least max", for ten minutes: never frozen, never bad. */
	for (int i = 0; i < 600; i++) {
		validate_step(&s, S(t += 1000), i % 2 ? 500.0 : 505.0, TAG_STATUS_FRESH);
		assert_int_equal(s.quality, FG_QUALITY_UNCERTAIN);
		assert_string_equal(s.reason, ALARM_REASON_SATURATED);
		assert_true(s.saturated);
		assert_true(s.value == 500.0);
	}
	/* Back below the band: good again. */
	validate_step(&s, S(t += 1000), 480.0, TAG_STATUS_FRESH);
	assert_int_equal(s.quality, FG_QUALITY_GOOD);
	assert_false(s.saturated);
}

static void test_dp_jumping_to_its_max_or_beyond_the_band_is_bad(void **state)
{
	(void)state;
	struct tag_cfg c = tag();
	struct tag_state s;
	validate_init(&s, &c, 1.0);
	validate_set_saturable(&s, true);
	/* From 200 mbar straight to 505 (a transmitter failing high): bad. */
	validate_step(&s, S(1000), 200.0, TAG_STATUS_FRESH);
	validate_step(&s, S(2000), 505.0, TAG_STATUS_FRESH);
	assert_int_equal(s.quality, FG_QUALITY_BAD);
	assert_string_equal(s.reason, ALARM_REASON_OUT_OF_RANGE);
	/* Approached from 490, but 4 % of span above max (beyond NAMUR NE 43's
	 * 20.5 mA = 103.1 %): bad. */
	validate_init(&s, &c, 1.0);
	validate_set_saturable(&s, true);
	validate_step(&s, S(1000), 490.0, TAG_STATUS_FRESH);
	validate_step(&s, S(2000), 520.0, TAG_STATUS_FRESH);
	assert_int_equal(s.quality, FG_QUALITY_BAD);
	/* A tag that is not a DP keeps the old rule: above max is bad. */
	validate_init(&s, &c, 1.0);
	validate_step(&s, S(1000), 490.0, TAG_STATUS_FRESH);
	validate_step(&s, S(2000), 505.0, TAG_STATUS_FRESH);
	assert_int_equal(s.quality, FG_QUALITY_BAD);
	assert_string_equal(s.reason, ALARM_REASON_OUT_OF_RANGE);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_fresh_value_is_good_and_in_si),
		cmocka_unit_test(test_historian_bad_and_missing_column_are_bad),
		cmocka_unit_test(test_hold_s_keeps_an_on_change_tag_fresh),
		cmocka_unit_test(test_frozen_default_window_and_span_end_exempt),
		cmocka_unit_test(test_comm_fail_is_bad_at_once),
		cmocka_unit_test(test_missing_holds_until_stale),
		cmocka_unit_test(test_nan_and_out_of_range_are_bad),
		cmocka_unit_test(test_single_spike_is_rejected_a_step_is_accepted),
		cmocka_unit_test(test_frozen_value_turns_uncertain_after_frozen_s),
		cmocka_unit_test(test_median_removes_an_outlier),
		cmocka_unit_test(test_median_of_three_equals_the_sorted_middle_bit_for_bit),
		cmocka_unit_test(test_first_order_lag_follows_its_time_constant),
		cmocka_unit_test(test_dp_reaching_its_max_without_a_jump_is_saturated),
		cmocka_unit_test(test_dp_jumping_to_its_max_or_beyond_the_band_is_bad),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
