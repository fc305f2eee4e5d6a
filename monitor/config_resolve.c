/*
 * config_resolve.c - the second half of config loading: resolves names into
 * indices (tags of a section, the source of a tag, the section and field of
 * an alarm, the export list), fills defaults that depend on other keys, and
 * checks what no single key can show: geometry that cannot be right, units
 * that do not fit the signal, a gas density that cannot be computed.
 */
#include "config_int.h"

#include <assert.h>
#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <string.h>

#include "mbclient.h"
#include "packing.h"
#include "suggest.h"
#include "tzone.h"
#include "validate.h"

/* Name getters for "did you mean" (suggest.h). */
static const char *tag_name_at(const void *ctx, unsigned i)
{
	return ((const struct fg_config *)ctx)->tags[i].name;
}

static const char *source_name_at(const void *ctx, unsigned i)
{
	return ((const struct fg_config *)ctx)->sources[i].name;
}

static const char *section_name_at(const void *ctx, unsigned i)
{
	return ((const struct fg_config *)ctx)->sections[i].name;
}

static const char *alarm_name_at(const void *ctx, unsigned i)
{
	return ((const struct fg_config *)ctx)->alarms[i].name;
}

static const char *field_name_at(const void *ctx, unsigned i)
{
	(void)ctx;
	return result_fields[i].name;
}

const char *config_suggest(const struct fg_config *cfg, enum config_name_kind kind,
			   const char *word, char *buf, size_t buf_size)
{
	assert(cfg != NULL);
	assert(word != NULL);
	const char *best = NULL;
	switch (kind) {
	case CONFIG_NAME_TAG: best = suggest_best(word, tag_name_at, cfg, cfg->tag_count); break;
	case CONFIG_NAME_SOURCE:
		best = suggest_best(word, source_name_at, cfg, cfg->source_count);
		break;
	case CONFIG_NAME_SECTION:
		best = suggest_best(word, section_name_at, cfg, cfg->section_count);
		break;
	case CONFIG_NAME_ALARM:
		best = suggest_best(word, alarm_name_at, cfg, cfg->alarm_count);
		break;
	case CONFIG_NAME_FIELD: best = suggest_best(word, field_name_at, NULL, RF_COUNT); break;
	}
	return suggest_text(best, buf, buf_size);
}

const char *config_tag_column(const struct tag_cfg *t)
{
	assert(t != NULL);
	return t->column[0] != '\0' ? t->column : t->name;
}

/* Two recorded tags cannot share a data column: which would it feed? */
static void resolve_columns(struct config_ctx *c)
{
	const struct fg_config *cfg = c->cfg;
	for (unsigned i = 0; i < cfg->tag_count; i++) {
		const struct tag_cfg *t = &cfg->tags[i];
		if (t->source_index < 0) {
			if (t->column[0] != '\0' || t->hold_s > 0.0)
				config_error(c, t->line, "[tag.%s]: column and hold_s are for polled "
							 "or recorded tags, not 'value =' tags", t->name);
			continue;
		}
		for (unsigned k = 0; k < i; k++) {
			const struct tag_cfg *o = &cfg->tags[k];
			if (o->source_index >= 0 &&
			    strcmp(config_tag_column(o), config_tag_column(t)) == 0)
				config_error(c, t->line, "[tag.%s] reads data column '%s', which is "
							 "already tag %s's", t->name,
					     config_tag_column(t), o->name);
		}
	}
}

static void resolve_replay(struct config_ctx *c)
{
	const struct replay_cfg *r = &c->cfg->replay;
	if (r->tz[0] == '\0')
		return;
	struct tzone z;
	char err[512];
	if (tzone_load(&z, r->tz, err, sizeof err) != 0)
		config_error(c, r->tz_line, "[replay] tz: %s", err);
	tzone_free(&z);
}

int config_tag_index(const struct fg_config *cfg, const char *name)
{
	for (unsigned i = 0; i < cfg->tag_count; i++)
		if (!strcmp(cfg->tags[i].name, name))
			return (int)i;
	return -1;
}

int config_section_index(const struct fg_config *cfg, const char *name)
{
	for (unsigned i = 0; i < cfg->section_count; i++)
		if (!strcmp(cfg->sections[i].name, name))
			return (int)i;
	return -1;
}

