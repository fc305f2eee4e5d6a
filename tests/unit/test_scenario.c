/*
 * test_scenario.c - the synthetic-data generator behind `floodgauge
 * simulate`: deterministic, well-formed CSV, and each scenario injects the
 * upset it promises at the time it promises, with values a live transmitter
 * could give.
 *
 * Most tests run the scenarios on configs/demo.ini (the invented demo plant;
 * tests run from the repository root), reading back the generated values
 * through the project's own point_from_tags() and section_eval(), i.e. the
 * way the engine will read them. The generator is our own invention, so the
 * checks here are of consistency and of the scenario contract; where a
 * physical relation is checked (the hydrostatic head of an aerated liquid)
 * it says so.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "commands.h"
#include "config.h"
#include "csvread.h"
#include "point.h"
#include "scenario.h"
#include "section.h"
#include "timefmt.h"

#define DEMO_INI "configs/demo.ini"
#define HOUR_MS 3600000LL
#define PERIOD_S 2.0 /* the period the demo data sets use */

/* A small config of our own: a tray section whose gas flow is an actual
 * volume flow (m3/h), one fixed tag (not polled, so not a CSV column) and
 * one polled tag no section reads. */
static const char small_ini[] =
	"[monitor]\nname = sim-test\nperiod_s = 5\n"
	"[source.plc]\nprotocol = modbus-tcp\nhost = 127.0.0.1\n"
	"[tag.FG]\nsource = plc\naddress = 0\ntype = float32\nunit = m3/h\nnominal = 12000\n"
	"min = 0\nmax = 30000\n"
	"[tag.FL]\nvalue = 30\nunit = t/h\n"
	"[tag.P]\nsource = plc\naddress = 2\ntype = float32\nunit = bara\nnominal = 1.2\n"
	"[tag.DP]\nsource = plc\naddress = 4\ntype = float32\nunit = mbar\nnominal = 60\n"
	"min = 0\nmax = 2000\n"
	"[tag.T]\nsource = plc\naddress = 6\ntype = float32\nunit = degC\nnominal = 40\n"
	"[tag.XV]\nsource = plc\naddress = 8\ntype = float32\nunit = %\nnominal = 50\n"
	"[section.C1]\ntype = tray\ndiameter_m = 1.5\ntrays = 10\ntray_spacing_m = 0.6\n"
	"weir_height_m = 0.05\nweir_length_m = 1.1\nactive_area_frac = 0.76\n"
	"downcomer_area_frac = 0.12\nhole_area_frac = 0.1\nhole_diameter_m = 0.0127\n"
	"downcomer_clearance_m = 0.04\ngas_flow = FG\nliquid_flow = FL\ndp = DP\npressure = P\n"
	"temperature = T\ngas_molar_mass_kgkmol = 29\ngas_viscosity_pas = 1.8e-5\n"
	"liquid_density_kgm3 = 20:998, 80:972\nliquid_viscosity_pas = 1e-3\n"
	"surface_tension_nm = 0.072\n";

static struct fg_config *load_path(const char *path)
{
	struct fg_config *cfg = malloc(sizeof(*cfg));
	assert_non_null(cfg);
	int rc = config_load(cfg, path, stderr);
	if (rc != 0)
		fail_msg("cannot load %s (tests run from the repository root)", path);
	return cfg;
}

static struct fg_config *load_small(void)
{
	char path[] = "/tmp/fgsim-XXXXXX";
	int fd = mkstemp(path);
	assert_true(fd >= 0);
	size_t n = strlen(small_ini);
	assert_int_equal(write(fd, small_ini, n), (ssize_t)n);
	close(fd);
	struct fg_config *cfg = load_path(path);
	unlink(path);
	return cfg;
}

static struct scenario_opts opts_of(enum scenario_kind kind, uint64_t seed, double hours)
{
	struct scenario_opts o = {.kind = kind, .seed = seed, .hours = hours,
				  .period_s = PERIOD_S, .start_t_ms = SCENARIO_START_DEFAULT_MS};
	return o;
}

/* A whole run kept in memory: times, values (row-major, cfg->tag_count a
 * row) and the generator after the run (its event record). */
struct series {
	struct scenario *sc;
	size_t row_count, tag_count;
	int64_t *t_ms;
	double *v;
};

static struct series *run_series(const struct fg_config *cfg, struct scenario_opts o)
{
	struct series *s = calloc(1, sizeof(*s));
	assert_non_null(s);
	s->sc = malloc(sizeof(*s->sc));
	assert_non_null(s->sc);
	assert_int_equal(scenario_init(s->sc, cfg, &o, stderr), 0);
	s->tag_count = cfg->tag_count;
	s->t_ms = malloc(s->sc->row_count * sizeof(*s->t_ms));
	s->v = malloc(s->sc->row_count * s->tag_count * sizeof(*s->v));
	assert_non_null(s->t_ms);
	assert_non_null(s->v);
	while (scenario_next(s->sc, &s->t_ms[s->row_count], &s->v[s->row_count * s->tag_count]))
		s->row_count++;
	assert_int_equal(s->row_count, s->sc->row_count);
	return s;
}

