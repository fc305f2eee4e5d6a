/*
 * test_csvread.c - the historian CSV reader (replay/csvread.c).
 *
 * Fixtures are in tests/files/csv/ (tag names of an invented plant); the
 * tests run from the repository root, as tests/run.sh does. Expected values
 * are the decimal numbers written in the fixtures: a correctly rounded reader
 * must return exactly the double the C compiler makes of the same literal,
 * so values are compared exactly (tolerance 0). Times are integers (ms),
 * also exact; epoch values are from `date -u -d @N`, as noted.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <errno.h>
#include <math.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include "csvread.h"
#include "timefmt.h"

#ifndef FG_CSV_FIXTURES
#define FG_CSV_FIXTURES "tests/files/csv/"
#endif

/* date -u -d 2026-03-04T05:06:00Z +%s -> 1772600760 */
#define T0_MS 1772600760000LL

static const char *const pdt_ft[] = { "C3_PDT_101", "C3_FT_102" };

struct tmpdir {
	bool made;
	char dir[64];
	char path[96];
};

struct fixture {
	struct csvread r;
	char err[512];
	struct tmpdir td;
};

static int setup(void **state)
{
	struct fixture *fx = calloc(1, sizeof *fx);
	if (fx == NULL)
		return -1;
	*state = fx;
	return 0;
}

static int teardown(void **state)
{
	struct fixture *fx = *state;
	csvread_close(&fx->r);
	int rc = 0;
	if (fx->td.made) {
		if (unlink(fx->td.path) != 0 && errno != ENOENT)
			rc = -1;
		if (rmdir(fx->td.dir) != 0)
			rc = -1;
	}
	free(fx);
	return rc;
}

/* Opens a fixture and binds names; both must succeed. */
static void open_bound(struct fixture *fx, const char *name, const char *const *names,
		       unsigned count)
{
	char path[256];
	snprintf(path, sizeof path, "%s%s", FG_CSV_FIXTURES, name);
	int rc = csvread_open(&fx->r, path, fx->err, sizeof fx->err);
	if (rc != 0)
		fail_msg("csvread_open(%s) = %d: %s", path, rc, fx->err);
	rc = csvread_bind(&fx->r, names, count, fx->err, sizeof fx->err);
	if (rc != 0)
		fail_msg("csvread_bind(%s) = %d: %s", path, rc, fx->err);
}

/* Reads one row that must be there and checks its time and two values
 * (expect NAN for a missing field). */
static void expect_row2(struct fixture *fx, int64_t t_ms, double a, double b)
{
	int64_t t = 0;
	double v[2] = { -1.0, -1.0 };
	int rc = csvread_next(&fx->r, &t, v, 2);
	if (rc != 1)
		fail_msg("csvread_next = %d, expected a row at %lld", rc, (long long)t_ms);
	assert_int_equal(t, t_ms);
	if (isnan(a))
		assert_true(isnan(v[0]));
	else
		assert_true(v[0] == a);
	if (isnan(b))
		assert_true(isnan(v[1]));
	else
		assert_true(v[1] == b);
}

static void expect_end(struct fixture *fx, unsigned count)
{
	int64_t t = 0;
	double v[2];
	assert_int_equal(csvread_next(&fx->r, &t, v, count), 0);
	assert_int_equal(csvread_next(&fx->r, &t, v, count), 0); /* and stays at the end */
}

static void expect_problem(const struct csvread_stats *st, unsigned i, uint64_t line,
			   enum csvread_problem_kind kind, const char *reason)
{
	assert_true(i < st->problem_count);
	assert_int_equal(st->problems[i].line, line);
	assert_int_equal(st->problems[i].kind, kind);
	assert_string_equal(st->problems[i].reason, reason);
}

static void test_good_comma_file_reads_values_in_bind_order(void **state)
{
	struct fixture *fx = *state;
	const char *const names[] = { "C3_FT_102", "C3_PDT_101" }; /* not header order */
	open_bound(fx, "good_comma.csv", names, 2);
	expect_row2(fx, T0_MS, 1500, 12.5);
	expect_row2(fx, T0_MS + 1000, 1510, 12.75);
	expect_row2(fx, T0_MS + 2000, 1520, NAN);     /* empty field */
	expect_row2(fx, T0_MS + 3000, 1.53E3, 13);    /* blanks around " 13 " */
	expect_end(fx, 2);
	const struct csvread_stats *st = csvread_stats(&fx->r);
	assert_int_equal(st->rows_read, 4);
	assert_int_equal(st->rows_returned, 4);
	assert_int_equal(st->rows_malformed, 0);
	assert_int_equal(st->lines_blank, 1);
	assert_int_equal(st->first_bad_line, 0);
	assert_null(st->first_bad_reason);
	assert_int_equal(st->problem_count, 0);
}

static void test_third_column_and_exponent_negative(void **state)
{
	struct fixture *fx = *state;
	const char *const names[] = { "C3_TT_103", "C3_PDT_101" };
	open_bound(fx, "good_comma.csv", names, 2);
	expect_row2(fx, T0_MS, 45.25, 12.5);
	expect_row2(fx, T0_MS + 1000, -3.5e-1, 12.75);
}

static void test_semicolon_file_accepts_decimal_comma(void **state)
{
	struct fixture *fx = *state;
	open_bound(fx, "good_semicolon.csv", pdt_ft, 2);
	expect_row2(fx, T0_MS + 500, 12.5, 1500);     /* "05:06:00,5Z", "12,5" */
	expect_row2(fx, T0_MS + 1000, -0.25, 1510);   /* bare time is UTC; "1510,0" */
	expect_row2(fx, T0_MS + 2000, 3.5, 1.5e3);    /* '.' still fine; "1,5e3" */
	expect_row2(fx, T0_MS + 3000, NAN, 7);        /* 1772600763: date -u -d @1772600763 */
	expect_end(fx, 2);
	assert_int_equal(csvread_stats(&fx->r)->rows_malformed, 0);
}

static void test_bom_and_crlf_are_handled(void **state)
{
	struct fixture *fx = *state;
	open_bound(fx, "bom_crlf.csv", pdt_ft, 2); /* header "Time": any case */
	expect_row2(fx, T0_MS, 1.5, 10);
	expect_row2(fx, T0_MS + 1000, 2.5, 20);
	expect_row2(fx, T0_MS + 2000, 3.5, 30);   /* after a blank CRLF line */
	expect_end(fx, 2);
	const struct csvread_stats *st = csvread_stats(&fx->r);
	assert_int_equal(st->rows_read, 3);
	assert_int_equal(st->lines_blank, 1);
	assert_int_equal(st->rows_malformed, 0);
}

static void test_epoch_seconds_with_fractions(void **state)
{
	struct fixture *fx = *state;
	const char *const names[] = { "C3_PDT_101" };
	open_bound(fx, "epoch.csv", names, 1);
	/* date -u -d @1772600760 -> 2026-03-04T05:06:00Z */
	const int64_t expect_t[] = { T0_MS, T0_MS + 500, T0_MS + 1250, T0_MS + 2000, T0_MS + 4000 };
	for (unsigned i = 0; i < 5; i++) {
		int64_t t;
		double v;
		assert_int_equal(csvread_next(&fx->r, &t, &v, 1), 1);
		assert_int_equal(t, expect_t[i]);
		assert_true(v == (double)(i + 1));
	}
	int64_t t;
	double v;
	assert_int_equal(csvread_next(&fx->r, &t, &v, 1), 0);
}

