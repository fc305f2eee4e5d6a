/*
 * test_rowqueue.c - the bounded queue between the replay's reader thread
 * and its engine thread (replay/rowqueue.c): order, contents, the bound,
 * status texts cut as the engine cuts them, and cancelling.
 */
#include <pthread.h>
#include <sched.h>
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdbool.h>
#include <stdint.h>
#include <string.h>
#include <time.h>

#include <cmocka.h>

#include "rowqueue.h"

#define TAGS 5
#define ROWS 20000

static struct rowq q;

static void *producer(void *arg)
{
	(void)arg;
	double v[TAGS];
	enum tag_status st[TAGS];
	struct rowq_chunk *c = rowq_fill_begin(&q);
	for (unsigned i = 0; i < ROWS && c != NULL; i++) {
		for (unsigned k = 0; k < TAGS; k++) {
			v[k] = i * 10.0 + k;
			st[k] = (i + k) % 3 == 0 ? TAG_STATUS_MISSING : TAG_STATUS_FRESH;
		}
		unsigned tags[1] = {i % TAGS};
		const char *texts[1] = {i % 2 ? "Bad Input" : "a status text longer than the forty bytes"};
		unsigned n = i % 7 == 0 ? 1 : 0;
		if (!rowq_add(&q, c, (int64_t)i * 1000, v, st, n, tags, texts)) {
			rowq_fill_end(&q, c);
			c = rowq_fill_begin(&q);
			if (c == NULL)
				break;
			assert_true(rowq_add(&q, c, (int64_t)i * 1000, v, st, n, tags, texts));
		}
	}
	if (c != NULL) {
		c->end_rc = 0;
		rowq_fill_end(&q, c);
	}
	return NULL;
}

static void rows_arrive_in_order(bool spin)
{
	assert_int_equal(rowq_init(&q, TAGS), 0);
	rowq_set_spin(&q, spin);
	pthread_t th;
	assert_int_equal(pthread_create(&th, NULL, producer, NULL), 0);
	unsigned next = 0;
	for (;;) {
		struct rowq_chunk *c = rowq_take_begin(&q);
		assert_true(c->row_count <= ROWQ_ROWS);
		for (unsigned r = 0; r < c->row_count; r++, next++) {
			assert_int_equal(c->rows[r].t_ms, (int64_t)next * 1000);
			const double *v = rowq_values(&q, c, r);
			const enum tag_status *st = rowq_status(&q, c, r);
			for (unsigned k = 0; k < TAGS; k++) {
				assert_true(v[k] == next * 10.0 + k);
				assert_int_equal(st[k], (next + k) % 3 == 0 ? TAG_STATUS_MISSING
									     : TAG_STATUS_FRESH);
			}
			assert_int_equal(c->rows[r].text_count, next % 7 == 0 ? 1 : 0);
			if (next % 7 == 0) {
				unsigned t = c->rows[r].text_first;
				assert_int_equal(c->text_tag[t], next % TAGS);
				/* Cut to ALARM_STATUS_TEXT_MAX - 1 bytes, as the engine keeps it. */
				assert_string_equal(c->text[t], next % 2 ? "Bad Input"
									 : "a status text longer than the forty byt");
			}
		}
		bool end = c->end_rc != 1;
		rowq_take_end(&q, c);
		if (end)
			break;
	}
	pthread_join(th, NULL);
	assert_int_equal(next, ROWS);
	rowq_fini(&q);
}

static void test_rows_arrive_in_order_with_their_values_and_texts(void **state)
{
	(void)state;
	rows_arrive_in_order(false);
}

/* The same with both waits spinning before they sleep (rowq_set_spin). */
static void test_spinning_waits_deliver_the_same_rows(void **state)
{
	(void)state;
	rows_arrive_in_order(true);
}

/* A spinning consumer on an empty queue still gets a chunk published
 * after its spin has run out (it then waits on the condition variable). */
static void *late_producer(void *arg)
{
	(void)arg;
	struct timespec d = {0, 3 * (long)ROWQ_SPIN_NS}; /* past the consumer's spin */
	nanosleep(&d, NULL);
	struct rowq_chunk *c = rowq_fill_begin(&q);
	double v[TAGS] = {0};
	enum tag_status st[TAGS] = {TAG_STATUS_FRESH};
	assert_true(rowq_add(&q, c, 42, v, st, 0, NULL, NULL));
	c->end_rc = 0;
	rowq_fill_end(&q, c);
	return NULL;
}

