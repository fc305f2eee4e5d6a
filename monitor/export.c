/*
 * export.c - see export.h.
 */
#include "export.h"

#include <assert.h>
#include <math.h>
#include <string.h>

#include "regcodec.h"

unsigned export_reg_count(const struct fg_config *cfg)
{
	return 2u * cfg->exp.field_count + cfg->section_count + 1u;
}

int export_open(struct export *x, const struct fg_config *cfg)
{
	assert(x != NULL);
	assert(cfg != NULL);
	memset(x, 0, sizeof(*x));
	x->cfg = cfg;
	unsigned n = export_reg_count(cfg);
	assert(n <= EXPORT_REGS_MAX);
	struct mbserver_map_cfg map = {
		.input_start = (uint16_t)cfg->exp.base_address,
		.input_count = (uint16_t)n,
		.holding_start = (uint16_t)cfg->exp.base_address,
		.holding_count = (uint16_t)n,
		.discrete_start = 0,
		.discrete_count = (uint16_t)(2u * cfg->alarm_count),
	};
	const struct mbserver_limits lim = {
		.idle_timeout_ms = (unsigned)(cfg->exp.idle_timeout_s * 1000.0),
		.request_timeout_ms = (unsigned)(cfg->exp.request_timeout_s * 1000.0),
		.per_address = cfg->exp.clients_per_address,
	};
	int rc = mbserver_open_limits(&x->srv, cfg->exp.host, cfg->exp.port, &map, true, &lim);
	if (rc == 0)
		x->opened = true;
	return rc;
}

void export_update(struct export *x, const struct engine *e)
{
	assert(x != NULL);
	assert(e != NULL);
	if (!x->opened)
		return;
	const struct fg_config *cfg = x->cfg;
	unsigned k = 0;
	for (unsigned i = 0; i < cfg->exp.field_count; i++, k += 2) {
		const struct export_field *f = &cfg->exp.fields[i];
		const struct section_result *r = &e->sec[f->section_index].r;
		double v = r->quality == FG_QUALITY_BAD ? NAN : r->v[f->field];
		regcodec_encode(REGCODEC_FLOAT32, REGCODEC_ABCD, v, &x->regs[k]);
	}
	for (unsigned s = 0; s < cfg->section_count; s++)
		x->regs[k++] = (uint16_t)e->sec[s].r.quality;
	x->regs[k++] = ++x->heartbeat;
	uint16_t base = (uint16_t)cfg->exp.base_address;
	mbserver_set_input(&x->srv, base, x->regs, k);
	mbserver_set_holding(&x->srv, base, x->regs, k);
	for (unsigned a = 0; a < cfg->alarm_count; a++) {
		enum alarm_state st = e->alarms[a].state;
		x->bits[2 * a] = st == ALARM_STATE_UNACK || st == ALARM_STATE_ACKED;
		x->bits[2 * a + 1] = st == ALARM_STATE_UNACK || st == ALARM_STATE_RTNUN;
	}
	if (cfg->alarm_count > 0)
		mbserver_set_discrete(&x->srv, 0, x->bits, 2 * cfg->alarm_count);
}

void export_close(struct export *x)
{
	if (x == NULL || !x->opened)
		return;
	mbserver_close(&x->srv);
	x->opened = false;
}
