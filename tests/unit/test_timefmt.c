/*
 * test_timefmt.c - time stamp parsing and formatting (monitor/timefmt.c).
 *
 * Outside references:
 *  - GNU coreutils date(1) 9.1 (Debian 12): each value below says the command
 *    that produced it, e.g. `date -u -d @951868800` -> 2000-03-01T00:00:00Z.
 *  - The POSIX definition of seconds since the epoch (POSIX.1-2017, XBD 4.16),
 *    the expression written out in posix_seconds() below, from memory; it is
 *    itself pinned here against date(1) values, and valid for 1970 onwards.
 * Times are integers, so every comparison is exact (tolerance 0).
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

static int parse(const char *s, int64_t *t_ms)
{
	return timefmt_parse(s, strlen(s), t_ms);
}

/* Parses s, which must succeed, and returns the result. */
static int64_t parse_ok(const char *s)
{
	int64_t t = INT64_MIN;
	int rc = parse(s, &t);
	if (rc != 0)
		fail_msg("timefmt_parse(\"%s\") = %d, expected 0", s, rc);
	return t;
}

static void assert_rejected(const char *s)
{
	int64_t t = 12345;
	int rc = parse(s, &t);
	if (rc != -EINVAL)
		fail_msg("timefmt_parse(\"%s\") = %d, expected -EINVAL", s, rc);
	assert_int_equal(t, 12345); /* left alone on failure */
}

/* POSIX.1-2017 XBD 4.16, from memory: tm_year = year - 1900, tm_yday from 0. */
static int64_t posix_seconds(int64_t year, unsigned month, unsigned day)
{
	static const int before[12] = { 0, 31, 59, 90, 120, 151, 181, 212, 243, 273, 304, 334 };
	int64_t tm_year = year - 1900;
	bool leap = (year % 4 == 0 && year % 100 != 0) || year % 400 == 0;
	int64_t tm_yday = before[month - 1] + (int64_t)day - 1 + (leap && month > 2 ? 1 : 0);
	return tm_yday * 86400 + (tm_year - 70) * 31536000 + ((tm_year - 69) / 4) * 86400 -
	       ((tm_year - 1) / 100) * 86400 + ((tm_year + 299) / 400) * 86400;
}

struct known {
	const char *iso;
	int64_t epoch_s;
};

/* Each pair from GNU date: `date -u -d @N +%Y-%m-%dT%H:%M:%SZ`. */
static const struct known known_values[] = {
	{ "1970-01-01T00:00:00Z", 0 },             /* date -u -d @0 */
	{ "2000-03-01T00:00:00Z", 951868800 },     /* date -u -d @951868800 (also POSIX def.) */
	{ "2000-02-29T00:00:00Z", 951782400 },     /* date -u -d @951782400 */
	{ "2026-03-04T05:06:07Z", 1772600767 },    /* date -u -d @1772600767 */
	{ "1969-12-31T23:59:59Z", -1 },            /* date -u -d @-1 */
	{ "1969-12-31T00:00:00Z", -86400 },        /* date -u -d @-86400 */
	{ "1969-07-20T20:17:40Z", -14182940 },     /* date -u -d 1969-07-20T20:17:40Z +%s */
	{ "1900-01-01T00:00:00Z", -2208988800 },   /* date -u -d @-2208988800 */
	{ "1900-02-28T23:59:59Z", -2203891201 },   /* date -u -d 1900-02-28T23:59:59Z +%s */
	{ "1900-03-01T00:00:00Z", -2203891200 },   /* date -u -d 1900-03-01T00:00:00Z +%s */
	{ "1600-02-29T12:00:00Z", -11670955200 },  /* date -u -d 1600-02-29T12:00:00Z +%s */
	{ "1972-02-29T00:00:00Z", 68169600 },      /* date -u -d @68169600 */
	{ "2024-02-29T00:00:00Z", 1709164800 },    /* date -u -d @1709164800 */
	{ "2024-12-31T12:00:00Z", 1735646400 },    /* date -u -d 2024-12-31T12:00:00Z +%s */
	{ "2026-12-31T23:59:59Z", 1798761599 },    /* date -u -d 2026-12-31T23:59:59Z +%s */
	{ "2038-01-19T03:14:08Z", 2147483648 },    /* date -u -d 2038-01-19T03:14:08Z +%s */
	{ "2100-01-01T00:00:00Z", 4102444800 },    /* date -u -d @4102444800 */
	{ "2100-02-28T00:00:00Z", 4107456000 },    /* date -u -d 2100-02-28T00:00:00Z +%s */
	{ "2100-03-01T00:00:00Z", 4107542400 },    /* date -u -d @4107542400 */
	{ "0000-01-01T00:00:00Z", -62167219200 },  /* date -u -d @-62167219200 */
	{ "0001-01-01T00:00:00Z", -62135596800 },  /* date -u -d @-62135596800 */
	{ "9999-12-31T23:59:59Z", 253402300799 },  /* date -u -d @253402300799 */
};