int config_alarm_index(const struct fg_config *cfg, const char *name)
{
	for (unsigned i = 0; i < cfg->alarm_count; i++)
		if (!strcmp(cfg->alarms[i].name, name))
			return (int)i;
	return -1;
}

static const char *const signal_names[SIGNAL_COUNT] = {
	[SIGNAL_GAS_FLOW] = "gas_flow",       [SIGNAL_LIQUID_FLOW] = "liquid_flow",
	[SIGNAL_LIQUID_OUT_FLOW] = "liquid_out_flow", [SIGNAL_DP] = "dp",
	[SIGNAL_PRESSURE] = "pressure",       [SIGNAL_TEMPERATURE] = "temperature",
	[SIGNAL_LEVEL] = "level",             [SIGNAL_GAS_DENSITY] = "gas_density",
	[SIGNAL_AGITATOR_SPEED] = "agitator_speed", [SIGNAL_MOTOR_POWER] = "motor_power",
	[SIGNAL_DP_RISER] = "dp_riser",       [SIGNAL_DP_DOWNCOMER] = "dp_downcomer",
};

const char *config_signal_name(enum section_signal s)
{
	assert(s < SIGNAL_COUNT);
	return signal_names[s];
}

double config_tag_to_si(const struct tag_cfg *t, double value)
{
	assert(t != NULL);
	if (t->unit == NULL)
		return value;
	double si = units_to_si(t->unit, value);
	/* A level in % of the transmitter's span, with the span known: metres. */
	if (t->unit->kind == UNIT_KIND_FRACTION && isfinite(t->span_m))
		return t->zero_m + si * t->span_m;
	return si;
}

bool config_tag_is_length(const struct tag_cfg *t)
{
	assert(t != NULL);
	if (t->unit == NULL)
		return false;
	return t->unit->kind == UNIT_KIND_LENGTH ||
	       (t->unit->kind == UNIT_KIND_FRACTION && isfinite(t->span_m));
}

static bool unit_fits(enum section_signal s, const struct unit *u)
{
	switch (s) {
	case SIGNAL_GAS_FLOW:
		return u->kind == UNIT_KIND_MASS_FLOW || u->kind == UNIT_KIND_VOLUME_FLOW ||
		       u->kind == UNIT_KIND_NORMAL_VOLUME_FLOW;
	case SIGNAL_LIQUID_FLOW:
	case SIGNAL_LIQUID_OUT_FLOW:
		return u->kind == UNIT_KIND_MASS_FLOW || u->kind == UNIT_KIND_VOLUME_FLOW;
	case SIGNAL_DP:
	case SIGNAL_DP_RISER:
	case SIGNAL_DP_DOWNCOMER:
		/* A difference: absolute-pressure units are fine, gauge offsets are not. */
		return units_usable_as_dp(u);
	case SIGNAL_PRESSURE: return u->kind == UNIT_KIND_PRESSURE;
	case SIGNAL_TEMPERATURE: return u->kind == UNIT_KIND_TEMPERATURE;
	case SIGNAL_LEVEL: /* metres, or % of the transmitter's span (span_m, zero_m) */
		return u->kind == UNIT_KIND_LENGTH || u->kind == UNIT_KIND_FRACTION;
	case SIGNAL_GAS_DENSITY: return u->kind == UNIT_KIND_DENSITY;
	case SIGNAL_AGITATOR_SPEED: return u->kind == UNIT_KIND_ROTATION;
	case SIGNAL_MOTOR_POWER: return u->kind == UNIT_KIND_POWER;
	case SIGNAL_COUNT: break;
	}
	return false;
}

