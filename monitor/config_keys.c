/*
 * config_keys.c - the keys of each kind of config section, one function per
 * section kind, called by the INI handler in config.c with the line it is on.
 *
 * The many keys of [section.NAME] are table-driven: each entry names the key,
 * its kind, its range, the section types it applies to and where in the struct
 * it lands. Which keys a section may or must give depends on its type, which
 * can come last, so config_section_keys_check() runs once the file is read.
 * The other sections are small enough for a plain chain of names.
 */
#include "config_int.h"

#include <assert.h>
#include <errno.h>
#include <stddef.h>
#include <string.h>

#include "evlog.h"
#include "mbserver.h"
#include "mqttlink.h"
#include "suggest.h"

/* ---- keys of [section.NAME] -------------------------------------------- */

enum key_kind { KK_DOUBLE, KK_UINT, KK_BOOL, KK_PROP, KK_SIGNAL, KK_PENDING, KK_TYPE };

#define T_TRAY (1u << SECTION_TRAY)
#define T_PACKED (1u << SECTION_PACKED)
#define T_SPRAY (1u << SECTION_SPRAY)
#define T_BUBBLE (1u << SECTION_BUBBLE)
#define T_PBUB (1u << SECTION_PACKED_BUBBLE)
#define T_STIR (1u << SECTION_STIRRED)
#define T_LOOP (1u << SECTION_LOOP)
#define T_ALL (T_TRAY | T_PACKED | T_SPRAY | T_BUBBLE | T_PBUB | T_STIR | T_LOOP)
#define T_BATCH (T_BUBBLE | T_PBUB | T_STIR | T_LOOP) /* liquid may be batch */

struct key_desc {
	const char *name;
	enum key_kind kind;
	unsigned types;   /* section types it applies to */
	size_t offset;    /* into struct section_cfg (double, unsigned, bool, prop_table) */
	double lo, hi;
	unsigned required;/* section types that must give it */
};

#define SC(field) offsetof(struct section_cfg, field)
#define GEO(field) offsetof(struct section_cfg, geom.field)

