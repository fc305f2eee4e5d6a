/*
 * jsonw.h - a small JSON writer into a caller's fixed buffer.
 *
 * For the few objects floodgauge emits (results, events, replies) a tree
 * library would allocate per message; this writes straight into the buffer
 * and records truncation instead. Numbers are written in full (numfmt_full:
 * the shortest form that reads back exactly), non-finite numbers as null.
 */
#ifndef JSONW_H
#define JSONW_H

#include <stdbool.h>
#include <stddef.h>

#include "fg_result.h"

struct jsonw {
	char *buf;
	size_t cap;   /* bytes of buf */
	size_t len;   /* bytes written, excluding the NUL */
	bool overflow;/* set once anything did not fit */
	bool first;   /* no member written yet in the current object */
};

void jsonw_init(struct jsonw *w, char *buf, size_t cap);
void jsonw_open(struct jsonw *w);   /* { */
void jsonw_close(struct jsonw *w);  /* } */
void jsonw_str(struct jsonw *w, const char *key, const char *value);
void jsonw_num(struct jsonw *w, const char *key, double value);
void jsonw_bool(struct jsonw *w, const char *key, bool value);
void jsonw_null(struct jsonw *w, const char *key);
/* "key":{ and "key":[ , closed by jsonw_close and jsonw_close_array. */
void jsonw_open_key(struct jsonw *w, const char *key);
void jsonw_open_array_key(struct jsonw *w, const char *key);
void jsonw_close_array(struct jsonw *w);
/* An unnamed { as the next element of an open array. */
void jsonw_open_element(struct jsonw *w);
/* Returns the length, or -ENOSPC when something did not fit. */
int jsonw_finish(const struct jsonw *w);

/* Writes the result of one section as members of the open object: every
 * applicable field, flood_basis, regime, quality, extrapolated and the
 * extrapolation note. Absent fields are left out. */
void jsonw_result(struct jsonw *w, const struct section_result *r);

#endif
