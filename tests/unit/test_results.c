/*
 * test_results.c - results.csv rows: the replay's writer (chunks, an output
 * block, a thread of its own or not) writes the same bytes as
 * results_write_row, row for row (numbers repeated down a column and
 * across a row included: the writer reuses their text), and reports a
 * failed write.
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>

#include <cmocka.h>
#include <errno.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "config.h"
#include "results.h"
#include "section.h"
#include "timefmt.h"

static uint64_t rng = 0x2545f4914f6cdd1du;

static uint64_t next_u64(void)
{
	rng ^= rng >> 12;
	rng ^= rng << 25;
	rng ^= rng >> 27;
	return rng * 2685821657736338717u;
}

/* A value as results hold them: mostly ordinary, some empty (NaN), some
 * repeating the last row's (the writer's column cache), some far out of
 * the formatter's fast range, some negative zero. */
static double pick_value(double prev)
{
	unsigned k = (unsigned)(next_u64() % 20u);
	double mant = (double)(next_u64() >> 11) * 0x1p-53;
	switch (k) {
	case 0: return NAN;
	case 1: return -0.0;
	case 2: return mant * 1e-200;
	case 3: return -mant * 1e150;
	case 4: case 5: case 6: case 7: case 8: return prev;
	default: return (next_u64() & 1 ? 1.0 : -1.0) * mant * pow(10.0, (double)(k % 9) - 3.0);
	}
}

/* The config at path, and a cleared result for each of its sections with
 * rp[s] pointing at it. */
static struct fg_config *load_with_results(const char *path, struct section_result *res,
					   const struct section_result **rp)
{
	struct fg_config *cfg = malloc(sizeof *cfg);
	assert_non_null(cfg);
	assert_int_equal(config_load(cfg, path, stderr), 0);
	for (unsigned s = 0; s < cfg->section_count; s++) {
		result_clear(&res[s]);
		rp[s] = &res[s];
	}
	return cfg;
}

/* The next row's time: a second or 250 ms on, or (jumpy) now and then
 * over midnight, back an hour, or anywhere from year 0 to 9999 (the
 * writer formats each day's date once and must notice every change). */
static int64_t next_time(int64_t t_ms, bool jumpy)
{
	unsigned k = (unsigned)(next_u64() % 16u);
	if (!jumpy || k >= 6)
		return t_ms + (next_u64() % 4u == 0 ? 250 : 1000);
	int64_t day = 86400000;
	int64_t next = t_ms;
	switch (k) {
	case 0: next = (t_ms / day + 1) * day - 1 - (int64_t)(next_u64() % 2000u); break;
	case 1: next = t_ms + day * (int64_t)(next_u64() % 400u); break;
	case 2: next = t_ms - 3600000; break;
	case 3: next = t_ms - day * (int64_t)(next_u64() % 30u) - 1; break;
	default:
		next = TIMEFMT_MIN_MS +
		       (int64_t)(next_u64() % (uint64_t)(TIMEFMT_MAX_MS - TIMEFMT_MIN_MS + 1));
		break;
	}
	return next < TIMEFMT_MIN_MS || next > TIMEFMT_MAX_MS ? t_ms + 1000 : next;
}

/* rows random rows for cfg, through results_write_row and through the
 * writer (threaded or not); the two texts must be equal. */
static void compare_writers_rows(const char *cfg_path, unsigned rows, bool threaded, bool jumpy,
				 unsigned steady_from)
{
	static struct section_result res[FG_SECTIONS_MAX];
	const struct section_result *rp[FG_SECTIONS_MAX];
	struct fg_config *cfg = load_with_results(cfg_path, res, rp);
	char *a_text = NULL, *b_text = NULL;
	size_t a_len = 0, b_len = 0;
	FILE *a = open_memstream(&a_text, &a_len);
	FILE *b = open_memstream(&b_text, &b_len);
	assert_non_null(a);
	assert_non_null(b);
	static struct results_writer w;
	assert_int_equal(results_writer_start(&w, b, cfg, threaded), 0);
	int64_t t_ms = 1767225600000; /* 2026-01-01 */
	for (unsigned r = 0; r < rows; r++) {
		for (unsigned s = 0; s < cfg->section_count && r < steady_from; s++) {
			for (int i = 0; i < RF_COUNT; i++)
				res[s].v[i] = pick_value(res[s].v[i]);
			for (int k = 0; k < 4; k++) { /* the same number in other columns of the row */
				unsigned s2 = (unsigned)(next_u64() % cfg->section_count);
				res[s].v[next_u64() % RF_COUNT] = res[s2].v[next_u64() % RF_COUNT];
			}
			res[s].basis = (enum flood_basis)(next_u64() % FLOOD_BASIS_COUNT);
			res[s].regime = (enum bubble_regime)(next_u64() % BUBBLE_REGIME_COUNT);
			res[s].quality = (enum fg_quality)(next_u64() % 3u);
			res[s].extrap.count = (unsigned)(next_u64() % 2u);
		}
		t_ms = next_time(t_ms, jumpy); /* some times with milliseconds */
		assert_int_equal(results_write_row(a, cfg, t_ms, rp), 0);
		assert_int_equal(results_writer_row(&w, t_ms, rp), 0);
	}
	assert_int_equal(results_writer_finish(&w), 0);
	fclose(a);
	fclose(b);
	assert_true(a_len > (size_t)rows * 20u);
	assert_int_equal(a_len, b_len);
	assert_memory_equal(a_text, b_text, a_len);
	free(a_text);
	free(b_text);
	free(cfg);
}