static void test_parse_matches_date_command_values(void **state)
{
	(void)state;
	for (size_t i = 0; i < sizeof known_values / sizeof known_values[0]; i++) {
		int64_t t = parse_ok(known_values[i].iso);
		if (t != known_values[i].epoch_s * 1000)
			fail_msg("%s: got %lld ms", known_values[i].iso, (long long)t);
	}
}

static void test_format_matches_date_command_values(void **state)
{
	(void)state;
	char buf[TIMEFMT_BUF_SIZE];
	for (size_t i = 0; i < sizeof known_values / sizeof known_values[0]; i++) {
		int n = timefmt_format(known_values[i].epoch_s * 1000, buf, sizeof buf);
		assert_int_equal(n, 20);
		assert_string_equal(buf, known_values[i].iso);
	}
}

static void test_posix_formula_agrees_with_date_command(void **state)
{
	(void)state;
	/* The oracle itself, checked against date(1) before it is trusted. */
	assert_int_equal(posix_seconds(2000, 3, 1), 951868800);
	assert_int_equal(posix_seconds(2100, 3, 1), 4107542400);
	assert_int_equal(posix_seconds(2024, 2, 29), 1709164800);
	assert_int_equal(posix_seconds(1970, 1, 1), 0);
}

static void test_days_from_civil_matches_posix_1970_to_2100(void **state)
{
	(void)state;
	int64_t expect_days = 0;
	for (int64_t y = 1970; y <= 2100; y++) {
		for (unsigned m = 1; m <= 12; m++) {
			for (unsigned d = 1; d <= timefmt_days_in_month(y, m); d++) {
				int64_t days = timefmt_days_from_civil(y, m, d);
				assert_int_equal(days * 86400, posix_seconds(y, m, d));
				assert_int_equal(days, expect_days); /* no gap, no repeat */
				expect_days++;
			}
		}
	}
	/* 131 years, 32 of them leap (1972..2096; 2100 is not). */
	assert_int_equal(expect_days, 131 * 365 + 32);
}

static void test_civil_from_days_inverts_every_day_0000_to_9999(void **state)
{
	(void)state;
	int64_t first = timefmt_days_from_civil(0, 1, 1);
	int64_t last = timefmt_days_from_civil(9999, 12, 31);
	assert_int_equal(first * 86400000, TIMEFMT_MIN_MS);
	assert_int_equal(last * 86400000 + 86399999, TIMEFMT_MAX_MS);
	int64_t y = 0;
	unsigned m = 1, d = 1;
	for (int64_t days = first; days <= last; days++) {
		int64_t yy;
		unsigned mm, dd;
		timefmt_civil_from_days(days, &yy, &mm, &dd);
		if (yy != y || mm != m || dd != d)
			fail_msg("day %lld: got %lld-%u-%u, expected %lld-%u-%u", (long long)days,
				 (long long)yy, mm, dd, (long long)y, m, d);
		/* step the expected date by hand */
		if (++d > timefmt_days_in_month(y, m)) {
			d = 1;
			if (++m > 12) {
				m = 1;
				y++;
			}
		}
	}
}

