/*
 * report_svg.c - the inline SVG charts of the replay report page: for each
 * section, three trend charts (approach to flooding, pressure drop, liquid
 * holdup) with their value and time axes, alarm setpoint lines and
 * alarm-active shading, and the quality strip under the last chart.
 * report_html.c writes the page around them; the text and number output
 * helpers both files use live there (report_int.h).
 *
 * Drawing. A line is broken, never interpolated, where the interval before a
 * bucket (or inside it) exceeds 3x the typical period, or where a bucket
 * holds a NAN: such a bucket is drawn on its own, unconnected. The quality
 * strip is runs of buckets with the same state.
 *
 * Output is deterministic, like the rest of the page: fixed-precision
 * numbers from our own formatter (no locale), times from the data only.
 */
#include <assert.h>
#include <inttypes.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include "report_int.h"
#include "timefmt.h"

/* ---------------------------------------------------------------- helpers */

/* Level alarms compare the field itself with the setpoint, so their
 * setpoint is a value on the field's axis and gets a line. A rate alarm's
 * setpoint is per minute and a deviation alarm's a difference: neither is a
 * level on the chart. */
static bool kind_is_level(const char *kind)
{
	assert(kind != NULL);
	return strcmp(kind, "high") == 0 || strcmp(kind, "high-high") == 0 ||
	       strcmp(kind, "low") == 0;
}

/* True when alarm al draws a setpoint line on series s of section k. */
static bool alarm_on_series(const struct report *rp, const struct report_alarm *al, unsigned k,
			    unsigned s)
{
	assert(al != NULL);
	assert(s < REPORT_SERIES_COUNT);
	const int fld = rp->series_field[k][s];
	return (unsigned)al->section_index == k && fld >= 0 && al->field == fld &&
	       isfinite(al->setpoint) && kind_is_level(al->kind);
}

/* ------------------------------------------------------------- time */

static int64_t floor_div(int64_t a, int64_t b)
{
	assert(b > 0);
	int64_t q = a / b;
	if (a % b != 0 && a < 0)
		q--;
	return q;
}

/* ------------------------------------------------------------- charts */

/* Chart geometry in SVG user units; every chart of the page has the same
 * width and plot edges, so the charts of a panel line up in time. */
#define VIEW_W 1160
#define PLOT_X0 72.0
#define PLOT_X1 1146.0
#define HEAD_H 24.0
#define STRIP_H 12.0
#define EXTRAP_H 4.0
#define AXIS_H 34.0
#define CHAR_W 6.2

/* Where a chart's axis unit comes from. */
enum chart_unit {
	CHART_UNIT_FIXED,               /* y_title as written */
	CHART_UNIT_DP,                  /* the DP tag's unit (values converted from Pa) */
	CHART_UNIT_LOAD_Y,              /* the gas flow tag's unit */
	CHART_UNIT_LOAD_X,              /* the liquid flow (or level) tag's unit */
};

struct chart {
	const char *title;
	const char *y_title;            /* axis title with its unit (CHART_UNIT_FIXED) */
	unsigned series[2];
	unsigned series_count;
	double hi_at_least;             /* the y range always reaches this */
	double plot_h;
	double clamp_hi;                /* > 0: the axis is 0..clamp_hi whatever the data;
					 * values beyond are drawn at the edge and marked */
	enum chart_unit unit;
	bool overflow_line;             /* draw the section's overflow height */
};

static const struct chart chart_load_y = {
	"Gas load", NULL, {REPORT_SERIES_LOAD_Y, 0}, 1, 0.0, 80.0, 0.0, CHART_UNIT_LOAD_Y, false};
static const struct chart chart_load_x = {
	"Liquid load", NULL, {REPORT_SERIES_LOAD_X, 0}, 1, 0.0, 80.0, 0.0, CHART_UNIT_LOAD_X, false};
static const struct chart chart_flood = {
	"Approach to flooding", "flood, %", {REPORT_SERIES_FLOOD_INDEX, REPORT_SERIES_FLOOD_PCT}, 2,
	100.0, 200.0, 150.0, CHART_UNIT_FIXED, false};
static const struct chart chart_dp = {
	"Pressure drop: measured against model", NULL, {REPORT_SERIES_DP, REPORT_SERIES_DP_MODEL},
	2, 0.0, 150.0, 0.0, CHART_UNIT_DP, false};
static const struct chart chart_holdup = {
	"Liquid holdup", "holdup, m\xc2\xb3/m\xc2\xb3", {REPORT_SERIES_HOLDUP, 0}, 1, 0.0, 110.0,
	0.0, CHART_UNIT_FIXED, false};
static const struct chart chart_weep = {
	"Weep margin: hole velocity over the weep-point velocity", "weep_pct, %",
	{REPORT_SERIES_WEEP, 0}, 1, 150.0, 130.0, 0.0, CHART_UNIT_FIXED, false};
static const struct chart chart_carryover = {
	"Carry-over: mass fraction of the droplets carried out", "carried over, -",
	{REPORT_SERIES_CARRYOVER, 0}, 1, 0.0, 110.0, 0.0, CHART_UNIT_FIXED, false};
static const struct chart chart_gas_holdup = {
	"Gas holdup: from the taps against the correlation", "gas holdup, -",
	{REPORT_SERIES_GAS_HOLDUP_DP, REPORT_SERIES_GAS_HOLDUP}, 2, 0.0, 130.0, 0.0,
	CHART_UNIT_FIXED, false};
