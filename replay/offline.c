/*
 * offline.c - see offline.h.
 */
#include "offline.h"

#include <stdio.h>
#include <stdlib.h>

#include "commands.h"
#include "csvread.h"

int offline_setup(const char *path, struct fg_config **cfg, struct engine **eng)
{
	*cfg = malloc(sizeof(**cfg));
	*eng = malloc(sizeof(**eng));
	if (*cfg == NULL || *eng == NULL)
		return EXIT_RUNTIME;
	return config_load(*cfg, path, stderr) != 0 ? EXIT_USAGE : 0;
}

int offline_next_in(struct histread *h, int64_t from_t_ms, int64_t to_t_ms, int64_t *t_ms,
		    double *values, enum tag_status *status)
{
	int rc;
	while ((rc = histread_next(h, t_ms, values, status)) == 1)
		if (*t_ms >= from_t_ms && *t_ms <= to_t_ms)
			break;
	return rc;
}

void offline_take_texts(const struct histread *h, struct engine *e)
{
	for (unsigned k = 0; k < histread_text_count(h); k++) {
		unsigned ti;
		const char *text;
		histread_text_at(h, k, &ti, &text);
		engine_tag_status_text(e, ti, text);
	}
}

void offline_warn_skipped(const struct histread *h, const char *cmd, const char *path)
{
	const struct csvread_stats *st = histread_stats(h);
	histread_warn_unseen(h, stderr);
	for (unsigned i = 0; i < st->problem_count; i++)
		fprintf(stderr, "floodgauge %s: %s:%llu: %s row skipped: %s\n", cmd, path,
			(unsigned long long)st->problems[i].line,
			csvread_problem_kind_name(st->problems[i].kind), st->problems[i].reason);
	uint64_t all = st->rows_malformed + st->rows_unsorted + st->rows_duplicate;
	if (all > st->problem_count)
		fprintf(stderr, "floodgauge %s: %s: ... %llu skipped rows in all\n", cmd, path,
			(unsigned long long)all);
}