static void test_leap_years_follow_gregorian_rule(void **state)
{
	(void)state;
	assert_int_equal(timefmt_days_in_month(2024, 2), 29);
	assert_int_equal(timefmt_days_in_month(2023, 2), 28);
	assert_int_equal(timefmt_days_in_month(2000, 2), 29); /* multiple of 400 */
	assert_int_equal(timefmt_days_in_month(1900, 2), 28); /* century */
	assert_int_equal(timefmt_days_in_month(2100, 2), 28);
	parse_ok("2024-02-29T00:00:00Z");
	parse_ok("2000-02-29T00:00:00Z");
	assert_rejected("2023-02-29T00:00:00Z");
	assert_rejected("1900-02-29T00:00:00Z");
	assert_rejected("2100-02-29T00:00:00Z");
	assert_rejected("2026-04-31T00:00:00Z");
	parse_ok("2026-12-31T00:00:00Z");
	assert_rejected("2026-12-32T00:00:00Z");
}

static void test_round_trip_1900_to_2100_with_millis(void **state)
{
	(void)state;
	char buf[TIMEFMT_BUF_SIZE];
	int64_t from = parse_ok("1900-01-01T00:00:00Z");
	int64_t to = parse_ok("2100-12-31T23:59:59.999Z");
	/* A step of 1 day + 1 h + 1 min + 1 s + 7 ms walks through every hour,
	 * minute and second field and through all leap days. */
	const int64_t step = 86400000 + 3600000 + 60000 + 1000 + 7;
	unsigned count = 0;
	for (int64_t t = from; t <= to; t += step) {
		int n = timefmt_format(t, buf, sizeof buf);
		assert_true(n == 20 || n == 24);
		assert_int_equal((size_t)n, strlen(buf));
		int64_t back = INT64_MIN;
		assert_int_equal(timefmt_parse(buf, (size_t)n, &back), 0);
		if (back != t)
			fail_msg("%lld -> %s -> %lld", (long long)t, buf, (long long)back);
		count++;
	}
	assert_true(count > 70000);
}

static void test_round_trip_whole_range_and_edges(void **state)
{
	(void)state;
	char buf[TIMEFMT_BUF_SIZE];
	const int64_t edges[] = { TIMEFMT_MIN_MS, TIMEFMT_MIN_MS + 1, -86400001, -86400000, -1001,
				  -1000, -999, -1, 0, 1, 999, 1000, TIMEFMT_MAX_MS - 1,
				  TIMEFMT_MAX_MS };
	for (size_t i = 0; i < sizeof edges / sizeof edges[0]; i++) {
		int n = timefmt_format(edges[i], buf, sizeof buf);
		assert_true(n > 0);
		int64_t back;
		assert_int_equal(timefmt_parse(buf, (size_t)n, &back), 0);
		assert_int_equal(back, edges[i]);
	}
	/* A prime step (in ms) through the whole range. */
	for (int64_t t = TIMEFMT_MIN_MS; t <= TIMEFMT_MAX_MS; t += 7777777777LL) {
		int n = timefmt_format(t, buf, sizeof buf);
		int64_t back;
		assert_true(n > 0);
		assert_int_equal(timefmt_parse(buf, (size_t)n, &back), 0);
		assert_int_equal(back, t);
	}
}

static void test_negative_epoch_formats_before_1970(void **state)
{
	(void)state;
	char buf[TIMEFMT_BUF_SIZE];
	/* date -u -d @-1 -> 1969-12-31T23:59:59Z, so -1 ms is .999 of that second. */
	assert_int_equal(timefmt_format(-1, buf, sizeof buf), 24);
	assert_string_equal(buf, "1969-12-31T23:59:59.999Z");
	assert_int_equal(timefmt_format(-1500, buf, sizeof buf), 24);
	assert_string_equal(buf, "1969-12-31T23:59:58.500Z");
}

static void test_format_adds_millis_only_when_nonzero(void **state)
{
	(void)state;
	char buf[TIMEFMT_BUF_SIZE];
	assert_int_equal(timefmt_format(1772600767000, buf, sizeof buf), 20);
	assert_string_equal(buf, "2026-03-04T05:06:07Z");
	assert_int_equal(timefmt_format(1772600767123, buf, sizeof buf), 24);
	assert_string_equal(buf, "2026-03-04T05:06:07.123Z");
	assert_int_equal(timefmt_format(1772600767005, buf, sizeof buf), 24);
	assert_string_equal(buf, "2026-03-04T05:06:07.005Z");
}

