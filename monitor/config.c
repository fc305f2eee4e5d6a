/*
 * config.c - reads the INI configuration into struct fg_config.
 *
 * libinih does the tokenising. Its callback does not say which line it is on
 * (portably), so we feed it through our own reader that counts lines, spots
 * section headers (for duplicate headers, and for empty sections inih never
 * reports) and refuses over-long lines instead of letting inih split them.
 * Keys are table-driven: each entry names the key, its kind, its range, the
 * section types it applies to and where in the struct it lands. Cross
 * references and whole-config checks are in config_resolve.c.
 */
#include "config_int.h"

#include <assert.h>
#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>

#include <ini.h>

#include "mqttlink.h"

/* libinih's line buffer in Debian's build (ini_max_line default). */
#define CONFIG_LINE_MAX 200

enum sec_kind { SK_NONE, SK_MONITOR, SK_SOURCE, SK_TAG, SK_SECTION, SK_ALARM, SK_MQTT, SK_EXPORT };

void config_error(struct config_ctx *c, int line, const char *fmt, ...)
{
	c->error_count++;
	if (c->error_count > CONFIG_ERRORS_MAX || c->errf == NULL)
		return;
	va_list ap;
	va_start(ap, fmt);
	if (line > 0)
		fprintf(c->errf, "%s:%d: ", c->path, line);
	else
		fprintf(c->errf, "%s: ", c->path);
	vfprintf(c->errf, fmt, ap);
	fputc('\n', c->errf);
	va_end(ap);
}

int config_parse_double(struct config_ctx *c, const char *key, const char *v, double lo,
			double hi, double *out)
{
	char *end = NULL;
	errno = 0;
	double x = strtod(v, &end);
	if (end == v || *end != '\0' || errno == ERANGE || !isfinite(x)) {
		config_error(c, c->line, "%s: '%s' is not a number", key, v);
		return -EINVAL;
	}
	if (x < lo || x > hi) {
		config_error(c, c->line, "%s = %s is outside %g..%g", key, v, lo, hi);
		return -EINVAL;
	}
	*out = x;
	return 0;
}

static int parse_uint(struct config_ctx *c, const char *key, const char *v, unsigned lo,
		      unsigned hi, unsigned *out)
{
	double x;
	if (config_parse_double(c, key, v, lo, hi, &x) != 0)
		return -EINVAL;
	if (x != floor(x)) {
		config_error(c, c->line, "%s: '%s' is not a whole number", key, v);
		return -EINVAL;
	}
	*out = (unsigned)x;
	return 0;
}

static int parse_bool(struct config_ctx *c, const char *key, const char *v, bool *out)
{
	if (!strcmp(v, "yes") || !strcmp(v, "true") || !strcmp(v, "1")) {
		*out = true;
		return 0;
	}
	if (!strcmp(v, "no") || !strcmp(v, "false") || !strcmp(v, "0")) {
		*out = false;
		return 0;
	}
	config_error(c, c->line, "%s: '%s' is not yes or no", key, v);
	return -EINVAL;
}

static int copy_text(struct config_ctx *c, const char *key, const char *v, char *dst, size_t cap)
{
	size_t n = strlen(v);
	if (n >= cap) {
		config_error(c, c->line, "%s: value is %zu characters, at most %zu allowed", key, n,
			     cap - 1);
		return -EINVAL;
	}
	memcpy(dst, v, n + 1);
	return 0;
}

/* Looks v up in a NULL-terminated list of names; reports the choices. */
static int parse_choice(struct config_ctx *c, const char *key, const char *v,
			const char *const *names, int *out)
{
	for (int i = 0; names[i] != NULL; i++) {
		if (!strcmp(v, names[i])) {
			*out = i;
			return 0;
		}
	}
	char list[256] = "";
	for (int i = 0; names[i] != NULL; i++) {
		size_t n = strlen(list);
		snprintf(list + n, sizeof(list) - n, "%s%s", i ? ", " : "", names[i]);
	}
	config_error(c, c->line, "%s: '%s' is not one of: %s", key, v, list);
	return -EINVAL;
}