static void resolve_sources(struct config_ctx *c)
{
	for (unsigned i = 0; i < c->cfg->source_count; i++) {
		struct source_cfg *s = &c->cfg->sources[i];
		uint32_t set = c->source_keys_set[i];
		if (!(set & 1u)) {
			config_error(c, s->line, "[source.%s] needs 'protocol' (modbus-tcp or "
						 "modbus-rtu)", s->name);
			continue;
		}
		if (!(set & (1u << 4)))
			s->timeout_s = 0.5;
		if (s->protocol == SOURCE_MODBUS_TCP) {
			if (!(set & (1u << 1)))
				config_error(c, s->line, "[source.%s] needs 'host'", s->name);
			if (!(set & (1u << 2)))
				s->port = 502;
			if (!(set & (1u << 3)))
				s->unit_id = 255; /* MODBUS_TCP_SLAVE: direct TCP devices ignore it */
			continue;
		}
		if (!(set & (1u << 5)))
			config_error(c, s->line, "[source.%s] needs 'device' for modbus-rtu", s->name);
		if (!(set & (1u << 3)))
			s->unit_id = 1;
		if (s->unit_id < 1 || s->unit_id > 247)
			config_error(c, s->line, "[source.%s]: an RTU unit_id is 1..247", s->name);
		if (!(set & (1u << 6)))
			s->baud = 19200;
		static const int bauds[] = {MBCLIENT_BAUD_RATES};
		bool ok = false;
		for (unsigned k = 0; k < sizeof(bauds) / sizeof(bauds[0]); k++)
			ok = ok || bauds[k] == s->baud;
		if (!ok) /* libmodbus falls back to 9600 silently for others */
			config_error(c, s->line, "[source.%s]: baud %d is not a standard rate",
				     s->name, s->baud);
		if (!(set & (1u << 7)))
			s->parity = 'E'; /* the Modbus serial line default */
		if (!(set & (1u << 8)))
			s->data_bits = 8;
		if (s->data_bits != 8) /* RTU frames are 8-bit (Modbus over serial line 2.5.1) */
			config_error(c, s->line, "[source.%s]: modbus-rtu needs data_bits = 8", s->name);
		if (!(set & (1u << 9)))
			s->stop_bits = 1;
	}
}

static void resolve_tags(struct config_ctx *c)
{
	for (unsigned i = 0; i < c->cfg->tag_count; i++) {
		struct tag_cfg *t = &c->cfg->tags[i];
		uint32_t set = c->tag_keys_set[i];
		bool polled = (set & 1u) != 0, fixed = (set & (1u << 10)) != 0;
		if (polled && fixed)
			config_error(c, t->line, "[tag.%s] has both 'source' and 'value'", t->name);
		if (!polled && !fixed)
			config_error(c, t->line, "[tag.%s] needs 'source' (polled) or 'value' (fixed)",
				     t->name);
		if (polled) {
			char dym[SUGGEST_NAME_MAX + 32];
			const struct pending_name *pn = &c->tag_source[i];
			for (unsigned k = 0; k < c->cfg->source_count; k++)
				if (!strcmp(c->cfg->sources[k].name, pn->name))
					t->source_index = (int)k;
			if (t->source_index < 0)
				config_error(c, pn->line, "source '%s' is not defined%s", pn->name,
					     config_suggest(c->cfg, CONFIG_NAME_SOURCE, pn->name, dym,
							    sizeof(dym)));
			if (!(set & (1u << 2)))
				config_error(c, t->line, "[tag.%s] needs 'address'", t->name);
			if (!(set & (1u << 3)))
				config_error(c, t->line, "[tag.%s] needs 'type' (int16, uint16, int32, "
							 "uint32, float32)", t->name);
			bool wide = t->type == TAG_TYPE_INT32 || t->type == TAG_TYPE_UINT32 ||
				    t->type == TAG_TYPE_FLOAT32;
			if (wide && t->address > 65534)
				config_error(c, t->line, "[tag.%s]: a 32-bit value at 65535 has no "
							 "second register", t->name);
		}
		bool span_given = isfinite(t->span_m) || t->zero_m != 0.0;
		if (span_given && (t->unit == NULL || t->unit->kind != UNIT_KIND_FRACTION))
			config_error(c, t->line, "[tag.%s]: span_m and zero_m are for a level in %% "
						 "of span (unit = %%)", t->name);
		/* Frozen detection is on by default for what is read from the plant
		 * or a historian; a 'value =' tag never changes by design. */
		if (isnan(t->frozen_s))
			t->frozen_s = polled ? VALIDATE_FROZEN_DEFAULT_S : 0.0;
		if (isfinite(t->min) && isfinite(t->max) && t->min >= t->max)
			config_error(c, t->line, "[tag.%s]: min must be below max", t->name);
		if (fixed && ((isfinite(t->min) && t->fixed_value < t->min) ||
			      (isfinite(t->max) && t->fixed_value > t->max)))
			config_error(c, t->line, "[tag.%s]: value is outside min..max", t->name);
	}
}