static void test_format_refuses_small_buffer(void **state)
{
	(void)state;
	char buf[TIMEFMT_BUF_SIZE];
	memset(buf, 'x', sizeof buf);
	assert_int_equal(timefmt_format(1772600767000, buf, 20), -ENOSPC); /* no room for NUL */
	assert_int_equal(buf[0], '\0');
	assert_int_equal(timefmt_format(1772600767000, buf, 21), 20);
	assert_int_equal(timefmt_format(1772600767123, buf, 24), -ENOSPC);
	assert_int_equal(timefmt_format(1772600767123, buf, 25), 24);
	assert_int_equal(timefmt_format(0, NULL, 0), -ENOSPC);
}

static void test_format_refuses_out_of_range(void **state)
{
	(void)state;
	char buf[TIMEFMT_BUF_SIZE];
	assert_int_equal(timefmt_format(TIMEFMT_MAX_MS + 1, buf, sizeof buf), -ERANGE);
	assert_int_equal(timefmt_format(TIMEFMT_MIN_MS - 1, buf, sizeof buf), -ERANGE);
	assert_int_equal(timefmt_format(INT64_MIN, buf, sizeof buf), -ERANGE);
	assert_int_equal(timefmt_format(INT64_MAX, buf, sizeof buf), -ERANGE);
}

static void test_fraction_of_any_length_rounds_to_ms(void **state)
{
	(void)state;
	const int64_t base = 1772600767000; /* date -u -d @1772600767 */
	assert_int_equal(parse_ok("2026-03-04T05:06:07.1Z"), base + 100);
	assert_int_equal(parse_ok("2026-03-04T05:06:07.12Z"), base + 120);
	assert_int_equal(parse_ok("2026-03-04T05:06:07.123Z"), base + 123);
	assert_int_equal(parse_ok("2026-03-04T05:06:07.1234Z"), base + 123);
	assert_int_equal(parse_ok("2026-03-04T05:06:07.1235Z"), base + 124); /* half up */
	assert_int_equal(parse_ok("2026-03-04T05:06:07.123499999999Z"), base + 123);
	assert_int_equal(parse_ok("2026-03-04T05:06:07.000000001Z"), base);
	assert_int_equal(parse_ok("2026-03-04T05:06:07.123456789012345678901234567890Z"),
			 base + 123);
	assert_int_equal(parse_ok("2026-03-04T05:06:07,5Z"), base + 500); /* ISO decimal comma */
	/* Rounding carries through second, minute, hour, day and year. */
	assert_int_equal(parse_ok("2026-12-31T23:59:59.9996Z"), parse_ok("2027-01-01T00:00:00Z"));
	assert_rejected("2026-03-04T05:06:07.Z");
	assert_rejected("2026-03-04T05:06:07.");
	assert_rejected("2026-03-04T05:06:07.12aZ");
}

static void test_offsets_are_converted_to_utc(void **state)
{
	(void)state;
	/* date -u -d 2026-03-04T05:06:07+01:00 +%s -> 1772597167 */
	assert_int_equal(parse_ok("2026-03-04T05:06:07+01:00"), 1772597167000);
	assert_int_equal(parse_ok("2026-03-04T05:06:07+0100"), 1772597167000);
	assert_int_equal(parse_ok("2026-03-04T05:06:07+01"), 1772597167000);
	/* date -u -d 2026-03-04T05:06:07-05:30 +%s -> 1772620567 */
	assert_int_equal(parse_ok("2026-03-04T05:06:07-05:30"), 1772620567000);
	assert_int_equal(parse_ok("2026-03-04T05:06:07-0530"), 1772620567000);
	assert_int_equal(parse_ok("2026-03-04T05:06:07.250-0530"), 1772620567250);
	assert_int_equal(parse_ok("2026-03-04T05:06:07+00:00"), 1772600767000);
	assert_int_equal(parse_ok("2026-03-04T05:06:07-00:00"), 1772600767000);
	/* An offset can move the date back over a year end. */
	assert_int_equal(parse_ok("2027-01-01T00:30:00+01:00"), parse_ok("2026-12-31T23:30:00Z"));
	assert_rejected("2026-03-04T05:06:07+24:00");
	assert_rejected("2026-03-04T05:06:07+01:60");
	assert_rejected("2026-03-04T05:06:07+1");
	assert_rejected("2026-03-04T05:06:07+01:0");
	assert_rejected("2026-03-04T05:06:07+01-00");
	assert_rejected("2026-03-04T05:06:07Z+01:00");
	/* Before 0000-01-01 once converted to UTC: outside the range. */
	assert_rejected("0000-01-01T00:00:00+01:00");
}

