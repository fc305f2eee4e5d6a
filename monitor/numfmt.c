/*
 * numfmt.c - see numfmt.h.
 */
#include "numfmt.h"

#include <assert.h>
#include <math.h>
#include <stdio.h>
#include <stdbool.h>
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

/*
 * The fast path of numfmt_full, without printf: exact integer arithmetic in
 * 128 bits (a GCC and clang extension) gives the same text as the printf
 * loop below for values in [2^-18, 1e14) (about 3.8e-6 to 1e14), where
 * results live; anything else returns -1 and takes the printf loop.
 *
 * v = M 2^-s exactly (M the 53-bit significand, 1 <= s <= 70). For P
 * significant digits and decimal exponent e, the digits are the integer
 * q = round(M 10^k / 2^s), k = P - 1 - e (0 <= k <= 22), rounded half to
 * even on the exact value, as glibc's printf rounds it: one product gives
 * the 17 digits truncated and the exact rest below them, from which the
 * 15- and 16-digit roundings follow with 64-bit division.
 * q reads back as v when the decimal q 10^-k lies within half an ulp of v:
 * |2 q 2^s - 2 M 10^k| <= 10^k (strictly when M is odd, ties going to the
 * even significand). Bounds: M 10^22 < 2^127, 2 q 2^s < 2^126 for P <= 16.
 * A significand of exactly 2^52 (an ulp below it half as wide) takes the
 * printf loop too.
 */
typedef unsigned __int128 u128;

static const uint64_t POW10[23] = {
	1u, 10u, 100u, 1000u, 10000u, 100000u, 1000000u, 10000000u, 100000000u, 1000000000u,
	10000000000u, 100000000000u, 1000000000000u, 10000000000000u, 100000000000000u,
	1000000000000000u, 10000000000000000u, 100000000000000000u, 1000000000000000000u,
	10000000000000000000u, 0, 0, 0, /* 10^20.. do not fit 64 bits: see pow10_128 */
};

static u128 pow10_128(int k)
{
	assert(k >= 0 && k <= 22);
	if (k <= 19)
		return POW10[k];
	return (u128)POW10[19] * POW10[k - 19];
}

static bool reads_back(uint64_t m, int s, uint64_t q, int k)
{
	u128 a = ((u128)q << 1) << s;
	u128 b = ((u128)m << 1) * pow10_128(k);
	u128 d = a > b ? a - b : b - a, lim = pow10_128(k);
	return (m & 1u) ? d < lim : d <= lim;
}

/* "%.Pg" layout of the P digits q (value q 10^(e - P + 1)). */
static int layout(char *buf, bool neg, uint64_t q, int p, int e)
{
	char d[20];
	for (int i = p - 1; i >= 0; i--) {
		d[i] = (char)('0' + q % 10);
		q /= 10;
	}
	int n = p;
	while (n > 1 && d[n - 1] == '0')
		n--;
	char *o = buf;
	if (neg)
		*o++ = '-';
	if (e < -4 || e >= p) {
		*o++ = d[0];
		if (n > 1) {
			*o++ = '.';
			memcpy(o, d + 1, (size_t)(n - 1));
			o += n - 1;
		}
		*o++ = 'e';
		*o++ = e < 0 ? '-' : '+';
		int a = e < 0 ? -e : e;
		if (a >= 100)
			*o++ = (char)('0' + a / 100);
		*o++ = (char)('0' + a / 10 % 10);
		*o++ = (char)('0' + a % 10);
	} else if (e >= 0) {
		memcpy(o, d, (size_t)e + 1);
		o += e + 1;
		if (n > e + 1) {
			*o++ = '.';
			memcpy(o, d + e + 1, (size_t)(n - e - 1));
			o += n - e - 1;
		}
	} else {
		*o++ = '0';
		*o++ = '.';
		for (int i = 0; i < -e - 1; i++)
			*o++ = '0';
		memcpy(o, d, (size_t)n);
		o += n;
	}
	*o = '\0';
	return (int)(o - buf);
}

/* The P-digit rounding of the exact value t17 + frac (t17 its 17 digits
 * truncated, inexact: the fraction below them is not zero), half to even. */
