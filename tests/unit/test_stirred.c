/*
 * test_stirred.c - behaviour of the gassed stirred vessel model. Published
 * check values are in tests/ref/test_ref_contactors.c.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>

#include "section.h"
#include "stirred.h"

static struct section_geom vessel(void)
{
	struct section_geom g = {0};
	g.type = SECTION_STIRRED;
	g.diameter_m = 1.2;
	g.stirred.impeller_diameter_m = 0.4;
	g.stirred.impeller = IMPELLER_DISC_TURBINE;
	g.stirred.power_number = NAN;
	g.stirred.impeller_clearance_m = 0.3;
	g.stirred.drive_loss_w = 300.0;
	g.stirred.drive_efficiency = 0.95;
	g.stirred.clear_liquid_height_m = 1.2;
	return g;
}

static struct section_props air_water(void)
{
	struct section_props pr = {0};
	pr.gas_molar_mass_kgkmol = 28.96;
	pr.gas_compressibility = 1.0;
	pr.gas_viscosity_pas = (struct prop_table){1, {0}, {1.8e-5}};
	pr.liquid_density_kgm3 = (struct prop_table){1, {0}, {998.0}};
	pr.liquid_viscosity_pas = (struct prop_table){1, {0}, {1.0e-3}};
	pr.surface_tension_nm = (struct prop_table){1, {0}, {0.072}};
	return pr;
}

static void eval_g(const struct section_geom *gp, double gas_kgs, double n_rps, double motor_w,
		   struct section_result *r)
{
	struct section_geom g = *gp;
	struct section_props pr = air_water();
	struct section_point p;
	section_point_clear(&p);
	p.gas_kgs = gas_kgs;
	p.pressure_pa = 101325.0;
	p.temperature_k = 293.15;
	p.agitator_speed_rps = n_rps;
	p.motor_power_w = motor_w;
	section_eval(&g, &pr, &p, r);
}

static void eval(double gas_kgs, double n_rps, double motor_w, struct section_result *r)
{
	struct section_geom g = vessel();
	eval_g(&g, gas_kgs, n_rps, motor_w, r);
}

static void assert_no_nan_but_absent(const struct section_result *r)
{
	for (int i = 0; i < RF_COUNT; i++)
		assert_false(isinf(r->v[i]));
}

static void test_flow_number_definition(void **state)
{
	(void)state;
	assert_true(fabs(stirred_flow_number(0.016, 2.0, 0.4) - 0.016 / (2.0 * 0.064)) < 1e-15);
	assert_true(stirred_flow_number(0.0, 2.0, 0.4) == 0.0);
	assert_true(isnan(stirred_flow_number(0.01, 0.0, 0.4)));
	assert_true(isnan(stirred_flow_number(-0.01, 2.0, 0.4)));
	assert_true(isnan(stirred_flow_number(NAN, 2.0, 0.4)));
}

static void test_froude_number_definition(void **state)
{
	(void)state;
	assert_true(fabs(stirred_froude_number(3.0, 0.5) - 9.0 * 0.5 / 9.80665) < 1e-15);
	assert_true(stirred_froude_number(0.0, 0.5) == 0.0);
	assert_true(isnan(stirred_froude_number(-1.0, 0.5)));
	assert_true(isnan(stirred_froude_number(1.0, 0.0)));
}

static void test_flooding_rises_with_speed_and_hollow_blade_takes_more_gas(void **state)
{
	(void)state;
	double lo = stirred_flood_flow_number(IMPELLER_DISC_TURBINE, 0.2, 0.33, NULL);
	double hi = stirred_flood_flow_number(IMPELLER_DISC_TURBINE, 0.4, 0.33, NULL);
	assert_true(hi > lo);
	double hb = stirred_flood_flow_number(IMPELLER_HOLLOW_BLADE, 0.2, 0.33, NULL);
	assert_true(fabs(hb / lo - 2.5) < 1e-12);
	assert_true(isnan(stirred_flood_flow_number(IMPELLER_DISC_TURBINE, 0.0, 0.33, NULL)));
	assert_true(isnan(stirred_flood_flow_number(IMPELLER_TYPE_COUNT, 0.2, 0.33, NULL)));
}

static void test_flooding_outside_dt_range_is_flagged_finite(void **state)
{
	(void)state;
	struct fg_extrap x = {0, NULL};
	double fl = stirred_flood_flow_number(IMPELLER_DISC_TURBINE, 0.3, 0.7, &x);
	assert_true(isfinite(fl));
	assert_int_equal(x.count, 1);
	struct fg_extrap y = {0, NULL};
	assert_true(isfinite(stirred_dispersion_flow_number(IMPELLER_DISC_TURBINE, 0.3, 0.1, &y)));
	assert_int_equal(y.count, 1);
	struct fg_extrap z = {0, NULL};
	(void)stirred_flood_flow_number(IMPELLER_DISC_TURBINE, 0.3, 0.33, &z);
	assert_int_equal(z.count, 0);
}

static void test_power_ratio_falls_with_gas_and_holds_beyond_range(void **state)
{
	(void)state;
	assert_true(stirred_power_ratio_model(IMPELLER_DISC_TURBINE, 0.0, NULL) == 1.0);
	double a = stirred_power_ratio_model(IMPELLER_DISC_TURBINE, 0.02, NULL);
	double b = stirred_power_ratio_model(IMPELLER_DISC_TURBINE, 0.08, NULL);
	assert_true(a < 1.0);
	assert_true(b < a);
	struct fg_extrap x = {0, NULL};
	double c = stirred_power_ratio_model(IMPELLER_DISC_TURBINE, 0.5, &x);
	assert_true(fabs(c - (0.62 - 1.85 * 0.15)) < 1e-12);
	assert_int_equal(x.count, 1);
	assert_true(isnan(stirred_power_ratio_model(IMPELLER_HOLLOW_BLADE, 0.05, NULL)));
	assert_true(isnan(stirred_power_ratio_model(IMPELLER_DISC_TURBINE, -0.1, NULL)));
}

static void test_measured_ratio_takes_off_drive_losses(void **state)
{
	(void)state;
	/* (5300 - 300) * 0.9 / 9000 = 0.5 */
	double r = stirred_power_ratio_measured(5300.0, 300.0, 0.9, 9000.0, NULL);
	assert_true(fabs(r - 0.5) < 1e-12);
	struct fg_extrap x = {0, NULL};
	assert_true(stirred_power_ratio_measured(100.0, 300.0, 1.0, 9000.0, &x) == 0.0);
	assert_int_equal(x.count, 1);
	assert_true(isnan(stirred_power_ratio_measured(NAN, 0.0, 1.0, 9000.0, NULL)));
	assert_true(isnan(stirred_power_ratio_measured(1000.0, 0.0, 1.0, 0.0, NULL)));
}

