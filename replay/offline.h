/*
 * offline.h - what the commands that run the engine over recorded data
 * (replay, tune, calibrate) share when they start.
 */
#ifndef OFFLINE_H
#define OFFLINE_H

#include "config.h"
#include "engine.h"

/* Allocates a config and an engine and loads the config from path (its
 * errors go to stderr as FILE:LINE). Returns 0, EXIT_RUNTIME when out of
 * memory or EXIT_USAGE for a config that does not load; *cfg and *eng are
 * set either way (NULL or allocated) and are the caller's to free. */
int offline_setup(const char *path, struct fg_config **cfg, struct engine **eng);

#endif
