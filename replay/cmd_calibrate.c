/*
 * cmd_calibrate.c - `floodgauge calibrate`: fits a section's
 * capacity_factor and dp_factor to recorded data of the plant's own column.
 *
 * The data are read with replay's reader and options and run through the
 * same engine, with the section's capacity_factor forced to 1 (the
 * uncalibrated model) and its dp_factor as configured (the start of the
 * online correction). Per row the fit keeps the time, the gas load, the
 * model's gas-capacity flood fraction (trays: jet flood; packed and spray:
 * flood_pct), the measured and the model DP, and what the soft sensors say
 * (the learning gate, the DP's log residual against its learned relation
 * and its standard deviation, the model's DP-load exponent).
 *
 * dp_factor is the mean of measured / model DP over the rows on which the
 * soft sensors learn (steady, normal operation: softsense.h), before the
 * flood onset when there is one; its spread is the standard deviation of
 * those per-row ratios. It needs CAL_DP_ROWS_MIN such rows.
 *
 * The flood onset is --flood-at T when given. Otherwise it is detected: the
 * first row at which, held for CAL_HOLD_S without a break,
 *   (a) the gas load is rising: its log-linear slope over the centred
 *       window of CAL_WINDOW_S is at least CAL_RISE_MIN_PER_H (the load is
 *       not falling, and it moves enough to read a load response), and
 *   (b) the load response breaks: over the same window, d ln DP / d ln G
 *       exceeds its normal value (the learned relation's, corr x model DP)
 *       by more than CAL_EXCESS_SLOPE; it is read as the slope of the DP's
 *       log residual against the relation over the slope of ln G, both
 *       against time (so flow noise does not bias it, and what the model
 *       explains, such as a drifting liquid rate, does not count), and
 *   (c) the DP has left its learned relation: its log residual exceeds
 *       CAL_DEV_SIGMAS standard deviations of the learned scatter.
 * Below flood d ln DP / d ln G is about 1.5 (trays) to 2 (packings); once
 * the column floods liquid accumulates and the DP rises several times faster
 * with load (an excess of 4 is about three times the normal slope). A DP
 * that has only drifted (fouling) fails (b); a steep but in-relation DP
 * (the model's own curvature) fails (b) and (c).
 *
 * capacity_factor is the mean model flood fraction over the rows within
 * CAL_AVG_S of the onset (so the calibrated model reads 100 % there); its
 * spread is the standard deviation of those per-row values.
 */
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "commands.h"
#include "engine.h"
#include "histread.h"
#include "offline.h"
#include "jsonw.h"
#include "timefmt.h"

#define CAL_WINDOW_S 600.0        /* centred slope window, s */
#define CAL_HOLD_S 120.0          /* the onset conditions must hold this long */
#define CAL_RISE_MIN_PER_H 0.02   /* gas load rising by at least 2 %/h of itself */
#define CAL_EXCESS_SLOPE 4.0      /* load response beyond its normal slope by 4 */
#define CAL_DEV_SIGMAS 3.0        /* DP beyond 3 standard deviations of its relation */
#define CAL_AVG_S 60.0            /* capacity_factor: rows within 60 s of the onset */
#define CAL_DP_ROWS_MIN 30        /* dp_factor needs at least this many rows */

struct cal_row {
	int64_t t_ms;
	double ln_g;        /* ln gas load, NAN when none */
	double ln_dp;       /* ln measured DP, NAN when none or saturated */
	double frac;        /* model gas-capacity flood fraction, uncalibrated */
	double ratio;       /* measured / model DP (uncorrected), NAN when none */
	double resid;       /* log residual against the learned relation */
	double sigma;       /* its learned scatter */
	bool learning;      /* the soft sensors learned on this row */
	bool in_service;
};

struct calibrate {
	const char *data_path, *section_name;
	const char *from_text, *to_text, *flood_at_text; /* as given (read in the zone) */
	int64_t from_t_ms, to_t_ms, flood_at_t_ms;
	bool json;
	struct histread_opts hopts;
	struct fg_config *cfg;
	struct engine *eng;
	struct histread hist;
	int si;
	struct cal_row *rows;
	size_t n_rows, cap_rows;
	/* results */
	double capacity, capacity_spread, dp_factor, dp_spread;
	int64_t onset_t_ms;      /* INT64_MIN: none */
	unsigned long long cap_samples, dp_samples;
	const char *why_no_capacity, *why_no_dp;
};

