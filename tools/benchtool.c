/*
 * benchtool.c - the timed stages of `make bench` that the floodgauge
 * command line cannot isolate (built against build/libfg.a).
 *
 *   benchtool read CONFIG DATA.csv   the reading stage alone: every row's
 *                                    time and numbers parsed (histread), no
 *                                    engine; prints rows and seconds
 *   benchtool engine CONFIG...       the engine from a tight loop over
 *                                    pre-parsed samples: per section, the
 *                                    models alone (section_eval_warm) and the
 *                                    engine's whole work for it (its tags,
 *                                    models, DP exponent, soft sensors:
 *                                    engine_premodel with that section), and
 *                                    engine_step per row and per
 *                                    section-sample (with the alarms)
 *
 *   benchtool fmt CONFIG             results.csv's formatting alone, on the
 *                                    results the engine gives for the
 *                                    pre-parsed samples: numfmt_sig12 per
 *                                    number (results.csv's), numfmt_full
 *                                    (JSON's) and its printf definition, and
 *                                    the replay's results writer per row in
 *                                    one thread, written to /dev/null
 *
 * Samples for `engine` and `fmt` swing each tag between 0.6 and 1.05 of its nominal
 * value over an hour with 1 % noise, from a fixed seed: the steady load a
 * monitor mostly sees, with the excursions that move the solvers.
 */
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "config.h"
#include "engine.h"
#include "histread.h"
#include "numfmt.h"
#include "point.h"
#include "results.h"

#define SAMPLES 20000
/* Each figure is the best of this many timings: this VM shares its host,
 * and a slow spell of a second or two must not be the figure. */
#define BENCH_REPS 15

static double now_s(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (double)ts.tv_sec + (double)ts.tv_nsec * 1e-9;
}

static struct fg_config *load(const char *path)
{
	struct fg_config *cfg = malloc(sizeof *cfg);
	if (cfg == NULL || config_load(cfg, path, stderr) != 0) {
		fprintf(stderr, "benchtool: cannot load %s\n", path);
		exit(2);
	}
	return cfg;
}

static int cmd_read(const char *cfg_path, const char *data)
{
	struct fg_config *cfg = load(cfg_path);
	static struct histread h;
	static double values[FG_TAGS_MAX];
	static enum tag_status status[FG_TAGS_MAX];
	struct histread_opts o = {0};
	char err[512];
	double t0 = now_s();
	if (histread_init(&h, cfg, &o, err, sizeof err) != 0 ||
	    histread_open(&h, data, stderr, err, sizeof err) != 0) {
		fprintf(stderr, "benchtool: %s\n", err);
		return 2;
	}
	int64_t t_ms;
	unsigned long long rows = 0;
	double check = 0.0;
	int rc;
	while ((rc = histread_next(&h, &t_ms, values, status)) == 1) {
		rows++;
		check += values[0];
	}
	double dt = now_s() - t0;
	histread_fini(&h);
	printf("%llu %.6f %.3f\n", rows, dt, check);
	free(cfg);
	return rc < 0;
}

static unsigned long long rng = 0x9e3779b97f4a7c15ull;

static double uniform(void)
{
	rng ^= rng >> 12;
	rng ^= rng << 25;
	rng ^= rng >> 27;
	return (double)((rng * 2685821657736338717ull) >> 11) * 0x1p-53;
}

static const char *label(const struct section_cfg *s)
{
	static char buf[64];
	const char *t = config_section_type_name(s->geom.type);
	if (s->geom.type == SECTION_PACKED)
		snprintf(buf, sizeof buf, "%s (%s)", t,
			 s->geom.packed.flood_method == PACKED_FLOOD_STICHLMAIR ? "stichlmair"
										: "billet-schultes");
	else if (s->geom.type == SECTION_TRAY)
		snprintf(buf, sizeof buf, "%s (%s)", t,
			 s->geom.tray.flood_method == TRAY_FLOOD_FAIR ? "fair" : "kister-haas");
	else
		snprintf(buf, sizeof buf, "%s", t);
	return buf;
}

static void fill_samples(const struct fg_config *cfg, double *vals)
{
	for (unsigned i = 0; i < SAMPLES; i++) {
		double load = 0.825 + 0.225 * sin(2.0 * 3.141592653589793 * i / 3600.0);
		for (unsigned t = 0; t < cfg->tag_count; t++) {
			const struct tag_cfg *tc = &cfg->tags[t];
			double nom = isfinite(tc->nominal) ? tc->nominal : 1.0;
			vals[(size_t)i * cfg->tag_count + t] =
				tc->source_index < 0 ? tc->fixed_value
						     : nom * load * (1.0 + 0.01 * (uniform() - 0.5));
		}
	}
}

/* Per section type: the sum of the evaluation times seen and how many
 * sections of it were timed (a packed type with both flood methods, say). */
static double type_ns[SECTION_TYPE_COUNT], type_engine_ns[SECTION_TYPE_COUNT];
static unsigned type_n[SECTION_TYPE_COUNT];