static const struct key_desc section_keys[] = {
	{"type", KK_TYPE, T_ALL, 0, 0, 0, T_ALL},
	{"diameter_m", KK_DOUBLE, T_ALL, GEO(diameter_m), 0.05, 20.0, T_ALL},
	{"in_service_gas_kgs", KK_DOUBLE, T_ALL, SC(in_service_gas_kgs), 0.0, 1e6, 0},
	{"sump_area_m2", KK_DOUBLE, T_ALL, SC(sump_area_m2), 1e-4, 400.0, 0},
	/* calibration (floodgauge calibrate) and the soft sensors' learning gate */
	{"capacity_factor", KK_DOUBLE, T_ALL, GEO(capacity_factor), 0.3, 2.0, 0},
	{"dp_factor", KK_DOUBLE, T_ALL, SC(dp_factor), 0.5, 2.0, 0},
	{"steady_window_s", KK_DOUBLE, T_ALL, SC(steady_window_s), 30.0, 7200.0, 0},
	{"steady_load_band", KK_DOUBLE, T_ALL, SC(steady_load_band), 0.001, 0.2, 0},
	{"normal_dp_sigmas", KK_DOUBLE, T_ALL, SC(normal_dp_sigmas), 1.0, 20.0, 0},
	{"gas_flow", KK_SIGNAL, T_ALL, SIGNAL_GAS_FLOW, 0, 0, T_ALL},
	{"liquid_flow", KK_SIGNAL, T_ALL, SIGNAL_LIQUID_FLOW, 0, 0, T_TRAY | T_PACKED | T_SPRAY},
	{"liquid_out_flow", KK_SIGNAL, T_ALL, SIGNAL_LIQUID_OUT_FLOW, 0, 0, 0},
	{"dp", KK_SIGNAL, T_ALL & ~T_LOOP, SIGNAL_DP, 0, 0, 0},
	{"pressure", KK_SIGNAL, T_ALL, SIGNAL_PRESSURE, 0, 0, 0},
	{"temperature", KK_SIGNAL, T_ALL, SIGNAL_TEMPERATURE, 0, 0, 0},
	{"level", KK_SIGNAL, T_ALL, SIGNAL_LEVEL, 0, 0, 0},
	{"gas_density", KK_SIGNAL, T_ALL, SIGNAL_GAS_DENSITY, 0, 0, 0},
	{"agitator_speed", KK_SIGNAL, T_STIR, SIGNAL_AGITATOR_SPEED, 0, 0, T_STIR},
	{"motor_power", KK_SIGNAL, T_STIR, SIGNAL_MOTOR_POWER, 0, 0, 0},
	{"dp_riser", KK_SIGNAL, T_LOOP, SIGNAL_DP_RISER, 0, 0, T_LOOP},
	{"dp_downcomer", KK_SIGNAL, T_LOOP, SIGNAL_DP_DOWNCOMER, 0, 0, T_LOOP},
	{"gas_molar_mass_kgkmol", KK_DOUBLE, T_ALL, SC(props.gas_molar_mass_kgkmol), 1.0, 500.0, 0},
	{"gas_compressibility", KK_DOUBLE, T_ALL, SC(props.gas_compressibility), 0.05, 2.0, 0},
	{"gas_viscosity_pas", KK_PROP, T_ALL, SC(props.gas_viscosity_pas), 0, 0, T_ALL},
	{"liquid_density_kgm3", KK_PROP, T_ALL, SC(props.liquid_density_kgm3), 0, 0, T_ALL},
	{"liquid_viscosity_pas", KK_PROP, T_ALL, SC(props.liquid_viscosity_pas), 0, 0, T_ALL},
	{"surface_tension_nm", KK_PROP, T_ALL, SC(props.surface_tension_nm), 0, 0, T_ALL},
	{"flood_method", KK_PENDING, T_TRAY | T_PACKED, 0, 0, 0, 0},
	/* tray */
	{"trays", KK_UINT, T_TRAY, GEO(tray.trays), 1, 500, T_TRAY},
	{"tray_kind", KK_PENDING, T_TRAY, 0, 0, 0, 0},
	{"tray_spacing_m", KK_DOUBLE, T_TRAY, GEO(tray.spacing_m), 0.15, 1.5, T_TRAY},
	{"weir_height_m", KK_DOUBLE, T_TRAY, GEO(tray.weir_height_m), 0.0, 0.3, T_TRAY},
	{"weir_length_m", KK_DOUBLE, T_TRAY, GEO(tray.weir_length_m), 0.05, 20.0, T_TRAY},
	/* Each area as a fraction or in m2 per tray (area_pairs below: one of each). */
	{"active_area_frac", KK_DOUBLE, T_TRAY, GEO(tray.active_area_frac), 0.2, 1.0, 0},
	{"downcomer_area_frac", KK_DOUBLE, T_TRAY, GEO(tray.downcomer_area_frac), 0.01, 0.4, 0},
	{"hole_area_frac", KK_DOUBLE, T_TRAY, GEO(tray.hole_area_frac), 0.01, 0.5, 0},
	{"active_area_m2", KK_DOUBLE, T_TRAY, SC(active_area_m2), 1e-4, 400.0, 0},
	{"downcomer_area_m2", KK_DOUBLE, T_TRAY, SC(downcomer_area_m2), 1e-5, 200.0, 0},
	{"hole_area_m2", KK_DOUBLE, T_TRAY, SC(hole_area_m2), 1e-6, 200.0, 0},
	{"hole_diameter_m", KK_DOUBLE, T_TRAY, GEO(tray.hole_diameter_m), 0.0005, 0.1, T_TRAY},
	{"deck_thickness_m", KK_DOUBLE, T_TRAY, GEO(tray.deck_thickness_m), 0.0005, 0.02, 0},
	{"downcomer_clearance_m", KK_DOUBLE, T_TRAY, GEO(tray.downcomer_clearance_m), 0.005, 0.3,
	 T_TRAY},
	/* packed */
	{"packed_height_m", KK_DOUBLE, T_PACKED | T_PBUB, GEO(packed.height_m), 0.1, 100.0, T_PACKED},
	{"packing", KK_PENDING, T_PACKED | T_PBUB, 0, 0, 0, 0},
	{"packing_structured", KK_BOOL, T_PACKED, GEO(packed.structured), 0, 0, 0},
	{"packing_area_m2m3", KK_DOUBLE, T_PACKED, GEO(packed.c.area_m2m3), 10.0, 2000.0, 0},
	{"packing_void_frac", KK_DOUBLE, T_PACKED | T_PBUB, GEO(packed.c.void_frac), 0.3, 0.995, 0},
	{"packing_factor_1pm", KK_DOUBLE, T_PACKED, GEO(packed.c.packing_factor_1pm), 1.0, 5000.0, 0},
	{"packing_dry_factor_1pm", KK_DOUBLE, T_PACKED, GEO(packed.c.dry_factor_1pm), 1.0, 5000.0, 0},
	{"stichlmair_c1", KK_DOUBLE, T_PACKED, GEO(packed.c.stichlmair_c1), 0.0, 1000.0, 0},
	{"stichlmair_c2", KK_DOUBLE, T_PACKED, GEO(packed.c.stichlmair_c2), 0.0, 100.0, 0},
	{"stichlmair_c3", KK_DOUBLE, T_PACKED, GEO(packed.c.stichlmair_c3), 0.0, 10.0, 0},
	{"billet_ch", KK_DOUBLE, T_PACKED, GEO(packed.c.billet_ch), 0.01, 10.0, 0},
	{"billet_cp", KK_DOUBLE, T_PACKED, GEO(packed.c.billet_cp), 0.01, 10.0, 0},
	{"billet_cs", KK_DOUBLE, T_PACKED, GEO(packed.c.billet_cs), 0.01, 10.0, 0},
	{"billet_cfl", KK_DOUBLE, T_PACKED, GEO(packed.c.billet_cfl), 0.01, 10.0, 0},
	/* spray */
	{"spray_height_m", KK_DOUBLE, T_SPRAY, GEO(spray.height_m), 0.1, 100.0, T_SPRAY},
	{"design_droplet_m", KK_DOUBLE, T_SPRAY, GEO(spray.design_droplet_m), 1e-6, 0.01, T_SPRAY},
	{"droplet_spread", KK_DOUBLE, T_SPRAY, GEO(spray.droplet_spread), 0.5, 10.0, 0},
	/* bubble */
	{"tap_spacing_m", KK_DOUBLE, T_BUBBLE | T_PBUB, GEO(bubble.tap_spacing_m), 0.05, 50.0, 0},
	{"clear_liquid_height_m", KK_DOUBLE, T_BUBBLE | T_PBUB | T_STIR,
	 GEO(bubble.clear_liquid_height_m), 0.05, 100.0, 0},
	{"overflow_height_m", KK_DOUBLE, T_BUBBLE | T_PBUB, GEO(bubble.overflow_height_m), 0.05,
	 100.0, T_BUBBLE | T_PBUB},
	{"electrolyte", KK_BOOL, T_BUBBLE | T_PBUB, GEO(bubble.electrolyte), 0, 0, 0},
	{"holdup_method", KK_PENDING, T_BUBBLE | T_PBUB, 0, 0, 0, 0},
	/* packed-bubble */
	{"impulse_line_density_kgm3", KK_DOUBLE, T_PBUB, GEO(pbub.impulse_density_kgm3), 0.1,
	 3000.0, 0},
	/* stirred */
	{"impeller_diameter_m", KK_DOUBLE, T_STIR, GEO(stirred.impeller_diameter_m), 0.02, 10.0,
	 T_STIR},
	{"impeller_type", KK_PENDING, T_STIR, 0, 0, 0, 0},
	{"power_number", KK_DOUBLE, T_STIR, GEO(stirred.power_number), 0.05, 20.0, 0},
	{"impeller_clearance_m", KK_DOUBLE, T_STIR, GEO(stirred.impeller_clearance_m), 0.0, 20.0,
	 T_STIR},
	{"drive_loss_w", KK_DOUBLE, T_STIR, GEO(stirred.drive_loss_w), 0.0, 1e7, 0},
	{"drive_efficiency", KK_DOUBLE, T_STIR, GEO(stirred.drive_efficiency), 0.3, 1.0, 0},
	/* loop */
	{"riser_area_m2", KK_DOUBLE, T_LOOP, GEO(loop.riser_area_m2), 1e-4, 500.0, T_LOOP},
	{"loop_downcomer_area_m2", KK_DOUBLE, T_LOOP, GEO(loop.downcomer_area_m2), 1e-4, 500.0,
	 T_LOOP},
	{"loop_height_m", KK_DOUBLE, T_LOOP, GEO(loop.height_m), 0.5, 300.0, T_LOOP},
	{"bottom_clearance_m", KK_DOUBLE, T_LOOP, GEO(loop.bottom_clearance_m), 0.01, 20.0, T_LOOP},
	{"loop_tap_spacing_m", KK_DOUBLE, T_LOOP, GEO(loop.tap_spacing_m), 0.1, 300.0, 0},
	{"loop_top_loss", KK_DOUBLE, T_LOOP, GEO(loop.top_loss), 0.0, 100.0, 0},
	{"circulation_normal_ms", KK_DOUBLE, T_LOOP, GEO(loop.circulation_normal_ms), 0.001, 10.0,
	 0},
};
#define SECTION_KEY_COUNT (sizeof(section_keys) / sizeof(section_keys[0]))
_Static_assert(SECTION_KEY_COUNT <= CONFIG_SECTION_KEYS_MAX, "key_line[] holds every key");