static void series_free(struct series *s)
{
	free(s->t_ms);
	free(s->v);
	free(s->sc);
	free(s);
}

static double at(const struct series *s, size_t row, int tag)
{
	assert_true(tag >= 0);
	return s->v[row * s->tag_count + (size_t)tag];
}

/* Mean of a tag over rows whose time is in [from, to), in SI. */
static double mean_si(const struct fg_config *cfg, const struct series *s, int tag,
		      int64_t from_ms, int64_t to_ms)
{
	double sum = 0.0;
	size_t n = 0;
	for (size_t r = 0; r < s->row_count; r++)
		if (s->t_ms[r] >= from_ms && s->t_ms[r] < to_ms && isfinite(at(s, r, tag))) {
			sum += config_tag_to_si(&cfg->tags[tag], at(s, r, tag));
			n++;
		}
	assert_true(n > 0);
	return sum / (double)n;
}

/* The whole CSV of a run, NUL-terminated; free() it. */
static char *run_text(const struct fg_config *cfg, struct scenario_opts o, size_t *size)
{
	struct scenario *sc = malloc(sizeof(*sc));
	assert_non_null(sc);
	assert_int_equal(scenario_init(sc, cfg, &o, stderr), 0);
	char *buf = NULL;
	FILE *f = open_memstream(&buf, size);
	assert_non_null(f);
	assert_int_equal(scenario_run(sc, f), 0);
	fclose(f);
	free(sc);
	return buf;
}

static int section_of(const struct fg_config *cfg, enum section_type type)
{
	for (unsigned i = 0; i < cfg->section_count; i++)
		if (cfg->sections[i].geom.type == type)
			return (int)i;
	fail_msg("the demo config has no section of type %s", config_section_type_name(type));
	return -1;
}

/* ---------------------------------------------------------------- tests */

static void test_same_seed_gives_same_bytes(void **state)
{
	(void)state;
	struct fg_config *cfg = load_path(DEMO_INI);
	size_t n1, n2;
	char *a = run_text(cfg, opts_of(SCENARIO_FLOOD, 7, 3.0), &n1);
	char *b = run_text(cfg, opts_of(SCENARIO_FLOOD, 7, 3.0), &n2);
	assert_true(n1 > 1000);
	assert_int_equal(n1, n2);
	assert_memory_equal(a, b, n1);
	free(a);
	free(b);
	free(cfg);
}

static void test_different_seed_gives_different_bytes(void **state)
{
	(void)state;
	struct fg_config *cfg = load_path(DEMO_INI);
	size_t n1, n2;
	char *a = run_text(cfg, opts_of(SCENARIO_STEADY, 1, 1.0), &n1);
	char *b = run_text(cfg, opts_of(SCENARIO_STEADY, 2, 1.0), &n2);
	/* The header is the same; the first data row must already differ. */
	const char *r1 = strchr(a, '\n') + 1, *r2 = strchr(b, '\n') + 1;
	size_t l1 = strcspn(r1, "\n"), l2 = strcspn(r2, "\n");
	assert_false(l1 == l2 && memcmp(r1, r2, l1) == 0);
	free(a);
	free(b);
	free(cfg);
}

static void test_header_lists_polled_tags_in_config_order(void **state)
{
	(void)state;
	struct fg_config *cfg = load_small();
	size_t n;
	char *text = run_text(cfg, opts_of(SCENARIO_STEADY, 1, 0.1), &n);
	/* FL is a fixed value (not polled); XV is polled though no section reads it. */
	const char want[] = "time,FG,P,DP,T,XV\n";
	assert_true(n > sizeof(want));
	assert_memory_equal(text, want, strlen(want));
	/* First row: the default start, five values, none empty. */
	const char *row = text + strlen(want);
	assert_memory_equal(row, "2026-03-02T06:00:00Z,", 21);
	size_t len = strcspn(row, "\n");
	int commas = 0;
	for (size_t i = 0; i < len; i++) {
		commas += row[i] == ',';
		assert_false(row[i] == ',' && (row[i + 1] == ',' || row[i + 1] == '\n'));
	}
	assert_int_equal(commas, 5);
	free(text);
	free(cfg);
}

/* Row period and count: 0.1 h at 2 s is 180 rows, 2 s apart. */
static void test_rows_span_the_hours_at_the_period(void **state)
{
	(void)state;
	struct fg_config *cfg = load_small();
	struct series *s = run_series(cfg, opts_of(SCENARIO_STEADY, 1, 0.1));
	assert_int_equal(s->row_count, 180);
	assert_true(s->t_ms[0] == SCENARIO_START_DEFAULT_MS);
	assert_true(s->t_ms[179] - s->t_ms[0] == 179 * 2000);
	series_free(s);
	free(cfg);
}