/* A property: a constant, or "T_degC:value, T_degC:value, ..." rising in T. */
int config_parse_prop(struct config_ctx *c, const char *key, const char *v, struct prop_table *out)
{
	if (strchr(v, ':') == NULL) {
		double x;
		if (config_parse_double(c, key, v, 0.0, 1e9, &x) != 0)
			return -EINVAL;
		out->point_count = 1;
		out->t_k[0] = NAN;
		out->value[0] = x;
		return 0;
	}
	unsigned n = 0;
	const char *p = v;
	while (*p != '\0') {
		char *end;
		double t = strtod(p, &end);
		if (end == p || *end != ':')
			goto bad;
		p = end + 1;
		double x = strtod(p, &end);
		if (end == p || !isfinite(t) || !isfinite(x) || x < 0.0)
			goto bad;
		if (n == FG_PROP_POINTS_MAX) {
			config_error(c, c->line, "%s: at most %d table points", key, FG_PROP_POINTS_MAX);
			return -EINVAL;
		}
		if (n > 0 && t + 273.15 <= out->t_k[n - 1]) {
			config_error(c, c->line, "%s: temperatures must rise", key);
			return -EINVAL;
		}
		out->t_k[n] = t + 273.15;
		out->value[n] = x;
		n++;
		p = end;
		while (isspace((unsigned char)*p))
			p++;
		if (*p == ',')
			p++;
		else if (*p != '\0')
			goto bad;
		while (isspace((unsigned char)*p))
			p++;
	}
	if (n == 0)
		goto bad;
	out->point_count = n;
	return 0;
bad:
	config_error(c, c->line, "%s: '%s' is neither a number nor a table 'T_degC:value, ...'",
		     key, v);
	return -EINVAL;
}

/* ---- keys of [section.NAME] -------------------------------------------- */

enum key_kind { KK_DOUBLE, KK_UINT, KK_BOOL, KK_PROP, KK_SIGNAL, KK_PENDING, KK_TYPE };

#define T_TRAY (1u << SECTION_TRAY)
#define T_PACKED (1u << SECTION_PACKED)
#define T_SPRAY (1u << SECTION_SPRAY)
#define T_BUBBLE (1u << SECTION_BUBBLE)
#define T_ALL (T_TRAY | T_PACKED | T_SPRAY | T_BUBBLE)

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
	{"gas_flow", KK_SIGNAL, T_ALL, SIGNAL_GAS_FLOW, 0, 0, T_ALL},
	{"liquid_flow", KK_SIGNAL, T_ALL, SIGNAL_LIQUID_FLOW, 0, 0, T_TRAY | T_PACKED | T_SPRAY},
	{"liquid_out_flow", KK_SIGNAL, T_ALL, SIGNAL_LIQUID_OUT_FLOW, 0, 0, 0},
	{"dp", KK_SIGNAL, T_ALL, SIGNAL_DP, 0, 0, 0},
	{"pressure", KK_SIGNAL, T_ALL, SIGNAL_PRESSURE, 0, 0, 0},
	{"temperature", KK_SIGNAL, T_ALL, SIGNAL_TEMPERATURE, 0, 0, 0},
	{"level", KK_SIGNAL, T_ALL, SIGNAL_LEVEL, 0, 0, 0},
	{"gas_density", KK_SIGNAL, T_ALL, SIGNAL_GAS_DENSITY, 0, 0, 0},
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
	{"active_area_frac", KK_DOUBLE, T_TRAY, GEO(tray.active_area_frac), 0.2, 1.0, T_TRAY},
	{"downcomer_area_frac", KK_DOUBLE, T_TRAY, GEO(tray.downcomer_area_frac), 0.01, 0.4, T_TRAY},
	{"hole_area_frac", KK_DOUBLE, T_TRAY, GEO(tray.hole_area_frac), 0.01, 0.5, T_TRAY},
	{"hole_diameter_m", KK_DOUBLE, T_TRAY, GEO(tray.hole_diameter_m), 0.0005, 0.1, T_TRAY},
	{"deck_thickness_m", KK_DOUBLE, T_TRAY, GEO(tray.deck_thickness_m), 0.0005, 0.02, 0},
	{"downcomer_clearance_m", KK_DOUBLE, T_TRAY, GEO(tray.downcomer_clearance_m), 0.005, 0.3,
	 T_TRAY},
	/* packed */
	{"packed_height_m", KK_DOUBLE, T_PACKED, GEO(packed.height_m), 0.1, 100.0, T_PACKED},
	{"packing", KK_PENDING, T_PACKED, 0, 0, 0, 0},
	{"packing_structured", KK_BOOL, T_PACKED, GEO(packed.structured), 0, 0, 0},
	{"packing_area_m2m3", KK_DOUBLE, T_PACKED, GEO(packed.c.area_m2m3), 10.0, 2000.0, 0},
	{"packing_void_frac", KK_DOUBLE, T_PACKED, GEO(packed.c.void_frac), 0.3, 0.995, 0},
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
	{"tap_spacing_m", KK_DOUBLE, T_BUBBLE, GEO(bubble.tap_spacing_m), 0.05, 50.0, 0},
	{"clear_liquid_height_m", KK_DOUBLE, T_BUBBLE, GEO(bubble.clear_liquid_height_m), 0.05, 100.0,
	 0},
	{"overflow_height_m", KK_DOUBLE, T_BUBBLE, GEO(bubble.overflow_height_m), 0.05, 100.0,
	 T_BUBBLE},
	{"electrolyte", KK_BOOL, T_BUBBLE, GEO(bubble.electrolyte), 0, 0, 0},
	{"holdup_method", KK_PENDING, T_BUBBLE, 0, 0, 0, 0},
};
#define SECTION_KEY_COUNT (sizeof(section_keys) / sizeof(section_keys[0]))
_Static_assert(SECTION_KEY_COUNT <= 64, "keys_set is a 64-bit mask");

