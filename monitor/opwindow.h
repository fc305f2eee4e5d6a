/*
 * opwindow.h - the limit lines of a section's operating window for the
 * replay report: at a recorded operating point, the gas load (in the gas
 * flow tag's unit) at which the model reaches flood_pct 100 % and, for a
 * tray, weep_pct 100 %, along the liquid load (or the level, for a column
 * without a liquid flow tag) from 0 to x_max in its tag's unit.
 */
#ifndef OPWINDOW_H
#define OPWINDOW_H

#include "config.h"
#include "report.h"

/* Fills w's x and limit lines for section si from ref_values (every tag's
 * value in its own unit at the reference row). Returns 0, or -ENOENT when the
 * section has no gas flow tag, no liquid flow or level tag, or no recorded
 * gas load (w untouched then). Pure: no I/O; calls section_eval about
 * 4000 times a line. */
int opwindow_compute(const struct fg_config *cfg, unsigned si, const double *ref_values,
		     double x_max, struct report_window *w);

#endif