/* "unknown key 'K' in [HEADER]", with the nearest known key when one is close. */
static void unknown_key_get(struct config_ctx *c, const char *key, suggest_get_fn get,
			    const void *ctx, unsigned count)
{
	char dym[SUGGEST_NAME_MAX + 32];
	config_error(c, c->line, "unknown key '%s' in [%s]%s", key, c->cur_section,
		     suggest_text(suggest_best(key, get, ctx, count), dym, sizeof(dym)));
}

static const char *list_name(const void *ctx, unsigned i)
{
	return ((const char *const *)ctx)[i];
}

static void unknown_key(struct config_ctx *c, const char *key, const char *const *names)
{
	unsigned n = 0;
	while (names[n] != NULL)
		n++;
	unknown_key_get(c, key, list_name, names, n);
}

static const char *section_key_name(const void *ctx, unsigned i)
{
	(void)ctx;
	return section_keys[i].name;
}

static const char *const type_names[] = {"tray",	  "packed",  "spray", "bubble",
					  "packed-bubble", "stirred", "loop",  NULL};
_Static_assert(sizeof(type_names) / sizeof(type_names[0]) == SECTION_TYPE_COUNT + 1,
	       "a name for every section type");

static struct pending_name *pending_slot(struct section_pending *sp, const char *key)
{
	if (!strcmp(key, "flood_method"))
		return &sp->flood_method;
	if (!strcmp(key, "tray_kind"))
		return &sp->tray_kind;
	if (!strcmp(key, "holdup_method"))
		return &sp->holdup_method;
	if (!strcmp(key, "packing"))
		return &sp->packing;
	if (!strcmp(key, "impeller_type"))
		return &sp->impeller_type;
	return NULL;
}