static void test_bare_time_is_utc_and_separators(void **state)
{
	(void)state;
	const int64_t base = 1772600767000; /* date -u -d @1772600767 */
	assert_int_equal(parse_ok("2026-03-04T05:06:07"), base);
	assert_int_equal(parse_ok("2026-03-04 05:06:07"), base);
	assert_int_equal(parse_ok("2026-03-04t05:06:07z"), base);
	assert_int_equal(parse_ok("2026-03-04 05:06:07.5"), base + 500);
	assert_int_equal(parse_ok("  2026-03-04T05:06:07Z\t"), base); /* blanks trimmed */
	assert_rejected("2026-03-04_05:06:07Z");
	assert_rejected("2026-03-04  05:06:07Z");
}

static void test_calendar_fields_out_of_range_are_rejected(void **state)
{
	(void)state;
	assert_rejected("2026-00-04T05:06:07Z");
	assert_rejected("2026-13-04T05:06:07Z");
	assert_rejected("2026-03-00T05:06:07Z");
	assert_rejected("2026-03-04T24:00:00Z");
	assert_rejected("2026-03-04T23:60:00Z");
	assert_rejected("2026-03-04T23:59:61Z");
	parse_ok("2026-03-04T23:59:59Z");
	parse_ok("2026-03-04T00:00:00Z");
}

static void test_leap_second_counts_as_next_minute(void **state)
{
	(void)state;
	/* POSIX time has no leap seconds: 23:59:60 maps onto 00:00:00. */
	assert_int_equal(parse_ok("2016-12-31T23:59:60Z"), parse_ok("2017-01-01T00:00:00Z"));
	assert_int_equal(parse_ok("2016-12-31T23:59:60.5Z"), parse_ok("2017-01-01T00:00:00.5Z"));
}

static void test_malformed_text_is_rejected(void **state)
{
	(void)state;
	assert_rejected("");
	assert_rejected("   ");
	assert_rejected("2026-03-04");
	assert_rejected("2026-03-04T05:06:Z");
	assert_rejected("2026-03-04T05:6Z");
	assert_rejected("2026-03-04T05:06:7Z");
	assert_rejected("2026-3-04T05:06:07Z");
	assert_rejected("26-03-04T05:06:07Z");
	assert_rejected("2026-03-04T05:06:07ZZ");
	assert_rejected("2026-03-04T05:06:07 Z");
	assert_rejected("2026/03/04T05:06:07Z");
	assert_rejected("20260304T050607Z");
	assert_rejected("abc");
	assert_rejected("12:00:00");
	assert_rejected("-");
	assert_rejected("+");
	assert_rejected("1e9");
	assert_rejected("1.2.3");
	assert_rejected("1..2");
	assert_rejected(".5");
	assert_rejected("5.");
	assert_rejected("- 5");
	assert_rejected("0x10");
}

static void test_epoch_seconds_integer_and_fraction(void **state)
{
	(void)state;
	assert_int_equal(parse_ok("1772600767"), 1772600767000);
	assert_int_equal(parse_ok("1772600767.25"), 1772600767250);
	assert_int_equal(parse_ok("1772600767,25"), 1772600767250);
	assert_int_equal(parse_ok("+1772600767.5"), 1772600767500);
	assert_int_equal(parse_ok("0"), 0);
	assert_int_equal(parse_ok("000000000000000001"), 1000); /* leading zeros are free */
	assert_int_equal(parse_ok("-1.5"), -1500);
	assert_int_equal(parse_ok("1.0005"), 1001);               /* half away from zero */
	assert_int_equal(parse_ok("-1.0005"), -1001);
	assert_int_equal(parse_ok("-0.0004"), 0);
	assert_int_equal(parse_ok("1772600767.2500000000000001"), 1772600767250);
	assert_int_equal(parse_ok("253402300799.999"), TIMEFMT_MAX_MS);
	assert_int_equal(parse_ok("-62167219200"), TIMEFMT_MIN_MS);
	assert_rejected("253402300800");
	assert_rejected("253402300799.9996"); /* rounds past 9999-12-31 */
	assert_rejected("-62167219200.001");
	assert_rejected("99999999999999999999999");
}

