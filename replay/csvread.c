/*
 * csvread.c - streaming historian CSV reader (see csvread.h for the format).
 *
 * How it is built: one buffer of CSVREAD_BUF_SIZE bytes is filled by fread.
 * A line is found with memchr and parsed where it lies; when a line runs off
 * the end of the buffer, the unread tail is moved to the front and the rest
 * read behind it. Because the buffer holds more than the longest accepted
 * line, an accepted line is always whole in the buffer; a longer one is
 * counted and skipped without being stored. Fields are scanned in place
 * without copying; only header names are unquoted (in a private copy).
 *
 * Numbers are converted here rather than with strtod on the field: strtod
 * needs a NUL-terminated string and follows LC_NUMERIC. The common case (a
 * significand of at most 2^53 and at most 19 digits, decimal exponent within
 * +-22) is exact with one IEEE multiplication or division, because both
 * operands are exactly representable (W. D. Clinger, "How to read floating
 * point numbers accurately", PLDI 1990, the "fast path"); a plain decimal
 * without an exponent takes it in a single pass (number_plain). Anything else is rewritten as
 * "DIGITSeEXP", which has no decimal point and so reads the same in every
 * locale, and handed to strtod, which rounds correctly in glibc.
 *
 * A long (time, tag, value[, status]) file goes through the same line and
 * field scanning; next_long() gathers the samples of one time stamp into
 * r->row and holds back the first sample of the next time stamp in
 * r->carry, so memory stays one row whatever the file's length. Tags are
 * found by binary search in the bound names (sorted once at bind).
 */
#include "csvread.h"

#include <assert.h>
#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>
#include <sys/stat.h>

#include "timefmt.h"

/* next_line() result for a line longer than FG_CSV_LINE_MAX (already skipped). */
#define LINE_TOO_LONG 2

/* A number field longer than this is refused as text (slow-path buffer). */
#define NUMBER_TEXT_MAX 400

__attribute__((format(printf, 3, 4))) static void set_err(char *err, size_t err_size,
							   const char *fmt, ...)
{
	if (err == NULL || err_size == 0)
		return;
	va_list ap;
	va_start(ap, fmt);
	vsnprintf(err, err_size, fmt, ap); /* a truncated message is still useful */
	va_end(ap);
}

static bool is_blank(char c)
{
	return c == ' ' || c == '\t';
}

static bool is_digit(char c)
{
	return c >= '0' && c <= '9';
}

/* ---- buffer and lines ------------------------------------------------- */

/* Moves the unread tail to the front and reads behind it. Returns 0 or a
 * negative errno; sets r->eof at the end of the file. */
static int fill(struct csvread *r)
{
	assert(r->pos <= r->end);
	assert(r->end <= CSVREAD_BUF_SIZE);
	if (r->pos > 0) {
		memmove(r->buf, r->buf + r->pos, r->end - r->pos);
		r->buf_offset += r->pos;
		r->end -= r->pos;
		r->pos = 0;
	}
	size_t want = CSVREAD_BUF_SIZE - r->end;
	assert(want > 0);
	errno = 0;
	size_t got = fread(r->buf + r->end, 1, want, r->f);
	r->end += got;
	if (got < want) {
		if (ferror(r->f))
			return errno != 0 ? -errno : -EIO;
		r->eof = true;
	}
	return 0;
}

/* Skips the rest of an over-long line up to and including its LF. */
static int skip_rest_of_line(struct csvread *r)
{
	for (;;) {
		char *nl = memchr(r->buf + r->pos, '\n', r->end - r->pos);
		if (nl != NULL) {
			r->pos = (size_t)(nl - r->buf) + 1;
			return 0;
		}
		r->pos = r->end;
		if (r->eof)
			return 0;
		int rc = fill(r);
		if (rc < 0)
			return rc;
	}
}

/* Takes the line of raw length raw_len (LF excluded) at r->pos. */
static int take_line(struct csvread *r, size_t raw_len, size_t advance, char **line, size_t *len)
{
	r->line_no++;
	*line = r->buf + r->pos;
	*len = raw_len;
	if (raw_len > 0 && (*line)[raw_len - 1] == '\r')
		*len = raw_len - 1;
	r->pos += advance;
	return *len > FG_CSV_LINE_MAX ? LINE_TOO_LONG : 1;
}

/*
 * Finds the next line. Returns 1 with [*line, *line + *len) (CR LF or LF
 * removed, valid until the next call), LINE_TOO_LONG for a line over
 * FG_CSV_LINE_MAX bytes (skipped; r->line_no is its number), 0 at the end of
 * the file, or a negative errno.
 */
static int next_line(struct csvread *r, char **line, size_t *len)
{
	for (;;) {
		size_t avail = r->end - r->pos;
		char *nl = memchr(r->buf + r->pos, '\n', avail);
		if (nl != NULL) {
			size_t raw = (size_t)(nl - (r->buf + r->pos));
			return take_line(r, raw, raw + 1, line, len);
		}
		if (r->eof) {
			if (avail == 0)
				return 0;
			return take_line(r, avail, avail, line, len); /* last line, no LF */
		}
		if (avail > FG_CSV_LINE_MAX + 1) { /* over the limit even with a CR */
			r->line_no++;
			int rc = skip_rest_of_line(r);
			return rc < 0 ? rc : LINE_TOO_LONG;
		}
		int rc = fill(r);
		if (rc < 0)
			return rc;
	}
}

