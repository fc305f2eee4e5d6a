/*
 * cmd_run.c - `floodgauge run`: options, then daemon_main.
 */
#include <getopt.h>
#include <stdio.h>
#include <string.h>
#include <unistd.h>

#include "commands.h"
#include "daemon.h"

static void run_usage(FILE *f)
{
	fprintf(f, "usage: floodgauge run [-c FILE] [--once] [--no-view]\n\n"
		   "Polls the plant over Modbus, evaluates every section each period, raises\n"
		   "alarms, publishes over MQTT and serves the Modbus export, until SIGTERM or\n"
		   "SIGINT. SIGHUP reloads FILE (an invalid file is refused and the running\n"
		   "config kept); SIGUSR1 reopens the events file. --once runs one cycle and\n"
		   "exits. On a terminal it shows a live view (--no-view for plain log lines).\n"
		   "FILE defaults to " FG_DEFAULT_CONFIG ".\n");
}

int cmd_run(int argc, char **argv)
{
	static const struct option opts[] = {{"config", required_argument, NULL, 'c'},
					     {"once", no_argument, NULL, '1'},
					     {"no-view", no_argument, NULL, 'n'},
					     {"help", no_argument, NULL, 'h'},
					     {0}};
	static struct daemon d;
	memset(&d, 0, sizeof(d));
	d.view = isatty(STDOUT_FILENO);
	int ch;
	optind = 1;
	while ((ch = getopt_long(argc, argv, "c:h", opts, NULL)) != -1) {
		switch (ch) {
		case 'c': d.cfg_path = optarg; break;
		case '1': d.once = true; break;
		case 'n': d.view = false; break;
		case 'h': run_usage(stdout); return 0;
		default: run_usage(stderr); return EXIT_USAGE;
		}
	}
	if (d.cfg_path == NULL)
		d.cfg_path = FG_DEFAULT_CONFIG;
	if (optind != argc) {
		run_usage(stderr);
		return EXIT_USAGE;
	}
	return daemon_main(&d);
}