static uint64_t round_from_17(uint64_t t17, bool inexact, int p)
{
	assert(p >= 15 && p < 17);
	uint64_t div = POW10[17 - p], q = t17 / div, r = t17 % div, half = div / 2;
	if (r > half || (r == half && (inexact || (q & 1u))))
		q++;
	return q;
}

static int full_fast(double v, char *buf)
{
	int ex;
	double f = frexp(fabs(v), &ex); /* |v| = f 2^ex, 0.5 <= f < 1 */
	uint64_t m = (uint64_t)ldexp(f, 53);
	int s = 53 - ex;
	if (s < 1 || s > 70 || m == (uint64_t)1 << 52)
		return -1;
	/* The exact decimal exponent: 10^e <= |v| < 10^(e+1), checked on the
	 * 17 digits truncated (log10 may be one off either way). */
	int e = (int)floor(log10(fabs(v)));
	u128 n = 0, t = 0;
	for (int tries = 0;; tries++) {
		int k = 16 - e;
		if (k < 0 || k > 22 || tries > 2)
			return -1;
		n = (u128)m * pow10_128(k);
		t = n >> s;
		if (t < POW10[16])
			e--;
		else if (t >= POW10[17])
			e++;
		else
			break;
	}
	if (e > 13) /* keeps k = p - 1 - e >= 0 below, a carry included */
		return -1;
	/* The 17 digits truncated and the exact rest give every rounding. */
	u128 rem = n & (((u128)1 << s) - 1), half = (u128)1 << (s - 1);
	for (int p = 15; p <= 17; p++) {
		int ep = e;
		uint64_t q;
		if (p == 17) {
			q = (uint64_t)t;
			if (rem > half || (rem == half && (q & 1u)))
				q++;
		} else {
			q = round_from_17((uint64_t)t, rem != 0, p);
		}
		if (q == POW10[p]) { /* rounded up to the next power of ten */
			q = POW10[p - 1];
			ep++;
		}
		assert(q >= POW10[p - 1] && q < POW10[p]);
		if (p == 17 || reads_back(m, s, q, p - 1 - ep))
			return layout(buf, v < 0.0, q, p, ep);
	}
	return -1;
}

int numfmt_full(double v, char *buf, size_t buf_size)
{
	assert(buf != NULL);
	assert(buf_size >= NUMFMT_FULL_SIZE);
	assert(isfinite(v));
	if (v == 0.0)
		v = 0.0; /* no "-0" */
	int n = v != 0.0 ? full_fast(v, buf) : -1;
	if (n > 0)
		return n;
	return numfmt_full_printf(v, buf, buf_size);
}

int numfmt_full_printf(double v, char *buf, size_t buf_size)
{
	assert(buf != NULL);
	assert(buf_size >= NUMFMT_FULL_SIZE);
	assert(isfinite(v));
	if (v == 0.0)
		v = 0.0;
	int n = 0;
	for (int digits = 15; digits <= 17; digits++) {
		n = snprintf(buf, buf_size, "%.*g", digits, v);
		if (strtod(buf, NULL) == v)
			break;
	}
	assert(n > 0 && (size_t)n < buf_size);
	return n;
}

int numfmt_human(double v, const char *unit, char *buf, size_t buf_size)
{
	assert(buf != NULL);
	assert(buf_size >= NUMFMT_FULL_SIZE);
	if (!isfinite(v))
		return snprintf(buf, buf_size, "-");
	bool pct = unit != NULL && strcmp(unit, "%") == 0;
	int n = snprintf(buf, buf_size, pct ? "%.1f" : "%.4g", v);
	if (strcmp(buf, "-0") == 0 || strcmp(buf, "-0.0") == 0) {
		memmove(buf, buf + 1, (size_t)n); /* the NUL moves too */
		n--;
	}
	return n;
}

int numfmt_duration(double s, char *buf, size_t buf_size)
{
	assert(buf != NULL);
	assert(buf_size >= NUMFMT_DURATION_SIZE);
	if (!isfinite(s) || fabs(s) > 9.2e15)
		return snprintf(buf, buf_size, "-");
	long long total = llround(fabs(s));
	const char *sign = s < 0.0 && total > 0 ? "-" : "";
	return snprintf(buf, buf_size, "%s%lld:%02lld:%02lld", sign, total / 3600,
			total / 60 % 60, total % 60);
}
