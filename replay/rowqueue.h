/*
 * rowqueue.h - the bounded queue between the replay's two threads: the
 * reader (historian CSV parsing) and the engine with the writers.
 *
 * Rows travel in chunks of ROWQ_ROWS so that the threads meet once per
 * chunk, not once per row; ROWQ_CHUNKS chunks bound the queue (the reader
 * waits when all are full, the engine when all are empty). Every chunk is
 * allocated by rowq_init for the config's tag count: nothing is allocated
 * per row. A row carries its time, every tag's value and status (the whole
 * arrays, exactly what a single-threaded reader would hand the engine) and
 * the status texts of its bad samples, truncated to ALARM_STATUS_TEXT_MAX as
 * the engine keeps them. Order is kept, so the engine sees the same rows in
 * the same order as with one thread, and writes the same bytes.
 *
 * One producer and one consumer; a mutex and two condition variables (the
 * waits are rare: a chunk holds ROWQ_ROWS rows). With rowq_set_spin a
 * wait first spins for up to ROWQ_SPIN_NS: when the two threads keep
 * pace, the other side's next chunk is that near, and putting a thread to
 * sleep and waking it costs a virtual machine far more than the spin.
 */
#ifndef ROWQUEUE_H
#define ROWQUEUE_H

#include <pthread.h>
#include <stdatomic.h>
#include <stdbool.h>
#include <stdint.h>

#include "alarm.h"
#include "validate.h"

/* Rows per chunk: enough to make the hand-over cost small per row; fewer
 * for a config with many tags, so that a chunk's values and status stay
 * within ROWQ_CHUNK_BYTES (the queue's memory is then under 3 MB, and 2 MB
 * of rowq_extra, whatever the tag count). */
#define ROWQ_ROWS 256
#define ROWQ_CHUNK_BYTES (192u * 1024u)
/* Chunks in the queue: slack either way, about 4 000 bench rows (3 ms of
 * work). The host takes a core from this VM for a while now and then;
 * with 8 chunks the other thread soon ran out of rows or room and slept.
 * 1 M bench rows, 5 interleaved runs each: medians 1.029 -> 0.951 s
 * without results.csv, 1.82 -> 1.60 s with it (peak RSS +0.9 MiB). */
#define ROWQ_CHUNKS 16
/* Status texts per chunk: one row's worth at the most (every tag bad). */
#define ROWQ_TEXTS FG_TAGS_MAX

struct rowq_row {
	int64_t t_ms;
	unsigned text_first;      /* index of its first text in the chunk */
	unsigned text_count;
};

struct rowq_chunk {
	unsigned row_count;
	unsigned text_count;
	int end_rc;               /* 1: more may follow; 0: end of data; < 0: read error */
	uint64_t bytes_done;      /* reader progress when the chunk was published */
	void *extra;              /* rows_per_chunk x extra_size (rowq_set_extra), or NULL */
	double *values;           /* row_count x tag_count */
	enum tag_status *status;  /* row_count x tag_count */
	struct rowq_row rows[ROWQ_ROWS];
	unsigned text_tag[ROWQ_TEXTS];
	char text[ROWQ_TEXTS][ALARM_STATUS_TEXT_MAX];
};

struct rowq {
	unsigned tag_count;
	unsigned rows_per_chunk;    /* <= ROWQ_ROWS, see ROWQ_CHUNK_BYTES */
	size_t extra_size;          /* bytes of rowq_extra per row, 0: none */
	struct rowq_chunk *chunks;  /* ROWQ_CHUNKS */
	unsigned head, tail;        /* next to fill, next to take */
	_Atomic unsigned used;      /* full chunks: changed under the mutex, read without it by a spin */
	bool spin;                  /* rowq_set_spin */
	bool cancelled;             /* the consumer gave up: the producer stops */
	pthread_mutex_t mu;
	pthread_cond_t not_full, not_empty;
};

/* Allocates the chunks for tag_count tags. Returns 0 or -ENOMEM. */
int rowq_init(struct rowq *q, unsigned tag_count);
/* Gives every row bytes_per_row bytes of the producer's own (rowq_extra:
 * what it worked out ahead for that row), fewer rows per chunk when needed
 * to keep a chunk's extra within ROWQ_EXTRA_BYTES. Call once, after
 * rowq_init and before any chunk is taken. Returns 0 or -ENOMEM. */
#define ROWQ_EXTRA_BYTES (128u * 1024u)
int rowq_set_extra(struct rowq *q, size_t bytes_per_row);

/* Whether a wait spins (up to ROWQ_SPIN_NS, checking the queue) before it
 * sleeps. Only for a producer and a consumer that each have a core of
 * their own: with more threads than cores the spin takes the time of the
 * thread it waits for. Off after rowq_init. */
#define ROWQ_SPIN_NS 500000u
void rowq_set_spin(struct rowq *q, bool spin);
/* Whether this process may run on two CPUs or more (its affinity). */
bool rowq_cores_for_two(void);
/* Frees everything; accepts a zeroed q. */
void rowq_fini(struct rowq *q);

/* Producer: the next empty chunk (waits while the queue is full), or NULL
 * when the consumer cancelled. The chunk comes back cleared. */
struct rowq_chunk *rowq_fill_begin(struct rowq *q);
/* Adds a row to c; false when c is full (publish it and take another).
 * texts: count texts of the row as (tag, text) pairs. */
bool rowq_add(struct rowq *q, struct rowq_chunk *c, int64_t t_ms, const double *values,
	      const enum tag_status *status, unsigned text_count, const unsigned *text_tags,
	      const char *const *texts);
/* Hands c to the consumer. */
void rowq_fill_end(struct rowq *q, struct rowq_chunk *c);

/* Consumer: the next full chunk (waits while the queue is empty). */
struct rowq_chunk *rowq_take_begin(struct rowq *q);
/* Gives c back to the producer. */
void rowq_take_end(struct rowq *q, struct rowq_chunk *c);
/* Stops the producer (its next rowq_fill_begin returns NULL). */
void rowq_cancel(struct rowq *q);

/* Row r of chunk c: its values and status arrays (tag_count entries). */
static inline const double *rowq_values(const struct rowq *q, const struct rowq_chunk *c,
					unsigned r)
{
	return c->values + (size_t)r * q->tag_count;
}
/* Row r's extra bytes (rowq_set_extra), aligned for doubles. */
static inline void *rowq_extra(const struct rowq *q, const struct rowq_chunk *c, unsigned r)
{
	return (char *)c->extra + (size_t)r * q->extra_size;
}
static inline const enum tag_status *rowq_status(const struct rowq *q,
						 const struct rowq_chunk *c, unsigned r)
{
	return c->status + (size_t)r * q->tag_count;
}

#endif
