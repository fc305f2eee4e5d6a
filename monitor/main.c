/*
 * main.c - floodgauge's command line: picks the subcommand.
 */
#include <stdio.h>
#include <string.h>

#include "commands.h"
#include "version.h"

struct command {
	const char *name;
	int (*run)(int argc, char **argv);
	const char *summary;
};

static const struct command commands[] = {
	{"run", cmd_run, "the monitor: poll the plant, evaluate, alarm, publish (a daemon)"},
	{"feed", cmd_feed, "serve recorded data as Modbus registers: a stand-in for the plant"},
	{"check", cmd_check, "validate a config file and say what is wrong"},
	{"rate", cmd_rate, "evaluate one operating point of a section and print every result"},
	{"replay", cmd_replay, "run the engine over recorded data; write results, events, report"},
	{"tune", cmd_tune, "try alarm settings on recorded data: figures per candidate, pareto marked"},
	{"calibrate", cmd_calibrate, "fit a section's capacity_factor and dp_factor to recorded data"},
	{"simulate", cmd_simulate, "write synthetic plant data with an injected upset"},
	{"map", cmd_map, "print the Modbus export's register map (CSV or Markdown)"},
};

static void usage(FILE *f)
{
	fprintf(f, "usage: floodgauge COMMAND [options]   (floodgauge COMMAND --help for more)\n"
		   "       floodgauge --version\n\n"
		   "Online monitor of column hydraulics: percent approach to flooding, holdup and\n"
		   "alarms for tray, packed, spray and bubble-column sections.\n\ncommands:\n");
	for (size_t i = 0; i < sizeof(commands) / sizeof(commands[0]); i++)
		fprintf(f, "  %-10s %s\n", commands[i].name, commands[i].summary);
	fprintf(f, "\nexit status: 0 ok, 1 runtime failure, 2 usage or config error\n\n");
	fg_caution_print(f);
}

int main(int argc, char **argv)
{
	if (argc < 2) {
		usage(stderr);
		return EXIT_USAGE;
	}
	if (!strcmp(argv[1], "--version") || !strcmp(argv[1], "-V")) {
		printf("floodgauge %s\n", FG_VERSION);
		return 0;
	}
	if (!strcmp(argv[1], "--help") || !strcmp(argv[1], "-h") || !strcmp(argv[1], "help")) {
		usage(stdout);
		return 0;
	}
	for (size_t i = 0; i < sizeof(commands) / sizeof(commands[0]); i++)
		if (!strcmp(argv[1], commands[i].name))
			return commands[i].run(argc - 1, argv + 1);
	fprintf(stderr, "floodgauge: unknown command '%s'\n\n", argv[1]);
	usage(stderr);
	return EXIT_USAGE;
}
