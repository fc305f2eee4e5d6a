/*
 * rowqueue.c - see rowqueue.h.
 */
#define _GNU_SOURCE /* sched_getaffinity, CPU_COUNT */
#include "rowqueue.h"

#include <assert.h>
#include <errno.h>
#include <stdlib.h>
#include <string.h>
#include <sched.h>
#include <time.h>

int rowq_init(struct rowq *q, unsigned tag_count)
{
	assert(q != NULL);
	assert(tag_count <= FG_TAGS_MAX);
	memset(q, 0, sizeof *q);
	atomic_init(&q->used, 0);
	q->tag_count = tag_count;
	size_t row_bytes = (size_t)(tag_count > 0 ? tag_count : 1) *
			   (sizeof(double) + sizeof(enum tag_status));
	size_t rows = ROWQ_CHUNK_BYTES / row_bytes;
	q->rows_per_chunk = rows > ROWQ_ROWS ? ROWQ_ROWS : rows < 1 ? 1 : (unsigned)rows;
	q->chunks = calloc(ROWQ_CHUNKS, sizeof *q->chunks);
	if (q->chunks == NULL)
		return -ENOMEM;
	size_t n = (size_t)q->rows_per_chunk * (tag_count > 0 ? tag_count : 1);
	for (unsigned i = 0; i < ROWQ_CHUNKS; i++) {
		q->chunks[i].values = malloc(n * sizeof(double));
		q->chunks[i].status = malloc(n * sizeof(enum tag_status));
		if (q->chunks[i].values == NULL || q->chunks[i].status == NULL) {
			rowq_fini(q);
			return -ENOMEM;
		}
	}
	pthread_mutex_init(&q->mu, NULL);
	pthread_cond_init(&q->not_full, NULL);
	pthread_cond_init(&q->not_empty, NULL);
	return 0;
}

int rowq_set_extra(struct rowq *q, size_t bytes_per_row)
{
	assert(q != NULL && q->chunks != NULL);
	assert(q->extra_size == 0);
	if (bytes_per_row == 0)
		return 0;
	size_t size = (bytes_per_row + 7u) & ~(size_t)7u; /* each row's starts 8-aligned */
	size_t rows = ROWQ_EXTRA_BYTES / size;
	if (rows < q->rows_per_chunk)
		q->rows_per_chunk = rows < 1 ? 1 : (unsigned)rows;
	q->extra_size = size;
	for (unsigned i = 0; i < ROWQ_CHUNKS; i++) {
		q->chunks[i].extra = malloc((size_t)q->rows_per_chunk * size);
		if (q->chunks[i].extra == NULL)
			return -ENOMEM;
	}
	return 0;
}

void rowq_fini(struct rowq *q)
{
	if (q == NULL || q->chunks == NULL)
		return;
	for (unsigned i = 0; i < ROWQ_CHUNKS; i++) {
		free(q->chunks[i].extra);
		free(q->chunks[i].values);
		free(q->chunks[i].status);
	}
	free(q->chunks);
	pthread_mutex_destroy(&q->mu);
	pthread_cond_destroy(&q->not_full);
	pthread_cond_destroy(&q->not_empty);
	memset(q, 0, sizeof *q);
}

void rowq_set_spin(struct rowq *q, bool spin)
{
	assert(q != NULL);
	q->spin = spin;
}

bool rowq_cores_for_two(void)
{
	cpu_set_t set;
	if (sched_getaffinity(0, sizeof set, &set) != 0)
		return false;
	return CPU_COUNT(&set) >= 2;
}

static uint64_t now_ns(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (uint64_t)ts.tv_sec * 1000000000u + (uint64_t)ts.tv_nsec;
}

/* Before a wait: spins while the queue holds `busy` chunks (ROWQ_CHUNKS:
 * full, for the producer; 0: empty, for the consumer), for ROWQ_SPIN_NS at
 * the most, looking at the clock every 64 turns. Only a hint: the caller
 * looks again under the mutex. */