static const struct chart chart_level = {
	"Expanded level against the overflow", "level, m", {REPORT_SERIES_EXPANDED_LEVEL, 0}, 1,
	0.0, 130.0, 0.0, CHART_UNIT_FIXED, true};

/* The per-type chart hook: the trend charts of a section type, top to
 * bottom (the last one carries the quality strip and the time labels). A new
 * section type adds its row here, and its series to enum report_series. */
struct type_charts {
	const char *type;               /* report_section.type; NULL: any other type */
	const struct chart *charts[8];
	unsigned count;
	bool own_charts;                /* has charts of its own: skip an empty DP chart */
};

/* The own charts of the high-holdup types; their series take the fields
 * report.c's type table gives them (REPORT_SERIES_TYPE_A..C). */
static const struct chart chart_pb_holdup = {
	"Gas holdup per free volume: taps against correlation", "holdup, -",
	{REPORT_SERIES_TYPE_A, REPORT_SERIES_TYPE_B}, 2, 0.0, 110.0, 0.0, CHART_UNIT_FIXED, false};
static const struct chart chart_pb_level = {
	"Expanded level", "level, m", {REPORT_SERIES_TYPE_C, 0}, 1, 0.0, 110.0, 0.0,
	CHART_UNIT_FIXED, true};
static const struct chart chart_st_power = {
	"Gassed power ratio: measured against model", "Pg/P0, -",
	{REPORT_SERIES_TYPE_A, REPORT_SERIES_TYPE_B}, 2, 1.0, 110.0, 0.0, CHART_UNIT_FIXED, false};
static const struct chart chart_st_flow = {
	"Gas flow number", "Fl_G, -", {REPORT_SERIES_TYPE_C, 0}, 1, 0.0, 110.0, 0.0,
	CHART_UNIT_FIXED, false};
static const struct chart chart_lp_holdup = {
	"Riser and downcomer gas holdup", "holdup, -", {REPORT_SERIES_TYPE_A, REPORT_SERIES_TYPE_B},
	2, 0.0, 110.0, 0.0, CHART_UNIT_FIXED, false};
static const struct chart chart_lp_velocity = {
	"Liquid circulation velocity", "velocity, m/s", {REPORT_SERIES_TYPE_C, 0}, 1, 0.0, 110.0,
	0.0, CHART_UNIT_FIXED, false};

static const struct type_charts type_charts[] = {
	{"tray", {&chart_load_y, &chart_load_x, &chart_flood, &chart_dp, &chart_weep,
		  &chart_holdup}, 6, false},
	{"packed", {&chart_load_y, &chart_load_x, &chart_flood, &chart_dp, &chart_holdup}, 5, false},
	{"spray", {&chart_load_y, &chart_load_x, &chart_flood, &chart_carryover}, 4, false},
	{"bubble", {&chart_load_y, &chart_load_x, &chart_flood, &chart_gas_holdup, &chart_level},
	 5, false},
	{"packed-bubble", {&chart_load_y, &chart_load_x, &chart_flood, &chart_dp, &chart_pb_holdup,
			   &chart_pb_level, &chart_holdup}, 7, true},
	{"stirred", {&chart_load_y, &chart_load_x, &chart_flood, &chart_dp, &chart_st_power,
		     &chart_st_flow, &chart_holdup}, 7, true},
	{"loop", {&chart_load_y, &chart_load_x, &chart_flood, &chart_dp, &chart_lp_holdup,
		  &chart_lp_velocity, &chart_holdup}, 7, true},
	{NULL, {&chart_load_y, &chart_load_x, &chart_flood, &chart_dp, &chart_holdup}, 5, false},
};

static const struct type_charts *charts_of(const char *type)
{
	size_t i = 0;
	while (type_charts[i].type != NULL && strcmp(type_charts[i].type, type) != 0)
		i++;
	return &type_charts[i];
}

bool report_svg_type_shows(const char *type, int field)
{
	const struct type_charts *tc = charts_of(type);
	for (unsigned c = 0; c < tc->count; c++)
		for (unsigned i = 0; i < tc->charts[c]->series_count; i++)
			if (report_type_series_field(type, tc->charts[c]->series[i]) == field)
				return true;
	return false;
}

static const char *const series_label[REPORT_SERIES_COUNT] = {
	"flood_index", "flood_pct", "dp (measured)", "dp_model (model)",
	"liquid_holdup_frac", "gas flow", "liquid flow", "weep_pct", "carryover_frac",
	"gas_holdup_frac (correlation)", "gas_holdup_dp_frac (taps)", "expanded_level_m",
	"", "", "", /* the type series: label_of() names their field */
	"", "", "", "", /* and so for the alarm series */
};

/* The legend name of series s in section k: a type series is its field. */
static const char *label_of(const struct report *rp, unsigned k, unsigned s)
{
	const int fld = rp->series_field[k][s];
	if (s >= REPORT_SERIES_TYPE_A)
		return fld >= 0 ? result_fields[fld].name : "";
	return series_label[s];
}

static double frame_x(const struct report_svg_frame *fr, int64_t t_ms)
{
	const double u = (double)(t_ms - fr->t0_ms) / (double)(fr->t1_ms - fr->t0_ms);
	const double x = PLOT_X0 + u * (PLOT_X1 - PLOT_X0);
	return x < PLOT_X0 ? PLOT_X0 : x > PLOT_X1 ? PLOT_X1 : x;
}