static bool is_blank_line(const char *line, size_t len)
{
	for (size_t i = 0; i < len; i++)
		if (!is_blank(line[i]))
			return false;
	return true;
}

/* ---- fields ----------------------------------------------------------- */

struct field {
	size_t start; /* offset in the line of the content (inside any quotes) */
	size_t len;   /* content length, blanks around an unquoted field trimmed */
};

/*
 * Scans the field starting at line[*p]. Returns NULL, with *p moved past the
 * delimiter and *last set when the line ends after this field, or a static
 * reason when the field is malformed.
 */
static const char *scan_field(const char *line, size_t len, size_t *p, char delim,
			      struct field *f, bool *last)
{
	size_t i = *p;
	assert(i <= len);
	while (i < len && is_blank(line[i]))
		i++;
	if (i < len && line[i] == '"') {
		size_t j = i + 1;
		const char *q;
		for (;;) {
			q = memchr(line + j, '"', len - j);
			if (q == NULL)
				return "unterminated quote";
			size_t k = (size_t)(q - line);
			if (k + 1 < len && line[k + 1] == '"') {
				j = k + 2; /* "" is a quote inside the field */
				continue;
			}
			break;
		}
		f->start = i + 1;
		f->len = (size_t)(q - line) - f->start;
		size_t k = (size_t)(q - line) + 1;
		while (k < len && is_blank(line[k]))
			k++;
		*last = k == len;
		if (!*last && line[k] != delim)
			return "text after a closing quote";
		*p = *last ? len : k + 1;
		return NULL;
	}
	const char *d = memchr(line + i, delim, len - i);
	size_t e = d != NULL ? (size_t)(d - line) : len;
	f->start = i;
	while (e > i && is_blank(line[e - 1]))
		e--;
	f->len = e - i;
	*last = d == NULL;
	*p = d != NULL ? (size_t)(d - line) + 1 : len;
	return NULL;
}

/* ---- numbers ---------------------------------------------------------- */

/* 1e0..1e22 are exactly representable doubles (5^22 < 2^53). */
static const double pow10_exact[23] = {
	1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,  1e8,  1e9,  1e10, 1e11,
	1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
};

/* The digits of a number, collected by scan_number(). */
struct number_text {
	bool neg;
	uint64_t mant;      /* first significant digits, while they fit */
	unsigned sig;       /* significant digits (leading zeros excluded) */
	long frac_digits;   /* digits after the decimal mark */
	long exp;           /* explicit exponent, clamped to +-100000 */
};

/* Syntax check and digit collection. Returns false for text. */
static bool scan_number(const char *s, size_t n, char alt_mark, struct number_text *t)
{
	size_t i = 0;
	memset(t, 0, sizeof *t);
	if (s[i] == '+' || s[i] == '-')
		t->neg = s[i++] == '-';
	size_t digits = 0;
	bool in_frac = false;
	for (; i < n; i++) {
		char c = s[i];
		if (is_digit(c)) {
			digits++;
			if (in_frac)
				t->frac_digits++;
			if (t->sig > 0 || c != '0') {
				if (t->sig < 19)
					t->mant = t->mant * 10 + (uint64_t)(c - '0');
				t->sig++;
			}
		} else if (!in_frac && (c == '.' || (alt_mark != 0 && c == alt_mark))) {
			in_frac = true;
		} else {
			break;
		}
	}
	if (digits == 0)
		return false;
	if (i < n && (s[i] == 'e' || s[i] == 'E')) {
		i++;
		bool eneg = false;
		if (i < n && (s[i] == '+' || s[i] == '-'))
			eneg = s[i++] == '-';
		size_t start = i;
		for (; i < n && is_digit(s[i]); i++)
			if (t->exp < 100000)
				t->exp = t->exp * 10 + (s[i] - '0');
		if (i == start)
			return false;
		if (eneg)
			t->exp = -t->exp;
	}
	return i == n;
}

/* The slow path: "DIGITSeEXP" (magnitude only) through strtod. */
static double number_slow(const char *s, size_t n, const struct number_text *t)
{
	char text[NUMBER_TEXT_MAX + 32];
	size_t k = 0; /* the sign is applied by the caller */
	for (size_t i = 0; i < n && s[i] != 'e' && s[i] != 'E'; i++)
		if (is_digit(s[i]))
			text[k++] = s[i];
	assert(k <= NUMBER_TEXT_MAX);
	snprintf(text + k, sizeof text - k, "e%ld", t->exp - t->frac_digits);
	return strtod(text, NULL);
}

/* Clinger's fast path holds for a significand up to 2^53: it and 10^0..10^22
 * are then exact doubles, and one IEEE multiplication or division rounds
 * their exact product or quotient correctly. */
#define CLINGER_MANT_MAX ((uint64_t)1 << 53)

/*
 * The common field in one pass: [sign] digits [mark digits] from s[0], at
 * most 19 digits in all (so the significand cannot overflow 64 bits), no
 * exponent, significand at most 2^53 and at most 22 decimals, ending at
 * s[*used] (what follows is the caller's to check). Returns true with *out
 * set, correctly rounded (Clinger's fast path, as above), or false for
 * anything else (the general path below decides, text included).
 */