static const char *const type_names[] = {"tray", "packed", "spray", "bubble", NULL};

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
	return NULL;
}

static int section_key(struct config_ctx *c, struct section_cfg *s, struct section_pending *sp,
		       const char *key, const char *v)
{
	for (unsigned i = 0; i < SECTION_KEY_COUNT; i++) {
		const struct key_desc *k = &section_keys[i];
		if (strcmp(k->name, key) != 0)
			continue;
		if (sp->keys_set & (1ull << i)) {
			config_error(c, c->line, "duplicate key '%s' (first at line %d)", key,
				     sp->key_line[i]);
			return -EINVAL;
		}
		sp->keys_set |= 1ull << i;
		sp->key_line[i] = c->line;
		char *base = (char *)s;
		int choice;
		struct pending_name *pn;
		switch (k->kind) {
		case KK_TYPE:
			if (parse_choice(c, key, v, type_names, &choice) != 0)
				return -EINVAL;
			s->geom.type = (enum section_type)choice;
			sp->type_given = true;
			return 0;
		case KK_DOUBLE:
			return config_parse_double(c, key, v, k->lo, k->hi,
						   (double *)(base + k->offset));
		case KK_UINT:
			return parse_uint(c, key, v, (unsigned)k->lo, (unsigned)k->hi,
					  (unsigned *)(base + k->offset));
		case KK_BOOL:
			return parse_bool(c, key, v, (bool *)(base + k->offset));
		case KK_PROP:
			return config_parse_prop(c, key, v, (struct prop_table *)(base + k->offset));
		case KK_SIGNAL:
			pn = &sp->signal[k->offset];
			if (copy_text(c, key, v, pn->name, sizeof(pn->name)) != 0)
				return -EINVAL;
			pn->line = c->line;
			return 0;
		case KK_PENDING:
			pn = pending_slot(sp, key);
			assert(pn != NULL);
			if (copy_text(c, key, v, pn->name, sizeof(pn->name)) != 0)
				return -EINVAL;
			pn->line = c->line;
			return 0;
		}
	}
	config_error(c, c->line, "unknown key '%s' in [section.%s]", key, s->name);
	return -EINVAL;
}

