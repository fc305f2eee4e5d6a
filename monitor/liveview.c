/*
 * liveview.c - see liveview.h.
 */
#include "liveview.h"

#include <assert.h>
#include <math.h>
#include <string.h>

#include "log.h"
#include "timefmt.h"

#define BAR_SCALE_PCT 125.0
#define BAR_WIDTH 25

void liveview_bar(double pct, char *buf, unsigned width)
{
	assert(buf != NULL);
	assert(width >= 5);
	unsigned full = 0;
	if (isfinite(pct) && pct > 0.0)
		full = (unsigned)fmin((double)width, round(pct / BAR_SCALE_PCT * width));
	unsigned mark = (unsigned)round(100.0 / BAR_SCALE_PCT * width);
	for (unsigned i = 0; i < width; i++)
		buf[i] = i < full ? '#' : '.';
	if (mark < width && mark >= full)
		buf[mark] = '|';
	buf[width] = '\0';
}

/* Names of the section's alarms that are active or unacknowledged. */
static void alarm_list(const struct engine *e, unsigned si, char *buf, size_t size)
{
	buf[0] = '\0';
	size_t n = 0;
	for (unsigned a = 0; a < e->cfg->alarm_count; a++) {
		const struct alarm *al = &e->alarms[a];
		if (al->cfg.section_index != si)
			continue;
		enum alarm_state st = al->state;
		if (st == ALARM_STATE_NORM)
			continue;
		int w = snprintf(buf + n, size - n, "%s%s:%s", n ? " " : "", al->cfg.name,
				 alarm_state_name(st));
		if (w < 0 || (size_t)w >= size - n)
			break;
		n += (size_t)w;
	}
}

void liveview_draw(FILE *f, const struct engine *e, const struct liveview_links *links,
		   int64_t t_ms)
{
	assert(f != NULL);
	assert(e != NULL);
	char ts[TIMEFMT_BUF_SIZE];
	timefmt_format(t_ms, ts, sizeof(ts));
	fputs("\033[H\033[2J", f); /* home, clear */
	fprintf(f, "floodgauge  %s   %s   sources %u/%u up", e->cfg->monitor.name, ts,
		links->sources_up, links->sources);
	if (links->mqtt_enabled)
		fprintf(f, "   mqtt %s", links->mqtt_up ? "up" : "DOWN");
	if (links->overruns)
		fprintf(f, "   overruns %u", links->overruns);
	fprintf(f, "\n\n  %-12s %7s  %-*s %-12s %8s  %-9s %s\n", "section", "flood", BAR_WIDTH,
		"0 .. 100% .. 125%", "basis", "holdup", "quality", "alarms");
	for (unsigned s = 0; s < e->cfg->section_count; s++) {
		const struct section_result *r = &e->sec[s].r;
		char bar[BAR_WIDTH + 1], alarms[160], flood[16] = "     - ", hold[16] = "      -";
		double fi = r->v[RF_FLOOD_INDEX];
		liveview_bar(fi, bar, BAR_WIDTH);
		if (isfinite(fi))
			snprintf(flood, sizeof(flood), "%6.1f%%", fi);
		if (isfinite(r->v[RF_LIQUID_HOLDUP_FRAC]))
			snprintf(hold, sizeof(hold), "%7.4f", r->v[RF_LIQUID_HOLDUP_FRAC]);
		alarm_list(e, s, alarms, sizeof(alarms));
		bool alarm = alarms[0] != '\0';
		fprintf(f, "  %-12s %s  %s%s\033[0m %-12s %8s  %-9s %s%s\033[0m\n",
			e->cfg->sections[s].name, flood, alarm ? "\033[1;31m" : "", bar,
			flood_basis_name(r->basis), hold, fg_quality_name(r->quality),
			alarm ? "\033[1m" : "", alarms[0] ? alarms : "-");
	}
	fputs("\n", f);
	char line[LOG_LINE_MAX];
	for (unsigned i = 0; log_ring_copy(i, line, sizeof(line)); i++)
		fprintf(f, "  %s\n", line);
	fputs("\n  Ctrl-C stops. Advisory only: not a safety system.\n", f);
	fflush(f);
}
