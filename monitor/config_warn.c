/*
 * config_warn.c - things a config may say that load but are probably not what
 * was meant. They are kept in cfg->warnings as "FILE:LINE: warning: what" and
 * printed by `floodgauge check`; nothing stops on them:
 *  - a level in % of span without span_m: the soft sensors that need metres
 *    stay off (named);
 *  - an alarm on a result field its section's type never has (weep_pct on a
 *    packed section is always empty, so the alarm can never fire);
 *  - a high-high setpoint that is not above the high one on the same field;
 *  - two polled tags reading the same register of the same source.
 */
#include "config_int.h"

#include <assert.h>
#include <math.h>
#include <stdarg.h>
#include <string.h>

#include "regcodec.h"

void config_warn(struct config_ctx *c, int line, const char *fmt, ...)
{
	struct fg_config *cfg = c->cfg;
	if (cfg->warning_count >= CONFIG_WARNINGS_MAX)
		return;
	char *w = cfg->warnings[cfg->warning_count++];
	int n = line > 0 ? snprintf(w, CONFIG_WARNING_SIZE, "%s:%d: warning: ", c->path, line)
			 : snprintf(w, CONFIG_WARNING_SIZE, "%s: warning: ", c->path);
	if (n < 0 || n >= CONFIG_WARNING_SIZE)
		return; /* an over-long path: the prefix, cut, is still a hint */
	va_list ap;
	va_start(ap, fmt);
	vsnprintf(w + n, CONFIG_WARNING_SIZE - (size_t)n, fmt, ap);
	va_end(ap);
}

/* ---- fields a type never has --------------------------------------------- */

#define TB(t) (1u << (t))

/* The type-specific result fields and the section types whose models write
 * them (the r->v[RF_...] assignments in models/tray.c, packed.c, spray.c,
 * bubble.c, packed_bubble.c, stirred.c and loop.c). Fields not listed are
 * written for every type (models/section.c, the engine's soft sensors) or
 * depend on the tags wired, not on the type. */
static const struct {
	enum result_field field;
	unsigned types;
} type_fields[] = {
	{RF_JET_FLOOD_PCT, TB(SECTION_TRAY)},
	{RF_DC_BACKUP_PCT, TB(SECTION_TRAY)},
	{RF_WEEP_PCT, TB(SECTION_TRAY)},
	{RF_CLEAR_LIQUID_M, TB(SECTION_TRAY)},
	{RF_LOADING_PCT, TB(SECTION_PACKED)},
	{RF_DP_FLOOD_PCT, TB(SECTION_TRAY) | TB(SECTION_PACKED)},
	{RF_CARRYOVER_FRAC, TB(SECTION_SPRAY)},
	{RF_GAS_HOLDUP_FRAC, TB(SECTION_BUBBLE) | TB(SECTION_PACKED_BUBBLE) | TB(SECTION_STIRRED)},
	{RF_GAS_HOLDUP_DP_FRAC, TB(SECTION_BUBBLE) | TB(SECTION_PACKED_BUBBLE)},
	{RF_EXPANDED_LEVEL_M, TB(SECTION_BUBBLE) | TB(SECTION_PACKED_BUBBLE)},
	{RF_CARRYOVER_MARGIN_M, TB(SECTION_BUBBLE) | TB(SECTION_PACKED_BUBBLE)},
	{RF_GAS_HOLDUP_COLUMN_FRAC, TB(SECTION_PACKED_BUBBLE)},
	{RF_FLOW_NUMBER, TB(SECTION_STIRRED)},
	{RF_FROUDE_NUMBER, TB(SECTION_STIRRED)},
	{RF_DISPERSION_PCT, TB(SECTION_STIRRED)},
	{RF_POWER_RATIO_MODEL, TB(SECTION_STIRRED)},
	{RF_POWER_RATIO_MEASURED, TB(SECTION_STIRRED)},
	{RF_RISER_HOLDUP_FRAC, TB(SECTION_LOOP)},
	{RF_DOWNCOMER_HOLDUP_FRAC, TB(SECTION_LOOP)},
	{RF_CIRCULATION_VELOCITY, TB(SECTION_LOOP)},
	{RF_CIRCULATION_PCT, TB(SECTION_LOOP)},
	{RF_CARRY_UNDER_M3S, TB(SECTION_LOOP)},
};

bool config_type_has_field(enum section_type type, int field)
{
	assert(type < SECTION_TYPE_COUNT);
	for (size_t i = 0; i < sizeof type_fields / sizeof type_fields[0]; i++)
		if ((int)type_fields[i].field == field)
			return (type_fields[i].types & TB(type)) != 0;
	return true;
}