/* The inverse of point_from_tags must give back each tag's own value, for
 * every unit the two configs use (t/h, kg/h, Nm3/h, m3/h gas and liquid,
 * barg, bara, mbarg, degC, m). Tolerance 1e-9 relative: the conversions are
 * a few multiplications, so only rounding (1e-15) separates them; a wrong
 * density or unit is off by far more. */
static void check_inverse(const struct fg_config *cfg)
{
	static const enum section_signal sigs[] = {SIGNAL_GAS_FLOW, SIGNAL_LIQUID_FLOW,
						   SIGNAL_PRESSURE, SIGNAL_TEMPERATURE,
						   SIGNAL_LEVEL};
	double vals[FG_TAGS_MAX];
	for (unsigned i = 0; i < cfg->tag_count; i++)
		vals[i] = isfinite(cfg->tags[i].fixed_value) ? cfg->tags[i].fixed_value
							     : cfg->tags[i].nominal;
	for (unsigned si = 0; si < cfg->section_count; si++) {
		const struct section_cfg *s = &cfg->sections[si];
		struct section_point p;
		point_from_tags(cfg, si, vals, &p);
		double si_of[SIGNAL_COUNT] = {
			[SIGNAL_GAS_FLOW] = p.gas_kgs, [SIGNAL_LIQUID_FLOW] = p.liquid_kgs,
			[SIGNAL_PRESSURE] = p.pressure_pa, [SIGNAL_TEMPERATURE] = p.temperature_k,
			[SIGNAL_LEVEL] = p.level_m};
		for (size_t j = 0; j < sizeof(sigs) / sizeof(sigs[0]); j++) {
			int ti = s->signal[sigs[j]];
			if (ti < 0)
				continue;
			double back = scenario_signal_to_tag(cfg, s, sigs[j], &p, si_of[sigs[j]]);
			if (!(fabs(back - vals[ti]) <= 1e-9 * fabs(vals[ti])))
				fail_msg("%s %s: %.12g back from SI, tag says %.12g", s->name,
					 cfg->tags[ti].name, back, vals[ti]);
		}
	}
}

static void test_signal_to_tag_inverts_point_from_tags(void **state)
{
	(void)state;
	struct fg_config *demo = load_path(DEMO_INI);
	struct fg_config *small = load_small();
	check_inverse(demo);
	check_inverse(small);
	free(demo);
	free(small);
}

static void test_values_stay_within_tag_ranges(void **state)
{
	(void)state;
	struct fg_config *cfg = load_path(DEMO_INI);
	for (int k = 0; k < SCENARIO_KIND_COUNT; k++) {
		struct series *s = run_series(cfg, opts_of((enum scenario_kind)k, 3, NAN));
		for (size_t r = 0; r < s->row_count; r++)
			for (unsigned i = 0; i < cfg->tag_count; i++) {
				double v = at(s, r, (int)i);
				const struct tag_cfg *t = &cfg->tags[i];
				if (isfinite(v) && ((isfinite(t->min) && v < t->min) ||
						    (isfinite(t->max) && v > t->max)))
					fail_msg("%s: %s = %g outside %g..%g", scenario_name(k),
						 t->name, v, t->min, t->max);
			}
		series_free(s);
	}
	free(cfg);
}

/* Steady data must not trip the demo config's process alarms: each row,
 * read back as the engine reads it, stays below every high alarm on
 * flood_pct / flood_index (taking the larger of flood_pct and dp_flood_pct,
 * the model inputs of flood_index) and above every low alarm on weep_pct,
 * and no transmitter saturates. Instantaneous values, no on-delay, so this
 * is stricter than the engine. */
static void test_steady_stays_clear_of_the_config_alarms(void **state)
{
	(void)state;
	struct fg_config *cfg = load_path(DEMO_INI);
	struct series *s = run_series(cfg, opts_of(SCENARIO_STEADY, 1, NAN));
	for (size_t r = 0; r < s->row_count; r++)
		for (unsigned si = 0; si < cfg->section_count; si++) {
			struct section_point p;
			struct section_result res;
			point_from_tags(cfg, si, &s->v[r * s->tag_count], &p);
			section_eval(&cfg->sections[si].geom, &cfg->sections[si].props, &p, &res);
			double fi = fmax(res.v[RF_FLOOD_PCT], res.v[RF_DP_FLOOD_PCT]);
			for (unsigned a = 0; a < cfg->alarm_count; a++) {
				const struct alarm_cfg *al = &cfg->alarms[a];
				if (al->section_index != si)
					continue;
				bool high = al->kind == ALARM_KIND_HIGH || al->kind == ALARM_KIND_HIGH_HIGH;
				if (high && (al->field == RF_FLOOD_PCT || al->field == RF_FLOOD_INDEX) &&
				    !(fi < al->setpoint))
					fail_msg("row %zu: %s at %g", r, al->name, fi);
				if (al->kind == ALARM_KIND_LOW && al->field == RF_WEEP_PCT &&
				    !(res.v[RF_WEEP_PCT] > al->setpoint))
					fail_msg("row %zu: %s at %g", r, al->name, res.v[RF_WEEP_PCT]);
			}
		}
	for (unsigned i = 0; i < cfg->tag_count; i++)
		assert_int_equal(s->sc->tag[i].clip_count, 0);
	series_free(s);
	free(cfg);
}