static void test_holdup_zero_gas_and_capped(void **state)
{
	(void)state;
	assert_true(stirred_holdup_frac(1000.0, 0.0, NULL) == 0.0);
	double e1 = stirred_holdup_frac(1000.0, 0.01, NULL);
	double e2 = stirred_holdup_frac(2000.0, 0.01, NULL);
	assert_true(e1 > 0.0);
	assert_true(e2 > e1);
	struct fg_extrap x = {0, NULL};
	double big = stirred_holdup_frac(1e7, 5.0, &x);
	assert_true(big == 0.6);
	assert_true(x.count >= 1);
	assert_true(isnan(stirred_holdup_frac(-1.0, 0.01, NULL)));
}

static void test_sparger_pressure_adds_liquid_head(void **state)
{
	(void)state;
	double p = stirred_sparger_pressure_pa(1e5, 1000.0, 2.3, 0.3);
	assert_true(fabs(p - (1e5 + 1000.0 * 9.80665 * 2.0)) < 1e-9);
	/* A level below the impeller: no head. */
	assert_true(stirred_sparger_pressure_pa(1e5, 1000.0, 0.1, 0.3) == 1e5);
}

static void test_eval_zero_speed_is_bad_and_speed_fields_absent(void **state)
{
	(void)state;
	struct section_result r;
	eval(0.02, 0.0, NAN, &r);
	assert_int_equal(r.quality, FG_QUALITY_BAD);
	assert_true(isnan(r.v[RF_FLOW_NUMBER]));
	assert_true(isnan(r.v[RF_FROUDE_NUMBER]));
	assert_true(isnan(r.v[RF_FLOOD_PCT]));
	assert_true(isnan(r.v[RF_POWER_RATIO_MODEL]));
	assert_true(isfinite(r.v[RF_LIQUID_HOLDUP_M3]));
	assert_no_nan_but_absent(&r);
	eval(0.02, NAN, NAN, &r);
	assert_int_equal(r.quality, FG_QUALITY_BAD);
}

