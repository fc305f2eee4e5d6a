/*
 * report_html.c - the replay report page: one self-contained HTML file with
 * inline SVG charts, written from what report.c collected.
 *
 * Drawing. A line is broken, never interpolated, where the interval before a
 * bucket (or inside it) exceeds 3x the typical period, or where a bucket
 * holds a NAN: such a bucket is drawn on its own, unconnected. The quality
 * strip is runs of buckets with the same state.
 *
 * Output is deterministic: fixed-precision numbers from our own formatter
 * (no locale), times from the data only, nothing from the clock or from
 * addresses.
 */
#include "report.h"

#include <assert.h>
#include <errno.h>
#include <inttypes.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include <unistd.h>

#include "report_int.h"
#include "timefmt.h"

/* Shading colour per priority (and "other"), translucent so that overlapping
 * periods of two priorities both show. The same string serves the SVG fill
 * and the HTML swatches, so the legend matches the charts exactly. */
static const char *const shade_css[SHADE_KINDS] = {
	"rgba(110,160,215,0.30)", "rgba(235,195,40,0.35)", "rgba(240,130,40,0.35)",
	"rgba(215,45,45,0.32)", "rgba(140,140,140,0.30)",
};

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

static bool kind_is_rate(const char *kind)
{
	assert(kind != NULL);
	return strcmp(kind, "rate") == 0;
}