static void test_fractional_seconds_round_to_ms(void **state)
{
	struct fixture *fx = *state;
	const char *const names[] = { "C3_PDT_101" };
	open_bound(fx, "frac_seconds.csv", names, 1);
	const int64_t t7 = T0_MS + 7000; /* 05:06:07Z */
	/* .1 .12 .123 .1236 (rounds up) .999999999 (to the next second), and
	 * 06:06:09.5+01:00 = 05:06:09.5Z */
	const int64_t expect_t[] = { t7 + 100, t7 + 120, t7 + 123, t7 + 124, t7 + 1000,
				     T0_MS + 9500 };
	for (unsigned i = 0; i < 6; i++) {
		int64_t t;
		double v;
		assert_int_equal(csvread_next(&fx->r, &t, &v, 1), 1);
		assert_int_equal(t, expect_t[i]);
		assert_true(v == (double)(i + 1));
	}
	expect_end(fx, 1);
}

static void test_truncated_last_line_is_skipped_and_counted(void **state)
{
	struct fixture *fx = *state;
	open_bound(fx, "truncated.csv", pdt_ft, 2);
	expect_row2(fx, T0_MS, 1.5, 10);
	expect_row2(fx, T0_MS + 1000, 2.5, 20);
	expect_end(fx, 2);
	const struct csvread_stats *st = csvread_stats(&fx->r);
	assert_int_equal(st->rows_read, 3);
	assert_int_equal(st->rows_malformed, 1);
	assert_int_equal(st->first_bad_line, 4);
	assert_string_equal(st->first_bad_reason, "fewer fields than the header");
	expect_problem(st, 0, 4, CSVREAD_MALFORMED, "fewer fields than the header");
}

static void test_complete_last_line_without_newline_is_used(void **state)
{
	struct fixture *fx = *state;
	open_bound(fx, "truncated_complete.csv", pdt_ft, 2);
	expect_row2(fx, T0_MS, 1.5, 10);
	expect_row2(fx, T0_MS + 1000, 2.5, 20);
	expect_end(fx, 2);
	assert_int_equal(csvread_stats(&fx->r)->rows_malformed, 0);
}

static void test_malformed_rows_are_skipped_with_line_numbers(void **state)
{
	struct fixture *fx = *state;
	open_bound(fx, "text_in_number.csv", pdt_ft, 2);
	expect_row2(fx, T0_MS, 1.5, 10);             /* line 2; STATUS column is text, unbound */
	/* Line 3: a historian status in a value cell makes that cell bad (NAN,
	 * text kept), never the row. */
	expect_row2(fx, T0_MS + 1000, NAN, 20);
	assert_int_equal(csvread_text_count(&fx->r), 1);
	unsigned slot = 9;
	const char *text = NULL;
	csvread_text_at(&fx->r, 0, &slot, &text);
	assert_int_equal(slot, 0);
	assert_string_equal(text, "Bad Input");
	expect_row2(fx, T0_MS + 2000, 3.5, 30);      /* line 4 */
	assert_int_equal(csvread_text_count(&fx->r), 0);
	expect_row2(fx, T0_MS + 6000, 7.5, NAN);     /* line 8: "1.2.3" is text */
	expect_row2(fx, T0_MS + 8000, NAN, 80);      /* line 10: 1e999 is out of range */
	csvread_text_at(&fx->r, 0, &slot, &text);
	assert_string_equal(text, "1e999");
	expect_row2(fx, T0_MS + 9000, 9.5, 90);      /* line 11 */
	expect_end(fx, 2);
	const struct csvread_stats *st = csvread_stats(&fx->r);
	assert_int_equal(st->rows_read, 10);
	assert_int_equal(st->rows_returned, 6);
	assert_int_equal(st->rows_malformed, 4);
	assert_int_equal(st->cells_text, 3);
	assert_int_equal(st->rows_unsorted, 0);
	assert_int_equal(st->first_bad_line, 5);
	assert_string_equal(st->first_bad_reason, "fewer fields than the header");
	assert_int_equal(st->problem_count, 4);
	expect_problem(st, 0, 5, CSVREAD_MALFORMED, "fewer fields than the header");
	expect_problem(st, 1, 6, CSVREAD_MALFORMED, "more fields than the header");
	expect_problem(st, 2, 7, CSVREAD_MALFORMED, "bad time");
	expect_problem(st, 3, 9, CSVREAD_MALFORMED, "unterminated quote");
}

static void test_numbers_are_correctly_rounded(void **state)
{
	struct fixture *fx = *state;
	/* The expected doubles are the same decimal literals converted by the C
	 * compiler (GCC converts literals correctly rounded, through MPFR); the
	 * reader must give the identical double. */
	static const double expect[] = {
		0.1, -0.0, 1e5, 1E+05, +.5, 5., -2.5e-3,
		123456789012345678901234567890.0, 0.000000000000000000000000001,
		1.7976931348623157e308, 4.9e-324, 2.2250738585072011e-308,
		9007199254740993.0, /* 2^53 + 1: rounds to even, 2^53 */
		0.30000000000000004, 1e22, 1e23, 000012.50,
		123456789012.345, -0.000123456789012345, /* 15 digits: the fast path's edge */
	};
	const unsigned n = sizeof expect / sizeof expect[0];
	const char *const names[] = { "V" };
	open_bound(fx, "numbers.csv", names, 1);
	for (unsigned i = 0; i < n; i++) {
		int64_t t;
		double v;
		assert_int_equal(csvread_next(&fx->r, &t, &v, 1), 1);
		assert_int_equal(t, T0_MS + (int64_t)i * 1000);
		if (memcmp(&v, &expect[i], sizeof v) != 0)
			fail_msg("line %u: got %.17g, expected %.17g", i + 2, v, expect[i]);
	}
	/* The ten text forms after them (1e, e5, --1, 1-, 0x10, inf, nan, "1 2",
	 * 1.5., ".") are not numbers: each reads as a bad cell with its text. */
	for (unsigned i = 0; i < 10; i++) {
		int64_t t;
		double v = 0.0;
		assert_int_equal(csvread_next(&fx->r, &t, &v, 1), 1);
		assert_true(isnan(v));
		assert_int_equal(csvread_text_count(&fx->r), 1);
	}
	expect_end(fx, 1);
	const struct csvread_stats *st = csvread_stats(&fx->r);
	assert_int_equal(st->rows_malformed, 0);
	assert_int_equal(st->cells_text, 10);
	assert_int_equal(st->rows_returned, n + 10);
}

