/*
 * publish.c - see publish.h.
 */
#include "publish.h"

#include <assert.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include "log.h"

static void link_log(void *user, enum mqttlink_log_level level, const char *msg)
{
	(void)user;
	log_msg(level == MQTTLINK_LOG_INFO ? LOG_INFO
		: level == MQTTLINK_LOG_WARNING ? LOG_WARNING : LOG_ERROR, "%s", msg);
}

int publish_open(struct publisher *p, const struct fg_config *cfg)
{
	assert(p != NULL);
	assert(cfg != NULL);
	memset(p, 0, sizeof(*p));
	p->cfg = cfg;
	if (!cfg->mqtt.enabled)
		return 0;
	const struct mqtt_cfg *m = &cfg->mqtt;
	static struct mqttlink_cfg lc;
	memset(&lc, 0, sizeof(lc));
	snprintf(lc.uri, sizeof(lc.uri), "%s", m->uri);
	snprintf(lc.client_id, sizeof(lc.client_id), "%s", m->client_id);
	snprintf(lc.username, sizeof(lc.username), "%s", m->username);
	snprintf(lc.password_file, sizeof(lc.password_file), "%s", m->password_file);
	snprintf(lc.ca_file, sizeof(lc.ca_file), "%s", m->ca_file);
	snprintf(lc.topic_prefix, sizeof(lc.topic_prefix), "%s", m->topic_prefix);
	lc.keepalive_s = (unsigned)lround(m->keepalive_s); /* config: 1..3600 s */
	lc.buffer_messages = m->buffer_messages;
	lc.log = link_log;
	int rc = mqttlink_open(&p->link, &lc);
	if (rc != 0) {
		log_msg(LOG_ERROR, "mqtt: cannot set up the link to %s (%d)", m->uri, rc);
		return rc;
	}
	p->enabled = true;
	log_msg(LOG_INFO, "mqtt: publishing to %s under %s", m->uri, m->topic_prefix);
	return 0;
}

void publish_poll(struct publisher *p, int64_t now_mono_ms)
{
	if (p->enabled)
		mqttlink_poll(&p->link, now_mono_ms);
}

bool publish_connected(const struct publisher *p)
{
	return p->enabled && mqttlink_connected(&p->link);
}

unsigned publish_connect_count(const struct publisher *p)
{
	return p->enabled ? mqttlink_connect_count(&p->link) : 0;
}

void publish_alarm(struct publisher *p, const char *alarm_name, const char *json)
{
	if (!p->enabled)
		return;
	char suffix[MQTTLINK_SUFFIX_MAX];
	snprintf(suffix, sizeof(suffix), "alarm/%s", alarm_name);
	/* Retained, QoS 1, precious: never the one dropped from a full buffer. */
	int rc = mqttlink_publish(&p->link, suffix, json, 1, true, true);
	if (rc != 0)
		log_msg(LOG_ERROR, "mqtt: alarm event for %s not queued (%d)", alarm_name, rc);
}

void publish_state(struct publisher *p, const char *section_name, const char *json)
{
	if (!p->enabled)
		return;
	char suffix[MQTTLINK_SUFFIX_MAX];
	snprintf(suffix, sizeof(suffix), "%s/state", section_name);
	mqttlink_publish(&p->link, suffix, json, p->cfg->mqtt.qos, false, false);
}

int publish_take_command(struct publisher *p, char *buf, size_t buf_size)
{
	if (!p->enabled)
		return 0;
	int n;
	while ((n = mqttlink_take_command(&p->link, buf, buf_size)) < 0)
		; /* an oversize one is dropped and counted by the link: take the next */
	return n;
}

void publish_reply(struct publisher *p, const char *json)
{
	if (p->enabled)
		mqttlink_publish(&p->link, "cmd/reply", json, 1, false, true);
}

void publish_close(struct publisher *p)
{
	if (p == NULL || !p->enabled)
		return;
	mqttlink_close(&p->link);
	p->enabled = false;
}