static int resolve_choice(struct config_ctx *c, const struct pending_name *pn, const char *key,
			  const char *const *names, int dflt)
{
	if (pn->line == 0)
		return dflt;
	for (int i = 0; names[i] != NULL; i++)
		if (!strcmp(pn->name, names[i]))
			return i;
	char list[128] = "";
	for (int i = 0; names[i] != NULL; i++) {
		size_t n = strlen(list);
		snprintf(list + n, sizeof(list) - n, "%s%s", i ? ", " : "", names[i]);
	}
	config_error(c, pn->line, "%s: '%s' is not one of: %s", key, pn->name, list);
	return dflt;
}

static void resolve_signals(struct config_ctx *c, unsigned si)
{
	struct section_cfg *s = &c->cfg->sections[si];
	struct section_pending *sp = &c->sec[si];
	for (int k = 0; k < SIGNAL_COUNT; k++) {
		const struct pending_name *pn = &sp->signal[k];
		if (pn->line == 0)
			continue;
		int ti = config_tag_index(c->cfg, pn->name);
		if (ti < 0) {
			char dym[SUGGEST_NAME_MAX + 32];
			config_error(c, pn->line, "%s: tag '%s' is not defined%s", signal_names[k],
				     pn->name, config_suggest(c->cfg, CONFIG_NAME_TAG, pn->name, dym,
							      sizeof(dym)));
			continue;
		}
		const struct tag_cfg *t = &c->cfg->tags[ti];
		if (t->unit == NULL) {
			config_error(c, t->line, "[tag.%s] is used as %s and needs a 'unit'", t->name,
				     signal_names[k]);
			continue;
		}
		if (!unit_fits((enum section_signal)k, t->unit)) {
			config_error(c, pn->line, "%s: tag '%s' is in %s (%s), which is not a unit for "
						  "%s", signal_names[k], t->name, t->unit->name,
				     units_kind_name(t->unit->kind), signal_names[k]);
			continue;
		}
		s->signal[k] = ti;
	}
	bool has_density = s->signal[SIGNAL_GAS_DENSITY] >= 0;
	bool has_pt = s->signal[SIGNAL_PRESSURE] >= 0 && s->signal[SIGNAL_TEMPERATURE] >= 0;
	if (!has_density && !(has_pt && isfinite(s->props.gas_molar_mass_kgkmol)))
		config_error(c, s->line, "[section.%s]: the gas density needs either a gas_density "
					 "tag, or pressure and temperature tags with "
					 "gas_molar_mass_kgkmol", s->name);
	if (s->signal[SIGNAL_LIQUID_OUT_FLOW] >= 0 && s->signal[SIGNAL_LEVEL] < 0)
		config_error(c, s->line, "[section.%s]: liquid_out_flow is for the liquid inventory "
					 "and needs a level tag too", s->name);
	if (s->signal[SIGNAL_MOTOR_POWER] >= 0 && s->signal[SIGNAL_AGITATOR_SPEED] < 0)
		config_error(c, s->line, "[section.%s]: motor_power needs agitator_speed too", s->name);
	if (s->geom.type == SECTION_BUBBLE && s->signal[SIGNAL_LEVEL] < 0 &&
	    !isfinite(s->geom.bubble.clear_liquid_height_m))
		config_error(c, s->line, "[section.%s]: a bubble section needs a level tag or "
					 "clear_liquid_height_m", s->name);
	if (s->geom.type == SECTION_BUBBLE && s->signal[SIGNAL_DP] >= 0 &&
	    !isfinite(s->geom.bubble.tap_spacing_m))
		config_error(c, s->line, "[section.%s]: the dp tag of a bubble section needs "
					 "tap_spacing_m", s->name);
}

/* A datasheet area in m2 as the fraction `frac` of `of_m2`, in lo..hi. */
static void area_from_m2(struct config_ctx *c, const struct section_pending *sp, const char *key,
			 double m2, double of_m2, const char *of_what, double lo, double hi,
			 double *frac)
{
	if (!isfinite(m2))
		return;
	*frac = m2 / of_m2;
	if (*frac < lo || *frac > hi * (1.0 + CONFIG_AREA_ROUNDING))
		config_error(c, config_section_key_line(sp, key),
			     "%s = %.4g m2 is %.3g of the %s (%.4g m2); expected %.2g..%.2g", key, m2,
			     *frac, of_what, of_m2, lo, hi);
}