static void test_missing_tag_is_an_error_naming_tag_and_file(void **state)
{
	struct fixture *fx = *state;
	const char *path = FG_CSV_FIXTURES "missing_column.csv";
	assert_int_equal(csvread_open(&fx->r, path, fx->err, sizeof fx->err), 0);
	assert_int_equal(csvread_bind(&fx->r, pdt_ft, 2, fx->err, sizeof fx->err), -ENOENT);
	assert_non_null(strstr(fx->err, "\"C3_FT_102\""));
	assert_non_null(strstr(fx->err, path));
	/* Rebinding to columns that exist works, and "time" is not a tag. */
	const char *const ok[] = { "C3_TT_103" };
	assert_int_equal(csvread_bind(&fx->r, ok, 1, fx->err, sizeof fx->err), 0);
	const char *const time_tag[] = { "time" };
	assert_int_equal(csvread_bind(&fx->r, time_tag, 1, fx->err, sizeof fx->err), -ENOENT);
	const char *const twice[] = { "C3_TT_103", "C3_TT_103" };
	assert_int_equal(csvread_bind(&fx->r, twice, 2, fx->err, sizeof fx->err), -EINVAL);
	assert_non_null(strstr(fx->err, "C3_TT_103"));
}

static void test_unsorted_and_duplicate_times_are_skipped(void **state)
{
	struct fixture *fx = *state;
	const char *const names[] = { "C3_PDT_101" };
	open_bound(fx, "unsorted_dup.csv", names, 1);
	const int64_t expect_t[] = { T0_MS, T0_MS + 1000, T0_MS + 2000, T0_MS + 5000,
				     T0_MS + 6000 };
	const double expect_v[] = { 1, 2, 5, 6, 9 };
	for (unsigned i = 0; i < 5; i++) {
		int64_t t;
		double v;
		assert_int_equal(csvread_next(&fx->r, &t, &v, 1), 1);
		assert_int_equal(t, expect_t[i]);
		assert_true(v == expect_v[i]);
	}
	expect_end(fx, 1);
	const struct csvread_stats *st = csvread_stats(&fx->r);
	assert_int_equal(st->rows_read, 9);
	assert_int_equal(st->rows_returned, 5);
	assert_int_equal(st->rows_unsorted, 2);
	assert_int_equal(st->rows_duplicate, 2);
	assert_int_equal(st->rows_malformed, 0);
	assert_int_equal(st->first_bad_line, 0); /* only malformed rows set it */
	assert_int_equal(st->problem_count, 4);
	expect_problem(st, 0, 4, CSVREAD_DUPLICATE, "duplicate time");
	expect_problem(st, 1, 5, CSVREAD_UNSORTED, "time out of order");
	expect_problem(st, 2, 8, CSVREAD_UNSORTED, "time out of order");
	expect_problem(st, 3, 9, CSVREAD_DUPLICATE, "duplicate time");
	assert_string_equal(csvread_problem_kind_name(CSVREAD_UNSORTED), "unsorted");
	assert_string_equal(csvread_problem_kind_name(CSVREAD_DUPLICATE), "duplicate");
	assert_string_equal(csvread_problem_kind_name(CSVREAD_MALFORMED), "malformed");
}

static void test_empty_file_is_an_error(void **state)
{
	struct fixture *fx = *state;
	const char *path = FG_CSV_FIXTURES "empty.csv";
	assert_int_equal(csvread_open(&fx->r, path, fx->err, sizeof fx->err), -ENODATA);
	assert_non_null(strstr(fx->err, "empty file"));
	assert_non_null(strstr(fx->err, path));
	assert_null(fx->r.f); /* left closed */
	path = FG_CSV_FIXTURES "blank_only.csv";
	assert_int_equal(csvread_open(&fx->r, path, fx->err, sizeof fx->err), -ENODATA);
	assert_non_null(strstr(fx->err, "empty file"));
}

static void test_header_only_opens_and_has_no_rows(void **state)
{
	struct fixture *fx = *state;
	open_bound(fx, "header_only.csv", pdt_ft, 2);
	expect_end(fx, 2);
	const struct csvread_stats *st = csvread_stats(&fx->r);
	assert_int_equal(st->rows_read, 0);
	assert_int_equal(st->rows_returned, 0);
}

static void test_very_long_line_is_skipped_and_counted(void **state)
{
	struct fixture *fx = *state;
	const char *const names[] = { "C3_PDT_101" };
	open_bound(fx, "long_line.csv", names, 1);
	int64_t t;
	double v;
	assert_int_equal(csvread_next(&fx->r, &t, &v, 1), 1);
	assert_int_equal(t, T0_MS);
	assert_true(v == 1);
	assert_int_equal(csvread_next(&fx->r, &t, &v, 1), 1); /* line 4, after 70 kB on line 3 */
	assert_int_equal(t, T0_MS + 2000);
	assert_true(v == 3);
	assert_int_equal(csvread_next(&fx->r, &t, &v, 1), 0);
	const struct csvread_stats *st = csvread_stats(&fx->r);
	assert_int_equal(st->rows_read, 3);
	assert_int_equal(st->rows_malformed, 1);
	assert_int_equal(st->first_bad_line, 3);
	expect_problem(st, 0, 3, CSVREAD_MALFORMED, "line longer than FG_CSV_LINE_MAX");
}

static void test_quoted_header_and_fields(void **state)
{
	struct fixture *fx = *state;
	/* Header: "time","C3 ""west"" DP","flow,A", C3_FT_102 */
	const char *const names[] = { "C3 \"west\" DP", "flow,A", "C3_FT_102" };
	open_bound(fx, "quoted_header.csv", names, 3);
	int64_t t;
	double v[3];
	assert_int_equal(csvread_next(&fx->r, &t, v, 3), 1);
	assert_int_equal(t, T0_MS);
	assert_true(v[0] == 1.5);
	assert_true(v[1] == 2);
	assert_true(v[2] == 3);
	assert_int_equal(csvread_next(&fx->r, &t, v, 3), 1);
	assert_int_equal(t, T0_MS + 1000);
	assert_true(v[0] == 4.5);
	assert_true(v[1] == 5);
	assert_true(v[2] == 6);
	assert_int_equal(csvread_next(&fx->r, &t, v, 3), 0);
	const struct csvread_stats *st = csvread_stats(&fx->r);
	assert_int_equal(st->rows_malformed, 1);
	expect_problem(st, 0, 4, CSVREAD_MALFORMED, "text after a closing quote");
}

static void test_header_without_time_is_an_error(void **state)
{
	struct fixture *fx = *state;
	const char *path = FG_CSV_FIXTURES "no_time.csv";
	assert_int_equal(csvread_open(&fx->r, path, fx->err, sizeof fx->err), -EINVAL);
	assert_non_null(strstr(fx->err, "no_time.csv:1:"));
	assert_non_null(strstr(fx->err, "no time column"));
	assert_non_null(strstr(fx->err, "time_column"));
}

static void test_duplicate_header_names_are_an_error(void **state)
{
	struct fixture *fx = *state;
	assert_int_equal(csvread_open(&fx->r, FG_CSV_FIXTURES "duplicate_header.csv", fx->err,
				      sizeof fx->err),
			 -EINVAL);
	assert_non_null(strstr(fx->err, "\"C3_PDT_101\" appears twice (columns 2 and 4)"));
}

static void test_missing_file_and_directory_are_errors(void **state)
{
	struct fixture *fx = *state;
	assert_int_equal(csvread_open(&fx->r, FG_CSV_FIXTURES "no_such_file.csv", fx->err,
				      sizeof fx->err),
			 -ENOENT);
	assert_non_null(strstr(fx->err, "no_such_file.csv"));
	/* fopen() of a directory succeeds on Linux; the first read fails. */
	assert_int_equal(csvread_open(&fx->r, FG_CSV_FIXTURES, fx->err, sizeof fx->err), -EISDIR);
	assert_non_null(strstr(fx->err, "read error"));
	assert_null(fx->r.f);
}

