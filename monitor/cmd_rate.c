/*
 * cmd_rate.c - `floodgauge check` and `floodgauge rate`: the config and one
 * operating point, without any plant connection.
 */
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "check_run.h"
#include "commands.h"
#include "config.h"
#include "jsonw.h"
#include "numfmt.h"
#include "packing.h"
#include "point.h"

static struct fg_config *load_or_report(const char *path)
{
	struct fg_config *cfg = malloc(sizeof(*cfg));
	if (cfg == NULL) {
		fprintf(stderr, "floodgauge: out of memory\n");
		return NULL;
	}
	if (config_load(cfg, path, stderr) != 0) {
		free(cfg);
		return NULL;
	}
	return cfg;
}

/* A packed section that takes its constants from the built-in table: says
 * where they come from when any was recalled rather than read, and the
 * table's current name when an older one was used. Keys given in the
 * section override the row, so they are mentioned too. */
static void note_packing(const struct section_cfg *s)
{
	if (s->geom.type != SECTION_PACKED || s->geom.packed.packing[0] == '\0')
		return;
	const char *name = s->geom.packed.packing;
	bool from_memory = false;
	const char *src = packing_source(name, &from_memory);
	const char *canon = packing_canonical_name(name);
	if (src == NULL || canon == NULL)
		return;
	if (strcmp(canon, name) != 0)
		printf("note: section %s: packing '%s' is now called '%s' (the old name still "
		       "works)\n", s->name, name, canon);
	if (from_memory)
		printf("note: section %s: packing '%s': table constants recalled from memory, not "
		       "read from their source; check them against it before trusting flood_pct "
		       "and dp_flood_pct (keys in the section override the table). Sources: %s\n",
		       s->name, canon, src);
}

int cmd_check(int argc, char **argv)
{
	static const struct option opts[] = {
		{"config", required_argument, NULL, 'c'}, {"help", no_argument, NULL, 'h'}, {0}};
	const char *path = NULL;
	int ch;
	optind = 1;
	while ((ch = getopt_long(argc, argv, "c:h", opts, NULL)) != -1) {
		switch (ch) {
		case 'c': path = optarg; break;
		case 'h':
			printf("usage: floodgauge check -c FILE\n\nReads FILE, checks every key, "
			       "reference and geometry, and prints each\nproblem as FILE:LINE: what. "
			       "Exit 0 when valid, 2 when not.\n");
			return 0;
		default: return EXIT_USAGE;
		}
	}
	if (path == NULL)
		path = FG_DEFAULT_CONFIG;
	if (optind != argc) {
		fprintf(stderr, "usage: floodgauge check [-c FILE]\n");
		return EXIT_USAGE;
	}
	struct fg_config *cfg = load_or_report(path);
	if (cfg == NULL)
		return EXIT_USAGE;
	if (check_run(cfg, stderr, NULL) > 0) {
		free(cfg);
		return EXIT_USAGE;
	}
	unsigned by_type[SECTION_TYPE_COUNT] = {0};
	for (unsigned i = 0; i < cfg->section_count; i++)
		by_type[cfg->sections[i].geom.type]++;
	/* The high-holdup types are listed only when present (the line stays as
	 * it was for configs without them). */
	char more[96] = "";
	for (int t = SECTION_PACKED_BUBBLE; t < SECTION_TYPE_COUNT; t++) {
		size_t n = strlen(more);
		if (by_type[t] > 0)
			snprintf(more + n, sizeof(more) - n, ", %u %s", by_type[t],
				 config_section_type_name((enum section_type)t));
	}
	printf("%s: ok: %s, %u source(s), %u tag(s), %u section(s) (%u tray, %u packed, %u spray, "
	       "%u bubble%s), %u alarm(s)%s%s\n",
	       path, cfg->monitor.name, cfg->source_count, cfg->tag_count, cfg->section_count,
	       by_type[SECTION_TRAY], by_type[SECTION_PACKED], by_type[SECTION_SPRAY],
	       by_type[SECTION_BUBBLE], more, cfg->alarm_count, cfg->mqtt.enabled ? ", mqtt" : "",
	       cfg->exp.enabled ? ", modbus export" : "");
	for (unsigned i = 0; i < cfg->section_count; i++)
		note_packing(&cfg->sections[i]);
	for (unsigned i = 0; i < cfg->warning_count; i++)
		fprintf(stderr, "%s\n", cfg->warnings[i]);
	free(cfg);
	return 0;
}

