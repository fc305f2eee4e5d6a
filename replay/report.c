/*
 * report.c - the replay report: layout, bounded series summary, alarm
 * events and periods. The page itself is written by report_html.c (charts: report_svg.c).
 *
 * Collection. Every section shares one grid of time buckets (struct
 * report_slot for the rows, struct report_cell per series, struct
 * report_mark for quality and alarm shading). Bucket 0 starts at the first
 * row; the width starts at 1 ms and doubles, merging neighbours in pairs,
 * whenever a row falls past the last bucket. Merging keeps first, min, max
 * and last, so a one-sample spike survives any number of merges as the
 * extreme of its bucket, and keeps the longest row interval inside a bucket,
 * so a data gap survives too. Row intervals also go into a log histogram
 * whose median is the typical sample period.
 *
 * Alarm shading does not use the grid: each section and priority keeps its
 * own short list of exact active periods (from the first of its alarms going
 * to unacknowledged until the last one leaves the active states), joined pairwise when full.
 */
#include "report.h"

#include <assert.h>
#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "report_int.h"

/* Shared through report_int.h: the page names priorities and charts series. */
const char *const report_priority_names[REPORT_PRIORITY_COUNT] = {
	[REPORT_PRIORITY_LOW] = "low",
	[REPORT_PRIORITY_MEDIUM] = "medium",
	[REPORT_PRIORITY_HIGH] = "high",
	[REPORT_PRIORITY_URGENT] = "urgent",
};

static const char *const state_names[] = {
	"normal", "unacknowledged", "acknowledged", "returned_unacknowledged",
	"shelved", "suppressed_by_design", "out_of_service",
};
#define STATE_COUNT (sizeof state_names / sizeof state_names[0])

const int report_series_field[REPORT_SERIES_COUNT] = {
	[REPORT_SERIES_FLOOD_INDEX] = RF_FLOOD_INDEX,
	[REPORT_SERIES_FLOOD_PCT] = RF_FLOOD_PCT,
	[REPORT_SERIES_DP] = RF_DP_PA,
	[REPORT_SERIES_DP_MODEL] = RF_DP_MODEL_PA,
	[REPORT_SERIES_HOLDUP] = RF_LIQUID_HOLDUP_FRAC,
	[REPORT_SERIES_LOAD_Y] = -1,
	[REPORT_SERIES_LOAD_X] = -1,
	[REPORT_SERIES_WEEP] = RF_WEEP_PCT,
	[REPORT_SERIES_CARRYOVER] = RF_CARRYOVER_FRAC,
	[REPORT_SERIES_GAS_HOLDUP] = RF_GAS_HOLDUP_FRAC,
	[REPORT_SERIES_GAS_HOLDUP_DP] = RF_GAS_HOLDUP_DP_FRAC,
	[REPORT_SERIES_EXPANDED_LEVEL] = RF_EXPANDED_LEVEL_M,
	[REPORT_SERIES_TYPE_A] = -1,
	[REPORT_SERIES_TYPE_B] = -1,
	[REPORT_SERIES_TYPE_C] = -1,
	[REPORT_SERIES_ALARM0] = -1, /* per section: pick_alarm_fields() */
	[REPORT_SERIES_ALARM1] = -1,
	[REPORT_SERIES_ALARM2] = -1,
	[REPORT_SERIES_ALARM3] = -1,
};

/* The type series of the high-holdup types: what their own charts draw. */
static const struct {
	const char *type;
	int field[3];
} type_series[] = {
	{"packed-bubble", {RF_GAS_HOLDUP_DP_FRAC, RF_GAS_HOLDUP_FRAC, RF_EXPANDED_LEVEL_M}},
	{"stirred", {RF_POWER_RATIO_MEASURED, RF_POWER_RATIO_MODEL, RF_FLOW_NUMBER}},
	{"loop", {RF_RISER_HOLDUP_FRAC, RF_DOWNCOMER_HOLDUP_FRAC, RF_CIRCULATION_VELOCITY}},
};