/* Applicability and required keys, once the type is known. */
int config_section_keys_check(struct config_ctx *c, unsigned si);
int config_section_keys_check(struct config_ctx *c, unsigned si)
{
	struct section_cfg *s = &c->cfg->sections[si];
	struct section_pending *sp = &c->sec[si];
	if (!sp->type_given) {
		config_error(c, s->line, "[section.%s] has no 'type' (tray, packed, spray or bubble)",
			     s->name);
		return -EINVAL;
	}
	unsigned tbit = 1u << s->geom.type;
	int rc = 0;
	for (unsigned i = 0; i < SECTION_KEY_COUNT; i++) {
		const struct key_desc *k = &section_keys[i];
		bool given = (sp->keys_set & (1ull << i)) != 0;
		if (given && !(k->types & tbit)) {
			config_error(c, sp->key_line[i], "key '%s' does not apply to a %s section",
				     k->name, type_names[s->geom.type]);
			rc = -EINVAL;
		}
		if (!given && (k->required & tbit)) {
			config_error(c, s->line, "[section.%s] (%s) needs '%s'", s->name,
				     type_names[s->geom.type], k->name);
			rc = -EINVAL;
		}
	}
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
	"median", "nominal", NULL};
static const char *const table_names[] = {"input", "holding", NULL};
static const char *const type_names_tag[] = {"int16", "uint16", "int32", "uint32", "float32", NULL};
static const char *const order_names[] = {"abcd", "badc", "cdab", "dcba", NULL};

static int tag_key(struct config_ctx *c, unsigned ti, const char *key, const char *v)
{
	struct tag_cfg *t = &c->cfg->tags[ti];
	int k = key_index(tag_key_names, key);
	if (k < 0) {
		config_error(c, c->line, "unknown key '%s' in [tag.%s]", key, t->name);
		return -EINVAL;
	}
	if (!first_time(c, &c->tag_keys_set[ti], (unsigned)k, key))
		return -EINVAL;
	int ch = 0, rc = 0;
	const double big = 1e12;
	switch (k) {
	case 0:
		rc = copy_text(c, key, v, c->tag_source[ti].name, FG_NAME_MAX);
		c->tag_source[ti].line = c->line;
		return rc;
	case 1: rc = parse_choice(c, key, v, table_names, &ch); t->table = (enum tag_table)ch; return rc;
	case 2: return parse_uint(c, key, v, 0, 65535, &t->address);
	case 3: rc = parse_choice(c, key, v, type_names_tag, &ch); t->type = (enum tag_type)ch; return rc;
	case 4:
		rc = parse_choice(c, key, v, order_names, &ch);
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
		rc = parse_uint(c, key, v, 1, FG_MEDIAN_MAX, &t->median);
		if (rc == 0 && t->median % 2 == 0) {
			config_error(c, c->line, "median = %u must be odd", t->median);
			return -EINVAL;
		}
		return rc;
	case 17: return config_parse_double(c, key, v, -big, big, &t->nominal);
	default: assert(0);
	}
	return -EINVAL;
}

static const char *const source_key_names[] = {
	"protocol", "host", "port", "unit_id", "timeout_s", "device", "baud", "parity", "data_bits",
	"stop_bits", NULL};
static const char *const protocol_names[] = {"modbus-tcp", "modbus-rtu", NULL};
static const char *const parity_names[] = {"none", "even", "odd", NULL};