static void calibrate_usage(FILE *f)
{
	fprintf(f,
		"usage: floodgauge calibrate -c FILE DATA.csv --section NAME [--flood-at T]\n"
		"                            [--from T] [--to T] [--tz ZONE] [--json]\n\n"
		"Fits the section's capacity_factor (the plant's real flooding capacity over\n"
		"the model's) and dp_factor (measured over model DP in steady, normal\n"
		"operation) to recorded data of the plant's own column (a historian export,\n"
		"read as `floodgauge replay` reads it). With --flood-at T (the time the\n"
		"operators saw the column flood) capacity_factor is the model's flood fraction\n"
		"around T; without it the flood onset is found in the data from the DP's\n"
		"response to load (see the README). Prints INI lines to paste into\n"
		"[section.NAME], or with --json one object with the keys section,\n"
		"capacity_factor, capacity_factor_spread, dp_factor, dp_factor_spread,\n"
		"flood_onset, onset_method, samples_used. A bubble section has no gas-capacity\n"
		"limit and is refused. --from/--to limit the rows to a time window.\n"
		HISTREAD_USAGE
		"Exit status: 0 something fitted, 1 runtime failure, 2 bad config or data, or\n"
		"nothing could be fitted (the reason is printed).\n");
}

/* Returns 0, -1 after --help, or EXIT_USAGE. */
static int parse_args(struct calibrate *c, int argc, char **argv, const char **cfg_path)
{
	enum { OPT_SECTION = 1000, OPT_FLOOD_AT, OPT_FROM, OPT_TO, OPT_JSON };
	static const struct option opts[] = {{"config", required_argument, NULL, 'c'},
					     {"section", required_argument, NULL, OPT_SECTION},
					     {"flood-at", required_argument, NULL, OPT_FLOOD_AT},
					     {"from", required_argument, NULL, OPT_FROM},
					     {"to", required_argument, NULL, OPT_TO},
					     {"json", no_argument, NULL, OPT_JSON},
					     {"help", no_argument, NULL, 'h'},
					     HISTREAD_LONG_OPTIONS,
					     {0}};
	int ch;
	optind = 1;
	while ((ch = getopt_long(argc, argv, "c:h", opts, NULL)) != -1) {
		switch (ch) {
		case 'c': *cfg_path = optarg; break;
		case OPT_SECTION: c->section_name = optarg; break;
		case OPT_FLOOD_AT: c->flood_at_text = optarg; break;
		case OPT_FROM: c->from_text = optarg; break;
		case OPT_TO: c->to_text = optarg; break;
		case OPT_JSON: c->json = true; break;
		case 'h': calibrate_usage(stdout); return -1;
		default:
			if (histread_opts_take(&c->hopts, ch, optarg))
				break;
			calibrate_usage(stderr);
			return EXIT_USAGE;
		}
	}
	if (*cfg_path == NULL || c->section_name == NULL || optind != argc - 1) {
		fprintf(stderr, "floodgauge calibrate: needs -c FILE, DATA.csv and --section NAME\n\n");
		calibrate_usage(stderr);
		return EXIT_USAGE;
	}
	c->data_path = argv[optind];
	return 0;
}

/* One time option, read in the reader's zone (as replay reads --from/--to). */
static int time_arg(struct calibrate *c, const char *opt, const char *text, int64_t *t_ms)
{
	char err[512];
	if (text != NULL && histread_time_arg(&c->hist, opt, text, t_ms, err, sizeof(err)) != 0) {
		fprintf(stderr, "floodgauge calibrate: %s\n", err);
		return EXIT_USAGE;
	}
	return 0;
}

static int open_data(struct calibrate *c)
{
	char err[512];
	if (histread_init(&c->hist, c->cfg, &c->hopts, err, sizeof(err)) != 0) {
		fprintf(stderr, "floodgauge calibrate: %s\n", err);
		return EXIT_USAGE;
	}
	if (time_arg(c, "--from", c->from_text, &c->from_t_ms) != 0 ||
	    time_arg(c, "--to", c->to_text, &c->to_t_ms) != 0 ||
	    time_arg(c, "--flood-at", c->flood_at_text, &c->flood_at_t_ms) != 0)
		return EXIT_USAGE;
	if (histread_open(&c->hist, c->data_path, stderr, err, sizeof(err)) != 0) {
		fprintf(stderr, "floodgauge calibrate: %s\n", err);
		return EXIT_USAGE;
	}
	return 0;
}

