/*
 * test_suggest.c - "did you mean" (monitor/suggest.c).
 *
 * Distances are the optimal-string-alignment edit distance, worked by hand
 * for each pair (e.g. "fozen_s" -> "frozen_s": one insertion); exact.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <string.h>

#include "suggest.h"

static void test_distance_counts_edits_and_swaps(void **state)
{
	(void)state;
	assert_int_equal(suggest_distance("frozen_s", "frozen_s"), 0);
	assert_int_equal(suggest_distance("fozen_s", "frozen_s"), 1);   /* insert r */
	assert_int_equal(suggest_distance("frozne_s", "frozen_s"), 1);  /* swap n,e */
	assert_int_equal(suggest_distance("frizen_s", "frozen_s"), 1);  /* substitute */
	assert_int_equal(suggest_distance("Frozen_S", "frozen_s"), 0);  /* case ignored */
	assert_int_equal(suggest_distance("", "abc"), 3);
	assert_int_equal(suggest_distance("kitten", "sitting"), 3);     /* the textbook pair */
}

static void test_best_is_close_enough_or_nothing(void **state)
{
	(void)state;
	static const char *const keys[] = {"stale_periods", "frozen_s", "frozen_tolerance",
					   "span_m", "zero_m", NULL};
	assert_string_equal(suggest_in_list("frozen", keys), "frozen_s");
	assert_string_equal(suggest_in_list("stale_period", keys), "stale_periods");
	assert_string_equal(suggest_in_list("spam_m", keys), "span_m");
	assert_null(suggest_in_list("pressure", keys));   /* nothing near */
	assert_null(suggest_in_list("frozen_s", keys));   /* exact: nothing to suggest */
	/* Short words allow one edit only: "ab" is not "span_m". */
	assert_null(suggest_in_list("ab", keys));
	char buf[64];
	assert_string_equal(suggest_text("C401", buf, sizeof buf), " (did you mean 'C401'?)");
	assert_string_equal(suggest_text(NULL, buf, sizeof buf), "");
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_distance_counts_edits_and_swaps),
		cmocka_unit_test(test_best_is_close_enough_or_nothing),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