static void rate_usage(FILE *f)
{
	fprintf(f, "usage: floodgauge rate -c FILE --section NAME [--set TAG=VALUE]...\n"
		   "                       [--sweep TAG=A:B:STEP] [--json]\n\n"
		   "Evaluates one operating point of a section. Tag values are in each tag's own\n"
		   "unit; a tag not set takes its 'value =' or its 'nominal ='. Prints every\n"
		   "result field that applies: an aligned table, or one JSON object with --json.\n"
		   "Only tags that feed the section can be set.\n"
		   "--sweep evaluates TAG from A to B in steps of STEP: one row per value (with\n"
		   "--json an array of result objects, each with the swept value), with the DP\n"
		   "the model predicts at each point in place of the DP tag's nominal (unless\n"
		   "the DP tag is set or swept), and the gas and liquid loads at 80, 85 and 90 %%\n"
		   "of flood (model flood_pct) at the point's liquid-to-gas ratio.\n");
}

static bool tag_feeds(const struct section_cfg *s, int ti)
{
	for (int k = 0; k < SIGNAL_COUNT; k++)
		if (s->signal[k] == ti)
			return true;
	return false;
}

/* Applies one --set TAG=VALUE. Returns 0 or prints why and returns -EINVAL. */
static int apply_set(const struct fg_config *cfg, const struct section_cfg *s, const char *arg,
		     double *values)
{
	const char *eq = strchr(arg, '=');
	char name[FG_NAME_MAX];
	if (eq == NULL || (size_t)(eq - arg) >= sizeof(name) || eq == arg) {
		fprintf(stderr, "floodgauge rate: --set '%s' is not TAG=VALUE\n", arg);
		return -EINVAL;
	}
	memcpy(name, arg, (size_t)(eq - arg));
	name[eq - arg] = '\0';
	int ti = config_tag_index(cfg, name);
	if (ti < 0) {
		char dym[160];
		fprintf(stderr, "floodgauge rate: --set: tag '%s' is not in %s%s\n", name, cfg->path,
			config_suggest(cfg, CONFIG_NAME_TAG, name, dym, sizeof(dym)));
		return -EINVAL;
	}
	if (!tag_feeds(s, ti)) {
		fprintf(stderr, "floodgauge rate: --set: tag '%s' does not feed section %s (its "
				"tags:", name, s->name);
		for (int k = 0; k < SIGNAL_COUNT; k++)
			if (s->signal[k] >= 0)
				fprintf(stderr, " %s", cfg->tags[s->signal[k]].name);
		fprintf(stderr, ")\n");
		return -EINVAL;
	}
	char *end;
	double v = strtod(eq + 1, &end);
	if (end == eq + 1 || *end != '\0' || !isfinite(v)) {
		fprintf(stderr, "floodgauge rate: --set %s: '%s' is not a number\n", name, eq + 1);
		return -EINVAL;
	}
	const struct tag_cfg *t = &cfg->tags[ti];
	if ((isfinite(t->min) && v < t->min) || (isfinite(t->max) && v > t->max))
		fprintf(stderr, "floodgauge rate: warning: %s = %g is outside the tag's range "
				"%g..%g; the live engine would mark it bad\n", name, v, t->min, t->max);
	values[ti] = v;
	return 0;
}

