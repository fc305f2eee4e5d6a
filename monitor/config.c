/*
 * config.c - reads the INI configuration into struct fg_config.
 *
 * libinih does the tokenising. Its callback does not say which line it is on
 * (portably), so we feed it through our own reader that counts lines, spots
 * section headers (for duplicate headers, and for empty sections inih never
 * reports) and refuses over-long lines instead of letting inih split them.
 * This file has the reader, the header handling that creates each object with
 * its defaults, the value parsers and the inih handler, which hands every key
 * to its section's key function in config_keys.c. Cross references and
 * whole-config checks are in config_resolve.c.
 */
#include "config_int.h"

#include <assert.h>
#include <ctype.h>
#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>

#include <fcntl.h>
#include <sys/stat.h>
#include <unistd.h>

#include <ini.h>
#include "suggest.h"

#include "softsense.h"

/* libinih's line buffer in Debian's build (ini_max_line default). */
#define CONFIG_LINE_MAX 200

enum sec_kind {
	SK_NONE, SK_MONITOR, SK_SOURCE, SK_TAG, SK_SECTION, SK_ALARM, SK_MQTT, SK_EXPORT, SK_REPLAY
};

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

int config_parse_uint(struct config_ctx *c, const char *key, const char *v, unsigned lo,
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

int config_parse_bool(struct config_ctx *c, const char *key, const char *v, bool *out)
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

int config_copy_text(struct config_ctx *c, const char *key, const char *v, char *dst,
		     size_t cap)
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
int config_parse_choice(struct config_ctx *c, const char *key, const char *v,
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
	t->frozen_s = NAN; /* resolved: VALIDATE_FROZEN_DEFAULT_S for a polled tag */
	t->span_m = NAN;
	t->zero_m = 0.0;
	t->median = 1;
}

static void section_defaults(struct section_cfg *s)
{
	for (int i = 0; i < SIGNAL_COUNT; i++)
		s->signal[i] = -1;
	s->props.gas_molar_mass_kgkmol = NAN;
	s->active_area_m2 = s->downcomer_area_m2 = s->hole_area_m2 = NAN;
	s->props.gas_compressibility = 1.0;
	s->sump_area_m2 = NAN;
	s->geom.capacity_factor = 1.0;
	s->dp_factor = 1.0;
	s->steady_window_s = SOFTSENSE_STEADY_WINDOW_DEFAULT_S;
	s->steady_load_band = SOFTSENSE_STEADY_BAND_DEFAULT;
	s->normal_dp_sigmas = SOFTSENSE_NORMAL_SIGMAS_DEFAULT;
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
	s->geom.pbub.bed_height_m = NAN;
	s->geom.pbub.impulse_density_kgm3 = NAN;
	s->geom.stirred.power_number = NAN;
	s->geom.stirred.drive_loss_w = 0.0;
	s->geom.stirred.drive_efficiency = 1.0;
	s->geom.stirred.clear_liquid_height_m = NAN;
	s->geom.loop.tap_spacing_m = NAN;
	s->geom.loop.top_loss = 0.0;   /* an internal loop with a roomy gas separator (Chisti) */
	s->geom.loop.circulation_normal_ms = NAN;
}

static void alarm_defaults(struct alarm_cfg *a)
{
	alarm_cfg_defaults(a);
}

/* Gives object i of a [kind.NAME] header its defaults, its name and its line. */
static void init_object(struct config_ctx *c, int kind, unsigned i, const char *name)
{
	struct fg_config *cfg = c->cfg;
	switch (kind) {
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
}

/* " (did you mean [tag.X]?)" for a mistyped header kind, or "". */
static const char *header_suggestion(const char *hdr, char *buf, size_t size)
{
	static const char *const plain[] = {"monitor", "mqtt", "replay", "export.modbus", NULL};
	static const char *const kinds[] = {"source", "tag", "section", "alarm", NULL};
	const char *dot = strchr(hdr, '.');
	char head[FG_TEXT_MAX];
	snprintf(head, sizeof(head), "%.*s", dot != NULL ? (int)(dot - hdr) : (int)strlen(hdr), hdr);
	const char *best = dot != NULL ? suggest_in_list(head, kinds) : NULL;
	if (best != NULL) {
		snprintf(buf, size, " (did you mean [%s%s]?)", best, dot);
		return buf;
	}
	best = suggest_in_list(hdr, plain);
	if (best != NULL)
		snprintf(buf, size, " (did you mean [%s]?)", best);
	else
		buf[0] = '\0';
	return buf;
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
	if (!strcmp(hdr, "replay")) {
		c->cur_kind = SK_REPLAY;
		cfg->replay.line = c->line;
		return 0;
	}
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
		init_object(c, kinds[k].kind, i, name);
		return 0;
	}
	char dym[FG_TEXT_MAX + 32];
	config_error(c, c->line, "unknown section [%s]%s (expected monitor, source.NAME, tag.NAME, "
				 "section.NAME, alarm.NAME, mqtt, export.modbus or replay)", hdr,
		     header_suggestion(hdr, dym, sizeof(dym)));
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
	case SK_MONITOR: config_monitor_key(c, name, value); break;
	case SK_SOURCE: config_source_key(c, i, name, value); break;
	case SK_TAG: config_tag_key(c, i, name, value); break;
	case SK_SECTION:
		config_section_key(c, &c->cfg->sections[i], &c->sec[i], name, value);
		break;
	case SK_ALARM: config_alarm_key(c, i, name, value); break;
	case SK_MQTT: config_mqtt_key(c, name, value); break;
	case SK_EXPORT: config_export_key(c, name, value); break;
	case SK_REPLAY: config_replay_key(c, name, value); break;
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

/* One line into str (at most num - 1 bytes), as fgets would, but a NUL byte
 * is seen (fgets would hide the rest of the line behind it) and a lone CR
 * ends a line too, so a file with old Mac line ends is reported once, by
 * line, instead of as one over-long line. Returns the byte count (0 at the
 * end of the file); *nul and *lone_cr report what was met. */
static size_t read_line(FILE *in, char *str, size_t num, bool *nul, bool *lone_cr)
{
	size_t n = 0;
	int ch = 0;
	while (n + 1 < num && (ch = fgetc(in)) != EOF) {
		if (ch == '\0') {
			*nul = true;
			ch = ' ';
		}
		if (ch == '\r') {
			int next = fgetc(in);
			if (next != '\n') {
				*lone_cr = true;
				if (next != EOF)
					ungetc(next, in);
			}
			ch = '\n';
		}
		str[n++] = (char)ch;
		if (ch == '\n')
			break;
	}
	str[n] = '\0';
	return n;
}

static char *reader(char *str, int num, void *stream)
{
	struct config_ctx *c = stream;
	bool nul = false, lone_cr = false;
	size_t n = read_line(c->in, str, (size_t)num, &nul, &lone_cr);
	if (n == 0)
		return NULL;
	c->line++;
	if (lone_cr && !c->lone_cr_said) {
		config_error(c, c->line, "line ends with a lone CR (old Mac line ends): save the file "
					 "with LF or CRLF line ends");
		c->lone_cr_said = true;
	}
	if (nul) {
		config_error(c, c->line, "NUL byte in the line: is this a text file?");
		str[0] = ';'; /* hand inih a comment instead */
		str[1] = '\0';
		return str;
	}
	if (n > 0 && str[n - 1] != '\n' && !feof(c->in)) {
		int ch;
		while ((ch = fgetc(c->in)) != EOF && ch != '\n' && ch != '\r')
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

/* Opens path for reading if it is a regular file of a sane size: a device
 * (/dev/zero), a FIFO or a directory would hang or make no sense, and no
 * config is anywhere near CONFIG_FILE_MAX. O_NONBLOCK so that opening a FIFO
 * does not wait for a writer. Returns 0, or -errno / -EINVAL after saying why
 * on errf. */
static int config_open_file(const char *path, FILE *errf, FILE **out)
{
	int fd = open(path, O_RDONLY | O_NONBLOCK | O_CLOEXEC);
	if (fd < 0) {
		int e = errno;
		if (errf)
			fprintf(errf, "%s: cannot open: %s\n", path, strerror(e));
		return -e;
	}
	struct stat st;
	const char *why = NULL;
	if (fstat(fd, &st) != 0)
		why = "cannot stat it";
	else if (!S_ISREG(st.st_mode))
		why = S_ISDIR(st.st_mode) ? "is a directory, not a config file"
					  : "is not a regular file (a device, FIFO or socket)";
	else if (st.st_size > CONFIG_FILE_MAX)
		why = "is larger than any config (limit 1 MiB): is it the right file?";
	if (why != NULL) {
		if (errf)
			fprintf(errf, "%s: %s\n", path, why);
		close(fd);
		return -EINVAL;
	}
	int fl = fcntl(fd, F_GETFL);
	if (fl >= 0)
		(void)fcntl(fd, F_SETFL, fl & ~O_NONBLOCK);
	*out = fdopen(fd, "r");
	if (*out == NULL) {
		int e = errno;
		close(fd);
		return -e;
	}
	return 0;
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
	config_runtime_defaults(cfg);
	c->cfg = cfg;
	c->path = path;
	c->errf = errf;
	int rc = 0;
	rc = config_open_file(path, errf, &c->in);
	if (rc != 0)
		goto out_free;
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
