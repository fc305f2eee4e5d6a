/*
 * report_perf.c - the report's alarm performance section: the figures of
 * summary.json for a person, each with the definition it follows, and the
 * lead time of every alarm before every --event.
 */
#include <inttypes.h>
#include <math.h>

#include "report.h"
#include "report_int.h"

static void put_lead(FILE *f, double s)
{
	if (isfinite(s))
		report_html_put_duration_s(f, s);
	else
		fputs("-", f);
}

static void write_per_alarm(FILE *f, const struct report *rp, const struct alarmperf *ap)
{
	fputs("<table>\n<tr><th>Alarm</th><th>Priority</th><th>Activations</th>"
	      "<th>Chattering episodes</th><th>Fleeting</th><th>Time in alarm</th>"
	      "<th>Longest active</th><th>First activation</th>", f);
	for (unsigned k = 0; k < ap->event_count; k++)
		fprintf(f, "<th>Lead before event %u</th>", k + 1);
	fputs("</tr>\n", f);
	for (unsigned i = 0; i < ap->alarm_count && i < rp->layout.alarm_count; i++) {
		const struct alarmperf_alarm *a = &ap->a[i];
		fputs("<tr><td>", f);
		report_html_put_escaped(f, rp->layout.alarms[i].name);
		fputs("</td><td>", f);
		report_html_put_escaped(f, rp->layout.alarms[i].priority);
		fprintf(f, "</td><td class=\"n\">%" PRIu64 "</td><td class=\"n\">%" PRIu64
			   "</td><td class=\"n\">%" PRIu64 "</td><td class=\"n\">",
			a->activations, a->chattering_episodes, a->fleeting);
		report_html_put_duration_s(f, a->time_in_alarm_s);
		fputs("</td><td class=\"n\">", f);
		report_html_put_duration_s(f, a->longest_active_s);
		fputs("</td><td class=\"n\">", f);
		report_html_put_time(f, a->first_activation_t_ms == ALARMPERF_T_NONE
						? REPORT_T_NONE
						: a->first_activation_t_ms);
		fputs("</td>", f);
		for (unsigned k = 0; k < ap->event_count; k++) {
			fputs("<td class=\"n\">", f);
			put_lead(f, alarmperf_lead_s(ap, i, k));
			fputs("</td>", f);
		}
		fputs("</tr>\n", f);
	}
	fputs("</table>\n", f);
}

static void write_overall(FILE *f, const struct alarmperf *ap)
{
	struct alarmperf_overall o;
	alarmperf_overall(ap, &o);
	fputs("<table class=\"kv\">\n<tr><th colspan=\"2\">Over the whole replay</th></tr>\n", f);
	fputs("<tr><td>Average activations per 10 min (EEMUA 191)</td><td class=\"n\">", f);
	report_html_put_fixed(f, o.rate_per_10min_avg, 2);
	fputs("</td></tr>\n<tr><td>Most activations in one 10 min period (ISA-18.2 peak)</td>"
	      "<td class=\"n\">", f);
	report_html_put_fixed(f, o.rate_per_10min_max, 0);
	fputs("</td></tr>\n<tr><td>10 min periods with more than 10 activations (ISA-18.2)</td>"
	      "<td class=\"n\">", f);
	report_html_put_fixed(f, o.pct_10min_over_10, 1);
	fprintf(f, " %%</td></tr>\n<tr><td>Standing alarms at the end (EEMUA 191)</td>"
		   "<td class=\"n\">%u</td></tr>\n", o.standing_alarms);
	for (int p = ALARM_PRIORITY_COUNT - 1; p >= 0; p--) {
		fprintf(f, "<tr><td>Share of activations, %s priority (EEMUA 191)</td>"
			   "<td class=\"n\">", alarm_priority_name((enum alarm_priority)p));
		if (isfinite(o.priority_share[p])) {
			report_html_put_fixed(f, 100.0 * o.priority_share[p], 1);
			fputs(" %", f);
		} else {
			fputs("-", f);
		}
		fputs("</td></tr>\n", f);
	}
	fputs("</table>\n", f);
}

static void write_events_list(FILE *f, const struct report *rp)
{
	if (rp->layout.marker_count == 0)
		return;
	fputs("<p>Events (<code>--event</code>), marked by number on every chart: ", f);
	for (unsigned k = 0; k < rp->layout.marker_count; k++) {
		fprintf(f, "%s<b>%u</b> ", k ? "; " : "", k + 1);
		report_html_put_time(f, rp->layout.markers[k].t_ms);
		if (rp->layout.markers[k].label[0]) {
			fputs(" ", f);
			report_html_put_escaped(f, rp->layout.markers[k].label);
		}
	}
	fputs(". Lead = the event's time minus the start of the alarm's last activation "
	      "before it.</p>\n", f);
}

void report_perf_write(FILE *f, const struct report *rp, const struct report_summary *sum)
{
	const struct alarmperf *ap = sum->perf;
	if (ap == NULL || rp->layout.alarm_count == 0)
		return;
	fputs("<h2>Alarm performance</h2>\n", f);
	fprintf(f, "<p class=\"defs\">An <b>activation</b> is a change into the active state "
		   "(unacknowledged or acknowledged), not counted while shelved, suppressed by "
		   "design or out of service (ISA-18.2). A <b>chattering episode</b> is a run of "
		   "activations each with at least 2 others of the same alarm in the preceding "
		   "%.0f s (ISA-18.2 / EEMUA 191). A <b>fleeting</b> activation lasts less than "
		   "%.0f s (EEMUA 191). Rates count clock-aligned 10 min periods.</p>\n",
		ap->chatter_window_s, ap->fleeting_s);
	write_events_list(f, rp);
	fputs("<div class=\"cols\">\n", f);
	write_per_alarm(f, rp, ap);
	write_overall(f, ap);
	fputs("</div>\n", f);
}
