/*
 * plant.c - see plant.h.
 */
#include "plant.h"

#include <assert.h>
#include <math.h>
#include <string.h>

#include "log.h"

_Static_assert((int)TAG_TYPE_FLOAT32 == (int)REGCODEC_FLOAT32 &&
		       (int)TAG_TYPE_INT16 == (int)REGCODEC_INT16 &&
		       (int)TAG_TYPE_UINT32 == (int)REGCODEC_UINT32,
	       "tag types and codec types share their order");
_Static_assert((int)TAG_ORDER_DCBA == (int)REGCODEC_DCBA &&
		       (int)TAG_ORDER_ABCD == (int)REGCODEC_ABCD,
	       "word orders share their order");

struct mbclient_point plant_point_of(const struct tag_cfg *t)
{
	struct mbclient_point pt = {
		.table = t->table == TAG_TABLE_INPUT ? MBCLIENT_TABLE_INPUT : MBCLIENT_TABLE_HOLDING,
		.address = (uint16_t)t->address,
		.type = (enum regcodec_type)t->type,
		.order = (enum regcodec_order)t->order,
	};
	return pt;
}

static void client_log(void *user, enum mbclient_log_level level, const char *msg)
{
	(void)user;
	log_msg(level == MBCLIENT_LOG_WARNING ? LOG_WARNING : LOG_INFO, "modbus: %s", msg);
}

static void source_cfg_of(const struct source_cfg *s, struct mbclient_source_cfg *m)
{
	memset(m, 0, sizeof(*m));
	snprintf(m->name, sizeof(m->name), "%s", s->name);
	m->protocol = s->protocol == SOURCE_MODBUS_TCP ? MBCLIENT_PROTOCOL_TCP : MBCLIENT_PROTOCOL_RTU;
	snprintf(m->host, sizeof(m->host), "%s", s->host);
	m->port = s->port;
	m->unit_id = s->unit_id;
	m->timeout_s = s->timeout_s;
	snprintf(m->device, sizeof(m->device), "%s", s->device);
	m->baud = s->baud;
	m->parity = s->parity;
	m->data_bits = s->data_bits;
	m->stop_bits = s->stop_bits;
	m->log = client_log;
}

int plant_open(struct plant *p, const struct fg_config *cfg, const struct mbclient_backend *be)
{
	assert(p != NULL);
	assert(cfg != NULL);
	memset(p, 0, sizeof(*p));
	p->cfg = cfg;
	p->source_count = cfg->source_count;
	static struct mbclient_point points[FG_TAGS_MAX];
	for (unsigned si = 0; si < cfg->source_count; si++) {
		struct plant_source *ps = &p->src[si];
		for (unsigned ti = 0; ti < cfg->tag_count; ti++) {
			if (cfg->tags[ti].source_index != (int)si)
				continue;
			points[ps->tag_count] = plant_point_of(&cfg->tags[ti]);
			ps->tag_of_point[ps->tag_count++] = (int)ti;
		}
		struct mbclient_source_cfg mc;
		source_cfg_of(&cfg->sources[si], &mc);
		int rc = mbclient_init(&ps->client, &mc, points, ps->tag_count, be);
		if (rc != 0) {
			log_msg(LOG_ERROR, "source %s: %s", cfg->sources[si].name, mbclient_strerror(rc));
			plant_close(p);
			return rc;
		}
		ps->opened = true;
	}
	return 0;
}

void plant_close(struct plant *p)
{
	if (p == NULL)
		return;
	for (unsigned si = 0; si < p->source_count; si++)
		if (p->src[si].opened)
			mbclient_fini(&p->src[si].client);
	memset(p->src, 0, sizeof(p->src));
	p->source_count = 0;
}

void plant_poll(struct plant *p, int64_t now_mono_ms, double *values, enum tag_status *status)
{
	assert(p != NULL);
	for (unsigned si = 0; si < p->source_count; si++) {
		struct plant_source *ps = &p->src[si];
		mbclient_poll(&ps->client, now_mono_ms, p->raw, p->ok, ps->tag_count);
		for (unsigned k = 0; k < ps->tag_count; k++) {
			int ti = ps->tag_of_point[k];
			const struct tag_cfg *t = &p->cfg->tags[ti];
			values[ti] = p->ok[k] ? p->raw[k] * t->scale + t->offset : NAN;
			status[ti] = p->ok[k] ? TAG_STATUS_FRESH : TAG_STATUS_COMM_FAIL;
		}
	}
}