static int keep_row(struct calibrate *c, int64_t t_ms)
{
	if (c->n_rows == c->cap_rows) {
		size_t cap = c->cap_rows ? 2 * c->cap_rows : 4096;
		struct cal_row *r = realloc(c->rows, cap * sizeof(*r));
		if (r == NULL)
			return -ENOMEM;
		c->rows = r;
		c->cap_rows = cap;
	}
	const struct engine_section *es = &c->eng->sec[c->si];
	const struct section_result *r = &es->r;
	const struct softsense *ss = &es->ss;
	const struct section_cfg *s = &c->cfg->sections[c->si];
	struct cal_row *row = &c->rows[c->n_rows++];
	int dpt = s->signal[SIGNAL_DP];
	bool sat = dpt >= 0 && c->eng->tags[dpt].saturated;
	double g = es->point.gas_kgs, dp = r->v[RF_DP_PA];
	double corr = r->v[RF_DP_CORRECTION], model = r->v[RF_DP_MODEL_PA];
	double raw = corr > 0.0 ? model / corr : NAN;
	double pct = s->geom.type == SECTION_TRAY ? r->v[RF_JET_FLOOD_PCT] : r->v[RF_FLOOD_PCT];
	row->t_ms = t_ms;
	row->ln_g = g > 0.0 ? log(g) : NAN;
	row->ln_dp = dp > 0.0 && !sat ? log(dp) : NAN;
	row->frac = r->quality != FG_QUALITY_BAD ? pct / 100.0 : NAN;
	row->ratio = dp > 0.0 && raw > 0.0 && !sat ? dp / raw : NAN;
	row->resid = ss->resid;
	row->sigma = softsense_sigma(ss);
	row->learning = ss->learning;
	row->in_service = es->in_service;
	return 0;
}

static int run_rows(struct calibrate *c)
{
	static double values[FG_TAGS_MAX];
	static enum tag_status status[FG_TAGS_MAX];
	int64_t t_ms;
	int rc;
	engine_init(c->eng, c->cfg);
	while ((rc = offline_next_in(&c->hist, c->from_t_ms, c->to_t_ms, &t_ms, values, status)) ==
	       1) {
		engine_step(c->eng, t_ms, values, status);
		engine_events_clear(c->eng);
		if (keep_row(c, t_ms) != 0) {
			fprintf(stderr, "floodgauge calibrate: out of memory\n");
			return EXIT_RUNTIME;
		}
	}
	if (rc < 0) {
		fprintf(stderr, "floodgauge calibrate: reading %s: %s\n", c->data_path, strerror(-rc));
		return EXIT_RUNTIME;
	}
	offline_warn_skipped(&c->hist, "calibrate", c->data_path);
	if (c->n_rows == 0) {
		fprintf(stderr, "floodgauge calibrate: %s: no data rows%s\n", c->data_path,
			c->from_t_ms != INT64_MIN || c->to_t_ms != INT64_MAX ? " inside --from/--to"
									     : "");
		return EXIT_USAGE;
	}
	return 0;
}

/* Least-squares slopes against time, per second, over rows [a, b) of ln G
 * and of the DP's log residual against its learned relation; NAN when
 * fewer than 10 usable rows. */
static void window_slopes(const struct calibrate *c, size_t a, size_t b, double *bg,
			  double *br)
{
	double n = 0, st = 0, stt = 0, sg = 0, stg = 0, m = 0, ut = 0, utt = 0, sr = 0, str = 0;
	int64_t t0 = c->rows[a].t_ms;
	for (size_t i = a; i < b; i++) {
		const struct cal_row *r = &c->rows[i];
		double t = (double)(r->t_ms - t0) / 1000.0;
		if (isfinite(r->ln_g)) {
			n++, st += t, stt += t * t, sg += r->ln_g, stg += t * r->ln_g;
		}
		if (isfinite(r->resid)) {
			m++, ut += t, utt += t * t, sr += r->resid, str += t * r->resid;
		}
	}
	double vg = n * stt - st * st, vr = m * utt - ut * ut;
	*bg = n >= 10 && vg > 0.0 ? (n * stg - st * sg) / vg : NAN;
	*br = m >= 10 && vr > 0.0 ? (m * str - ut * sr) / vr : NAN;
}

/* The onset conditions (a)-(c) at row i, window [a, b). */
static bool onset_condition(const struct calibrate *c, size_t i, size_t a, size_t b)
{
	const struct cal_row *r = &c->rows[i];
	if (!r->in_service || !isfinite(r->resid) || !(r->resid > CAL_DEV_SIGMAS * r->sigma))
		return false;
	double bg, br;
	window_slopes(c, a, b, &bg, &br);
	if (!(bg >= CAL_RISE_MIN_PER_H / 3600.0) || !isfinite(br))
		return false;
	return br / bg > CAL_EXCESS_SLOPE;
}

