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
	if (path == NULL || optind != argc) {
		fprintf(stderr, "usage: floodgauge check -c FILE\n");
		return EXIT_USAGE;
	}
	struct fg_config *cfg = load_or_report(path);
	if (cfg == NULL)
		return EXIT_USAGE;
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
	fprintf(f, "usage: floodgauge rate -c FILE --section NAME [--set TAG=VALUE]... [--json]\n\n"
		   "Evaluates one operating point of a section. Tag values are in each tag's own\n"
		   "unit; a tag not set takes its 'value =' or its 'nominal ='. Prints every\n"
		   "result field that applies: an aligned table, or one JSON object with --json.\n");
}

/* Applies one --set TAG=VALUE. Returns 0 or prints why and returns -EINVAL. */
static int apply_set(const struct fg_config *cfg, const char *arg, double *values)
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

static int rate_eval(const struct fg_config *cfg, const char *section, char **sets,
		     unsigned set_count, bool json)
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
	for (unsigned i = 0; i < set_count; i++)
		if (apply_set(cfg, sets[i], values) != 0)
			return EXIT_USAGE;
	const struct section_cfg *s = &cfg->sections[si];
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
					     {"json", no_argument, NULL, 'j'},
					     {"help", no_argument, NULL, 'h'},
					     {0}};
	const char *path = NULL, *section = NULL;
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
	int rc = rate_eval(cfg, section, sets, set_count, json);
	free(cfg);
	return rc;
}