/* Steady means sit at the design point: every polled tag a section reads
 * (DP aside: it comes from the model) averages within 3 % of its nominal in
 * SI (absolute pressure, kelvin). The drifts are 1 % at most (1 sigma) with
 * a 30-60 min time constant, so over 4 h the mean is within about 0.5 %;
 * 3 % leaves room without hiding a wrong unit or density (10 % or more). */
static void test_steady_means_sit_at_the_design_point(void **state)
{
	(void)state;
	struct fg_config *cfg = load_path(DEMO_INI);
	struct series *s = run_series(cfg, opts_of(SCENARIO_STEADY, 5, NAN));
	int checked = 0;
	for (unsigned i = 0; i < cfg->tag_count; i++) {
		const struct scenario_tag *t = &s->sc->tag[i];
		if (!t->polled || t->signal < 0 || t->signal == SIGNAL_DP)
			continue;
		double nom = config_tag_to_si(&cfg->tags[i], cfg->tags[i].nominal);
		double m = mean_si(cfg, s, (int)i, INT64_MIN, INT64_MAX);
		if (!(fabs(m / nom - 1.0) <= 0.03))
			fail_msg("%s: mean %g SI, nominal %g SI", cfg->tags[i].name, m, nom);
		checked++;
	}
	assert_true(checked >= 12);
	series_free(s);
	free(cfg);
}

/* The plant DP of a tray section is the model DP at the design point x 1.1.
 * Mean of the first 10 min (300 rows: noise 1.5 %/sqrt(300) = 0.1 %);
 * the gas drift grows from 0 to about 0.7 % (1 sigma) in 10 min and the DP
 * goes with about its square, 1.4 %; tolerance 5 %, over 3 sigma. */
static void test_tray_dp_is_the_model_dp_times_the_plant_factor(void **state)
{
	(void)state;
	struct fg_config *cfg = load_path(DEMO_INI);
	int si = section_of(cfg, SECTION_TRAY);
	const struct section_cfg *sec = &cfg->sections[si];
	struct series *s = run_series(cfg, opts_of(SCENARIO_STEADY, 1, 1.0));
	double vals[FG_TAGS_MAX];
	for (unsigned i = 0; i < cfg->tag_count; i++)
		vals[i] = isfinite(cfg->tags[i].fixed_value) ? cfg->tags[i].fixed_value
							     : cfg->tags[i].nominal;
	struct section_point p;
	struct section_result res;
	point_from_tags(cfg, (unsigned)si, vals, &p);
	p.dp_pa = NAN;
	section_eval(&sec->geom, &sec->props, &p, &res);
	assert_true(isfinite(res.v[RF_DP_MODEL_PA]));
	double m = mean_si(cfg, s, sec->signal[SIGNAL_DP], s->t_ms[0], s->t_ms[0] + 600000);
	double ratio = m / res.v[RF_DP_MODEL_PA];
	if (!(fabs(ratio - 1.1) <= 0.05 * 1.1))
		fail_msg("DP %g Pa, model %g Pa, ratio %g", m, res.v[RF_DP_MODEL_PA], ratio);
	series_free(s);
	free(cfg);
}

static void test_flood_point_comes_after_the_steady_hours(void **state)
{
	(void)state;
	struct fg_config *cfg = load_path(DEMO_INI);
	struct series *s = run_series(cfg, opts_of(SCENARIO_FLOOD, 1, NAN));
	const int64_t t0 = SCENARIO_START_DEFAULT_MS;
	const enum section_type types[] = {SECTION_TRAY, SECTION_PACKED};
	for (int j = 0; j < 2; j++) {
		const struct scenario_section *sec = &s->sc->sec[section_of(cfg, types[j])];
		assert_true(sec->flood_t_ms != SCENARIO_T_NONE);
		assert_true(sec->flood_t_ms > t0 + 2 * HOUR_MS);
		assert_true(sec->peak_t_ms > sec->flood_t_ms);
		assert_true(sec->recovered_t_ms > sec->peak_t_ms);
		assert_true(sec->recovered_t_ms < t0 + 6 * HOUR_MS);
		assert_true(sec->peak_flood_pct >= 100.0);
	}
	/* The spray and bubble sections carry no upset. */
	assert_true(s->sc->sec[section_of(cfg, SECTION_SPRAY)].flood_t_ms == SCENARIO_T_NONE);
	assert_true(s->sc->sec[section_of(cfg, SECTION_BUBBLE)].peak_load == 1.0);
	/* Before 2 h the rows are the steady rows of the same seed; 10 min into
	 * the ramp the gas flows have moved away from them. */
	struct series *st = run_series(cfg, opts_of(SCENARIO_STEADY, 1, 2.5));
	size_t ramp_row = (size_t)(2 * 3600 / PERIOD_S);
	assert_memory_equal(s->v, st->v, ramp_row * s->tag_count * sizeof(double));
	size_t r = ramp_row + (size_t)(600 / PERIOD_S);
	int gas = cfg->sections[section_of(cfg, SECTION_TRAY)].signal[SIGNAL_GAS_FLOW];
	assert_true(at(s, r, gas) > at(st, r, gas));
	series_free(st);
	series_free(s);
	free(cfg);
}

