/*
 * jsonw.c - see jsonw.h.
 */
#include "jsonw.h"

#include <assert.h>
#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>

#include "numfmt.h"

void jsonw_init(struct jsonw *w, char *buf, size_t cap)
{
	assert(w != NULL);
	assert(buf != NULL);
	assert(cap > 0);
	w->buf = buf;
	w->cap = cap;
	w->len = 0;
	w->overflow = false;
	w->first = true;
	buf[0] = '\0';
}

static void put(struct jsonw *w, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
static void put(struct jsonw *w, const char *fmt, ...)
{
	if (w->overflow)
		return;
	va_list ap;
	va_start(ap, fmt);
	int n = vsnprintf(w->buf + w->len, w->cap - w->len, fmt, ap);
	va_end(ap);
	if (n < 0 || (size_t)n >= w->cap - w->len) {
		w->overflow = true;
		w->buf[w->len] = '\0';
		return;
	}
	w->len += (size_t)n;
}

static void put_string(struct jsonw *w, const char *s)
{
	put(w, "\"");
	for (const unsigned char *p = (const unsigned char *)s; *p; p++) {
		if (*p == '"' || *p == '\\')
			put(w, "\\%c", *p);
		else if (*p < 0x20)
			put(w, "\\u%04x", *p);
		else
			put(w, "%c", *p);
	}
	put(w, "\"");
}

static void key(struct jsonw *w, const char *k)
{
	if (!w->first)
		put(w, ",");
	w->first = false;
	put_string(w, k);
	put(w, ":");
}

void jsonw_open(struct jsonw *w)
{
	put(w, "{");
	w->first = true;
}

void jsonw_close(struct jsonw *w)
{
	put(w, "}");
	w->first = false;
}

void jsonw_str(struct jsonw *w, const char *k, const char *value)
{
	key(w, k);
	if (value == NULL)
		put(w, "null");
	else
		put_string(w, value);
}

void jsonw_num(struct jsonw *w, const char *k, double value)
{
	key(w, k);
	char num[NUMFMT_FULL_SIZE];
	if (isfinite(value)) {
		numfmt_full(value, num, sizeof num); /* full precision, no "-0" */
		put(w, "%s", num);
	} else
		put(w, "null");
}

void jsonw_bool(struct jsonw *w, const char *k, bool value)
{
	key(w, k);
	put(w, "%s", value ? "true" : "false");
}

void jsonw_null(struct jsonw *w, const char *k)
{
	key(w, k);
	put(w, "null");
}

void jsonw_open_key(struct jsonw *w, const char *k)
{
	key(w, k);
	put(w, "{");
	w->first = true;
}

void jsonw_open_array_key(struct jsonw *w, const char *k)
{
	key(w, k);
	put(w, "[");
	w->first = true;
}

void jsonw_close_array(struct jsonw *w)
{
	put(w, "]");
	w->first = false;
}

void jsonw_open_element(struct jsonw *w)
{
	if (!w->first)
		put(w, ",");
	put(w, "{");
	w->first = true;
}

int jsonw_finish(const struct jsonw *w)
{
	return w->overflow ? -ENOSPC : (int)w->len;
}

void jsonw_result(struct jsonw *w, const struct section_result *r)
{
	assert(r != NULL);
	for (int i = 0; i < RF_COUNT; i++)
		if (isfinite(r->v[i]))
			jsonw_num(w, result_fields[i].name, r->v[i]);
	if (r->basis != FLOOD_BASIS_NONE)
		jsonw_str(w, "flood_basis", flood_basis_name(r->basis));
	if (r->regime != BUBBLE_REGIME_NONE)
		jsonw_str(w, "regime", bubble_regime_name(r->regime));
	jsonw_str(w, "quality", fg_quality_name(r->quality));
	jsonw_bool(w, "extrapolated", r->extrap.count > 0);
	if (r->extrap.first != NULL)
		jsonw_str(w, "extrapolation_note", r->extrap.first);
}
