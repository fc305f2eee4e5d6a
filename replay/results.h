/*
 * results.h - results.csv: one row per evaluation, time and the
 * SECTION.FIELD columns that apply to each section's type
 * (section_type_has_field: a tray has no carryover_frac, a spray no
 * jet_flood_pct), in the order of result_fields[]. A field that applies but
 * has no value at a time is empty. Text columns follow the numeric ones:
 * flood_basis, regime (bubble columns only), quality, extrapolated
 * (true/false). Numbers are the shortest of 15..17 significant digits that
 * reads back as the same double (numfmt_full): byte-identical for the same
 * input.
 */
#ifndef RESULTS_H
#define RESULTS_H

#include <stdint.h>
#include <stdio.h>

#include "config.h"

/* Writes the header line. Returns 0 or -EIO. */
int results_write_header(FILE *f, const struct fg_config *cfg);

/* Writes one row for time t_ms: results[i] is section i. Returns 0 or -EIO
 * (-EINVAL for a time that cannot be written). */
int results_write_row(FILE *f, const struct fg_config *cfg, int64_t t_ms,
		      const struct section_result *const *results);

#endif
