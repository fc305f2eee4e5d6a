/*
 * cmd_simulate.c - `floodgauge simulate`: writes a historian-style CSV of
 * synthetic plant data for a config, with an injected upset (replay/scenario.c
 * makes the rows). The output goes to a temporary file beside --out that is
 * renamed into place only when complete, so a failed run never leaves a
 * truncated data set that looks whole.
 */
#include <errno.h>
#include <getopt.h>
#include <inttypes.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "commands.h"
#include "config.h"
#include "scenario.h"
#include "timefmt.h"

static void simulate_usage(FILE *f)
{
	fprintf(f,
		"usage: floodgauge simulate -c FILE --scenario NAME [--out DATA.csv] [--seed N]\n"
		"                           [--hours H] [--period-s S] [--start T] [--capacity K]\n\n"
		"Writes synthetic plant data for the tags of FILE as a historian CSV (header\n"
		"time,TAG,... with every polled tag in config order; time ISO 8601 UTC; values in\n"
		"each tag's own unit; an empty field is a missing value), made from floodgauge's\n"
		"own models at each section's design point (the tags' nominal values) plus noise,\n"
		"with an injected upset. Replay it with `floodgauge replay`.\n\n"
		"  -c, --config FILE   the plant config\n"
		"  -s, --scenario NAME steady | flood | weep | frozen | gap |\n"
		"                      impeller-flood | loop-stall (below)\n"
		"  -o, --out FILE      output file (default: standard output)\n"
		"      --seed N        random seed, a whole number (default 1); the same seed\n"
		"                      gives the same bytes\n"
		"      --hours H       span (default: the scenario's own)\n"
		"      --period-s S    row period (default: the config's period_s)\n"
		"      --start T       time of the first row, ISO 8601 UTC or epoch seconds\n"
		"                      (default 2026-03-02T06:00:00Z)\n"
		"      --capacity K    the plant really floods at K times the model's gas\n"
		"                      capacity (0.3..2; e.g. 0.85 for a fouled column); with\n"
		"                      --scenario flood the load follows the plant's capacity\n\n"
		"%s\n"
		"A one-line summary of what happened when goes to standard error.\n"
		"Synthetic data are for testing and tuning the monitor, not for design.\n",
		scenario_help());
}

struct simulate_args {
	const char *config, *scenario, *out;
	struct scenario_opts opt;
};

/* Parses one numeric option. Returns 0 or prints why and returns -EINVAL. */
static int parse_positive(const char *opt, const char *arg, double *v)
{
	char *end;
	errno = 0;
	*v = strtod(arg, &end);
	if (end == arg || *end != '\0' || errno != 0 || !isfinite(*v) || *v <= 0.0) {
		fprintf(stderr, "floodgauge simulate: %s '%s' is not a positive number\n", opt, arg);
		return -EINVAL;
	}
	return 0;
}

static int parse_seed(const char *arg, uint64_t *seed)
{
	char *end;
	errno = 0;
	unsigned long long v = strtoull(arg, &end, 10);
	if (end == arg || *end != '\0' || errno != 0 || arg[0] == '-') {
		fprintf(stderr, "floodgauge simulate: --seed '%s' is not a whole number\n", arg);
		return -EINVAL;
	}
	*seed = (uint64_t)v;
	return 0;
}