static void resolve_tray(struct config_ctx *c, struct section_cfg *s,
			 const struct section_pending *sp)
{
	struct tray_geom *t = &s->geom.tray;
	int L = s->line;
	double tower_m2 = section_area_m2(&s->geom);
	area_from_m2(c, sp, "active_area_m2", s->active_area_m2, tower_m2,
		     "tower cross-section pi D^2/4", 0.2, 1.0, &t->active_area_frac);
	area_from_m2(c, sp, "downcomer_area_m2", s->downcomer_area_m2, tower_m2,
		     "tower cross-section pi D^2/4", 0.01, 0.4, &t->downcomer_area_frac);
	area_from_m2(c, sp, "hole_area_m2", s->hole_area_m2, t->active_area_frac * tower_m2,
		     "active area", 0.01, 0.5, &t->hole_area_frac);
	if (t->weir_height_m >= t->spacing_m)
		config_error(c, L, "[section.%s]: weir_height_m %.3g is not below tray_spacing_m %.3g",
			     s->name, t->weir_height_m, t->spacing_m);
	if (t->downcomer_clearance_m >= t->spacing_m)
		config_error(c, L, "[section.%s]: downcomer_clearance_m must be below the tray "
				   "spacing", s->name);
	if (t->weir_length_m >= s->geom.diameter_m)
		config_error(c, L, "[section.%s]: weir_length_m %.3g m is not shorter than the "
				   "diameter %.3g m", s->name, t->weir_length_m, s->geom.diameter_m);
	/* A one-pass tray: downcomer top and bottom seal areas plus the active
	 * area, allowing for a datasheet's rounding (CONFIG_AREA_ROUNDING). */
	double sum = t->active_area_frac + 2.0 * t->downcomer_area_frac;
	if (sum > 1.0 + CONFIG_AREA_ROUNDING)
		config_error(c, L, "[section.%s]: active area + 2 x downcomer area = %.4g of the tower "
				   "cross-section, more than it (%.1f %% allowed for rounding)", s->name,
			     sum, 100.0 * CONFIG_AREA_ROUNDING);
	if (t->hole_diameter_m <= t->deck_thickness_m * 0.2)
		config_error(c, L, "[section.%s]: hole_diameter_m is implausibly small for the deck "
				   "thickness", s->name);
}

static void resolve_packed(struct config_ctx *c, struct section_cfg *s, struct section_pending *sp)
{
	struct packed_geom *p = &s->geom.packed;
	if (sp->packing.line > 0) {
		bool structured = false;
		const struct packing_constants *row = packing_lookup(sp->packing.name, &structured);
		if (row == NULL) {
			config_error(c, sp->packing.line, "packing '%s' is not in the table; known: %s",
				     sp->packing.name, packing_names());
			return;
		}
		snprintf(p->packing, sizeof(p->packing), "%s", sp->packing.name);
		/* Keys given in the section override the table. */
		_Static_assert(sizeof(p->c) % sizeof(double) == 0, "constants are all doubles");
		const double *src = (const double *)row;
		double *dst = (double *)&p->c;
		for (size_t i = 0; i < sizeof(p->c) / sizeof(double); i++)
			if (isnan(dst[i]))
				dst[i] = src[i];
		p->structured = p->structured || structured;
	}
	if (!isfinite(p->c.area_m2m3) || !isfinite(p->c.void_frac))
		config_error(c, s->line, "[section.%s]: a packed section needs 'packing' (a table "
					 "name) or at least packing_area_m2m3 and packing_void_frac",
			     s->name);
}

