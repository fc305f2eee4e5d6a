/*
 * daemon.h - `floodgauge run`: the live loop.
 *
 * A flat list of steps per period, scheduled on CLOCK_MONOTONIC against the
 * start time (so hours of running do not drift): poll the plant, step the
 * engine at the wall-clock time of the poll, take the events (log, events
 * file, MQTT alarm topics, state file), act on MQTT commands, publish the
 * section states, update the Modbus export, draw the live view, then act on
 * the signal flags: SIGTERM/SIGINT finish the cycle, publish offline, save
 * the alarm state and exit 0; SIGHUP reloads the config (kept when invalid).
 */
#ifndef DAEMON_H
#define DAEMON_H

#include <stdbool.h>
#include <stdio.h>

#include "engine.h"
#include "evlog.h"
#include "export.h"
#include "plant.h"
#include "publish.h"

struct daemon {
	const char *cfg_path;
	bool once;                 /* one cycle, then exit */
	bool view;                 /* stdout is a terminal: live view */
	struct fg_config *cfg;
	struct engine *eng;
	struct plant plant;
	struct export exp;
	struct publisher pub;
	struct evlog events;
	bool events_on;            /* [monitor] events_file given and opened */
	bool state_dirty;
	bool state_failing;
	bool export_waiting;       /* the export's address did not resolve: retrying */
	int64_t export_tried_mono_ms;        /* saving the state file fails (said once) */
	unsigned mqtt_connects;    /* connects seen: a new one republishes every alarm */
	uint64_t cmd_full_seen, cmd_bad_seen, cmd_retained_seen; /* drops already replied to */
	int64_t start_mono_ms;
	uint64_t cycle;
	unsigned overruns;
	int64_t last_state_pub_mono_ms;
	double values[FG_TAGS_MAX];
	enum tag_status status[FG_TAGS_MAX];
};

int daemon_main(struct daemon *d);

#endif