static void test_close_accepts_unopened_and_closed_readers(void **state)
{
	struct fixture *fx = *state;
	struct csvread never = { 0 };
	csvread_close(&never);
	csvread_close(NULL);
	open_bound(fx, "good_comma.csv", pdt_ft, 2);
	csvread_close(&fx->r);
	assert_null(fx->r.f);
	csvread_close(&fx->r); /* twice */
}

static void test_progress_counts_bytes_to_file_size(void **state)
{
	struct fixture *fx = *state;
	open_bound(fx, "bom_crlf.csv", pdt_ft, 2);
	uint64_t done, total;
	assert_int_equal(csvread_progress(&fx->r, &done, &total), 0);
	assert_int_equal(total, 119);    /* `stat -c %s tests/files/csv/bom_crlf.csv` */
	/* `head -1 tests/files/csv/bom_crlf.csv | wc -c`: BOM + header + CRLF */
	assert_int_equal(done, 30);
	int64_t t;
	double v[2];
	while (csvread_next(&fx->r, &t, v, 2) == 1)
		;
	assert_int_equal(csvread_progress(&fx->r, &done, &total), 0);
	assert_int_equal(done, 119);
}

/* ---- generated files -------------------------------------------------- */

/* Temporary directory and file of a test; removed by teardown even when the
 * test fails half-way. */
static void tmpdir_make(struct tmpdir *td, const char *file)
{
	const char *base = getenv("TMPDIR");
	snprintf(td->dir, sizeof td->dir, "%s/fgcsvXXXXXX", base != NULL ? base : "/tmp");
	assert_non_null(mkdtemp(td->dir));
	td->made = true;
	snprintf(td->path, sizeof td->path, "%s/%s", td->dir, file);
}

/* A row whose NOTE field pads the line to exactly line_len bytes before CRLF. */
static void write_padded_row(FILE *f, const char *time, unsigned line_len)
{
	int head = fprintf(f, "%s,7,", time);
	assert_true(head > 0 && (unsigned)head < line_len);
	for (unsigned i = (unsigned)head; i < line_len; i++)
		fputc('n', f);
	fputs("\r\n", f);
}

static void test_line_of_exactly_line_max_is_accepted(void **state)
{
	struct fixture *fx = *state;
	struct tmpdir *td = &fx->td;
	tmpdir_make(td, "limit.csv");
	FILE *f = fopen(td->path, "wb");
	assert_non_null(f);
	fputs("time,C3_PDT_101,NOTE\r\n", f);
	write_padded_row(f, "2026-03-04T05:06:00Z", FG_CSV_LINE_MAX);     /* line 2: fits */
	write_padded_row(f, "2026-03-04T05:06:01Z", FG_CSV_LINE_MAX + 1); /* line 3: one over */
	fputs("2026-03-04T05:06:02Z,8,end\r\n", f);
	assert_int_equal(fclose(f), 0);
	const char *path = td->path;
	assert_int_equal(csvread_open(&fx->r, path, fx->err, sizeof fx->err), 0);
	const char *const names[] = { "C3_PDT_101" };
	assert_int_equal(csvread_bind(&fx->r, names, 1, fx->err, sizeof fx->err), 0);
	int64_t t;
	double v;
	assert_int_equal(csvread_next(&fx->r, &t, &v, 1), 1);
	assert_int_equal(t, T0_MS);
	assert_true(v == 7);
	assert_int_equal(csvread_next(&fx->r, &t, &v, 1), 1);
	assert_int_equal(t, T0_MS + 2000);
	assert_true(v == 8);
	assert_int_equal(csvread_next(&fx->r, &t, &v, 1), 0);
	expect_problem(csvread_stats(&fx->r), 0, 3, CSVREAD_MALFORMED,
		       "line longer than FG_CSV_LINE_MAX");
	assert_int_equal(csvread_stats(&fx->r)->rows_malformed, 1);
}

/* One time in one of the ISO forms a historian writes: Z, a space and no
 * zone (UTC, no zone database given), 250 ms past t_ms, an offset of +01:00. */
static void iso_text(int64_t t_ms, unsigned kind, char *buf, size_t size)
{
	int64_t shift = kind == 3 ? 3600000 : 0; /* t_ms in whole seconds */
	time_t sec = (time_t)((t_ms + shift) / 1000);
	struct tm tm;
	assert_non_null(gmtime_r(&sec, &tm));
	size_t n = 0;
	switch (kind) {
	case 0: n = strftime(buf, size, "%Y-%m-%dT%H:%M:%SZ", &tm); break;
	case 1: n = strftime(buf, size, "%Y-%m-%d %H:%M:%S", &tm); break;
	case 2: n = strftime(buf, size, "%Y-%m-%dT%H:%M:%S.250Z", &tm); break;
	default: n = strftime(buf, size, "%Y-%m-%dT%H:%M:%S+01:00", &tm); break;
	}
	assert_true(n > 0);
}

/* The reader keeps the last time text and reads the next from its seconds
 * when nothing else changed. Every row's time must be what timefmt_parse
 * makes of the text alone: steps of 1-3 s across minutes, hours and a day,
 * the form changing every few rows, and now and then a row a second back
 * in time (skipped as unsorted, and then the last text kept). */
static void test_times_read_from_the_last_text_equal_a_full_parse(void **state)
{
	struct fixture *fx = *state;
	struct tmpdir *td = &fx->td;
	tmpdir_make(td, "times.csv");
	FILE *f = fopen(td->path, "wb");
	assert_non_null(f);
	fputs("time,C3_PDT_101\n", f);
	enum { ROWS = 3000 };
	static int64_t expect[ROWS];
	int64_t t = T0_MS + 86400000LL - 1800000LL; /* half an hour before midnight */
	unsigned kind = 0, n = 0, back = 0;
	uint64_t rng = 12345u;
	char text[64];
	for (unsigned i = 0; i < ROWS; i++) {
		rng = rng * 6364136223846793005u + 1442695040888963407u;
		if (i % 7 == 0)
			kind = (unsigned)(rng >> 60) % 4u;
		t += 1000 * (int64_t)(1 + (rng >> 40) % 3u);
		iso_text(t, kind, text, sizeof text);
		int64_t full;
		assert_int_equal(timefmt_parse(text, strlen(text), &full), 0);
		assert_true(full == t + (kind == 2 ? 250 : 0));
		fprintf(f, "%s,%u\n", text, n);
		expect[n++] = full;
		if (i % 50 == 49) { /* one second back: unsorted */
			iso_text(t - 1000, kind, text, sizeof text);
			fprintf(f, "%s,-1\n", text);
			back++;
		}
	}
	assert_int_equal(fclose(f), 0);
	assert_int_equal(csvread_open(&fx->r, td->path, fx->err, sizeof fx->err), 0);
	const char *const names[] = {"C3_PDT_101"};
	assert_int_equal(csvread_bind(&fx->r, names, 1, fx->err, sizeof fx->err), 0);
	for (unsigned k = 0; k < n; k++) {
		int64_t got;
		double v;
		assert_int_equal(csvread_next(&fx->r, &got, &v, 1), 1);
		assert_true(v == (double)k);
		if (got != expect[k])
			fail_msg("row %u: %lld, the full parse %lld", k, (long long)got,
				 (long long)expect[k]);
	}
	int64_t got;
	double v;
	assert_int_equal(csvread_next(&fx->r, &got, &v, 1), 0);
	assert_int_equal(csvread_stats(&fx->r)->rows_unsorted, back);
}