static int source_key(struct config_ctx *c, unsigned si, const char *key, const char *v)
{
	struct source_cfg *s = &c->cfg->sources[si];
	int k = key_index(source_key_names, key);
	if (k < 0) {
		config_error(c, c->line, "unknown key '%s' in [source.%s]", key, s->name);
		return -EINVAL;
	}
	if (!first_time(c, &c->source_keys_set[si], (unsigned)k, key))
		return -EINVAL;
	int ch = 0, rc = 0;
	unsigned u = 0;
	switch (k) {
	case 0:
		rc = parse_choice(c, key, v, protocol_names, &ch);
		s->protocol = (enum source_protocol)ch;
		return rc;
	case 1: return copy_text(c, key, v, s->host, sizeof(s->host));
	case 2: rc = parse_uint(c, key, v, 1, 65535, &u); s->port = (int)u; return rc;
	case 3: rc = parse_uint(c, key, v, 0, 255, &u); s->unit_id = (int)u; return rc;
	case 4: return config_parse_double(c, key, v, 0.01, 10.0, &s->timeout_s);
	case 5: return copy_text(c, key, v, s->device, sizeof(s->device));
	case 6: rc = parse_uint(c, key, v, 50, 4000000, &u); s->baud = (int)u; return rc;
	case 7: rc = parse_choice(c, key, v, parity_names, &ch); s->parity = "NEO"[ch]; return rc;
	case 8: rc = parse_uint(c, key, v, 7, 8, &u); s->data_bits = (int)u; return rc;
	case 9: rc = parse_uint(c, key, v, 1, 2, &u); s->stop_bits = (int)u; return rc;
	default: assert(0);
	}
	return -EINVAL;
}

static const char *const monitor_key_names[] = {"name", "period_s", "state_file", "events_file",
						NULL};

static int monitor_key(struct config_ctx *c, const char *key, const char *v)
{
	struct monitor_cfg *m = &c->cfg->monitor;
	int k = key_index(monitor_key_names, key);
	if (k < 0) {
		config_error(c, c->line, "unknown key '%s' in [monitor]", key);
		return -EINVAL;
	}
	if (!first_time(c, &c->monitor_keys_set, (unsigned)k, key))
		return -EINVAL;
	switch (k) {
	case 0: return copy_text(c, key, v, m->name, sizeof(m->name));
	case 1: return config_parse_double(c, key, v, 0.05, 3600.0, &m->period_s);
	case 2: return copy_text(c, key, v, m->state_file, sizeof(m->state_file));
	case 3: return copy_text(c, key, v, m->events_file, sizeof(m->events_file));
	default: assert(0);
	}
	return -EINVAL;
}

static const char *const mqtt_key_names[] = {
	"uri", "client_id", "topic_prefix", "qos", "username", "password_file", "ca_file",
	"keepalive_s", "buffer_messages", "state_interval_s", NULL};

static int mqtt_key(struct config_ctx *c, const char *key, const char *v)
{
	struct mqtt_cfg *m = &c->cfg->mqtt;
	int k = key_index(mqtt_key_names, key);
	if (k < 0) {
		config_error(c, c->line, "unknown key '%s' in [mqtt]", key);
		return -EINVAL;
	}
	if (!first_time(c, &c->mqtt_keys_set, (unsigned)k, key))
		return -EINVAL;
	unsigned u = 0;
	int rc;
	switch (k) {
	case 0: return copy_text(c, key, v, m->uri, sizeof(m->uri));
	case 1: return copy_text(c, key, v, m->client_id, sizeof(m->client_id));
	case 2: return copy_text(c, key, v, m->topic_prefix, sizeof(m->topic_prefix));
	case 3: rc = parse_uint(c, key, v, 0, 1, &u); m->qos = (int)u; return rc;
	case 4: return copy_text(c, key, v, m->username, sizeof(m->username));
	case 5: return copy_text(c, key, v, m->password_file, sizeof(m->password_file));
	case 6: return copy_text(c, key, v, m->ca_file, sizeof(m->ca_file));
	case 7: return config_parse_double(c, key, v, MQTTLINK_KEEPALIVE_MIN_S,
					   MQTTLINK_KEEPALIVE_MAX_S, &m->keepalive_s);
	case 8: return parse_uint(c, key, v, 1, MQTTLINK_BUFFER_MAX, &m->buffer_messages);
	case 9: return config_parse_double(c, key, v, 0.0, 3600.0, &m->state_interval_s);
	default: assert(0);
	}
	return -EINVAL;
}

