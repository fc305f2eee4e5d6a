/*
 * results.c - see results.h.
 *
 * results_write_row builds a row in one buffer and hands it to fwrite once
 * (number text from numfmt_sig12, names copied). The writer (second half)
 * lays out the same row text from its chunks: the columns that apply are
 * listed once at start-up, so a row is a flat run of numbers, and a number
 * that repeats its column's last one (a constant property, a held value)
 * reuses that text.
 */
#include "results.h"

#include <assert.h>
#include <errno.h>
#include <math.h>
#include <stdlib.h>
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
				p += numfmt_sig12(r->v[i], p, NUMFMT_FULL_SIZE);
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

/* ---- the replay's writer: chunks, an output block, maybe a thread ------- */

static size_t row_max(const struct results_writer *w)
{
	/* time (and the day's copy of fixed length), each number with its
	 * comma, each section's four text columns (copied RESULTS_WORD_SIZE
	 * bytes at a time) */
	return 2 * TIMEFMT_BUF_SIZE + (size_t)w->col_count * (NUMFMT_FULL_SIZE + 1) +
	       (size_t)w->section_count * 4 * RESULTS_WORD_SIZE + 2;
}

static void flush_out(struct results_writer *w)
{
	if (w->out_len == 0)
		return;
	errno = 0;
	if (w->out_err == 0 && fwrite(w->out, 1, w->out_len, w->f) != w->out_len)
		w->out_err = errno != 0 ? -errno : -EIO;
	w->out_len = 0;
	for (unsigned c = 0; c < w->col_count; c++) /* their texts are gone */
		w->last[c].bits = UINT64_MAX;
}

/* A text column: its ",name" copied whole (RESULTS_WORD_SIZE bytes; the
 * block has room, see row_max), the length it has. */
static char *put_word(char *p, const struct results_word *word)
{
	memcpy(p, word->text, RESULTS_WORD_SIZE);
	return p + word->len;
}

static void set_word(struct results_word *word, const char *name)
{
	size_t n = strlen(name);
	assert(n + 2 <= RESULTS_WORD_SIZE);
	memset(word->text, 0, sizeof word->text);
	word->text[0] = ',';
	memcpy(word->text + 1, name, n);
	word->len = (uint8_t)(n + 1);
}

static char *put_2digits(char *p, unsigned x)
{
	assert(x < 100);
	p[0] = (char)('0' + x / 10);
	p[1] = (char)('0' + x % 10);
	return p + 2;
}

/* The time as timefmt_format writes it ("YYYY-MM-DDThh:mm:ss[.mmm]Z"),
 * the date formatted once a day: rows come a second or so apart. */
static char *put_time(struct results_writer *w, char *p, int64_t t_ms)
{
	if (t_ms < w->day_ms || t_ms >= w->day_end_ms) {
		const int64_t day = 86400000;
		int64_t d = t_ms / day - (t_ms % day < 0); /* floor */
		w->day_ms = d * day;
		w->day_end_ms = w->day_ms + day;
		int n = timefmt_format(w->day_ms, w->day_text, sizeof w->day_text);
		assert(n == 20); /* "YYYY-MM-DDT00:00:00Z" */
		(void)n;
	}
	int64_t ms_of_day = t_ms - w->day_ms;
	assert(ms_of_day >= 0);
	assert(ms_of_day < 86400000);
	unsigned s = (unsigned)(ms_of_day / 1000), ms = (unsigned)(ms_of_day % 1000);
	memcpy(p, w->day_text, 16); /* "YYYY-MM-DDT" and five bytes written over below */
	p = put_2digits(p + 11, s / 3600);
	*p++ = ':';
	p = put_2digits(p, s / 60 % 60);
	*p++ = ':';
	p = put_2digits(p, s % 60);
	if (ms != 0) {
		*p++ = '.';
		*p++ = (char)('0' + ms / 100);
		p = put_2digits(p, ms % 100);
	}
	*p++ = 'Z';
	return p;
}