static void test_stdin_pipe_is_read_with_unknown_total(void **state)
{
	struct fixture *fx = *state;
	const char text[] = "time;C3_PDT_101;C3_FT_102\n2026-03-04T05:06:00Z;1,25;2\n";
	int p[2];
	assert_int_equal(pipe(p), 0);
	assert_int_equal(write(p[1], text, sizeof text - 1), (ssize_t)(sizeof text - 1));
	assert_int_equal(close(p[1]), 0);
	int saved = dup(0);
	assert_true(saved >= 0);
	assert_int_equal(dup2(p[0], 0), 0);
	assert_int_equal(close(p[0]), 0);
	clearerr(stdin);
	int rc = csvread_open(&fx->r, "-", fx->err, sizeof fx->err);
	int bind_rc = rc == 0 ? csvread_bind(&fx->r, pdt_ft, 2, fx->err, sizeof fx->err) : -1;
	int64_t t = 0;
	double v[2] = { 0, 0 };
	int next_rc = bind_rc == 0 ? csvread_next(&fx->r, &t, v, 2) : -1;
	int end_rc = next_rc == 1 ? csvread_next(&fx->r, &t, v, 2) : -1;
	uint64_t done = 1, total = 1;
	if (rc == 0)
		csvread_progress(&fx->r, &done, &total);
	csvread_close(&fx->r); /* must not close stdin */
	assert_int_equal(dup2(saved, 0), 0);
	assert_int_equal(close(saved), 0);
	clearerr(stdin);
	assert_int_equal(rc, 0);
	assert_int_equal(bind_rc, 0);
	assert_int_equal(next_rc, 1);
	assert_int_equal(t, T0_MS);
	assert_true(v[0] == 1.25);
	assert_true(v[1] == 2);
	assert_int_equal(end_rc, 0);
	assert_int_equal(total, 0);
	assert_int_equal(done, sizeof text - 1);
}

#define BIG_ROWS 200000u

/* Values of generated row i, computed independently of the reader. */
static int64_t big_a_hundredths(unsigned i)
{
	return (int64_t)(i % 20011u) * 7 - 70000; /* -700.00 .. 700.70, both signs */
}

static double big_c(unsigned i)
{
	return sin((double)i) * 1.0e5; /* printed with %.17g: 17 digits, slow path */
}

static void write_big_file(const char *path)
{
	FILE *f = fopen(path, "wb");
	assert_non_null(f);
	fputs("time,C3_PDT_101,C3_FT_102,C3_TT_103,NOTE\n", f);
	char tbuf[TIMEFMT_BUF_SIZE];
	for (unsigned i = 0; i < BIG_ROWS; i++) {
		assert_true(timefmt_format(T0_MS + (int64_t)i * 250, tbuf, sizeof tbuf) > 0);
		int64_t a = big_a_hundredths(i);
		int64_t mag = a < 0 ? -a : a;
		fprintf(f, "%s,%s%lld.%02lld,", tbuf, a < 0 ? "-" : "", (long long)(mag / 100),
			(long long)(mag % 100));
		if (i % 7 != 0)
			fprintf(f, "%u", i % 1000);
		fprintf(f, ",%.17g,row %u\n", big_c(i), i);
	}
	assert_int_equal(fclose(f), 0);
}

/* Deterministic pseudo-random bytes (a 64-bit LCG, Knuth's MMIX constants). */
static uint64_t lcg_next(uint64_t *x)
{
	*x = *x * 6364136223846793005ULL + 1442695040888963407ULL;
	return *x >> 33;
}

static void test_mutated_input_never_breaks_the_counters(void **state)
{
	struct fixture *fx = *state;
	/* Bytes that matter to the parser, plus anything at all. */
	static const char alphabet[] = ",;\"\r\n .e-+0123456789T:Z\xEF\xBB\xBF\t";
	static const char seed_text[] = "time,C3_PDT_101,C3_FT_102\n"
					"2026-03-04T05:06:00Z,1.5,10\n"
					"2026-03-04T05:06:01Z,\"2.5\",20\n"
					"1772600762.5,3e1,\n";
	struct tmpdir *td = &fx->td;
	tmpdir_make(td, "mutant.csv");
	const char *path = td->path;
	uint64_t x = 20260304;
	unsigned opened = 0;
	for (unsigned round = 0; round < 600; round++) {
		char text[sizeof seed_text + 64];
		size_t n = sizeof seed_text - 1;
		memcpy(text, seed_text, n);
		unsigned edits = 1 + (unsigned)(lcg_next(&x) % 6);
		for (unsigned e = 0; e < edits; e++) {
			size_t at = (size_t)(lcg_next(&x) % n);
			uint64_t pick = lcg_next(&x);
			char c = pick % 4 == 0 ? (char)(pick >> 8)
					       : alphabet[(pick >> 8) % (sizeof alphabet - 1)];
			if (pick % 3 == 0 && n + 1 < sizeof text) { /* insert */
				memmove(text + at + 1, text + at, n - at);
				n++;
			}
			text[at] = c;
		}
		if (lcg_next(&x) % 5 == 0)
			n = (size_t)(lcg_next(&x) % n); /* cut anywhere */
		FILE *f = fopen(path, "wb");
		assert_non_null(f);
		assert_int_equal(fwrite(text, 1, n, f), n);
		assert_int_equal(fclose(f), 0);
		if (csvread_open(&fx->r, path, fx->err, sizeof fx->err) != 0)
			continue; /* a refused header is a fine outcome */
		opened++;
		const char *const names[] = { "C3_PDT_101" };
		char *err = fx->err;
		unsigned bound = csvread_bind(&fx->r, names, 1, err, sizeof fx->err) == 0 ? 1 : 0;
		if (bound == 0)
			assert_int_equal(csvread_bind(&fx->r, names, 0, err, sizeof fx->err), 0);
		int64_t t, last_t = INT64_MIN;
		double v;
		int rc;
		while ((rc = csvread_next(&fx->r, &t, &v, bound)) == 1) {
			assert_true(t > last_t); /* strictly increasing, always */
			last_t = t;
		}
		assert_int_equal(rc, 0);
		const struct csvread_stats *st = csvread_stats(&fx->r);
		assert_int_equal(st->rows_read, st->rows_returned + st->rows_malformed +
							st->rows_unsorted + st->rows_duplicate);
		uint64_t prev_line = 0;
		for (unsigned i = 0; i < st->problem_count; i++) {
			assert_true(st->problems[i].line > prev_line);
			assert_true(st->problems[i].line <= fx->r.line_no);
			prev_line = st->problems[i].line;
		}
		uint64_t done, total;
		csvread_progress(&fx->r, &done, &total);
		assert_int_equal(done, n);
		assert_int_equal(total, n);
		csvread_close(&fx->r);
	}
	assert_true(opened > 100); /* the mutations did not all kill the header */
}

