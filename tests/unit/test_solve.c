/*
 * test_solve.c - the bracketed root finder with a warm start (models/solve.c).
 *
 * Check values are closed forms (roots of x^3 - 2, ln x - 1, tanh), so the
 * tolerances are the solver's own: 1e-13 absolute in x as asked, with
 * 2 DBL_EPSILON |x| on top (Brent's termination test).
 */
#include <float.h>
#include <math.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>

#include <cmocka.h>

#include "solve.h"

static double cubic(double x, const void *ctx)
{
	(void)ctx;
	return x * x * x - 2.0;
}

static double falling_log(double x, const void *ctx)
{
	(void)ctx;
	return 1.0 - log(x);
}

/* +inf beyond a wall at x = 3, as the Stichlmair residual is past h_T = eps. */
static double walled(double x, const void *ctx)
{
	(void)ctx;
	return x >= 3.0 ? INFINITY : x - 2.5;
}

static double shifted_tanh(double x, const void *ctx)
{
	return tanh(x - *(const double *)ctx);
}

static void test_brent_finds_cube_root_of_two(void **state)
{
	(void)state;
	int evals = 0;
	double r = solve_brent(cubic, NULL, 0.0, -2.0, 3.0, 25.0, 1e-13, &evals);
	assert_true(fabs(r - cbrt(2.0)) <= 1e-13 + 2 * DBL_EPSILON * 2.0);
	assert_true(evals < 20); /* superlinear: bisection alone needs 45 */
}

static void test_brent_bisects_past_an_infinite_end(void **state)
{
	(void)state;
	double r = solve_brent(walled, NULL, 0.0, -2.5, 10.0, INFINITY, 1e-13, NULL);
	assert_true(fabs(r - 2.5) <= 1e-12);
}

static void test_warm_start_close_to_root_needs_few_evaluations(void **state)
{
	(void)state;
	int evals = 0;
	double r = solve_warm(falling_log, NULL, 1e-3, INFINITY, 1e3, -INFINITY, false,
			      exp(1.0) * 1.0001, 1e-3, 1e-13, &evals);
	assert_true(fabs(r - exp(1.0)) <= 1e-12);
	assert_true(evals <= 10);
}

static void test_warm_start_far_away_falls_back_to_whole_bracket(void **state)
{
	(void)state;
	/* The root is at 40; 12 doubling steps of 1e-3 from 1 reach 1 + 8.2. */
	double at = 40.0;
	double r;
	assert_false(solve_near(shifted_tanh, &at, -100.0, 100.0, true, 1.0, 1e-3, 1e-13, &r,
				NULL));
	r = solve_warm(shifted_tanh, &at, -100.0, -1.0, 100.0, 1.0, true, 1.0, 1e-3, 1e-13, NULL);
	assert_true(fabs(r - 40.0) <= 1e-12);
}

static void test_no_guess_is_the_cold_solve(void **state)
{
	(void)state;
	double r;
	assert_false(solve_near(cubic, NULL, 0.0, 3.0, true, NAN, 1e-3, 1e-13, &r, NULL));
	assert_false(solve_near(cubic, NULL, 0.0, 3.0, true, 7.0, 1e-3, 1e-13, &r, NULL));
	r = solve_warm(cubic, NULL, 0.0, -2.0, 3.0, 25.0, true, NAN, 1e-3, 1e-13, NULL);
	assert_true(fabs(r - cbrt(2.0)) <= 1e-12);
}

static void test_warm_start_steps_towards_the_root_on_both_sides(void **state)
{
	(void)state;
	double at = 0.5, r;
	assert_true(solve_near(shifted_tanh, &at, -10.0, 10.0, true, 0.45, 1e-3, 1e-13, &r, NULL));
	assert_true(fabs(r - 0.5) <= 1e-12);
	assert_true(solve_near(shifted_tanh, &at, -10.0, 10.0, true, 0.55, 1e-3, 1e-13, &r, NULL));
	assert_true(fabs(r - 0.5) <= 1e-12);
	/* A guess on the root itself is the answer. */
	assert_true(solve_near(shifted_tanh, &at, -10.0, 10.0, true, 0.5, 1e-3, 1e-13, &r, NULL));
	assert_true(r == 0.5);
}