static void test_eval_zero_gas_is_zero_flood_full_power(void **state)
{
	(void)state;
	struct section_result r;
	eval(0.0, 2.0, NAN, &r);
	assert_true(r.v[RF_FLOW_NUMBER] == 0.0);
	assert_true(r.v[RF_FLOOD_PCT] == 0.0);
	assert_true(r.v[RF_DISPERSION_PCT] == 0.0);
	assert_true(r.v[RF_POWER_RATIO_MODEL] == 1.0);
	assert_true(r.v[RF_GAS_HOLDUP_FRAC] == 0.0);
	assert_true(isnan(r.v[RF_POWER_RATIO_MEASURED]));
	assert_int_equal(r.basis, FLOOD_BASIS_IMPELLER);
}

static void test_eval_flood_rises_with_gas_at_fixed_speed(void **state)
{
	(void)state;
	struct section_result a, b;
	eval(0.01, 2.0, NAN, &a);
	eval(0.03, 2.0, NAN, &b);
	assert_true(b.v[RF_FLOOD_PCT] > a.v[RF_FLOOD_PCT]);
	assert_true(b.v[RF_DISPERSION_PCT] > a.v[RF_DISPERSION_PCT]);
	assert_true(b.v[RF_POWER_RATIO_MODEL] < a.v[RF_POWER_RATIO_MODEL]);
	/* Flood % is flow number over the flooding flow number. */
	double fl_f = 30.0 * a.v[RF_FROUDE_NUMBER] * pow(0.4 / 1.2, 3.5);
	assert_true(fabs(a.v[RF_FLOOD_PCT] - 100.0 * a.v[RF_FLOW_NUMBER] / fl_f) < 1e-9);
}

static void test_eval_flow_number_uses_sparger_pressure(void **state)
{
	(void)state;
	struct section_result r;
	eval(0.02, 2.0, NAN, &r);
	double rho_top = 101325.0 * 28.96 / (8314.462618 * 293.15);
	double p_sp = 101325.0 + 998.0 * 9.80665 * (1.2 - 0.3);
	double q = 0.02 / (rho_top * p_sp / 101325.0);
	assert_true(fabs(r.v[RF_FLOW_NUMBER] / (q / (2.0 * 0.064)) - 1.0) < 1e-4);
}

static void test_eval_measured_ratio_from_motor_power(void **state)
{
	(void)state;
	struct section_result r;
	double p0 = 5.0 * 998.0 * 8.0 * pow(0.4, 5.0);
	eval(0.02, 2.0, 300.0 + 0.5 * p0 / 0.95, &r);
	assert_true(fabs(r.v[RF_POWER_RATIO_MEASURED] - 0.5) < 1e-9);
}

static void test_eval_hollow_blade_has_no_model_ratio_but_measures_one(void **state)
{
	(void)state;
	struct section_geom g = vessel();
	g.stirred.impeller = IMPELLER_HOLLOW_BLADE;
	struct section_result d, h;
	eval(0.02, 2.0, NAN, &d);
	eval_g(&g, 0.02, 2.0, 3000.0, &h);
	assert_true(isnan(h.v[RF_POWER_RATIO_MODEL]));
	assert_true(isfinite(h.v[RF_POWER_RATIO_MEASURED]));
	/* Po 3.2 by default: (3000 - 300) 0.95 / (3.2 998 8 0.4^5) */
	double p0 = 3.2 * 998.0 * 8.0 * pow(0.4, 5.0);
	assert_true(fabs(h.v[RF_POWER_RATIO_MEASURED] - 2700.0 * 0.95 / p0) < 1e-9);
	assert_true(fabs(d.v[RF_FLOOD_PCT] / h.v[RF_FLOOD_PCT] - 2.5) < 1e-9);
	assert_int_equal(h.quality, FG_QUALITY_GOOD);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_flow_number_definition),
		cmocka_unit_test(test_froude_number_definition),
		cmocka_unit_test(test_flooding_rises_with_speed_and_hollow_blade_takes_more_gas),
		cmocka_unit_test(test_flooding_outside_dt_range_is_flagged_finite),
		cmocka_unit_test(test_power_ratio_falls_with_gas_and_holds_beyond_range),
		cmocka_unit_test(test_measured_ratio_takes_off_drive_losses),
		cmocka_unit_test(test_holdup_zero_gas_and_capped),
		cmocka_unit_test(test_sparger_pressure_adds_liquid_head),
		cmocka_unit_test(test_eval_zero_speed_is_bad_and_speed_fields_absent),
		cmocka_unit_test(test_eval_zero_gas_is_zero_flood_full_power),
		cmocka_unit_test(test_eval_flood_rises_with_gas_at_fixed_speed),
		cmocka_unit_test(test_eval_flow_number_uses_sparger_pressure),
		cmocka_unit_test(test_eval_measured_ratio_from_motor_power),
		cmocka_unit_test(test_eval_hollow_blade_has_no_model_ratio_but_measures_one),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