/* ---- the checks ---------------------------------------------------------- */

static void warn_level_without_span(struct config_ctx *c)
{
	const struct fg_config *cfg = c->cfg;
	for (unsigned si = 0; si < cfg->section_count; si++) {
		const struct section_cfg *s = &cfg->sections[si];
		int ti = s->signal[SIGNAL_LEVEL];
		if (ti < 0 || config_tag_is_length(&cfg->tags[ti]))
			continue;
		const struct tag_cfg *t = &cfg->tags[ti];
		char off[200] = "";
		if (s->signal[SIGNAL_LIQUID_OUT_FLOW] >= 0)
			snprintf(off, sizeof off, "the liquid inventory (inventory_m3)");
		bool swell = s->geom.type == SECTION_BUBBLE || s->geom.type == SECTION_PACKED_BUBBLE;
		if (swell)
			snprintf(off + strlen(off), sizeof off - strlen(off), "%sthe level swell %s",
				 off[0] != '\0' ? " and " : "",
				 isfinite(s->geom.bubble.clear_liquid_height_m)
					 ? "(it uses clear_liquid_height_m instead)"
					 : "(expanded_level_m, flood_pct by level)");
		config_warn(c, t->line, "level tag %s of [section.%s] is in %% of span without "
					"span_m (and zero_m): %s%s; the run goes on", t->name, s->name,
			    off[0] != '\0' ? "stays off: " : "nothing needs it in metres now",
			    off);
	}
}

static void warn_alarm_fields(struct config_ctx *c)
{
	const struct fg_config *cfg = c->cfg;
	for (unsigned ai = 0; ai < cfg->alarm_count; ai++) {
		const struct alarm_cfg *a = &cfg->alarms[ai];
		const struct section_cfg *s = &cfg->sections[a->section_index];
		if (a->field < 0 || a->field >= RF_COUNT ||
		    config_type_has_field(s->geom.type, a->field))
			continue;
		int line = c->alm[ai].signal.line > 0 ? c->alm[ai].signal.line
						      : config_alarm_header_line(c, a->name);
		config_warn(c, line, "[alarm.%s] watches %s, which a %s section never has: it can "
				     "never fire", a->name, result_fields[a->field].name,
			    config_section_type_name(s->geom.type));
	}
}

static void warn_high_high(struct config_ctx *c)
{
	const struct fg_config *cfg = c->cfg;
	for (unsigned i = 0; i < cfg->alarm_count; i++) {
		const struct alarm_cfg *hh = &cfg->alarms[i];
		if (hh->kind != ALARM_KIND_HIGH_HIGH)
			continue;
		for (unsigned k = 0; k < cfg->alarm_count; k++) {
			const struct alarm_cfg *h = &cfg->alarms[k];
			if (h->kind != ALARM_KIND_HIGH || h->section_index != hh->section_index ||
			    h->field != hh->field || hh->setpoint > h->setpoint)
				continue;
			config_warn(c, config_alarm_header_line(c, hh->name),
				    "[alarm.%s] high-high setpoint %g is not above the high setpoint %g "
				    "of [alarm.%s] on the same field", hh->name, hh->setpoint,
				    h->setpoint, h->name);
		}
	}
}

static void warn_shared_registers(struct config_ctx *c)
{
	const struct fg_config *cfg = c->cfg;
	for (unsigned i = 0; i < cfg->tag_count; i++) {
		const struct tag_cfg *t = &cfg->tags[i];
		if (t->source_index < 0)
			continue;
		unsigned wt = regcodec_width((enum regcodec_type)t->type);
		for (unsigned k = 0; k < i; k++) {
			const struct tag_cfg *o = &cfg->tags[k];
			if (o->source_index != t->source_index || o->table != t->table)
				continue;
			unsigned wo = regcodec_width((enum regcodec_type)o->type);
			if (t->address < o->address + wo && o->address < t->address + wt) {
				config_warn(c, t->line, "[tag.%s] reads %s register %u, as [tag.%s] (line "
							"%d) does on source %s", t->name,
					    t->table == TAG_TABLE_INPUT ? "input" : "holding",
					    t->address, o->name, o->line,
					    cfg->sources[t->source_index].name);
				break;
			}
		}
	}
}

void config_collect_warnings(struct config_ctx *c)
{
	assert(c != NULL);
	c->cfg->warning_count = 0;
	warn_level_without_span(c);
	warn_alarm_fields(c);
	warn_high_high(c);
	warn_shared_registers(c);
}
