/*
 * test_config.c - the config loader: a valid file loads with the values it
 * says, and each kind of mistake is refused with FILE:LINE and a reason.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "config.h"
#include "validate.h"

static const char base_ini[] =
	"[monitor]\n"                                  /* 1 */
	"name = test-unit\n"                           /* 2 */
	"period_s = 2\n"                               /* 3 */
	"[source.plc]\n"                               /* 4 */
	"protocol = modbus-tcp\n"                      /* 5 */
	"host = 127.0.0.1\n"                           /* 6 */
	"[tag.FG]\n"                                   /* 7 */
	"source = plc\n"                               /* 8 */
	"address = 0\n"                                /* 9 */
	"type = float32\n"                             /* 10 */
	"unit = t/h\n"                                 /* 11 */
	"[tag.FL]\n"                                   /* 12 */
	"value = 30\n"                                 /* 13 */
	"unit = t/h\n"                                 /* 14 */
	"[tag.P]\n"                                    /* 15 */
	"value = 1.2\n"                                /* 16 */
	"unit = bara\n"                                /* 17 */
	"[tag.T]\n"                                    /* 18 */
	"value = 40\n"                                 /* 19 */
	"unit = degC\n"                                /* 20 */
	"[section.C1]\n"                               /* 21 */
	"type = tray\n"                                /* 22 */
	"diameter_m = 1.5\n"                           /* 23 */
	"trays = 10\n"                                 /* 24 */
	"tray_spacing_m = 0.6\n"                       /* 25 */
	"weir_height_m = 0.05\n"                       /* 26 */
	"weir_length_m = 1.1\n"                        /* 27 */
	"active_area_frac = 0.76\n"                    /* 28 */
	"downcomer_area_frac = 0.12\n"                 /* 29 */
	"hole_area_frac = 0.1\n"                       /* 30 */
	"hole_diameter_m = 0.0127\n"                   /* 31 */
	"downcomer_clearance_m = 0.04\n"               /* 32 */
	"gas_flow = FG\n"                              /* 33 */
	"liquid_flow = FL\n"                           /* 34 */
	"pressure = P\n"                               /* 35 */
	"temperature = T\n"                            /* 36 */
	"gas_molar_mass_kgkmol = 29\n"                 /* 37 */
	"gas_viscosity_pas = 1.8e-5\n"                 /* 38 */
	"liquid_density_kgm3 = 20:998, 80:972\n"       /* 39 */
	"liquid_viscosity_pas = 1e-3\n"                /* 40 */
	"surface_tension_nm = 0.072\n"                 /* 41 */
	"[alarm.C1_H]\n"                               /* 42 */
	"section = C1\n"                               /* 43 */
	"signal = flood_index\n"                       /* 44 */
	"kind = high\n"                                /* 45 */
	"setpoint = 85\n";                             /* 46 */

struct loaded {
	struct fg_config cfg;
	char path[64];
	char *err;
	size_t err_size;
	int rc;
};

/* Writes text to a temporary file and loads it; errors go to a memstream. */
static struct loaded *load_text(const char *text)
{
	struct loaded *l = calloc(1, sizeof(*l));
	assert_non_null(l);
	snprintf(l->path, sizeof(l->path), "/tmp/fgcfg-XXXXXX");
	int fd = mkstemp(l->path);
	assert_true(fd >= 0);
	size_t n = strlen(text);
	assert_int_equal(write(fd, text, n), (ssize_t)n);
	close(fd);
	FILE *errf = open_memstream(&l->err, &l->err_size);
	assert_non_null(errf);
	l->rc = config_load(&l->cfg, l->path, errf);
	fclose(errf);
	unlink(l->path);
	return l;
}

static void loaded_free(struct loaded *l)
{
	free(l->err);
	free(l);
}

/* Replaces the first occurrence of old in base_ini by new_text. */
static struct loaded *load_edit(const char *old, const char *new_text)
{
	static char buf[8192];
	const char *at = strstr(base_ini, old);
	assert_non_null(at);
	size_t pre = (size_t)(at - base_ini);
	snprintf(buf, sizeof(buf), "%.*s%s%s", (int)pre, base_ini, new_text, at + strlen(old));
	return load_text(buf);
}