static int export_key(struct config_ctx *c, const char *key, const char *v)
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
	static const char *const names[] = {"listen", "base_address", "fields", NULL};
	int k = key_index(names, key);
	if (k < 0) {
		config_error(c, c->line, "unknown key '%s' in [export.modbus]", key);
		return -EINVAL;
	}
	if (!first_time(c, &c->export_keys_set, (unsigned)k, key))
		return -EINVAL;
	if (k == 1)
		return parse_uint(c, key, v, 0, 60000, &e->base_address);
	const char *colon = strrchr(v, ':');
	unsigned port = 0;
	if (colon == NULL || (size_t)(colon - v) >= sizeof(e->host) || colon == v) {
		config_error(c, c->line, "listen: '%s' is not HOST:PORT", v);
		return -EINVAL;
	}
	memcpy(e->host, v, (size_t)(colon - v));
	e->host[colon - v] = '\0';
	if (parse_uint(c, key, colon + 1, 1, 65535, &port) != 0)
		return -EINVAL;
	e->port = (int)port;
	return 0;
}

static const char *const alarm_key_names[] = {
	"section", "signal", "kind", "setpoint", "deadband", "on_delay_s", "off_delay_s", "priority",
	"reference", "rate_window_s", "out_of_service", NULL};

static int alarm_key(struct config_ctx *c, unsigned ai, const char *key, const char *v)
{
	struct alarm_cfg *a = &c->cfg->alarms[ai];
	struct alarm_pending *ap = &c->alm[ai];
	int k = key_index(alarm_key_names, key);
	if (k < 0) {
		config_error(c, c->line, "unknown key '%s' in [alarm.%s]", key, a->name);
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
	case 10: return parse_bool(c, key, v, &a->out_of_service);
	default: assert(0);
	}
	if (copy_text(c, key, v, pn->name, sizeof(pn->name)) != 0)
		return -EINVAL;
	pn->line = c->line;
	return 0;
}

/* ---- objects, the handler and the reader -------------------------------- */

static bool name_ok(const char *n, bool allow_dot)
{
	if (*n == '\0')
		return false;
	for (const char *p = n; *p; p++) {
		unsigned char ch = (unsigned char)*p;
		if (!(isalnum(ch) || ch == '_' || ch == '-' || (allow_dot && (ch == '.' || ch == ':'))))
			return false;
	}
	return true;
}

static void tag_defaults(struct tag_cfg *t)
{
	t->source_index = -1;
	t->fixed_value = NAN;
	t->nominal = NAN;
	t->table = TAG_TABLE_HOLDING;
	t->type = TAG_TYPE_FLOAT32;
	t->order = TAG_ORDER_ABCD;
	t->scale = 1.0;
	t->offset = 0.0;
	t->unit = NULL;
	t->min = NAN;
	t->max = NAN;
	t->stale_periods = 3.0;
	t->median = 1;
}

static void section_defaults(struct section_cfg *s)
{
	for (int i = 0; i < SIGNAL_COUNT; i++)
		s->signal[i] = -1;
	s->props.gas_molar_mass_kgkmol = NAN;
	s->props.gas_compressibility = 1.0;
	s->sump_area_m2 = NAN;
	s->geom.tray.deck_thickness_m = 0.002; /* common practice: 2 mm stainless deck */
	s->geom.tray.flood_method = TRAY_FLOOD_FAIR;
	s->geom.tray.kind = TRAY_SIEVE;
	struct packing_constants *pc = &s->geom.packed.c;
	pc->area_m2m3 = pc->void_frac = pc->packing_factor_1pm = pc->dry_factor_1pm = NAN;
	pc->stichlmair_c1 = pc->stichlmair_c2 = pc->stichlmair_c3 = NAN;
	pc->billet_ch = pc->billet_cp = pc->billet_cs = pc->billet_cfl = NAN;
	s->geom.packed.flood_method = PACKED_FLOOD_STICHLMAIR;
	s->geom.spray.droplet_spread = 3.0; /* common practice for hollow-cone nozzles */
	s->geom.bubble.tap_spacing_m = NAN;
	s->geom.bubble.clear_liquid_height_m = NAN;
	s->geom.bubble.holdup_method = BUBBLE_HOLDUP_AKITA_YOSHIDA;
}

static void alarm_defaults(struct alarm_cfg *a)
{
	alarm_cfg_defaults(a);
}