/* y of a value in the axis's unit. Values beyond the axis are drawn at its
 * edge (the chart marks them). */
static double frame_y_axis(const struct report_svg_frame *fr, double v)
{
	const double u = (v - fr->lo) / (fr->hi - fr->lo);
	const double y = fr->y_bot - u * (fr->y_bot - fr->y_top);
	return y < fr->y_top ? fr->y_top : y > fr->y_bot ? fr->y_bot : y;
}

/* y of a stored value (SI, or the load's tag unit), converted by the scale. */
static double frame_y(const struct report_svg_frame *fr, double v)
{
	return frame_y_axis(fr, v * fr->scale);
}

static void put_xy(FILE *f, double x, double y)
{
	report_html_put_fixed(f, x, 1);
	fputc(',', f);
	report_html_put_fixed(f, y, 1);
}

/* A 1-2-5 step giving about five intervals over lo..hi, and lo, hi widened
 * to whole steps (common practice for chart axes). */
static void nice_range(double *lo, double *hi, double *step, int *decimals)
{
	assert(*hi > *lo);
	const double raw = (*hi - *lo) / 5.0;
	const double mag = pow(10.0, floor(log10(raw)));
	const double norm = raw / mag;
	const double s = (norm <= 1.0 ? 1.0 : norm <= 2.0 ? 2.0 : norm <= 5.0 ? 5.0 : 10.0) * mag;
	*lo = floor(*lo / s + 1e-9) * s;
	*hi = ceil(*hi / s - 1e-9) * s;
	*step = s;
	const int d = -(int)floor(log10(s) + 1e-9);
	*decimals = d < 0 ? 0 : d > 6 ? 6 : d;
}

/* The value range of one chart: its data, its setpoints, 0 and hi_at_least.
 * Returns false when the chart has no finite value at all. */
static bool chart_range(const struct report *rp, unsigned k, const struct chart *c,
			struct report_svg_frame *fr)
{
	double lo = 0.0, hi = c->hi_at_least;
	bool any = false;
	const double sc = fr->scale;
	for (unsigned i = 0; i < c->series_count; i++) {
		const unsigned s = c->series[i];
		for (size_t b = 0; b < rp->bucket_count; b++) {
			const struct report_cell *cl = &rp->cells[cell_at(k, s, b)];
			if (cl->finite_count == 0)
				continue;
			any = true;
			lo = cl->min * sc < lo ? cl->min * sc : lo;
			hi = cl->max * sc > hi ? cl->max * sc : hi;
		}
		for (unsigned a = 0; a < rp->layout.alarm_count; a++) {
			const struct report_alarm *al = &rp->layout.alarms[a];
			if (!alarm_on_series(rp, al, k, s))
				continue;
			lo = al->setpoint * sc < lo ? al->setpoint * sc : lo;
			hi = al->setpoint * sc > hi ? al->setpoint * sc : hi;
		}
	}
	const double ovf = rp->layout.sections[k].overflow_m;
	if (c->overflow_line && ovf > 0.0 && ovf > hi)
		hi = ovf;
	if (c->clamp_hi > 0.0) {
		fr->lo = 0.0;
		fr->hi = c->clamp_hi;
		fr->step = c->clamp_hi / 6.0;
		fr->decimals = 0;
		return any;
	}
	if (!(hi > lo))
		hi = lo + 1.0;
	fr->lo = lo;
	fr->hi = hi;
	nice_range(&fr->lo, &fr->hi, &fr->step, &fr->decimals);
	return any;
}

static void put_span(FILE *f, const struct report_svg_frame *fr, int64_t a_ms, int64_t b_ms,
		     double y, double h, const char *attr)
{
	double xa = frame_x(fr, a_ms), xb = frame_x(fr, b_ms);
	if (xb - xa < 1.5) {    /* a single sample still shows as a sliver */
		xb = xa + 1.5 > PLOT_X1 ? PLOT_X1 : xa + 1.5;
		xa = xb - 1.5;
	}
	fputs("<rect x=\"", f);
	report_html_put_fixed(f, xa, 1);
	fputs("\" y=\"", f);
	report_html_put_fixed(f, y, 1);
	fputs("\" width=\"", f);
	report_html_put_fixed(f, xb - xa, 1);
	fputs("\" height=\"", f);
	report_html_put_fixed(f, h, 1);
	fprintf(f, "\" %s/>\n", attr);
}

/* Alarm-active periods of section k, in priority order so that the more
 * urgent colour lies on top. An open period runs to the end of the data. */
static void write_shading(FILE *f, const struct report *rp, const struct report_svg_frame *fr,
			  unsigned k)
{
	char attr[64];
	for (unsigned p = 0; p < SHADE_KINDS; p++) {
		const struct report_period *pr = periods_of(rp, k, p);
		snprintf(attr, sizeof attr, "fill=\"%s\"", report_html_shade_css[p]);
		for (unsigned i = 0; i < rp->period_count[k][p]; i++) {
			const int64_t end = pr[i].end_ms == INT64_MAX ? fr->t1_ms : pr[i].end_ms;
			if (end < fr->t0_ms || pr[i].start_ms > fr->t1_ms)
				continue;
			put_span(f, fr, pr[i].start_ms, end, fr->y_top, fr->y_bot - fr->y_top,
				 attr);
		}
	}
}