/* Asserts the load failed with a message naming line and containing what. */
static void assert_error(struct loaded *l, int line, const char *what)
{
	char want[96];
	snprintf(want, sizeof(want), ":%d: ", line);
	if (l->rc == 0 || strstr(l->err, want) == NULL || strstr(l->err, what) == NULL)
		fail_msg("want error at line %d containing '%s'; rc %d, got:\n%s", line, what, l->rc,
			 l->err);
}

static void test_valid_config_loads_with_its_values(void **state)
{
	(void)state;
	struct loaded *l = load_text(base_ini);
	if (l->rc != 0)
		fail_msg("%s", l->err);
	const struct fg_config *c = &l->cfg;
	assert_string_equal(c->monitor.name, "test-unit");
	assert_true(c->monitor.period_s == 2.0);
	assert_int_equal(c->tag_count, 4);
	assert_int_equal(c->section_count, 1);
	const struct section_cfg *s = &c->sections[0];
	assert_int_equal(s->geom.type, SECTION_TRAY);
	assert_int_equal(s->geom.tray.trays, 10);
	assert_true(s->geom.tray.deck_thickness_m == 0.002); /* default */
	assert_int_equal(s->signal[SIGNAL_GAS_FLOW], 0);
	assert_int_equal(s->signal[SIGNAL_DP], -1);
	assert_int_equal(s->props.liquid_density_kgm3.point_count, 2);
	assert_true(fabs(s->props.liquid_density_kgm3.t_k[1] - 353.15) < 1e-9);
	assert_int_equal(c->sources[0].port, 502);       /* default */
	assert_int_equal(c->sources[0].unit_id, 255);    /* TCP default */
	assert_int_equal(c->tags[0].source_index, 0);
	assert_int_equal(c->tags[1].source_index, -1);
	assert_true(c->tags[1].fixed_value == 30.0);
	assert_int_equal(c->alarm_count, 1);
	assert_int_equal(c->alarms[0].section_index, 0);
	assert_int_equal(c->alarms[0].field, RF_FLOOD_INDEX);
	assert_int_equal(c->alarms[0].kind, ALARM_KIND_HIGH);
	loaded_free(l);
}

static void test_unknown_key_is_refused_with_its_line(void **state)
{
	(void)state;
	struct loaded *l = load_edit("trays = 10\n", "trays = 10\nweir_hieght_m = 0.05\n");
	assert_error(l, 25, "unknown key 'weir_hieght_m'");
	loaded_free(l);
}

static void test_missing_required_key_names_the_section_line(void **state)
{
	(void)state;
	struct loaded *l = load_edit("trays = 10\n", "");
	assert_error(l, 21, "needs 'trays'");
	loaded_free(l);
}

static void test_bad_number_is_refused(void **state)
{
	(void)state;
	struct loaded *l = load_edit("diameter_m = 1.5", "diameter_m = 1.5m");
	assert_error(l, 23, "is not a number");
	loaded_free(l);
	l = load_edit("diameter_m = 1.5", "diameter_m = 150");
	assert_error(l, 23, "outside");
	loaded_free(l);
}

static void test_unknown_unit_is_refused(void **state)
{
	(void)state;
	struct loaded *l = load_edit("unit = t/h\n", "unit = tons/hr\n");
	assert_error(l, 11, "unit 'tons/hr' is not known");
	loaded_free(l);
}

static void test_undefined_tag_reference_is_refused(void **state)
{
	(void)state;
	struct loaded *l = load_edit("liquid_flow = FL", "liquid_flow = FL2");
	assert_error(l, 34, "tag 'FL2' is not defined");
	loaded_free(l);
}

static void test_unit_that_does_not_fit_the_signal_is_refused(void **state)
{
	(void)state;
	struct loaded *l = load_edit("temperature = T", "temperature = P");
	assert_error(l, 36, "not a unit for temperature");
	loaded_free(l);
}

