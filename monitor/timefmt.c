/*
 * timefmt.c - ISO 8601 / epoch-seconds time stamps to and from t_ms.
 *
 * How the calendar arithmetic is built: dates are counted in "March years"
 * that start on 1 March, so the leap day, when there is one, is the last day
 * of the year and every month before it has a fixed length. The days before
 * March year Y (counted from 0000-03-01) are then 365 Y plus the number of
 * leap years 1..Y, which the Gregorian rule (divisible by 4, except
 * centuries, except multiples of 400) gives as Y/4 - Y/100 + Y/400 with
 * floor division. 1970-01-01 is day 719468 of that count (the test pins this
 * against the POSIX epoch values). The inverse estimates Y from the mean year
 * of 146097/400 days and corrects by at most one year.
 *
 * Parsing never reads past len, never allocates and never consults the
 * locale, so it can run on every CSV row.
 */
#include "timefmt.h"

#include <assert.h>
#include <errno.h>
#include <stdbool.h>

#define MS_PER_S 1000LL
#define MS_PER_MIN 60000LL
#define MS_PER_H 3600000LL
#define MS_PER_DAY 86400000LL

/* Day number of 1970-01-01 when 0000-03-01 is day 0. */
#define DAYS_0000_03_01_TO_EPOCH 719468LL

/* Days in 400 Gregorian years: 400 * 365 + 97 leap days. */
#define DAYS_PER_400Y 146097LL

/* Days of a March year before each month; index 0 is March, 11 February. */
static const unsigned march_month_start[12] = {
	0, 31, 61, 92, 122, 153, 184, 214, 245, 275, 306, 337,
};

static int64_t floor_div(int64_t a, int64_t b)
{
	assert(b > 0);
	int64_t q = a / b;
	if (a % b != 0 && a < 0)
		q -= 1;
	return q;
}

/* Days from 0000-03-01 to the first day (1 March) of March year y. */
static int64_t march_year_start(int64_t y)
{
	return 365 * y + floor_div(y, 4) - floor_div(y, 100) + floor_div(y, 400);
}

static bool is_leap(int64_t year)
{
	return (year % 4 == 0 && year % 100 != 0) || year % 400 == 0;
}

unsigned timefmt_days_in_month(int64_t year, unsigned month)
{
	static const unsigned len[12] = { 31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31 };
	assert(month >= 1);
	assert(month <= 12);
	if (month == 2 && is_leap(year))
		return 29;
	return len[month - 1];
}

int64_t timefmt_days_from_civil(int64_t year, unsigned month, unsigned day)
{
	assert(month >= 1);
	assert(month <= 12);
	assert(day >= 1);
	assert(day <= 31);
	/* Keep 365 * y far from overflow; the public range is 0000..9999. */
	assert(year > -1000000000LL);
	assert(year < 1000000000LL);
	int64_t y = month <= 2 ? year - 1 : year;
	unsigned mp = month <= 2 ? month + 9 : month - 3;
	int64_t z = march_year_start(y) + march_month_start[mp] + (day - 1);
	return z - DAYS_0000_03_01_TO_EPOCH;
}

void timefmt_civil_from_days(int64_t days, int64_t *year, unsigned *month, unsigned *day)
{
	assert(year != NULL);
	assert(month != NULL);
	assert(day != NULL);
	assert(days > -100000000000LL);
	assert(days < 100000000000LL);
	int64_t z = days + DAYS_0000_03_01_TO_EPOCH;
	int64_t y = floor_div(z * 400, DAYS_PER_400Y);
	/* The estimate is within one year: march_year_start() stays within two
	 * days of 365.2425 y. Two bounded corrections. */
	for (int i = 0; i < 2 && march_year_start(y) > z; i++)
		y--;
	for (int i = 0; i < 2 && march_year_start(y + 1) <= z; i++)
		y++;
	assert(march_year_start(y) <= z);
	assert(march_year_start(y + 1) > z);
	unsigned doy = (unsigned)(z - march_year_start(y));
	unsigned mp = 11;
	while (march_month_start[mp] > doy)
		mp--;
	*day = doy - march_month_start[mp] + 1;
	*month = mp < 10 ? mp + 3 : mp - 9;
	*year = *month <= 2 ? y + 1 : y;
}

static bool is_digit(char c)
{
	return c >= '0' && c <= '9';
}

static bool is_blank(char c)
{
	return c == ' ' || c == '\t';
}