static bool number_plain(const char *s, size_t n, char alt_mark, double *out, size_t *used)
{
	const char *p = s, *end = s + n;
	if (n == 0)
		return false;
	bool neg = *p == '-';
	p += neg || *p == '+';
	const char *first = p;
	uint64_t mant = 0;
	unsigned d;
	while (p < end && (d = (unsigned)(unsigned char)*p - '0') < 10u) {
		mant = mant * 10u + d;
		p++;
	}
	size_t digits = (size_t)(p - first), frac = 0;
	if (p < end && (*p == '.' || (alt_mark != 0 && *p == alt_mark))) {
		const char *f = ++p;
		while (p < end && (d = (unsigned)(unsigned char)*p - '0') < 10u) {
			mant = mant * 10u + d;
			p++;
		}
		frac = (size_t)(p - f);
		digits += frac;
	}
	if (digits == 0 || digits > 19 || mant > CLINGER_MANT_MAX || frac > 22)
		return false; /* (an exponent after it: the caller finds no delimiter there) */
	double v = (double)mant / pow10_exact[frac];
	*out = neg ? -v : v;
	*used = (size_t)(p - s);
	return true;
}

/*
 * Converts a number field. Returns NULL with *out set (NAN when the field
 * is empty or blank), or a static reason. alt_mark is ',' when a decimal
 * comma is allowed, else 0.
 */
static const char *parse_number(const char *s, size_t n, char alt_mark, double *out)
{
	while (n > 0 && is_blank(s[0])) {
		s++;
		n--;
	}
	while (n > 0 && is_blank(s[n - 1]))
		n--;
	if (n == 0) {
		*out = NAN;
		return NULL;
	}
	if (n > NUMBER_TEXT_MAX)
		return "text in a number field";
	size_t used;
	double v_plain;
	if (number_plain(s, n, alt_mark, &v_plain, &used) && used == n) {
		*out = v_plain;
		return NULL;
	}
	struct number_text t;
	if (!scan_number(s, n, alt_mark, &t))
		return "text in a number field";
	long e10 = t.exp - t.frac_digits;
	double v;
	if (t.mant == 0 && t.sig == 0) {
		v = 0.0;
	} else if (t.sig <= 19 && t.mant <= CLINGER_MANT_MAX && e10 >= -22 && e10 <= 22) {
		v = (double)t.mant;
		v = e10 >= 0 ? v * pow10_exact[e10] : v / pow10_exact[-e10];
	} else {
		v = number_slow(s, n, &t);
	}
	if (isinf(v))
		return "number out of range";
	*out = t.neg ? -v : v;
	return NULL;
}

/* ---- problems --------------------------------------------------------- */

static void note_problem(struct csvread *r, enum csvread_problem_kind kind, const char *reason)
{
	struct csvread_stats *st = &r->stats;
	assert(reason != NULL);
	switch (kind) {
	case CSVREAD_MALFORMED:
		st->rows_malformed++;
		if (st->first_bad_line == 0) {
			st->first_bad_line = r->line_no;
			st->first_bad_reason = reason;
		}
		break;
	case CSVREAD_UNSORTED:
		st->rows_unsorted++;
		break;
	case CSVREAD_DUPLICATE:
		st->rows_duplicate++;
		break;
	}
	if (st->problem_count < CSVREAD_PROBLEMS_MAX) {
		struct csvread_problem *p = &st->problems[st->problem_count++];
		p->line = r->line_no;
		p->kind = kind;
		p->reason = reason;
	}
}

const char *csvread_problem_kind_name(enum csvread_problem_kind kind)
{
	switch (kind) {
	case CSVREAD_MALFORMED:
		return "malformed";
	case CSVREAD_UNSORTED:
		return "unsorted";
	case CSVREAD_DUPLICATE:
		return "duplicate";
	}
	return "?";
}

/* ---- header ----------------------------------------------------------- */

/* The delimiter is whatever ends the first field: ',' or ';' (',' when the
 * header has a single column). */
static char detect_delim(const char *line, size_t len)
{
	size_t i = 0;
	while (i < len && is_blank(line[i]))
		i++;
	if (i < len && line[i] == '"') {
		for (i++; i < len; i++) {
			if (line[i] == '"' && (i + 1 >= len || line[i + 1] != '"'))
				break;
			if (line[i] == '"')
				i++;
		}
	}
	for (; i < len; i++)
		if (line[i] == ',' || line[i] == ';')
			return line[i];
	return ',';
}

/* Counts the header's fields; returns 0 with *count, or a static reason. */
static const char *count_fields(const char *line, size_t len, char delim, unsigned *count)
{
	size_t p = 0;
	bool last = false;
	unsigned n = 0;
	while (!last) {
		struct field f;
		const char *why = scan_field(line, len, &p, delim, &f, &last);
		if (why != NULL)
			return why;
		n++;
	}
	*count = n;
	return NULL;
}

/* Removes the "" escapes of a quoted name in place; returns the new length. */
static size_t unescape_quotes(char *s, size_t len)
{
	size_t w = 0;
	for (size_t i = 0; i < len; i++) {
		s[w++] = s[i];
		if (s[i] == '"' && i + 1 < len && s[i + 1] == '"')
			i++;
	}
	return w;
}

struct name_ref {
	const char *s;
	uint32_t len;
	uint32_t column;
};