static void resolve_packed_bubble(struct config_ctx *c, struct section_cfg *s,
				  struct section_pending *sp)
{
	struct section_geom *g = &s->geom;
	if (sp->packing.line > 0) {
		bool structured = false;
		const struct packing_constants *row = packing_lookup(sp->packing.name, &structured);
		if (row == NULL)
			config_error(c, sp->packing.line, "packing '%s' is not in the table; known: %s",
				     sp->packing.name, packing_names());
		else if (isnan(g->packed.c.void_frac))
			g->packed.c.void_frac = row->void_frac;
		snprintf(g->packed.packing, sizeof(g->packed.packing), "%s", sp->packing.name);
	}
	g->pbub.void_frac = g->packed.c.void_frac;
	g->pbub.bed_height_m = g->packed.height_m > 0.0 ? g->packed.height_m : NAN;
	if (!isfinite(g->pbub.void_frac))
		config_error(c, s->line, "[section.%s]: a packed-bubble section needs "
					 "packing_void_frac or a 'packing' from the table", s->name);
	if (s->signal[SIGNAL_LEVEL] < 0 && !isfinite(g->bubble.clear_liquid_height_m))
		config_error(c, s->line, "[section.%s]: a packed-bubble section needs a level tag "
					 "or clear_liquid_height_m", s->name);
	if (s->signal[SIGNAL_DP] >= 0 && !isfinite(g->bubble.tap_spacing_m))
		config_error(c, s->line, "[section.%s]: the dp tag of a packed-bubble section needs "
					 "tap_spacing_m", s->name);
	if (isfinite(g->bubble.clear_liquid_height_m) &&
	    g->bubble.clear_liquid_height_m >= g->bubble.overflow_height_m)
		config_error(c, s->line, "[section.%s]: clear_liquid_height_m must be below "
					 "overflow_height_m", s->name);
}

static void resolve_stirred(struct config_ctx *c, struct section_cfg *s)
{
	struct section_geom *g = &s->geom;
	g->stirred.clear_liquid_height_m = g->bubble.clear_liquid_height_m;
	if (g->stirred.impeller_diameter_m >= g->diameter_m)
		config_error(c, s->line, "[section.%s]: impeller_diameter_m %.3g m is not smaller "
					 "than the vessel diameter %.3g m", s->name,
			     g->stirred.impeller_diameter_m, g->diameter_m);
	double h = g->stirred.clear_liquid_height_m;
	if (isfinite(h) && g->stirred.impeller_clearance_m >= h)
		config_error(c, s->line, "[section.%s]: impeller_clearance_m must be below the "
					 "liquid height (clear_liquid_height_m)", s->name);
}

static void resolve_loop(struct config_ctx *c, struct section_cfg *s)
{
	const struct loop_geom *l = &s->geom.loop;
	double tower = section_area_m2(&s->geom);
	if (l->riser_area_m2 + l->downcomer_area_m2 > tower * 1.0001)
		config_error(c, s->line, "[section.%s]: riser_area_m2 + loop_downcomer_area_m2 = %.3g "
					 "m2 exceeds the vessel cross-section %.3g m2 (diameter_m)",
			     s->name, l->riser_area_m2 + l->downcomer_area_m2, tower);
	if (l->bottom_clearance_m >= l->height_m)
		config_error(c, s->line, "[section.%s]: bottom_clearance_m must be below "
					 "loop_height_m", s->name);
	if (isfinite(l->tap_spacing_m) && l->tap_spacing_m > l->height_m)
		config_error(c, s->line, "[section.%s]: loop_tap_spacing_m exceeds loop_height_m",
			     s->name);
}