/* Past flooding the DP must grow faster than the square of the gas load
 * (below loading it grows with about the square: common practice). Means
 * over the first 10 min and over the 20 min hold at the peak load, with
 * the DP transmitters' ranges opened so that saturation does not cap them. */
static void test_flood_dp_rises_faster_than_gas_load_squared(void **state)
{
	(void)state;
	struct fg_config *cfg = load_path(DEMO_INI);
	const enum section_type types[] = {SECTION_TRAY, SECTION_PACKED};
	for (int j = 0; j < 2; j++)
		cfg->tags[cfg->sections[section_of(cfg, types[j])].signal[SIGNAL_DP]].max = NAN;
	struct series *s = run_series(cfg, opts_of(SCENARIO_FLOOD, 1, NAN));
	for (int j = 0; j < 2; j++) {
		int si = section_of(cfg, types[j]);
		const struct section_cfg *c = &cfg->sections[si];
		const struct scenario_section *sec = &s->sc->sec[si];
		int64_t t0 = s->t_ms[0], tp = sec->peak_t_ms;
		double g0 = mean_si(cfg, s, c->signal[SIGNAL_GAS_FLOW], t0, t0 + 600000);
		double g1 = mean_si(cfg, s, c->signal[SIGNAL_GAS_FLOW], tp, tp + 1200000);
		double d0 = mean_si(cfg, s, c->signal[SIGNAL_DP], t0, t0 + 600000);
		double d1 = mean_si(cfg, s, c->signal[SIGNAL_DP], tp, tp + 1200000);
		assert_true(g1 / g0 > 1.2);
		if (!(d1 / d0 > (g1 / g0) * (g1 / g0)))
			fail_msg("%s: gas x%.3g, DP x%.3g", c->name, g1 / g0, d1 / d0);
		assert_int_equal(s->sc->tag[c->signal[SIGNAL_DP]].clip_count, 0);
	}
	series_free(s);
	free(cfg);
}

/* Coefficient of variation of row-to-row DP differences (drift cancels):
 * near flood the DP gets noisier than at the design point. */
static double dp_noise(const struct fg_config *cfg, const struct series *s, int tag,
		       int64_t from_ms, int64_t to_ms)
{
	double sum2 = 0.0, sum = 0.0;
	size_t n = 0;
	for (size_t r = 1; r < s->row_count; r++)
		if (s->t_ms[r] >= from_ms && s->t_ms[r] < to_ms) {
			double a = config_tag_to_si(&cfg->tags[tag], at(s, r, tag));
			double b = config_tag_to_si(&cfg->tags[tag], at(s, r - 1, tag));
			sum2 += (a - b) * (a - b);
			sum += a;
			n++;
		}
	assert_true(n > 10);
	return sqrt(sum2 / (double)n / 2.0) / (sum / (double)n);
}

static void test_flood_dp_gets_noisier_near_flood(void **state)
{
	(void)state;
	struct fg_config *cfg = load_path(DEMO_INI);
	int si = section_of(cfg, SECTION_PACKED);
	int tag = cfg->sections[si].signal[SIGNAL_DP];
	cfg->tags[tag].max = NAN;
	struct series *s = run_series(cfg, opts_of(SCENARIO_FLOOD, 1, NAN));
	int64_t t0 = s->t_ms[0], tp = s->sc->sec[si].peak_t_ms;
	double cv0 = dp_noise(cfg, s, tag, t0, t0 + HOUR_MS);
	double cv1 = dp_noise(cfg, s, tag, tp, tp + 1200000);
	/* Design: CV 1.5 % (about 0.5 % of drift and load change mixed in);
	 * at f >= 1.0 it is 6 % or more: demand at least twice. */
	assert_true(cv0 > 0.010);
	assert_true(cv0 < 0.020);
	assert_true(cv1 > 2.0 * cv0);
	series_free(s);
	free(cfg);
}