int report_type_series_field(const char *type, unsigned s)
{
	assert(type != NULL);
	assert(s < REPORT_SERIES_COUNT);
	if (s < REPORT_SERIES_TYPE_A || s >= REPORT_SERIES_ALARM0)
		return report_series_field[s];
	for (size_t i = 0; i < sizeof type_series / sizeof type_series[0]; i++)
		if (strcmp(type_series[i].type, type) == 0)
			return type_series[i].field[s - REPORT_SERIES_TYPE_A];
	return -1;
}

/* Every alarm's watched field is charted: the fields the section type's
 * charts do not show get a series of their own (the first
 * REPORT_ALARM_SERIES of them). */
static void pick_alarm_fields(struct report *rp)
{
	for (unsigned k = 0; k < rp->layout.section_count; k++) {
		unsigned n = 0;
		for (unsigned a = 0; a < rp->layout.alarm_count; a++) {
			const struct report_alarm *al = &rp->layout.alarms[a];
			if ((unsigned)al->section_index != k || al->field < 0 ||
			    report_svg_type_shows(rp->layout.sections[k].type, al->field))
				continue;
			bool dup = false;
			for (unsigned j = 0; j < n; j++)
				dup = dup || rp->series_field[k][REPORT_SERIES_ALARM0 + j] == al->field;
			if (!dup && n < REPORT_ALARM_SERIES)
				rp->series_field[k][REPORT_SERIES_ALARM0 + n++] = al->field;
		}
	}
}

/* ---------------------------------------------------------------- helpers */

static bool string_fits(const char *s, size_t size)
{
	assert(s != NULL);
	return memchr(s, '\0', size) != NULL;
}

int report_priority_lookup(const char *name)
{
	assert(name != NULL);
	for (int p = 0; p < REPORT_PRIORITY_COUNT; p++)
		if (strcmp(report_priority_names[p], name) == 0)
			return p;
	return -1;
}

static int state_lookup(const char *state)
{
	assert(state != NULL);
	for (size_t i = 0; i < STATE_COUNT; i++)
		if (strcmp(state_names[i], state) == 0)
			return (int)i;
	return -1;
}

static bool state_is_active(const char *state)
{
	assert(state != NULL);
	return strcmp(state, "unacknowledged") == 0 || strcmp(state, "acknowledged") == 0;
}

/* ------------------------------------------------------------- lifecycle */

static int layout_check(const struct report_layout *l)
{
	assert(l != NULL);
	if (l->section_count == 0 || l->section_count > FG_SECTIONS_MAX)
		return -EINVAL;
	if (l->marker_count > REPORT_MARKERS_MAX)
		return -EINVAL;
	if (l->alarm_count > FG_ALARMS_MAX)
		return -EINVAL;
	if (!string_fits(l->plant, sizeof l->plant) ||
	    !string_fits(l->data_file, sizeof l->data_file))
		return -EINVAL;
	for (unsigned i = 0; i < l->section_count; i++) {
		const struct report_section *s = &l->sections[i];
		if (!string_fits(s->name, sizeof s->name) || !string_fits(s->type, sizeof s->type))
			return -EINVAL;
	}
	for (unsigned i = 0; i < l->alarm_count; i++) {
		const struct report_alarm *a = &l->alarms[i];
		if (!string_fits(a->name, sizeof a->name) ||
		    !string_fits(a->kind, sizeof a->kind) ||
		    !string_fits(a->priority, sizeof a->priority))
			return -EINVAL;
		if (a->section_index < 0 || (unsigned)a->section_index >= l->section_count)
			return -EINVAL;
		if (a->field < -1 || a->field >= RF_COUNT)
			return -EINVAL;
	}
	return 0;
}

