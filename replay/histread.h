/*
 * histread.h - the historian reader every command that reads recorded data
 * shares (replay, feed, calibrate, tune): a config-aware layer over csvread.
 *
 * It binds each polled (recorded) tag of the config to its data column
 * (`[tag.NAME] column =`, else the tag's name), reads wide or long files
 * alike, converts offset-less times from the local zone (`--tz ZONE`, else
 * `[replay] tz`, else UTC), and hands back one value and one read status
 * per tag, indexed like cfg->tags, ready for engine_step():
 *   - a number: TAG_STATUS_FRESH; an empty cell / no sample: MISSING;
 *   - text in the cell, or a bad status in a long file's status column:
 *     TAG_STATUS_BAD, with the text from histread_text_at();
 *   - no column for the tag in the file: TAG_STATUS_NO_COLUMN in every row
 *     (histread_open warns, naming the tags). Only a file with no column for
 *     any tag is an error.
 *
 * The command-line side is shared too: HISTREAD_LONG_OPTIONS adds --tz to a
 * getopt_long table, histread_opts_take() takes it, and histread_time_arg()
 * reads a --from/--to/--event/--flood-at time in the same zone.
 */
#ifndef HISTREAD_H
#define HISTREAD_H

#include <stdbool.h>
#include <stdint.h>
#include <stdio.h>

#include "config.h"
#include "csvread.h"
#include "tzone.h"
#include "validate.h"

/* getopt_long value of --tz; commands put HISTREAD_LONG_OPTIONS in their
 * table and pass every option value to histread_opts_take(). */
#define HISTREAD_OPT_TZ 0x4801
#define HISTREAD_LONG_OPTIONS {"tz", required_argument, NULL, HISTREAD_OPT_TZ}

/* One line for a command's usage text. */
#define HISTREAD_USAGE \
	"  --tz ZONE      IANA zone (e.g. Europe/Berlin) of times written without an offset,\n" \
	"                 in the data and on the command line (default: [replay] tz, else UTC)\n"

/* What the command line says about reading data. Zero = defaults. */
struct histread_opts {
	const char *tz;              /* --tz ZONE, or NULL */
};

/* Takes option ch (a getopt_long value) when it is one of the reader's:
 * returns 1 when taken, 0 when it is not a reader option. */
int histread_opts_take(struct histread_opts *o, int ch, const char *arg);

struct histread {
	const struct fg_config *cfg;
	struct tzone tz;
	bool tz_loaded;
	struct csvread csv;
	unsigned slot_count;                 /* polled tags bound */
	unsigned tag_of_slot[FG_TAGS_MAX];   /* cfg->tags index of each slot */
	const char *names[FG_TAGS_MAX];      /* column of each slot */
	bool found[FG_TAGS_MAX];             /* the file has a column for the slot */
	bool seen[FG_TAGS_MAX];              /* a value or status was read for the slot */
	unsigned missing_count;              /* slots without a column */
	double row[FG_CSV_COLUMNS_MAX];
};

/*
 * Sets h up for cfg and loads the time zone (opts->tz, else [replay] tz).
 * Call before histread_time_arg() and histread_open(). Returns 0, or a
 * negative errno with a message in err (an unknown zone: -ENOENT).
 */
int histread_init(struct histread *h, const struct fg_config *cfg,
		  const struct histread_opts *opts, char *err, size_t err_size);

/* Releases everything (closes the file); accepts a zeroed h. */
void histread_fini(struct histread *h);

/* The zone name in use, or "UTC". */
const char *histread_zone_name(const struct histread *h);

/*
 * Reads a command-line time (ISO 8601, seconds optional, or epoch seconds);
 * without an offset it is local time in the zone. Returns 0, or -EINVAL
 * (not a time) / -ERANGE (in the spring daylight-saving gap) with a message
 * naming opt in err. In the repeated autumn hour the first pass is meant.
 */
int histread_time_arg(const struct histread *h, const char *opt, const char *text,
		      int64_t *t_ms, char *err, size_t err_size);

/*
 * Opens path and binds every polled tag. Tags without a column are
 * reported on warn (may be NULL) and read as TAG_STATUS_NO_COLUMN. Returns
 * 0, or a negative errno with "PATH[:LINE]: what" in err: csvread_open's
 * errors, or -ENOENT when the file has a column for no tag at all.
 */
int histread_open(struct histread *h, const char *path, FILE *warn, char *err,
		  size_t err_size);

/*
 * The next row: 1 with *t_ms, values[ti] (the tag's own unit) and
 * status[ti] for every polled tag ti (others untouched), 0 at the end, or
 * a negative errno on a read error.
 */
int histread_next(struct histread *h, int64_t *t_ms, double *values, enum tag_status *status);

/* The TAG_STATUS_BAD samples of the last row: count, and the k-th one's tag
 * index and text (valid until the next histread_next). */
unsigned histread_text_count(const struct histread *h);
void histread_text_at(const struct histread *h, unsigned k, unsigned *tag_index,
		      const char **text);

/* At the end of a long file: warns about bound tags that never had a
 * sample (a long file has no header to check up front). */
void histread_warn_unseen(const struct histread *h, FILE *warn);

/* The reader's counters and progress (see csvread.h). */
const struct csvread_stats *histread_stats(const struct histread *h);
int histread_progress(const struct histread *h, uint64_t *bytes_done, uint64_t *bytes_total);

#endif
