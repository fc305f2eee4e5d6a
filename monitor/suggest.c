/*
 * suggest.c - see suggest.h.
 */
#include "suggest.h"

#include <assert.h>
#include <ctype.h>
#include <stdio.h>
#include <string.h>

static unsigned min3(unsigned a, unsigned b, unsigned c)
{
	unsigned m = a < b ? a : b;
	return m < c ? m : c;
}

static char low(char c)
{
	return (char)tolower((unsigned char)c);
}

unsigned suggest_distance(const char *a, const char *b)
{
	assert(a != NULL);
	assert(b != NULL);
	size_t n = strlen(a), m = strlen(b);
	if (n > SUGGEST_NAME_MAX || m > SUGGEST_NAME_MAX)
		return ~0u;
	/* Three rows of the optimal-string-alignment table. */
	unsigned rows[3][SUGGEST_NAME_MAX + 1];
	unsigned *prev2 = rows[0], *prev = rows[1], *cur = rows[2];
	for (size_t j = 0; j <= m; j++)
		prev[j] = (unsigned)j;
	for (size_t i = 1; i <= n; i++) {
		cur[0] = (unsigned)i;
		for (size_t j = 1; j <= m; j++) {
			unsigned cost = low(a[i - 1]) == low(b[j - 1]) ? 0 : 1;
			cur[j] = min3(prev[j] + 1, cur[j - 1] + 1, prev[j - 1] + cost);
			if (i > 1 && j > 1 && low(a[i - 1]) == low(b[j - 2]) &&
			    low(a[i - 2]) == low(b[j - 1]) && prev2[j - 2] + 1 < cur[j])
				cur[j] = prev2[j - 2] + 1;
		}
		unsigned *t = prev2;
		prev2 = prev;
		prev = cur;
		cur = t;
	}
	return prev[m];
}

const char *suggest_best(const char *word, suggest_get_fn get, const void *ctx, unsigned count)
{
	assert(word != NULL);
	assert(get != NULL);
	size_t len = strlen(word);
	unsigned limit = len / 3 > 1 ? (unsigned)(len / 3) : 1;
	const char *best = NULL;
	unsigned best_d = limit + 1;
	for (unsigned i = 0; i < count; i++) {
		const char *name = get(ctx, i);
		if (name == NULL || name[0] == '\0')
			continue;
		unsigned d = suggest_distance(word, name);
		if (d < best_d) {
			best = name;
			best_d = d;
		}
	}
	return best_d == 0 && best != NULL && strcmp(best, word) == 0 ? NULL : best;
}

static const char *list_get(const void *ctx, unsigned i)
{
	return ((const char *const *)ctx)[i];
}

const char *suggest_in_list(const char *word, const char *const *names)
{
	assert(names != NULL);
	unsigned n = 0;
	while (names[n] != NULL)
		n++;
	return suggest_best(word, list_get, names, n);
}

const char *suggest_text(const char *best, char *buf, size_t buf_size)
{
	assert(buf != NULL);
	assert(buf_size > 0);
	if (best == NULL)
		buf[0] = '\0';
	else
		snprintf(buf, buf_size, " (did you mean '%s'?)", best);
	return buf;
}