/* Number c of a row: copied from the column's last text when it repeats
 * the column's last number, else formatted. The same double gives the
 * same text, so nothing changes but the time taken. The text is read
 * where it was written in the output block (a row or more back, long
 * stored; NUMFMT_FULL_SIZE bytes), not kept in a copy: a copy would read
 * back numfmt_sig12's fresh stores of every number, which stalls. (A
 * second cache, of the numbers already in the row being formatted, paid
 * while the numbers took 36 ns; at 14 ns it cost more than it saved:
 * `benchtool fmt` medians 771 -> 679 ns a row without it, 6 runs each.) */
static char *put_number(struct results_writer *w, char *p, unsigned c, double v)
{
	*p++ = ',';
	uint64_t bits;
	memcpy(&bits, &v, sizeof bits);
	const uint64_t exp_mask = (uint64_t)0x7ff << 52;
	if ((bits & exp_mask) == exp_mask) /* not finite (NaN): an empty field */
		return p;
	struct results_last *last = &w->last[c];
	if (bits == last->bits) { /* a NaN never matches: none yet, or written out */
		memmove(p, w->out + last->off, NUMFMT_FULL_SIZE); /* may overlap: a short row */
		return p + last->len;
	}
	int len = numfmt_sig12(v, p, NUMFMT_FULL_SIZE);
	assert((unsigned)len - 1u < NUMFMT_FULL_SIZE - 1u); /* 1..NUMFMT_FULL_SIZE - 1 */
	last->bits = bits;
	last->off = (uint32_t)(p - w->out);
	last->len = (uint32_t)len;
	return p + len;
}

/* Formats the rows of c into the output block, writing the block out
 * whenever less than a row's worst case is left in it. */
static void format_chunk(struct results_writer *w, const struct results_chunk *c)
{
	size_t worst = row_max(w);
	for (unsigned r = 0; r < c->row_count; r++) {
		if (RESULTS_OUT_SIZE - w->out_len < worst)
			flush_out(w);
		char *p = w->out + w->out_len;
		p = put_time(w, p, c->t_ms[r]); /* in range: checked by results_writer_row */
		const double *v = c->v + (size_t)r * w->col_count;
		const uint8_t *code = c->codes + (size_t)r * w->section_count * 4;
		for (unsigned s = 0; s < w->section_count; s++, code += 4) {
			for (unsigned k = w->sec_first_col[s]; k < w->sec_first_col[s + 1]; k++)
				p = put_number(w, p, k, v[k]);
			assert(code[0] < FLOOD_BASIS_COUNT);
			p = put_word(p, &w->basis_word[code[0]]);
			if (w->sec_regime[s]) {
				assert(code[1] < BUBBLE_REGIME_COUNT);
				p = put_word(p, &w->regime_word[code[1]]);
			}
			p = put_word(p, &w->quality_word[code[2]]);
			p = put_word(p, &w->extrap_word[code[3]]);
		}
		*p++ = '\n';
		assert((size_t)(p - (w->out + w->out_len)) <= worst);
		w->out_len = (size_t)(p - w->out);
	}
}

static void *writer_main(void *arg)
{
	struct results_writer *w = arg;
	for (;;) {
		pthread_mutex_lock(&w->mu);
		while (w->used == 0 && !w->closing)
			pthread_cond_wait(&w->not_empty, &w->mu);
		if (w->used == 0) { /* closing, and nothing left */
			pthread_mutex_unlock(&w->mu);
			break;
		}
		struct results_chunk *c = &w->chunks[w->tail];
		pthread_mutex_unlock(&w->mu);
		format_chunk(w, c);
		pthread_mutex_lock(&w->mu);
		w->err = w->out_err;
		w->tail = (w->tail + 1) % RESULTS_CHUNKS;
		w->used--;
		pthread_cond_signal(&w->not_full);
		pthread_mutex_unlock(&w->mu);
	}
	flush_out(w);
	pthread_mutex_lock(&w->mu);
	w->err = w->out_err;
	pthread_mutex_unlock(&w->mu);
	return NULL;
}

