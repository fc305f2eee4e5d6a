/*
 * engine.c - see engine.h.
 */
#include "engine.h"

#include <assert.h>
#include <math.h>
#include <string.h>

#include "alarmstate.h"
#include "point.h"

int engine_init(struct engine *e, const struct fg_config *cfg)
{
	assert(e != NULL);
	assert(cfg != NULL);
	assert(cfg->tag_count <= FG_TAGS_MAX);
	assert(cfg->section_count <= FG_SECTIONS_MAX);
	assert(cfg->alarm_count <= FG_ALARMS_MAX);
	memset(e, 0, sizeof(*e));
	e->cfg = cfg;
	e->t_ms = ALARM_T_NONE;
	for (unsigned i = 0; i < cfg->tag_count; i++)
		validate_init(&e->tags[i], &cfg->tags[i], cfg->monitor.period_s);
	for (unsigned i = 0; i < cfg->section_count; i++) {
		const struct section_cfg *s = &cfg->sections[i];
		struct softsense_cfg sc = {
			.dp_factor = s->dp_factor,
			.steady_window_s = s->steady_window_s,
			.steady_load_band = s->steady_load_band,
			.normal_dp_sigmas = s->normal_dp_sigmas,
		};
		softsense_init(&e->sec[i].ss, &sc);
		if (s->signal[SIGNAL_DP] >= 0) /* a DP may sit at the top of its span */
			validate_set_saturable(&e->tags[s->signal[SIGNAL_DP]], true);
		result_clear(&e->sec[i].r);
		e->sec[i].r.quality = FG_QUALITY_BAD;
		e->sec[i].diag_tag = -1;
		e->sec[i].in_service = true;
		solve_warm_clear(&e->sec[i].warm);
		e->sec[i].circ_normal_ms = NAN;
		e->sec[i].circ_learned_s = 0.0;
		for (int f = 0; f < RF_COUNT; f++)
			if (section_type_has_field(s->geom.type, f)) {
				assert(e->sec[i].field_count < ENGINE_PREMODEL_FIELDS);
				e->sec[i].field[e->sec[i].field_count++] = (unsigned char)f;
			}
	}
	for (unsigned i = 0; i < cfg->alarm_count; i++)
		alarm_init(&e->alarms[i], &cfg->alarms[i], i);
	return 0;
}

/* Collects the section's signals in SI and the worst input quality. */
static enum fg_quality gather(struct engine *e, unsigned si, double *sig)
{
	const struct section_cfg *s = &e->cfg->sections[si];
	struct engine_section *es = &e->sec[si];
	enum fg_quality q = FG_QUALITY_GOOD;
	es->diag_reason = NULL;
	es->diag_tag = -1;
	int dens = s->signal[SIGNAL_GAS_DENSITY];
	bool density_good = dens >= 0 && e->tags[dens].quality != FG_QUALITY_BAD;
	for (int k = 0; k < SIGNAL_COUNT; k++) {
		int ti = s->signal[k];
		sig[k] = NAN;
		if (ti < 0)
			continue;
		const struct tag_state *ts = &e->tags[ti];
		if (ts->quality != FG_QUALITY_BAD)
			sig[k] = ts->value_si;
		/* A saturated DP is a process fact, not a transmitter fault: it
		 * makes the result uncertain but raises no diagnostic. */
		bool saturated = ts->saturated;
		if (ts->reason != NULL && !saturated && es->diag_reason == NULL) {
			es->diag_reason = ts->reason;
			es->diag_tag = ti;
		}
		if (ts->quality == FG_QUALITY_BAD && point_signal_required(s, (enum section_signal)k, density_good))
			fg_quality_raise(&q, FG_QUALITY_BAD);
		else if (ts->quality != FG_QUALITY_GOOD)
			fg_quality_raise(&q, FG_QUALITY_UNCERTAIN);
	}
	/* A bubble column without a liquid through-flow tag has none. */
	if (s->signal[SIGNAL_LIQUID_FLOW] < 0)
		sig[SIGNAL_LIQUID_FLOW] = 0.0;
	return q;
}

/* The model's local d ln DP / d ln G, worked out by the model with its DP
 * (section_result.dp_model_exponent): NAN without a DP tag to compare. */
static double dp_exponent(const struct section_cfg *s, const struct section_result *r)
{
	if (s->signal[SIGNAL_DP] < 0 || !(r->v[RF_DP_MODEL_PA] > 0.0))
		return NAN;
	return r->dp_model_exponent;
}