static void resolve_sections(struct config_ctx *c)
{
	static const char *const tray_flood[] = {"fair", "kister-haas", NULL};
	static const char *const packed_flood[] = {"stichlmair", "billet-schultes", NULL};
	static const char *const kinds[] = {"sieve", "valve", "bubble-cap", NULL};
	static const char *const holdup[] = {"akita-yoshida", "hughmark", NULL};
	static const char *const impellers[] = {"disc-turbine", "hollow-blade", NULL};
	for (unsigned i = 0; i < c->cfg->section_count; i++) {
		struct section_cfg *s = &c->cfg->sections[i];
		struct section_pending *sp = &c->sec[i];
		if (config_section_keys_check(c, i) != 0)
			continue;
		resolve_signals(c, i);
		switch (s->geom.type) {
		case SECTION_TRAY:
			s->geom.tray.flood_method = (enum tray_flood_method)resolve_choice(
				c, &sp->flood_method, "flood_method", tray_flood, TRAY_FLOOD_FAIR);
			s->geom.tray.kind = (enum tray_kind)resolve_choice(c, &sp->tray_kind,
									   "tray_kind", kinds, 0);
			resolve_tray(c, s, sp);
			break;
		case SECTION_PACKED:
			s->geom.packed.flood_method = (enum packed_flood_method)resolve_choice(
				c, &sp->flood_method, "flood_method", packed_flood,
				PACKED_FLOOD_STICHLMAIR);
			resolve_packed(c, s, sp);
			break;
		case SECTION_SPRAY: break;
		case SECTION_BUBBLE:
			s->geom.bubble.holdup_method = (enum bubble_holdup_method)resolve_choice(
				c, &sp->holdup_method, "holdup_method", holdup, 0);
			if (isfinite(s->geom.bubble.clear_liquid_height_m) &&
			    s->geom.bubble.clear_liquid_height_m >= s->geom.bubble.overflow_height_m)
				config_error(c, s->line, "[section.%s]: clear_liquid_height_m must be "
							 "below overflow_height_m", s->name);
			break;
		case SECTION_PACKED_BUBBLE:
			s->geom.bubble.holdup_method = (enum bubble_holdup_method)resolve_choice(
				c, &sp->holdup_method, "holdup_method", holdup, 0);
			resolve_packed_bubble(c, s, sp);
			break;
		case SECTION_STIRRED:
			s->geom.stirred.impeller = (enum impeller_type)resolve_choice(
				c, &sp->impeller_type, "impeller_type", impellers, 0);
			resolve_stirred(c, s);
			break;
		case SECTION_LOOP: resolve_loop(c, s); break;
		case SECTION_TYPE_COUNT: assert(0);
		}
	}
}

int config_alarm_header_line(struct config_ctx *c, const char *name)
{
	char hdr[FG_TEXT_MAX];
	snprintf(hdr, sizeof(hdr), "alarm.%s", name);
	for (unsigned k = 0; k < c->seen_count; k++)
		if (!strcmp(c->seen[k].name, hdr))
			return c->seen[k].line;
	return 0;
}

static void resolve_alarm(struct config_ctx *c, unsigned ai)
{
	struct alarm_cfg *a = &c->cfg->alarms[ai];
	struct alarm_pending *ap = &c->alm[ai];
	int L = config_alarm_header_line(c, a->name);
	if (ap->section.line == 0 || ap->kind.line == 0 || ap->signal.line == 0) {
		config_error(c, L, "[alarm.%s] needs 'section', 'signal' and 'kind'", a->name);
		return;
	}
	int si = config_section_index(c->cfg, ap->section.name);
	char dym[SUGGEST_NAME_MAX + 32];
	if (si < 0) {
		config_error(c, ap->section.line, "section '%s' is not defined%s", ap->section.name,
			     config_suggest(c->cfg, CONFIG_NAME_SECTION, ap->section.name, dym,
					    sizeof(dym)));
		return;
	}
	a->section_index = (unsigned)si;
	if (alarm_kind_parse(ap->kind.name, &a->kind) != 0) {
		config_error(c, ap->kind.line, "kind: '%s' is not one of: high, high-high, low, rate, "
					       "deviation, diagnostic", ap->kind.name);
		return;
	}
	if (ap->priority.line > 0 && alarm_priority_parse(ap->priority.name, &a->priority) != 0) {
		config_error(c, ap->priority.line, "priority: '%s' is not one of: low, medium, high, "
						   "urgent", ap->priority.name);
		return;
	}
	if (a->kind == ALARM_KIND_DIAGNOSTIC) {
		if (strcmp(ap->signal.name, "quality") != 0) {
			config_error(c, ap->signal.line, "a diagnostic alarm takes signal = quality");
			return;
		}
		a->field = ALARM_FIELD_QUALITY;
		/* Defaults that keep a diagnostic clean: a flickering input (a
		 * reading hovering at a frozen or spike threshold) raises it once
		 * and clears it once, not every few seconds. */
		if (!(ap->keys_set & (1u << 5)))
			a->on_delay_s = ALARM_DIAG_ON_DELAY_DEFAULT_S;
		if (!(ap->keys_set & (1u << 6)))
			a->off_delay_s = ALARM_DIAG_OFF_DELAY_DEFAULT_S;
	} else {
		a->field = result_field_lookup(ap->signal.name);
		if (a->field < 0) {
			config_error(c, ap->signal.line, "signal: '%s' is not a result field%s (e.g. "
							 "flood_index, flood_pct, weep_pct, dp_pa)",
				     ap->signal.name, config_suggest(c->cfg, CONFIG_NAME_FIELD,
								     ap->signal.name, dym,
								     sizeof(dym)));
			return;
		}
	}
	if (a->kind == ALARM_KIND_DEVIATION) {
		a->reference_field = ap->reference.line ? result_field_lookup(ap->reference.name) : -1;
		if (a->reference_field < 0) {
			config_error(c, ap->reference.line ? ap->reference.line : L,
				     "a deviation alarm needs 'reference', a result field such as "
				     "dp_model_pa");
			return;
		}
	} else if (ap->reference.line) {
		config_error(c, ap->reference.line, "'reference' is only for kind = deviation");
		return;
	}
	if (a->kind != ALARM_KIND_DIAGNOSTIC && !(ap->keys_set & (1u << 3))) {
		config_error(c, L, "[alarm.%s] needs 'setpoint'", a->name);
		return;
	}
	char err[160];
	if (alarm_cfg_check(a, err, sizeof(err)) != 0)
		config_error(c, L, "[alarm.%s]: %s", a->name, err);
}

