/*
 * results.c - see results.h.
 *
 * A row is built in one buffer and handed to fwrite once (number text from
 * numfmt_full, names copied).
 */
#include "results.h"

#include <assert.h>
#include <errno.h>
#include <math.h>
#include <string.h>

#include "numfmt.h"
#include "timefmt.h"

/* The longest row: time, and per section every field as a number plus the
 * four text columns, each with its comma. */
#define ROW_MAX (TIMEFMT_BUF_SIZE + FG_SECTIONS_MAX * (RF_COUNT * (NUMFMT_FULL_SIZE + 1) + 64))

int results_write_header(FILE *f, const struct fg_config *cfg)
{
	assert(f != NULL);
	assert(cfg != NULL);
	fputs("time", f);
	for (unsigned s = 0; s < cfg->section_count; s++) {
		const char *n = cfg->sections[s].name;
		enum section_type t = cfg->sections[s].geom.type;
		for (int i = 0; i < RF_COUNT; i++)
			if (section_type_has_field(t, i))
				fprintf(f, ",%s.%s", n, result_fields[i].name);
		fprintf(f, ",%s.flood_basis", n);
		if (section_regime_applies(t))
			fprintf(f, ",%s.regime", n);
		fprintf(f, ",%s.quality,%s.extrapolated", n, n);
	}
	fputc('\n', f);
	return ferror(f) ? -EIO : 0;
}

static char *put_text(char *p, const char *s)
{
	*p++ = ',';
	size_t n = strlen(s);
	memcpy(p, s, n);
	return p + n;
}

int results_write_row(FILE *f, const struct fg_config *cfg, int64_t t_ms,
		      const struct section_result *const *results)
{
	assert(f != NULL);
	assert(results != NULL);
	assert(cfg->section_count <= FG_SECTIONS_MAX);
	static char row[ROW_MAX];
	char *p = row;
	int n = timefmt_format(t_ms, p, TIMEFMT_BUF_SIZE);
	if (n < 0)
		return -EINVAL;
	p += n;
	for (unsigned s = 0; s < cfg->section_count; s++) {
		const struct section_result *r = results[s];
		enum section_type t = cfg->sections[s].geom.type;
		for (int i = 0; i < RF_COUNT; i++) {
			if (!section_type_has_field(t, i))
				continue;
			*p++ = ',';
			if (isfinite(r->v[i])) /* NaN: an empty field */
				p += numfmt_full(r->v[i], p, NUMFMT_FULL_SIZE);
		}
		p = put_text(p, flood_basis_name(r->basis));
		if (section_regime_applies(t))
			p = put_text(p, bubble_regime_name(r->regime));
		p = put_text(p, fg_quality_name(r->quality));
		p = put_text(p, r->extrap.count > 0 ? "true" : "false");
	}
	*p++ = '\n';
	assert(p - row <= ROW_MAX);
	if (fwrite(row, 1, (size_t)(p - row), f) != (size_t)(p - row))
		return -EIO;
	return 0;
}