static void soft_sensors(struct engine *e, unsigned si, int64_t t_ms)
{
	const struct section_cfg *s = &e->cfg->sections[si];
	struct engine_section *es = &e->sec[si];
	struct section_result *r = &es->r;
	const struct section_point *p = &es->point;
	double raw_model = r->v[RF_DP_MODEL_PA];
	double rho_l = prop_table_at(&s->props.liquid_density_kgm3, p->temperature_k, NULL);
	double liquid_out = NAN;
	int lo = s->signal[SIGNAL_LIQUID_OUT_FLOW];
	if (lo >= 0 && e->tags[lo].quality != FG_QUALITY_BAD) /* by its own tag's unit */
		liquid_out = point_mass_flow_kgs(&e->cfg->tags[lo], e->tags[lo].value_si, rho_l,
						 s->props.gas_molar_mass_kgkmol);
	int dpt = s->signal[SIGNAL_DP];
	bool dp_sat = dpt >= 0 && e->tags[dpt].saturated;
	struct softsense_input in = {
		.gas_kgs = p->gas_kgs,
		.dp_pa = r->v[RF_DP_PA],
		.dp_model_pa = raw_model,
		.dp_exponent = dp_exponent(s, r),
		.flood_pct = r->v[RF_FLOOD_PCT],
		.dp_saturated = dp_sat,
		.f_factor = r->v[RF_F_FACTOR],
		.liquid_in_kgs = p->liquid_kgs,
		.liquid_out_kgs = liquid_out,
		.level_m = p->level_m,
		.rho_l_kgm3 = rho_l,
		.sump_area_m2 = isfinite(s->sump_area_m2) ? s->sump_area_m2 : section_area_m2(&s->geom),
		.normal = r->quality == FG_QUALITY_GOOD && es->in_service,
	};
	softsense_step(&es->ss, &in, t_ms, r);
	double k = r->v[RF_DP_CORRECTION];
	if (isfinite(k) && k > 0.0) {
		r->v[RF_DP_MODEL_PA] = raw_model * k;
		r->v[RF_DP_FLOOD_PCT] /= k;
	}
	section_fuse(r, NAN);
}

/* A loop without a configured normal circulation learns one (engine.h). */
static void learn_circulation(struct engine *e, unsigned si, int64_t t_ms)
{
	const struct section_cfg *s = &e->cfg->sections[si];
	struct engine_section *es = &e->sec[si];
	struct section_result *r = &es->r;
	if (s->geom.type != SECTION_LOOP || isfinite(s->geom.loop.circulation_normal_ms))
		return;
	double u = r->v[RF_CIRCULATION_VELOCITY];
	double dt_s = e->t_ms == ALARM_T_NONE ? 0.0 : (double)(t_ms - e->t_ms) / 1000.0;
	bool warm = es->circ_learned_s >= ENGINE_CIRC_WARMUP_S;
	bool normal = r->quality == FG_QUALITY_GOOD && es->in_service && isfinite(u) && u > 0.0 &&
		      r->v[RF_FLOOD_PCT] < ENGINE_CIRC_NORMAL_FLOOD_PCT && dt_s >= 0.0;
	if (normal && isfinite(es->circ_normal_ms) && warm &&
	    fabs(u / es->circ_normal_ms - 1.0) > ENGINE_CIRC_BAND)
		normal = false;
	if (normal && !isfinite(es->circ_normal_ms)) {
		es->circ_normal_ms = u;
	} else if (normal) {
		/* Faster at first, so the warm-up average is a plain mean. */
		double tau = fmin(ENGINE_CIRC_TAU_S, es->circ_learned_s + dt_s);
		double a = tau > 0.0 ? dt_s / tau : 1.0;
		es->circ_normal_ms += (a < 1.0 ? a : 1.0) * (u - es->circ_normal_ms);
		es->circ_learned_s += dt_s;
	}
	if (es->circ_learned_s >= ENGINE_CIRC_WARMUP_S && isfinite(u))
		r->v[RF_CIRCULATION_PCT] = 100.0 * u / es->circ_normal_ms;
}

/* Section si at the tags' present state: gather, models (warm-started from
 * es->warm), soft sensors and the loop's learned circulation. */
static void eval_section(struct engine *e, unsigned si, int64_t t_ms)
{
	const struct section_cfg *s = &e->cfg->sections[si];
	struct engine_section *es = &e->sec[si];
	double sig[SIGNAL_COUNT];
	enum fg_quality q = gather(e, si, sig);
	point_from_si(s, e->cfg, sig, &es->point);
	section_eval_warm(&s->geom, &s->props, &es->point, &es->r, &es->warm);
	fg_quality_raise(&es->r.quality, q);
	/* Without a good gas flow nobody knows whether the section runs: keep
	 * the last verdict rather than call a dead transmitter "shut down". */
	if (isfinite(es->point.gas_kgs))
		es->in_service = es->point.gas_kgs >= s->in_service_gas_kgs;
	soft_sensors(e, si, t_ms);
	learn_circulation(e, si, t_ms);
}