static void print_table(const struct fg_config *cfg, const struct section_cfg *s,
			const double *values, const struct section_result *r)
{
	printf("section %s (%s)   quality %s%s\n", s->name, config_section_type_name(s->geom.type),
	       fg_quality_name(r->quality), r->extrap.count ? ", extrapolated" : "");
	printf("\n  inputs\n");
	for (int k = 0; k < SIGNAL_COUNT; k++) {
		int ti = s->signal[k];
		if (ti < 0)
			continue;
		const struct tag_cfg *t = &cfg->tags[ti];
		char num[NUMFMT_FULL_SIZE];
		numfmt_human(values[ti], t->unit ? t->unit->name : NULL, num, sizeof num);
		if (isfinite(values[ti]))
			printf("    %-22s %12s %-8s (%s)\n", config_signal_name((enum section_signal)k),
			       num, t->unit ? t->unit->name : "", t->name);
		else
			printf("    %-22s %12s %-8s (%s)\n", config_signal_name((enum section_signal)k),
			       "-", "", t->name);
	}
	printf("\n  results\n");
	for (int i = 0; i < RF_COUNT; i++) {
		char num[NUMFMT_FULL_SIZE];
		if (!isfinite(r->v[i]))
			continue;
		numfmt_human(r->v[i], result_fields[i].unit, num, sizeof num);
		printf("    %-22s %12s %s\n", result_fields[i].name, num, result_fields[i].unit);
	}
	if (r->basis != FLOOD_BASIS_NONE)
		printf("    %-22s %12s\n", "flood_basis", flood_basis_name(r->basis));
	if (r->regime != BUBBLE_REGIME_NONE)
		printf("    %-22s %12s\n", "regime", bubble_regime_name(r->regime));
	printf("    %-22s %12s\n", "quality", fg_quality_name(r->quality));
	printf("    %-22s %12s\n", "extrapolated", r->extrap.count ? "true" : "false");
	if (r->extrap.first)
		printf("      (%s%s)\n", r->extrap.first, r->extrap.count > 1 ? ", and more" : "");
	if (r->missing.first)
		printf("    %-22s %12s\n      (%s%s)\n", "not computed", "", r->missing.first,
		       r->missing.count > 1 ? ", and more" : "");
	putchar('\n');
	fg_caution_print(stdout);
}

static int print_json(const struct section_cfg *s, const struct section_result *r)
{
	char buf[4096];
	struct jsonw w;
	jsonw_init(&w, buf, sizeof(buf));
	jsonw_open(&w);
	jsonw_str(&w, "section", s->name);
	jsonw_str(&w, "type", config_section_type_name(s->geom.type));
	jsonw_result(&w, r);
	jsonw_close(&w);
	if (jsonw_finish(&w) < 0) {
		fprintf(stderr, "floodgauge rate: result does not fit the output buffer\n");
		return EXIT_RUNTIME;
	}
	printf("%s\n", buf);
	return 0;
}

/* The sections of cfg, for a user who did not name one or mistyped it. */
static void list_sections(const struct fg_config *cfg)
{
	fprintf(stderr, "sections in %s:", cfg->path);
	for (unsigned i = 0; i < cfg->section_count; i++)
		fprintf(stderr, " %s (%s)", cfg->sections[i].name,
			config_section_type_name(cfg->sections[i].geom.type));
	fputc('\n', stderr);
}

/* ---- --sweep ------------------------------------------------------------ */

#define SWEEP_MAX 1000 /* rows; more is a typo in STEP */

struct sweep {
	int ti;             /* the swept tag, -1 when no sweep */
	double v[SWEEP_MAX];
	unsigned count;
	bool predict_dp;    /* the DP tag is neither set nor swept: use the model's */
};

/* "TAG=A:B:STEP" with A <= B, STEP > 0 (B included when a whole number of
 * steps away). Returns 0, or prints why and returns -EINVAL. */