static void resolve_export(struct config_ctx *c)
{
	struct export_cfg *e = &c->cfg->exp;
	if (!e->enabled)
		return;
	if (!(c->export_keys_set & 1u)) {
		snprintf(e->host, sizeof(e->host), "127.0.0.1");
		e->port = 1502;
	}
	char list[sizeof(c->export_fields)];
	snprintf(list, sizeof(list), "%s", c->export_fields);
	for (char *save = NULL, *tok = strtok_r(list, ", \t", &save); tok != NULL;
	     tok = strtok_r(NULL, ", \t", &save)) {
		char *dot = strchr(tok, '.');
		int si = -1, fi = -1;
		if (dot != NULL) {
			*dot = '\0';
			si = config_section_index(c->cfg, tok);
			fi = result_field_lookup(dot + 1);
		}
		if (si < 0 || fi < 0) {
			config_error(c, c->export_fields_line, "fields: '%s%s%s' is not SECTION.FIELD "
							       "of a defined section and result field",
				     tok, dot ? "." : "", dot ? dot + 1 : "");
			continue;
		}
		if (e->field_count == FG_EXPORT_FIELDS_MAX) {
			config_error(c, c->export_fields_line, "fields: at most %d",
				     FG_EXPORT_FIELDS_MAX);
			return;
		}
		e->fields[e->field_count].section_index = (unsigned)si;
		e->fields[e->field_count].field = fi;
		e->field_count++;
	}
	if (e->base_address + 2u * e->field_count > 65536u)
		config_error(c, e->line, "[export.modbus]: fields do not fit above base_address");
}

static void resolve_mqtt(struct config_ctx *c)
{
	struct mqtt_cfg *m = &c->cfg->mqtt;
	if (!m->enabled)
		return;
	if (m->uri[0] == '\0')
		config_error(c, m->line, "[mqtt] needs 'uri' (e.g. tcp://127.0.0.1:1883)");
	if (m->client_id[0] == '\0')
		snprintf(m->client_id, sizeof(m->client_id), "floodgauge-%.30s", c->cfg->monitor.name);
	if (m->topic_prefix[0] == '\0')
		snprintf(m->topic_prefix, sizeof(m->topic_prefix), "floodgauge/%s",
			 c->cfg->monitor.name);
	if (!(c->mqtt_keys_set & (1u << 7)))
		m->keepalive_s = 30.0;
	if (!(c->mqtt_keys_set & (1u << 8)))
		m->buffer_messages = 1000;
	if (strpbrk(m->topic_prefix, "+#") != NULL)
		config_error(c, m->line, "topic_prefix must not contain MQTT wildcards");
}

int config_resolve(struct config_ctx *c)
{
	resolve_sources(c);
	resolve_tags(c);
	resolve_columns(c);
	resolve_replay(c);
	resolve_sections(c);
	for (unsigned i = 0; i < c->cfg->alarm_count; i++)
		resolve_alarm(c, i);
	resolve_export(c);
	resolve_mqtt(c);
	if (c->cfg->section_count == 0)
		config_error(c, 0, "no [section.NAME] defined");
	if (c->error_count == 0)
		config_collect_warnings(c);
	return c->error_count ? -EINVAL : 0;
}