/* The next chunk to fill: in one thread the same chunk, formatted at once;
 * threaded, the queue's head (waiting while every chunk is full). */
static struct results_chunk *take_empty(struct results_writer *w)
{
	if (!w->threaded)
		return &w->chunks[0];
	pthread_mutex_lock(&w->mu);
	while (w->used == RESULTS_CHUNKS)
		pthread_cond_wait(&w->not_full, &w->mu);
	struct results_chunk *c = &w->chunks[w->head];
	pthread_mutex_unlock(&w->mu);
	return c;
}

/* Hands the filled chunk over (threaded) or formats it here. */
static void hand_over(struct results_writer *w)
{
	struct results_chunk *c = w->fill;
	if (c == NULL || c->row_count == 0)
		return;
	if (!w->threaded) {
		format_chunk(w, c);
		w->err = w->out_err;
	} else {
		pthread_mutex_lock(&w->mu);
		assert(c == &w->chunks[w->head]);
		w->head = (w->head + 1) % RESULTS_CHUNKS;
		w->used++;
		w->err_seen = w->err;
		pthread_cond_signal(&w->not_empty);
		pthread_mutex_unlock(&w->mu);
	}
	if (!w->threaded)
		w->err_seen = w->err;
	w->fill = take_empty(w);
	w->fill->row_count = 0;
}

static void free_buffers(struct results_writer *w)
{
	for (unsigned i = 0; i < RESULTS_CHUNKS; i++) {
		free(w->chunks[i].v);
		free(w->chunks[i].codes);
	}
	free(w->out);
	free(w->last);
}

int results_writer_start(struct results_writer *w, FILE *f, const struct fg_config *cfg,
			 bool threaded)
{
	assert(w != NULL);
	assert(f != NULL);
	assert(cfg->section_count <= FG_SECTIONS_MAX);
	memset(w, 0, sizeof *w);
	w->f = f;
	w->cfg = cfg;
	w->threaded = threaded;
	w->section_count = cfg->section_count;
	for (unsigned s = 0; s < cfg->section_count; s++) {
		enum section_type t = cfg->sections[s].geom.type;
		w->sec_first_col[s] = w->col_count;
		for (int i = 0; i < RF_COUNT; i++)
			if (section_type_has_field(t, i))
				w->col_field[w->col_count++] = (uint8_t)i;
		w->sec_regime[s] = section_regime_applies(t);
	}
	w->sec_first_col[cfg->section_count] = w->col_count;
	for (int i = 0; i < FLOOD_BASIS_COUNT; i++)
		set_word(&w->basis_word[i], flood_basis_name((enum flood_basis)i));
	for (int i = 0; i < BUBBLE_REGIME_COUNT; i++)
		set_word(&w->regime_word[i], bubble_regime_name((enum bubble_regime)i));
	for (int i = 0; i < 3; i++)
		set_word(&w->quality_word[i], fg_quality_name((enum fg_quality)i));
	set_word(&w->extrap_word[0], "false");
	set_word(&w->extrap_word[1], "true");
	w->day_ms = w->day_end_ms = 0; /* no day yet */
	size_t row_bytes = (size_t)(w->col_count > 0 ? w->col_count : 1) * sizeof(double);
	size_t rows = RESULTS_CHUNK_BYTES / row_bytes;
	w->rows_per_chunk = rows > RESULTS_ROWS ? RESULTS_ROWS : rows < 1 ? 1 : (unsigned)rows;
	size_t ncol = w->col_count > 0 ? w->col_count : 1;
	size_t nsec = w->section_count > 0 ? w->section_count : 1;
	bool ok = true;
	for (unsigned i = 0; i < RESULTS_CHUNKS; i++) {
		w->chunks[i].v = malloc((size_t)w->rows_per_chunk * ncol * sizeof(double));
		w->chunks[i].codes = malloc((size_t)w->rows_per_chunk * nsec * 4);
		ok = ok && w->chunks[i].v != NULL && w->chunks[i].codes != NULL;
	}
	w->out = malloc(RESULTS_OUT_SIZE);
	w->last = calloc(ncol, sizeof *w->last);
	if (w->last != NULL)
		for (size_t i = 0; i < ncol; i++)
			w->last[i].bits = UINT64_MAX; /* a NaN: no number repeats it */
	if (!ok || w->out == NULL || w->last == NULL) {
		free_buffers(w);
		memset(w, 0, sizeof *w);
		return -ENOMEM;
	}
	assert(row_max(w) < RESULTS_OUT_SIZE);
	if (threaded) {
		pthread_mutex_init(&w->mu, NULL);
		pthread_cond_init(&w->not_full, NULL);
		pthread_cond_init(&w->not_empty, NULL);
		if (pthread_create(&w->thread, NULL, writer_main, w) != 0) {
			pthread_mutex_destroy(&w->mu);
			pthread_cond_destroy(&w->not_full);
			pthread_cond_destroy(&w->not_empty);
			free_buffers(w);
			memset(w, 0, sizeof *w);
			return -EAGAIN;
		}
	}
	w->fill = take_empty(w);
	w->fill->row_count = 0;
	return 0;
}