static int name_ref_cmp(const void *a, const void *b)
{
	const struct name_ref *x = a;
	const struct name_ref *y = b;
	uint32_t n = x->len < y->len ? x->len : y->len;
	int c = memcmp(x->s, y->s, n);
	if (c != 0)
		return c;
	if (x->len != y->len)
		return x->len < y->len ? -1 : 1;
	return x->column < y->column ? -1 : (x->column > y->column ? 1 : 0);
}

/* Duplicate non-empty names are refused: which column would a tag mean? */
static int check_duplicates(struct csvread *r, char *err, size_t err_size)
{
	struct name_ref *refs = calloc(r->column_count, sizeof *refs);
	if (refs == NULL) {
		set_err(err, err_size, "%s: out of memory", r->path);
		return -ENOMEM;
	}
	unsigned n = 0;
	for (unsigned c = 0; c < r->column_count; c++) {
		if (r->name_len[c] == 0)
			continue;
		refs[n].s = r->header + r->name_start[c];
		refs[n].len = r->name_len[c];
		refs[n].column = c;
		n++;
	}
	qsort(refs, n, sizeof *refs, name_ref_cmp);
	int rc = 0;
	for (unsigned i = 1; i < n && rc == 0; i++) {
		const struct name_ref *a = &refs[i - 1];
		const struct name_ref *b = &refs[i];
		if (a->len != b->len || memcmp(a->s, b->s, b->len) != 0)
			continue;
		set_err(err, err_size,
			"%s:%llu: column name \"%.*s\" appears twice (columns %u and %u)", r->path,
			(unsigned long long)r->line_no, (int)(b->len > 64 ? 64 : b->len), b->s,
			a->column + 1, b->column + 1);
		rc = -EINVAL;
	}
	free(refs);
	return rc;
}

/* Splits the header copy into names; allocates the per-column arrays. */
static int split_header(struct csvread *r, size_t len, char *err, size_t err_size)
{
	unsigned count = 0;
	const char *why = count_fields(r->header, len, r->delim, &count);
	if (why != NULL) {
		set_err(err, err_size, "%s:%llu: header: %s", r->path,
			(unsigned long long)r->line_no, why);
		return -EINVAL;
	}
	r->column_count = count;
	r->name_start = calloc(count, sizeof *r->name_start);
	r->name_len = calloc(count, sizeof *r->name_len);
	r->slot_of_column = calloc(count, sizeof *r->slot_of_column);
	if (r->name_start == NULL || r->name_len == NULL || r->slot_of_column == NULL) {
		set_err(err, err_size, "%s: out of memory", r->path);
		return -ENOMEM;
	}
	size_t p = 0;
	bool last = false;
	for (unsigned c = 0; c < count; c++) {
		struct field f;
		bool quoted = false;
		size_t at = p;
		while (at < len && is_blank(r->header[at]))
			at++;
		quoted = at < len && r->header[at] == '"';
		why = scan_field(r->header, len, &p, r->delim, &f, &last);
		assert(why == NULL); /* count_fields() accepted the same line */
		if (quoted)
			f.len = unescape_quotes(r->header + f.start, f.len);
		r->name_start[c] = (uint32_t)f.start;
		r->name_len[c] = (uint32_t)f.len;
		r->slot_of_column[c] = -1;
	}
	assert(last);
	return 0;
}

static bool name_is(const struct csvread *r, unsigned c, const char *word)
{
	size_t n = strlen(word);
	return r->name_len[c] == n && strncasecmp(r->header + r->name_start[c], word, n) == 0;
}

/* The first column with one of the names (any case), or -1. */
static int column_named(const struct csvread *r, const char *const *words)
{
	for (unsigned c = 0; c < r->column_count; c++)
		for (unsigned w = 0; words[w] != NULL; w++)
			if (name_is(r, c, words[w]))
				return (int)c;
	return -1;
}

/* Finds the time column (by the configured name, else time/timestamp/date)
 * and, from the tag and value columns, whether the file is long. */
static int find_columns(struct csvread *r, char *err, size_t err_size)
{
	static const char *const time_words[] = {"time", "timestamp", "date", NULL};
	static const char *const tag_words[] = {"tag", "name", "tagname", NULL};
	static const char *const value_words[] = {"value", NULL};
	static const char *const status_words[] = {"status", "quality", NULL};
	const char *want = r->opts.time_column;
	int tc;
	if (want != NULL && want[0] != '\0') {
		const char *one[] = {want, NULL};
		tc = column_named(r, one);
	} else {
		tc = column_named(r, time_words);
	}
	if (tc < 0) {
		if (want != NULL && want[0] != '\0')
			set_err(err, err_size, "%s:%llu: no column \"%s\" ([replay] time_column) in "
					       "the header", r->path, (unsigned long long)r->line_no, want);
		else
			set_err(err, err_size, "%s:%llu: no time column: the header has no column "
					       "named time, timestamp or date (name yours with [replay] "
					       "time_column)", r->path, (unsigned long long)r->line_no);
		return -EINVAL;
	}
	r->time_col = (unsigned)tc;
	r->tag_col = column_named(r, tag_words);
	r->value_col = column_named(r, value_words);
	r->status_col = column_named(r, status_words);
	r->long_form = r->tag_col >= 0 && r->value_col >= 0;
	return 0;
}

