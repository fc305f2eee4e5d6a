/*
 * cmd_map.c - `floodgauge map`: the Modbus export's register map, as the
 * integrator of the control system needs it (address, table, type, field,
 * unit, section), in CSV or a Markdown table. The layout is export.h's; the
 * rows come from the config's [export.modbus] fields and alarms, so every
 * result field of every section type is covered as configured.
 */
#include <getopt.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "commands.h"
#include "config.h"
#include "export.h"

struct map_row {
	unsigned address;
	const char *table;
	const char *type;
	char field[2 * FG_NAME_MAX + 32];
	const char *unit;
	const char *section;
};

static void put_row(const struct map_row *r, bool md)
{
	if (md)
		printf("| %u | %s | %s | %s | %s | %s |\n", r->address, r->table, r->type, r->field,
		       r->unit, r->section);
	else
		printf("%u,%s,%s,%s,%s,%s\n", r->address, r->table, r->type, r->field, r->unit,
		       r->section);
}

static void print_map(const struct fg_config *cfg, bool md)
{
	const struct export_cfg *e = &cfg->exp;
	if (md)
		printf("| address | table | type | field | unit | section |\n"
		       "|---:|---|---|---|---|---|\n");
	else
		printf("address,table,type,field,unit,section\n");
	unsigned a = e->base_address;
	struct map_row r = {.table = "input+holding"};
	for (unsigned i = 0; i < e->field_count; i++, a += 2) {
		const struct export_field *f = &e->fields[i];
		r.address = a;
		r.type = "float32";
		r.section = cfg->sections[f->section_index].name;
		snprintf(r.field, sizeof r.field, "%s", result_fields[f->field].name);
		r.unit = result_fields[f->field].unit;
		put_row(&r, md);
	}
	for (unsigned s = 0; s < cfg->section_count; s++, a++) {
		r.address = a;
		r.type = "uint16";
		r.section = cfg->sections[s].name;
		snprintf(r.field, sizeof r.field, "quality");
		r.unit = "-";
		put_row(&r, md);
	}
	r.address = a;
	r.type = "uint16";
	r.section = "";
	snprintf(r.field, sizeof r.field, "heartbeat");
	r.unit = "count";
	put_row(&r, md);
	r.table = "discrete";
	r.type = "bit";
	r.unit = "-";
	for (unsigned k = 0; k < cfg->alarm_count; k++) {
		const struct alarm_cfg *al = &cfg->alarms[k];
		r.section = cfg->sections[al->section_index].name;
		r.address = 2 * k;
		snprintf(r.field, sizeof r.field, "%s active", al->name);
		put_row(&r, md);
		r.address = 2 * k + 1;
		snprintf(r.field, sizeof r.field, "%s unacknowledged", al->name);
		put_row(&r, md);
	}
}

static void map_usage(FILE *f)
{
	fprintf(f, "usage: floodgauge map [-c FILE] [--format csv|md]\n\n"
		   "Prints the Modbus export's register map of FILE (default %s): address\n"
		   "(0-based), table, type, field, unit and section of every register and\n"
		   "discrete input, as CSV (default) or a Markdown table.\n",
		FG_DEFAULT_CONFIG);
}

int cmd_map(int argc, char **argv)
{
	static const struct option opts[] = {{"config", required_argument, NULL, 'c'},
					     {"format", required_argument, NULL, 'f'},
					     {"help", no_argument, NULL, 'h'},
					     {0}};
	const char *path = FG_DEFAULT_CONFIG;
	bool md = false;
	int ch;
	optind = 1;
	while ((ch = getopt_long(argc, argv, "c:h", opts, NULL)) != -1) {
		switch (ch) {
		case 'c': path = optarg; break;
		case 'f':
			if (strcmp(optarg, "md") == 0) {
				md = true;
			} else if (strcmp(optarg, "csv") != 0) {
				fprintf(stderr, "floodgauge map: --format must be csv or md, not '%s'\n",
					optarg);
				return EXIT_USAGE;
			}
			break;
		case 'h': map_usage(stdout); return 0;
		default: map_usage(stderr); return EXIT_USAGE;
		}
	}
	if (optind != argc) {
		map_usage(stderr);
		return EXIT_USAGE;
	}
	struct fg_config *cfg = malloc(sizeof(*cfg));
	if (cfg == NULL)
		return EXIT_RUNTIME;
	if (config_load(cfg, path, stderr) != 0) {
		free(cfg);
		return EXIT_USAGE;
	}
	if (!cfg->exp.enabled)
		fprintf(stderr, "floodgauge map: %s has no [export.modbus]; the layout below is "
				"what it would serve\n", path);
	print_map(cfg, md);
	if (md)
		printf("\nfloat32: two registers, high word first (ABCD), NaN when the field does "
		       "not apply or its result is bad. quality: 0 good, 1 uncertain, 2 bad. "
		       "heartbeat: evaluations since start, modulo 65536. Discrete inputs: "
		       "function code 2; registers: function code 4 (input) and 3 (holding), "
		       "read only. Addresses are 0-based.\n");
	free(cfg);
	return 0;
}