/* The engine's work for section si alone per sample: its tags checked, its
 * models, DP exponent and soft sensors (engine_premodel with one section:
 * the engine_step of a one-section plant without the alarms), best of BENCH_REPS. */
static double engine_section_ns(const struct fg_config *cfg, unsigned si, const double *vals,
				const enum tag_status *status)
{
	static struct engine e;
	struct engine_premodel out;
	double best = INFINITY, sink = 0.0;
	for (int rep = 0; rep < BENCH_REPS; rep++) {
		engine_init(&e, cfg);
		int64_t t_ms = 1767225600000;
		double t0 = now_s();
		for (unsigned i = 0; i < SAMPLES; i++, t_ms += 1000) {
			engine_premodel(&e, t_ms, vals + (size_t)i * cfg->tag_count, status,
					1ull << si, &out);
			sink += out.v[0]; /* flood_pct, the first field of every type */
		}
		best = fmin(best, now_s() - t0);
	}
	if (sink == 1.0) /* keeps the loop */
		puts("");
	return best / SAMPLES * 1e9;
}

static double bench_sections(const struct fg_config *cfg, const double *vals,
			     const enum tag_status *status, double *sum_ns)
{
	static struct section_point pts[SAMPLES];
	double types = 0.0;
	for (unsigned si = 0; si < cfg->section_count; si++) {
		const struct section_cfg *s = &cfg->sections[si];
		for (unsigned i = 0; i < SAMPLES; i++)
			point_from_tags(cfg, si, vals + (size_t)i * cfg->tag_count, &pts[i]);
		struct solve_warm w;
		solve_warm_clear(&w);
		struct section_result r;
		double sink = 0.0, best = INFINITY, finite = 0.0;
		for (int rep = 0; rep < BENCH_REPS; rep++) {
			double t0 = now_s();
			for (unsigned i = 0; i < SAMPLES; i++) {
				section_eval_warm(&s->geom, &s->props, &pts[i], &r, &w);
				if (isfinite(r.v[RF_FLOOD_PCT])) {
					sink += r.v[RF_FLOOD_PCT];
					finite++;
				}
			}
			best = fmin(best, now_s() - t0);
		}
		double ns = best / SAMPLES * 1e9;
		double eng_ns = engine_section_ns(cfg, si, vals, status);
		printf("  section %-10s %-24s %5.0f ns models, %5.0f ns engine", s->name, label(s),
		       ns, eng_ns);
		type_engine_ns[s->geom.type] += eng_ns;
		if (finite > 0.0)
			printf(" (flood %% %.1f)\n", sink / finite);
		else
			printf(" (no flood %%)\n");
		*sum_ns += ns;
		types += 1.0;
		type_ns[s->geom.type] += ns;
		type_n[s->geom.type]++;
	}
	return types;
}

static int cmd_engine(int argc, char **argv)
{
	double sum_ns = 0.0, n = 0.0;
	for (int a = 0; a < argc; a++) {
		struct fg_config *cfg = load(argv[a]);
		struct engine *e = malloc(sizeof *e);
		double *vals = malloc(sizeof(double) * SAMPLES * cfg->tag_count);
		static enum tag_status status[FG_TAGS_MAX];
		if (e == NULL || vals == NULL)
			return 1;
		for (unsigned t = 0; t < cfg->tag_count; t++)
			status[t] = TAG_STATUS_FRESH;
		fill_samples(cfg, vals);
		printf("%s (%u sections, %u alarms, %d pre-parsed samples):\n", argv[a],
		       cfg->section_count, cfg->alarm_count, SAMPLES);
		n += bench_sections(cfg, vals, status, &sum_ns);
		engine_init(e, cfg);
		double best = INFINITY;
		int64_t t_ms = 1767225600000;
		for (int rep = 0; rep < BENCH_REPS; rep++) {
			double t0 = now_s();
			for (unsigned i = 0; i < SAMPLES; i++) {
				engine_step(e, t_ms, vals + (size_t)i * cfg->tag_count, status);
				engine_events_clear(e);
				t_ms += 1000;
			}
			best = fmin(best, now_s() - t0);
		}
		double row_ns = best / SAMPLES * 1e9;
		printf("  engine_step (validate, models, soft sensors, alarms): %.0f ns per row, "
		       "%.0f ns per section-sample\n", row_ns, row_ns / cfg->section_count);
		free(vals);
		free(e);
		free(cfg);
	}
	printf("average over the %.0f sections above: %.0f ns per section evaluation\n", n,
	       sum_ns / n);
	/* Each type counts once (the mean of its sections), whatever the mix. */
	double by_type = 0.0, by_type_engine = 0.0;
	unsigned types = 0;
	for (unsigned t = 0; t < SECTION_TYPE_COUNT; t++)
		if (type_n[t] > 0) {
			by_type += type_ns[t] / type_n[t];
			by_type_engine += type_engine_ns[t] / type_n[t];
			types++;
		}
	printf("average over the %u section types: %.0f ns per section evaluation (models);"
	       " %.0f ns per section-sample in the engine (tags, models, soft sensors)\n",
	       types, by_type / types, by_type_engine / types);
	return 0;
}