static void test_weir_taller_than_tray_spacing_is_refused(void **state)
{
	(void)state;
	/* Same line count: both edits replace one line by one line. */
	char buf[8192];
	snprintf(buf, sizeof(buf), "%s", base_ini);
	char *w = strstr(buf, "weir_height_m = 0.05");
	assert_non_null(w);
	memcpy(w, "weir_height_m = 0.29", 20);
	char *t = strstr(buf, "tray_spacing_m = 0.6\n");
	assert_non_null(t);
	memmove(t + 21, t + 20, strlen(t + 20) + 1);
	memcpy(t, "tray_spacing_m = 0.25", 21);
	struct loaded *l = load_text(buf);
	assert_error(l, 21, "weir_height_m 0.29 is not below tray_spacing_m 0.25");
	loaded_free(l);
}

static void test_areas_larger_than_the_tower_are_refused(void **state)
{
	(void)state;
	struct loaded *l = load_edit("active_area_frac = 0.76", "active_area_frac = 0.9");
	assert_error(l, 21, "more than it (0.3 % allowed for rounding)");
	loaded_free(l);
	/* 1 % over is not rounding either. */
	l = load_edit("active_area_frac = 0.76", "active_area_frac = 0.77");
	assert_error(l, 21, "= 1.01 of the tower cross-section");
	loaded_free(l);
}

/* Areas copied from a datasheet, rounded to 4 digits, may add up to a hair
 * over the tower: 0.76002 + 2 x 0.12 = 1.00002 (the case a site reported). */
static void test_datasheet_rounding_is_allowed(void **state)
{
	(void)state;
	struct loaded *l = load_edit("active_area_frac = 0.76", "active_area_frac = 0.76002");
	if (l->rc != 0)
		fail_msg("%s", l->err);
	loaded_free(l);
}

/* Areas in m2 per tray. Tower pi x 1.5^2 / 4 = 1.76715 m2 (arithmetic); the
 * datasheet's 4-digit areas 1.343, 0.2121 and 0.1343 m2 are 0.76, 0.12 of
 * it and 0.10 of the active area, to the datasheet's rounding (0.05 %). */
static void test_tray_areas_in_m2_per_tray(void **state)
{
	(void)state;
	struct loaded *l = load_edit("active_area_frac = 0.76\n"
				     "downcomer_area_frac = 0.12\n"
				     "hole_area_frac = 0.1\n",
				     "active_area_m2 = 1.343\n"
				     "downcomer_area_m2 = 0.2121\n"
				     "hole_area_m2 = 0.1343\n");
	if (l->rc != 0)
		fail_msg("%s", l->err);
	const struct tray_geom *t = &l->cfg.sections[0].geom.tray;
	assert_true(fabs(t->active_area_frac / 0.76 - 1.0) < 5e-4);
	assert_true(fabs(t->downcomer_area_frac / 0.12 - 1.0) < 5e-4);
	assert_true(fabs(t->hole_area_frac / 0.10 - 1.0) < 5e-4);
	loaded_free(l);
}

static void test_one_area_given_twice_or_not_at_all_is_refused(void **state)
{
	(void)state;
	struct loaded *l = load_edit("hole_area_frac = 0.1\n", "hole_area_frac = 0.1\n"
							      "active_area_m2 = 1.343\n");
	assert_error(l, 31, "active_area_m2 and active_area_frac (line 28) give the same area");
	loaded_free(l);
	l = load_edit("downcomer_area_frac = 0.12\n", "");
	assert_error(l, 21, "needs 'downcomer_area_frac' (or 'downcomer_area_m2', per tray)");
	loaded_free(l);
	/* An m2 area larger than the tower is refused at its line. */
	l = load_edit("active_area_frac = 0.76", "active_area_m2 = 2.5");
	assert_error(l, 28, "active_area_m2 = 2.5 m2 is 1.41 of the tower cross-section");
	loaded_free(l);
}

static void test_duplicate_key_and_header_are_refused(void **state)
{
	(void)state;
	struct loaded *l = load_edit("trays = 10\n", "trays = 10\ntrays = 12\n");
	assert_error(l, 25, "duplicate key 'trays'");
	loaded_free(l);
	l = load_edit("[tag.T]\n", "[tag.P]\n");
	assert_error(l, 18, "[tag.P] appears twice (first at line 15)");
	loaded_free(l);
}

