/*
 * test_units.c - the unit table against NIST SP 811 (2008), Appendix B.8.
 *
 * Each expected factor is the value NIST prints (from memory of the
 * appendix; the printed factors are 7 significant digits). The tolerance is
 * half a unit in the last printed digit: our factor is the exact product of
 * the unit's definition, so it can differ from the printed one only by
 * NIST's rounding.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <stdio.h>
#include <string.h>

#include "units.h"

static const struct unit *get(const char *name)
{
	const struct unit *u = units_lookup(name);
	if (u == NULL)
		fail_msg("unit %s not found", name);
	return u;
}

/* Asserts 1 unit of name is si_expected SI, within tol, and of kind k. */
static void check_factor(const char *name, enum unit_kind k, double si_expected, double tol)
{
	const struct unit *u = get(name);
	assert_int_equal(u->kind, k);
	double si = units_to_si(u, 1.0) - units_to_si(u, 0.0);
	if (!(fabs(si - si_expected) <= tol))
		fail_msg("%s: %.12g, NIST %.12g, tol %g", name, si, si_expected, tol);
}

static void test_pressure_factors_match_nist(void **state)
{
	(void)state;
	check_factor("Pa", UNIT_KIND_PRESSURE, 1.0, 0.0);
	check_factor("kPa", UNIT_KIND_PRESSURE, 1.0e3, 0.0);
	check_factor("kPaa", UNIT_KIND_PRESSURE, 1.0e3, 0.0);
	check_factor("MPa", UNIT_KIND_PRESSURE, 1.0e6, 0.0);
	check_factor("bar", UNIT_KIND_PRESSURE, 1.0e5, 0.0);     /* NIST B.8: bar 1.0 E+05 */
	check_factor("bara", UNIT_KIND_PRESSURE, 1.0e5, 0.0);
	check_factor("mbar", UNIT_KIND_PRESSURE, 1.0e2, 0.0);    /* NIST B.8: millibar 1.0 E+02 */
	check_factor("psi", UNIT_KIND_PRESSURE, 6.894757e3, 0.5e-3); /* NIST B.8: 6.894 757 E+03 */
	check_factor("psia", UNIT_KIND_PRESSURE, 6.894757e3, 0.5e-3);
	check_factor("mmHg", UNIT_KIND_PRESSURE, 1.333224e2, 0.5e-4); /* NIST: mmHg conv. */
}

static void test_gauge_units_add_one_standard_atmosphere(void **state)
{
	(void)state;
	/* units.h: gauge = absolute - 101 325 Pa (ISO 2533 standard atmosphere). */
	assert_true(fabs(units_to_si(get("barg"), 0.0) - 101325.0) <= 1e-9);
	assert_true(fabs(units_to_si(get("barg"), 1.0) - 201325.0) <= 1e-9);
	assert_true(fabs(units_to_si(get("mbarg"), 10.0) - 102325.0) <= 1e-9);
	assert_true(fabs(units_to_si(get("kPag"), 50.0) - 151325.0) <= 1e-9);
	assert_true(fabs(units_to_si(get("psig"), 100.0) - (101325.0 + 689475.7)) <= 0.05);
	check_factor("barg", UNIT_KIND_PRESSURE, 1.0e5, 0.0);
	check_factor("psig", UNIT_KIND_PRESSURE, 6.894757e3, 0.5e-3);
}

static void test_dp_only_units_are_water_columns(void **state)
{
	(void)state;
	/* NIST B.8: millimeter of water, conventional 9.806 65 E+00 Pa; inch of
	 * water, conventional 2.490 889 E+02 Pa. */
	check_factor("mmH2O", UNIT_KIND_DP, 9.80665, 1e-12);
	check_factor("inH2O", UNIT_KIND_DP, 2.490889e2, 0.5e-4);
}

static void test_absolute_pressure_units_serve_as_dp_gauge_do_not(void **state)
{
	(void)state;
	assert_true(units_usable_as_dp(get("mbar")));
	assert_true(units_usable_as_dp(get("kPa")));
	assert_true(units_usable_as_dp(get("Pa")));
	assert_true(units_usable_as_dp(get("mmHg")));
	assert_true(units_usable_as_dp(get("mmH2O")));
	assert_true(units_usable_as_dp(get("inH2O")));
	assert_false(units_usable_as_dp(get("barg")));
	assert_false(units_usable_as_dp(get("mbarg")));
	assert_false(units_usable_as_dp(get("psig")));
	assert_false(units_usable_as_dp(get("degC")));
	assert_false(units_usable_as_dp(get("kg/h")));
	/* A DP of 25 mbar is 2500 Pa: no offset. */
	assert_true(fabs(units_to_si(get("mbar"), 25.0) - 2500.0) <= 1e-9);
}