/* Reads the first non-blank line as the header and checks it. */
static int read_header(struct csvread *r, char *err, size_t err_size)
{
	char *line;
	size_t len;
	int rc;
	while ((rc = next_line(r, &line, &len)) == 1 && is_blank_line(line, len))
		r->stats.lines_blank++;
	if (rc < 0) {
		set_err(err, err_size, "%s: read error: %s", r->path, strerror(-rc));
		return rc;
	}
	if (rc == 0) {
		set_err(err, err_size, "%s: empty file", r->path);
		return -ENODATA;
	}
	if (rc == LINE_TOO_LONG) {
		set_err(err, err_size, "%s:%llu: header longer than %d bytes", r->path,
			(unsigned long long)r->line_no, FG_CSV_LINE_MAX);
		return -EINVAL;
	}
	r->header = malloc(len + 1);
	if (r->header == NULL) {
		set_err(err, err_size, "%s: out of memory", r->path);
		return -ENOMEM;
	}
	memcpy(r->header, line, len);
	r->header[len] = '\0';
	r->delim = detect_delim(r->header, len);
	rc = split_header(r, len, err, err_size);
	if (rc == 0)
		rc = find_columns(r, err, err_size);
	if (rc == 0)
		rc = check_duplicates(r, err, err_size);
	return rc;
}

/* ---- public ----------------------------------------------------------- */

static int open_file(struct csvread *r, const char *path, char *err, size_t err_size)
{
	if (strcmp(path, "-") == 0) {
		r->f = stdin;
		r->owns_file = false;
	} else {
		r->f = fopen(path, "rb");
		if (r->f == NULL) {
			int e = errno != 0 ? errno : EIO;
			set_err(err, err_size, "%s: %s", path, strerror(e));
			return -e;
		}
		r->owns_file = true;
	}
	struct stat st;
	if (fstat(fileno(r->f), &st) == 0 && S_ISREG(st.st_mode))
		r->bytes_total = (uint64_t)st.st_size;
	return 0;
}

int csvread_open(struct csvread *r, const char *path, char *err, size_t err_size)
{
	return csvread_open_opts(r, path, NULL, err, err_size);
}

bool csvread_is_long(const struct csvread *r)
{
	assert(r != NULL);
	return r->long_form;
}

int csvread_open_opts(struct csvread *r, const char *path, const struct csvread_opts *opts,
		      char *err, size_t err_size)
{
	assert(r != NULL);
	assert(path != NULL);
	memset(r, 0, sizeof *r);
	if (opts != NULL)
		r->opts = *opts;
	set_err(err, err_size, "%s", "");
	size_t path_len = strlen(path);
	if (path_len >= sizeof r->path) {
		set_err(err, err_size, "%.64s...: path longer than %d bytes", path,
			FG_PATH_MAX - 1);
		return -ENAMETOOLONG;
	}
	memcpy(r->path, path, path_len + 1);
	r->delim = ',';
	r->buf = malloc(CSVREAD_BUF_SIZE);
	if (r->buf == NULL) {
		set_err(err, err_size, "%s: out of memory", path);
		return -ENOMEM;
	}
	int rc = open_file(r, path, err, err_size);
	if (rc == 0) {
		rc = fill(r);
		if (rc < 0)
			set_err(err, err_size, "%s: read error: %s", path, strerror(-rc));
	}
	if (rc == 0 && r->end >= 3 && memcmp(r->buf, "\xEF\xBB\xBF", 3) == 0)
		r->pos = 3; /* UTF-8 byte-order mark */
	if (rc == 0)
		rc = read_header(r, err, err_size);
	if (rc != 0)
		csvread_close(r);
	return rc;
}

void csvread_close(struct csvread *r)
{
	if (r == NULL)
		return;
	if (r->f != NULL && r->owns_file)
		fclose(r->f);
	free(r->buf);
	free(r->header);
	free(r->name_start);
	free(r->name_len);
	free(r->slot_of_column);
	free(r->name_order);
	memset(r, 0, sizeof *r);
}

static int find_column(const struct csvread *r, const char *name)
{
	size_t len = strlen(name);
	for (unsigned c = 0; c < r->column_count; c++)
		if (c != r->time_col && r->name_len[c] == len &&
		    memcmp(r->header + r->name_start[c], name, len) == 0)
			return (int)c;
	return -1;
}

/* Long form: the bound names sorted, for the lookup of each sample's tag. */
static const char *const *sort_names; /* qsort has no context argument */

static int slot_cmp(const void *a, const void *b)
{
	return strcmp(sort_names[*(const uint32_t *)a], sort_names[*(const uint32_t *)b]);
}

static int bind_long(struct csvread *r, const char *const *names, unsigned name_count,
		     char *err, size_t err_size)
{
	free(r->name_order);
	r->name_order = calloc(name_count > 0 ? name_count : 1, sizeof *r->name_order);
	if (r->name_order == NULL) {
		set_err(err, err_size, "%s: out of memory", r->path);
		return -ENOMEM;
	}
	for (unsigned i = 0; i < name_count; i++)
		r->name_order[i] = i;
	sort_names = names;
	qsort(r->name_order, name_count, sizeof *r->name_order, slot_cmp);
	sort_names = NULL;
	for (unsigned i = 1; i < name_count; i++)
		if (strcmp(names[r->name_order[i - 1]], names[r->name_order[i]]) == 0) {
			set_err(err, err_size, "%s: tag \"%s\" is asked for twice", r->path,
				names[r->name_order[i]]);
			return -EINVAL;
		}
	r->bound_names = names;
	return 0;
}