static void test_long_line_is_refused_not_split(void **state)
{
	(void)state;
	char longv[400];
	memset(longv, 'x', sizeof(longv) - 1);
	longv[sizeof(longv) - 1] = '\0';
	char edit[512];
	snprintf(edit, sizeof(edit), "name = %s\n", longv);
	struct loaded *l = load_edit("name = test-unit\n", edit);
	assert_error(l, 2, "line longer than");
	assert_null(strstr(l->err, ":3: ")); /* no bogus follow-on line */
	loaded_free(l);
}

static void test_alarm_on_unknown_field_is_refused(void **state)
{
	(void)state;
	struct loaded *l = load_edit("signal = flood_index", "signal = flood_percent");
	assert_error(l, 44, "'flood_percent' is not a result field");
	loaded_free(l);
	l = load_edit("section = C1", "section = C9");
	assert_error(l, 43, "section 'C9' is not defined");
	loaded_free(l);
}

static void test_key_that_does_not_apply_to_the_type_is_refused(void **state)
{
	(void)state;
	struct loaded *l = load_edit("trays = 10\n", "trays = 10\npacked_height_m = 4\n");
	assert_error(l, 25, "'packed_height_m' does not apply to a tray section");
	loaded_free(l);
}

static void test_calibration_and_gate_keys_default_and_load(void **state)
{
	(void)state;
	struct loaded *l = load_text(base_ini);
	assert_int_equal(l->rc, 0);
	const struct section_cfg *c = &l->cfg.sections[0];
	assert_true(c->geom.capacity_factor == 1.0);
	assert_true(c->dp_factor == 1.0);
	assert_true(c->steady_window_s == 600.0);
	assert_true(c->steady_load_band == 0.015);
	assert_true(c->normal_dp_sigmas == 4.0);
	/* the diagnostic defaults do not touch a high alarm */
	assert_true(l->cfg.alarms[0].on_delay_s == 0.0);
	loaded_free(l);
	l = load_edit("trays = 10\n", "trays = 10\ncapacity_factor = 0.85\ndp_factor = 1.1\n"
				      "steady_window_s = 900\nsteady_load_band = 0.03\n"
				      "normal_dp_sigmas = 5\n");
	assert_int_equal(l->rc, 0);
	c = &l->cfg.sections[0];
	assert_true(c->geom.capacity_factor == 0.85);
	assert_true(c->dp_factor == 1.1);
	assert_true(c->steady_window_s == 900.0);
	assert_true(c->steady_load_band == 0.03);
	assert_true(c->normal_dp_sigmas == 5.0);
	loaded_free(l);
	l = load_edit("trays = 10\n", "trays = 10\ncapacity_factor = 0.1\n");
	assert_error(l, 25, "capacity_factor");
	loaded_free(l);
}

static void test_capacity_factor_on_a_bubble_section_is_refused(void **state)
{
	(void)state;
	static const char bubble[] =
		"[monitor]\nname = b\nperiod_s = 1\n"                         /* 1-3 */
		"[tag.G]\nvalue = 100\nunit = Nm3/h\n"                        /* 4-6 */
		"[tag.P]\nvalue = 1.2\nunit = bara\n"                         /* 7-9 */
		"[tag.T]\nvalue = 30\nunit = degC\n"                          /* 10-12 */
		"[section.R1]\ntype = bubble\ndiameter_m = 1\n"               /* 13-15 */
		"overflow_height_m = 5\nclear_liquid_height_m = 3\n"           /* 16-17 */
		"gas_flow = G\npressure = P\ntemperature = T\n"               /* 18-20 */
		"gas_molar_mass_kgkmol = 29\ngas_viscosity_pas = 1.8e-5\n"     /* 21-22 */
		"liquid_density_kgm3 = 1000\nliquid_viscosity_pas = 1e-3\n"    /* 23-24 */
		"surface_tension_nm = 0.07\n"                                   /* 25 */
		"capacity_factor = 0.9\n";                                      /* 26 */
	struct loaded *l = load_text(bubble);
	assert_error(l, 26, "capacity_factor does not apply to a bubble section");
	loaded_free(l);
}

