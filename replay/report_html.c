/*
 * report_html.c - the replay report page: one self-contained HTML file with
 * inline SVG charts, written from what report.c collected. This file writes
 * the page, its summary and event tables and the legend; report_svg.c draws
 * each section's charts, using the output helpers shared from here through
 * report_int.h.
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
#include "numfmt.h"
#include "timefmt.h"

/* Shading colour per priority (and "other"), translucent so that overlapping
 * periods of two priorities both show. The same string serves the SVG fill
 * and the HTML swatches, so the legend matches the charts exactly. */
const char *const report_html_shade_css[SHADE_KINDS] = {
	"rgba(110,160,215,0.30)", "rgba(235,195,40,0.35)", "rgba(240,130,40,0.35)",
	"rgba(215,45,45,0.32)", "rgba(140,140,140,0.30)",
};

/* ---------------------------------------------------------------- helpers */

static bool kind_is_rate(const char *kind)
{
	assert(kind != NULL);
	return strcmp(kind, "rate") == 0;
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
		long long q = llround(fabs(v) * (double)scale);
		/* Digits by hand, as "%s%lld.%0*lld" would print them: the charts
		 * print some 100 000 of these, and snprintf was most of the
		 * report's cost. At most 16 digits, a sign and a point. */
		char tmp[24];
		int k = 0;
		bool neg = v < 0 && q != 0;
		for (int d = 0; d < decimals; d++, q /= 10)
			tmp[k++] = (char)('0' + q % 10);
		if (decimals > 0)
			tmp[k++] = '.';
		do {
			tmp[k++] = (char)('0' + q % 10);
			q /= 10;
		} while (q > 0);
		if (neg)
			tmp[k++] = '-';
		n = k;
		if ((size_t)n < buf_size) {
			for (int i = 0; i < k; i++)
				buf[i] = tmp[k - 1 - i];
			buf[k] = '\0';
		}
	}
	if (n < 0 || (size_t)n >= buf_size) {
		buf[0] = '\0';
		return -ENOSPC;
	}
	return n;
}

/* Decimals that show a plant value to about three significant figures. */
int report_html_auto_decimals(double v)
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

void report_html_put_escaped(FILE *f, const char *s)
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

void report_html_put_fixed(FILE *f, double v, int decimals)
{
	char b[40];
	report_format_fixed(v, decimals, b, sizeof b);
	fputs(b, f);
}

void report_html_put_duration_s(FILE *f, double s)
{
	char b[NUMFMT_DURATION_SIZE];
	numfmt_duration(s, b, sizeof b);
	fputs(b, f);
}

void report_html_put_time(FILE *f, int64_t t_ms)
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
	report_html_put_fixed(f, v, report_html_auto_decimals(v));
	if (!isfinite(v) || a->field < 0)
		return;
	const char *unit = result_fields[a->field].unit;
	if (kind_is_rate(a->kind))
		fprintf(f, " %s/min", strcmp(unit, "-") == 0 ? "1" : unit);
	else if (strcmp(unit, "-") != 0)
		fprintf(f, " %s", unit);
}

/* Duration as h:mm:ss; under a minute with its milliseconds ("16.384 s"),
 * where a whole second would hide the sampling period. */