/* Reads n (1..4) decimal digits at s. Returns false if any is not a digit. */
static bool read_digits(const char *s, unsigned n, unsigned *out)
{
	assert(n >= 1);
	assert(n <= 4);
	unsigned v = 0;
	for (unsigned i = 0; i < n; i++) {
		if (!is_digit(s[i]))
			return false;
		v = v * 10 + (unsigned)(s[i] - '0');
	}
	*out = v;
	return true;
}

/*
 * Reads a fraction: the digits at s[*pos..len), at least one. Returns the
 * milliseconds rounded half up (may be 1000) or -1 when there is no digit.
 * Only the fourth digit decides the rounding (half up), so any number of
 * digits is accepted without overflow.
 */
static int64_t read_fraction_ms(const char *s, size_t len, size_t *pos)
{
	int64_t ms = 0;
	size_t i = *pos;
	size_t n = 0;
	while (i < len && is_digit(s[i])) {
		if (n < 3)
			ms = ms * 10 + (s[i] - '0');
		else if (n == 3 && s[i] >= '5')
			ms += 1; /* three digits held: round on the fourth */
		n++;
		i++;
	}
	if (n == 0)
		return -1;
	if (n == 1)
		ms *= 100;
	else if (n == 2)
		ms *= 10;
	/* With n >= 3 ms already holds three digits (and any rounding carry). */
	*pos = i;
	return ms;
}

/* Epoch seconds: [sign] digits [mark digits]. */
static int parse_epoch(const char *s, size_t len, int64_t *t_ms)
{
	size_t i = 0;
	bool neg = false;
	if (s[i] == '+' || s[i] == '-') {
		neg = s[i] == '-';
		i++;
	}
	int64_t sec = 0;
	size_t digits = 0;
	while (i < len && is_digit(s[i])) {
		if (sec > 0 || s[i] != '0')
			digits++;
		if (digits > 12) /* 9999-12-31 is 253402300799, twelve digits */
			return -EINVAL;
		sec = sec * 10 + (s[i] - '0');
		i++;
	}
	if (i == 0 || !is_digit(s[i - 1]))
		return -EINVAL;
	int64_t frac_ms = 0;
	if (i < len && (s[i] == '.' || s[i] == ',')) {
		i++;
		frac_ms = read_fraction_ms(s, len, &i);
		if (frac_ms < 0)
			return -EINVAL;
	}
	if (i != len)
		return -EINVAL;
	int64_t ms = sec * MS_PER_S + frac_ms;
	if (neg)
		ms = -ms;
	if (ms < TIMEFMT_MIN_MS || ms > TIMEFMT_MAX_MS)
		return -EINVAL;
	*t_ms = ms;
	return 0;
}

/* Zone designator at s[pos..len): "", Z, +HH, +HHMM, +HH:MM (or '-').
 * Sets *offset_ms to what must be subtracted from the local time. */
static int parse_zone(const char *s, size_t len, size_t pos, int64_t *offset_ms)
{
	*offset_ms = 0;
	if (pos == len)
		return 0; /* no zone: taken as UTC (see timefmt.h) */
	if (s[pos] == 'Z' || s[pos] == 'z')
		return pos + 1 == len ? 0 : -EINVAL;
	if (s[pos] != '+' && s[pos] != '-')
		return -EINVAL;
	int64_t sign = s[pos] == '-' ? -1 : 1;
	size_t rest = len - pos - 1;
	const char *z = s + pos + 1;
	unsigned oh = 0;
	unsigned om = 0;
	if (rest == 2) {
		if (!read_digits(z, 2, &oh))
			return -EINVAL;
	} else if (rest == 4) {
		if (!read_digits(z, 2, &oh) || !read_digits(z + 2, 2, &om))
			return -EINVAL;
	} else if (rest == 5) {
		if (!read_digits(z, 2, &oh) || z[2] != ':' || !read_digits(z + 3, 2, &om))
			return -EINVAL;
	} else {
		return -EINVAL;
	}
	if (oh > 23 || om > 59)
		return -EINVAL;
	*offset_ms = sign * ((int64_t)oh * MS_PER_H + (int64_t)om * MS_PER_MIN);
	return 0;
}

/* "YYYY-MM-DD?HH:MM[:SS[.f]][zone]" with ? one of T, t, space. *zoned says
 * whether a zone designator was given; without one the wall-clock time is
 * returned as if it were UTC. */