static void test_export_fields_continue_over_lines(void **state)
{
	(void)state;
	char buf[8192];
	snprintf(buf, sizeof(buf), "%s[export.modbus]\nlisten = 127.0.0.1:1600\n"
				   "fields = C1.flood_index, C1.weep_pct,\n  C1.dp_pa\n", base_ini);
	struct loaded *l = load_text(buf);
	if (l->rc != 0)
		fail_msg("%s", l->err);
	assert_int_equal(l->cfg.exp.field_count, 3);
	assert_int_equal(l->cfg.exp.fields[2].field, RF_DP_PA);
	assert_int_equal(l->cfg.exp.port, 1600);
	assert_string_equal(l->cfg.exp.host, "127.0.0.1");
	loaded_free(l);
}

static void test_missing_file_is_enoent(void **state)
{
	(void)state;
	struct fg_config *c = malloc(sizeof(*c));
	assert_non_null(c);
	FILE *devnull = fopen("/dev/null", "w");
	assert_int_equal(config_load(c, "/nonexistent/fg.ini", devnull), -2 /* -ENOENT */);
	fclose(devnull);
	free(c);
}

/* A stirred vessel and a loop (lines counted from 1). */
static const char contactors_ini[] =
	"[monitor]\n"                          /* 1 */
	"name = t\n"                           /* 2 */
	"[tag.F]\n"                            /* 3 */
	"value = 100\n"                        /* 4 */
	"unit = kg/h\n"                        /* 5 */
	"[tag.N]\n"                            /* 6 */
	"value = 90\n"                         /* 7 */
	"unit = rpm\n"                         /* 8 */
	"[tag.J]\n"                            /* 9 */
	"value = 4\n"                          /* 10 */
	"unit = kW\n"                          /* 11 */
	"[tag.D]\n"                            /* 12 */
	"value = 900\n"                        /* 13 */
	"unit = mbar\n"                        /* 14 */
	"[tag.RHO]\n"                          /* 15 */
	"value = 1.2\n"                        /* 16 */
	"unit = kg/m3\n"                       /* 17 */
	"[section.M]\n"                        /* 18 */
	"type = stirred\n"                     /* 19 */
	"diameter_m = 2.4\n"                   /* 20 */
	"impeller_diameter_m = 0.8\n"          /* 21 */
	"impeller_type = disc-turbine\n"       /* 22 */
	"impeller_clearance_m = 0.6\n"         /* 23 */
	"gas_flow = F\n"                       /* 24 */
	"agitator_speed = N\n"                 /* 25 */
	"motor_power = J\n"                    /* 26 */
	"gas_density = RHO\n"                  /* 27 */
	"gas_viscosity_pas = 1.8e-5\n"         /* 28 */
	"liquid_density_kgm3 = 998\n"          /* 29 */
	"liquid_viscosity_pas = 1e-3\n"        /* 30 */
	"surface_tension_nm = 0.072\n"         /* 31 */
	"[section.L]\n"                        /* 32 */
	"type = loop\n"                        /* 33 */
	"diameter_m = 3.0\n"                   /* 34 */
	"riser_area_m2 = 3.14\n"               /* 35 */
	"loop_downcomer_area_m2 = 3.6\n"       /* 36 */
	"loop_height_m = 12\n"                 /* 37 */
	"bottom_clearance_m = 0.8\n"           /* 38 */
	"gas_flow = F\n"                       /* 39 */
	"dp_riser = D\n"                       /* 40 */
	"dp_downcomer = D\n"                   /* 41 */
	"gas_density = RHO\n"                  /* 42 */
	"gas_viscosity_pas = 1.8e-5\n"         /* 43 */
	"liquid_density_kgm3 = 998\n"          /* 44 */
	"liquid_viscosity_pas = 1e-3\n"        /* 45 */
	"surface_tension_nm = 0.072\n";        /* 46 */

static struct loaded *load_contactors_edit(const char *old, const char *new_text)
{
	static char buf[8192];
	const char *at = strstr(contactors_ini, old);
	assert_non_null(at);
	size_t pre = (size_t)(at - contactors_ini);
	snprintf(buf, sizeof(buf), "%.*s%s%s", (int)pre, contactors_ini, new_text,
		 at + strlen(old));
	return load_text(buf);
}