static void spin_while(struct rowq *q, unsigned busy)
{
	if (!q->spin)
		return;
	uint64_t end = 0;
	for (unsigned i = 0; atomic_load_explicit(&q->used, memory_order_relaxed) == busy;
	     i++) {
#if defined(__x86_64__) || defined(__i386__)
		__builtin_ia32_pause();
#endif
		if (i % 64 != 0)
			continue;
		uint64_t t = now_ns();
		if (end == 0)
			end = t + ROWQ_SPIN_NS;
		else if (t >= end)
			return;
	}
}

struct rowq_chunk *rowq_fill_begin(struct rowq *q)
{
	spin_while(q, ROWQ_CHUNKS);
	pthread_mutex_lock(&q->mu);
	while (q->used == ROWQ_CHUNKS && !q->cancelled)
		pthread_cond_wait(&q->not_full, &q->mu);
	struct rowq_chunk *c = q->cancelled ? NULL : &q->chunks[q->head];
	pthread_mutex_unlock(&q->mu);
	if (c != NULL) {
		c->row_count = 0;
		c->text_count = 0;
		c->end_rc = 1;
		c->bytes_done = 0;
	}
	return c;
}

bool rowq_add(struct rowq *q, struct rowq_chunk *c, int64_t t_ms, const double *values,
	      const enum tag_status *status, unsigned text_count, const unsigned *text_tags,
	      const char *const *texts)
{
	assert(text_count <= ROWQ_TEXTS);
	if (c->row_count == q->rows_per_chunk || c->text_count + text_count > ROWQ_TEXTS)
		return false;
	struct rowq_row *r = &c->rows[c->row_count];
	r->t_ms = t_ms;
	r->text_first = c->text_count;
	r->text_count = text_count;
	size_t off = (size_t)c->row_count * q->tag_count;
	memcpy(c->values + off, values, q->tag_count * sizeof *values);
	memcpy(c->status + off, status, q->tag_count * sizeof *status);
	for (unsigned k = 0; k < text_count; k++) {
		unsigned i = c->text_count++;
		c->text_tag[i] = text_tags[k];
		/* The engine keeps ALARM_STATUS_TEXT_MAX - 1 bytes of a text. */
		size_t n = strlen(texts[k]);
		if (n >= ALARM_STATUS_TEXT_MAX)
			n = ALARM_STATUS_TEXT_MAX - 1;
		memcpy(c->text[i], texts[k], n);
		c->text[i][n] = '\0';
	}
	c->row_count++;
	return true;
}

void rowq_fill_end(struct rowq *q, struct rowq_chunk *c)
{
	pthread_mutex_lock(&q->mu);
	assert(c == &q->chunks[q->head]);
	q->head = (q->head + 1) % ROWQ_CHUNKS;
	q->used++;
	pthread_cond_signal(&q->not_empty);
	pthread_mutex_unlock(&q->mu);
}

struct rowq_chunk *rowq_take_begin(struct rowq *q)
{
	spin_while(q, 0);
	pthread_mutex_lock(&q->mu);
	while (q->used == 0)
		pthread_cond_wait(&q->not_empty, &q->mu);
	struct rowq_chunk *c = &q->chunks[q->tail];
	pthread_mutex_unlock(&q->mu);
	return c;
}

void rowq_take_end(struct rowq *q, struct rowq_chunk *c)
{
	pthread_mutex_lock(&q->mu);
	assert(c == &q->chunks[q->tail]);
	q->tail = (q->tail + 1) % ROWQ_CHUNKS;
	q->used--;
	pthread_cond_signal(&q->not_full);
	pthread_mutex_unlock(&q->mu);
}

void rowq_cancel(struct rowq *q)
{
	pthread_mutex_lock(&q->mu);
	q->cancelled = true;
	pthread_cond_signal(&q->not_full);
	pthread_mutex_unlock(&q->mu);
}
