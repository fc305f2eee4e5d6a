/*
 * test_gas.c - gas density, rho = p M / (Z R T).
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>

#include "gas.h"

static void test_air_at_sea_level_matches_standard_atmosphere(void **state)
{
	(void)state;
	/* U.S. Standard Atmosphere 1976, sea level (from memory): 101 325 Pa,
	 * 288.15 K, M0 = 28.9644 kg/kmol, rho = 1.2250 kg/m3. Tolerance:
	 * 0.5e-4 for the 4-decimal rounding of the table plus 2.1e-5 because
	 * the 1976 standard used R* = 8314.32 J/(kmol K), 1.7e-5 relative below
	 * CODATA 2018's 8314.4626 used here: 7.1e-5 kg/m3. */
	double rho = gas_density_kgm3(101325.0, 288.15, 28.9644, 1.0, NULL);
	assert_true(fabs(rho - 1.2250) <= 7.1e-5);
}

static void test_density_scales_with_pressure_and_inverse_temperature(void **state)
{
	(void)state;
	double base = gas_density_kgm3(2.0e5, 300.0, 44.0, 1.0, NULL);
	/* p M / (R T) = 2e5 * 44 / (8314.462618 * 300), evaluated with /usr/bin/python3;
	 * tolerance 1e-7 covers the rounding of the check value to 8 digits. */
	assert_true(fabs(base - 3.5279891) <= 1e-7);
	assert_true(fabs(gas_density_kgm3(4.0e5, 300.0, 44.0, 1.0, NULL) - 2.0 * base) <= 1e-12);
	assert_true(fabs(gas_density_kgm3(2.0e5, 600.0, 44.0, 1.0, NULL) - 0.5 * base) <= 1e-12);
}

static void test_compressibility_divides_density(void **state)
{
	(void)state;
	double ideal = gas_density_kgm3(3.0e6, 320.0, 16.04, 1.0, NULL);
	double real = gas_density_kgm3(3.0e6, 320.0, 16.04, 0.93, NULL);
	assert_true(fabs(real - ideal / 0.93) <= 1e-12 * ideal);
}

static void test_non_positive_or_nan_inputs_give_nan(void **state)
{
	(void)state;
	assert_true(isnan(gas_density_kgm3(0.0, 300.0, 28.0, 1.0, NULL)));
	assert_true(isnan(gas_density_kgm3(-1.0, 300.0, 28.0, 1.0, NULL)));
	assert_true(isnan(gas_density_kgm3(1e5, 0.0, 28.0, 1.0, NULL)));
	assert_true(isnan(gas_density_kgm3(1e5, 300.0, 0.0, 1.0, NULL)));
	assert_true(isnan(gas_density_kgm3(1e5, 300.0, 28.0, 0.0, NULL)));
	assert_true(isnan(gas_density_kgm3(NAN, 300.0, 28.0, 1.0, NULL)));
	assert_true(isnan(gas_density_kgm3(1e5, INFINITY, 28.0, 1.0, NULL)));
}

static void test_compressibility_outside_band_is_noted(void **state)
{
	(void)state;
	struct fg_extrap x = {0, NULL};
	(void)gas_density_kgm3(1e5, 300.0, 28.0, 1.0, &x);
	assert_int_equal(x.count, 0);
	(void)gas_density_kgm3(1e5, 300.0, 28.0, 0.25, &x);
	assert_int_equal(x.count, 1);
	assert_non_null(x.first);
	(void)gas_density_kgm3(1e5, 300.0, 28.0, 1.3, &x);
	assert_int_equal(x.count, 2);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_air_at_sea_level_matches_standard_atmosphere),
		cmocka_unit_test(test_density_scales_with_pressure_and_inverse_temperature),
		cmocka_unit_test(test_compressibility_divides_density),
		cmocka_unit_test(test_non_positive_or_nan_inputs_give_nan),
		cmocka_unit_test(test_compressibility_outside_band_is_noted),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
