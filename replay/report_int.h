/*
 * report_int.h - private to replay/report.c, replay/report_html.c and
 * replay/report_svg.c: what the collecting half of the replay report, the
 * page writer and the chart writer share. Not for use outside these three
 * files; everything else goes through report.h.
 *
 * report.c owns the tables declared first; the index helpers are static
 * inline so all three files compute the same offsets into the grid. The
 * page writer's output helpers and the chart writer's entry point follow.
 */
#ifndef REPORT_INT_H
#define REPORT_INT_H

#include <assert.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

#include "report.h"

/* Shading kind of alarms whose priority name is not one of the four known. */
#define SHADE_OTHER REPORT_PRIORITY_COUNT
#define SHADE_KINDS REPORT_SHADE_KINDS

/* Priority names, in the order of enum report_priority. */
extern const char *const report_priority_names[REPORT_PRIORITY_COUNT];

/* The enum result_field each charted series takes from a section result. */
extern const int report_series_field[REPORT_SERIES_COUNT];

/* The field series s draws for a section of the named type (the fixed ones,
 * or the type's own for REPORT_SERIES_TYPE_A..C), -1 when none. */
int report_type_series_field(const char *type, unsigned s);

/* Index into rp->cells of one bucket of one series of one section. A
 * section's series of one bucket lie side by side: each row adds to every
 * series of its bucket, and series a bucket row apart (2048 cells of 40
 * bytes: 20 pages) all fell in one set of the L1 cache, which holds 8 to
 * 12 lines a set, so the 40-odd cells of a bench row missed it every row
 * (perf: 6 % of the engine thread's samples in report_add_row_at). */
static inline size_t cell_at(unsigned section, unsigned series, size_t bucket)
{
	assert(series < REPORT_SERIES_COUNT);
	assert(bucket < REPORT_BUCKETS_MAX);
	return ((size_t)section * REPORT_BUCKETS_MAX + bucket) * REPORT_SERIES_COUNT + series;
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

/* ------------------------------------------- report_html.c, for the charts */

/* Shading colour per kind (priority or "other"), a CSS colour for both the
 * SVG fills and the HTML swatches. */
extern const char *const report_html_shade_css[SHADE_KINDS];

/* Writes s to f with & < > " ' escaped and control characters replaced. */
void report_html_put_escaped(FILE *f, const char *s);

/* Writes v to f through report_format_fixed ("-" for NAN and inf). */
void report_html_put_fixed(FILE *f, double v, int decimals);

/* Decimals that show a plant value to about three significant figures. */
int report_html_auto_decimals(double v);

/* Name of enum result_field field, "quality" for -1; a static string. */
const char *report_html_alarm_field_name(int field);

/* ------------------------------------------- report_svg.c, for the page */

/* Where one chart draws: time span, plot box, value range, gap threshold. */
struct report_svg_frame {
	int64_t t0_ms, t1_ms;
	double y_top, y_bot;
	double lo, hi, step;
	int decimals;                   /* of the y tick labels */
	double scale;                   /* drawn value = stored value x scale (Pa to the DP unit) */
	int64_t gap_ms;                 /* intervals above this break the lines */
};

/* Writes the charts of section k. The caller sets fr's time span and gap
 * threshold once per page; each chart overwrites the plot box and value
 * range. */
/* The --event markers: a dashed vertical line and its number and label. */
void report_svg_write_markers(FILE *f, const struct report *rp,
			      const struct report_svg_frame *fr);

/* Times and durations as the page writes them (report_html.c). */
void report_html_put_time(FILE *f, int64_t t_ms);
void report_html_put_duration_s(FILE *f, double s);

/* The alarm performance section (report_perf.c); nothing when sum->perf is
 * NULL. */
void report_perf_write(FILE *f, const struct report *rp, const struct report_summary *sum);

/* The operating window of section k (report_window.c): nothing when it was
 * not set. */
void report_window_write(FILE *f, const struct report *rp, unsigned k);

/* Does the chart list of section type `type` show result field `field`? */
bool report_svg_type_shows(const char *type, int field);

void report_svg_write_charts(FILE *f, const struct report *rp, struct report_svg_frame *fr,
			     unsigned k);

#endif
