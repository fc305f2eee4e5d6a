/*
 * test_numfmt.c - numbers in full for machines, rounded for people.
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>

#include <cmocka.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>

#include "numfmt.h"

/* Every double reads back exactly, in the fewest of 15..17 digits. */
static void test_full_round_trips(void **state)
{
	(void)state;
	const double v[] = {0.1, 1.0 / 3.0, 78.627212345678, 1e-300, -2.5e17, 101325.0,
			    21.7f, 0.30000000000000004};
	for (size_t i = 0; i < sizeof v / sizeof v[0]; i++) {
		char b[NUMFMT_FULL_SIZE];
		numfmt_full(v[i], b, sizeof b);
		assert_true(strtod(b, NULL) == v[i]);
	}
	char b[NUMFMT_FULL_SIZE];
	numfmt_full(0.1, b, sizeof b);
	assert_string_equal(b, "0.1");
	numfmt_full(1.0 / 3.0, b, sizeof b);
	assert_string_equal(b, "0.3333333333333333"); /* 16 digits suffice */
	numfmt_full(-0.0, b, sizeof b);
	assert_string_equal(b, "0");
}

static void test_human_rounds_percent_to_a_tenth(void **state)
{
	(void)state;
	char b[NUMFMT_FULL_SIZE];
	numfmt_human(78.6272, "%", b, sizeof b);
	assert_string_equal(b, "78.6");
	numfmt_human(1234.567, "Pa", b, sizeof b);
	assert_string_equal(b, "1235");
	numfmt_human(0.0423117, "-", b, sizeof b);
	assert_string_equal(b, "0.04231");
	numfmt_human(-0.01, "%", b, sizeof b);
	assert_string_equal(b, "0.0");
	numfmt_human(NAN, "%", b, sizeof b);
	assert_string_equal(b, "-");
}

static void test_duration_is_h_mm_ss(void **state)
{
	(void)state;
	char b[NUMFMT_DURATION_SIZE];
	numfmt_duration(0.0, b, sizeof b);
	assert_string_equal(b, "0:00:00");
	numfmt_duration(59.6, b, sizeof b);
	assert_string_equal(b, "0:01:00");
	numfmt_duration(3723.0, b, sizeof b);
	assert_string_equal(b, "1:02:03");
	numfmt_duration(90000.0, b, sizeof b); /* 25 h: hours are not wrapped into days */
	assert_string_equal(b, "25:00:00");
	numfmt_duration(-61.0, b, sizeof b);
	assert_string_equal(b, "-0:01:01");
	numfmt_duration(INFINITY, b, sizeof b);
	assert_string_equal(b, "-");
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_full_round_trips),
		cmocka_unit_test(test_human_rounds_percent_to_a_tenth),
		cmocka_unit_test(test_duration_is_h_mm_ss),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