static int parse_sweep(const struct fg_config *cfg, const struct section_cfg *s, const char *arg,
		       struct sweep *sw)
{
	const char *eq = strchr(arg, '=');
	char name[FG_NAME_MAX];
	if (eq == NULL || eq == arg || (size_t)(eq - arg) >= sizeof(name))
		goto bad;
	memcpy(name, arg, (size_t)(eq - arg));
	name[eq - arg] = '\0';
	sw->ti = config_tag_index(cfg, name);
	if (sw->ti < 0 || !tag_feeds(s, sw->ti)) {
		fprintf(stderr, "floodgauge rate: --sweep: tag '%s' %s section %s\n", name,
			sw->ti < 0 ? "is not in the config, so it does not feed"
				   : "does not feed", s->name);
		return -EINVAL;
	}
	char *end;
	const char *p = eq + 1;
	double a = strtod(p, &end);
	if (end == p || *end != ':')
		goto bad;
	p = end + 1;
	double b = strtod(p, &end);
	if (end == p || *end != ':')
		goto bad;
	p = end + 1;
	double step = strtod(p, &end);
	if (end == p || *end != '\0' || !isfinite(a) || !isfinite(b) || !isfinite(step) ||
	    b < a || step <= 0.0)
		goto bad;
	double n = floor((b - a) / step + 1e-9) + 1.0;
	if (n > SWEEP_MAX) {
		fprintf(stderr, "floodgauge rate: --sweep %s: %.0f values; at most %d\n", arg, n,
			SWEEP_MAX);
		return -EINVAL;
	}
	sw->count = (unsigned)n;
	for (unsigned i = 0; i < sw->count; i++)
		sw->v[i] = a + step * (double)i;
	return 0;
bad:
	fprintf(stderr, "floodgauge rate: --sweep '%s' is not TAG=A:B:STEP (A <= B, STEP > 0)\n",
		arg);
	return -EINVAL;
}

/* One point; with predict_dp the DP the model predicts there stands in for the
 * DP tag (a first evaluation without DP gives it). */
static void eval_point(const struct fg_config *cfg, unsigned si, const double *values,
		       bool predict_dp, struct section_result *r)
{
	const struct section_cfg *s = &cfg->sections[si];
	struct section_point p;
	point_from_tags(cfg, si, values, &p);
	if (predict_dp) {
		p.dp_pa = NAN;
		section_eval(&s->geom, &s->props, &p, r);
		p.dp_pa = r->v[RF_DP_MODEL_PA];
	}
	section_eval(&s->geom, &s->props, &p, r);
}

/* The factor on the gas and liquid loads (same liquid-to-gas ratio) at which
 * the model's flood_pct reaches target; NAN when out of reach. flood_pct
 * rises with the load at a fixed ratio (every model here). */
static double load_factor_at(const struct fg_config *cfg, unsigned si, const double *values,
			     double target)
{
	const struct section_cfg *s = &cfg->sections[si];
	int gi = s->signal[SIGNAL_GAS_FLOW], li = s->signal[SIGNAL_LIQUID_FLOW];
	static double v[FG_TAGS_MAX];
	double lo = 0.0, hi = 1.0;
	struct section_result r;
	for (int n = 0;; n++) {
		if (n == 40)
			return NAN;
		memcpy(v, values, cfg->tag_count * sizeof(v[0]));
		v[gi] *= hi;
		if (li >= 0)
			v[li] *= hi;
		eval_point(cfg, si, v, false, &r);
		if (isfinite(r.v[RF_FLOOD_PCT]) && r.v[RF_FLOOD_PCT] >= target)
			break;
		lo = hi;
		hi *= 1.5;
	}
	for (int i = 0; i < 48; i++) { /* 2^-48 of the bracket */
		double mid = 0.5 * (lo + hi);
		memcpy(v, values, cfg->tag_count * sizeof(v[0]));
		v[gi] *= mid;
		if (li >= 0)
			v[li] *= mid;
		eval_point(cfg, si, v, false, &r);
		if (isfinite(r.v[RF_FLOOD_PCT]) && r.v[RF_FLOOD_PCT] >= target)
			hi = mid;
		else
			lo = mid;
	}
	return 0.5 * (lo + hi);
}

static const double sweep_pct[3] = {80.0, 85.0, 90.0};

