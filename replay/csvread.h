/*
 * csvread.h - streaming reader for historian CSV exports (the replay input).
 *
 * Two layouts, told apart by the header:
 *  - wide: a header line `time,TAG,TAG,...` and one row per time stamp;
 *  - long (narrow): columns time, tag, value and optionally status, one row
 *    per sample. The header names are matched in any case: time column as
 *    below; tag: "tag", "name" or "tagname"; value: "value"; status: "status"
 *    or "quality". A header with both a tag and a value column is long.
 *    The reader gathers the samples of one time stamp into one wide row
 *    (bounded memory: one row), so the caller sees the same rows either way;
 *    a bound tag without a sample at that time is missing (NAN), as an empty
 *    wide cell is. The file must be in time order; tags may come in any
 *    order within a time. A sample of a tag that is not bound is ignored
 *    (counted in samples_unbound).
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
 *  - header names are matched exactly (case-sensitive), except the time
 *    column: the one named by csvread_opts.time_column, else the first named
 *    "time", "timestamp" or "date" (any case), at any position;
 *  - time: ISO 8601 (seconds optional, 'T' or a space) or epoch seconds, as
 *    timefmt_parse_zoned() accepts; a time without an offset is UTC, or local
 *    time in csvread_opts.tz when one is given (a time in the spring gap is
 *    a malformed row; the repeated autumn hour is read in file order);
 *  - numbers: [sign] digits [mark digits] [e|E [sign] digits], correctly
 *    rounded, independent of the locale; an empty field is missing (NAN).
 *    Only bound columns are parsed; other columns may hold anything. A
 *    bound cell holding text ("Bad Input", "I/O Timeout": a historian's
 *    status) is NAN and its text is reported by csvread_text_at(); the row
 *    is kept. In a long file a status column that is not one of the good
 *    words (csvread_status_is_good) does the same with the status text;
 *  - blank lines are skipped (counted in lines_blank, not as problems).
 *
 * A row is skipped and counted when it is malformed (a bad time, a field
 * count unlike the header's, an unterminated
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
#include "tzone.h"

/* Read buffer, bytes: large enough for fast sequential reads and for any
 * accepted line plus its CRLF, so a line is always parsed in place. */
#define CSVREAD_BUF_SIZE (1u << 20)

/* Problems recorded with line numbers (the first ones in the file): enough
 * for a useful warning without flooding the terminal. */
#define CSVREAD_PROBLEMS_MAX 16

/* Text kept from a bound cell that held text, with the NUL (longer is cut). */
#define CSVREAD_TEXT_MAX 40

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
	uint64_t cells_text;       /* bound cells (or long samples) marked bad by text */
	uint64_t samples_unbound;  /* long form: samples of tags nobody asked for */
	uint64_t first_bad_line;   /* line of the first malformed row, 0 if none */
	const char *first_bad_reason; /* static reason for it, NULL if none */
	unsigned problem_count;    /* entries used in problems[] */
	struct csvread_problem problems[CSVREAD_PROBLEMS_MAX]; /* first problems, file order */
};

/* How to read the time column. Zeroed: find it by name, times without an
 * offset are UTC. */
struct csvread_opts {
	const struct tzone *tz;      /* local zone of offset-less times, or NULL (UTC) */
	const char *time_column;     /* header name of the time column, or NULL/"" */
};

/* A long-form sample held back while the row before it is returned. */
struct csvread_sample {
	bool held;
	int64_t t_ms;
	int slot;                    /* bind slot, -1 for an unbound tag */
	double value;
	bool text;                   /* the sample is bad: text below */
	char text_buf[CSVREAD_TEXT_MAX];
};

#define CSVREAD_TIME_TEXT_MAX 40

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
	/* The last ISO time text parsed and what it read as (parse_time): the
	 * next differs from it, on a regular record, in the seconds alone. */
	char time_text[CSVREAD_TIME_TEXT_MAX];
	size_t time_len;           /* 0: nothing kept */
	int64_t time_t_ms;
	bool time_zoned;
	char *header;              /* copy of the header line, names unquoted in place */
	unsigned column_count;     /* header columns, time included */
	uint32_t *name_start;      /* column_count offsets into header */
	uint32_t *name_len;        /* column_count lengths */
	int32_t *slot_of_column;   /* column_count entries: bind slot or -1 */
	unsigned value_count;      /* bound tags */
	double row[FG_CSV_COLUMNS_MAX]; /* values of the row being parsed */
	struct csvread_opts opts;
	unsigned time_col;         /* header index of the time column */
	bool long_form;            /* a long (time, tag, value[, status]) file */
	int tag_col, value_col, status_col; /* long form: header indexes (-1: none) */
	const char *const *bound_names; /* long form: names as bound (caller's array) */
	uint32_t *name_order;      /* long form: slots sorted by name, for bsearch */
	struct csvread_sample carry; /* long form: first sample of the next row */
	unsigned text_count;       /* cells of the last row that held text */
	unsigned text_slot[FG_CSV_COLUMNS_MAX];
	char text[FG_CSV_COLUMNS_MAX][CSVREAD_TEXT_MAX];
	struct csvread_stats stats;
};

/* csvread_open_opts() with default options. */
int csvread_open(struct csvread *r, const char *path, char *err, size_t err_size);

/*
 * Opens path ("-" for stdin), reads the header and checks it: not empty,
 * a time column, no duplicate (non-empty) names, no longer than
 * FG_CSV_LINE_MAX. Returns 0, or a negative errno with a message
 * "PATH[:LINE]: what" in err (err may be NULL when err_size is 0): -ENODATA
 * for an empty file, -EINVAL for a bad header, -ENAMETOOLONG for a path of
 * FG_PATH_MAX bytes or more, -ENOMEM, or the errno of a failed open or read.
 * On failure r is left closed. A file with only a header opens fine;
 * csvread_next() then returns 0 at once (the caller reports "no data rows").
 */
int csvread_open_opts(struct csvread *r, const char *path, const struct csvread_opts *opts,
		      char *err, size_t err_size);

/* True for a long (time, tag, value[, status]) file. */
bool csvread_is_long(const struct csvread *r);

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
 * The same, but a name that the header lacks is not an error: found[i]
 * (name_count entries) says which names have a column, and a missing one
 * reads as NAN in every row. In a long file every name is "found" (which
 * tags have samples shows only while reading). names must stay valid while
 * r is bound (a long file looks tags up in it). Returns 0, or -EINVAL for a
 * name given twice.
 */
int csvread_bind_some(struct csvread *r, const char *const *names, unsigned name_count,
		      bool *found, char *err, size_t err_size);

/* The cells of the row csvread_next() last returned that held text (or, in
 * a long file, a bad status): how many, and the k-th one's bind slot and
 * text (NUL-terminated, valid until the next call). */
unsigned csvread_text_count(const struct csvread *r);
void csvread_text_at(const struct csvread *r, unsigned k, unsigned *slot, const char **text);

/* True when a historian status word means a good sample: empty, or (any
 * case, blanks around ignored) "good", "ok", "valid", "normal" or "192"
 * (the OPC DA code for good quality, 0xC0). Everything else is bad. */
bool csvread_status_is_good(const char *s, size_t len);

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
