/*
 * histread.c - see histread.h.
 */
#include "histread.h"

#include <assert.h>
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdarg.h>
#include <string.h>

#include "timefmt.h"

__attribute__((format(printf, 3, 4))) static void set_err(char *err, size_t err_size,
							   const char *fmt, ...)
{
	if (err == NULL || err_size == 0)
		return;
	va_list ap;
	va_start(ap, fmt);
	vsnprintf(err, err_size, fmt, ap);
	va_end(ap);
}

int histread_opts_take(struct histread_opts *o, int ch, const char *arg)
{
	assert(o != NULL);
	if (ch != HISTREAD_OPT_TZ)
		return 0;
	o->tz = arg;
	return 1;
}

int histread_init(struct histread *h, const struct fg_config *cfg,
		  const struct histread_opts *opts, char *err, size_t err_size)
{
	assert(h != NULL);
	assert(cfg != NULL);
	memset(h, 0, sizeof *h);
	h->cfg = cfg;
	const char *zone = opts != NULL && opts->tz != NULL ? opts->tz : cfg->replay.tz;
	if (zone[0] == '\0')
		return 0;
	char why[400];
	int rc = tzone_load(&h->tz, zone, why, sizeof why);
	if (rc != 0) {
		set_err(err, err_size, "--tz: %s", why);
		return rc;
	}
	h->tz_loaded = true;
	return 0;
}

void histread_fini(struct histread *h)
{
	if (h == NULL)
		return;
	csvread_close(&h->csv);
	tzone_free(&h->tz);
	memset(h, 0, sizeof *h);
}

const char *histread_zone_name(const struct histread *h)
{
	assert(h != NULL);
	return h->tz_loaded ? h->tz.name : "UTC";
}

int histread_time_arg(const struct histread *h, const char *opt, const char *text,
		      int64_t *t_ms, char *err, size_t err_size)
{
	assert(h != NULL);
	assert(text != NULL);
	assert(t_ms != NULL);
	bool zoned = true;
	int64_t t = 0;
	if (timefmt_parse_zoned(text, strlen(text), &t, &zoned) != 0) {
		set_err(err, err_size, "%s '%s' is not a time (ISO 8601 such as 2026-03-02T08:00Z "
				       "or 2026-03-02 08:00, or epoch seconds)", opt, text);
		return -EINVAL;
	}
	if (!zoned && h->tz_loaded && tzone_local_to_utc(&h->tz, t, INT64_MIN, &t) != 0) {
		set_err(err, err_size, "%s '%s' is in the daylight-saving gap of %s (that local "
				       "time never happened)", opt, text, h->tz.name);
		return -ERANGE;
	}
	*t_ms = t;
	return 0;
}

static void warn_missing(const struct histread *h, const char *path, FILE *warn)
{
	if (warn == NULL || h->missing_count == 0)
		return;
	fprintf(warn, "floodgauge: warning: %s has no column for %u tag%s, missing for the whole "
		      "run (sections that need them are bad, reason missing_column):\n",
		path, h->missing_count, h->missing_count == 1 ? "" : "s");
	for (unsigned k = 0; k < h->slot_count; k++) {
		if (h->found[k])
			continue;
		const struct tag_cfg *t = &h->cfg->tags[h->tag_of_slot[k]];
		if (strcmp(h->names[k], t->name) == 0)
			fprintf(warn, "  %s\n", t->name);
		else
			fprintf(warn, "  %s (column '%s')\n", t->name, h->names[k]);
	}
}

int histread_open(struct histread *h, const char *path, FILE *warn, char *err,
		  size_t err_size)
{
	assert(h != NULL);
	assert(h->cfg != NULL);
	const struct fg_config *cfg = h->cfg;
	struct csvread_opts o = {
		.tz = h->tz_loaded ? &h->tz : NULL,
		.time_column = cfg->replay.time_column,
	};
	int rc = csvread_open_opts(&h->csv, path, &o, err, err_size);
	if (rc != 0)
		return rc;
	h->slot_count = 0;
	for (unsigned i = 0; i < cfg->tag_count; i++) {
		if (cfg->tags[i].source_index < 0)
			continue;
		h->tag_of_slot[h->slot_count] = i;
		h->names[h->slot_count++] = config_tag_column(&cfg->tags[i]);
	}
	rc = csvread_bind_some(&h->csv, h->names, h->slot_count, h->found, err, err_size);
	if (rc != 0)
		return rc;
	h->missing_count = 0;
	for (unsigned k = 0; k < h->slot_count; k++)
		h->missing_count += !h->found[k];
	if (h->slot_count > 0 && h->missing_count == h->slot_count) {
		set_err(err, err_size, "%s: no column for any tag of the config (looked for %s%s; "
				       "set [tag.NAME] column = to the historian's name)",
			path, h->names[0], h->slot_count > 1 ? ", ..." : "");
		return -ENOENT;
	}
	warn_missing(h, path, warn);
	return 0;
}

int histread_next(struct histread *h, int64_t *t_ms, double *values, enum tag_status *status)
{
	assert(h != NULL);
	assert(values != NULL);
	assert(status != NULL);
	int rc = csvread_next(&h->csv, t_ms, h->row, h->slot_count);
	if (rc != 1)
		return rc;
	for (unsigned k = 0; k < h->slot_count; k++) {
		unsigned ti = h->tag_of_slot[k];
		values[ti] = h->row[k];
		if (!h->found[k]) {
			status[ti] = TAG_STATUS_NO_COLUMN;
		} else if (isnan(h->row[k])) {
			status[ti] = TAG_STATUS_MISSING;
		} else {
			status[ti] = TAG_STATUS_FRESH;
			h->seen[k] = true;
		}
	}
	for (unsigned k = 0; k < csvread_text_count(&h->csv); k++) {
		unsigned slot;
		const char *text;
		csvread_text_at(&h->csv, k, &slot, &text);
		status[h->tag_of_slot[slot]] = TAG_STATUS_BAD;
		h->seen[slot] = true;
	}
	return 1;
}

unsigned histread_text_count(const struct histread *h)
{
	assert(h != NULL);
	return csvread_text_count(&h->csv);
}

void histread_text_at(const struct histread *h, unsigned k, unsigned *tag_index,
		      const char **text)
{
	assert(h != NULL);
	unsigned slot;
	csvread_text_at(&h->csv, k, &slot, text);
	*tag_index = h->tag_of_slot[slot];
}

void histread_warn_unseen(const struct histread *h, FILE *warn)
{
	assert(h != NULL);
	if (warn == NULL || !csvread_is_long(&h->csv))
		return;
	for (unsigned k = 0; k < h->slot_count; k++)
		if (!h->seen[k])
			fprintf(warn, "floodgauge: warning: tag %s: no sample named '%s' in the file "
				      "(missing for the whole run)\n",
				h->cfg->tags[h->tag_of_slot[k]].name, h->names[k]);
}

const struct csvread_stats *histread_stats(const struct histread *h)
{
	assert(h != NULL);
	return csvread_stats(&h->csv);
}

int histread_progress(const struct histread *h, uint64_t *bytes_done, uint64_t *bytes_total)
{
	assert(h != NULL);
	return csvread_progress(&h->csv, bytes_done, bytes_total);
}
