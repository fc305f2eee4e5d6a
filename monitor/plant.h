/*
 * plant.h - the plant side of the daemon: one Modbus client per configured
 * source, polled in turn, giving every polled tag's value in its own unit
 * (raw x scale + offset) and a read status for the engine.
 */
#ifndef PLANT_H
#define PLANT_H

#include "config.h"
#include "mbclient.h"
#include "validate.h"

struct plant_source {
	struct mbclient client;
	unsigned tag_count;
	int tag_of_point[FG_TAGS_MAX];  /* point index -> tag index */
	bool opened;
};

struct plant {
	const struct fg_config *cfg;
	unsigned source_count;
	struct plant_source src[FG_SOURCES_MAX];
	double raw[FG_TAGS_MAX];
	bool ok[FG_TAGS_MAX];
};

/* Builds a client per source (no I/O: clients connect on their first poll).
 * be is the transport (mbclient_backend_libmodbus, or a fake in tests).
 * Returns 0 or the first client's error (logged). */
int plant_open(struct plant *p, const struct fg_config *cfg, const struct mbclient_backend *be);
void plant_close(struct plant *p);

/* Polls every source once; fills values[tag] (tag units) and status[tag] for
 * every polled tag. A failed source gives TAG_STATUS_COMM_FAIL for its tags. */
void plant_poll(struct plant *p, int64_t now_mono_ms, double *values, enum tag_status *status);

/* Conversions between the config's register layout and the driver's. */
struct mbclient_point plant_point_of(const struct tag_cfg *t);

#endif