static void test_stirred_and_loop_sections_load(void **state)
{
	(void)state;
	struct loaded *l = load_text(contactors_ini);
	if (l->rc != 0)
		fail_msg("%s", l->err);
	const struct section_cfg *m = &l->cfg.sections[0];
	assert_int_equal(m->geom.type, SECTION_STIRRED);
	assert_int_equal(m->geom.stirred.impeller, IMPELLER_DISC_TURBINE);
	assert_true(m->signal[SIGNAL_AGITATOR_SPEED] == 1);
	assert_true(isnan(m->geom.stirred.power_number)); /* the type's default applies */
	const struct section_cfg *lp = &l->cfg.sections[1];
	assert_int_equal(lp->geom.type, SECTION_LOOP);
	assert_true(lp->geom.loop.height_m == 12.0);
	assert_true(lp->signal[SIGNAL_DP_DOWNCOMER] == 3);
	loaded_free(l);
}

static void test_contactor_config_errors_name_their_line(void **state)
{
	(void)state;
	struct loaded *l = load_contactors_edit("impeller_type = disc-turbine",
						"impeller_type = propeller");
	assert_error(l, 22, "impeller_type: 'propeller' is not one of: disc-turbine, hollow-blade");
	loaded_free(l);
	l = load_contactors_edit("agitator_speed = N\n", "");
	assert_error(l, 18, "(stirred) needs 'agitator_speed'");
	loaded_free(l);
	l = load_contactors_edit("unit = rpm", "unit = m3/h");
	assert_error(l, 25, "tag 'N' is in m3/h (volume flow), which is not a unit for "
			    "agitator_speed");
	loaded_free(l);
	l = load_contactors_edit("bottom_clearance_m = 0.8\n",
				 "bottom_clearance_m = 0.8\nimpeller_diameter_m = 0.5\n");
	assert_error(l, 39, "'impeller_diameter_m' does not apply to a loop section");
	loaded_free(l);
	l = load_contactors_edit("impeller_diameter_m = 0.8", "impeller_diameter_m = 2.5");
	assert_error(l, 18, "impeller_diameter_m 2.5 m is not smaller than the vessel");
	loaded_free(l);
	l = load_contactors_edit("riser_area_m2 = 3.14", "riser_area_m2 = 6.14");
	assert_error(l, 32, "exceeds the vessel cross-section");
	loaded_free(l);
	l = load_contactors_edit("dp_riser = D\n", "dp = D\n");
	assert_error(l, 40, "'dp' does not apply to a loop section");
	loaded_free(l);
}

static void test_demo_contactors_config_is_valid(void **state)
{
	(void)state;
	struct fg_config *c = malloc(sizeof(*c));
	assert_non_null(c);
	assert_int_equal(config_load(c, "configs/demo-contactors.ini", stderr), 0);
	assert_int_equal(c->section_count, 3);
	int types = 0;
	for (unsigned i = 0; i < c->section_count; i++)
		types |= 1 << c->sections[i].geom.type;
	assert_int_equal(types, (1 << SECTION_PACKED_BUBBLE) | (1 << SECTION_STIRRED) |
					(1 << SECTION_LOOP));
	assert_true(c->sections[0].geom.pbub.void_frac > 0.9); /* from the packing table */
	assert_true(c->sections[0].geom.pbub.bed_height_m == 5.0);
	free(c);
}

static void test_demo_config_is_valid(void **state)
{
	(void)state;
	struct fg_config *c = malloc(sizeof(*c));
	assert_non_null(c);
	assert_int_equal(config_load(c, "configs/demo.ini", stderr), 0);
	assert_int_equal(c->section_count, 4);
	int types = 0;
	for (unsigned i = 0; i < c->section_count; i++)
		types |= 1 << c->sections[i].geom.type;
	assert_int_equal(types, 0xf); /* one of each type */
	assert_true(c->exp.field_count >= 8);
	free(c);
}

