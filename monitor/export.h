/*
 * export.h - the Modbus export server: what the control system polls.
 *
 * Register layout from [export.modbus] base_address, the same block served
 * as input registers (function code 4) and as holding registers (3), read
 * only (writes get exception 1):
 *   base + 2k, 2k+1   field k of `fields`, float32, high word first (ABCD);
 *                     NaN when the field does not apply or its result is bad
 *   base + 2F + s     quality of section s: 0 good, 1 uncertain, 2 bad
 *   base + 2F + S     heartbeat: evaluations since start, modulo 65536, so the
 *                     control system can tell a stalled monitor
 * Discrete inputs (function code 2) from 0: for alarm a (config order),
 * 2a = active (unacknowledged or acknowledged), 2a + 1 = awaiting acknowledgement
 * (unacknowledged or returned_unacknowledged).
 */
#ifndef EXPORT_H
#define EXPORT_H

#include "engine.h"
#include "mbserver.h"

#define EXPORT_REGS_MAX (2 * FG_EXPORT_FIELDS_MAX + FG_SECTIONS_MAX + 1)

struct export {
	const struct fg_config *cfg;
	bool opened;
	struct mbserver srv;
	uint16_t heartbeat;
	uint16_t regs[EXPORT_REGS_MAX];
	bool bits[2 * FG_ALARMS_MAX];
};

/* Starts the server on the configured address. Returns 0 or a negative errno. */
int export_open(struct export *x, const struct fg_config *cfg);

/* Publishes the engine's latest results and alarm states. */
void export_update(struct export *x, const struct engine *e);

void export_close(struct export *x);

/* Registers in the block for cfg (fields, qualities, heartbeat). */
unsigned export_reg_count(const struct fg_config *cfg);

#endif
