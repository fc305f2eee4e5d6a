/*
 * results.h - results.csv: one row per evaluation, time and every
 * SECTION.FIELD column. Every section gets every column, so files of
 * different configs line up by name; a field that does not apply is empty.
 * Text columns follow the numeric ones: flood_basis, regime, quality,
 * extrapolated (0/1). Numbers are %.6g in the C locale: byte-identical for
 * the same input.
 */
#ifndef RESULTS_H
#define RESULTS_H

#include <stdint.h>
#include <stdio.h>

#include "config.h"

/* Writes the header line. Returns 0 or -EIO. */
int results_write_header(FILE *f, const struct fg_config *cfg);

/* Writes one row for time t_ms: results[i] is section i. Returns 0 or -EIO. */
int results_write_row(FILE *f, const struct fg_config *cfg, int64_t t_ms,
		      const struct section_result *const *results);

#endif