int report_init(struct report *rp, const struct report_layout *layout)
{
	assert(rp != NULL);
	assert(layout != NULL);
	memset(rp, 0, sizeof *rp);
	const int rc = layout_check(layout);
	if (rc != 0)
		return rc;
	rp->layout = *layout;
	const size_t nsec = layout->section_count;
	for (size_t k = 0; k < nsec; k++)
		for (unsigned s = 0; s < REPORT_SERIES_COUNT; s++)
			rp->series_field[k][s] = report_type_series_field(layout->sections[k].type, s);
	pick_alarm_fields(rp);
	for (size_t k = 0; k < nsec; k++) {
		unsigned n = 0;
		for (unsigned s = 0; s < REPORT_SERIES_COUNT; s++)
			if (rp->series_field[k][s] >= 0) {
				assert(rp->series_field[k][s] < 256);
				rp->field_series[k][n][0] = (unsigned char)s;
				rp->field_series[k][n][1] = (unsigned char)rp->series_field[k][s];
				n++;
			}
		rp->field_series_count[k] = (unsigned char)n;
	}
	rp->slots = calloc(REPORT_BUCKETS_MAX, sizeof *rp->slots);
	rp->cells = calloc(nsec * REPORT_SERIES_COUNT * REPORT_BUCKETS_MAX, sizeof *rp->cells);
	rp->marks = calloc(nsec * REPORT_BUCKETS_MAX, sizeof *rp->marks);
	rp->events = calloc(REPORT_EVENTS_MAX, sizeof *rp->events);
	rp->periods = calloc(nsec * SHADE_KINDS * REPORT_PERIODS_MAX, sizeof *rp->periods);
	rp->windows = calloc(nsec, sizeof *rp->windows);
	if (rp->slots == NULL || rp->cells == NULL || rp->marks == NULL || rp->events == NULL ||
	    rp->periods == NULL || rp->windows == NULL) {
		report_fini(rp);
		return -ENOMEM;
	}
	rp->width_ms = 1;
	rp->prev_row_ms = REPORT_T_NONE;
	rp->t_min_ms = REPORT_T_NONE;
	rp->t_max_ms = REPORT_T_NONE;
	for (unsigned i = 0; i < layout->alarm_count; i++) {
		const int p = report_priority_lookup(layout->alarms[i].priority);
		rp->alarm_shade[i] = (uint8_t)(p < 0 ? SHADE_OTHER : p);
	}
	return 0;
}

void report_fini(struct report *rp)
{
	if (rp == NULL)
		return;
	free(rp->slots);
	free(rp->cells);
	free(rp->marks);
	free(rp->events);
	free(rp->periods);
	free(rp->windows);
	rp->windows = NULL;
	rp->periods = NULL;
	rp->slots = NULL;
	rp->cells = NULL;
	rp->marks = NULL;
	rp->events = NULL;
	rp->event_count = 0;
	rp->bucket_count = 0;
}

void report_summary_clear(struct report_summary *sum)
{
	assert(sum != NULL);
	memset(sum, 0, sizeof *sum);
	sum->first_t_ms = REPORT_T_NONE;
	sum->last_t_ms = REPORT_T_NONE;
	for (size_t i = 0; i < FG_SECTIONS_MAX; i++)
		sum->first_alarm_t_ms[i] = REPORT_T_NONE;
	for (size_t i = 0; i < FG_ALARMS_MAX; i++)
		sum->above_setpoint_s[i] = NAN;
}

size_t report_bucket_count(const struct report *rp)
{
	assert(rp != NULL);
	return rp->bucket_count;
}

int64_t report_bucket_width_ms(const struct report *rp)
{
	assert(rp != NULL);
	return rp->width_ms;
}

/* ------------------------------------------------------------ the grid */

static struct report_slot slot_merge(struct report_slot a, struct report_slot b)
{
	if (a.row_count == 0)
		return b;
	if (b.row_count == 0)
		return a;
	struct report_slot r = a;
	r.t_last_ms = b.t_last_ms;
	r.gap_inside_ms = a.gap_inside_ms;
	if (b.gap_inside_ms > r.gap_inside_ms)
		r.gap_inside_ms = b.gap_inside_ms;
	if (b.gap_before_ms > r.gap_inside_ms)
		r.gap_inside_ms = b.gap_before_ms;
	r.row_count = a.row_count + b.row_count;
	return r;
}