/* Runs of equal state over the buckets with rows. A bucket's extent reaches
 * the next bucket with rows unless a data gap lies between them. state()
 * returns -1 for "draw nothing". */
static void write_runs(FILE *f, const struct report *rp, const struct report_svg_frame *fr,
		       unsigned k, int (*state)(const struct report_mark *), double y, double h,
		       const char *cls_prefix)
{
	char attr[32];
	int run = -1;
	int64_t run_a = 0, run_b = 0;
	size_t b = 0;
	while (b < rp->bucket_count && rp->slots[b].row_count == 0)
		b++;
	while (b < rp->bucket_count) {
		size_t n = b + 1;
		while (n < rp->bucket_count && rp->slots[n].row_count == 0)
			n++;
		const struct report_slot *sl = &rp->slots[b];
		const bool joined =
			n < rp->bucket_count && rp->slots[n].gap_before_ms <= fr->gap_ms;
		const int64_t a_ms = sl->t_first_ms;
		const int64_t e_ms = joined ? rp->slots[n].t_first_ms : sl->t_last_ms;
		const int st = state(&rp->marks[mark_at(k, b)]);
		if (st != run || a_ms != run_b) {
			if (run >= 0) {
				snprintf(attr, sizeof attr, "class=\"%s%d\"", cls_prefix, run);
				put_span(f, fr, run_a, run_b, y, h, attr);
			}
			run = st;
			run_a = a_ms;
		}
		run_b = e_ms;
		b = n;
	}
	if (run >= 0) {
		snprintf(attr, sizeof attr, "class=\"%s%d\"", cls_prefix, run);
		put_span(f, fr, run_a, run_b, y, h, attr);
	}
}

static int quality_state(const struct report_mark *m)
{
	return m->quality;
}

static int extrap_state(const struct report_mark *m)
{
	return m->extrapolated ? 0 : -1;
}

/* One series of section k as a path broken at gaps and missing values. Each
 * bucket contributes its first, min, max and last value, consecutive
 * duplicates after rounding left out. */
static void write_series(FILE *f, const struct report *rp, const struct report_svg_frame *fr,
			 unsigned k, unsigned s)
{
	char prev[48] = "", cur[48];
	bool pen = false;
	fprintf(f, "<path class=\"s%u\" d=\"", s);
	for (size_t b = 0; b < rp->bucket_count; b++) {
		const struct report_slot *sl = &rp->slots[b];
		const struct report_cell *c = &rp->cells[cell_at(k, s, b)];
		if (sl->row_count == 0)
			continue;
		if (c->finite_count == 0) {
			pen = false;
			continue;
		}
		const bool isolated = c->nan_count > 0 || sl->gap_inside_ms > fr->gap_ms;
		const bool connect = pen && !isolated && sl->gap_before_ms <= fr->gap_ms;
		const int64_t tm = sl->t_first_ms + (sl->t_last_ms - sl->t_first_ms) / 2;
		const int64_t pt_t[4] = {sl->t_first_ms, tm, tm, sl->t_last_ms};
		const double pt_v[4] = {c->first, c->min, c->max, c->last};
		unsigned written = 0;
		if (!connect)
			prev[0] = '\0';
		for (unsigned i = 0; i < 4; i++) {
			/* "x,y" put together by hand (no printf: a report prints
			 * some 90 000 of these) */
			int nx = report_format_fixed(frame_x(fr, pt_t[i]), 1, cur, 24);
			if (nx < 0)
				nx = 0;
			cur[nx] = ',';
			if (report_format_fixed(frame_y(fr, pt_v[i]), 1, cur + nx + 1, 24) < 0)
				cur[nx + 1] = '\0';
			if (strcmp(cur, prev) == 0)
				continue;
			fputc((i == 0 && !connect) ? 'M' : 'L', f);
			fputs(cur, f);
			memcpy(prev, cur, sizeof prev);
			written++;
		}
		if (!connect && written == 1)
			fputs("h0", f); /* a lone sample: round caps draw it as a dot */
		pen = !isolated;
	}
	fputs("\"/>\n", f);
}

/* Tick step for the time axis: the smallest step from a list of round
 * durations that gives at most eight intervals over the span. */
static int64_t time_step_ms(int64_t span_ms)
{
	static const int64_t steps[] = {
		1000, 2000, 5000, 10000, 15000, 30000, 60000, 120000, 300000, 600000, 900000,
		1800000, 3600000, 7200000, 10800000, 21600000, 43200000, 86400000, 172800000,
		604800000, 1209600000, 2419200000, 7862400000, 31449600000,
	};
	const size_t n = sizeof steps / sizeof steps[0];
	for (size_t i = 0; i < n; i++)
		if (span_ms / steps[i] <= 8)
			return steps[i];
	return steps[n - 1] * (span_ms / steps[n - 1] / 8 + 1);
}

/* Vertical grid lines at the time ticks; on the bottom chart also their
 * labels: time of day (with seconds for short steps), and the date under
 * the first tick and wherever the date changes. */
