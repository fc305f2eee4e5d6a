/*
 * suggest.h - "did you mean" for names the user mistyped: config keys, tags,
 * sections, alarms, result fields.
 *
 * The best candidate is the one at the smallest edit distance (optimal string
 * alignment: insert, delete, substitute, swap two neighbours; letters
 * compared without case), if that distance is at most max(1, length / 3) of
 * the typed word, the usual bound that catches typos without suggesting
 * unrelated names (common practice in command-line tools). Ties go to the
 * first candidate.
 */
#ifndef SUGGEST_H
#define SUGGEST_H

#include <stddef.h>

/* Names longer than this are never suggested (nor compared). */
#define SUGGEST_NAME_MAX 128

/* Candidate i of a set, for suggest_best(); NULL to skip it. */
typedef const char *(*suggest_get_fn)(const void *ctx, unsigned i);

/* The best candidate among count, or NULL when none is close enough. */
const char *suggest_best(const char *word, suggest_get_fn get, const void *ctx, unsigned count);

/* The same over a NULL-terminated list of names. */
const char *suggest_in_list(const char *word, const char *const *names);

/* " (did you mean 'NAME'?)" in buf for a found name, "" for NULL. Returns buf. */
const char *suggest_text(const char *best, char *buf, size_t buf_size);

/* Edit distance of a and b as above (exposed for tests). */
unsigned suggest_distance(const char *a, const char *b);

#endif