static void put_duration(FILE *f, int64_t ms)
{
	if (ms < 0)
		ms = 0;
	if (ms < 60000 && ms % 1000 != 0) {
		fprintf(f, "%" PRId64 ".%03" PRId64 " s", ms / 1000, ms % 1000);
		return;
	}
	char b[NUMFMT_DURATION_SIZE];
	numfmt_duration((double)ms / 1000.0, b, sizeof b);
	fputs(b, f);
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
	".st-unacknowledged{color:#a3231b}.st-acknowledged{color:#a35f00}"
	".st-returned_unacknowledged{color:#2d5f9a}.st-normal{color:#2f6b35}\n"
	"svg .ev{stroke:#d4007a;stroke-width:1.6;stroke-dasharray:6 3}\n"
	"svg .evl{font-size:11.5px;font-weight:600;fill:#d4007a}\n"
	"footer{margin-top:24px;font-size:11px;color:#6b7378}\n"
	/* SVG classes: lines, shading, strip, axes. */
	"svg text{font-family:inherit;font-size:11px;fill:#3b4246}\n"
	"svg .ttl{font-size:12.5px;font-weight:600;fill:#1d2327}\n"
	"svg .grid{stroke:#e3e0d9;stroke-width:1}\n"
	"svg .axis{stroke:#8d948f;stroke-width:1;fill:none}\n"
	"svg .s0,svg .s1,svg .s2,svg .s3,svg .s4,svg .s5,svg .s6,svg .s7,svg .s8,svg .s9,"
	"svg .s10,svg .s11,svg .s12,svg .s13,svg .s14,svg .s15,svg .s16,svg .s17,svg .s18{"
	"fill:none;stroke-width:1.6;stroke-linejoin:round;stroke-linecap:round}\n"
	"svg .s0{stroke:#1b4f9c}svg .s1{stroke:#e0761b}svg .s2{stroke:#0d8a80}"
	"svg .s3{stroke:#8e3fb0}svg .s4{stroke:#3c8d2f}svg .s5{stroke:#b5446e}"
	"svg .s6{stroke:#7b5e2a}svg .s7{stroke:#b07d00}svg .s8{stroke:#6a4c93}"
	"svg .s9{stroke:#d35400}svg .s10{stroke:#0d8a80}svg .s11{stroke:#2e86ab}\n"
	"svg .s12{stroke:#0d8a80}svg .s13{stroke:#e0761b}svg .s14{stroke:#1b4f9c}\n"
	"svg .s15,svg .s16,svg .s17,svg .s18{stroke:#8c564b}\n"
	"svg .over{fill:#c0392b}svg .overl{fill:#a5281c;font-size:10.5px;paint-order:stroke;"
	"stroke:#fff;stroke-width:3px}\n"
	"svg .ref{stroke:#4b5358;stroke-width:1.2;stroke-dasharray:2 3;fill:none}"
	"svg .refl{fill:#4b5358;font-size:10.5px;paint-order:stroke;stroke:#fff;stroke-width:3px}\n"
	"svg .lim{fill:none;stroke:#9b1d20;stroke-width:2.2}svg .limc{fill:none;stroke:#6a1b9a;"
	"stroke-width:2;stroke-dasharray:9 4}svg .limw{fill:none;stroke:#b07d00;stroke-width:2;"
	"stroke-dasharray:4 3}\n"
	"svg .tr{stroke:none}svg .tra{stroke:#c0392b;stroke-width:1.3}\n"
	".zoomwrap{overflow-x:auto}.zoomwrap svg.chart{min-width:100%}\n"
	".zbar{font-size:12px;margin:2px 4px}.zbar button{font:inherit;margin-right:4px}\n"
	"#readout{position:fixed;pointer-events:none;display:none;background:#1d2327;color:#fff;"
	"font-size:12px;padding:3px 6px;border-radius:3px;z-index:9}\n"
	"@media print{.zbar,#readout{display:none}}\n"
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
	report_html_put_escaped(f, rp->layout.plant);
	fputs("</title>\n<style>\n", f);
	fputs(page_css, f);
	fputs("</style>\n</head>\n<body>\n<main>\n<header class=\"top\">\n<h1>Replay report: ", f);
	report_html_put_escaped(f, rp->layout.plant);
	fputs("</h1>\n<div class=\"meta\">Data file <b>", f);
	report_html_put_escaped(f, rp->layout.data_file);
	fputs("</b> &middot; from <b>", f);
	report_html_put_time(f, sum->first_t_ms);
	fputs("</b> to <b>", f);
	report_html_put_time(f, sum->last_t_ms);
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
	report_html_put_time(f, sum->first_t_ms);
	fputs("</td></tr>\n<tr><td>Last row</td><td class=\"n\">", f);
	report_html_put_time(f, sum->last_t_ms);
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
			report_html_shade_css[p], report_priority_names[p], sum->raised[p]);
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
		report_html_put_escaped(f, rp->layout.sections[k].name);
		fputs("</td><td>", f);
		report_html_put_escaped(f, rp->layout.sections[k].type);
		fputs("</td><td class=\"n\">", f);
		report_html_put_time(f, sum->first_alarm_t_ms[k]);
		fprintf(f, "</td><td class=\"n\">%" PRIu64 "</td><td class=\"n\">%" PRIu64
			   "</td><td class=\"n\">%" PRIu64 "</td></tr>\n",
			rp->sec_rows_bad[k], rp->sec_rows_uncertain[k], rp->sec_rows_extrap[k]);
	}
	fputs("</table>\n", f);
}