static int64_t detect_onset(const struct calibrate *c)
{
	int64_t half_ms = (int64_t)(CAL_WINDOW_S * 500.0);
	int64_t hold_ms = (int64_t)(CAL_HOLD_S * 1000.0);
	size_t a = 0, b = 0;
	int64_t run_start = INT64_MIN;
	for (size_t i = 0; i < c->n_rows; i++) {
		int64_t t = c->rows[i].t_ms;
		while (a < i && c->rows[a].t_ms < t - half_ms)
			a++;
		while (b < c->n_rows && c->rows[b].t_ms <= t + half_ms)
			b++;
		if (!onset_condition(c, i, a, b)) {
			run_start = INT64_MIN;
			continue;
		}
		if (run_start == INT64_MIN)
			run_start = t;
		if (t - run_start >= hold_ms)
			return run_start;
	}
	return INT64_MIN;
}

static void mean_sd(double sum, double sq, unsigned long long n, double *mean, double *sd)
{
	*mean = sum / (double)n;
	*sd = n > 1 ? sqrt(fmax(0.0, (sq - sum * sum / (double)n) / (double)(n - 1))) : 0.0;
}

static void fit_capacity(struct calibrate *c)
{
	c->capacity = c->capacity_spread = NAN;
	c->onset_t_ms = c->flood_at_t_ms != INT64_MIN ? c->flood_at_t_ms : detect_onset(c);
	if (c->onset_t_ms == INT64_MIN) {
		c->why_no_capacity = "no flood episode found in the data (the DP never broke away "
				     "from its relation to a rising load)";
		return;
	}
	int64_t w = (int64_t)(CAL_AVG_S * 1000.0);
	double sum = 0.0, sq = 0.0;
	unsigned long long n = 0;
	for (size_t i = 0; i < c->n_rows; i++) {
		const struct cal_row *r = &c->rows[i];
		if (llabs(r->t_ms - c->onset_t_ms) <= w && isfinite(r->frac) && r->frac > 0.0) {
			sum += r->frac;
			sq += r->frac * r->frac;
			n++;
		}
	}
	if (n == 0) {
		c->why_no_capacity = "no row with a model flood % within 60 s of the flood onset";
		return;
	}
	mean_sd(sum, sq, n, &c->capacity, &c->capacity_spread);
	c->cap_samples = n;
	if (c->capacity < 0.3 || c->capacity > 2.0) {
		c->why_no_capacity = "the model flood fraction at the onset is outside the "
				     "capacity_factor range 0.3..2: check the config and the onset";
		c->capacity = c->capacity_spread = NAN;
		c->cap_samples = 0;
	}
}

static void fit_dp(struct calibrate *c)
{
	c->dp_factor = c->dp_spread = NAN;
	const struct section_cfg *s = &c->cfg->sections[c->si];
	if (s->signal[SIGNAL_DP] < 0) {
		c->why_no_dp = "the section has no dp tag";
		return;
	}
	double sum = 0.0, sq = 0.0;
	unsigned long long n = 0;
	for (size_t i = 0; i < c->n_rows; i++) {
		const struct cal_row *r = &c->rows[i];
		if (c->onset_t_ms != INT64_MIN && r->t_ms >= c->onset_t_ms)
			break;
		if (r->learning && isfinite(r->ratio)) {
			sum += r->ratio;
			sq += r->ratio * r->ratio;
			n++;
		}
	}
	if (n < CAL_DP_ROWS_MIN) {
		c->why_no_dp = s->geom.type == SECTION_SPRAY
			? "the spray model has no DP to compare with"
			: "too few rows in steady, normal operation with a measured and a model DP "
			  "(the soft sensors' learning gate)";
		return;
	}
	mean_sd(sum, sq, n, &c->dp_factor, &c->dp_spread);
	c->dp_samples = n;
	if (c->dp_factor < 0.5 || c->dp_factor > 2.0) {
		c->why_no_dp = "measured over model DP is outside the dp_factor range 0.5..2: check "
			       "the dp tag's unit and the section geometry";
		c->dp_factor = c->dp_spread = NAN;
		c->dp_samples = 0;
	}
}

