/*
 * liveview.h - the terminal view of `floodgauge run`: redrawn in place each
 * period, one line per section (flood index with a bar, holdup, quality,
 * active alarms), the links' health, and the latest log lines.
 */
#ifndef LIVEVIEW_H
#define LIVEVIEW_H

#include <stdbool.h>
#include <stdio.h>

#include "engine.h"

struct liveview_links {
	unsigned sources_up, sources;
	bool mqtt_enabled, mqtt_up;
	bool export_enabled;
	unsigned overruns;
};

/* Draws the whole view to f (a terminal). */
void liveview_draw(FILE *f, const struct engine *e, const struct liveview_links *links,
		   int64_t t_ms);

/* Formats the bar for a percentage into buf (width characters + NUL):
 * '#' up to the value, '.' after, '|' at 100 %, on a 0..125 % scale. */
void liveview_bar(double pct, char *buf, unsigned width);

#endif