/* What eval_section leaves for the alarms and the writers: handed over by
 * the engine that evaluated a section ahead, taken by the other. */
_Static_assert(offsetof(struct section_result, v) == 0 &&
		       offsetof(struct section_result, basis) == sizeof(double) * RF_COUNT,
	       "section_result: v first, then the rest from basis on");

static void give_ahead(struct engine_premodel *pre, const struct engine_section *es)
{
	for (unsigned k = 0; k < es->field_count; k++)
		pre->v[k] = es->r.v[es->field[k]];
	memcpy(pre->rest, &es->r.basis, sizeof pre->rest);
	pre->in_service = es->in_service;
	pre->diag_reason = es->diag_reason;
	pre->diag_tag = es->diag_tag;
}

/* The fields a type does not fill stay NAN in es->r, as result_clear left
 * them at engine_init (the evaluators never write them). */
static void take_ahead(struct engine_section *es, const struct engine_premodel *pre)
{
	for (unsigned k = 0; k < es->field_count; k++)
		es->r.v[es->field[k]] = pre->v[k];
	memcpy(&es->r.basis, pre->rest, sizeof pre->rest);
	es->in_service = pre->in_service;
	es->diag_reason = pre->diag_reason;
	es->diag_tag = pre->diag_tag;
}

static void push_event(struct engine *e, const struct alarm_event *ev)
{
	assert(e->event_count < ENGINE_EVENTS_MAX);
	e->events[e->event_count++] = *ev;
}

void engine_alarm_input(const struct engine *e, unsigned ai, struct alarm_input *in)
{
	assert(ai < e->cfg->alarm_count);
	const struct alarm *a = &e->alarms[ai];
	const struct engine_section *es = &e->sec[a->cfg.section_index];
	bool diag = a->cfg.kind == ALARM_KIND_DIAGNOSTIC;
	in->value = diag ? (es->diag_tag >= 0 ? e->tags[es->diag_tag].accepted : NAN)
			 : es->r.v[a->cfg.field];
	in->reference = a->cfg.reference_field >= 0 ? es->r.v[a->cfg.reference_field] : NAN;
	in->quality = es->r.quality;
	in->suppressed = !diag && !es->in_service;
	in->diag_reason = es->diag_reason;
}

static void eval_alarms(struct engine *e, int64_t t_ms)
{
	for (unsigned i = 0; i < e->cfg->alarm_count; i++) {
		struct alarm *a = &e->alarms[i];
		const struct engine_section *es = &e->sec[a->cfg.section_index];
		struct alarm_input in;
		engine_alarm_input(e, i, &in);
		struct alarm_event ev;
		if (alarm_step(a, &in, t_ms, &ev) != 1)
			continue;
		if (ev.reason != NULL && es->diag_tag >= 0 &&
		    strcmp(ev.reason, ALARM_REASON_HISTORIAN_STATUS) == 0)
			memcpy(ev.status_text, e->tags[es->diag_tag].status_text,
			       sizeof ev.status_text);
		push_event(e, &ev);
	}
}

/* A fixed tag ('value =') that has had its first sample and has no frozen
 * check: every later sample is the same value, which leaves what anything
 * reads of its state (value, quality, reason) as it is; only its own
 * timestamps would move. */
static bool fixed_settled(const struct tag_cfg *t, const struct tag_state *ts)
{
	return t->source_index < 0 && ts->seen && !(t->frozen_s > 0.0);
}

static void validate_tag(struct engine *e, unsigned i, int64_t t_ms, const double *values,
			 const enum tag_status *status)
{
	const struct tag_cfg *t = &e->cfg->tags[i];
	if (fixed_settled(t, &e->tags[i]))
		return;
	if (t->source_index < 0)
		validate_step(&e->tags[i], t_ms, t->fixed_value, TAG_STATUS_FRESH);
	else
		validate_step(&e->tags[i], t_ms, values[i], status[i]);
}

static void validate_tags(struct engine *e, int64_t t_ms, const double *values,
			  const enum tag_status *status)
{
	for (unsigned i = 0; i < e->cfg->tag_count; i++)
		validate_tag(e, i, t_ms, values, status);
}

