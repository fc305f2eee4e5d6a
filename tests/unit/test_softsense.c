/*
 * test_softsense.c - the soft sensors of softsense.c on synthetic signals
 * with known answers.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <string.h>

#include "softsense.h"

static struct softsense_input steady_input(double gas, double dp, double model)
{
	struct softsense_input in;
	memset(&in, 0, sizeof(in));
	in.gas_kgs = gas;
	in.dp_pa = dp;
	in.dp_model_pa = model;
	in.f_factor = gas;
	in.liquid_in_kgs = in.liquid_out_kgs = in.level_m = NAN;
	in.normal = true;
	return in;
}

static void test_correction_learns_the_plant_ratio_in_steady_operation(void **state)
{
	(void)state;
	struct softsense s;
	struct section_result r;
	softsense_init(&s);
	result_clear(&r);
	struct softsense_input in = steady_input(5.0, 1200.0, 1000.0);
	for (int i = 0; i < 6 * 3600; i++)
		softsense_step(&s, &in, (int64_t)i * 1000, &r);
	/* After 6 h = 12 time constants of 1800 s the fit is within e^-12 of 1.2
	 * (first-order convergence), bar the few minutes before "steady". */
	assert_true(fabs(r.v[RF_DP_CORRECTION] - 1.2) < 1e-3);
}

static void test_correction_is_frozen_outside_normal_operation(void **state)
{
	(void)state;
	struct softsense s;
	struct section_result r;
	softsense_init(&s);
	result_clear(&r);
	struct softsense_input in = steady_input(5.0, 1500.0, 1000.0);
	in.normal = false; /* e.g. near flood: must not learn the flood as "the plant" */
	for (int i = 0; i < 3600; i++)
		softsense_step(&s, &in, (int64_t)i * 1000, &r);
	assert_true(r.v[RF_DP_CORRECTION] == 1.0);
}

static void test_correction_is_bounded(void **state)
{
	(void)state;
	struct softsense s;
	struct section_result r;
	softsense_init(&s);
	result_clear(&r);
	struct softsense_input in = steady_input(5.0, 9000.0, 1000.0); /* a broken transmitter */
	for (int i = 0; i < 24 * 3600; i++)
		softsense_step(&s, &in, (int64_t)i * 1000, &r);
	assert_true(r.v[RF_DP_CORRECTION] == SOFTSENSE_CORR_MAX);
}

static void test_slope_recovers_the_exponent_when_load_moves(void **state)
{
	(void)state;
	struct softsense s;
	struct section_result r;
	softsense_init(&s);
	result_clear(&r);
	/* DP = c F^1.8 with F swinging +-15 % over 10 min: RLS must find 1.8. */
	for (int i = 0; i < 3600; i++) {
		double f = 2.0 * (1.0 + 0.15 * sin(2.0 * M_PI * i / 600.0));
		struct softsense_input in = steady_input(f, 300.0 * pow(f, 1.8), NAN);
		in.normal = false;
		softsense_step(&s, &in, (int64_t)i * 1000, &r);
	}
	assert_true(isfinite(r.v[RF_DP_SLOPE]));
	assert_true(fabs(r.v[RF_DP_SLOPE] - 1.8) < 1e-3); /* noise-free data: exact fit */
}

static void test_slope_is_undefined_when_load_is_flat(void **state)
{
	(void)state;
	struct softsense s;
	struct section_result r;
	softsense_init(&s);
	result_clear(&r);
	for (int i = 0; i < 3600; i++) {
		double f = 2.0 * (1.0 + 0.002 * sin(i / 30.0));
		struct softsense_input in = steady_input(f, 300.0 * f * f, NAN);
		softsense_step(&s, &in, (int64_t)i * 1000, &r);
	}
	assert_true(isnan(r.v[RF_DP_SLOPE]));
}

static void test_noise_ratio_rises_when_dp_gets_noisier(void **state)
{
	(void)state;
	struct softsense s;
	struct section_result r;
	softsense_init(&s);
	result_clear(&r);
	uint64_t x = 88172645463325252ull;
	for (int i = 0; i < 4 * 3600; i++) {
		x ^= x << 13, x ^= x >> 7, x ^= x << 17; /* xorshift64 */
		double u = (double)(x >> 11) / 9007199254740992.0 - 0.5;
		bool late = i >= 3 * 3600;
		double dp = 1000.0 * (1.0 + (late ? 0.06 : 0.01) * u);
		struct softsense_input in = steady_input(5.0, dp, NAN);
		in.normal = !late;
		softsense_step(&s, &in, (int64_t)i * 1000, &r);
		/* A standard deviation from n = 60 samples scatters by about
		 * 1/sqrt(2(n-1)) = 9 % (normal-theory result, from memory; close
		 * enough for uniform noise), so the ratio to a long baseline stays
		 * within +-0.5 of 1 with a margin of over 5 sigma. */
		if (i == 3 * 3600 - 1)
			assert_true(fabs(r.v[RF_DP_NOISE_RATIO] - 1.0) < 0.5);
	}
	/* Six times the noise: the expected ratio is 6; with the same 9 % scatter
	 * of one window, above 3.5 leaves over 4 sigma, and a ratio near 1 (no
	 * response) fails. */
	assert_true(r.v[RF_DP_NOISE_RATIO] > 3.5);
}

static void test_inventory_balances_flows_and_sump_level(void **state)
{
	(void)state;
	struct softsense s;
	struct section_result r;
	softsense_init(&s);
	result_clear(&r);
	/* In 10 kg/s, out 9 kg/s, rho 1000: 1e-3 m3/s accumulates. Sump 2 m2
	 * rises 0.2e-3 m/s: 0.4e-3 m3/s of it is in the sump, 0.6e-3 m3/s in
	 * the column. After 1000 s: 0.6 m3 held in the section. */
	for (int i = 0; i <= 1000; i++) {
		struct softsense_input in = steady_input(5.0, NAN, NAN);
		in.liquid_in_kgs = 10.0;
		in.liquid_out_kgs = 9.0;
		in.rho_l_kgm3 = 1000.0;
		in.sump_area_m2 = 2.0;
		in.level_m = 1.0 + 0.2e-3 * i;
		softsense_step(&s, &in, (int64_t)i * 1000, &r);
	}
	assert_true(fabs(r.v[RF_INVENTORY_M3] - 0.6) < 1e-9);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_correction_learns_the_plant_ratio_in_steady_operation),
		cmocka_unit_test(test_correction_is_frozen_outside_normal_operation),
		cmocka_unit_test(test_correction_is_bounded),
		cmocka_unit_test(test_slope_recovers_the_exponent_when_load_moves),
		cmocka_unit_test(test_slope_is_undefined_when_load_is_flat),
		cmocka_unit_test(test_noise_ratio_rises_when_dp_gets_noisier),
		cmocka_unit_test(test_inventory_balances_flows_and_sump_level),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