const char *report_html_alarm_field_name(int field)
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
		report_html_put_escaped(f, a->name);
		fputs("</td><td>", f);
		report_html_put_escaped(f, rp->layout.sections[a->section_index].name);
		fprintf(f, "</td><td>%s</td><td>", report_html_alarm_field_name(a->field));
		report_html_put_escaped(f, a->kind);
		fputs("</td><td>", f);
		report_html_put_escaped(f, a->priority);
		fputs("</td><td class=\"n\">", f);
		put_value(f, a->setpoint, a);
		fputs("</td><td class=\"n\">", f);
		char d[NUMFMT_DURATION_SIZE];
		numfmt_duration(sum->above_setpoint_s[i], d, sizeof d);
		fputs(d, f);
		fputs("</td></tr>\n", f);
	}
	fputs("</table>\n", f);
}

static void write_legend(FILE *f)
{
	static const char *const lines[REPORT_SERIES_TYPE_A][2] = {
		{"#1b4f9c", "flood_index (fused indicator)"},
		{"#e0761b", "flood_pct (model)"},
		{"#0d8a80", "dp_pa (measured)"},
		{"#8e3fb0", "dp_model_pa (model)"},
		{"#3c8d2f", "liquid_holdup_frac"},
		{"#b5446e", "gas load (tag unit)"},
		{"#7b5e2a", "liquid load or level (tag unit)"},
		{"#b07d00", "weep_pct"},
		{"#6a4c93", "carryover_frac"},
		{"#d35400", "gas_holdup_frac (correlation)"},
		{"#0d8a80", "gas_holdup_dp_frac (taps)"},
		{"#2e86ab", "expanded_level_m"},
	};
	fputs("<div class=\"legend\">", f);
	/* The type charts (packed-bubble, stirred, loop) name their series above
	 * each chart. */
	for (unsigned s = 0; s < REPORT_SERIES_TYPE_A; s++)
		fprintf(f, "<span class=\"i\"><span class=\"ln\" style=\"border-color:%s\"></span>"
			   "%s</span>", lines[s][0], lines[s][1]);
	fputs("<span class=\"i\"><span class=\"ln\" style=\"border-color:#8c564b\"></span>"
	      "a field an alarm watches (its own chart)</span>", f);
	fputs("<span class=\"i\"><span class=\"ln\" style=\"border-top:2px dashed #c0392b\">"
	      "</span>alarm setpoint</span><br>\n", f);
	fputs("Shaded: alarm active (unacknowledged or acknowledged), by priority ", f);
	for (int p = 0; p < SHADE_KINDS; p++)
		fprintf(f, "<span class=\"i\"><span class=\"sw\" style=\"background:%s\"></span>"
			   "%s</span>", report_html_shade_css[p],
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

static void write_section(FILE *f, const struct report *rp, const struct report_summary *sum,
			  unsigned k, struct report_svg_frame *fr)
{
	const struct report_section *sec = &rp->layout.sections[k];
	fputs("<section class=\"panel\">\n<h3>", f);
	report_html_put_escaped(f, sec->name);
	fputs(" <small>(", f);
	report_html_put_escaped(f, sec->type);
	fputs(")</small></h3>\n<div class=\"facts\">First alarm: ", f);
	if (sum->first_alarm_t_ms[k] == REPORT_T_NONE)
		fputs("none", f);
	else
		report_html_put_time(f, sum->first_alarm_t_ms[k]);
	fprintf(f, " &middot; rows with bad quality: %" PRIu64 ", uncertain: %" PRIu64
		   ", extrapolated: %" PRIu64 "</div>\n",
		rp->sec_rows_bad[k], rp->sec_rows_uncertain[k], rp->sec_rows_extrap[k]);
	fputs("<div class=\"zoomwrap\">\n", f);
	report_svg_write_charts(f, rp, fr, k);
	fputs("</div>\n", f);
	report_window_write(f, rp, k);
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
		report_html_put_time(f, e->t_ms);
		fputs("</td><td>", f);
		report_html_put_escaped(f, a->name);
		fputs("</td><td>", f);
		report_html_put_escaped(f, rp->layout.sections[a->section_index].name);
		fputs("</td><td class=\"st st-", f);
		report_html_put_escaped(f, e->state);
		fputs("\">", f);
		report_html_put_escaped(f, e->state);
		fputs("</td><td>", f);
		report_html_put_escaped(f, a->priority);
		fputs("</td><td class=\"n\">", f);
		put_value(f, e->value, a);
		fputs("</td><td class=\"n\">", f);
		put_value(f, a->setpoint, a);
		fputs("</td></tr>\n", f);
	}
	fputs("</table>\n", f);
}

/* Zoom and a hover read-out, for a reader with scripts on; the page reads the
 * same without them (the buttons are made by the script itself). The
 * read-out shows the time and the value under the cursor from the plot box
 * each chart carries in its data- attributes. */
static const char page_script[] =
	"<div id=\"readout\"></div>\n<script>\n(function(){\n"
	"var ro=document.getElementById('readout');\n"
	"function iso(t){return new Date(t).toISOString().replace('.000','');}\n"
	"document.querySelectorAll('svg.chart[data-t0]').forEach(function(s){\n"
	" s.addEventListener('mousemove',function(e){\n"
	"  var p=s.createSVGPoint();p.x=e.clientX;p.y=e.clientY;\n"
	"  var q=p.matrixTransform(s.getScreenCTM().inverse()),d=s.dataset;\n"
	"  var x0=+d.x0,x1=+d.x1,yt=+d.yt,yb=+d.yb;\n"
	"  if(q.x<x0||q.x>x1||q.y<yt||q.y>yb){ro.style.display='none';return;}\n"
	"  var t=+d.t0+(q.x-x0)/(x1-x0)*(d.t1-d.t0),v=+d.lo+(yb-q.y)/(yb-yt)*(d.hi-d.lo);\n"
	"  ro.textContent=iso(t)+'  '+v.toPrecision(4)+' '+d.unit;\n"
	"  ro.style.left=(e.clientX+12)+'px';ro.style.top=(e.clientY+12)+'px';\n"
	"  ro.style.display='block';});\n"
	" s.addEventListener('mouseleave',function(){ro.style.display='none';});\n"
	"});\n"
	"document.querySelectorAll('.zoomwrap').forEach(function(w){\n"
	" var z=1,bar=document.createElement('div');bar.className='zbar';\n"
	" bar.innerHTML='Zoom time: <button type=\"button\">+</button>"
	"<button type=\"button\">&minus;</button><button type=\"button\">reset</button> "
	"(or Ctrl + wheel over a chart; scroll sideways)';\n"
	" w.parentNode.insertBefore(bar,w);\n"
	" function set(nz,fx){var f=fx===undefined?0.5:fx,old=w.scrollWidth;\n"
	"  z=Math.min(32,Math.max(1,nz));\n"
	"  w.querySelectorAll('svg.chart').forEach(function(s){s.style.width=(100*z)+'%';});\n"
	"  w.scrollLeft=(w.scrollLeft+f*w.clientWidth)*w.scrollWidth/old-f*w.clientWidth;}\n"
	" var b=bar.querySelectorAll('button');\n"
	" b[0].onclick=function(){set(z*2);};b[1].onclick=function(){set(z/2);};\n"
	" b[2].onclick=function(){set(1);};\n"
	" w.addEventListener('wheel',function(e){if(!e.ctrlKey)return;e.preventDefault();\n"
	"  var r=w.getBoundingClientRect();\n"
	"  set(e.deltaY<0?z*1.25:z/1.25,(e.clientX-r.left)/w.clientWidth);},{passive:false});\n"
	"});\n})();\n</script>\n";

static void write_page(FILE *f, const struct report *rp, const struct report_summary *sum)
{
	write_head(f, rp, sum);
	fputs("<h2>Summary</h2>\n<div class=\"cols\">\n", f);
	write_summary_data(f, rp, sum);
	write_summary_sections(f, rp, sum);
	fputs("</div>\n<h2>Alarms</h2>\n", f);
	write_summary_alarms(f, rp, sum);
	report_perf_write(f, rp, sum);
	fputs("<h2>Trends by section</h2>\n", f);
	write_legend(f);
	if (rp->row_count == 0) {
		fputs("<p>No data rows were replayed, so there is nothing to chart.</p>\n", f);
	} else {
		struct report_svg_frame fr = {0};
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
	      "</footer>\n</main>\n", f);
	fputs(page_script, f);
	fputs("</body>\n</html>\n", f);
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