static void write_time_axis(FILE *f, const struct report_svg_frame *fr, bool labels, double label_y)
{
	const int64_t step = time_step_ms(fr->t1_ms - fr->t0_ms);
	char prev_date[48] = "";
	int64_t t = floor_div(fr->t0_ms, step) * step;
	if (t < fr->t0_ms)
		t += step;
	for (unsigned i = 0; i < 64 && t <= fr->t1_ms; i++, t += step) {
		const double x = frame_x(fr, t);
		fputs("<line class=\"grid\" x1=\"", f);
		report_html_put_fixed(f, x, 1);
		fputs("\" x2=\"", f);
		report_html_put_fixed(f, x, 1);
		fputs("\" y1=\"", f);
		report_html_put_fixed(f, fr->y_top, 1);
		fputs("\" y2=\"", f);
		report_html_put_fixed(f, fr->y_bot, 1);
		fputs("\"/>\n", f);
		if (!labels)
			continue;
		char iso[TIMEFMT_BUF_SIZE];
		if (timefmt_format(t, iso, sizeof iso) < 0)
			continue;
		char *tee = strchr(iso, 'T');
		if (tee == NULL)
			continue;
		*tee = '\0';
		const char *clock = tee + 1;
		const int clock_len = step < 60000 ? 8 : 5; /* HH:MM:SS or HH:MM */
		/* a label at the left edge starts there, clear of "UTC" */
		const char *anchor = x - 30.0 < PLOT_X0 ? "start" : "middle";
		fprintf(f, "<text text-anchor=\"%s\" x=\"", anchor);
		report_html_put_fixed(f, x, 1);
		fputs("\" y=\"", f);
		report_html_put_fixed(f, label_y, 1);
		if (step >= 86400000)
			fprintf(f, "\">%s</text>\n", iso);
		else
			fprintf(f, "\">%.*s</text>\n", clock_len, clock);
		if (step < 86400000 && strcmp(iso, prev_date) != 0) {
			fprintf(f, "<text text-anchor=\"%s\" x=\"", anchor);
			report_html_put_fixed(f, x, 1);
			fputs("\" y=\"", f);
			report_html_put_fixed(f, label_y + 13.0, 1);
			fprintf(f, "\">%s</text>\n", iso);
			snprintf(prev_date, sizeof prev_date, "%s", iso);
		}
	}
}

/* A horizontal line across the plot at y, of CSS class cls, and a newline. */
static void put_hline(FILE *f, const char *cls, double y)
{
	fprintf(f, "<line class=\"%s\" x1=\"", cls);
	report_html_put_fixed(f, PLOT_X0, 1);
	fputs("\" x2=\"", f);
	report_html_put_fixed(f, PLOT_X1, 1);
	fputs("\" y1=\"", f);
	report_html_put_fixed(f, y, 1);
	fputs("\" y2=\"", f);
	report_html_put_fixed(f, y, 1);
	fputs("\"/>\n", f);
}

static void write_value_axis(FILE *f, const struct report_svg_frame *fr, const char *y_title)
{
	for (unsigned i = 0; i <= 20; i++) {
		const double v = fr->lo + (double)i * fr->step;
		if (v > fr->hi + fr->step * 1e-6)
			break;
		const double y = frame_y_axis(fr, v);
		put_hline(f, "grid", y);
		fputs("<text text-anchor=\"end\" x=\"", f);
		report_html_put_fixed(f, PLOT_X0 - 6.0, 1);
		fputs("\" y=\"", f);
		report_html_put_fixed(f, y + 3.5, 1);
		fputs("\">", f);
		report_html_put_fixed(f, v, fr->decimals);
		fputs("</text>\n", f);
	}
	fputs("<text text-anchor=\"middle\" transform=\"translate(14,", f);
	report_html_put_fixed(f, (fr->y_top + fr->y_bot) / 2.0, 1);
	fprintf(f, ") rotate(-90)\">%s</text>\n", y_title);
}

/* Dashed line and label for every alarm of section k watching a field this
 * chart draws. Labels sit at the right end, above the line; a label that
 * would overlap an earlier one moves left past it. */
static unsigned write_setpoints(FILE *f, const struct report *rp, const struct report_svg_frame *fr,
				unsigned k, const struct chart *c)
{
	double used_y[FG_ALARMS_MAX], used_left[FG_ALARMS_MAX];
	unsigned used = 0;
	for (unsigned a = 0; a < rp->layout.alarm_count; a++) {
		const struct report_alarm *al = &rp->layout.alarms[a];
		bool mine = false;
		for (unsigned i = 0; i < c->series_count; i++)
			mine = mine || alarm_on_series(rp, al, k, c->series[i]);
		if (!mine)
			continue;
		const double y = frame_y(fr, al->setpoint);
		/* in the chart's unit: a DP setpoint on an mbar axis reads in mbar */
		const double sp = al->setpoint * fr->scale;
		char val[40];
		report_format_fixed(sp, report_html_auto_decimals(sp), val, sizeof val);
		const double w = CHAR_W * (double)(strlen(al->name) + strlen(val) + 6 +
						   strlen(report_html_alarm_field_name(al->field)));
		double right = PLOT_X1 - 4.0;
		for (unsigned u = 0; u < used; u++)
			if (fabs(used_y[u] - y) < 12.0 && used_left[u] - 10.0 < right)
				right = used_left[u] - 10.0;
		put_hline(f, "sp", y);
		fputs("<text class=\"spl\" text-anchor=\"end\" x=\"", f);
		report_html_put_fixed(f, right, 1);
		fputs("\" y=\"", f);
		report_html_put_fixed(f, y - 4.0 < fr->y_top + 10.0 ? y + 12.0 : y - 4.0, 1);
		fputs("\">", f);
		report_html_put_escaped(f, al->name);
		const struct report_section *sec = &rp->layout.sections[k];
		const char *unit = c->unit == CHART_UNIT_DP && fr->scale != 1.0 ? sec->dp_unit
										 : result_fields[al->field].unit;
		fprintf(f, ": %s %s%s%s</text>\n", report_html_alarm_field_name(al->field), val,
			strcmp(unit, "-") == 0 ? "" : " ", strcmp(unit, "-") == 0 ? "" : unit);
		used_y[used] = y;
		used_left[used] = right - w;
		used++;
	}
	return used;
}