static int sweep_run(const struct fg_config *cfg, unsigned si, double *values,
		     const struct sweep *sw, bool json)
{
	const struct section_cfg *s = &cfg->sections[si];
	const struct tag_cfg *st = &cfg->tags[sw->ti];
	int gi = s->signal[SIGNAL_GAS_FLOW], li = s->signal[SIGNAL_LIQUID_FLOW];
	int dpi = s->signal[SIGNAL_DP];
	const struct unit *dpu = dpi >= 0 ? cfg->tags[dpi].unit : NULL;
	const char *gu = cfg->tags[gi].unit ? cfg->tags[gi].unit->name : "";
	const char *lu = li >= 0 && cfg->tags[li].unit ? cfg->tags[li].unit->name : "";
	if (json)
		putchar('[');
	else
		printf("section %s (%s): %s swept, %s; DP %s\n  %10s %9s %9s %10s %9s"
		       "  gas/liquid at 80, 85, 90 %% of flood (%s, %s)\n",
		       s->name, config_section_type_name(s->geom.type), st->name,
		       st->unit ? st->unit->name : "", sw->predict_dp ? "predicted by the model"
								      : "as set",
		       st->name, "flood_pct", "flood_idx", "dp_model", "quality", gu, lu);
	for (unsigned i = 0; i < sw->count; i++) {
		values[sw->ti] = sw->v[i];
		struct section_result r;
		eval_point(cfg, si, values, sw->predict_dp, &r);
		double g[3], l[3];
		for (int k = 0; k < 3; k++) {
			double f = load_factor_at(cfg, si, values, sweep_pct[k]);
			g[k] = f * values[gi];
			l[k] = li >= 0 ? f * values[li] : NAN;
		}
		if (json) {
			char buf[4096];
			struct jsonw w;
			jsonw_init(&w, buf, sizeof(buf));
			jsonw_open(&w);
			jsonw_str(&w, "section", s->name);
			jsonw_str(&w, "type", config_section_type_name(s->geom.type));
			jsonw_str(&w, "sweep_tag", st->name);
			jsonw_num(&w, "sweep_value", sw->v[i]);
			jsonw_num(&w, st->name, sw->v[i]);
			jsonw_result(&w, &r);
			static const char *const gk[3] = {"gas_at_flood_80", "gas_at_flood_85",
							  "gas_at_flood_90"};
			static const char *const lk[3] = {"liquid_at_flood_80", "liquid_at_flood_85",
							  "liquid_at_flood_90"};
			for (int k = 0; k < 3; k++) {
				jsonw_num(&w, gk[k], g[k]);
				if (li >= 0)
					jsonw_num(&w, lk[k], l[k]);
			}
			jsonw_close(&w);
			if (jsonw_finish(&w) < 0)
				return EXIT_RUNTIME;
			printf("%s%s", i ? ",\n " : "", buf);
			continue;
		}
		char v[NUMFMT_FULL_SIZE], fp[NUMFMT_FULL_SIZE], fi[NUMFMT_FULL_SIZE],
			dp[NUMFMT_FULL_SIZE];
		numfmt_human(sw->v[i], st->unit ? st->unit->name : NULL, v, sizeof v);
		numfmt_human(r.v[RF_FLOOD_PCT], "%", fp, sizeof fp);
		numfmt_human(r.v[RF_FLOOD_INDEX], "%", fi, sizeof fi);
		double dpv = r.v[RF_DP_MODEL_PA];
		if (dpu != NULL && units_usable_as_dp(dpu))
			dpv /= dpu->factor;
		numfmt_human(dpv, NULL, dp, sizeof dp);
		printf("  %10s %9s %9s %10s %9s ", v, fp, fi, dp, fg_quality_name(r.quality));
		for (int k = 0; k < 3; k++) {
			char a[NUMFMT_FULL_SIZE], b[NUMFMT_FULL_SIZE];
			numfmt_human(g[k], gu, a, sizeof a);
			numfmt_human(l[k], lu, b, sizeof b);
			printf(" %s/%s", a, li >= 0 ? b : "-");
		}
		putchar('\n');
	}
	if (json) {
		puts("]");
		return 0;
	}
	printf("  dp_model in %s\n", dpu != NULL && units_usable_as_dp(dpu) ? dpu->name : "Pa");
	fg_caution_print(stdout);
	return 0;
}