/* True when alarm al draws a setpoint line on series s of section k. */
static bool alarm_on_series(const struct report_alarm *al, unsigned k, unsigned s)
{
	assert(al != NULL);
	assert(s < REPORT_SERIES_COUNT);
	return (unsigned)al->section_index == k && al->field == report_series_field[s] &&
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

/* -------------------------------------------------------- number format */

int report_format_fixed(double v, int decimals, char *buf, size_t buf_size)
{
	static const int64_t pow10_i[] = {1, 10, 100, 1000, 10000, 100000, 1000000,
					  10000000, 100000000, 1000000000};
	assert(buf != NULL);
	assert(buf_size > 0);
	assert(decimals >= 0 && decimals <= 9);
	int n;
	if (!isfinite(v)) {
		n = snprintf(buf, buf_size, "-");
	} else if (fabs(v) >= 9e15) {
		n = snprintf(buf, buf_size, "%s", v < 0 ? "<-9e15" : ">9e15");
	} else {
		/* Drop decimals until the scaled value fits an int64 exactly. */
		while (decimals > 0 && fabs(v) * (double)pow10_i[decimals] >= 9e15)
			decimals--;
		const int64_t scale = pow10_i[decimals];
		const long long q = llround(fabs(v) * (double)scale);
		const char *sign = (v < 0 && q != 0) ? "-" : "";
		if (decimals == 0)
			n = snprintf(buf, buf_size, "%s%lld", sign, q);
		else
			n = snprintf(buf, buf_size, "%s%lld.%0*lld", sign, q / scale, decimals,
				     q % scale);
	}
	if (n < 0 || (size_t)n >= buf_size) {
		buf[0] = '\0';
		return -ENOSPC;
	}
	return n;
}

/* Decimals that show a plant value to about three significant figures. */
static int auto_decimals(double v)
{
	const double a = fabs(v);
	if (!isfinite(a) || a >= 1000)
		return 0;
	if (a >= 10)
		return 1;
	if (a >= 1)
		return 2;
	return 4;
}

/* ------------------------------------------------------------ HTML output */

static void put_escaped(FILE *f, const char *s)
{
	assert(f != NULL);
	assert(s != NULL);
	for (; *s != '\0'; s++) {
		const unsigned char c = (unsigned char)*s;
		switch (c) {
		case '&': fputs("&amp;", f); break;
		case '<': fputs("&lt;", f); break;
		case '>': fputs("&gt;", f); break;
		case '"': fputs("&quot;", f); break;
		case '\'': fputs("&#39;", f); break;
		default:
			/* Control characters have no place in a name; show them
			 * as a visible replacement rather than raw bytes. */
			if (c < 0x20 || c == 0x7f)
				fputs("&#xFFFD;", f);
			else
				fputc(c, f);
		}
	}
}

static void put_fixed(FILE *f, double v, int decimals)
{
	char b[40];
	report_format_fixed(v, decimals, b, sizeof b);
	fputs(b, f);
}

static void put_time(FILE *f, int64_t t_ms)
{
	char b[TIMEFMT_BUF_SIZE];
	if (t_ms == REPORT_T_NONE)
		fputs("-", f);
	else if (timefmt_format(t_ms, b, sizeof b) < 0)
		fputs("(out of range)", f);
	else
		fputs(b, f);
}

/* A value an alarm compares, with the unit of its field; per minute for a
 * rate alarm. A diagnostic alarm's value has no unit we know. */
static void put_value(FILE *f, double v, const struct report_alarm *a)
{
	put_fixed(f, v, auto_decimals(v));
	if (!isfinite(v) || a->field < 0)
		return;
	const char *unit = result_fields[a->field].unit;
	if (kind_is_rate(a->kind))
		fprintf(f, " %s/min", strcmp(unit, "-") == 0 ? "1" : unit);
	else if (strcmp(unit, "-") != 0)
		fprintf(f, " %s", unit);
}

/* Duration as "1 d 02 h 03 min 04 s" (leading zero units left out). */
static void put_duration(FILE *f, int64_t ms)
{
	if (ms < 0)
		ms = 0;
	const int64_t s = ms / 1000;
	const int64_t d = s / 86400, h = s / 3600 % 24, m = s / 60 % 60, sec = s % 60;
	if (d > 0)
		fprintf(f, "%" PRId64 " d %02" PRId64 " h %02" PRId64 " min", d, h, m);
	else if (h > 0)
		fprintf(f, "%" PRId64 " h %02" PRId64 " min %02" PRId64 " s", h, m, sec);
	else if (m > 0)
		fprintf(f, "%" PRId64 " min %02" PRId64 " s", m, sec);
	else
		fprintf(f, "%" PRId64 ".%03" PRId64 " s", sec, ms % 1000);
}

static const char page_css[] =
	"*{box-sizing:border-box}\n"
	"body{margin:0;background:#f4f2ee;color:#1d2327;"
	"font:14px/1.4 system-ui,-apple-system,'Segoe UI',Roboto,'DejaVu Sans',sans-serif;"
	"-webkit-print-color-adjust:exact;print-color-adjust:exact}\n"
	"main{max-width:1220px;margin:0 auto;padding:20px 24px 40px}\n"
	"header.top{border-bottom:3px solid #2c5d63;padding-bottom:10px;margin-bottom:14px}\n"
	"header.top h1{margin:0 0 4px;font-size:22px;font-weight:650;color:#24454a}\n"
	"header.top .meta{color:#4b5358;font-size:13px}\n"
	"header.top .meta b{color:#1d2327;font-weight:600}\n"
	".caution{border:1px solid #b8860b;border-left:6px solid #b8860b;background:#fff8e6;"
	"padding:8px 12px;margin:0 0 16px;font-size:13px}\n"
	".caution strong{color:#7a5200}\n"
	"h2{font-size:17px;margin:22px 0 8px;color:#24454a}\n"
	"h2 small{font-weight:400;color:#5d666b;font-size:13px;margin-left:8px}\n"
	".cols{display:flex;flex-wrap:wrap;gap:16px;align-items:flex-start}\n"
	"table{border-collapse:collapse;background:#fff;font-size:12.5px}\n"
	"th,td{border:1px solid #d5d1c8;padding:3px 8px;text-align:left;vertical-align:top}\n"
	"th{background:#e7ece9;font-weight:600}\n"
	"td.n{text-align:right;font-variant-numeric:tabular-nums}\n"
	"table.kv th{width:12em}\n"
	".panel{background:#fff;border:1px solid #d5d1c8;border-radius:4px;padding:6px 8px 4px;"
	"margin:0 0 18px;break-inside:avoid;page-break-inside:avoid}\n"
	".panel h3{margin:2px 4px 2px;font-size:15px;color:#1d2327}\n"
	".panel .facts{margin:0 4px 4px;font-size:12px;color:#4b5358}\n"
	"svg.chart{display:block;width:100%;height:auto}\n"
	".legend{font-size:12px;margin:0 0 12px;color:#3b4246}\n"
	".legend span.i{display:inline-block;margin-right:14px;white-space:nowrap}\n"
	".sw{display:inline-block;width:22px;height:10px;vertical-align:middle;margin-right:4px;"
	"border:1px solid #9aa}\n"
	".ln{display:inline-block;width:22px;height:0;vertical-align:middle;margin-right:4px;"
	"border-top:3px solid}\n"
	".st{font-weight:600}\n"
	".st-UNACK{color:#a3231b}.st-ACKED{color:#a35f00}.st-RTNUN{color:#2d5f9a}"
	".st-NORM{color:#2f6b35}\n"
	"footer{margin-top:24px;font-size:11px;color:#6b7378}\n"
	/* SVG classes: lines, shading, strip, axes. */
	"svg text{font-family:inherit;font-size:11px;fill:#3b4246}\n"
	"svg .ttl{font-size:12.5px;font-weight:600;fill:#1d2327}\n"
	"svg .grid{stroke:#e3e0d9;stroke-width:1}\n"
	"svg .axis{stroke:#8d948f;stroke-width:1;fill:none}\n"
	"svg .s0,svg .s1,svg .s2,svg .s3,svg .s4{fill:none;stroke-width:1.6;"
	"stroke-linejoin:round;stroke-linecap:round}\n"
	"svg .s0{stroke:#1b4f9c}svg .s1{stroke:#e0761b}svg .s2{stroke:#0d8a80}"
	"svg .s3{stroke:#8e3fb0}svg .s4{stroke:#3c8d2f}\n"
	"svg .sp{stroke:#c0392b;stroke-width:1.2;stroke-dasharray:7 4;fill:none}\n"
	"svg .spl{fill:#a5281c;font-size:10.5px;paint-order:stroke;stroke:#fff;stroke-width:3px}\n"
	"svg .q0{fill:#cfe6cf}svg .q1{fill:#f2c14e}svg .q2{fill:#4a4a4a}"
	"svg .qx0{fill:#8e3fb0}svg .qn{fill:#fff;stroke:#c9c5bc}\n"
	"svg .nodata{font-size:12px;fill:#8d948f}\n"
	"@media print{body{background:#fff}main{max-width:none;padding:0}"
	".panel{border-color:#bbb}a{color:inherit}}\n";

static const char caution_text[] =
	"<strong>Advisory only.</strong> floodgauge is an advisory monitor. It is not a safety "
	"system and must never be used as one. Each correlation has a validity range; results "
	"computed outside it are flagged as extrapolated (the violet marks in the quality strip "
	"below each section's charts). Local codes, site procedures and the judgement of licensed "
	"engineers govern every operating decision.";

static void write_head(FILE *f, const struct report *rp, const struct report_summary *sum)
{
	fputs("<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n", f);
	fputs("<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n", f);
	fputs("<title>Replay report - ", f);
	put_escaped(f, rp->layout.plant);
	fputs("</title>\n<style>\n", f);
	fputs(page_css, f);
	fputs("</style>\n</head>\n<body>\n<main>\n<header class=\"top\">\n<h1>Replay report: ", f);
	put_escaped(f, rp->layout.plant);
	fputs("</h1>\n<div class=\"meta\">Data file <b>", f);
	put_escaped(f, rp->layout.data_file);
	fputs("</b> &middot; from <b>", f);
	put_time(f, sum->first_t_ms);
	fputs("</b> to <b>", f);
	put_time(f, sum->last_t_ms);
	fputs("</b>", f);
	if (sum->first_t_ms != REPORT_T_NONE && sum->last_t_ms != REPORT_T_NONE) {
		fputs(" (", f);
		put_duration(f, sum->last_t_ms - sum->first_t_ms);
		fputs(")", f);
	}
	fputs(" &middot; all times UTC</div>\n</header>\n", f);
	fprintf(f, "<p class=\"caution\">%s</p>\n", caution_text);
}

static void write_summary_data(FILE *f, const struct report *rp, const struct report_summary *sum)
{
	fputs("<table class=\"kv\">\n<tr><th colspan=\"2\">Data</th></tr>\n", f);
	fprintf(f, "<tr><td>Rows read</td><td class=\"n\">%" PRIu64 "</td></tr>\n", sum->rows_read);
	fprintf(f, "<tr><td>Skipped, malformed</td><td class=\"n\">%" PRIu64 "</td></tr>\n",
		sum->rows_malformed);
	fprintf(f, "<tr><td>Skipped, out of order</td><td class=\"n\">%" PRIu64 "</td></tr>\n",
		sum->rows_unsorted);
	fprintf(f, "<tr><td>Skipped, duplicate time</td><td class=\"n\">%" PRIu64 "</td></tr>\n",
		sum->rows_duplicate);
	fputs("<tr><td>First row</td><td class=\"n\">", f);
	put_time(f, sum->first_t_ms);
	fputs("</td></tr>\n<tr><td>Last row</td><td class=\"n\">", f);
	put_time(f, sum->last_t_ms);
	fputs("</td></tr>\n<tr><td>Typical sample period</td><td class=\"n\">", f);
	put_duration(f, report_typical_period_ms(rp));
	fputs("</td></tr>\n<tr><td>Chart resolution</td><td class=\"n\">", f);
	fprintf(f, "%zu buckets of ", rp->bucket_count);
	put_duration(f, rp->width_ms);
	fputs("</td></tr>\n</table>\n", f);

	fputs("<table class=\"kv\">\n<tr><th colspan=\"2\">Alarms raised</th></tr>\n", f);
	uint64_t total = 0;
	for (int p = 0; p < REPORT_PRIORITY_COUNT; p++) {
		fprintf(f, "<tr><td><span class=\"sw\" style=\"background:%s\"></span>%s</td>"
			   "<td class=\"n\">%" PRIu64 "</td></tr>\n",
			shade_css[p], report_priority_names[p], sum->raised[p]);
		total += sum->raised[p];
	}
	fprintf(f, "<tr><td>total</td><td class=\"n\">%" PRIu64 "</td></tr>\n</table>\n", total);
}

static void write_summary_sections(FILE *f, const struct report *rp,
				   const struct report_summary *sum)
{
	fputs("<table>\n<tr><th>Section</th><th>Type</th><th>First alarm</th>"
	      "<th>Rows bad</th><th>Rows uncertain</th><th>Rows extrapolated</th></tr>\n", f);
	for (unsigned k = 0; k < rp->layout.section_count; k++) {
		fputs("<tr><td>", f);
		put_escaped(f, rp->layout.sections[k].name);
		fputs("</td><td>", f);
		put_escaped(f, rp->layout.sections[k].type);
		fputs("</td><td class=\"n\">", f);
		put_time(f, sum->first_alarm_t_ms[k]);
		fprintf(f, "</td><td class=\"n\">%" PRIu64 "</td><td class=\"n\">%" PRIu64
			   "</td><td class=\"n\">%" PRIu64 "</td></tr>\n",
			rp->sec_rows_bad[k], rp->sec_rows_uncertain[k], rp->sec_rows_extrap[k]);
	}
	fputs("</table>\n", f);
}

static const char *alarm_field_name(int field)
{
	return field < 0 ? "quality" : result_fields[field].name;
}

static void write_summary_alarms(FILE *f, const struct report *rp,
				 const struct report_summary *sum)
{
	if (rp->layout.alarm_count == 0) {
		fputs("<p>No alarms are configured.</p>\n", f);
		return;
	}
	fputs("<table>\n<tr><th>Alarm</th><th>Section</th><th>Watches</th><th>Kind</th>"
	      "<th>Priority</th><th>Setpoint</th><th>Time beyond setpoint</th></tr>\n", f);
	for (unsigned i = 0; i < rp->layout.alarm_count; i++) {
		const struct report_alarm *a = &rp->layout.alarms[i];
		fputs("<tr><td>", f);
		put_escaped(f, a->name);
		fputs("</td><td>", f);
		put_escaped(f, rp->layout.sections[a->section_index].name);
		fprintf(f, "</td><td>%s</td><td>", alarm_field_name(a->field));
		put_escaped(f, a->kind);
		fputs("</td><td>", f);
		put_escaped(f, a->priority);
		fputs("</td><td class=\"n\">", f);
		put_value(f, a->setpoint, a);
		fputs("</td><td class=\"n\">", f);
		if (isfinite(sum->above_setpoint_s[i])) {
			put_fixed(f, sum->above_setpoint_s[i], 1);
			fputs(" s", f);
		} else {
			fputs("-", f);
		}
		fputs("</td></tr>\n", f);
	}
	fputs("</table>\n", f);
}

static void write_legend(FILE *f)
{
	static const char *const lines[REPORT_SERIES_COUNT][2] = {
		{"#1b4f9c", "flood_index (fused indicator)"},
		{"#e0761b", "flood_pct (model)"},
		{"#0d8a80", "dp_pa (measured)"},
		{"#8e3fb0", "dp_model_pa (model)"},
		{"#3c8d2f", "liquid_holdup_frac"},
	};
	fputs("<div class=\"legend\">", f);
	for (unsigned s = 0; s < REPORT_SERIES_COUNT; s++)
		fprintf(f, "<span class=\"i\"><span class=\"ln\" style=\"border-color:%s\"></span>"
			   "%s</span>", lines[s][0], lines[s][1]);
	fputs("<span class=\"i\"><span class=\"ln\" style=\"border-top:2px dashed #c0392b\">"
	      "</span>alarm setpoint</span><br>\n", f);
	fputs("Shaded: alarm active (UNACK or ACKED), by priority ", f);
	for (int p = 0; p < SHADE_KINDS; p++)
		fprintf(f, "<span class=\"i\"><span class=\"sw\" style=\"background:%s\"></span>"
			   "%s</span>", shade_css[p],
			p < REPORT_PRIORITY_COUNT ? report_priority_names[p] : "other");
	fputs("<br>\n", f);
	fputs("Quality strip: "
	      "<span class=\"i\"><span class=\"sw\" style=\"background:#cfe6cf\"></span>good</span>"
	      "<span class=\"i\"><span class=\"sw\" style=\"background:#f2c14e\"></span>uncertain"
	      "</span>"
	      "<span class=\"i\"><span class=\"sw\" style=\"background:#4a4a4a\"></span>bad</span>"
	      "<span class=\"i\"><span class=\"sw\" style=\"background:#fff\"></span>no data</span>"
	      "<span class=\"i\"><span class=\"sw\" style=\"background:#8e3fb0\"></span>"
	      "extrapolated (thin mark above)</span><br>\n"
	      "Lines break at data gaps (more than 3&times; the typical sample period) and at "
	      "missing values; nothing is interpolated across them. Each line point is the first, "
	      "lowest, highest and last value of its time bucket, so short spikes stay visible."
	      "</div>\n", f);
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

struct chart {
	const char *title;
	const char *y_title;            /* axis title with its unit */
	unsigned series[2];
	unsigned series_count;
	double hi_at_least;             /* the y range always reaches this */
	double plot_h;
	bool bottom;                    /* carries the quality strip and the time labels */
};

static const struct chart charts[] = {
	{"Approach to flooding", "flood, %",
	 {REPORT_SERIES_FLOOD_INDEX, REPORT_SERIES_FLOOD_PCT}, 2, 100.0, 200.0, false},
	{"Pressure drop: measured against model", "DP, Pa",
	 {REPORT_SERIES_DP, REPORT_SERIES_DP_MODEL}, 2, 0.0, 150.0, false},
	{"Liquid holdup", "holdup, m\xc2\xb3/m\xc2\xb3", {REPORT_SERIES_HOLDUP, 0}, 1, 0.0, 110.0,
	 true},
};
#define CHART_COUNT (sizeof charts / sizeof charts[0])

static const char *const series_label[REPORT_SERIES_COUNT] = {
	"flood_index", "flood_pct", "dp_pa (measured)", "dp_model_pa (model)",
	"liquid_holdup_frac",
};

/* Where one chart draws: time span, plot box, value range, gap threshold. */
struct frame {
	int64_t t0_ms, t1_ms;
	double y_top, y_bot;
	double lo, hi, step;
	int decimals;                   /* of the y tick labels */
	int64_t gap_ms;                 /* intervals above this break the lines */
};

static double frame_x(const struct frame *fr, int64_t t_ms)
{
	const double u = (double)(t_ms - fr->t0_ms) / (double)(fr->t1_ms - fr->t0_ms);
	const double x = PLOT_X0 + u * (PLOT_X1 - PLOT_X0);
	return x < PLOT_X0 ? PLOT_X0 : x > PLOT_X1 ? PLOT_X1 : x;
}

static double frame_y(const struct frame *fr, double v)
{
	const double u = (v - fr->lo) / (fr->hi - fr->lo);
	return fr->y_bot - u * (fr->y_bot - fr->y_top);
}

static void put_xy(FILE *f, double x, double y)
{
	put_fixed(f, x, 1);
	fputc(',', f);
	put_fixed(f, y, 1);
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
			struct frame *fr)
{
	double lo = 0.0, hi = c->hi_at_least;
	bool any = false;
	for (unsigned i = 0; i < c->series_count; i++) {
		const unsigned s = c->series[i];
		for (size_t b = 0; b < rp->bucket_count; b++) {
			const struct report_cell *cl = &rp->cells[cell_at(k, s, b)];
			if (cl->finite_count == 0)
				continue;
			any = true;
			lo = cl->min < lo ? cl->min : lo;
			hi = cl->max > hi ? cl->max : hi;
		}
		for (unsigned a = 0; a < rp->layout.alarm_count; a++) {
			const struct report_alarm *al = &rp->layout.alarms[a];
			if (!alarm_on_series(al, k, s))
				continue;
			lo = al->setpoint < lo ? al->setpoint : lo;
			hi = al->setpoint > hi ? al->setpoint : hi;
		}
	}
	if (!(hi > lo))
		hi = lo + 1.0;
	fr->lo = lo;
	fr->hi = hi;
	nice_range(&fr->lo, &fr->hi, &fr->step, &fr->decimals);
	return any;
}

static void put_span(FILE *f, const struct frame *fr, int64_t a_ms, int64_t b_ms, double y,
		     double h, const char *attr)
{
	double xa = frame_x(fr, a_ms), xb = frame_x(fr, b_ms);
	if (xb - xa < 1.5) {    /* a single sample still shows as a sliver */
		xb = xa + 1.5 > PLOT_X1 ? PLOT_X1 : xa + 1.5;
		xa = xb - 1.5;
	}
	fputs("<rect x=\"", f);
	put_fixed(f, xa, 1);
	fputs("\" y=\"", f);
	put_fixed(f, y, 1);
	fputs("\" width=\"", f);
	put_fixed(f, xb - xa, 1);
	fputs("\" height=\"", f);
	put_fixed(f, h, 1);
	fprintf(f, "\" %s/>\n", attr);
}

/* Alarm-active periods of section k, in priority order so that the more
 * urgent colour lies on top. An open period runs to the end of the data. */
static void write_shading(FILE *f, const struct report *rp, const struct frame *fr, unsigned k)
{
	char attr[64];
	for (unsigned p = 0; p < SHADE_KINDS; p++) {
		const struct report_period *pr = periods_of(rp, k, p);
		snprintf(attr, sizeof attr, "fill=\"%s\"", shade_css[p]);
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
static void write_runs(FILE *f, const struct report *rp, const struct frame *fr, unsigned k,
		       int (*state)(const struct report_mark *), double y, double h,
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
static void write_series(FILE *f, const struct report *rp, const struct frame *fr, unsigned k,
			 unsigned s)
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
			char xs[24], ys[24];
			report_format_fixed(frame_x(fr, pt_t[i]), 1, xs, sizeof xs);
			report_format_fixed(frame_y(fr, pt_v[i]), 1, ys, sizeof ys);
			snprintf(cur, sizeof cur, "%s,%s", xs, ys);
			if (strcmp(cur, prev) == 0)
				continue;
			fprintf(f, "%s%s", (i == 0 && !connect) ? "M" : "L", cur);
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
static void write_time_axis(FILE *f, const struct frame *fr, bool labels, double label_y)
{
	const int64_t step = time_step_ms(fr->t1_ms - fr->t0_ms);
	char prev_date[48] = "";
	int64_t t = floor_div(fr->t0_ms, step) * step;
	if (t < fr->t0_ms)
		t += step;
	for (unsigned i = 0; i < 64 && t <= fr->t1_ms; i++, t += step) {
		const double x = frame_x(fr, t);
		fputs("<line class=\"grid\" x1=\"", f);
		put_fixed(f, x, 1);
		fputs("\" x2=\"", f);
		put_fixed(f, x, 1);
		fputs("\" y1=\"", f);
		put_fixed(f, fr->y_top, 1);
		fputs("\" y2=\"", f);
		put_fixed(f, fr->y_bot, 1);
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
		fputs("<text text-anchor=\"middle\" x=\"", f);
		put_fixed(f, x, 1);
		fputs("\" y=\"", f);
		put_fixed(f, label_y, 1);
		if (step >= 86400000)
			fprintf(f, "\">%s</text>\n", iso);
		else
			fprintf(f, "\">%.*s</text>\n", clock_len, clock);
		if (step < 86400000 && strcmp(iso, prev_date) != 0) {
			fputs("<text text-anchor=\"middle\" x=\"", f);
			put_fixed(f, x, 1);
			fputs("\" y=\"", f);
			put_fixed(f, label_y + 13.0, 1);
			fprintf(f, "\">%s</text>\n", iso);
			snprintf(prev_date, sizeof prev_date, "%s", iso);
		}
	}
}

static void write_value_axis(FILE *f, const struct frame *fr, const char *y_title)
{
	for (unsigned i = 0; i <= 20; i++) {
		const double v = fr->lo + (double)i * fr->step;
		if (v > fr->hi + fr->step * 1e-6)
			break;
		const double y = frame_y(fr, v);
		fputs("<line class=\"grid\" x1=\"", f);
		put_fixed(f, PLOT_X0, 1);
		fputs("\" x2=\"", f);
		put_fixed(f, PLOT_X1, 1);
		fputs("\" y1=\"", f);
		put_fixed(f, y, 1);
		fputs("\" y2=\"", f);
		put_fixed(f, y, 1);
		fputs("\"/>\n<text text-anchor=\"end\" x=\"", f);
		put_fixed(f, PLOT_X0 - 6.0, 1);
		fputs("\" y=\"", f);
		put_fixed(f, y + 3.5, 1);
		fputs("\">", f);
		put_fixed(f, v, fr->decimals);
		fputs("</text>\n", f);
	}
	fputs("<text text-anchor=\"middle\" transform=\"translate(14,", f);
	put_fixed(f, (fr->y_top + fr->y_bot) / 2.0, 1);
	fprintf(f, ") rotate(-90)\">%s</text>\n", y_title);
}

/* Dashed line and label for every alarm of section k watching a field this
 * chart draws. Labels sit at the right end, above the line; a label that
 * would overlap an earlier one moves left past it. */
static unsigned write_setpoints(FILE *f, const struct report *rp, const struct frame *fr,
				unsigned k, const struct chart *c)
{
	double used_y[FG_ALARMS_MAX], used_left[FG_ALARMS_MAX];
	unsigned used = 0;
	for (unsigned a = 0; a < rp->layout.alarm_count; a++) {
		const struct report_alarm *al = &rp->layout.alarms[a];
		bool mine = false;
		for (unsigned i = 0; i < c->series_count; i++)
			mine = mine || alarm_on_series(al, k, c->series[i]);
		if (!mine)
			continue;
		const double y = frame_y(fr, al->setpoint);
		char val[40];
		report_format_fixed(al->setpoint, auto_decimals(al->setpoint), val, sizeof val);
		const double w = CHAR_W * (double)(strlen(al->name) + strlen(val) +
						   strlen(alarm_field_name(al->field)) + 6);
		double right = PLOT_X1 - 4.0;
		for (unsigned u = 0; u < used; u++)
			if (fabs(used_y[u] - y) < 12.0 && used_left[u] - 10.0 < right)
				right = used_left[u] - 10.0;
		fputs("<line class=\"sp\" x1=\"", f);
		put_fixed(f, PLOT_X0, 1);
		fputs("\" x2=\"", f);
		put_fixed(f, PLOT_X1, 1);
		fputs("\" y1=\"", f);
		put_fixed(f, y, 1);
		fputs("\" y2=\"", f);
		put_fixed(f, y, 1);
		fputs("\"/>\n<text class=\"spl\" text-anchor=\"end\" x=\"", f);
		put_fixed(f, right, 1);
		fputs("\" y=\"", f);
		put_fixed(f, y - 4.0 < fr->y_top + 10.0 ? y + 12.0 : y - 4.0, 1);
		fputs("\">", f);
		put_escaped(f, al->name);
		const char *unit = result_fields[al->field].unit;
		fprintf(f, ": %s %s%s%s</text>\n", alarm_field_name(al->field), val,
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
	fprintf(f, "<text class=\"ttl\" x=\"%d\" y=\"16\">%s</text>\n", (int)PLOT_X0, c->title);
	double x = PLOT_X0 + CHAR_W * 1.15 * (double)strlen(c->title) + 28.0;
	for (unsigned i = 0; i < c->series_count; i++) {
		const unsigned s = c->series[i];
		fprintf(f, "<path class=\"s%u\" d=\"M", s);
		put_xy(f, x, 12.0);
		fputs("h20\"/>\n<text x=\"", f);
		put_fixed(f, x + 25.0, 1);
		const bool has = series_has_values(rp, k, s);
		fprintf(f, "\" y=\"16\">%s%s</text>\n", series_label[s], has ? "" : ": no values");
		x += 25.0 + CHAR_W * (double)(strlen(series_label[s]) + (has ? 0 : 11)) + 18.0;
	}
	if (setpoints) {
		fputs("<path class=\"sp\" d=\"M", f);
		put_xy(f, x, 12.0);
		fputs("h20\"/>\n<text x=\"", f);
		put_fixed(f, x + 25.0, 1);
		fputs("\" y=\"16\">alarm setpoint</text>\n", f);
	}
}

static bool chart_has_setpoints(const struct report *rp, unsigned k, const struct chart *c)
{
	for (unsigned a = 0; a < rp->layout.alarm_count; a++) {
		const struct report_alarm *al = &rp->layout.alarms[a];
		for (unsigned i = 0; i < c->series_count; i++)
			if (alarm_on_series(al, k, c->series[i]))
				return true;
	}
	return false;
}

static void write_chart(FILE *f, const struct report *rp, struct frame *fr, unsigned k,
			const struct chart *c)
{
	fr->y_top = HEAD_H + 4.0;
	fr->y_bot = fr->y_top + c->plot_h;
	const bool any = chart_range(rp, k, c, fr);
	double h = fr->y_bot + 10.0;
	if (c->bottom)
		h = fr->y_bot + 6.0 + EXTRAP_H + STRIP_H + AXIS_H;
	fprintf(f, "<svg class=\"chart\" xmlns=\"http://www.w3.org/2000/svg\" viewBox=\"0 0 %d ",
		VIEW_W);
	put_fixed(f, h, 0);
	fprintf(f, "\" role=\"img\" aria-label=\"%s\">\n", c->title);
	write_chart_head(f, rp, k, c, chart_has_setpoints(rp, k, c));
	write_shading(f, rp, fr, k);
	write_value_axis(f, fr, c->y_title);
	write_time_axis(f, fr, false, 0.0);
	write_setpoints(f, rp, fr, k, c);
	/* Last series first, so the primary one (flood_index, measured DP)
	 * lies on top where the two overlap. */
	for (unsigned i = c->series_count; i-- > 0;)
		write_series(f, rp, fr, k, c->series[i]);
	if (!any)
		fprintf(f, "<text class=\"nodata\" text-anchor=\"middle\" x=\"%d\" y=\"%d\">"
			   "no values for this section</text>\n",
			(int)((PLOT_X0 + PLOT_X1) / 2), (int)((fr->y_top + fr->y_bot) / 2));
	fputs("<rect class=\"axis\" x=\"", f);
	put_fixed(f, PLOT_X0, 1);
	fputs("\" y=\"", f);
	put_fixed(f, fr->y_top, 1);
	fputs("\" width=\"", f);
	put_fixed(f, PLOT_X1 - PLOT_X0, 1);
	fputs("\" height=\"", f);
	put_fixed(f, c->plot_h, 1);
	fputs("\"/>\n", f);
	if (c->bottom) {
		const double ye = fr->y_bot + 6.0, yq = ye + EXTRAP_H;
		put_span(f, fr, fr->t0_ms, fr->t1_ms, yq, STRIP_H, "class=\"qn\"");
		write_runs(f, rp, fr, k, quality_state, yq, STRIP_H, "q");
		write_runs(f, rp, fr, k, extrap_state, ye, EXTRAP_H - 1.0, "qx");
		fputs("<text text-anchor=\"end\" x=\"", f);
		put_fixed(f, PLOT_X0 - 6.0, 1);
		fputs("\" y=\"", f);
		put_fixed(f, yq + 9.5, 1);
		fputs("\">quality</text>\n", f);
		write_time_axis(f, fr, true, yq + STRIP_H + 13.0);
		fputs("<text text-anchor=\"end\" x=\"", f);
		put_fixed(f, PLOT_X0 - 6.0, 1);
		fputs("\" y=\"", f);
		put_fixed(f, yq + STRIP_H + 13.0, 1);
		fputs("\">UTC</text>\n", f);
	}
	fputs("</svg>\n", f);
}

static void write_section(FILE *f, const struct report *rp, const struct report_summary *sum,
			  unsigned k, struct frame *fr)
{
	const struct report_section *sec = &rp->layout.sections[k];
	fputs("<section class=\"panel\">\n<h3>", f);
	put_escaped(f, sec->name);
	fputs(" <small>(", f);
	put_escaped(f, sec->type);
	fputs(")</small></h3>\n<div class=\"facts\">First alarm: ", f);
	if (sum->first_alarm_t_ms[k] == REPORT_T_NONE)
		fputs("none", f);
	else
		put_time(f, sum->first_alarm_t_ms[k]);
	fprintf(f, " &middot; rows with bad quality: %" PRIu64 ", uncertain: %" PRIu64
		   ", extrapolated: %" PRIu64 "</div>\n",
		rp->sec_rows_bad[k], rp->sec_rows_uncertain[k], rp->sec_rows_extrap[k]);
	for (size_t c = 0; c < CHART_COUNT; c++)
		write_chart(f, rp, fr, k, &charts[c]);
	fputs("</section>\n", f);
}

static void write_events(FILE *f, const struct report *rp)
{
	const uint64_t total = rp->event_count + rp->events_dropped;
	fputs("<h2>Alarm events", f);
	fprintf(f, " <small>%" PRIu64 " in all", total);
	if (rp->events_dropped > 0)
		fprintf(f, "; the first %zu are listed, the remaining %" PRIu64
			   " are counted but not listed",
			rp->event_count, rp->events_dropped);
	fputs("</small></h2>\n", f);
	if (total == 0) {
		fputs("<p>No alarm events in this replay.</p>\n", f);
		return;
	}
	fputs("<table class=\"events\">\n<tr><th>Time (UTC)</th><th>Alarm</th><th>Section</th>"
	      "<th>State</th><th>Priority</th><th>Value</th><th>Setpoint</th></tr>\n", f);
	for (size_t i = 0; i < rp->event_count; i++) {
		const struct report_event *e = &rp->events[i];
		const struct report_alarm *a = &rp->layout.alarms[e->alarm_index];
		fputs("<tr><td class=\"n\">", f);
		put_time(f, e->t_ms);
		fputs("</td><td>", f);
		put_escaped(f, a->name);
		fputs("</td><td>", f);
		put_escaped(f, rp->layout.sections[a->section_index].name);
		fputs("</td><td class=\"st st-", f);
		put_escaped(f, e->state);
		fputs("\">", f);
		put_escaped(f, e->state);
		fputs("</td><td>", f);
		put_escaped(f, a->priority);
		fputs("</td><td class=\"n\">", f);
		put_value(f, e->value, a);
		fputs("</td><td class=\"n\">", f);
		put_value(f, a->setpoint, a);
		fputs("</td></tr>\n", f);
	}
	fputs("</table>\n", f);
}

static void write_page(FILE *f, const struct report *rp, const struct report_summary *sum)
{
	write_head(f, rp, sum);
	fputs("<h2>Summary</h2>\n<div class=\"cols\">\n", f);
	write_summary_data(f, rp, sum);
	write_summary_sections(f, rp, sum);
	fputs("</div>\n<h2>Alarms</h2>\n", f);
	write_summary_alarms(f, rp, sum);
	fputs("<h2>Trends by section</h2>\n", f);
	write_legend(f);
	if (rp->row_count == 0) {
		fputs("<p>No data rows were replayed, so there is nothing to chart.</p>\n", f);
	} else {
		struct frame fr = {0};
		fr.t0_ms = rp->t_min_ms;
		fr.t1_ms = rp->t_max_ms;
		if (fr.t1_ms <= fr.t0_ms) {     /* one row: give it a second of room */
			fr.t0_ms -= 500;
			fr.t1_ms += 500;
		}
		const int64_t typ = report_typical_period_ms(rp);
		fr.gap_ms = typ > 0 && typ < INT64_MAX / 3 ? 3 * typ : INT64_MAX;
		for (unsigned k = 0; k < rp->layout.section_count; k++)
			write_section(f, rp, sum, k, &fr);
	}
	write_events(f, rp);
	fputs("<footer>Written by the floodgauge replay from the data file named above. The page "
	      "depends only on that data: the same input gives the same page, byte for byte."
	      "</footer>\n</main>\n</body>\n</html>\n", f);
}

int report_write(const struct report *rp, const char *path, const struct report_summary *sum)
{
	assert(rp != NULL);
	assert(rp->slots != NULL);
	assert(path != NULL);
	assert(sum != NULL);
	char tmp[4096 + 8];
	const int n = snprintf(tmp, sizeof tmp, "%s.new", path);
	if (n < 0 || (size_t)n >= sizeof tmp)
		return -ENAMETOOLONG;
	FILE *f = fopen(tmp, "w");
	if (f == NULL)
		return -errno;
	write_page(f, rp, sum);
	int rc = 0;
	if (fflush(f) != 0 || ferror(f))
		rc = -EIO;
	/* fsync before rename: otherwise a crash can leave a renamed but empty
	 * file where the previous report was. */
	else if (fsync(fileno(f)) != 0)
		rc = -errno;
	if (fclose(f) != 0 && rc == 0)
		rc = -EIO;
	if (rc == 0 && rename(tmp, path) != 0)
		rc = -errno;
	if (rc != 0)
		unlink(tmp);
	return rc;
}