int config_section_key(struct config_ctx *c, struct section_cfg *s, struct section_pending *sp,
		       const char *key, const char *v)
{
	for (unsigned i = 0; i < SECTION_KEY_COUNT; i++) {
		const struct key_desc *k = &section_keys[i];
		if (strcmp(k->name, key) != 0)
			continue;
		if (sp->key_line[i] != 0) {
			config_error(c, c->line, "duplicate key '%s' (first at line %d)", key,
				     sp->key_line[i]);
			return -EINVAL;
		}
		sp->key_line[i] = c->line > 0 ? c->line : 1;
		char *base = (char *)s;
		int choice;
		struct pending_name *pn;
		switch (k->kind) {
		case KK_TYPE:
			if (config_parse_choice(c, key, v, type_names, &choice) != 0)
				return -EINVAL;
			s->geom.type = (enum section_type)choice;
			sp->type_given = true;
			return 0;
		case KK_DOUBLE:
			return config_parse_double(c, key, v, k->lo, k->hi,
						   (double *)(base + k->offset));
		case KK_UINT:
			return config_parse_uint(c, key, v, (unsigned)k->lo, (unsigned)k->hi,
						 (unsigned *)(base + k->offset));
		case KK_BOOL:
			return config_parse_bool(c, key, v, (bool *)(base + k->offset));
		case KK_PROP:
			return config_parse_prop(c, key, v, (struct prop_table *)(base + k->offset));
		case KK_SIGNAL:
			pn = &sp->signal[k->offset];
			if (config_copy_text(c, key, v, pn->name, sizeof(pn->name)) != 0)
				return -EINVAL;
			pn->line = c->line;
			return 0;
		case KK_PENDING:
			pn = pending_slot(sp, key);
			assert(pn != NULL);
			if (config_copy_text(c, key, v, pn->name, sizeof(pn->name)) != 0)
				return -EINVAL;
			pn->line = c->line;
			return 0;
		}
	}
	(void)s;
	unknown_key_get(c, key, section_key_name, NULL, SECTION_KEY_COUNT);
	return -EINVAL;
}

/* Applicability and required keys, once the type is known. */
static int section_key_number(const char *key)
{
	for (unsigned i = 0; i < SECTION_KEY_COUNT; i++)
		if (!strcmp(section_keys[i].name, key))
			return (int)i;
	return -1;
}

int config_section_key_line(const struct section_pending *sp, const char *key)
{
	int i = section_key_number(key);
	assert(i >= 0);
	return sp->key_line[i];
}