static struct report_cell cell_merge(struct report_cell a, struct report_cell b)
{
	struct report_cell r;
	if (a.finite_count == 0) {
		r = b;
	} else if (b.finite_count == 0) {
		r = a;
	} else {
		r.first = a.first;
		r.last = b.last;
		r.min = a.min < b.min ? a.min : b.min;
		r.max = a.max > b.max ? a.max : b.max;
	}
	r.finite_count = a.finite_count + b.finite_count;
	r.nan_count = a.nan_count + b.nan_count;
	return r;
}

static struct report_mark mark_merge(struct report_mark a, struct report_mark b)
{
	struct report_mark r = a;
	if (b.quality > r.quality)
		r.quality = b.quality;
	r.extrapolated = (uint8_t)(a.extrapolated | b.extrapolated);
	return r;
}

/* Halves the number of buckets: j takes 2j and 2j+1, the width doubles. */
static void grid_merge(struct report *rp)
{
	assert(rp->width_ms <= INT64_MAX / 2);
	const size_t half = REPORT_BUCKETS_MAX / 2;
	const unsigned nsec = rp->layout.section_count;
	for (size_t j = 0; j < half; j++)
		rp->slots[j] = slot_merge(rp->slots[2 * j], rp->slots[2 * j + 1]);
	memset(&rp->slots[half], 0, half * sizeof *rp->slots);
	for (unsigned k = 0; k < nsec; k++) {
		/* bucket j is written after 2j and 2j+1 are read (j <= 2j) */
		for (size_t j = 0; j < half; j++)
			for (unsigned s = 0; s < REPORT_SERIES_COUNT; s++)
				rp->cells[cell_at(k, s, j)] = cell_merge(rp->cells[cell_at(k, s, 2 * j)],
									 rp->cells[cell_at(k, s, 2 * j + 1)]);
		memset(&rp->cells[cell_at(k, 0, half)], 0,
		       half * REPORT_SERIES_COUNT * sizeof *rp->cells);
		struct report_mark *m = &rp->marks[mark_at(k, 0)];
		for (size_t j = 0; j < half; j++)
			m[j] = mark_merge(m[2 * j], m[2 * j + 1]);
		memset(&m[half], 0, half * sizeof *m);
	}
	rp->width_ms *= 2;
	rp->width_shift++;
	rp->bucket_count = (rp->bucket_count + 1) / 2;
}

/* Bucket of time t (merging as needed); times before the origin go to 0. */
static size_t grid_bucket(struct report *rp, int64_t t_ms)
{
	assert(rp->started);
	if (t_ms < rp->origin_ms)
		return 0;
	const uint64_t off = (uint64_t)t_ms - (uint64_t)rp->origin_ms;
	while (off >> rp->width_shift >= REPORT_BUCKETS_MAX)
		grid_merge(rp);
	const size_t b = (size_t)(off >> rp->width_shift);
	if (b + 1 > rp->bucket_count)
		rp->bucket_count = b + 1;
	return b;
}

static unsigned dt_bin(int64_t dt_ms)
{
	assert(dt_ms > 0);
	const double x = floor(8.0 * log2((double)dt_ms));
	if (x <= 0)
		return 0;
	if (x >= REPORT_DT_BINS - 1)
		return REPORT_DT_BINS - 1;
	return (unsigned)x;
}