static void test_large_generated_file_sums_match(void **state)
{
	struct fixture *fx = *state;
	struct tmpdir *td = &fx->td;
	tmpdir_make(td, "big.csv");
	write_big_file(td->path);
	const char *const names[] = { "C3_PDT_101", "C3_FT_102", "C3_TT_103" };
	const char *path = td->path;
	assert_int_equal(csvread_open(&fx->r, path, fx->err, sizeof fx->err), 0);
	assert_int_equal(csvread_bind(&fx->r, names, 3, fx->err, sizeof fx->err), 0);
	struct timespec t0, t1;
	clock_gettime(CLOCK_MONOTONIC, &t0);
	int64_t sum_a = 0, expect_sum_a = 0;
	uint64_t sum_b = 0, expect_sum_b = 0, missing_b = 0;
	unsigned rows = 0, c_mismatch = 0, a_mismatch = 0, t_mismatch = 0;
	int64_t t;
	double v[3];
	while (csvread_next(&fx->r, &t, v, 3) == 1) {
		unsigned i = rows++;
		t_mismatch += t != T0_MS + (int64_t)i * 250;
		/* "%lld.%02lld" of hundredths parses to the correctly rounded h/100 */
		a_mismatch += v[0] != (double)big_a_hundredths(i) / 100.0;
		sum_a += (int64_t)llround(v[0] * 100.0);
		expect_sum_a += big_a_hundredths(i);
		if (isnan(v[1])) {
			missing_b++;
		} else {
			sum_b += (uint64_t)v[1];
			expect_sum_b += i % 1000;
		}
		c_mismatch += v[2] != big_c(i); /* %.17g round-trips a double exactly */
	}
	clock_gettime(CLOCK_MONOTONIC, &t1);
	double s = (double)(t1.tv_sec - t0.tv_sec) + (double)(t1.tv_nsec - t0.tv_nsec) * 1e-9;
	print_message("# %u rows read in %.3f s (%.0f rows/s)\n", rows, s,
		      rows / (s > 0 ? s : 1e-9));
	uint64_t done, total;
	csvread_progress(&fx->r, &done, &total);
	const struct csvread_stats *st = csvread_stats(&fx->r);
	assert_int_equal(rows, BIG_ROWS);
	assert_int_equal(st->rows_returned, BIG_ROWS);
	assert_int_equal(st->rows_malformed, 0);
	assert_int_equal(t_mismatch, 0);
	assert_int_equal(a_mismatch, 0);
	assert_int_equal(c_mismatch, 0);
	assert_int_equal(sum_a, expect_sum_a);
	assert_int_equal(sum_b, expect_sum_b);
	assert_int_equal(missing_b, (BIG_ROWS + 6) / 7); /* i = 0, 7, 14, ... */
	assert_int_equal(done, total);
	assert_true(total > 10u * 1000u * 1000u); /* several buffer refills */
	csvread_close(&fx->r);
}

/* ---- numbers against strtod ---------------------------------------------
 * Every number cell the reader takes must be the double strtod gives for
 * the same text (glibc's strtod rounds correctly): plain decimals of 1 to
 * 19 digits (the one-pass fast path, up to a significand of 2^53 and 22
 * decimals), and around it what must take the general path: longer digit
 * strings, significands just over 2^53, 23 decimals, exponents. */

static uint64_t num_rng = 0x9e3779b97f4a7c15u;

static uint64_t num_next(void)
{
	num_rng ^= num_rng >> 12;
	num_rng ^= num_rng << 25;
	num_rng ^= num_rng >> 27;
	return num_rng * 2685821657736338717u;
}

/* A random number text in buf (decimal mark '.'); returns its length. */
static int random_number_text(char *buf, size_t size)
{
	char digits[40];
	unsigned kind = (unsigned)(num_next() % 8u);
	unsigned nd = kind < 5 ? 1u + (unsigned)(num_next() % 19u) : 15u + (unsigned)(num_next() % 14u);
	for (unsigned i = 0; i < nd; i++)
		digits[i] = (char)('0' + num_next() % 10u);
	if (kind == 5 && nd >= 16) /* around 2^53 = 9007199254740992 */
		memcpy(digits, "90071992547409", 14);
	digits[nd] = '\0';
	unsigned point = (unsigned)(num_next() % (nd + 2u)); /* nd + 1: no point */
	const char *sign = num_next() % 4u == 0 ? "-" : num_next() % 8u == 0 ? "+" : "";
	int n;
	if (point > nd)
		n = snprintf(buf, size, "%s%s", sign, digits);
	else
		n = snprintf(buf, size, "%s%.*s.%s", sign, (int)point, digits, digits + point);
	if (kind == 6) /* an exponent */
		n += snprintf(buf + n, size - (size_t)n, "e%d", (int)(num_next() % 80u) - 40);
	if (kind == 7 && num_next() % 2u == 0) /* 22 or 23 decimals */
		n = snprintf(buf, size, "0.%022llu%s", (unsigned long long)(num_next() % 10000000000u),
			     num_next() % 2u ? "7" : "");
	return n;
}

static void numbers_against_strtod(struct fixture *fx, char delim)
{
	enum { ROWS = 100000, COLS = 5 };
	struct tmpdir *td = &fx->td;
	tmpdir_make(td, "numbers.csv");
	FILE *f = fopen(td->path, "w");
	assert_non_null(f);
	static double expect[ROWS][COLS];
	fprintf(f, "time%cA%cB%cC%cD%cE\n", delim, delim, delim, delim, delim);
	for (unsigned r = 0; r < ROWS; r++) {
		fprintf(f, "%lld", (long long)(1772600760 + r));
		for (unsigned c = 0; c < COLS; c++) {
			char text[64];
			random_number_text(text, sizeof text);
			expect[r][c] = strtod(text, NULL);
			if (delim == ';') { /* written with a decimal comma */
				char *dot = strchr(text, '.');
				if (dot != NULL)
					*dot = ',';
			}
			fprintf(f, "%c%s", delim, text);
		}
		fputc('\n', f);
	}
	assert_int_equal(fclose(f), 0);
	const char *const names[] = { "A", "B", "C", "D", "E" };
	assert_int_equal(csvread_open(&fx->r, td->path, fx->err, sizeof fx->err), 0);
	assert_int_equal(csvread_bind(&fx->r, names, COLS, fx->err, sizeof fx->err), 0);
	unsigned rows = 0;
	int64_t t;
	double v[COLS];
	while (csvread_next(&fx->r, &t, v, COLS) == 1) {
		assert_true(rows < ROWS);
		for (unsigned c = 0; c < COLS; c++)
			if (memcmp(&v[c], &expect[rows][c], sizeof v[c]) != 0)
				fail_msg("row %u column %u: got %.17g, strtod %.17g", rows, c, v[c],
					 expect[rows][c]);
		rows++;
	}
	assert_int_equal(rows, ROWS);
	assert_int_equal(csvread_stats(&fx->r)->cells_text, 0);
	csvread_close(&fx->r);
}

static void test_numbers_equal_strtod_on_random_texts(void **state)
{
	numbers_against_strtod(*state, ',');
}