static void test_weep_takes_weep_pct_below_100_and_back(void **state)
{
	(void)state;
	struct fg_config *cfg = load_path(DEMO_INI);
	int si = section_of(cfg, SECTION_TRAY);
	const struct section_cfg *c = &cfg->sections[si];
	struct series *s = run_series(cfg, opts_of(SCENARIO_WEEP, 1, NAN));
	const struct scenario_section *sec = &s->sc->sec[si];
	const int64_t t0 = SCENARIO_START_DEFAULT_MS;
	assert_true(sec->min_weep_pct < 100.0);
	assert_true(sec->weep_below_t_ms > t0 + HOUR_MS);
	assert_true(sec->weep_below_t_ms < t0 + 3 * HOUR_MS);
	assert_true(sec->weep_last_below_t_ms > t0 + 3 * HOUR_MS + HOUR_MS / 2);
	assert_true(sec->weep_last_below_t_ms < t0 + 5 * HOUR_MS);
	assert_true(sec->recovered_t_ms == t0 + 5 * HOUR_MS);
	/* Load at the bottom: 35 % of design, 3 % for the drift (see the steady means). */
	double nom = config_tag_to_si(&cfg->tags[c->signal[SIGNAL_GAS_FLOW]],
				      cfg->tags[c->signal[SIGNAL_GAS_FLOW]].nominal);
	double g = mean_si(cfg, s, c->signal[SIGNAL_GAS_FLOW], t0 + 3 * HOUR_MS,
			   t0 + 3 * HOUR_MS + HOUR_MS / 2);
	assert_true(fabs(g / nom - 0.35) <= 0.03 * 0.35);
	series_free(s);
	free(cfg);
}

static void test_frozen_window_repeats_one_value_exactly(void **state)
{
	(void)state;
	struct fg_config *cfg = load_path(DEMO_INI);
	struct series *s = run_series(cfg, opts_of(SCENARIO_FROZEN, 1, NAN));
	int tag = s->sc->upset_tag;
	assert_true(tag == cfg->sections[section_of(cfg, SECTION_PACKED)].signal[SIGNAL_DP]);
	const int64_t t0 = SCENARIO_START_DEFAULT_MS;
	double frozen = NAN, before = NAN;
	size_t in_window = 0, changes_outside = 0;
	for (size_t r = 0; r < s->row_count; r++) {
		double v = at(s, r, tag);
		bool in = s->t_ms[r] >= t0 + 90 * 60000LL && s->t_ms[r] < t0 + 150 * 60000LL;
		if (in) {
			if (in_window++ == 0)
				frozen = v;
			assert_true(v == frozen);
		} else {
			changes_outside += r > 0 && v != at(s, r - 1, tag);
			if (s->t_ms[r] < t0 + 90 * 60000LL)
				before = v;
		}
	}
	assert_int_equal(in_window, 1800);
	assert_true(frozen == before); /* the last value before the window */
	assert_true(changes_outside > s->row_count - in_window - 10);
	series_free(s);
	free(cfg);
}

/* frozen and gap are the steady run of the same seed with the upset laid
 * over it: outside their windows the bytes are the same. */
static void test_upsets_leave_the_steady_rows_alone(void **state)
{
	(void)state;
	struct fg_config *cfg = load_path(DEMO_INI);
	struct series *st = run_series(cfg, opts_of(SCENARIO_STEADY, 9, NAN));
	struct series *fr = run_series(cfg, opts_of(SCENARIO_FROZEN, 9, NAN));
	struct series *gp = run_series(cfg, opts_of(SCENARIO_GAP, 9, NAN));
	size_t differ_fr = 0, differ_gp = 0;
	for (size_t r = 0; r < st->row_count; r++)
		for (size_t i = 0; i < st->tag_count; i++) {
			double a = st->v[r * st->tag_count + i];
			double b = fr->v[r * st->tag_count + i], c = gp->v[r * st->tag_count + i];
			differ_fr += !(a == b || (isnan(a) && isnan(b)));
			differ_gp += !(a == c || (isnan(a) && isnan(c)));
		}
	/* frozen: at most the 1800 frozen rows of one tag. gap: 300 rows of
	 * every polled tag plus 60 rows of one. */
	size_t polled = 0;
	for (unsigned i = 0; i < cfg->tag_count; i++)
		polled += cfg->tags[i].source_index >= 0;
	assert_true(differ_fr > 0);
	assert_true(differ_fr <= 1800);
	assert_int_equal(differ_gp, 300 * polled + 60);
	series_free(st);
	series_free(fr);
	series_free(gp);
	free(cfg);
}

/* Counts the empty fields of one CSV line of len bytes. */
static int empty_fields(const char *line, size_t len)
{
	int n = 0;
	for (size_t i = 0; i < len; i++)
		n += line[i] == ',' && (i + 1 == len || line[i + 1] == ',');
	return n;
}