static void test_parse_reads_only_len_bytes(void **state)
{
	(void)state;
	const char *s = "2026-03-04T05:06:07Zgarbage";
	int64_t t;
	assert_int_equal(timefmt_parse(s, 20, &t), 0);
	assert_int_equal(t, 1772600767000);
	assert_int_equal(timefmt_parse(s, 21, &t), -EINVAL);
	/* "1772600767.25;4.5" as a CSV field of 13 bytes. */
	assert_int_equal(timefmt_parse("1772600767.25;4.5", 13, &t), 0);
	assert_int_equal(t, 1772600767250);
	assert_int_equal(timefmt_parse(NULL, 0, &t), -EINVAL);
}

static void test_minutes_without_seconds_are_whole_minutes(void **state)
{
	(void)state;
	/* 2026-03-02T08:00:00Z = 1772438400 (date -u -d 2026-03-02T08:00:00Z +%s). */
	assert_int_equal(parse_ok("2026-03-02T08:00Z"), 1772438400000LL);
	assert_int_equal(parse_ok("2026-03-02T09:00+01:00"), 1772438400000LL);
	assert_int_equal(parse_ok("2026-03-02 08:00"), 1772438400000LL);
}

static void test_spreadsheet_form_with_fraction(void **state)
{
	(void)state;
	assert_int_equal(parse_ok("2026-03-02 08:00:01.250"), 1772438401250LL);
	assert_int_equal(parse_ok("2026-03-02 08:00:01"), 1772438401000LL);
}

static void test_zoned_tells_whether_a_zone_was_given(void **state)
{
	(void)state;
	int64_t t = 0;
	bool zoned = true;
	assert_int_equal(timefmt_parse_zoned("2026-03-02 08:00", 16, &t, &zoned), 0);
	assert_false(zoned);
	assert_int_equal(timefmt_parse_zoned("2026-03-02T08:00:00Z", 20, &t, &zoned), 0);
	assert_true(zoned);
	assert_int_equal(timefmt_parse_zoned("2026-03-02T08:00-05", 19, &t, &zoned), 0);
	assert_true(zoned);
	assert_int_equal(t, 1772438400000LL + 5 * 3600000LL);
	zoned = false;
	assert_int_equal(timefmt_parse_zoned("1772438400", 10, &t, &zoned), 0);
	assert_true(zoned);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_parse_matches_date_command_values),
		cmocka_unit_test(test_minutes_without_seconds_are_whole_minutes),
		cmocka_unit_test(test_spreadsheet_form_with_fraction),
		cmocka_unit_test(test_zoned_tells_whether_a_zone_was_given),
		cmocka_unit_test(test_format_matches_date_command_values),
		cmocka_unit_test(test_posix_formula_agrees_with_date_command),
		cmocka_unit_test(test_days_from_civil_matches_posix_1970_to_2100),
		cmocka_unit_test(test_civil_from_days_inverts_every_day_0000_to_9999),
		cmocka_unit_test(test_leap_years_follow_gregorian_rule),
		cmocka_unit_test(test_round_trip_1900_to_2100_with_millis),
		cmocka_unit_test(test_round_trip_whole_range_and_edges),
		cmocka_unit_test(test_negative_epoch_formats_before_1970),
		cmocka_unit_test(test_format_adds_millis_only_when_nonzero),
		cmocka_unit_test(test_format_refuses_small_buffer),
		cmocka_unit_test(test_format_refuses_out_of_range),
		cmocka_unit_test(test_fraction_of_any_length_rounds_to_ms),
		cmocka_unit_test(test_offsets_are_converted_to_utc),
		cmocka_unit_test(test_bare_time_is_utc_and_separators),
		cmocka_unit_test(test_calendar_fields_out_of_range_are_rejected),
		cmocka_unit_test(test_leap_second_counts_as_next_minute),
		cmocka_unit_test(test_malformed_text_is_rejected),
		cmocka_unit_test(test_epoch_seconds_integer_and_fraction),
		cmocka_unit_test(test_parse_reads_only_len_bytes),
	};
	return cmocka_run_group_tests_name("timefmt", tests, NULL, NULL);
}