static void test_a_spinning_wait_sleeps_and_wakes(void **state)
{
	(void)state;
	assert_int_equal(rowq_init(&q, TAGS), 0);
	rowq_set_spin(&q, true);
	pthread_t th;
	assert_int_equal(pthread_create(&th, NULL, late_producer, NULL), 0);
	struct rowq_chunk *c = rowq_take_begin(&q);
	assert_int_equal(c->row_count, 1);
	assert_int_equal(c->rows[0].t_ms, 42);
	rowq_take_end(&q, c);
	pthread_join(th, NULL);
	rowq_fini(&q);
}

static void full_queue_holds_until_cancelled(bool spin)
{
	assert_int_equal(rowq_init(&q, TAGS), 0);
	rowq_set_spin(&q, spin);
	pthread_t th;
	/* Nobody takes: the producer fills ROWQ_CHUNKS chunks and waits. */
	assert_int_equal(pthread_create(&th, NULL, producer, NULL), 0);
	for (;;) {
		pthread_mutex_lock(&q.mu);
		unsigned used = q.used;
		pthread_mutex_unlock(&q.mu);
		assert_true(used <= ROWQ_CHUNKS);
		if (used == ROWQ_CHUNKS)
			break;
		sched_yield();
	}
	rowq_cancel(&q);
	pthread_join(th, NULL); /* returns: the cancel woke the producer */
	assert_int_equal(q.used, ROWQ_CHUNKS);
	rowq_fini(&q);
}

static void test_a_full_queue_holds_the_producer_until_cancelled(void **state)
{
	(void)state;
	full_queue_holds_until_cancelled(false);
	full_queue_holds_until_cancelled(true);
}

static void test_chunk_rows_shrink_for_many_tags(void **state)
{
	(void)state;
	assert_int_equal(rowq_init(&q, FG_TAGS_MAX), 0);
	assert_true(q.rows_per_chunk < ROWQ_ROWS);
	assert_true((size_t)q.rows_per_chunk * FG_TAGS_MAX *
			    (sizeof(double) + sizeof(enum tag_status)) <=
		    ROWQ_CHUNK_BYTES);
	rowq_fini(&q);
	assert_int_equal(rowq_init(&q, 7), 0);
	assert_int_equal(q.rows_per_chunk, ROWQ_ROWS);
	rowq_fini(&q);
}

static void test_extra_bytes_per_row(void **state)
{
	(void)state;
	/* A small extra keeps the rows per chunk; each row's area is 8-aligned
	 * and its own. */
	assert_int_equal(rowq_init(&q, 7), 0);
	assert_int_equal(rowq_set_extra(&q, 13), 0);
	assert_int_equal(q.extra_size, 16);
	assert_int_equal(q.rows_per_chunk, ROWQ_ROWS);
	struct rowq_chunk *c = &q.chunks[0];
	for (unsigned r = 0; r < q.rows_per_chunk; r++) {
		unsigned char *x = rowq_extra(&q, c, r);
		assert_int_equal((uintptr_t)x % 8, 0);
		memset(x, (int)(r & 0xff), 13);
	}
	for (unsigned r = 0; r < q.rows_per_chunk; r++)
		assert_int_equal(((unsigned char *)rowq_extra(&q, c, r))[12], r & 0xff);
	rowq_fini(&q);
	/* A large one takes fewer rows per chunk, within ROWQ_EXTRA_BYTES. */
	assert_int_equal(rowq_init(&q, 7), 0);
	assert_int_equal(rowq_set_extra(&q, 5000), 0);
	assert_true(q.rows_per_chunk < ROWQ_ROWS);
	assert_true((size_t)q.rows_per_chunk * q.extra_size <= ROWQ_EXTRA_BYTES);
	assert_true(q.rows_per_chunk >= 1);
	rowq_fini(&q);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_rows_arrive_in_order_with_their_values_and_texts),
		cmocka_unit_test(test_spinning_waits_deliver_the_same_rows),
		cmocka_unit_test(test_a_spinning_wait_sleeps_and_wakes),
		cmocka_unit_test(test_a_full_queue_holds_the_producer_until_cancelled),
		cmocka_unit_test(test_chunk_rows_shrink_for_many_tags),
		cmocka_unit_test(test_extra_bytes_per_row),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
