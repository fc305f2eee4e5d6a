/*
 * results.c - see results.h.
 */
#include "results.h"

#include <assert.h>
#include <errno.h>
#include <math.h>

#include "numfmt.h"
#include "timefmt.h"

static const char *const text_columns[] = {"flood_basis", "regime", "quality", "extrapolated"};

int results_write_header(FILE *f, const struct fg_config *cfg)
{
	assert(f != NULL);
	assert(cfg != NULL);
	fputs("time", f);
	for (unsigned s = 0; s < cfg->section_count; s++) {
		const char *n = cfg->sections[s].name;
		for (int i = 0; i < RF_COUNT; i++)
			fprintf(f, ",%s.%s", n, result_fields[i].name);
		for (size_t i = 0; i < sizeof(text_columns) / sizeof(text_columns[0]); i++)
			fprintf(f, ",%s.%s", n, text_columns[i]);
	}
	fputc('\n', f);
	return ferror(f) ? -EIO : 0;
}

int results_write_row(FILE *f, const struct fg_config *cfg, int64_t t_ms,
		      const struct section_result *const *results)
{
	assert(f != NULL);
	assert(results != NULL);
	char ts[TIMEFMT_BUF_SIZE];
	if (timefmt_format(t_ms, ts, sizeof(ts)) < 0)
		return -EINVAL;
	fputs(ts, f);
	for (unsigned s = 0; s < cfg->section_count; s++) {
		const struct section_result *r = results[s];
		for (int i = 0; i < RF_COUNT; i++) {
			fputc(',', f);
			if (isfinite(r->v[i])) {
				char num[NUMFMT_FULL_SIZE];
				fputs(numfmt_full(r->v[i], num, sizeof num) > 0 ? num : "", f);
			}
		}
		fprintf(f, ",%s,%s,%s,%s", flood_basis_name(r->basis), bubble_regime_name(r->regime),
			fg_quality_name(r->quality), r->extrap.count > 0 ? "true" : "false");
	}
	fputc('\n', f);
	return ferror(f) ? -EIO : 0;
}