/* A tray gives each area once: as a fraction or in m2. */
static int area_pairs_check(struct config_ctx *c, const struct section_cfg *s,
			    const struct section_pending *sp)
{
	static const char *const pairs[3][2] = {{"active_area_frac", "active_area_m2"},
						{"downcomer_area_frac", "downcomer_area_m2"},
						{"hole_area_frac", "hole_area_m2"}};
	int rc = 0;
	for (unsigned i = 0; i < 3; i++) {
		int lf = config_section_key_line(sp, pairs[i][0]);
		int lm = config_section_key_line(sp, pairs[i][1]);
		if (lf > 0 && lm > 0) {
			config_error(c, lm, "%s and %s (line %d) give the same area twice: keep one",
				     pairs[i][1], pairs[i][0], lf);
			rc = -EINVAL;
		} else if (lf == 0 && lm == 0) {
			config_error(c, s->line, "[section.%s] (tray) needs '%s' (or '%s', per tray)",
				     s->name, pairs[i][0], pairs[i][1]);
			rc = -EINVAL;
		}
	}
	return rc;
}

int config_section_keys_check(struct config_ctx *c, unsigned si)
{
	struct section_cfg *s = &c->cfg->sections[si];
	struct section_pending *sp = &c->sec[si];
	if (!sp->type_given) {
		config_error(c, s->line, "[section.%s] has no 'type' (tray, packed, spray, bubble, "
			     "packed-bubble, stirred or loop)",
			     s->name);
		return -EINVAL;
	}
	unsigned tbit = 1u << s->geom.type;
	int rc = 0;
	for (unsigned i = 0; i < SECTION_KEY_COUNT; i++) {
		const struct key_desc *k = &section_keys[i];
		bool given = sp->key_line[i] != 0;
		if (given && !(k->types & tbit)) {
			config_error(c, sp->key_line[i], "key '%s' does not apply to a %s section",
				     k->name, type_names[s->geom.type]);
			rc = -EINVAL;
		}
		/* Only trays, packings and sprays have a gas-capacity limit to
		 * calibrate (a bubble column's flood_pct is level swell): elsewhere
		 * only the neutral value is accepted. */
		if (given && !(tbit & (T_TRAY | T_PACKED | T_SPRAY)) &&
		    !strcmp(k->name, "capacity_factor") && s->geom.capacity_factor != 1.0) {
			config_error(c, sp->key_line[i], "capacity_factor does not apply to a %s "
							 "section (it has no gas-capacity limit: "
							 "level swell, dispersion or circulation is not "
							 "one); leave it out or set 1",
				     type_names[s->geom.type]);
			rc = -EINVAL;
		}
		if (!given && (k->required & tbit)) {
			config_error(c, s->line, "[section.%s] (%s) needs '%s'", s->name,
				     type_names[s->geom.type], k->name);
			rc = -EINVAL;
		}
	}
	if (s->geom.type == SECTION_TRAY && area_pairs_check(c, s, sp) != 0)
		rc = -EINVAL;
	return rc;
}

const char *config_section_type_name(enum section_type t)
{
	assert(t < SECTION_TYPE_COUNT);
	return type_names[t];
}

/* ---- the other sections: small enough for a plain chain ----------------- */

/* Marks key number bit as given in mask; refuses a second one. */
static bool first_time(struct config_ctx *c, uint32_t *mask, unsigned bit, const char *key)
{
	assert(bit < 32);
	if (*mask & (1u << bit)) {
		config_error(c, c->line, "duplicate key '%s'", key);
		return false;
	}
	*mask |= 1u << bit;
	return true;
}

static int key_index(const char *const *names, const char *key)
{
	for (int i = 0; names[i] != NULL; i++)
		if (!strcmp(names[i], key))
			return i;
	return -1;
}

static const char *const tag_key_names[] = {
	"source", "table", "address", "type", "word_order", "scale", "offset", "unit", "min", "max",
	"value", "stale_periods", "frozen_s", "frozen_tolerance", "spike_limit", "filter_tau_s",
	"median", "nominal", "column", "hold_s", "span_m", "zero_m", NULL};
static const char *const table_names[] = {"input", "holding", NULL};
static const char *const type_names_tag[] = {"int16", "uint16", "int32", "uint32", "float32", NULL};
static const char *const order_names[] = {"abcd", "badc", "cdab", "dcba", NULL};