int64_t report_typical_period_ms(const struct report *rp)
{
	assert(rp != NULL);
	uint64_t total = 0;
	for (unsigned i = 0; i < REPORT_DT_BINS; i++)
		total += rp->dt_hist[i];
	if (total == 0)
		return 0;
	uint64_t seen = 0;
	unsigned i = 0;
	for (; i < REPORT_DT_BINS; i++) {
		seen += rp->dt_hist[i];
		if (2 * seen >= total)
			break;
	}
	assert(i < REPORT_DT_BINS);
	/* Every interval in bin i lies between its min and max, and the bin
	 * spans a factor 2^(1/8), so the middle is within 9 % of the median. */
	const int64_t lo = rp->dt_bin_min_ms[i], hi = rp->dt_bin_max_ms[i];
	return lo + (hi - lo) / 2;
}

static void cell_add(struct report_cell *c, double v)
{
	if (!isfinite(v)) {
		c->nan_count++;
		return;
	}
	if (c->finite_count == 0) {
		c->first = v;
		c->min = v;
		c->max = v;
	} else {
		if (v < c->min)
			c->min = v;
		if (v > c->max)
			c->max = v;
	}
	c->last = v;
	c->finite_count++;
}

static void slot_add(struct report *rp, size_t b, int64_t t_ms)
{
	struct report_slot *sl = &rp->slots[b];
	const int64_t dt = rp->prev_row_ms == REPORT_T_NONE ? 0 : t_ms - rp->prev_row_ms;
	if (sl->row_count == 0) {
		sl->t_first_ms = t_ms;
		sl->gap_before_ms = dt;
	} else if (dt > sl->gap_inside_ms) {
		sl->gap_inside_ms = dt;
	}
	sl->t_last_ms = t_ms;
	sl->row_count++;
	if (dt > 0) {
		if (dt != rp->last_dt_ms) { /* steps are nearly always the same length */
			rp->last_dt_bin = dt_bin(dt);
			rp->last_dt_ms = dt;
		}
		const unsigned bin = rp->last_dt_bin;
		if (rp->dt_hist[bin] == 0 || dt < rp->dt_bin_min_ms[bin])
			rp->dt_bin_min_ms[bin] = dt;
		if (rp->dt_hist[bin] == 0 || dt > rp->dt_bin_max_ms[bin])
			rp->dt_bin_max_ms[bin] = dt;
		rp->dt_hist[bin]++;
	}
}

int report_set_window(struct report *rp, unsigned k, const struct report_window *w)
{
	assert(rp != NULL);
	assert(w != NULL);
	if (k >= rp->layout.section_count || rp->windows == NULL)
		return -EINVAL;
	rp->windows[k] = *w;
	rp->windows[k].set = true;
	return 0;
}

int report_add_row(struct report *rp, int64_t t_ms, const struct section_result *results)
{
	return report_add_row_loads(rp, t_ms, results, NULL);
}

int report_add_row_loads(struct report *rp, int64_t t_ms, const struct section_result *results,
			 const double *loads)
{
	assert(results != NULL);
	const struct section_result *at[FG_SECTIONS_MAX];
	for (unsigned k = 0; k < rp->layout.section_count; k++)
		at[k] = &results[k];
	return report_add_row_at(rp, t_ms, at, loads);
}

