/*
 * csvread.h - streaming reader for historian CSV exports (the replay input).
 *
 * The file is a header line `time,TAG,TAG,...` and one row per time stamp.
 * The reader makes one pass through the file with a large read buffer and
 * parses every row in place: all memory is allocated by csvread_open() and
 * csvread_bind(), none per row. Bad input never stops it: a row that cannot
 * be used is skipped, counted and, for the first CSVREAD_PROBLEMS_MAX of
 * them, recorded with its line number so the caller can warn.
 *
 * Accepted layout:
 *  - optional UTF-8 byte-order mark; LF or CRLF line ends; the last line may
 *    lack its line end (it is used when its fields are complete);
 *  - delimiter ',' or ';', taken from the character that ends the header's
 *    first field; with ';' a number may use a decimal comma ("12,5");
 *  - fields may be quoted ("..." with "" for a quote), in the header and in
 *    rows; a quoted field cannot span lines. Blanks around fields are ignored;
 *  - header names are matched exactly (case-sensitive), except the first
 *    column, which must be "time" in any case;
 *  - time: ISO 8601 or epoch seconds, as timefmt_parse() accepts;
 *  - numbers: [sign] digits [mark digits] [e|E [sign] digits], correctly
 *    rounded, independent of the locale; an empty field is missing (NAN).
 *    Only bound columns are parsed; other columns may hold anything;
 *  - blank lines are skipped (counted in lines_blank, not as problems).
 *
 * A row is skipped and counted when it is malformed (a bad time, text in a
 * bound number field, a field count unlike the header's, an unterminated
 * quote, more than FG_CSV_LINE_MAX bytes), when its time is earlier than
 * the last row returned (unsorted), or equal to it (duplicate). The order
 * check is against the last row returned, so one row far in the future
 * makes the rows after it "unsorted" until time passes it.
 */
#ifndef CSVREAD_H
#define CSVREAD_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>

#include "fg_limits.h"

/* Read buffer, bytes: large enough for fast sequential reads and for any
 * accepted line plus its CRLF, so a line is always parsed in place. */
#define CSVREAD_BUF_SIZE (1u << 20)

/* Problems recorded with line numbers (the first ones in the file): enough
 * for a useful warning without flooding the terminal. */
#define CSVREAD_PROBLEMS_MAX 16

_Static_assert(CSVREAD_BUF_SIZE >= FG_CSV_LINE_MAX + 2, "a whole line and CRLF fit the buffer");

enum csvread_problem_kind {
	CSVREAD_MALFORMED,
	CSVREAD_UNSORTED,
	CSVREAD_DUPLICATE,
};

struct csvread_problem {
	uint64_t line;                  /* 1-based line of the file */
	enum csvread_problem_kind kind;
	const char *reason;             /* static text, e.g. "bad time" */
};

struct csvread_stats {
	uint64_t rows_read;        /* data rows seen: returned + skipped, blank lines excluded */
	uint64_t rows_returned;    /* rows handed to the caller by csvread_next() */
	uint64_t rows_malformed;   /* skipped: could not be parsed */
	uint64_t rows_unsorted;    /* skipped: time earlier than the last row returned */
	uint64_t rows_duplicate;   /* skipped: time equal to the last row returned */
	uint64_t lines_blank;      /* empty or all-blank lines, skipped silently */
	uint64_t first_bad_line;   /* line of the first malformed row, 0 if none */
	const char *first_bad_reason; /* static reason for it, NULL if none */
	unsigned problem_count;    /* entries used in problems[] */
	struct csvread_problem problems[CSVREAD_PROBLEMS_MAX]; /* first problems, file order */
};

struct csvread {
	FILE *f;                   /* NULL when not open */
	bool owns_file;            /* false for stdin */
	bool eof;                  /* fread has reached the end of the file */
	bool bound;                /* csvread_bind() has succeeded */
	char delim;                /* ',' or ';' */
	char path[FG_PATH_MAX];    /* for messages (a longer path is refused) */
	char *buf;                 /* CSVREAD_BUF_SIZE bytes */
	size_t pos;                /* next unread byte in buf */
	size_t end;                /* bytes valid in buf */
	uint64_t buf_offset;       /* file offset of buf[0] */
	uint64_t bytes_total;      /* file size, 0 when unknown */
	uint64_t line_no;          /* lines consumed so far (the last line's number) */
	int64_t last_t_ms;         /* time of the last row returned */
	bool have_last;            /* a row has been returned */
	char *header;              /* copy of the header line, names unquoted in place */
	unsigned column_count;     /* header columns, time included */
	uint32_t *name_start;      /* column_count offsets into header */
	uint32_t *name_len;        /* column_count lengths */
	int32_t *slot_of_column;   /* column_count entries: bind slot or -1 */
	unsigned value_count;      /* bound tags */
	double row[FG_CSV_COLUMNS_MAX]; /* values of the row being parsed */
	struct csvread_stats stats;
};

/*
 * Opens path ("-" for stdin), reads the header and checks it: not empty,
 * first column "time", no duplicate (non-empty) names, no longer than
 * FG_CSV_LINE_MAX. Returns 0, or a negative errno with a message
 * "PATH[:LINE]: what" in err (err may be NULL when err_size is 0): -ENODATA
 * for an empty file, -EINVAL for a bad header, -ENAMETOOLONG for a path of
 * FG_PATH_MAX bytes or more, -ENOMEM, or the errno of a failed open or read.
 * On failure r is left closed. A file with only a header opens fine;
 * csvread_next() then returns 0 at once (the caller reports "no data rows").
 */
int csvread_open(struct csvread *r, const char *path, char *err, size_t err_size);

/* Releases everything and zeroes r. Accepts a never-opened reader that was
 * zero-initialised (struct csvread r = {0}), a failed open, or a closed one. */
void csvread_close(struct csvread *r);

/*
 * Maps the wanted tag names, in order, to header columns. name_count may be
 * 0 (times only) and at most FG_CSV_COLUMNS_MAX - 1. A name not in the header
 * (or named twice in names) is an error: -ENOENT (-EINVAL), with a message
 * naming the tag and the file. May be called again to rebind.
 */
int csvread_bind(struct csvread *r, const char *const *names, unsigned name_count, char *err,
		 size_t err_size);

/*
 * Reads the next good row: returns 1 with *t_ms and values[0..value_count)
 * in bind order (NAN for an empty field), 0 at the end of the file, or a
 * negative errno on a read error. value_count must equal the bound count.
 * values is written only when 1 is returned.
 */
int csvread_next(struct csvread *r, int64_t *t_ms, double *values, unsigned value_count);

/* Bytes consumed so far and the file size (0 when unknown: a pipe). Returns 0. */
int csvread_progress(const struct csvread *r, uint64_t *bytes_done, uint64_t *bytes_total);

/* The counters, valid while r is open. */
const struct csvread_stats *csvread_stats(const struct csvread *r);

/* Static name of a problem kind: "malformed", "unsorted", "duplicate". */
const char *csvread_problem_kind_name(enum csvread_problem_kind kind);

#endif