static void test_temperature_scales_match_nist(void **state)
{
	(void)state;
	/* NIST B.9: T/K = t/degC + 273.15; T/K = (t/degF + 459.67) / 1.8. */
	assert_true(fabs(units_to_si(get("K"), 300.0) - 300.0) <= 1e-12);
	assert_true(fabs(units_to_si(get("degC"), 0.0) - 273.15) <= 1e-12);
	assert_true(fabs(units_to_si(get("degC"), 100.0) - 373.15) <= 1e-9);
	assert_true(fabs(units_to_si(get("degF"), 32.0) - 273.15) <= 1e-9);
	assert_true(fabs(units_to_si(get("degF"), 212.0) - 373.15) <= 1e-9);
	assert_true(fabs(units_to_si(get("degF"), -40.0) - 233.15) <= 1e-9);
	assert_int_equal(get("degF")->kind, UNIT_KIND_TEMPERATURE);
}

static void test_flow_factors_match_nist(void **state)
{
	(void)state;
	check_factor("kg/s", UNIT_KIND_MASS_FLOW, 1.0, 0.0);
	check_factor("kg/h", UNIT_KIND_MASS_FLOW, 1.0 / 3600.0, 1e-18);
	check_factor("t/h", UNIT_KIND_MASS_FLOW, 1.0 / 3.6, 1e-15);
	check_factor("lb/h", UNIT_KIND_MASS_FLOW, 1.259979e-4, 0.5e-10); /* NIST: lb/h */
	check_factor("m3/s", UNIT_KIND_VOLUME_FLOW, 1.0, 0.0);
	check_factor("m3/h", UNIT_KIND_VOLUME_FLOW, 1.0 / 3600.0, 1e-18);
	check_factor("L/s", UNIT_KIND_VOLUME_FLOW, 1.0e-3, 1e-18);      /* NIST: liter 1.0 E-03 m3 */
	check_factor("L/min", UNIT_KIND_VOLUME_FLOW, 1.0e-3 / 60.0, 1e-18);
	check_factor("gpm", UNIT_KIND_VOLUME_FLOW, 6.309020e-5, 0.5e-11); /* NIST: gal (US)/min */
	check_factor("Nm3/s", UNIT_KIND_NORMAL_VOLUME_FLOW, 1.0, 0.0);
	check_factor("Nm3/h", UNIT_KIND_NORMAL_VOLUME_FLOW, 1.0 / 3600.0, 1e-18);
}

static void test_length_density_fraction_factors_match_nist(void **state)
{
	(void)state;
	check_factor("m", UNIT_KIND_LENGTH, 1.0, 0.0);
	check_factor("cm", UNIT_KIND_LENGTH, 1.0e-2, 1e-18);
	check_factor("mm", UNIT_KIND_LENGTH, 1.0e-3, 1e-18);
	check_factor("in", UNIT_KIND_LENGTH, 2.54e-2, 1e-18);   /* NIST B.8: exact */
	check_factor("ft", UNIT_KIND_LENGTH, 3.048e-1, 1e-17);  /* NIST B.8: exact */
	check_factor("kg/m3", UNIT_KIND_DENSITY, 1.0, 0.0);
	check_factor("g/cm3", UNIT_KIND_DENSITY, 1.0e3, 1e-12); /* NIST B.8: 1.0 E+03 */
	check_factor("lb/ft3", UNIT_KIND_DENSITY, 1.601846e1, 0.5e-5); /* NIST B.8 */
	check_factor("%", UNIT_KIND_FRACTION, 1.0e-2, 1e-18);
	check_factor("-", UNIT_KIND_NONE, 1.0, 0.0);
}

static void test_speed_and_power_factors(void **state)
{
	(void)state;
	/* SI brochure (9th ed.): the revolution per minute is 1/60 rev/s; 1 kW = 1e3 W. */
	check_factor("rpm", UNIT_KIND_ROTATION, 1.0 / 60.0, 0.0);
	check_factor("rps", UNIT_KIND_ROTATION, 1.0, 0.0);
	check_factor("1/s", UNIT_KIND_ROTATION, 1.0, 0.0);
	check_factor("W", UNIT_KIND_POWER, 1.0, 0.0);
	check_factor("kW", UNIT_KIND_POWER, 1.0e3, 0.0);
	check_factor("MW", UNIT_KIND_POWER, 1.0e6, 0.0);
}