int results_writer_row(struct results_writer *w, int64_t t_ms,
		       const struct section_result *const *results)
{
	assert(w != NULL);
	assert(w->fill != NULL);
	assert(results != NULL);
	if (t_ms < TIMEFMT_MIN_MS || t_ms > TIMEFMT_MAX_MS)
		return -EINVAL;
	if (w->err_seen != 0) { /* as of the last chunk handed over */
		errno = -w->err_seen; /* for the caller's message, in this thread */
		return w->err_seen;
	}
	struct results_chunk *c = w->fill;
	unsigned r = c->row_count;
	c->t_ms[r] = t_ms;
	double *v = c->v + (size_t)r * w->col_count;
	uint8_t *code = c->codes + (size_t)r * w->section_count * 4;
	for (unsigned s = 0; s < w->section_count; s++, code += 4) {
		const struct section_result *res = results[s];
		for (unsigned k = w->sec_first_col[s]; k < w->sec_first_col[s + 1]; k++)
			v[k] = res->v[w->col_field[k]];
		code[0] = (uint8_t)res->basis;
		code[1] = (uint8_t)res->regime;
		/* fg_quality_name writes any other value as "bad" */
		code[2] = res->quality == FG_QUALITY_GOOD || res->quality == FG_QUALITY_UNCERTAIN
				  ? (uint8_t)res->quality
				  : (uint8_t)FG_QUALITY_BAD;
		code[3] = res->extrap.count > 0;
	}
	c->row_count++;
	if (c->row_count == w->rows_per_chunk)
		hand_over(w);
	return 0;
}

int results_writer_finish(struct results_writer *w)
{
	if (w == NULL || w->fill == NULL)
		return 0;
	if (w->fill->row_count > 0) {
		struct results_chunk *c = w->fill;
		if (!w->threaded) {
			format_chunk(w, c);
		} else {
			pthread_mutex_lock(&w->mu);
			assert(c == &w->chunks[w->head]);
			w->head = (w->head + 1) % RESULTS_CHUNKS;
			w->used++;
			pthread_cond_signal(&w->not_empty);
			pthread_mutex_unlock(&w->mu);
		}
	}
	if (w->threaded) {
		pthread_mutex_lock(&w->mu);
		w->closing = true;
		pthread_cond_signal(&w->not_empty);
		pthread_mutex_unlock(&w->mu);
		pthread_join(w->thread, NULL);
		pthread_mutex_destroy(&w->mu);
		pthread_cond_destroy(&w->not_full);
		pthread_cond_destroy(&w->not_empty);
	} else {
		flush_out(w);
		w->err = w->out_err;
	}
	int err = w->err;
	free_buffers(w);
	memset(w, 0, sizeof *w);
	if (err != 0)
		errno = -err;
	return err;
}