static void compare_writers_times(const char *cfg_path, unsigned rows, bool threaded,
				  bool jumpy)
{
	compare_writers_rows(cfg_path, rows, threaded, jumpy, rows);
}

static void compare_writers(const char *cfg_path, unsigned rows, bool threaded)
{
	compare_writers_times(cfg_path, rows, threaded, false);
}

/* Every number held from row 3 on for thousands of rows: the output block
 * is written out several times while each column repeats its text (the
 * writer must not reuse text from a block already written out). */
static void test_writer_repeats_held_numbers_across_blocks(void **state)
{
	(void)state;
	compare_writers_rows("configs/demo.ini", 6000, false, false, 3);
	compare_writers_rows("configs/demo-contactors.ini", 6000, true, false, 3);
}

/* Times that jump over midnight, back, and across the whole range (year
 * 0000 to 9999, leap days, negative t_ms): the same text as
 * timefmt_format gives, in either mode. */
static void test_writer_writes_any_time_as_timefmt_does(void **state)
{
	(void)state;
	compare_writers_times("configs/demo.ini", 6000, false, true);
	compare_writers_times("configs/demo.ini", 3000, true, true);
}

/* Enough rows to fill every chunk of the queue several times over and the
 * output block more than once; every section type (contactors config). */
static void test_writer_in_one_thread_writes_what_write_row_writes(void **state)
{
	(void)state;
	compare_writers("configs/demo.ini", 5000, false);
	compare_writers("configs/demo-contactors.ini", 3000, false);
}

static void test_writer_thread_writes_what_write_row_writes(void **state)
{
	(void)state;
	compare_writers("configs/demo.ini", 5000, true);
	compare_writers("configs/demo-contactors.ini", 3000, true);
}

/* A full disk: the error comes back from a later row or from finish, as a
 * negative errno, in either mode, and nothing hangs. */
static void test_writer_reports_a_failed_write(void **state)
{
	(void)state;
	static struct section_result res[FG_SECTIONS_MAX];
	const struct section_result *rp[FG_SECTIONS_MAX];
	struct fg_config *cfg = load_with_results("configs/demo.ini", res, rp);
	for (unsigned s = 0; s < cfg->section_count; s++)
		for (int i = 0; i < RF_COUNT; i++)
			res[s].v[i] = 1.0 / (i + 3.0);
	for (int threaded = 0; threaded <= 1; threaded++) {
		FILE *f = fopen("/dev/full", "w");
		if (f == NULL)
			skip();
		static struct results_writer w;
		assert_int_equal(results_writer_start(&w, f, cfg, threaded != 0), 0);
		int rc = 0;
		for (unsigned r = 0; r < 20000 && rc == 0; r++)
			rc = results_writer_row(&w, 1767225600000 + 1000 * (int64_t)r, rp);
		int fin = results_writer_finish(&w);
		assert_true(rc < 0 || fin < 0);
		assert_int_equal(fin, -ENOSPC);
		fclose(f);
	}
	free(cfg);
}

/* A time outside the years 0000..9999 is refused at once, as
 * results_write_row refuses it. */
static void test_writer_refuses_a_time_it_cannot_write(void **state)
{
	(void)state;
	static struct section_result res[FG_SECTIONS_MAX];
	const struct section_result *rp[FG_SECTIONS_MAX];
	struct fg_config *cfg = load_with_results("configs/demo.ini", res, rp);
	char *text = NULL;
	size_t len = 0;
	FILE *f = open_memstream(&text, &len);
	assert_non_null(f);
	static struct results_writer w;
	assert_int_equal(results_writer_start(&w, f, cfg, false), 0);
	assert_int_equal(results_writer_row(&w, TIMEFMT_MAX_MS + 1, rp), -EINVAL);
	assert_int_equal(results_write_row(f, cfg, TIMEFMT_MAX_MS + 1, rp), -EINVAL);
	assert_int_equal(results_writer_row(&w, 0, rp), 0);
	assert_int_equal(results_writer_finish(&w), 0);
	fclose(f);
	/* demo.ini's four sections, every number empty, no flood basis */
	assert_string_equal(text, "1970-01-01T00:00:00Z,,,,,,,,,,,,,,,,,,,,,,,good,false"
				  ",,,,,,,,,,,,,,,,,,,,good,false"
				  ",,,,,,,,,,,,,,,,good,false"
				  ",,,,,,,,,,,,,,,,,,,,good,false\n");
	free(text);
	free(cfg);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_writer_in_one_thread_writes_what_write_row_writes),
		cmocka_unit_test(test_writer_thread_writes_what_write_row_writes),
		cmocka_unit_test(test_writer_writes_any_time_as_timefmt_does),
		cmocka_unit_test(test_writer_repeats_held_numbers_across_blocks),
		cmocka_unit_test(test_writer_reports_a_failed_write),
		cmocka_unit_test(test_writer_refuses_a_time_it_cannot_write),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