static bool series_has_values(const struct report *rp, unsigned k, unsigned s)
{
	for (size_t b = 0; b < rp->bucket_count; b++)
		if (rp->cells[cell_at(k, s, b)].finite_count > 0)
			return true;
	return false;
}

/* Title and legend above the plot; a series without any value says so. */
static void write_chart_head(FILE *f, const struct report *rp, unsigned k, const struct chart *c,
			     bool setpoints)
{
	const char *t = c->unit == CHART_UNIT_LOAD_X &&
				strcmp(rp->layout.sections[k].load_x_what, "level") == 0
			? "Liquid level"
			: c->title;
	fprintf(f, "<text class=\"ttl\" x=\"%d\" y=\"16\">%s</text>\n", (int)PLOT_X0, t);
	double x = PLOT_X0 + CHAR_W * 1.15 * (double)strlen(t) + 28.0;
	for (unsigned i = 0; i < c->series_count; i++) {
		const unsigned s = c->series[i];
		fprintf(f, "<path class=\"s%u\" d=\"M", s);
		put_xy(f, x, 12.0);
		fputs("h20\"/>\n<text x=\"", f);
		report_html_put_fixed(f, x + 25.0, 1);
		const bool has = series_has_values(rp, k, s);
		const char *lab = s == REPORT_SERIES_LOAD_Y   ? rp->layout.sections[k].load_y_tag
				  : s == REPORT_SERIES_LOAD_X ? rp->layout.sections[k].load_x_tag
							      : label_of(rp, k, s);
		if (lab[0] == '\0')
			lab = series_label[s];
		fputs("\" y=\"16\">", f);
		report_html_put_escaped(f, lab);
		fprintf(f, "%s</text>\n", has ? "" : ": no values");
		x += 25.0 + CHAR_W * (double)(strlen(lab) + (has ? 0 : 11)) + 18.0;
	}
	if (setpoints) {
		fputs("<path class=\"sp\" d=\"M", f);
		put_xy(f, x, 12.0);
		fputs("h20\"/>\n<text x=\"", f);
		report_html_put_fixed(f, x + 25.0, 1);
		fputs("\" y=\"16\">alarm setpoint</text>\n", f);
	}
}

static bool chart_has_setpoints(const struct report *rp, unsigned k, const struct chart *c)
{
	for (unsigned a = 0; a < rp->layout.alarm_count; a++) {
		const struct report_alarm *al = &rp->layout.alarms[a];
		for (unsigned i = 0; i < c->series_count; i++)
			if (alarm_on_series(rp, al, k, c->series[i]))
				return true;
	}
	return false;
}

/* A labelled vertical line at every --event inside the span; the label at
 * the top of the plot, right of the line (left of it near the right edge),
 * and staggered down a line when it would run into the previous label. */
void report_svg_write_markers(FILE *f, const struct report *rp,
			      const struct report_svg_frame *fr)
{
	double prev_end = -1e9;
	int row = 0;
	for (unsigned i = 0; i < rp->layout.marker_count; i++) {
		const struct report_marker *m = &rp->layout.markers[i];
		if (m->t_ms < fr->t0_ms || m->t_ms > fr->t1_ms)
			continue;
		const double x = frame_x(fr, m->t_ms);
		fputs("<line class=\"ev\" x1=\"", f);
		report_html_put_fixed(f, x, 1);
		fputs("\" x2=\"", f);
		report_html_put_fixed(f, x, 1);
		fputs("\" y1=\"", f);
		report_html_put_fixed(f, fr->y_top, 1);
		fputs("\" y2=\"", f);
		report_html_put_fixed(f, fr->y_bot, 1);
		fputs("\"/>\n", f);
		char text[FG_NAME_MAX + 16];
		snprintf(text, sizeof text, "%u%s%s", i + 1, m->label[0] ? " " : "", m->label);
		const double w = CHAR_W * (double)strlen(text);
		const bool left = x + 4.0 + w > PLOT_X1;
		const double x0 = left ? x - 4.0 - w : x + 4.0;
		row = x0 < prev_end + 4.0 ? (row + 1) % 3 : 0;
		prev_end = x0 + w;
		fprintf(f, "<text class=\"evl\" text-anchor=\"%s\" x=\"", left ? "end" : "start");
		report_html_put_fixed(f, left ? x - 4.0 : x + 4.0, 1);
		fputs("\" y=\"", f);
		report_html_put_fixed(f, fr->y_top + 12.0 + 12.0 * row, 1);
		fputs("\">", f);
		report_html_put_escaped(f, text);
		fputs("</text>\n", f);
	}
}