static int bind(struct csvread *r, const char *const *names, unsigned name_count, bool *found,
		char *err, size_t err_size)
{
	assert(r != NULL);
	assert(r->f != NULL);
	assert(names != NULL || name_count == 0);
	assert(name_count < FG_CSV_COLUMNS_MAX);
	r->bound = false;
	r->value_count = 0;
	for (unsigned c = 0; c < r->column_count; c++)
		r->slot_of_column[c] = -1;
	if (r->long_form) {
		int rc = bind_long(r, names, name_count, err, err_size);
		if (rc != 0)
			return rc;
		for (unsigned i = 0; found != NULL && i < name_count; i++)
			found[i] = true;
	}
	for (unsigned i = 0; i < name_count && !r->long_form; i++) {
		assert(names[i] != NULL);
		int c = find_column(r, names[i]);
		if (c < 0 && found != NULL) {
			found[i] = false;
			continue;
		}
		if (c < 0) {
			set_err(err, err_size, "%s: tag \"%s\" is not a column of the header",
				r->path, names[i]);
			return -ENOENT;
		}
		if (r->slot_of_column[c] >= 0) {
			set_err(err, err_size, "%s: tag \"%s\" is asked for twice", r->path,
				names[i]);
			return -EINVAL;
		}
		r->slot_of_column[c] = (int32_t)i;
		if (found != NULL)
			found[i] = true;
	}
	r->value_count = name_count;
	for (unsigned i = 0; i < name_count; i++)
		r->row[i] = NAN; /* a slot without a column stays missing */
	r->bound = true;
	return 0;
}

int csvread_bind(struct csvread *r, const char *const *names, unsigned name_count, char *err,
		 size_t err_size)
{
	return bind(r, names, name_count, NULL, err, err_size);
}

int csvread_bind_some(struct csvread *r, const char *const *names, unsigned name_count,
		      bool *found, char *err, size_t err_size)
{
	assert(found != NULL || name_count == 0);
	return bind(r, names, name_count, found, err, err_size);
}

/* ---- cells with text ---------------------------------------------------- */

bool csvread_status_is_good(const char *s, size_t len)
{
	static const char *const good[] = {"good", "ok", "valid", "normal", "192", NULL};
	while (len > 0 && is_blank(s[0])) {
		s++;
		len--;
	}
	while (len > 0 && is_blank(s[len - 1]))
		len--;
	if (len == 0)
		return true;
	for (unsigned i = 0; good[i] != NULL; i++)
		if (strlen(good[i]) == len && strncasecmp(s, good[i], len) == 0)
			return true;
	return false;
}

/* Records that bound slot holds text s[0..len) in this row (value NAN). A
 * second text for the same slot (long form) replaces the first. */
static void note_text(struct csvread *r, unsigned slot, const char *s, size_t len)
{
	assert(slot < r->value_count);
	while (len > 0 && is_blank(s[0])) {
		s++;
		len--;
	}
	while (len > 0 && is_blank(s[len - 1]))
		len--;
	unsigned k = 0;
	while (k < r->text_count && r->text_slot[k] != slot)
		k++;
	if (k == r->text_count)
		r->text_count++;
	assert(r->text_count <= FG_CSV_COLUMNS_MAX);
	if (len >= CSVREAD_TEXT_MAX)
		len = CSVREAD_TEXT_MAX - 1;
	r->text_slot[k] = slot;
	memcpy(r->text[k], s, len);
	r->text[k][len] = '\0';
	r->row[slot] = NAN;
	r->stats.cells_text++;
}

/* A good value for slot in a long file cancels an earlier text for it. */
static void drop_text(struct csvread *r, unsigned slot)
{
	for (unsigned k = 0; k < r->text_count; k++)
		if (r->text_slot[k] == slot) {
			r->text_count--;
			r->text_slot[k] = r->text_slot[r->text_count];
			memcpy(r->text[k], r->text[r->text_count], CSVREAD_TEXT_MAX);
			return;
		}
}

unsigned csvread_text_count(const struct csvread *r)
{
	assert(r != NULL);
	return r->text_count;
}

void csvread_text_at(const struct csvread *r, unsigned k, unsigned *slot, const char **text)
{
	assert(r != NULL);
	assert(k < r->text_count);
	*slot = r->text_slot[k];
	*text = r->text[k];
}

/* ---- rows ------------------------------------------------------------- */

/* The time of a field; an offset-less time is local in opts.tz if given. */
/* Is s an ISO time "YYYY-MM-DD?hh:mm:ss" with nothing but a fraction, a
 * zone or the end after the seconds (00-59)? Only then do the seconds sit
 * at 17-18 and count alone. */
static bool iso_seconds_at_17(const char *s, size_t len)
{
	return len >= 19 && len <= CSVREAD_TIME_TEXT_MAX && s[4] == '-' && s[7] == '-' &&
	       s[13] == ':' && s[16] == ':' && s[17] >= '0' && s[17] <= '5' && is_digit(s[18]) &&
	       (len == 19 || !is_digit(s[19]));
}

/*
 * timefmt_parse_zoned with the last text kept: a time that differs from the
 * last one in its two seconds digits alone (the usual next row of a record
 * at a second or more) reads as the last time plus the difference. The
 * parse is a pure function of the text, and the seconds count in it as
 * s x 1000 ms whatever the rest says, so this is what the parse would
 * give (test_csvread compares the two on 3 000 rows in four ISO forms).
 */
