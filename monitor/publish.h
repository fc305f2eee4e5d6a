/*
 * publish.h - the daemon's MQTT topics (DESIGN.md) over drivers/mqttlink:
 *   PREFIX/status           "online" / "offline", retained, the last will
 *   PREFIX/SECTION/state    JSON of the section's result, every period (or
 *                           every [mqtt] state_interval_s)
 *   PREFIX/alarm/NAME       JSON of each alarm transition, retained, QoS 1,
 *                           never dropped from the offline buffer
 *   PREFIX/cmd              commands in; replies on PREFIX/cmd/reply
 * When [mqtt] is absent every call is a no-op.
 */
#ifndef PUBLISH_H
#define PUBLISH_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include "config.h"
#include "mqttlink.h"

struct publisher {
	bool enabled;
	struct mqttlink link;
	const struct fg_config *cfg;
};

int publish_open(struct publisher *p, const struct fg_config *cfg);
void publish_poll(struct publisher *p, int64_t now_mono_ms);
bool publish_connected(const struct publisher *p);
/* Connections made so far (first and re-): a change means "republish". */
unsigned publish_connect_count(const struct publisher *p);
void publish_alarm(struct publisher *p, const char *alarm_name, const char *json);
void publish_state(struct publisher *p, const char *section_name, const char *json);
/* Next command payload into buf (NUL-terminated): its length, 0 when none. */
int publish_take_command(struct publisher *p, char *buf, size_t buf_size);
void publish_reply(struct publisher *p, const char *json);
void publish_close(struct publisher *p);

#endif