int config_tag_key(struct config_ctx *c, unsigned ti, const char *key, const char *v)
{
	struct tag_cfg *t = &c->cfg->tags[ti];
	int k = key_index(tag_key_names, key);
	if (k < 0) {
		unknown_key(c, key, tag_key_names);
		return -EINVAL;
	}
	if (!first_time(c, &c->tag_keys_set[ti], (unsigned)k, key))
		return -EINVAL;
	int ch = 0, rc = 0;
	const double big = 1e12;
	switch (k) {
	case 0:
		rc = config_copy_text(c, key, v, c->tag_source[ti].name, FG_NAME_MAX);
		c->tag_source[ti].line = c->line;
		return rc;
	case 1:
		rc = config_parse_choice(c, key, v, table_names, &ch);
		t->table = (enum tag_table)ch;
		return rc;
	case 2: return config_parse_uint(c, key, v, 0, 65535, &t->address);
	case 3:
		rc = config_parse_choice(c, key, v, type_names_tag, &ch);
		t->type = (enum tag_type)ch;
		return rc;
	case 4:
		rc = config_parse_choice(c, key, v, order_names, &ch);
		t->order = (enum tag_word_order)ch;
		return rc;
	case 5: return config_parse_double(c, key, v, -big, big, &t->scale);
	case 6: return config_parse_double(c, key, v, -big, big, &t->offset);
	case 7:
		t->unit = units_lookup(v);
		if (t->unit == NULL) {
			config_error(c, c->line, "unit '%s' is not known; known units: %s", v,
				     units_known_list());
			return -EINVAL;
		}
		return 0;
	case 8: return config_parse_double(c, key, v, -big, big, &t->min);
	case 9: return config_parse_double(c, key, v, -big, big, &t->max);
	case 10: return config_parse_double(c, key, v, -big, big, &t->fixed_value);
	case 11: return config_parse_double(c, key, v, 0.0, 1e6, &t->stale_periods);
	case 12: return config_parse_double(c, key, v, 0.0, 1e7, &t->frozen_s);
	case 13: return config_parse_double(c, key, v, 0.0, big, &t->frozen_tolerance);
	case 14: return config_parse_double(c, key, v, 0.0, big, &t->spike_limit);
	case 15: return config_parse_double(c, key, v, 0.0, 1e6, &t->filter_tau_s);
	case 16:
		rc = config_parse_uint(c, key, v, 1, FG_MEDIAN_MAX, &t->median);
		if (rc == 0 && t->median % 2 == 0) {
			config_error(c, c->line, "median = %u must be odd", t->median);
			return -EINVAL;
		}
		return rc;
	case 17: return config_parse_double(c, key, v, -big, big, &t->nominal);
	case 18: return config_copy_text(c, key, v, t->column, sizeof(t->column));
	case 19: return config_parse_double(c, key, v, 0.0, 1e7, &t->hold_s);
	case 20: return config_parse_double(c, key, v, 1e-3, 1000.0, &t->span_m);
	case 21: return config_parse_double(c, key, v, -1000.0, 1000.0, &t->zero_m);
	default: assert(0);
	}
	return -EINVAL;
}

static const char *const source_key_names[] = {
	"protocol", "host", "port", "unit_id", "timeout_s", "device", "baud", "parity", "data_bits",
	"stop_bits", NULL};
static const char *const protocol_names[] = {"modbus-tcp", "modbus-rtu", NULL};
static const char *const parity_names[] = {"none", "even", "odd", NULL};

int config_source_key(struct config_ctx *c, unsigned si, const char *key, const char *v)
{
	struct source_cfg *s = &c->cfg->sources[si];
	int k = key_index(source_key_names, key);
	if (k < 0) {
		unknown_key(c, key, source_key_names);
		return -EINVAL;
	}
	if (!first_time(c, &c->source_keys_set[si], (unsigned)k, key))
		return -EINVAL;
	int ch = 0, rc = 0;
	unsigned u = 0;
	switch (k) {
	case 0:
		rc = config_parse_choice(c, key, v, protocol_names, &ch);
		s->protocol = (enum source_protocol)ch;
		return rc;
	case 1: return config_copy_text(c, key, v, s->host, sizeof(s->host));
	case 2: rc = config_parse_uint(c, key, v, 1, 65535, &u); s->port = (int)u; return rc;
	case 3: rc = config_parse_uint(c, key, v, 0, 255, &u); s->unit_id = (int)u; return rc;
	case 4: return config_parse_double(c, key, v, 0.01, 10.0, &s->timeout_s);
	case 5: return config_copy_text(c, key, v, s->device, sizeof(s->device));
	case 6: rc = config_parse_uint(c, key, v, 50, 4000000, &u); s->baud = (int)u; return rc;
	case 7: rc = config_parse_choice(c, key, v, parity_names, &ch); s->parity = "NEO"[ch]; return rc;
	case 8: rc = config_parse_uint(c, key, v, 7, 8, &u); s->data_bits = (int)u; return rc;
	case 9: rc = config_parse_uint(c, key, v, 1, 2, &u); s->stop_bits = (int)u; return rc;
	default: assert(0);
	}
	return -EINVAL;
}