static void test_frozen_detection_is_on_by_default_for_polled_tags(void **state)
{
	(void)state;
	struct loaded *l = load_text(base_ini);
	assert_int_equal(l->rc, 0);
	assert_true(l->cfg.tags[0].frozen_s == VALIDATE_FROZEN_DEFAULT_S); /* polled FG */
	assert_true(l->cfg.tags[1].frozen_s == 0.0);                       /* value = 30 */
	loaded_free(l);
	l = load_edit("unit = t/h\n[tag.FL]", "unit = t/h\nfrozen_s = 0\n[tag.FL]");
	assert_int_equal(l->rc, 0);
	assert_true(l->cfg.tags[0].frozen_s == 0.0); /* switched off */
	loaded_free(l);
}

/* Loads base_ini with extra text appended; it must load. */
static struct loaded *load_plus(const char *extra)
{
	static char buf[8192];
	snprintf(buf, sizeof(buf), "%s%s", base_ini, extra);
	struct loaded *l = load_text(buf);
	if (l->rc != 0)
		fail_msg("%s", l->err);
	return l;
}

static bool has_warning(const struct loaded *l, int line, const char *what)
{
	char want[32];
	snprintf(want, sizeof(want), ":%d: warning: ", line);
	for (unsigned i = 0; i < l->cfg.warning_count; i++)
		if (strstr(l->cfg.warnings[i], want) && strstr(l->cfg.warnings[i], what))
			return true;
	return false;
}

static void dump_warnings(const struct loaded *l)
{
	for (unsigned i = 0; i < l->cfg.warning_count; i++)
		print_message("%s\n", l->cfg.warnings[i]);
}

/* A sump level in % of span is accepted on any section; with span_m and
 * zero_m it reads in metres: 40 % of 2.5 m above 0.3 m = 1.3 m. Without a
 * span, check names the soft sensor that stays off. */
static void test_level_in_percent_of_span(void **state)
{
	(void)state;
	struct loaded *l = load_edit("temperature = T\n", "temperature = T\nlevel = LI\n"
							  "liquid_out_flow = FL\n");
	assert_int_equal(l->rc, -EINVAL); /* LI is not defined yet: the edit needs the tag */
	loaded_free(l);
	static char buf[8192];
	const char *at = strstr(base_ini, "temperature = T\n");
	snprintf(buf, sizeof(buf), "%.*stemperature = T\nlevel = LI\nliquid_out_flow = FL\n%s"
				   "[tag.LI]\nsource = plc\naddress = 4\ntype = float32\nunit = %%\n",
		 (int)(at - base_ini), base_ini, at + strlen("temperature = T\n"));
	l = load_text(buf);
	if (l->rc != 0)
		fail_msg("%s", l->err);
	/* [tag.LI] is on line 49 (two lines added in the section above it). */
	if (!has_warning(l, 49, "is in % of span without span_m (and zero_m): stays off: the "
				"liquid inventory (inventory_m3)")) {
		dump_warnings(l);
		fail();
	}
	loaded_free(l);
	static char with_span[8300];
	snprintf(with_span, sizeof with_span, "%sspan_m = 2.5\nzero_m = 0.3\n", buf);
	l = load_text(with_span);
	assert_int_equal(l->rc, 0);
	assert_int_equal(l->cfg.warning_count, 0);
	int li = config_tag_index(&l->cfg, "LI");
	assert_true(fabs(config_tag_to_si(&l->cfg.tags[li], 40.0) - 1.3) < 1e-12);
	assert_true(config_tag_is_length(&l->cfg.tags[li]));
	loaded_free(l);
	/* span_m on a tag that is not in %: refused at the tag's line. */
	l = load_edit("unit = t/h\n[tag.FL]", "unit = t/h\nspan_m = 2\n[tag.FL]");
	assert_error(l, 7, "span_m and zero_m are for a level in % of span");
	loaded_free(l);
}