static int parse_iso(const char *s, size_t len, int64_t *t_ms, bool *zoned)
{
	unsigned y, mo, d, h, mi, sec = 0;
	if (len < 16)
		return -EINVAL;
	if (!read_digits(s, 4, &y) || s[4] != '-' || !read_digits(s + 5, 2, &mo) || s[7] != '-' ||
	    !read_digits(s + 8, 2, &d))
		return -EINVAL;
	if (s[10] != 'T' && s[10] != 't' && s[10] != ' ')
		return -EINVAL;
	if (!read_digits(s + 11, 2, &h) || s[13] != ':' || !read_digits(s + 14, 2, &mi))
		return -EINVAL;
	size_t pos = 16;
	int64_t frac_ms = 0;
	if (pos < len && s[pos] == ':') { /* seconds are optional: HH:MM is a whole minute */
		if (len < 19 || !read_digits(s + 17, 2, &sec))
			return -EINVAL;
		pos = 19;
		if (pos < len && (s[pos] == '.' || s[pos] == ',')) {
			pos++;
			frac_ms = read_fraction_ms(s, len, &pos);
			if (frac_ms < 0)
				return -EINVAL;
		}
	}
	if (mo < 1 || mo > 12 || d < 1 || d > timefmt_days_in_month(y, mo))
		return -EINVAL;
	if (h > 23 || mi > 59 || sec > 60)
		return -EINVAL;
	int64_t offset_ms;
	if (parse_zone(s, len, pos, &offset_ms) != 0)
		return -EINVAL;
	int64_t ms = timefmt_days_from_civil(y, mo, d) * MS_PER_DAY + (int64_t)h * MS_PER_H +
		     (int64_t)mi * MS_PER_MIN + (int64_t)sec * MS_PER_S + frac_ms - offset_ms;
	if (ms < TIMEFMT_MIN_MS || ms > TIMEFMT_MAX_MS)
		return -EINVAL;
	*t_ms = ms;
	*zoned = pos < len;
	return 0;
}

int timefmt_parse_zoned(const char *s, size_t len, int64_t *t_ms, bool *zoned)
{
	assert(s != NULL || len == 0);
	assert(t_ms != NULL);
	assert(zoned != NULL);
	while (len > 0 && is_blank(s[0])) {
		s++;
		len--;
	}
	while (len > 0 && is_blank(s[len - 1]))
		len--;
	if (len == 0)
		return -EINVAL;
	/* An ISO date has its first '-' at index 4 after four digits; an epoch
	 * number never has a '-' after its first character. */
	if (len >= 5 && s[4] == '-' && is_digit(s[0]))
		return parse_iso(s, len, t_ms, zoned);
	int rc = parse_epoch(s, len, t_ms);
	if (rc == 0)
		*zoned = true; /* epoch seconds are UTC by definition */
	return rc;
}

int timefmt_parse(const char *s, size_t len, int64_t *t_ms)
{
	bool zoned;
	return timefmt_parse_zoned(s, len, t_ms, &zoned);
}

static char *put_digits(char *p, unsigned v, unsigned n)
{
	for (unsigned i = n; i > 0; i--) {
		p[i - 1] = (char)('0' + v % 10);
		v /= 10;
	}
	return p + n;
}

int timefmt_format(int64_t t_ms, char *buf, size_t buf_size)
{
	assert(buf != NULL || buf_size == 0);
	if (t_ms < TIMEFMT_MIN_MS || t_ms > TIMEFMT_MAX_MS) {
		if (buf_size > 0)
			buf[0] = '\0';
		return -ERANGE;
	}
	int64_t days = floor_div(t_ms, MS_PER_DAY);
	int64_t ms_of_day = t_ms - days * MS_PER_DAY;
	assert(ms_of_day >= 0);
	assert(ms_of_day < MS_PER_DAY);
	unsigned ms = (unsigned)(ms_of_day % 1000);
	size_t need = ms != 0 ? 24 : 20;
	if (buf_size < need + 1) {
		if (buf_size > 0)
			buf[0] = '\0';
		return -ENOSPC;
	}
	int64_t year;
	unsigned month, day;
	timefmt_civil_from_days(days, &year, &month, &day);
	assert(year >= 0);
	assert(year <= 9999);
	unsigned s_of_day = (unsigned)(ms_of_day / 1000);
	char *p = put_digits(buf, (unsigned)year, 4);
	*p++ = '-';
	p = put_digits(p, month, 2);
	*p++ = '-';
	p = put_digits(p, day, 2);
	*p++ = 'T';
	p = put_digits(p, s_of_day / 3600, 2);
	*p++ = ':';
	p = put_digits(p, s_of_day / 60 % 60, 2);
	*p++ = ':';
	p = put_digits(p, s_of_day % 60, 2);
	if (ms != 0) {
		*p++ = '.';
		p = put_digits(p, ms, 3);
	}
	*p++ = 'Z';
	*p = '\0';
	assert((size_t)(p - buf) == need);
	return (int)need;
}
