/*
 * test_fields.c - the per-type result field table (section_type_has_field)
 * against what the engine really fills: every finite field of every section
 * of both demo configs, at the design point and after some minutes of
 * steps, is one its type's table lists; and the table has no stray entries
 * for the new types.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <stdlib.h>

#include "engine.h"

static void check_config(const char *path)
{
	struct fg_config *cfg = malloc(sizeof(*cfg));
	struct engine *e = malloc(sizeof(*e));
	assert_non_null(cfg);
	assert_non_null(e);
	assert_int_equal(config_load(cfg, path, stderr), 0);
	engine_init(e, cfg);
	double values[FG_TAGS_MAX];
	enum tag_status status[FG_TAGS_MAX];
	for (unsigned i = 0; i < cfg->tag_count; i++) {
		values[i] = cfg->tags[i].nominal;
		status[i] = TAG_STATUS_FRESH;
	}
	for (int s = 0; s < 1200; s++) {
		/* a little movement so that the load-response slope can be estimated */
		for (unsigned i = 0; i < cfg->tag_count; i++)
			values[i] = cfg->tags[i].nominal * (1.0 + 0.05 * sin(s / 60.0));
		engine_step(e, (int64_t)s * 1000, values, status);
		for (unsigned k = 0; k < cfg->section_count; k++)
			for (int f = 0; f < RF_COUNT; f++)
				if (isfinite(e->sec[k].r.v[f]) &&
				    !section_type_has_field(cfg->sections[k].geom.type, f))
					fail_msg("%s: %s (%s) has %s, not in its type's field table",
						 path, cfg->sections[k].name,
						 config_section_type_name(cfg->sections[k].geom.type),
						 result_fields[f].name);
	}
	free(e);
	free(cfg);
}

static void test_demo_fields_are_in_the_type_tables(void **state)
{
	(void)state;
	check_config("configs/demo.ini");
}

static void test_contactor_fields_are_in_the_type_tables(void **state)
{
	(void)state;
	check_config("configs/demo-contactors.ini");
}

static void test_type_tables_keep_types_apart(void **state)
{
	(void)state;
	assert_true(section_type_has_field(SECTION_STIRRED, RF_POWER_RATIO_MEASURED));
	assert_false(section_type_has_field(SECTION_LOOP, RF_POWER_RATIO_MEASURED));
	assert_true(section_type_has_field(SECTION_LOOP, RF_CIRCULATION_PCT));
	assert_false(section_type_has_field(SECTION_TRAY, RF_CIRCULATION_PCT));
	assert_false(section_type_has_field(SECTION_LOOP, RF_DP_PA));
	assert_true(section_type_has_field(SECTION_PACKED_BUBBLE, RF_GAS_HOLDUP_COLUMN_FRAC));
	assert_false(section_type_has_field(SECTION_BUBBLE, RF_GAS_HOLDUP_COLUMN_FRAC));
	assert_true(section_type_has_field(SECTION_TRAY, RF_WEEP_PCT));
	/* The countercurrent vapour-load terms: not for an impeller-loaded vessel
	 * or a loop, which have no liquid through-flow. */
	assert_false(section_type_has_field(SECTION_STIRRED, RF_FLOW_PARAM));
	assert_false(section_type_has_field(SECTION_STIRRED, RF_CAP_FACTOR));
	assert_false(section_type_has_field(SECTION_STIRRED, RF_F_FACTOR));
	assert_false(section_type_has_field(SECTION_LOOP, RF_FLOW_PARAM));
	assert_false(section_type_has_field(SECTION_LOOP, RF_CAP_FACTOR));
	assert_false(section_type_has_field(SECTION_LOOP, RF_F_FACTOR));
	assert_true(section_type_has_field(SECTION_STIRRED, RF_GAS_VELOCITY));
	assert_true(section_type_has_field(SECTION_TRAY, RF_FLOW_PARAM));
	assert_true(section_type_has_field(SECTION_PACKED_BUBBLE, RF_F_FACTOR));
	assert_false(section_type_has_field(SECTION_TRAY, -1));
	assert_false(section_type_has_field(SECTION_TRAY, RF_COUNT));
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_demo_fields_are_in_the_type_tables),
		cmocka_unit_test(test_contactor_fields_are_in_the_type_tables),
		cmocka_unit_test(test_type_tables_keep_types_apart),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
