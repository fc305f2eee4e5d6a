/*
 * test_tzone.c - local time to UTC from the system zoneinfo (monitor/tzone.c).
 *
 * Outside reference: GNU coreutils date(1) 9.1 with the Debian 12 tzdata;
 * each value says the command that produced it, e.g.
 * `TZ=Europe/Berlin date -d '2026-03-29 03:00' +%s` -> 1774746000.
 * Times are integers: every comparison is exact (tolerance 0).
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <errno.h>
#include <stdbool.h>
#include <stdio.h>
#include <string.h>

#include "timefmt.h"
#include "tzone.h"

/* The wall-clock text as if UTC, the way the CSV reader passes it. */
static int64_t wall(const char *s)
{
	int64_t t = 0;
	bool zoned = true;
	assert_int_equal(timefmt_parse_zoned(s, strlen(s), &t, &zoned), 0);
	assert_false(zoned);
	return t;
}

static int64_t utc_of(const struct tzone *z, const char *s, int64_t after)
{
	int64_t t = 0;
	assert_int_equal(tzone_local_to_utc(z, wall(s), after, &t), 0);
	return t;
}

static void test_berlin_plain_times_match_date(void **state)
{
	(void)state;
	struct tzone z;
	char err[256];
	assert_int_equal(tzone_load(&z, "Europe/Berlin", err, sizeof err), 0);
	/* TZ=Europe/Berlin date -d '2026-03-02 09:00' +%s */
	assert_int_equal(utc_of(&z, "2026-03-02 09:00", INT64_MIN), 1772438400000LL);
	/* TZ=Europe/Berlin date -d '2026-03-29 01:59:59' +%s */
	assert_int_equal(utc_of(&z, "2026-03-29 01:59:59", INT64_MIN), 1774745999000LL);
	/* TZ=Europe/Berlin date -d '2026-03-29 03:00' +%s */
	assert_int_equal(utc_of(&z, "2026-03-29 03:00", INT64_MIN), 1774746000000LL);
	/* TZ=Europe/Berlin date -d '2026-10-25 03:00' +%s */
	assert_int_equal(utc_of(&z, "2026-10-25 03:00", INT64_MIN), 1792893600000LL);
	tzone_free(&z);
}

static void test_spring_gap_is_invalid(void **state)
{
	(void)state;
	struct tzone z;
	assert_int_equal(tzone_load(&z, "Europe/Berlin", NULL, 0), 0);
	int64_t t = 42;
	/* TZ=Europe/Berlin date -d '2026-03-29 02:30' -> "invalid date" */
	assert_int_equal(tzone_local_to_utc(&z, wall("2026-03-29 02:30"), INT64_MIN, &t), -ERANGE);
	assert_int_equal(tzone_local_to_utc(&z, wall("2026-03-29 02:00"), INT64_MIN, &t), -ERANGE);
	assert_int_equal(t, 42);
	tzone_free(&z);
}

static void test_autumn_hour_resolved_by_file_order(void **state)
{
	(void)state;
	struct tzone z;
	assert_int_equal(tzone_load(&z, "Europe/Berlin", NULL, 0), 0);
	/* 01:59 CEST: TZ=Europe/Berlin date -d '2026-10-25 01:59' +%s = 1792886340;
	 * 02:30 CEST is 31 min later, 02:30 CET one hour after that. */
	int64_t first = utc_of(&z, "2026-10-25 02:30", 1792886340000LL);
	assert_int_equal(first, 1792888200000LL);
	/* After 02:45 of the first pass, 02:30 again is the second pass. */
	int64_t second = utc_of(&z, "2026-10-25 02:30", 1792889100000LL);
	assert_int_equal(second, 1792891800000LL);
	/* With no earlier time, the first pass. */
	assert_int_equal(utc_of(&z, "2026-10-25 02:30", INT64_MIN), 1792888200000LL);
	tzone_free(&z);
}

static void test_rule_after_the_table(void **state)
{
	(void)state;
	struct tzone z;
	assert_int_equal(tzone_load(&z, "Europe/Berlin", NULL, 0), 0);
	/* TZ=Europe/Berlin date -d '2040-07-01 12:00' +%s; and 2040-12-01 */
	assert_int_equal(utc_of(&z, "2040-07-01 12:00", INT64_MIN), 2224749600000LL);
	assert_int_equal(utc_of(&z, "2040-12-01 12:00", INT64_MIN), 2237972400000LL);
	tzone_free(&z);
	/* Southern hemisphere, summer time across the new year. */
	assert_int_equal(tzone_load(&z, "Australia/Sydney", NULL, 0), 0);
	/* TZ=Australia/Sydney date -d '2045-01-15 12:00' +%s; and 2045-07-15 */
	assert_int_equal(utc_of(&z, "2045-01-15 12:00", INT64_MIN), 2368054800000LL);
	assert_int_equal(utc_of(&z, "2045-07-15 12:00", INT64_MIN), 2383696800000LL);
	/* TZ=Australia/Sydney date -d '2045-04-02 02:30' +%s picks the second
	 * pass, 2374677000; the first is one hour earlier. */
	assert_int_equal(utc_of(&z, "2045-04-02 02:30", INT64_MIN), 2374673400000LL);
	assert_int_equal(utc_of(&z, "2045-04-02 02:30", 2374674000000LL), 2374677000000LL);
	tzone_free(&z);
}

static void test_utc_and_bad_names(void **state)
{
	(void)state;
	struct tzone z;
	char err[256];
	assert_int_equal(tzone_load(&z, "UTC", err, sizeof err), 0);
	assert_int_equal(utc_of(&z, "2026-03-02 08:00", INT64_MIN), 1772438400000LL);
	tzone_free(&z);
	assert_int_equal(tzone_load(&z, "Europe/Tarnwick", err, sizeof err), -ENOENT);
	assert_non_null(strstr(err, "not installed"));
	assert_int_equal(tzone_load(&z, "../etc/passwd", err, sizeof err), -EINVAL);
	assert_int_equal(tzone_load(&z, "/etc/localtime", err, sizeof err), -EINVAL);
	assert_int_equal(tzone_load(&z, "", err, sizeof err), -EINVAL);
	tzone_free(&z); /* freeing a failed load is fine */
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_berlin_plain_times_match_date),
		cmocka_unit_test(test_spring_gap_is_invalid),
		cmocka_unit_test(test_autumn_hour_resolved_by_file_order),
		cmocka_unit_test(test_rule_after_the_table),
		cmocka_unit_test(test_utc_and_bad_names),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