static const char *const monitor_key_names[] = {"name",	     "period_s",    "state_file",
						"events_file", "events_max_bytes", "events_keep",
						NULL};

int config_monitor_key(struct config_ctx *c, const char *key, const char *v)
{
	struct monitor_cfg *m = &c->cfg->monitor;
	int k = key_index(monitor_key_names, key);
	if (k < 0) {
		unknown_key(c, key, monitor_key_names);
		return -EINVAL;
	}
	if (!first_time(c, &c->monitor_keys_set, (unsigned)k, key))
		return -EINVAL;
	switch (k) {
	case 0: return config_copy_text(c, key, v, m->name, sizeof(m->name));
	case 1: return config_parse_double(c, key, v, 0.05, 3600.0, &m->period_s);
	case 2: return config_copy_text(c, key, v, m->state_file, sizeof(m->state_file));
	case 3: return config_copy_text(c, key, v, m->events_file, sizeof(m->events_file));
	case 4: return config_parse_double(c, key, v, 0.0, 1e12, &m->events_max_bytes);
	case 5: return config_parse_uint(c, key, v, 1, EVLOG_KEEP_MAX, &m->events_keep);
	default: assert(0);
	}
	return -EINVAL;
}

static const char *const mqtt_key_names[] = {
	"uri", "client_id", "topic_prefix", "qos", "username", "password_file", "ca_file",
	"keepalive_s", "buffer_messages", "state_interval_s", "cmd_max_age_s", NULL};

int config_mqtt_key(struct config_ctx *c, const char *key, const char *v)
{
	struct mqtt_cfg *m = &c->cfg->mqtt;
	int k = key_index(mqtt_key_names, key);
	if (k < 0) {
		unknown_key(c, key, mqtt_key_names);
		return -EINVAL;
	}
	if (!first_time(c, &c->mqtt_keys_set, (unsigned)k, key))
		return -EINVAL;
	unsigned u = 0;
	int rc;
	switch (k) {
	case 0: return config_copy_text(c, key, v, m->uri, sizeof(m->uri));
	case 1: return config_copy_text(c, key, v, m->client_id, sizeof(m->client_id));
	case 2: return config_copy_text(c, key, v, m->topic_prefix, sizeof(m->topic_prefix));
	case 3: rc = config_parse_uint(c, key, v, 0, 1, &u); m->qos = (int)u; return rc;
	case 4: return config_copy_text(c, key, v, m->username, sizeof(m->username));
	case 5: return config_copy_text(c, key, v, m->password_file, sizeof(m->password_file));
	case 6: return config_copy_text(c, key, v, m->ca_file, sizeof(m->ca_file));
	case 7: return config_parse_double(c, key, v, MQTTLINK_KEEPALIVE_MIN_S,
					   MQTTLINK_KEEPALIVE_MAX_S, &m->keepalive_s);
	case 8: return config_parse_uint(c, key, v, 1, MQTTLINK_BUFFER_MAX, &m->buffer_messages);
	case 9: return config_parse_double(c, key, v, 0.0, 3600.0, &m->state_interval_s);
	case 10: return config_parse_double(c, key, v, 1.0, 86400.0, &m->cmd_max_age_s);
	default: assert(0);
	}
	return -EINVAL;
}