static void test_from_si_inverts_to_si_for_every_unit(void **state)
{
	(void)state;
	char buf[1024];
	const char *list = units_known_list();
	assert_true(strlen(list) < sizeof(buf));
	strcpy(buf, list);
	int seen = 0;
	for (char *tok = strtok(buf, ", "); tok != NULL; tok = strtok(NULL, ", ")) {
		const struct unit *u = get(tok);
		for (double v = -50.0; v <= 150.0; v += 12.5) {
			double back = units_from_si(u, units_to_si(u, v));
			if (!(fabs(back - v) <= 1e-9 * (1.0 + fabs(v))))
				fail_msg("%s: %g -> %g", tok, v, back);
		}
		seen++;
	}
	assert_int_equal(seen, 46); /* 40 + rpm, rps, 1/s, W, kW, MW */
}

static void test_known_list_names_every_table_entry(void **state)
{
	(void)state;
	static const char *const expected[] = {
		"Pa", "kPa", "kPaa", "MPa", "bar", "bara", "mbar", "psi", "psia", "mmHg",
		"barg", "mbarg", "kPag", "psig", "mmH2O", "inH2O", "K", "degC", "degF",
		"kg/s", "kg/h", "t/h", "lb/h", "m3/s", "m3/h", "L/s", "L/min", "gpm",
		"Nm3/s", "Nm3/h", "m", "cm", "mm", "in", "ft", "%", "-", "kg/m3", "g/cm3",
		"lb/ft3",
	};
	const char *list = units_known_list();
	for (size_t i = 0; i < sizeof(expected) / sizeof(expected[0]); i++) {
		assert_non_null(units_lookup(expected[i]));
		char padded[32];
		snprintf(padded, sizeof(padded), ", %s,", expected[i]);
		char full[1100];
		snprintf(full, sizeof(full), ", %s,", list);
		if (strstr(full, padded) == NULL)
			fail_msg("%s missing from units_known_list()", expected[i]);
	}
}

static void test_lookup_is_case_sensitive_and_rejects_unknown(void **state)
{
	(void)state;
	assert_null(units_lookup("MBAR"));
	assert_null(units_lookup("mBar"));
	assert_null(units_lookup("furlong/fortnight"));
	assert_null(units_lookup(""));
	assert_null(units_lookup("degc"));
}

static void test_nan_and_inf_pass_through(void **state)
{
	(void)state;
	assert_true(isnan(units_to_si(get("degC"), NAN)));
	assert_true(isnan(units_from_si(get("barg"), NAN)));
	assert_true(isinf(units_to_si(get("kg/h"), INFINITY)));
}

static void test_kind_names_are_distinct(void **state)
{
	(void)state;
	assert_string_equal(units_kind_name(UNIT_KIND_PRESSURE), "pressure");
	assert_string_equal(units_kind_name(UNIT_KIND_MASS_FLOW), "mass flow");
	for (int a = 0; a < UNIT_KIND_COUNT; a++)
		for (int b = a + 1; b < UNIT_KIND_COUNT; b++)
			assert_string_not_equal(units_kind_name((enum unit_kind)a),
						units_kind_name((enum unit_kind)b));
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_pressure_factors_match_nist),
		cmocka_unit_test(test_gauge_units_add_one_standard_atmosphere),
		cmocka_unit_test(test_dp_only_units_are_water_columns),
		cmocka_unit_test(test_absolute_pressure_units_serve_as_dp_gauge_do_not),
		cmocka_unit_test(test_temperature_scales_match_nist),
		cmocka_unit_test(test_flow_factors_match_nist),
		cmocka_unit_test(test_length_density_fraction_factors_match_nist),
		cmocka_unit_test(test_speed_and_power_factors),
		cmocka_unit_test(test_from_si_inverts_to_si_for_every_unit),
		cmocka_unit_test(test_known_list_names_every_table_entry),
		cmocka_unit_test(test_lookup_is_case_sensitive_and_rejects_unknown),
		cmocka_unit_test(test_nan_and_inf_pass_through),
		cmocka_unit_test(test_kind_names_are_distinct),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