static void test_decimal_comma_numbers_equal_strtod(void **state)
{
	numbers_against_strtod(*state, ';');
}

/* The edges of the one-pass path, each against strtod: 2^53 and one past
 * it, 19 and 20 digits, 22 and 23 decimals, signed zeros, a lone sign or
 * mark (text), a number followed by blanks. */
static void test_fast_path_edges_equal_strtod(void **state)
{
	struct fixture *fx = *state;
	static const char *const texts[] = {
		"9007199254740992", "9007199254740993", "-9007199254740993", "900719925474099.3",
		"1234567890123456789", "12345678901234567890", "0.1234567890123456789",
		"0.0000000000000000000001", "0.00000000000000000000001", "-0", "-0.0", "+0.",
		"123.", ".5", "1e5", "1.5E-3", "007", "0.30000000000000004", " 2.5 ",
	};
	const unsigned n = sizeof texts / sizeof texts[0];
	struct tmpdir *td = &fx->td;
	tmpdir_make(td, "edges.csv");
	FILE *f = fopen(td->path, "w");
	assert_non_null(f);
	fputs("time,V,W\n", f);
	for (unsigned i = 0; i < n; i++)
		fprintf(f, "%u,%s,%s\n", 1772600760u + i, texts[i], texts[n - 1 - i]);
	assert_int_equal(fclose(f), 0);
	const char *const names[] = { "V", "W" };
	assert_int_equal(csvread_open(&fx->r, td->path, fx->err, sizeof fx->err), 0);
	assert_int_equal(csvread_bind(&fx->r, names, 2, fx->err, sizeof fx->err), 0);
	for (unsigned i = 0; i < n; i++) {
		int64_t t;
		double v[2];
		assert_int_equal(csvread_next(&fx->r, &t, v, 2), 1);
		double a = strtod(texts[i], NULL), b = strtod(texts[n - 1 - i], NULL);
		if (memcmp(&v[0], &a, sizeof a) != 0 || memcmp(&v[1], &b, sizeof b) != 0)
			fail_msg("\"%s\" / \"%s\": got %.17g / %.17g", texts[i], texts[n - 1 - i],
				 v[0], v[1]);
	}
	csvread_close(&fx->r);
}

/* The time column is found by name at any position, in the spreadsheet
 * form, and a historian's text in a value cell is kept. */
static void test_time_column_by_name_and_text_cell(void **state)
{
	struct fixture *fx = *state;
	const char *const names[] = { "U40.PDI401.PV", "U40.FI401.PV" };
	open_bound(fx, "time_named.csv", names, 2);
	expect_row2(fx, T0_MS, 12.5, 1500);
	expect_row2(fx, T0_MS + 1250, NAN, 1510);
	unsigned slot = 9;
	const char *text = NULL;
	csvread_text_at(&fx->r, 0, &slot, &text);
	assert_int_equal(slot, 0);
	assert_string_equal(text, "I/O Timeout");
	expect_end(fx, 2);
}

/* A configured time column name wins; a missing one is named in the error. */
static void test_configured_time_column(void **state)
{
	struct fixture *fx = *state;
	const char *path = FG_CSV_FIXTURES "no_time.csv";
	struct csvread_opts o = { .tz = NULL, .time_column = "STAMP" };
	assert_int_equal(csvread_open_opts(&fx->r, path, &o, fx->err, sizeof fx->err), 0);
	const char *const names[] = { "C3_PDT_101" };
	assert_int_equal(csvread_bind(&fx->r, names, 1, fx->err, sizeof fx->err), 0);
	int64_t t = 0;
	double v = 0;
	assert_int_equal(csvread_next(&fx->r, &t, &v, 1), 1);
	assert_int_equal(t, T0_MS);
	csvread_close(&fx->r);
	o.time_column = "when";
	assert_int_equal(csvread_open_opts(&fx->r, path, &o, fx->err, sizeof fx->err), -EINVAL);
	assert_non_null(strstr(fx->err, "no column \"when\" ([replay] time_column)"));
}

/* Local times in Europe/Berlin across the autumn change: the repeated hour
 * by file order; the spring gap is a malformed row. UTC values from
 * `TZ=Europe/Berlin date -d '2026-10-25 03:00' +%s` = 1792893600 and the
 * offsets +02:00 / +01:00 either side. */
static void test_local_zone_autumn_order_and_spring_gap(void **state)
{
	struct fixture *fx = *state;
	struct tzone z;
	assert_int_equal(tzone_load(&z, "Europe/Berlin", fx->err, sizeof fx->err), 0);
	struct csvread_opts o = { .tz = &z, .time_column = NULL };
	const char *path = FG_CSV_FIXTURES "local_autumn.csv";
	assert_int_equal(csvread_open_opts(&fx->r, path, &o, fx->err, sizeof fx->err), 0);
	const char *const names[] = { "A", "B" };
	assert_int_equal(csvread_bind(&fx->r, names, 2, fx->err, sizeof fx->err), 0);
	const int64_t t3 = 1792893600000LL; /* 03:00 CET = 02:00Z */
	expect_row2(fx, t3 - 90 * 60000LL, 1, 2);  /* 02:30 CEST = 00:30Z */
	expect_row2(fx, t3 - 61 * 60000LL, 3, 4);  /* 02:59 CEST = 00:59Z */
	expect_row2(fx, t3 - 60 * 60000LL, 5, 6);  /* 02:00 CET  = 01:00Z */
	expect_row2(fx, t3 - 30 * 60000LL, 7, 8);  /* 02:30 CET  = 01:30Z */
	expect_row2(fx, t3, 9, 10);
	expect_end(fx, 2);
	const struct csvread_stats *st = csvread_stats(&fx->r);
	assert_int_equal(st->rows_malformed, 1);
	assert_int_equal(st->problems[0].line, 7);
	assert_non_null(strstr(st->problems[0].reason, "daylight-saving gap"));
	csvread_close(&fx->r);
	tzone_free(&z);
}

/* Long form: samples gathered per time stamp, statuses, unbound tags and a
 * late sample. */
static void test_long_form_rows_statuses_and_order(void **state)
{
	struct fixture *fx = *state;
	const char *const names[] = { "U40.PDI401.PV", "U40.FI401.PV" };
	open_bound(fx, "long_status.csv", names, 2);
	assert_true(csvread_is_long(&fx->r));
	expect_row2(fx, T0_MS, 12.5, 1500);
	assert_int_equal(csvread_text_count(&fx->r), 0);
	expect_row2(fx, T0_MS + 1000, NAN, 1510); /* status "Bad Input" */
	unsigned slot = 9;
	const char *text = NULL;
	assert_int_equal(csvread_text_count(&fx->r), 1);
	csvread_text_at(&fx->r, 0, &slot, &text);
	assert_int_equal(slot, 0);
	assert_string_equal(text, "Bad Input");
	expect_row2(fx, T0_MS + 2000, NAN, 1520); /* text in the value cell */
	csvread_text_at(&fx->r, 0, &slot, &text);
	assert_string_equal(text, "Comm Fail");
	expect_row2(fx, T0_MS + 3000, 13, NAN);   /* FI401 has no sample: missing */
	expect_end(fx, 2);
	const struct csvread_stats *st = csvread_stats(&fx->r);
	assert_int_equal(st->rows_returned, 4);
	assert_int_equal(st->samples_unbound, 1); /* TI401 */
	assert_int_equal(st->rows_unsorted, 1);   /* the late 05:06:01 sample */
	assert_int_equal(st->problems[0].line, 9);
}

