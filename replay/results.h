/*
 * results.h - results.csv: one row per evaluation, time and the
 * SECTION.FIELD columns that apply to each section's type
 * (section_type_has_field: a tray has no carryover_frac, a spray no
 * jet_flood_pct), in the order of result_fields[]. A field that applies but
 * has no value at a time is empty. Text columns follow the numeric ones:
 * flood_basis, regime (bubble columns only), quality, extrapolated
 * (true/false). Numbers have 12 significant digits, as printf's "%.12g"
 * writes them (numfmt_sig12): byte-identical for the same input.
 *
 * Two ways to write it. results_write_row formats one row and hands it to
 * stdio: the plain definition, which test_results checks the writer
 * against. A results_writer (the replay's) takes rows as they come, copies the
 * values of the columns that apply into chunks allocated once at start-up,
 * and formats whole chunks into a large output block that is written with
 * one fwrite when nearly full: either in the caller's thread, or in a
 * thread of its own behind a bounded queue (RESULTS_CHUNKS chunks: the
 * caller waits when all are full). Both give the same bytes as
 * results_write_row, row for row.
 */
#ifndef RESULTS_H
#define RESULTS_H

#include <pthread.h>
#include <stdbool.h>
#include <stdint.h>
#include <stdio.h>

#include "config.h"
#include "numfmt.h"
#include "timefmt.h"

/* Writes the header line. Returns 0 or -EIO. */
int results_write_header(FILE *f, const struct fg_config *cfg);

/* Writes one row for time t_ms: results[i] is section i. Returns 0 or -EIO
 * (-EINVAL for a time that cannot be written). */
int results_write_row(FILE *f, const struct fg_config *cfg, int64_t t_ms,
		      const struct section_result *const *results);

/* Numeric columns of a row at most: every field of every section. */
#define RESULTS_COLS_MAX (FG_SECTIONS_MAX * RF_COUNT)
/* Bytes of a chunk's numbers: rows per chunk is this over a row's numbers
 * (at most RESULTS_ROWS), so the queue stays under a few MB whatever the
 * config (8 x 256 KiB, and 512 KiB for the output block). */
#define RESULTS_CHUNK_BYTES (256u * 1024u)
#define RESULTS_ROWS 1024
/* Chunks in the queue: slack either way. With three busy threads on two
 * cores, the writer's thread is off its core for a time slice now and
 * then; 8 chunks (about 7 000 bench rows) let the engine carry on meanwhile
 * where 4 made it wait: 1 M bench rows with results, medians 1.77 -> 1.71,
 * 1.81 -> 1.58, 2.31 -> 2.18 and 2.07 -> 1.77 s in four rounds of 5 or 6
 * interleaved runs, as the host's load came and went (peak RSS 13 -> 15
 * MiB). */
#define RESULTS_CHUNKS 8
/* The output block, bytes: written when less than a row's worst case is
 * left. Half a MiB (it was 1 MiB) leaves the memory to the row queue's
 * slack and the bench's peak RSS under 16 MiB; one write a thousand rows
 * is still nothing next to the copy the kernel makes. */
#define RESULTS_OUT_SIZE (1u << 19)

/* A text column's ",name" and a NUL fit: the longest is ",churn_turbulent". */
#define RESULTS_WORD_SIZE 24

struct results_chunk {
	unsigned row_count;
	int64_t t_ms[RESULTS_ROWS];
	double *v;             /* rows x col_count: the numbers, NAN when empty */
	uint8_t *codes;        /* rows x sections x 4: basis, regime, quality, extrapolated */
};

struct results_writer {
	FILE *f;
	const struct fg_config *cfg;
	bool threaded;              /* formatting and writing in a thread of its own */
	unsigned section_count;
	unsigned col_count;         /* numeric columns that apply, all sections */
	uint8_t col_field[RESULTS_COLS_MAX]; /* result field of each column */
	unsigned sec_first_col[FG_SECTIONS_MAX + 1]; /* section s: columns [[s], [s+1]) */
	bool sec_regime[FG_SECTIONS_MAX];    /* the section has a regime column */
	unsigned rows_per_chunk;
	struct results_chunk chunks[RESULTS_CHUNKS];
	struct results_chunk *fill; /* the caller's chunk being filled, or NULL */
	/* The queue (threaded): head is filled next, tail taken next. */
	unsigned head, tail, used;
	bool closing;               /* no more chunks: the writer thread ends */
	int err;                    /* first write error (-EIO) or 0; under mu if threaded */
	int err_seen;               /* err as of the last hand-over (the caller's copy) */
	pthread_t thread;
	pthread_mutex_t mu;
	pthread_cond_t not_full, not_empty;
	/* The formatter's own (the writer thread's when threaded). */
	char *out;                  /* RESULTS_OUT_SIZE bytes */
	size_t out_len;
	int out_err;                /* the formatter's write error, published as err */
	/* col_count: the last number of each column and where its text is in
	 * the output block, reused while it repeats (bits all ones, a NaN,
	 * before the first and after the block is written out) */
	struct results_last {
		uint64_t bits;
		uint32_t off, len;
	} *last;
	/* The text columns, ",name" by code, and the day of the last time
	 * written ("YYYY-MM-DDT" for t_ms in [day_ms, day_ms + 1 day)). */
	struct results_word {
		char text[RESULTS_WORD_SIZE];
		uint8_t len;
	} basis_word[FLOOD_BASIS_COUNT], regime_word[BUBBLE_REGIME_COUNT], quality_word[3],
		extrap_word[2];
	int64_t day_ms, day_end_ms; /* day_end_ms <= day_ms: none yet */
	char day_text[TIMEFMT_BUF_SIZE];
};

/* Sets w up for cfg, writing to f (after the header, which the caller
 * writes), with a thread of its own when threaded. Allocates everything
 * the writer will use. Returns 0, or -ENOMEM / -EAGAIN (no thread) with
 * nothing left allocated. */
int results_writer_start(struct results_writer *w, FILE *f, const struct fg_config *cfg,
			 bool threaded);

/* Adds the row for time t_ms (results[i] is section i; copied). Returns 0,
 * or a negative errno (also left in errno) once a write has failed (seen
 * when a chunk is handed over; later rows are dropped), -EINVAL for a
 * time that cannot be written (checked here, so the row is refused in the
 * caller's thread exactly as results_write_row refuses it). */
int results_writer_row(struct results_writer *w, int64_t t_ms,
		       const struct section_result *const *results);

/* Formats and writes every row still held, ends the thread and frees
 * everything (f is left open, flushed by stdio as the caller sees fit).
 * Returns 0 or the first write error as a negative errno (also left in
 * errno). Accepts a zeroed w. */
int results_writer_finish(struct results_writer *w);

#endif