static int rate_eval(const struct fg_config *cfg, const char *section, char **sets,
		     unsigned set_count, const char *sweep_arg, bool json)
{
	if (section == NULL) {
		fprintf(stderr, "floodgauge rate: which section? give --section NAME\n");
		list_sections(cfg);
		return EXIT_USAGE;
	}
	int si = config_section_index(cfg, section);
	if (si < 0) {
		char dym[160];
		fprintf(stderr, "floodgauge rate: section '%s' is not in %s%s\n", section, cfg->path,
			config_suggest(cfg, CONFIG_NAME_SECTION, section, dym, sizeof(dym)));
		list_sections(cfg);
		return EXIT_USAGE;
	}
	static double values[FG_TAGS_MAX];
	for (unsigned i = 0; i < cfg->tag_count; i++)
		values[i] = isfinite(cfg->tags[i].fixed_value) ? cfg->tags[i].fixed_value
							       : cfg->tags[i].nominal;
	const struct section_cfg *s = &cfg->sections[si];
	for (unsigned i = 0; i < set_count; i++)
		if (apply_set(cfg, s, sets[i], values) != 0)
			return EXIT_USAGE;
	static struct sweep sw;
	sw.ti = -1;
	if (sweep_arg != NULL) {
		if (parse_sweep(cfg, s, sweep_arg, &sw) != 0)
			return EXIT_USAGE;
		values[sw.ti] = sw.v[0];
		int dpi = s->signal[SIGNAL_DP];
		sw.predict_dp = dpi >= 0 && dpi != sw.ti;
		for (unsigned i = 0; i < set_count && sw.predict_dp; i++)
			if (strncmp(sets[i], cfg->tags[dpi].name, strlen(cfg->tags[dpi].name)) == 0 &&
			    sets[i][strlen(cfg->tags[dpi].name)] == '=')
				sw.predict_dp = false;
	}
	int missing = 0;
	int dens = s->signal[SIGNAL_GAS_DENSITY];
	bool have_density = dens >= 0 && isfinite(values[dens]);
	for (int k = 0; k < SIGNAL_COUNT; k++) {
		int ti = s->signal[k];
		if (ti >= 0 && !isfinite(values[ti]) &&
		    point_signal_required(s, (enum section_signal)k, have_density)) {
			fprintf(stderr, "floodgauge rate: %s needs a value for tag '%s' (%s): give "
					"--set %s=VALUE or 'nominal =' in [tag.%s]\n", s->name,
				cfg->tags[ti].name, config_signal_name((enum section_signal)k),
				cfg->tags[ti].name, cfg->tags[ti].name);
			missing++;
		}
	}
	if (missing)
		return EXIT_USAGE;
	if (sw.ti >= 0)
		return sweep_run(cfg, (unsigned)si, values, &sw, json);
	struct section_point p;
	struct section_result r;
	point_from_tags(cfg, (unsigned)si, values, &p);
	section_eval(&s->geom, &s->props, &p, &r);
	if (json)
		return print_json(s, &r);
	print_table(cfg, s, values, &r);
	return 0;
}

int cmd_rate(int argc, char **argv)
{
	static const struct option opts[] = {{"config", required_argument, NULL, 'c'},
					     {"section", required_argument, NULL, 's'},
					     {"set", required_argument, NULL, 'S'},
					     {"sweep", required_argument, NULL, 'w'},
					     {"json", no_argument, NULL, 'j'},
					     {"help", no_argument, NULL, 'h'},
					     {0}};
	const char *path = NULL, *section = NULL, *sweep = NULL;
	static char *sets[FG_TAGS_MAX];
	unsigned set_count = 0;
	bool json = false;
	int ch;
	optind = 1;
	while ((ch = getopt_long(argc, argv, "c:s:S:jh", opts, NULL)) != -1) {
		switch (ch) {
		case 'c': path = optarg; break;
		case 's': section = optarg; break;
		case 'S':
			if (set_count == FG_TAGS_MAX) {
				fprintf(stderr, "floodgauge rate: too many --set\n");
				return EXIT_USAGE;
			}
			sets[set_count++] = optarg;
			break;
		case 'j': json = true; break;
		case 'w': sweep = optarg; break;
		case 'h': rate_usage(stdout); return 0;
		default: rate_usage(stderr); return EXIT_USAGE;
		}
	}
	if (path == NULL || optind != argc) {
		rate_usage(stderr);
		return EXIT_USAGE;
	}
	struct fg_config *cfg = load_or_report(path);
	if (cfg == NULL)
		return EXIT_USAGE;
	int rc = rate_eval(cfg, section, sets, set_count, sweep, json);
	free(cfg);
	return rc;
}