static void test_alarm_on_a_field_the_type_never_has_is_warned(void **state)
{
	(void)state;
	struct loaded *l = load_plus("[alarm.C1_LOAD]\nsection = C1\nsignal = loading_pct\n"
				     "kind = high\nsetpoint = 80\n");
	if (!has_warning(l, 49, "[alarm.C1_LOAD] watches loading_pct, which a tray section "
				"never has")) {
		dump_warnings(l);
		fail();
	}
	assert_false(config_type_has_field(SECTION_PACKED, RF_WEEP_PCT));
	assert_true(config_type_has_field(SECTION_TRAY, RF_WEEP_PCT));
	assert_true(config_type_has_field(SECTION_SPRAY, RF_FLOOD_INDEX));
	loaded_free(l);
}

static void test_high_high_not_above_high_is_warned(void **state)
{
	(void)state;
	struct loaded *l = load_plus("[alarm.C1_HH]\nsection = C1\nsignal = flood_index\n"
				     "kind = high-high\nsetpoint = 80\n");
	if (!has_warning(l, 47, "high-high setpoint 80 is not above the high setpoint 85 of "
				"[alarm.C1_H]")) {
		dump_warnings(l);
		fail();
	}
	loaded_free(l);
	l = load_plus("[alarm.C1_HH]\nsection = C1\nsignal = flood_index\n"
		      "kind = high-high\nsetpoint = 95\n");
	assert_int_equal(l->cfg.warning_count, 0);
	loaded_free(l);
}

static void test_two_tags_on_one_register_are_warned(void **state)
{
	(void)state;
	/* FG is a float32 at input registers 0-1: a tag at 1 overlaps it. */
	struct loaded *l = load_plus("[tag.FX]\nsource = plc\naddress = 1\ntype = int16\n"
				     "unit = t/h\n");
	if (!has_warning(l, 47, "[tag.FX] reads holding register 1, as [tag.FG] (line 7) does")) {
		dump_warnings(l);
		fail();
	}
	loaded_free(l);
	l = load_plus("[tag.FX]\nsource = plc\naddress = 2\ntype = int16\nunit = t/h\n");
	assert_int_equal(l->cfg.warning_count, 0);
	loaded_free(l);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_valid_config_loads_with_its_values),
		cmocka_unit_test(test_frozen_detection_is_on_by_default_for_polled_tags),
		cmocka_unit_test(test_level_in_percent_of_span),
		cmocka_unit_test(test_alarm_on_a_field_the_type_never_has_is_warned),
		cmocka_unit_test(test_high_high_not_above_high_is_warned),
		cmocka_unit_test(test_two_tags_on_one_register_are_warned),
		cmocka_unit_test(test_unknown_key_is_refused_with_its_line),
		cmocka_unit_test(test_missing_required_key_names_the_section_line),
		cmocka_unit_test(test_bad_number_is_refused),
		cmocka_unit_test(test_unknown_unit_is_refused),
		cmocka_unit_test(test_undefined_tag_reference_is_refused),
		cmocka_unit_test(test_unit_that_does_not_fit_the_signal_is_refused),
		cmocka_unit_test(test_weir_taller_than_tray_spacing_is_refused),
		cmocka_unit_test(test_areas_larger_than_the_tower_are_refused),
		cmocka_unit_test(test_datasheet_rounding_is_allowed),
		cmocka_unit_test(test_tray_areas_in_m2_per_tray),
		cmocka_unit_test(test_one_area_given_twice_or_not_at_all_is_refused),
		cmocka_unit_test(test_duplicate_key_and_header_are_refused),
		cmocka_unit_test(test_long_line_is_refused_not_split),
		cmocka_unit_test(test_alarm_on_unknown_field_is_refused),
		cmocka_unit_test(test_key_that_does_not_apply_to_the_type_is_refused),
		cmocka_unit_test(test_calibration_and_gate_keys_default_and_load),
		cmocka_unit_test(test_capacity_factor_on_a_bubble_section_is_refused),
		cmocka_unit_test(test_export_fields_continue_over_lines),
		cmocka_unit_test(test_missing_file_is_enoent),
		cmocka_unit_test(test_demo_config_is_valid),
		cmocka_unit_test(test_stirred_and_loop_sections_load),
		cmocka_unit_test(test_contactor_config_errors_name_their_line),
		cmocka_unit_test(test_demo_contactors_config_is_valid),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