static void test_secant_along_the_last_slope_converges_and_keeps_the_slope(void **state)
{
	(void)state;
	double slope = NAN, r;
	assert_true(solve_secant(cubic, NULL, 0.0, 3.0, 1.3, &slope, 1e-3, 1e-13, &r));
	assert_true(fabs(r - cbrt(2.0)) <= 1e-12);
	assert_true(fabs(slope - 3.0 * cbrt(4.0)) < 1e-3); /* f' = 3 x^2 at the root */
	/* With the slope kept, the next (moved) root is found from it. */
	double at = 0.52;
	slope = 1.0; /* tanh' at its root */
	assert_true(solve_secant(shifted_tanh, &at, -10.0, 10.0, 0.5, &slope, 1e-3, 1e-13, &r));
	assert_true(fabs(r - 0.52) <= 1e-12);
}

static void test_secant_gives_up_outside_the_range_or_without_a_guess(void **state)
{
	(void)state;
	double slope = NAN, r = -1.0;
	assert_false(solve_secant(cubic, NULL, 0.0, 3.0, NAN, &slope, 1e-3, 1e-13, &r));
	/* A slope pointing the wrong way sends the first step out of range. */
	slope = -1e-6;
	assert_false(solve_secant(cubic, NULL, 0.0, 3.0, 1.3, &slope, 1e-3, 1e-13, &r));
	/* An infinite value (beyond a wall) is not stepped over. */
	slope = NAN;
	assert_false(solve_secant(walled, NULL, 0.0, 10.0, 3.5, &slope, 1e-3, 1e-13, &r));
	assert_true(r == -1.0);
}

static void test_warm_clear_sets_every_memory_cold(void **state)
{
	(void)state;
	struct solve_warm w;
	w.stich_flood_ln_u = 1.0;
	w.bubble_ay_eps = 0.1;
	solve_warm_clear(&w);
	assert_true(isnan(w.stich_flood_ln_u));
	assert_true(isnan(w.stich_flood_ln_t));
	assert_true(isnan(w.stich_wet_ln_y));
	assert_true(isnan(w.stich_wet_ln_t));
	assert_true(isnan(w.bs_flood_h));
	assert_true(isnan(w.tray_flood_ln_gas));
	assert_true(isnan(w.tray_flood_slope));
	assert_true(isnan(w.stich_flood_slope));
	assert_true(isnan(w.spray_vt_ln_re[0]));
	assert_true(isnan(w.spray_vt_ln_re[1]));
	assert_true(isnan(w.spray_crit_ln_re[0]));
	assert_true(isnan(w.bubble_ay_eps));
}

/* The Newton and Halley stopping rules: a step within the tolerance stops;
 * otherwise only a small, shrinking step whose estimated remaining error
 * (K step^2 or K step^3, K from the last two steps) is below tol/10. */
static void test_newton_and_halley_stopping(void **state)
{
	(void)state;
	assert_true(solve_newton_done(1e-13, NAN, 1e-12));
	assert_true(solve_newton_done(-1e-13, NAN, 1e-12));
	assert_false(solve_newton_done(1e-9, NAN, 1e-12));      /* no history */
	assert_true(solve_newton_done(1e-8, 1e-4, 1e-12));      /* K 1: 1e-16 left */
	assert_false(solve_newton_done(1e-7, 1e-6, 1e-12));     /* K 1e5: 1e-9 left */
	assert_false(solve_newton_done(2e-6, 1e-3, 1e-12));     /* not yet below 1e-6 */
	assert_false(solve_newton_done(1e-8, 1e-8, 1e-12));     /* not shrinking */
	assert_true(solve_halley_done(1e-6, 1e-2, 1e-12));      /* K 1: 1e-24 left */
	assert_false(solve_halley_done(1e-5, 2e-5, 1e-12));     /* K 1.25e9: 1e-6 left */
	assert_false(solve_halley_done(2e-4, 1e-1, 1e-12));     /* not yet below 1e-4 */
	assert_true(solve_halley_done(5e-13, NAN, 1e-12));
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_brent_finds_cube_root_of_two),
		cmocka_unit_test(test_brent_bisects_past_an_infinite_end),
		cmocka_unit_test(test_warm_start_close_to_root_needs_few_evaluations),
		cmocka_unit_test(test_warm_start_far_away_falls_back_to_whole_bracket),
		cmocka_unit_test(test_no_guess_is_the_cold_solve),
		cmocka_unit_test(test_warm_start_steps_towards_the_root_on_both_sides),
		cmocka_unit_test(test_secant_along_the_last_slope_converges_and_keeps_the_slope),
		cmocka_unit_test(test_secant_gives_up_outside_the_range_or_without_a_guess),
		cmocka_unit_test(test_warm_clear_sets_every_memory_cold),
		cmocka_unit_test(test_newton_and_halley_stopping),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