static int parse_time_text(struct csvread *r, const char *s, size_t len, int64_t *t_ms,
			   bool *zoned)
{
	const char *k = r->time_text;
	if (len == r->time_len && iso_seconds_at_17(s, len) && memcmp(s, k, 17) == 0 &&
	    memcmp(s + 19, k + 19, len - 19) == 0) {
		int now = (s[17] - '0') * 10 + (s[18] - '0');
		int was = (k[17] - '0') * 10 + (k[18] - '0');
		*t_ms = r->time_t_ms + (int64_t)(now - was) * 1000;
		*zoned = r->time_zoned;
		return 0;
	}
	int rc = timefmt_parse_zoned(s, len, t_ms, zoned);
	r->time_len = 0;
	if (rc == 0 && iso_seconds_at_17(s, len)) {
		memcpy(r->time_text, s, len);
		r->time_len = len;
		r->time_t_ms = *t_ms;
		r->time_zoned = *zoned;
	}
	return rc;
}

static const char *parse_time(struct csvread *r, const char *s, size_t len, int64_t *t_ms)
{
	bool zoned = true;
	if (parse_time_text(r, s, len, t_ms, &zoned) != 0)
		return "bad time";
	if (!zoned && r->opts.tz != NULL) {
		int64_t after = r->have_last ? r->last_t_ms : INT64_MIN;
		if (tzone_local_to_utc(r->opts.tz, *t_ms, after, t_ms) != 0)
			return "local time in the daylight-saving gap (it never happened)";
	}
	return NULL;
}

/* Parses one wide data row into r->row. Returns NULL or a static reason. */
static const char *parse_row(struct csvread *r, const char *line, size_t len, int64_t *t_ms)
{
	char alt_mark = r->delim == ';' ? ',' : 0;
	size_t p = 0;
	bool last = false;
	unsigned c = 0;
	r->text_count = 0;
	while (!last) {
		/* A bound number column holding a plain decimal right up to the
		 * delimiter (the usual cell) is read in the same pass that finds
		 * the delimiter; anything else is scanned as a field first. */
		if (c < r->column_count && c != r->time_col && r->slot_of_column[c] >= 0) {
			size_t used;
			double v;
			if (number_plain(line + p, len - p, alt_mark, &v, &used) &&
			    (p + used == len || line[p + used] == r->delim)) {
				r->row[r->slot_of_column[c]] = v;
				p += used;
				last = p == len;
				p += !last; /* past the delimiter */
				c++;
				continue;
			}
		}
		struct field f;
		const char *why = scan_field(line, len, &p, r->delim, &f, &last);
		if (why != NULL)
			return why;
		if (c >= r->column_count)
			return "more fields than the header";
		if (c == r->time_col) {
			why = parse_time(r, line + f.start, f.len, t_ms);
			if (why != NULL)
				return why;
		} else if (r->slot_of_column[c] >= 0) {
			unsigned slot = (unsigned)r->slot_of_column[c];
			if (parse_number(line + f.start, f.len, alt_mark, &r->row[slot]) != NULL)
				note_text(r, slot, line + f.start, f.len);
		}
		c++;
	}
	if (c < r->column_count)
		return "fewer fields than the header";
	return NULL;
}

/* Long form: the bind slot of tag name s[0..len), or -1. */
static int slot_of_name(const struct csvread *r, const char *s, size_t len)
{
	unsigned lo = 0, hi = r->value_count;
	while (lo < hi) {
		unsigned mid = lo + (hi - lo) / 2;
		const char *name = r->bound_names[r->name_order[mid]];
		int c = strncmp(name, s, len);
		if (c == 0) {
			/* Equal so far. strncmp also stops at a NUL inside s (a NUL
			 * byte in the data): then name is shorter than len and must
			 * not be read past its end. */
			size_t name_len = strnlen(name, len + 1);
			if (name_len != len)
				c = name_len < len ? -1 : 1;
		}
		if (c == 0)
			return (int)r->name_order[mid];
		if (c < 0)
			lo = mid + 1;
		else
			hi = mid;
	}
	return -1;
}

/* Long form: one line into a sample. Returns NULL or a static reason. */
static const char *parse_sample(struct csvread *r, const char *line, size_t len,
				struct csvread_sample *smp)
{
	char alt_mark = r->delim == ';' ? ',' : 0;
	struct field fv = {0, 0}, fs = {0, 0};
	size_t p = 0;
	bool last = false;
	unsigned c = 0;
	smp->slot = -1;
	smp->text = false;
	while (!last) {
		struct field f;
		const char *why = scan_field(line, len, &p, r->delim, &f, &last);
		if (why != NULL)
			return why;
		if (c >= r->column_count)
			return "more fields than the header";
		if (c == r->time_col) {
			why = parse_time(r, line + f.start, f.len, &smp->t_ms);
			if (why != NULL)
				return why;
		} else if ((int)c == r->tag_col) {
			smp->slot = slot_of_name(r, line + f.start, f.len);
		} else if ((int)c == r->value_col) {
			fv = f;
		} else if ((int)c == r->status_col) {
			fs = f;
		}
		c++;
	}
	if (c < r->column_count)
		return "fewer fields than the header";
	if (smp->slot < 0)
		return NULL;
	const char *text = NULL;
	size_t text_len = 0;
	if (r->status_col >= 0 && !csvread_status_is_good(line + fs.start, fs.len)) {
		text = line + fs.start;
		text_len = fs.len;
	} else if (parse_number(line + fv.start, fv.len, alt_mark, &smp->value) != NULL) {
		text = line + fv.start;
		text_len = fv.len;
	}
	if (text != NULL) {
		smp->text = true;
		smp->value = NAN;
		if (text_len >= CSVREAD_TEXT_MAX)
			text_len = CSVREAD_TEXT_MAX - 1;
		memcpy(smp->text_buf, text, text_len);
		smp->text_buf[text_len] = '\0';
	}
	return NULL;
}