/* A NUL byte inside a long-form tag cell matches no bound name (it used to
 * read past the end of the name being compared: found by fuzz_csvread). */
static void test_long_form_nul_in_tag_matches_nothing(void **state)
{
	struct fixture *fx = *state;
	const char *const names[] = { "U40.PDI401.PV", "U40.FI401.PV" };
	open_bound(fx, "long_nul_in_tag.csv", names, 2);
	expect_row2(fx, T0_MS, NAN, 1500);
	expect_row2(fx, T0_MS + 1000, 13, 1510);
	expect_end(fx, 2);
	assert_int_equal(csvread_stats(&fx->r)->samples_unbound, 1);
}

static void test_status_words(void **state)
{
	(void)state;
	assert_true(csvread_status_is_good("", 0));
	assert_true(csvread_status_is_good(" Good ", 6));
	assert_true(csvread_status_is_good("OK", 2));
	assert_true(csvread_status_is_good("192", 3));
	assert_false(csvread_status_is_good("Bad", 3));
	assert_false(csvread_status_is_good("Uncertain", 9));
	assert_false(csvread_status_is_good("Good Local Override", 19));
}

/* A name the header lacks reads as missing when bound with bind_some. */
static void test_bind_some_reports_missing_columns(void **state)
{
	struct fixture *fx = *state;
	const char *path = FG_CSV_FIXTURES "good_comma.csv";
	assert_int_equal(csvread_open(&fx->r, path, fx->err, sizeof fx->err), 0);
	const char *const names[] = { "C3_PDT_101", "NOPE" };
	bool found[2] = { false, true };
	assert_int_equal(csvread_bind_some(&fx->r, names, 2, found, fx->err, sizeof fx->err), 0);
	assert_true(found[0]);
	assert_false(found[1]);
	expect_row2(fx, T0_MS, 12.5, NAN);
}

/* A long file several times the read buffer: samples gathered into rows
 * across buffer refills (the held-back first sample of the next time stamp
 * included), one row in memory. 3 tags in a rotating order, 120 000 time
 * stamps every 0.25 s; tag B is missing every 7th stamp and "Bad" every
 * 11th; values are integers, compared exactly. */
static void test_long_file_across_buffer_refills(void **state)
{
	struct fixture *fx = *state;
	struct tmpdir *td = &fx->td;
	tmpdir_make(td, "long.csv");
	FILE *f = fopen(td->path, "w");
	assert_non_null(f);
	const unsigned n = 120000;
	fputs("Tag;Time;Value;Status\n", f);
	for (unsigned i = 0; i < n; i++) {
		char ts[TIMEFMT_BUF_SIZE];
		assert_true(timefmt_format(T0_MS + (int64_t)i * 250, ts, sizeof ts) > 0);
		for (unsigned k = 0; k < 3; k++) {
			unsigned tag = (i + k) % 3;
			if (tag == 1 && i % 7 == 0)
				continue;
			const char *status = tag == 1 && i % 11 == 0 ? "Bad" : "Good";
			fprintf(f, "%c;%s;%u;%s\n", 'A' + tag, ts, i * 3 + tag, status);
		}
	}
	assert_int_equal(fclose(f), 0);
	const char *const names[] = { "A", "B", "C" };
	assert_int_equal(csvread_open(&fx->r, td->path, fx->err, sizeof fx->err), 0);
	assert_true(csvread_is_long(&fx->r));
	assert_int_equal(csvread_bind(&fx->r, names, 3, fx->err, sizeof fx->err), 0);
	unsigned rows = 0, bad = 0, wrong = 0;
	int64_t t;
	double v[3];
	while (csvread_next(&fx->r, &t, v, 3) == 1) {
		unsigned i = rows++;
		wrong += t != T0_MS + (int64_t)i * 250;
		wrong += v[0] != (double)(i * 3) || v[2] != (double)(i * 3 + 2);
		if (i % 7 == 0 || i % 11 == 0) {
			wrong += !isnan(v[1]);
			wrong += csvread_text_count(&fx->r) != (i % 7 != 0 && i % 11 == 0);
			bad += csvread_text_count(&fx->r);
		} else {
			wrong += v[1] != (double)(i * 3 + 1) || csvread_text_count(&fx->r) != 0;
		}
	}
	uint64_t done, total;
	csvread_progress(&fx->r, &done, &total);
	assert_true(total > 4u * CSVREAD_BUF_SIZE); /* several refills */
	assert_int_equal(rows, n);
	assert_int_equal(wrong, 0);
	/* "Bad" on stamps divisible by 11 but not 7: 10910 - 1559 = 9351. */
	assert_int_equal(bad, n / 11 + 1 - (n / 77 + 1));
	assert_int_equal(csvread_stats(&fx->r)->rows_malformed, 0);
	csvread_close(&fx->r);
}

int main(void)
{
#define T(f) cmocka_unit_test_setup_teardown(f, setup, teardown)
	const struct CMUnitTest tests[] = {
		T(test_good_comma_file_reads_values_in_bind_order),
		T(test_third_column_and_exponent_negative),
		T(test_times_read_from_the_last_text_equal_a_full_parse),
		T(test_semicolon_file_accepts_decimal_comma),
		T(test_bom_and_crlf_are_handled),
		T(test_epoch_seconds_with_fractions),
		T(test_fractional_seconds_round_to_ms),
		T(test_truncated_last_line_is_skipped_and_counted),
		T(test_complete_last_line_without_newline_is_used),
		T(test_malformed_rows_are_skipped_with_line_numbers),
		T(test_numbers_are_correctly_rounded),
		T(test_numbers_equal_strtod_on_random_texts),
		T(test_decimal_comma_numbers_equal_strtod),
		T(test_fast_path_edges_equal_strtod),
		T(test_missing_tag_is_an_error_naming_tag_and_file),
		T(test_unsorted_and_duplicate_times_are_skipped),
		T(test_empty_file_is_an_error),
		T(test_header_only_opens_and_has_no_rows),
		T(test_very_long_line_is_skipped_and_counted),
		T(test_quoted_header_and_fields),
		T(test_header_without_time_is_an_error),
		T(test_duplicate_header_names_are_an_error),
		T(test_missing_file_and_directory_are_errors),
		T(test_close_accepts_unopened_and_closed_readers),
		T(test_progress_counts_bytes_to_file_size),
		T(test_line_of_exactly_line_max_is_accepted),
		T(test_stdin_pipe_is_read_with_unknown_total),
		T(test_mutated_input_never_breaks_the_counters),
		T(test_large_generated_file_sums_match),
		T(test_time_column_by_name_and_text_cell),
		T(test_configured_time_column),
		T(test_local_zone_autumn_order_and_spring_gap),
		T(test_long_form_rows_statuses_and_order),
		T(test_long_form_nul_in_tag_matches_nothing),
		T(test_status_words),
		T(test_bind_some_reports_missing_columns),
		T(test_long_file_across_buffer_refills),
	};
#undef T
	return cmocka_run_group_tests_name("csvread", tests, NULL, NULL);
}