static int cmd_fmt(const char *cfg_path)
{
	struct fg_config *cfg = load(cfg_path);
	unsigned sc = cfg->section_count;
	struct engine *e = malloc(sizeof *e);
	double *vals = malloc(sizeof(double) * SAMPLES * cfg->tag_count);
	struct section_result *res = malloc(sizeof *res * SAMPLES * (sc > 0 ? sc : 1));
	double *nums = malloc(sizeof(double) * SAMPLES * (sc > 0 ? sc : 1) * RF_COUNT);
	FILE *null = fopen("/dev/null", "w");
	if (e == NULL || vals == NULL || res == NULL || nums == NULL || null == NULL)
		return 1;
	static enum tag_status status[FG_TAGS_MAX];
	for (unsigned t = 0; t < cfg->tag_count; t++)
		status[t] = TAG_STATUS_FRESH;
	fill_samples(cfg, vals);
	engine_init(e, cfg);
	const int64_t t0_ms = 1767225600000;
	size_t nn = 0; /* the numbers results.csv writes: the fields that apply, not empty */
	for (unsigned i = 0; i < SAMPLES; i++) {
		engine_step(e, t0_ms + 1000 * (int64_t)i, vals + (size_t)i * cfg->tag_count, status);
		engine_events_clear(e);
		for (unsigned s = 0; s < sc; s++) {
			res[(size_t)i * sc + s] = e->sec[s].r;
			for (int f = 0; f < RF_COUNT; f++)
				if (section_type_has_field(cfg->sections[s].geom.type, f) &&
				    isfinite(e->sec[s].r.v[f]))
					nums[nn++] = e->sec[s].r.v[f];
		}
	}
	char buf[NUMFMT_FULL_SIZE];
	size_t sink = 0;
	double best = INFINITY, best_printf = INFINITY, best_row = INFINITY;
	double best12 = INFINITY;
	for (int rep = 0; rep < BENCH_REPS; rep++) {
		double t0 = now_s();
		for (size_t k = 0; k < nn; k++)
			sink += (size_t)numfmt_full(nums[k], buf, sizeof buf);
		best = fmin(best, now_s() - t0);
		t0 = now_s();
		for (size_t k = 0; k < nn; k++)
			sink += (size_t)numfmt_sig12(nums[k], buf, sizeof buf);
		best12 = fmin(best12, now_s() - t0);
	}
	for (int rep = 0; rep < 2; rep++) {
		double t0 = now_s();
		for (size_t k = 0; k < nn; k++)
			sink += (size_t)numfmt_full_printf(nums[k], buf, sizeof buf);
		best_printf = fmin(best_printf, now_s() - t0);
	}
	static struct results_writer w;
	const struct section_result *rp[FG_SECTIONS_MAX];
	for (int rep = 0; rep < BENCH_REPS; rep++) {
		double t0 = now_s();
		if (results_writer_start(&w, null, cfg, false) != 0)
			return 1;
		for (unsigned i = 0; i < SAMPLES; i++) {
			for (unsigned s = 0; s < sc; s++)
				rp[s] = &res[(size_t)i * sc + s];
			if (results_writer_row(&w, t0_ms + 1000 * (int64_t)i, rp) != 0)
				return 1;
		}
		if (results_writer_finish(&w) != 0)
			return 1;
		best_row = fmin(best_row, now_s() - t0);
	}
	printf("%s (%u sections, %d rows, %zu numbers to write):\n", cfg_path, sc, SAMPLES, nn);
	printf("  numfmt_sig12 (results.csv's numbers): %.1f ns per number\n",
	       best12 / (double)nn * 1e9);
	printf("  numfmt_full (JSON's numbers): %.1f ns per number (its printf definition: %.1f ns)\n",
	       best / (double)nn * 1e9, best_printf / (double)nn * 1e9);
	printf("  results writer, one thread, to /dev/null: %.0f ns per row (check %zu)\n",
	       best_row / SAMPLES * 1e9, sink % 1000u);
	fclose(null);
	free(nums);
	free(res);
	free(vals);
	free(e);
	free(cfg);
	return 0;
}

int main(int argc, char **argv)
{
	if (argc == 4 && strcmp(argv[1], "read") == 0)
		return cmd_read(argv[2], argv[3]);
	if (argc >= 3 && strcmp(argv[1], "engine") == 0)
		return cmd_engine(argc - 2, argv + 2);
	if (argc == 3 && strcmp(argv[1], "fmt") == 0)
		return cmd_fmt(argv[2]);
	fprintf(stderr, "usage: benchtool read CONFIG DATA.csv | benchtool engine CONFIG... |"
			" benchtool fmt CONFIG\n");
	return 2;
}
