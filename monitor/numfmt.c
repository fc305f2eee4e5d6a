/*
 * numfmt.c - see numfmt.h.
 */
#include "numfmt.h"

#include <assert.h>
#include <math.h>
#include <stdio.h>
#include <stdbool.h>
#include <stdlib.h>
#include <string.h>

int numfmt_full(double v, char *buf, size_t buf_size)
{
	assert(buf != NULL);
	assert(buf_size >= NUMFMT_FULL_SIZE);
	assert(isfinite(v));
	if (v == 0.0)
		v = 0.0; /* no "-0" */
	int n = 0;
	for (int digits = 15; digits <= 17; digits++) {
		n = snprintf(buf, buf_size, "%.*g", digits, v);
		if (strtod(buf, NULL) == v)
			break;
	}
	assert(n > 0 && (size_t)n < buf_size);
	return n;
}

int numfmt_human(double v, const char *unit, char *buf, size_t buf_size)
{
	assert(buf != NULL);
	assert(buf_size >= NUMFMT_FULL_SIZE);
	if (!isfinite(v))
		return snprintf(buf, buf_size, "-");
	bool pct = unit != NULL && strcmp(unit, "%") == 0;
	int n = snprintf(buf, buf_size, pct ? "%.1f" : "%.4g", v);
	if (strcmp(buf, "-0") == 0 || strcmp(buf, "-0.0") == 0) {
		memmove(buf, buf + 1, (size_t)n); /* the NUL moves too */
		n--;
	}
	return n;
}

int numfmt_duration(double s, char *buf, size_t buf_size)
{
	assert(buf != NULL);
	assert(buf_size >= NUMFMT_DURATION_SIZE);
	if (!isfinite(s) || fabs(s) > 9.2e15)
		return snprintf(buf, buf_size, "-");
	long long total = llround(fabs(s));
	const char *sign = s < 0.0 && total > 0 ? "-" : "";
	return snprintf(buf, buf_size, "%s%lld:%02lld:%02lld", sign, total / 3600,
			total / 60 % 60, total % 60);
}