/* Long form: puts a sample into the row being gathered. */
static void apply_sample(struct csvread *r, const struct csvread_sample *smp)
{
	if (smp->slot < 0) {
		r->stats.samples_unbound++;
		return;
	}
	unsigned slot = (unsigned)smp->slot;
	if (smp->text) {
		note_text(r, slot, smp->text_buf, strlen(smp->text_buf));
	} else {
		drop_text(r, slot);
		r->row[slot] = smp->value;
	}
}

static void start_row(struct csvread *r)
{
	for (unsigned i = 0; i < r->value_count; i++)
		r->row[i] = NAN;
	r->text_count = 0;
}

/* Reads the next line that is not blank. Returns 1 with the line, 0 at the
 * end, a negative errno, or LINE_TOO_LONG (already counted). */
static int next_data_line(struct csvread *r, char **line, size_t *len)
{
	for (;;) {
		int rc = next_line(r, line, len);
		if (rc <= 0)
			return rc;
		if (rc == LINE_TOO_LONG) {
			r->stats.rows_read++;
			note_problem(r, CSVREAD_MALFORMED, "line longer than FG_CSV_LINE_MAX");
			continue;
		}
		if (is_blank_line(*line, *len)) {
			r->stats.lines_blank++;
			continue;
		}
		r->stats.rows_read++;
		return 1;
	}
}

/* Long form: gathers the samples of the next time stamp into r->row.
 * Returns 1 with *t_ms, 0 at the end, or a negative errno. */
static int next_long(struct csvread *r, int64_t *t_ms)
{
	bool have_row = false;
	int64_t row_t = 0;
	if (r->carry.held) {
		start_row(r);
		have_row = true;
		row_t = r->carry.t_ms;
		apply_sample(r, &r->carry);
		r->carry.held = false;
	}
	for (;;) {
		char *line;
		size_t len;
		int rc = next_data_line(r, &line, &len);
		if (rc < 0)
			return rc;
		if (rc == 0)
			break;
		struct csvread_sample smp;
		const char *why = parse_sample(r, line, len, &smp);
		if (why != NULL) {
			note_problem(r, CSVREAD_MALFORMED, why);
			continue;
		}
		if ((r->have_last && smp.t_ms <= r->last_t_ms) || (have_row && smp.t_ms < row_t)) {
			note_problem(r, CSVREAD_UNSORTED, "time out of order");
			continue;
		}
		if (have_row && smp.t_ms > row_t) {
			r->carry = smp;
			r->carry.held = true;
			break;
		}
		if (!have_row) {
			start_row(r);
			have_row = true;
			row_t = smp.t_ms;
		}
		apply_sample(r, &smp);
	}
	if (!have_row)
		return 0;
	*t_ms = row_t;
	return 1;
}

/* Wide form: the next row that is good and in order. */
static int next_wide(struct csvread *r, int64_t *t_ms)
{
	for (;;) {
		char *line;
		size_t len;
		int rc = next_data_line(r, &line, &len);
		if (rc <= 0)
			return rc;
		int64_t t = 0;
		const char *why = parse_row(r, line, len, &t);
		if (why != NULL) {
			note_problem(r, CSVREAD_MALFORMED, why);
			continue;
		}
		if (r->have_last && t <= r->last_t_ms) {
			bool dup = t == r->last_t_ms;
			note_problem(r, dup ? CSVREAD_DUPLICATE : CSVREAD_UNSORTED,
				     dup ? "duplicate time" : "time out of order");
			continue;
		}
		*t_ms = t;
		return 1;
	}
}

int csvread_next(struct csvread *r, int64_t *t_ms, double *values, unsigned value_count)
{
	assert(r != NULL);
	assert(r->f != NULL);
	assert(r->bound);
	assert(t_ms != NULL);
	assert(value_count == r->value_count);
	assert(values != NULL || value_count == 0);
	int64_t t = 0;
	int rc = r->long_form ? next_long(r, &t) : next_wide(r, &t);
	if (rc != 1)
		return rc;
	r->have_last = true;
	r->last_t_ms = t;
	r->stats.rows_returned++;
	*t_ms = t;
	if (value_count > 0)
		memcpy(values, r->row, value_count * sizeof *values);
	return 1;
}

int csvread_progress(const struct csvread *r, uint64_t *bytes_done, uint64_t *bytes_total)
{
	assert(r != NULL);
	assert(bytes_done != NULL);
	assert(bytes_total != NULL);
	*bytes_done = r->buf_offset + r->pos;
	*bytes_total = r->bytes_total;
	return 0;
}

const struct csvread_stats *csvread_stats(const struct csvread *r)
{
	assert(r != NULL);
	return &r->stats;
}