/* Creates the object a header names. Returns 0, or -EINVAL (reported). */
static int open_header(struct config_ctx *c, const char *hdr)
{
	struct fg_config *cfg = c->cfg;
	snprintf(c->cur_section, sizeof(c->cur_section), "%s", hdr);
	c->cur_kind = SK_NONE;
	c->cur_index = -1;
	static const struct {
		const char *prefix;
		int kind;
		unsigned max;
		bool dot;
	} kinds[] = {{"source.", SK_SOURCE, FG_SOURCES_MAX, false},
		     {"tag.", SK_TAG, FG_TAGS_MAX, true},
		     {"section.", SK_SECTION, FG_SECTIONS_MAX, false},
		     {"alarm.", SK_ALARM, FG_ALARMS_MAX, false}};
	if (!strcmp(hdr, "monitor") || !strcmp(hdr, "mqtt") || !strcmp(hdr, "export.modbus")) {
		c->cur_kind = hdr[0] == 'm' ? (hdr[1] == 'o' ? SK_MONITOR : SK_MQTT) : SK_EXPORT;
		if (c->cur_kind == SK_MQTT)
			cfg->mqtt.enabled = true, cfg->mqtt.line = c->line;
		if (c->cur_kind == SK_EXPORT)
			cfg->exp.enabled = true, cfg->exp.line = c->line;
		return 0;
	}
	for (unsigned k = 0; k < sizeof(kinds) / sizeof(kinds[0]); k++) {
		size_t pl = strlen(kinds[k].prefix);
		if (strncmp(hdr, kinds[k].prefix, pl) != 0)
			continue;
		const char *name = hdr + pl;
		if (!name_ok(name, kinds[k].dot) || strlen(name) >= FG_NAME_MAX) {
			config_error(c, c->line,
				     "[%s]: name must be 1..%d characters of letters, digits, _ -%s",
				     hdr, FG_NAME_MAX - 1, kinds[k].dot ? " . :" : "");
			return -EINVAL;
		}
		unsigned *count = kinds[k].kind == SK_SOURCE ? &cfg->source_count
				  : kinds[k].kind == SK_TAG  ? &cfg->tag_count
				  : kinds[k].kind == SK_SECTION ? &cfg->section_count
								: &cfg->alarm_count;
		if (*count == kinds[k].max) {
			config_error(c, c->line, "too many [%s*] sections (at most %u)",
				     kinds[k].prefix, kinds[k].max);
			return -EINVAL;
		}
		unsigned i = (*count)++;
		c->cur_kind = kinds[k].kind;
		c->cur_index = (int)i;
		switch (kinds[k].kind) {
		case SK_SOURCE:
			snprintf(cfg->sources[i].name, FG_NAME_MAX, "%s", name);
			cfg->sources[i].line = c->line;
			break;
		case SK_TAG:
			tag_defaults(&cfg->tags[i]);
			snprintf(cfg->tags[i].name, FG_NAME_MAX, "%s", name);
			cfg->tags[i].line = c->line;
			break;
		case SK_SECTION:
			section_defaults(&cfg->sections[i]);
			snprintf(cfg->sections[i].name, FG_NAME_MAX, "%s", name);
			cfg->sections[i].line = c->line;
			break;
		default:
			alarm_defaults(&cfg->alarms[i]);
			snprintf(cfg->alarms[i].name, FG_NAME_MAX, "%s", name);
			cfg->alarms[i].section_index = 0;
			c->alm[i].keys_set = 0;
			break;
		}
		return 0;
	}
	config_error(c, c->line, "unknown section [%s] (expected monitor, source.NAME, tag.NAME, "
				 "section.NAME, alarm.NAME, mqtt or export.modbus)", hdr);
	return -EINVAL;
}