static void test_gap_rows_have_empty_fields(void **state)
{
	(void)state;
	struct fg_config *cfg = load_path(DEMO_INI);
	size_t size;
	char *text = run_text(cfg, opts_of(SCENARIO_GAP, 1, NAN), &size);
	int columns = 0;
	for (unsigned i = 0; i < cfg->tag_count; i++)
		columns += cfg->tags[i].source_index >= 0;
	int gas_col = 0; /* column of the first section's gas flow, 1-based after time */
	for (int i = 0; i <= cfg->sections[0].signal[SIGNAL_GAS_FLOW]; i++)
		gas_col += cfg->tags[i].source_index >= 0;
	size_t all = 0, one = 0, full = 0;
	const char *line = strchr(text, '\n') + 1;
	while (*line) {
		size_t len = strcspn(line, "\n");
		int64_t t;
		assert_int_equal(timefmt_parse(line, 20, &t), 0);
		int64_t m = (t - SCENARIO_START_DEFAULT_MS) / 60000;
		int e = empty_fields(line, len);
		if (m >= 60 && m < 70) {
			assert_int_equal(e, columns);
			all++;
		} else if (m >= 150 && m < 152) {
			assert_int_equal(e, 1);
			const char *f = line;
			for (int c = 0; c < gas_col; c++)
				f = strchr(f, ',') + 1;
			assert_true(*f == ',');
			one++;
		} else {
			assert_int_equal(e, 0);
			full++;
		}
		line += len + 1;
	}
	assert_int_equal(all, 300);
	assert_int_equal(one, 60);
	assert_int_equal(full, 7200 - 360);
	free(text);
	free(cfg);
}

/* Bubble column: the tap DP is the head of the aerated liquid,
 * dp = (1 - eps) rho_l g dz (hydrostatics; the same relation the engine
 * inverts for gas_holdup_dp_frac). So the engine's holdup from the generated
 * DP must match the correlation holdup: mean over the first 10 min within
 * 0.01 absolute (DP noise 1.5 % / sqrt(300) on (1 - eps) ~ 0.9 gives
 * 0.001; the level noise does not enter the tap DP). */
static void test_bubble_dp_gives_back_the_correlation_holdup(void **state)
{
	(void)state;
	struct fg_config *cfg = load_path(DEMO_INI);
	unsigned si = (unsigned)section_of(cfg, SECTION_BUBBLE);
	struct series *s = run_series(cfg, opts_of(SCENARIO_STEADY, 1, 1.0));
	double sum_dp = 0.0, sum_corr = 0.0;
	for (size_t r = 0; r < 300; r++) {
		struct section_point p;
		struct section_result res;
		point_from_tags(cfg, si, &s->v[r * s->tag_count], &p);
		section_eval(&cfg->sections[si].geom, &cfg->sections[si].props, &p, &res);
		sum_dp += res.v[RF_GAS_HOLDUP_DP_FRAC];
		sum_corr += res.v[RF_GAS_HOLDUP_FRAC];
	}
	double eps_dp = sum_dp / 300.0, eps_corr = sum_corr / 300.0;
	assert_true(eps_corr > 0.01);
	if (!(fabs(eps_dp - eps_corr) <= 0.01))
		fail_msg("holdup from DP %g, correlation %g", eps_dp, eps_corr);
	series_free(s);
	free(cfg);
}

/* The file reads back through the project's historian CSV reader with the
 * values generated: times exact, missing fields missing, numbers within
 * what %.6g keeps (6 significant digits: 5e-6 relative at most). */
static void test_csv_reads_back_through_csvread(void **state)
{
	(void)state;
	struct fg_config *cfg = load_path(DEMO_INI);
	char dir[] = "/tmp/fgsimcsv-XXXXXX";
	assert_non_null(mkdtemp(dir));
	char path[64];
	snprintf(path, sizeof(path), "%s/gap.csv", dir);
	struct scenario_opts o = opts_of(SCENARIO_GAP, 4, NAN);
	struct scenario *sc = malloc(sizeof(*sc));
	assert_non_null(sc);
	assert_int_equal(scenario_init(sc, cfg, &o, stderr), 0);
	FILE *f = fopen(path, "w");
	assert_non_null(f);
	assert_int_equal(scenario_run(sc, f), 0);
	fclose(f);
	free(sc);
	struct series *s = run_series(cfg, o);
	const char *names[FG_TAGS_MAX];
	int tag_of[FG_TAGS_MAX];
	unsigned n = 0;
	for (unsigned i = 0; i < cfg->tag_count; i++)
		if (cfg->tags[i].source_index >= 0) {
			tag_of[n] = (int)i;
			names[n++] = cfg->tags[i].name;
		}
	struct csvread r = {0};
	char err[256];
	assert_int_equal(csvread_open(&r, path, err, sizeof(err)), 0);
	assert_int_equal(csvread_bind(&r, names, n, err, sizeof(err)), 0);
	double vals[FG_TAGS_MAX];
	int64_t t;
	size_t row = 0;
	while (csvread_next(&r, &t, vals, n) == 1) {
		assert_true(row < s->row_count);
		assert_true(t == s->t_ms[row]);
		for (unsigned j = 0; j < n; j++) {
			double want = at(s, row, tag_of[j]);
			if (isnan(want)) {
				assert_true(isnan(vals[j]));
				continue;
			}
			if (!(fabs(vals[j] - want) <= 5e-6 * fabs(want)))
				fail_msg("row %zu %s: read %.9g, generated %.9g", row, names[j],
					 vals[j], want);
		}
		row++;
	}
	assert_int_equal(row, s->row_count);
	assert_int_equal(csvread_stats(&r)->rows_malformed, 0);
	csvread_close(&r);
	unlink(path);
	rmdir(dir);
	series_free(s);
	free(cfg);
}