/* The axis title and the unit the script's read-out shows. */
static void axis_title(const struct report *rp, unsigned k, const struct chart *c, char *title,
		       size_t title_size, char *unit, size_t unit_size)
{
	const struct report_section *sec = &rp->layout.sections[k];
	switch (c->unit) {
	case CHART_UNIT_DP: {
		const char *u = sec->dp_unit[0] && sec->dp_pa_per_unit > 0.0 ? sec->dp_unit : "Pa";
		snprintf(title, title_size, "DP, %s", u);
		snprintf(unit, unit_size, "%s", u);
		break;
	}
	case CHART_UNIT_LOAD_Y:
		snprintf(title, title_size, "gas, %s", sec->load_y_unit);
		snprintf(unit, unit_size, "%s", sec->load_y_unit);
		break;
	case CHART_UNIT_LOAD_X:
		snprintf(title, title_size, "%s, %s",
			 strcmp(sec->load_x_what, "level") == 0 ? "level" : "liquid",
			 sec->load_x_unit);
		snprintf(unit, unit_size, "%s", sec->load_x_unit);
		break;
	default: {
		snprintf(title, title_size, "%s", c->y_title);
		const char *comma = strrchr(c->y_title, ',');
		snprintf(unit, unit_size, "%s", comma ? comma + 2 : "");
	}
	}
}

/* Values beyond a fixed axis: a red bar along the edge they passed, over each
 * run of buckets whose extreme lies beyond it, and the extreme written once. */
static void write_beyond_side(FILE *f, const struct report *rp, const struct report_svg_frame *fr,
			      unsigned k, const struct chart *c, bool above)
{
	double ext = above ? -INFINITY : INFINITY;
	int64_t run_a = 0, run_b = 0;
	bool in_run = false;
	const double bar_y = above ? fr->y_top - 4.0 : fr->y_bot;
	for (size_t b = 0; b <= rp->bucket_count; b++) {
		bool over = false;
		if (b < rp->bucket_count && rp->slots[b].row_count > 0)
			for (unsigned i = 0; i < c->series_count; i++) {
				const struct report_cell *cl = &rp->cells[cell_at(k, c->series[i], b)];
				if (cl->finite_count == 0)
					continue;
				const double v = (above ? cl->max : cl->min) * fr->scale;
				if (above ? v > fr->hi : v < fr->lo) {
					over = true;
					ext = above ? fmax(ext, v) : fmin(ext, v);
				}
			}
		if (over && !in_run)
			run_a = rp->slots[b].t_first_ms;
		if (over)
			run_b = rp->slots[b].t_last_ms;
		if (!over && in_run)
			put_span(f, fr, run_a, run_b, bar_y, 4.0, "class=\"over\"");
		in_run = over;
	}
	if (!isfinite(ext))
		return;
	fputs("<text class=\"overl\" x=\"", f);
	report_html_put_fixed(f, PLOT_X0 + 4.0, 1);
	fputs("\" y=\"", f);
	report_html_put_fixed(f, above ? fr->y_top + 11.0 : fr->y_bot - 4.0, 1);
	fputs(above ? "\">\xe2\x96\xb2 above the axis (red bar on top), up to "
		    : "\">\xe2\x96\xbc below the axis (red bar at the bottom), down to ", f);
	report_html_put_fixed(f, ext, report_html_auto_decimals(ext));
	fputs("</text>\n", f);
}

static void write_beyond(FILE *f, const struct report *rp, const struct report_svg_frame *fr,
			 unsigned k, const struct chart *c)
{
	write_beyond_side(f, rp, fr, k, c, true);
	write_beyond_side(f, rp, fr, k, c, false);
}

static void write_overflow(FILE *f, const struct report *rp, const struct report_svg_frame *fr,
			   unsigned k)
{
	const double ovf = rp->layout.sections[k].overflow_m;
	if (!(ovf > 0.0))
		return;
	const double y = frame_y(fr, ovf);
	put_hline(f, "ref", y);
	fputs("<text class=\"refl\" text-anchor=\"end\" x=\"", f);
	report_html_put_fixed(f, PLOT_X1 - 4.0, 1);
	fputs("\" y=\"", f);
	report_html_put_fixed(f, y - 4.0 < fr->y_top + 10.0 ? y + 12.0 : y - 4.0, 1);
	fputs("\">overflow height ", f);
	report_html_put_fixed(f, ovf, report_html_auto_decimals(ovf));
	fputs(" m</text>\n", f);
}