static int handler(void *user, const char *section, const char *name, const char *value)
{
	struct config_ctx *c = user;
	if (strcmp(section, c->cur_section) != 0 || c->cur_kind == SK_NONE) {
		if (section[0] == '\0')
			config_error(c, c->line, "key '%s' outside any [section]", name);
		return 1; /* the header itself was reported */
	}
	unsigned i = (unsigned)c->cur_index;
	switch (c->cur_kind) {
	case SK_MONITOR: monitor_key(c, name, value); break;
	case SK_SOURCE: source_key(c, i, name, value); break;
	case SK_TAG: tag_key(c, i, name, value); break;
	case SK_SECTION: section_key(c, &c->cfg->sections[i], &c->sec[i], name, value); break;
	case SK_ALARM: alarm_key(c, i, name, value); break;
	case SK_MQTT: mqtt_key(c, name, value); break;
	case SK_EXPORT: export_key(c, name, value); break;
	default: assert(0);
	}
	return 1; /* keep going: report every problem, not just the first */
}

/* Finds a section header "[name]" on a line; returns false if not one. */
static bool header_of(const char *line, char *out, size_t cap)
{
	while (isspace((unsigned char)*line))
		line++;
	if (*line != '[')
		return false;
	const char *end = strchr(line, ']');
	if (end == NULL)
		return false;
	const char *b = line + 1;
	while (b < end && isspace((unsigned char)*b))
		b++;
	const char *e = end;
	while (e > b && isspace((unsigned char)e[-1]))
		e--;
	size_t n = (size_t)(e - b);
	if (n >= cap)
		n = cap - 1;
	memcpy(out, b, n);
	out[n] = '\0';
	return true;
}

static char *reader(char *str, int num, void *stream)
{
	struct config_ctx *c = stream;
	if (fgets(str, num, c->in) == NULL)
		return NULL;
	c->line++;
	size_t n = strlen(str);
	if (n > 0 && str[n - 1] != '\n' && !feof(c->in)) {
		int ch;
		while ((ch = fgetc(c->in)) != EOF && ch != '\n')
			;
		config_error(c, c->line, "line longer than %d characters", num - 2);
		str[0] = ';'; /* hand inih a comment instead */
		str[1] = '\0';
		return str;
	}
	char hdr[FG_TEXT_MAX];
	if (header_of(str, hdr, sizeof(hdr))) {
		/* Refuse a header seen before: inih would merge the two silently. */
		for (unsigned k = 0; k < c->seen_count; k++) {
			if (!strcmp(c->seen[k].name, hdr)) {
				config_error(c, c->line, "[%s] appears twice (first at line %d)", hdr,
					     c->seen[k].line);
				c->cur_kind = SK_NONE;
				snprintf(c->cur_section, sizeof(c->cur_section), "%s", hdr);
				return str;
			}
		}
		if (c->seen_count < CONFIG_HEADERS_MAX) {
			snprintf(c->seen[c->seen_count].name, FG_TEXT_MAX, "%s", hdr);
			c->seen[c->seen_count].line = c->line;
			c->seen_count++;
		}
		open_header(c, hdr);
	}
	return str;
}

int config_load(struct fg_config *cfg, const char *path, FILE *errf)
{
	assert(cfg != NULL);
	assert(path != NULL);
	struct config_ctx *c = calloc(1, sizeof(*c));
	if (c == NULL)
		return -ENOMEM;
	memset(cfg, 0, sizeof(*cfg));
	snprintf(cfg->path, sizeof(cfg->path), "%s", path);
	snprintf(cfg->monitor.name, sizeof(cfg->monitor.name), "floodgauge");
	cfg->monitor.period_s = 1.0;
	c->cfg = cfg;
	c->path = path;
	c->errf = errf;
	int rc = 0;
	c->in = fopen(path, "r");
	if (c->in == NULL) {
		rc = -errno;
		if (errf)
			fprintf(errf, "%s: cannot open: %s\n", path, strerror(errno));
		goto out_free;
	}
	int ir = ini_parse_stream(reader, c, handler, c);
	if (ir > 0 && c->error_count == 0)
		config_error(c, ir, "not a valid INI line");
	else if (ir < 0)
		config_error(c, 0, "cannot be parsed (%d)", ir);
	if (c->error_count == 0)
		config_resolve(c);
	if (c->error_count > CONFIG_ERRORS_MAX && errf)
		fprintf(errf, "%s: ... %d problems in all\n", path, c->error_count);
	rc = c->error_count > 0 ? -EINVAL : 0;
	fclose(c->in);
out_free:
	free(c);
	return rc;
}
