/*
 * offline.h - what the commands that run the engine over recorded data
 * (replay, tune, calibrate) share: their set-up, the historian's status
 * texts handed to the engine row by row, and the warnings about skipped rows.
 */
#ifndef OFFLINE_H
#define OFFLINE_H

#include "config.h"
#include "engine.h"
#include "histread.h"

/* Allocates a config and an engine and loads the config from path (its
 * errors go to stderr as FILE:LINE). Returns 0, EXIT_RUNTIME when out of
 * memory or EXIT_USAGE for a config that does not load; *cfg and *eng are
 * set either way (NULL or allocated) and are the caller's to free. */
int offline_setup(const char *path, struct fg_config **cfg, struct engine **eng);

/* The next row of h with from_t_ms <= t <= to_t_ms (the --from/--to
 * window): histread_next's return (1: a row, 0: the end, < 0: an error). */
int offline_next_in(struct histread *h, int64_t from_t_ms, int64_t to_t_ms, int64_t *t_ms,
		    double *values, enum tag_status *status);

/* The status texts of the row h just returned, into e (before engine_step). */
void offline_take_texts(const struct histread *h, struct engine *e);

/* Says on stderr, as "floodgauge CMD: PATH:LINE: ...", which tags h never
 * found and which rows it skipped (the first few, then how many in all). */
void offline_warn_skipped(const struct histread *h, const char *cmd, const char *path);

#endif