static void write_chart(FILE *f, const struct report *rp, struct report_svg_frame *fr, unsigned k,
			const struct chart *c, bool bottom)
{
	const struct report_section *sec = &rp->layout.sections[k];
	fr->scale = c->unit == CHART_UNIT_DP && sec->dp_pa_per_unit > 0.0
			    ? 1.0 / sec->dp_pa_per_unit
			    : 1.0;
	fr->y_top = HEAD_H + 4.0;
	fr->y_bot = fr->y_top + c->plot_h;
	const bool any = chart_range(rp, k, c, fr);
	double h = fr->y_bot + 10.0;
	if (bottom)
		h = fr->y_bot + 6.0 + EXTRAP_H + STRIP_H + AXIS_H;
	char title[FG_NAME_MAX + 40], unit[REPORT_WORD_MAX + 8];
	axis_title(rp, k, c, title, sizeof title, unit, sizeof unit);
	fprintf(f, "<svg class=\"chart\" xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 %d ",
		VIEW_W);
	report_html_put_fixed(f, h, 0);
	/* What the inline script needs for the read-out: the plot box and the
	 * time and value it spans. */
	fprintf(f, "\" data-t0=\"%" PRId64 "\" data-t1=\"%" PRId64 "\" data-x0=\"%g\" "
		   "data-x1=\"%g\" data-yt=\"%g\" data-yb=\"%g\" data-lo=\"%g\" data-hi=\"%g\" "
		   "data-unit=\"", fr->t0_ms, fr->t1_ms, PLOT_X0, PLOT_X1, fr->y_top, fr->y_bot,
		fr->lo, fr->hi);
	report_html_put_escaped(f, unit);
	fprintf(f, "\" role=\"img\" aria-label=\"%s\">\n", c->title);
	write_chart_head(f, rp, k, c, chart_has_setpoints(rp, k, c));
	write_shading(f, rp, fr, k);
	write_value_axis(f, fr, title);
	write_time_axis(f, fr, false, 0.0);
	write_setpoints(f, rp, fr, k, c);
	/* Last series first, so the primary one (flood_index, measured DP)
	 * lies on top where the two overlap. */
	for (unsigned i = c->series_count; i-- > 0;)
		write_series(f, rp, fr, k, c->series[i]);
	report_svg_write_markers(f, rp, fr);
	if (!any)
		fprintf(f, "<text class=\"nodata\" text-anchor=\"middle\" x=\"%d\" y=\"%d\">"
			   "no values for this section</text>\n",
			(int)((PLOT_X0 + PLOT_X1) / 2), (int)((fr->y_top + fr->y_bot) / 2));
	fputs("<rect class=\"axis\" x=\"", f);
	report_html_put_fixed(f, PLOT_X0, 1);
	fputs("\" y=\"", f);
	report_html_put_fixed(f, fr->y_top, 1);
	fputs("\" width=\"", f);
	report_html_put_fixed(f, PLOT_X1 - PLOT_X0, 1);
	fputs("\" height=\"", f);
	report_html_put_fixed(f, c->plot_h, 1);
	fputs("\"/>\n", f);
	if (c->clamp_hi > 0.0)
		write_beyond(f, rp, fr, k, c);
	if (c->overflow_line)
		write_overflow(f, rp, fr, k);
	if (bottom) {
		const double ye = fr->y_bot + 6.0, yq = ye + EXTRAP_H;
		put_span(f, fr, fr->t0_ms, fr->t1_ms, yq, STRIP_H, "class=\"qn\"");
		write_runs(f, rp, fr, k, quality_state, yq, STRIP_H, "q");
		write_runs(f, rp, fr, k, extrap_state, ye, EXTRAP_H - 1.0, "qx");
		fputs("<text text-anchor=\"end\" x=\"", f);
		report_html_put_fixed(f, PLOT_X0 - 6.0, 1);
		fputs("\" y=\"", f);
		report_html_put_fixed(f, yq + 9.5, 1);
		fputs("\">quality</text>\n", f);
		write_time_axis(f, fr, true, yq + STRIP_H + 13.0);
		fputs("<text text-anchor=\"end\" x=\"", f);
		report_html_put_fixed(f, PLOT_X0 - 6.0, 1);
		fputs("\" y=\"", f);
		report_html_put_fixed(f, yq + STRIP_H + 13.0, 1);
		fputs("\">UTC</text>\n", f);
	}
	fputs("</svg>\n", f);
}

void report_svg_write_charts(FILE *f, const struct report *rp, struct report_svg_frame *fr,
			     unsigned k)
{
	assert(fr != NULL);
	assert(k < rp->layout.section_count);
	const struct type_charts *tc = charts_of(rp->layout.sections[k].type);
	/* A type with charts of its own and no dp signal (every loop, most
	 * stirred vessels) skips the empty DP chart. */
	const bool own = tc->own_charts && !series_has_values(rp, k, REPORT_SERIES_DP);
	/* Nor an empty liquid-load chart: batch liquid with no level tag (every
	 * loop, a stirred vessel without one). */
	const bool no_load_x =
		tc->own_charts && !series_has_values(rp, k, REPORT_SERIES_LOAD_X);
	unsigned extra = 0;
	while (extra < REPORT_ALARM_SERIES && rp->series_field[k][REPORT_SERIES_ALARM0 + extra] >= 0)
		extra++;
	for (unsigned c = 0; c < tc->count; c++)
		if (!(own && tc->charts[c] == &chart_dp) &&
		    !(no_load_x && tc->charts[c] == &chart_load_x))
			write_chart(f, rp, fr, k, tc->charts[c], c + 1 == tc->count && extra == 0);
	/* a field an alarm watches that the type's charts do not show */
	for (unsigned j = 0; j < extra; j++) {
		const int fld = rp->series_field[k][REPORT_SERIES_ALARM0 + j];
		char title[FG_NAME_MAX + 40], y_title[FG_NAME_MAX + 24];
		snprintf(title, sizeof title, "Watched by an alarm: %s", result_fields[fld].name);
		snprintf(y_title, sizeof y_title, "%s, %s", result_fields[fld].name,
			 result_fields[fld].unit);
		const struct chart c = {title, y_title, {REPORT_SERIES_ALARM0 + j, 0}, 1, 0.0,
					110.0, 0.0, CHART_UNIT_FIXED, false};
		write_chart(f, rp, fr, k, &c, j + 1 == extra);
	}
}
