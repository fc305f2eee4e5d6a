/*
 * commands.h - the floodgauge subcommands. Each takes the arguments after
 * its name (argv[0] is the command name) and returns the process exit code:
 * 0 ok, 1 runtime failure, 2 usage or config error.
 */
#ifndef COMMANDS_H
#define COMMANDS_H

#include <stdio.h>

#define EXIT_RUNTIME 1
#define EXIT_USAGE 2

int cmd_check(int argc, char **argv);
int cmd_rate(int argc, char **argv);
int cmd_simulate(int argc, char **argv);
int cmd_replay(int argc, char **argv);
int cmd_tune(int argc, char **argv);
int cmd_calibrate(int argc, char **argv);
int cmd_run(int argc, char **argv);
int cmd_feed(int argc, char **argv);
int cmd_map(int argc, char **argv);

/* The config read when -c is not given (the Debian package's conffile). */
#ifndef FG_DEFAULT_CONFIG
#define FG_DEFAULT_CONFIG "/etc/floodgauge/floodgauge.ini"
#endif

/* The advisory caution every human-facing output carries. */
extern const char *const fg_caution;

/* Prints it wrapped for a terminal. */
void fg_caution_print(FILE *f);

#endif