int report_add_row_at(struct report *rp, int64_t t_ms, const struct section_result *const *results,
		      const double *loads)
{
	assert(rp != NULL);
	assert(rp->slots != NULL);
	assert(results != NULL);
	if (rp->prev_row_ms != REPORT_T_NONE && t_ms < rp->prev_row_ms)
		return -EINVAL;
	if (!rp->started) {
		rp->origin_ms = t_ms;
		rp->started = true;
	}
	const size_t b = grid_bucket(rp, t_ms);
	slot_add(rp, b, t_ms);
	for (unsigned k = 0; k < rp->layout.section_count; k++) {
		const struct section_result *r = results[k];
		/* the series with a field, then the load point's two; the
		 * others the section does not have (never drawn) */
		for (unsigned i = 0; i < rp->field_series_count[k]; i++) {
			const unsigned char *sf = rp->field_series[k][i];
			cell_add(&rp->cells[cell_at(k, sf[0], b)], r->v[sf[1]]);
		}
		if (loads != NULL) {
			cell_add(&rp->cells[cell_at(k, REPORT_SERIES_LOAD_Y, b)], loads[2 * k]);
			cell_add(&rp->cells[cell_at(k, REPORT_SERIES_LOAD_X, b)], loads[2 * k + 1]);
		}
		struct report_mark *m = &rp->marks[mark_at(k, b)];
		if ((uint8_t)r->quality > m->quality)
			m->quality = (uint8_t)r->quality;
		if (r->quality == FG_QUALITY_BAD)
			rp->sec_rows_bad[k]++;
		else if (r->quality == FG_QUALITY_UNCERTAIN)
			rp->sec_rows_uncertain[k]++;
		if (r->extrap.count > 0) {
			m->extrapolated = 1;
			rp->sec_rows_extrap[k]++;
		}
	}
	rp->prev_row_ms = t_ms;
	if (rp->t_min_ms == REPORT_T_NONE)
		rp->t_min_ms = t_ms;
	rp->t_max_ms = t_ms;
	rp->row_count++;
	return 0;
}

/* Joins the two neighbouring closed periods with the shortest gap between
 * them, to make room for one more. */
static void periods_join_closest(struct report *rp, unsigned k, unsigned p)
{
	struct report_period *pr = periods_of(rp, k, p);
	unsigned *n = &rp->period_count[k][p];
	assert(*n == REPORT_PERIODS_MAX);
	unsigned best = 0;
	for (unsigned i = 1; i + 1 < *n; i++)
		if (pr[i + 1].start_ms - pr[i].end_ms < pr[best + 1].start_ms - pr[best].end_ms)
			best = i;
	pr[best].end_ms = pr[best + 1].end_ms;
	memmove(&pr[best + 1], &pr[best + 2], (*n - best - 2) * sizeof *pr);
	(*n)--;
	rp->periods_joined++;
}

static void period_open(struct report *rp, unsigned k, unsigned p, int64_t t_ms)
{
	if (rp->period_count[k][p] == REPORT_PERIODS_MAX)
		periods_join_closest(rp, k, p);
	struct report_period *pr = periods_of(rp, k, p);
	pr[rp->period_count[k][p]++] = (struct report_period){t_ms, INT64_MAX};
}

static void period_close(struct report *rp, unsigned k, unsigned p, int64_t t_ms)
{
	const unsigned n = rp->period_count[k][p];
	assert(n > 0);
	struct report_period *last = &periods_of(rp, k, p)[n - 1];
	assert(last->end_ms == INT64_MAX);
	last->end_ms = t_ms < last->start_ms ? last->start_ms : t_ms;
}

int report_add_event(struct report *rp, int64_t t_ms, int alarm_index, const char *state,
		     double value)
{
	assert(rp != NULL);
	assert(rp->events != NULL);
	assert(state != NULL);
	assert(alarm_index >= 0);
	assert((unsigned)alarm_index < rp->layout.alarm_count);
	if (state_lookup(state) < 0)
		return -EINVAL;
	if (rp->event_count < REPORT_EVENTS_MAX) {
		struct report_event *e = &rp->events[rp->event_count++];
		e->t_ms = t_ms;
		e->alarm_index = alarm_index;
		snprintf(e->state, sizeof e->state, "%s", state);
		e->value = value;
	} else {
		rp->events_dropped++;
	}
	const bool active = state_is_active(state);
	if (active != rp->alarm_active[alarm_index]) {
		const unsigned k = (unsigned)rp->layout.alarms[alarm_index].section_index;
		const unsigned p = rp->alarm_shade[alarm_index];
		unsigned *n = &rp->active_count[k][p];
		assert(active || *n > 0);
		*n = active ? *n + 1 : *n - 1;
		if (active && *n == 1)
			period_open(rp, k, p, t_ms);
		else if (!active && *n == 0)
			period_close(rp, k, p, t_ms);
		rp->alarm_active[alarm_index] = active;
	}
	return 0;
}