static void print_json(const struct calibrate *c)
{
	char buf[1024], ts[TIMEFMT_BUF_SIZE];
	struct jsonw w;
	bool onset = c->onset_t_ms != INT64_MIN && isfinite(c->capacity);
	if (onset)
		timefmt_format(c->onset_t_ms, ts, sizeof(ts));
	jsonw_init(&w, buf, sizeof(buf));
	jsonw_open(&w);
	jsonw_str(&w, "section", c->section_name);
	jsonw_num(&w, "capacity_factor", c->capacity);
	jsonw_num(&w, "capacity_factor_spread", c->capacity_spread);
	jsonw_num(&w, "dp_factor", c->dp_factor);
	jsonw_num(&w, "dp_factor_spread", c->dp_spread);
	jsonw_str(&w, "flood_onset", onset ? ts : NULL);
	jsonw_str(&w, "onset_method", c->flood_at_t_ms != INT64_MIN ? "given" : "detected");
	jsonw_num(&w, "samples_used", (double)(c->cap_samples + c->dp_samples));
	jsonw_close(&w);
	printf("%s\n", buf);
}

static void print_ini(const struct calibrate *c)
{
	char ts[TIMEFMT_BUF_SIZE];
	printf("; floodgauge calibrate: %s, %zu rows of %s\n", c->section_name, c->n_rows,
	       c->data_path);
	if (isfinite(c->capacity)) {
		timefmt_format(c->onset_t_ms, ts, sizeof(ts));
		printf("; flood onset %s (%s); model flood fraction there %.4f, spread %.4f over "
		       "%llu rows\n", ts, c->flood_at_t_ms != INT64_MIN ? "given" : "detected",
		       c->capacity, c->capacity_spread, c->cap_samples);
	} else {
		printf("; capacity_factor not fitted: %s\n", c->why_no_capacity);
	}
	if (isfinite(c->dp_factor))
		printf("; measured / model DP in steady, normal operation %.4f, spread %.4f over "
		       "%llu rows\n", c->dp_factor, c->dp_spread, c->dp_samples);
	else
		printf("; dp_factor not fitted: %s\n", c->why_no_dp);
	printf("; paste into [section.%s]:\n", c->section_name);
	if (isfinite(c->capacity))
		printf("capacity_factor = %.3f\n", c->capacity);
	if (isfinite(c->dp_factor))
		printf("dp_factor = %.3f\n", c->dp_factor);
	fg_caution_print(stdout);
}

static int calibrate_run(struct calibrate *c)
{
	c->si = config_section_index(c->cfg, c->section_name);
	if (c->si < 0) {
		fprintf(stderr, "floodgauge calibrate: %s has no [section.%s]\n", c->cfg->path,
			c->section_name);
		return EXIT_USAGE;
	}
	struct section_cfg *s = &c->cfg->sections[c->si];
	enum section_type t = s->geom.type;
	if (t != SECTION_TRAY && t != SECTION_PACKED && t != SECTION_SPRAY) {
		fprintf(stderr, "floodgauge calibrate: %s is a %s section: its flood %% (level swell, "
				"dispersion or circulation) is not a gas-capacity limit, so there is no "
				"capacity_factor to fit\n", c->section_name, config_section_type_name(t));
		return EXIT_USAGE;
	}
	s->geom.capacity_factor = 1.0; /* fit against the uncalibrated model */
	int rc = open_data(c);
	if (rc == 0)
		rc = run_rows(c);
	if (rc != 0)
		return rc;
	fit_capacity(c);
	fit_dp(c);
	if (!isfinite(c->capacity) && !isfinite(c->dp_factor)) {
		fprintf(stderr, "floodgauge calibrate: nothing could be fitted for %s: "
				"capacity_factor: %s; dp_factor: %s\n", c->section_name,
			c->why_no_capacity, c->why_no_dp);
		return EXIT_USAGE;
	}
	if (c->json)
		print_json(c);
	else
		print_ini(c);
	return 0;
}

int cmd_calibrate(int argc, char **argv)
{
	static struct calibrate c;
	memset(&c, 0, sizeof(c));
	c.from_t_ms = INT64_MIN;
	c.to_t_ms = INT64_MAX;
	c.flood_at_t_ms = INT64_MIN;
	const char *cfg_path = NULL;
	int rc = parse_args(&c, argc, argv, &cfg_path);
	if (rc != 0)
		return rc < 0 ? 0 : rc;
	rc = offline_setup(cfg_path, &c.cfg, &c.eng);
	if (rc != 0)
		goto out;
	rc = calibrate_run(&c);
out:
	histread_fini(&c.hist);
	free(c.rows);
	free(c.eng);
	free(c.cfg);
	return rc;
}