void engine_step_ahead(struct engine *e, int64_t t_ms, const double *values,
		       const enum tag_status *status, uint64_t mask,
		       const struct engine_premodel *pre)
{
	assert(e != NULL);
	assert(values != NULL);
	assert(status != NULL);
	assert(mask == 0 || pre != NULL);
	const struct fg_config *cfg = e->cfg;
	e->event_count = 0;
	validate_tags(e, t_ms, values, status);
	unsigned k = 0;
	for (unsigned i = 0; i < cfg->section_count; i++)
		if (mask >> i & 1u)
			take_ahead(&e->sec[i], &pre[k++]);
		else
			eval_section(e, i, t_ms);
	eval_alarms(e, t_ms);
	e->t_ms = t_ms;
	e->step_count++;
}

void engine_step(struct engine *e, int64_t t_ms, const double *values,
		 const enum tag_status *status)
{
	engine_step_ahead(e, t_ms, values, status, 0, NULL);
}

void engine_premodel(struct engine *ahead, int64_t t_ms, const double *values,
		     const enum tag_status *status, uint64_t mask, struct engine_premodel *out)
{
	assert(ahead != NULL);
	assert(values != NULL);
	assert(status != NULL);
	assert(out != NULL || mask == 0);
	/* Only the tags these sections read: each tag's checks depend on its
	 * own samples alone, and the other engine checks them all. Which tags
	 * those are is worked out once per mask, not per row. */
	const struct fg_config *cfg = ahead->cfg;
	if (mask != ahead->premodel_mask) {
		memset(ahead->premodel_tag, 0, sizeof ahead->premodel_tag);
		for (unsigned i = 0; i < cfg->section_count; i++)
			if (mask >> i & 1u)
				for (int k = 0; k < SIGNAL_COUNT; k++)
					if (cfg->sections[i].signal[k] >= 0)
						ahead->premodel_tag[cfg->sections[i].signal[k]] = true;
		ahead->premodel_mask = mask;
	}
	for (unsigned i = 0; i < cfg->tag_count; i++)
		if (ahead->premodel_tag[i])
			validate_tag(ahead, i, t_ms, values, status);
	unsigned k = 0;
	for (unsigned i = 0; i < cfg->section_count; i++)
		if (mask >> i & 1u) {
			eval_section(ahead, i, t_ms);
			give_ahead(&out[k++], &ahead->sec[i]);
		}
	ahead->t_ms = t_ms;
	ahead->step_count++;
}

void engine_tag_status_text(struct engine *e, unsigned ti, const char *text)
{
	assert(e != NULL);
	assert(ti < e->cfg->tag_count);
	char *dst = e->tags[ti].status_text;
	size_t n = text != NULL ? strlen(text) : 0;
	if (n >= ALARM_STATUS_TEXT_MAX)
		n = ALARM_STATUS_TEXT_MAX - 1;
	memcpy(dst, text != NULL ? text : "", n);
	dst[n] = '\0';
}

static int command(struct engine *e, unsigned ai, int rc, const struct alarm_event *ev)
{
	(void)ai;
	if (rc == 0)
		push_event(e, ev);
	return rc;
}

int engine_ack(struct engine *e, unsigned ai, int64_t t_ms)
{
	assert(e != NULL);
	assert(ai < e->cfg->alarm_count);
	struct alarm_event ev;
	return command(e, ai, alarm_ack(&e->alarms[ai], t_ms, &ev), &ev);
}

int engine_shelve(struct engine *e, unsigned ai, double duration_s, int64_t t_ms)
{
	assert(e != NULL);
	assert(ai < e->cfg->alarm_count);
	struct alarm_event ev;
	return command(e, ai, alarm_shelve(&e->alarms[ai], duration_s, t_ms, &ev), &ev);
}

int engine_unshelve(struct engine *e, unsigned ai, int64_t t_ms)
{
	assert(e != NULL);
	assert(ai < e->cfg->alarm_count);
	struct alarm_event ev;
	return command(e, ai, alarm_unshelve(&e->alarms[ai], t_ms, &ev), &ev);
}

int engine_state_save(const struct engine *e, const char *path, int64_t now_t_ms)
{
	assert(e != NULL);
	assert(path != NULL);
	return alarmstate_save(path, e->alarms, e->cfg->alarm_count, now_t_ms);
}

int engine_state_load(struct engine *e, const char *path, char *err, size_t err_size)
{
	assert(e != NULL);
	assert(path != NULL);
	return alarmstate_load(path, e->alarms, e->cfg->alarm_count, err, err_size);
}