/* ------------------------------------------------------- command line */

static void test_command_refuses_bad_arguments(void **state)
{
	(void)state;
	char *a1[] = {"simulate", "-c", DEMO_INI, "--scenario", "meltdown", NULL};
	char *a2[] = {"simulate", "--scenario", "steady", NULL};
	char *a3[] = {"simulate", "-c", DEMO_INI, "--scenario", "steady", "--seed", "x1", NULL};
	char *a4[] = {"simulate", "-c", DEMO_INI, "--scenario", "gap", "--hours", "0.5", NULL};
	char *a5[] = {"simulate", "-c", "/nonexistent.ini", "--scenario", "steady", NULL};
	char *a6[] = {"simulate", "-c", DEMO_INI, "--scenario", "steady", "--start", "noon",
		      NULL};
	assert_int_equal(cmd_simulate(5, a1), EXIT_USAGE);
	assert_int_equal(cmd_simulate(3, a2), EXIT_USAGE);
	assert_int_equal(cmd_simulate(7, a3), EXIT_USAGE);
	assert_int_equal(cmd_simulate(7, a4), EXIT_USAGE);
	assert_int_equal(cmd_simulate(5, a5), EXIT_USAGE);
	assert_int_equal(cmd_simulate(7, a6), EXIT_USAGE);
}

/* The command writes what scenario_run writes for the same options. */
static void test_command_writes_the_scenario_to_out(void **state)
{
	(void)state;
	char dir[] = "/tmp/fgsimcmd-XXXXXX";
	assert_non_null(mkdtemp(dir));
	char out[64];
	snprintf(out, sizeof(out), "%s/d.csv", dir);
	char *argv[] = {"simulate", "-c", DEMO_INI, "--scenario", "flood", "--out", out,
			"--seed", "42", "--hours", "0.5", "--period-s", "2",
			"--start", "2026-04-01T00:00:00Z", NULL};
	assert_int_equal(cmd_simulate(15, argv), 0);
	struct fg_config *cfg = load_path(DEMO_INI);
	struct scenario_opts o = opts_of(SCENARIO_FLOOD, 42, 0.5);
	assert_int_equal(timefmt_parse("2026-04-01T00:00:00Z", 20, &o.start_t_ms), 0);
	size_t want_size;
	char *want = run_text(cfg, o, &want_size);
	FILE *f = fopen(out, "rb");
	assert_non_null(f);
	char *got = malloc(want_size + 1);
	assert_non_null(got);
	size_t got_size = fread(got, 1, want_size + 1, f);
	fclose(f);
	assert_int_equal(got_size, want_size);
	assert_memory_equal(got, want, want_size);
	assert_memory_equal(strchr(want, '\n') + 1, "2026-04-01T00:00:00Z,", 21);
	unlink(out);
	rmdir(dir);
	free(got);
	free(want);
	free(cfg);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_same_seed_gives_same_bytes),
		cmocka_unit_test(test_different_seed_gives_different_bytes),
		cmocka_unit_test(test_header_lists_polled_tags_in_config_order),
		cmocka_unit_test(test_rows_span_the_hours_at_the_period),
		cmocka_unit_test(test_signal_to_tag_inverts_point_from_tags),
		cmocka_unit_test(test_values_stay_within_tag_ranges),
		cmocka_unit_test(test_steady_stays_clear_of_the_config_alarms),
		cmocka_unit_test(test_steady_means_sit_at_the_design_point),
		cmocka_unit_test(test_tray_dp_is_the_model_dp_times_the_plant_factor),
		cmocka_unit_test(test_flood_point_comes_after_the_steady_hours),
		cmocka_unit_test(test_flood_dp_rises_faster_than_gas_load_squared),
		cmocka_unit_test(test_flood_dp_gets_noisier_near_flood),
		cmocka_unit_test(test_weep_takes_weep_pct_below_100_and_back),
		cmocka_unit_test(test_frozen_window_repeats_one_value_exactly),
		cmocka_unit_test(test_upsets_leave_the_steady_rows_alone),
		cmocka_unit_test(test_gap_rows_have_empty_fields),
		cmocka_unit_test(test_bubble_dp_gives_back_the_correlation_holdup),
		cmocka_unit_test(test_csv_reads_back_through_csvread),
		cmocka_unit_test(test_command_refuses_bad_arguments),
		cmocka_unit_test(test_command_writes_the_scenario_to_out),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
