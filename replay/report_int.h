/*
 * report_int.h - private to replay/report.c and replay/report_html.c: what
 * the collecting half of the replay report and the page writer share. Not
 * for use outside these two files; everything else goes through report.h.
 *
 * report.c owns the tables declared here; the index helpers are static
 * inline so both files compute the same offsets into the grid.
 */
#ifndef REPORT_INT_H
#define REPORT_INT_H

#include <assert.h>
#include <stddef.h>

#include "report.h"

/* Shading kind of alarms whose priority name is not one of the four known. */
#define SHADE_OTHER REPORT_PRIORITY_COUNT
#define SHADE_KINDS REPORT_SHADE_KINDS

/* Priority names, in the order of enum report_priority. */
extern const char *const report_priority_names[REPORT_PRIORITY_COUNT];

/* The enum result_field each charted series takes from a section result. */
extern const int report_series_field[REPORT_SERIES_COUNT];

/* Index into rp->cells of one bucket of one series of one section. */
static inline size_t cell_at(unsigned section, unsigned series, size_t bucket)
{
	assert(series < REPORT_SERIES_COUNT);
	assert(bucket < REPORT_BUCKETS_MAX);
	return ((size_t)section * REPORT_SERIES_COUNT + series) * REPORT_BUCKETS_MAX + bucket;
}

/* Index into rp->marks of one bucket of one section. */
static inline size_t mark_at(unsigned section, size_t bucket)
{
	assert(bucket < REPORT_BUCKETS_MAX);
	return (size_t)section * REPORT_BUCKETS_MAX + bucket;
}

/* The REPORT_PERIODS_MAX periods of section k and shading kind p. */
static inline struct report_period *periods_of(const struct report *rp, unsigned k, unsigned p)
{
	assert(k < rp->layout.section_count);
	assert(p < SHADE_KINDS);
	return &rp->periods[((size_t)k * SHADE_KINDS + p) * REPORT_PERIODS_MAX];
}

#endif