int config_export_key(struct config_ctx *c, const char *key, const char *v)
{
	struct export_cfg *e = &c->cfg->exp;
	if (!strcmp(key, "fields")) {
		/* A list; may continue on further (indented or repeated) lines. */
		size_t have = strlen(c->export_fields), n = strlen(v);
		if (have + n + 2 > sizeof(c->export_fields)) {
			config_error(c, c->line, "fields: list too long");
			return -EINVAL;
		}
		if (have > 0)
			c->export_fields[have++] = ',';
		memcpy(c->export_fields + have, v, n + 1);
		if (c->export_fields_line == 0)
			c->export_fields_line = c->line;
		return 0;
	}
	static const char *const names[] = {"listen",	      "base_address",      "fields",
					    "idle_timeout_s", "request_timeout_s", "clients_per_address",
					    NULL};
	int k = key_index(names, key);
	if (k < 0) {
		unknown_key(c, key, names);
		return -EINVAL;
	}
	if (!first_time(c, &c->export_keys_set, (unsigned)k, key))
		return -EINVAL;
	if (k == 1)
		return config_parse_uint(c, key, v, 0, 60000, &e->base_address);
	if (k == 3)
		return config_parse_double(c, key, v, 1.0, 86400.0, &e->idle_timeout_s);
	if (k == 4)
		return config_parse_double(c, key, v, 0.05, 60.0, &e->request_timeout_s);
	if (k == 5)
		return config_parse_uint(c, key, v, 1, MBSERVER_CLIENTS_MAX,
					 &e->clients_per_address);
	const char *colon = strrchr(v, ':');
	unsigned port = 0;
	if (colon == NULL || (size_t)(colon - v) >= sizeof(e->host) || colon == v) {
		config_error(c, c->line, "listen: '%s' is not HOST:PORT", v);
		return -EINVAL;
	}
	memcpy(e->host, v, (size_t)(colon - v));
	e->host[colon - v] = '\0';
	if (config_parse_uint(c, key, colon + 1, 1, 65535, &port) != 0)
		return -EINVAL;
	e->port = (int)port;
	return 0;
}

static const char *const alarm_key_names[] = {
	"section", "signal", "kind", "setpoint", "deadband", "on_delay_s", "off_delay_s", "priority",
	"reference", "rate_window_s", "out_of_service", NULL};

int config_alarm_key(struct config_ctx *c, unsigned ai, const char *key, const char *v)
{
	struct alarm_cfg *a = &c->cfg->alarms[ai];
	struct alarm_pending *ap = &c->alm[ai];
	int k = key_index(alarm_key_names, key);
	if (k < 0) {
		unknown_key(c, key, alarm_key_names);
		return -EINVAL;
	}
	if (!first_time(c, &ap->keys_set, (unsigned)k, key))
		return -EINVAL;
	struct pending_name *pn = NULL;
	switch (k) {
	case 0: pn = &ap->section; break;
	case 1: pn = &ap->signal; break;
	case 2: pn = &ap->kind; break;
	case 3: return config_parse_double(c, key, v, -1e12, 1e12, &a->setpoint);
	case 4: return config_parse_double(c, key, v, 0.0, 1e12, &a->deadband);
	case 5: return config_parse_double(c, key, v, 0.0, 86400.0, &a->on_delay_s);
	case 6: return config_parse_double(c, key, v, 0.0, 86400.0, &a->off_delay_s);
	case 7: pn = &ap->priority; break;
	case 8: pn = &ap->reference; break;
	case 9: return config_parse_double(c, key, v, 1.0, 86400.0, &a->rate_window_s);
	case 10: return config_parse_bool(c, key, v, &a->out_of_service);
	default: assert(0);
	}
	if (config_copy_text(c, key, v, pn->name, sizeof(pn->name)) != 0)
		return -EINVAL;
	pn->line = c->line;
	return 0;
}

static const char *const replay_key_names[] = {"time_column", "tz", NULL};

int config_replay_key(struct config_ctx *c, const char *key, const char *v)
{
	struct replay_cfg *r = &c->cfg->replay;
	int k = key_index(replay_key_names, key);
	if (k < 0) {
		unknown_key(c, key, replay_key_names);
		return -EINVAL;
	}
	if (!first_time(c, &c->replay_keys_set, (unsigned)k, key))
		return -EINVAL;
	switch (k) {
	case 0: return config_copy_text(c, key, v, r->time_column, sizeof(r->time_column));
	case 1:
		r->tz_line = c->line;
		return config_copy_text(c, key, v, r->tz, sizeof(r->tz));
	default: assert(0);
	}
	return -EINVAL;
}

void config_runtime_defaults(struct fg_config *cfg)
{
	cfg->monitor.events_max_bytes = 0.0; /* rotation is opt-in (or logrotate + SIGUSR1) */
	cfg->monitor.events_keep = 5;
	/* An operator's command is seconds old when it arrives; half a minute
	 * allows for clock skew between the sender and us. */
	cfg->mqtt.cmd_max_age_s = 30.0;
	/* A poller asks every second or few: a minute of silence is a dead or
	 * forgotten client holding a slot. */
	cfg->exp.idle_timeout_s = 60.0;
	/* A Modbus request is at most 260 bytes, sent in one go by any real
	 * client: a second from its first byte is generous even over a WAN. */
	cfg->exp.request_timeout_s = 1.0;
	cfg->exp.clients_per_address = 4;
}