/* Returns 0, 1 for --help (printed), or -EINVAL (reason printed). */
static int parse_args(int argc, char **argv, struct simulate_args *a)
{
	enum { OPT_SEED = 1000, OPT_HOURS, OPT_PERIOD, OPT_START, OPT_CAPACITY };
	static const struct option opts[] = {{"config", required_argument, NULL, 'c'},
					     {"scenario", required_argument, NULL, 's'},
					     {"out", required_argument, NULL, 'o'},
					     {"seed", required_argument, NULL, OPT_SEED},
					     {"hours", required_argument, NULL, OPT_HOURS},
					     {"period-s", required_argument, NULL, OPT_PERIOD},
					     {"start", required_argument, NULL, OPT_START},
					     {"capacity", required_argument, NULL, OPT_CAPACITY},
					     {"help", no_argument, NULL, 'h'},
					     {0}};
	memset(a, 0, sizeof(*a));
	a->opt.seed = 1;
	a->opt.hours = NAN;
	a->opt.period_s = NAN;
	a->opt.start_t_ms = SCENARIO_START_DEFAULT_MS;
	int ch, rc = 0;
	optind = 1;
	while (rc == 0 && (ch = getopt_long(argc, argv, "c:s:o:h", opts, NULL)) != -1) {
		switch (ch) {
		case 'c': a->config = optarg; break;
		case 's': a->scenario = optarg; break;
		case 'o': a->out = optarg; break;
		case OPT_SEED: rc = parse_seed(optarg, &a->opt.seed); break;
		case OPT_HOURS: rc = parse_positive("--hours", optarg, &a->opt.hours); break;
		case OPT_PERIOD: rc = parse_positive("--period-s", optarg, &a->opt.period_s); break;
		case OPT_CAPACITY:
			rc = parse_positive("--capacity", optarg, &a->opt.capacity);
			if (rc == 0 && (a->opt.capacity < 0.3 || a->opt.capacity > 2.0)) {
				fprintf(stderr, "floodgauge simulate: --capacity %g is outside 0.3..2\n",
					a->opt.capacity);
				rc = -EINVAL;
			}
			break;
		case OPT_START:
			if (timefmt_parse(optarg, strlen(optarg), &a->opt.start_t_ms) != 0) {
				fprintf(stderr, "floodgauge simulate: --start '%s' is not an ISO 8601 "
						"UTC time or epoch seconds\n", optarg);
				rc = -EINVAL;
			}
			break;
		case 'h': simulate_usage(stdout); return 1;
		default: return -EINVAL;
		}
	}
	if (rc != 0)
		return rc;
	if (a->config == NULL || a->scenario == NULL || optind != argc) {
		fprintf(stderr, "floodgauge simulate: needs -c FILE and --scenario NAME "
				"(floodgauge simulate --help)\n");
		return -EINVAL;
	}
	int k = scenario_lookup(a->scenario);
	if (k < 0) {
		fprintf(stderr, "floodgauge simulate: unknown scenario '%s' (steady, flood, weep, "
				"frozen, gap, impeller-flood, loop-stall)\n", a->scenario);
		return -EINVAL;
	}
	a->opt.kind = (enum scenario_kind)k;
	return 0;
}

/* Runs sc into path (via path.tmp and rename), or stdout when path is NULL. */
static int write_data(struct scenario *sc, const char *path)
{
	if (path == NULL) {
		int rc = scenario_run(sc, stdout);
		if (rc != 0)
			fprintf(stderr, "floodgauge simulate: writing standard output: %s\n",
				strerror(-rc));
		return rc == 0 ? 0 : EXIT_RUNTIME;
	}
	char tmp[FG_PATH_MAX + 8];
	if (snprintf(tmp, sizeof(tmp), "%s.tmp", path) >= (int)sizeof(tmp)) {
		fprintf(stderr, "floodgauge simulate: --out path is too long\n");
		return EXIT_USAGE;
	}
	FILE *f = fopen(tmp, "w");
	if (f == NULL) {
		fprintf(stderr, "floodgauge simulate: %s: %s\n", tmp, strerror(errno));
		return EXIT_RUNTIME;
	}
	int rc = scenario_run(sc, f);
	if (fclose(f) != 0 && rc == 0)
		rc = -EIO;
	if (rc == 0 && rename(tmp, path) != 0)
		rc = -errno;
	if (rc != 0) {
		fprintf(stderr, "floodgauge simulate: writing %s: %s\n", path, strerror(-rc));
		remove(tmp);
		return EXIT_RUNTIME;
	}
	return 0;
}

int cmd_simulate(int argc, char **argv)
{
	struct simulate_args a;
	int prc = parse_args(argc, argv, &a);
	if (prc != 0)
		return prc > 0 ? 0 : EXIT_USAGE;
	struct fg_config *cfg = malloc(sizeof(*cfg));
	struct scenario *sc = malloc(sizeof(*sc));
	int rc = EXIT_RUNTIME;
	if (cfg == NULL || sc == NULL) {
		fprintf(stderr, "floodgauge simulate: out of memory\n");
		goto out_free;
	}
	rc = EXIT_USAGE;
	if (config_load(cfg, a.config, stderr) != 0)
		goto out_free;
	if (scenario_init(sc, cfg, &a.opt, stderr) != 0)
		goto out_free;
	rc = write_data(sc, a.out);
	if (rc == 0)
		scenario_summary(sc, stderr);
out_free:
	free(sc);
	free(cfg);
	return rc;
}
