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
#if defined(__SSE2__)
#include <emmintrin.h>
#endif

/*
 * The fast path of numfmt_full, without printf: exact integer arithmetic in
 * 128 bits (a GCC and clang extension) gives the same text as the printf
 * loop below for |v| in [1e-16, 1e17), where results live; anything else
 * (zero, subnormals, tiny and huge values) returns -1 and takes the printf
 * loop, which defines the text.
 *
 * The double is taken apart by its bits: |v| = M 2^E2 with M the 53-bit
 * significand. For the decimal exponent e (10^e <= |v| < 10^(e+1)) and
 * k = 16 - e (0 <= k <= 32), the scaled value X = |v| 10^k lies in
 * [10^16, 10^17) and is exactly N / 2^sh with N = M 5^k (< 2^53 5^32 < 2^128)
 * and sh = -(E2 + k): its integer part t17 (the 17 digits truncated) and
 * the exact rest r = N mod 2^sh give every rounding that %.15g, %.16g and
 * %.17g make, half to even on the exact value as glibc's printf rounds.
 * e is estimated from E2 (floor(x log10 2) = (x 78913) >> 18 for
 * |x| <= 1650, as in Ryu) and is that or one more; t17 tells which.
 *
 * A P-digit candidate Q (in units of X: t17 + D with |D| <= 100) reads back
 * as v when it lies within half an ulp of v, H = 5^k 2^(-sh-1) in units of
 * X: 2 |D 2^sh - r| <= 5^k, strictly when M is odd (strtod's ties go to the
 * even significand). Below a power of two (M = 2^52) the gap to the next
 * double down is half as wide, and so is the bound on that side.
 * Bounds: sh <= 75, so |D 2^sh - r| < 2^83.
 */
typedef unsigned __int128 u128;

static const uint64_t POW10[20] = {
	1u, 10u, 100u, 1000u, 10000u, 100000u, 1000000u, 10000000u, 100000000u, 1000000000u,
	10000000000u, 100000000000u, 1000000000000u, 10000000000000u, 100000000000000u,
	1000000000000000u, 10000000000000000u, 100000000000000000u, 1000000000000000000u,
	10000000000000000000u,
};

/* 5^0..5^27, the powers of five that fit 64 bits (5^28 > 2^64). */
static const uint64_t POW5[28] = {
	1u, 5u, 25u, 125u, 625u, 3125u, 15625u, 78125u, 390625u, 1953125u, 9765625u,
	48828125u, 244140625u, 1220703125u, 6103515625u, 30517578125u, 152587890625u,
	762939453125u, 3814697265625u, 19073486328125u, 95367431640625u, 476837158203125u,
	2384185791015625u, 11920928955078125u, 59604644775390625u, 298023223876953125u,
	1490116119384765625u, 7450580596923828125u,
};

#define FAST_K_MAX 32 /* M 5^32 < 2^128 */
#define FAST_E_MIN (16 - FAST_K_MAX)
#define FAST_E_MAX 16

/* The doubles nearest 10^FAST_E_MIN..10^(FAST_E_MAX + 1), as the compiler
 * reads the literals (correctly rounded). */
static const double POW10_DBL[FAST_E_MAX - FAST_E_MIN + 2] = {
	1e-16, 1e-15, 1e-14, 1e-13, 1e-12, 1e-11, 1e-10, 1e-9, 1e-8, 1e-7, 1e-6, 1e-5,
	1e-4,  1e-3,  1e-2,  1e-1,  1e0,   1e1,   1e2,   1e3,  1e4,  1e5,  1e6,  1e7,
	1e8,   1e9,   1e10,  1e11,  1e12,  1e13,  1e14,  1e15, 1e16, 1e17,
};
_Static_assert(sizeof POW10_DBL / sizeof POW10_DBL[0] == 34, "10^-16..10^17");

static inline u128 pow5_128(int k)
{
	assert(k >= 0);
	assert(k <= FAST_K_MAX);
	if (k <= 27)
		return POW5[k];
	return (u128)POW5[27] * POW5[k - 27];
}

/* "00".."99": two digits at a time. */
static const char DIGIT_PAIRS[201] = "00010203040506070809101112131415161718192021222324252627282930"
				     "31323334353637383940414243444546474849505152535455565758596061"
				     "62636465666768697071727374757677787980818283848586878889909192"
				     "939495969798" "99";

/*
 * The 8 digits of x < 10^8 as the bytes of a 64-bit word, first digit in
 * the lowest byte, each byte the digit's value (add '0' to each for text):
 * x splits into two halves of 4 digits, each into two pairs, each pair into
 * two digits, all halves side by side in one word (division by 100 as
 * multiplication by 10486 / 2^20, by 10 as 103 / 2^10, exact in these
 * ranges: all 10^8 values were checked against printf once, test_numfmt
 * checks those below 10^6 and a sample above).
 */
static inline uint64_t digits8(uint32_t x)
{
	assert(x < 100000000u);
	uint64_t merged = (uint64_t)(x / 10000u) | ((uint64_t)(x % 10000u) << 32);
	uint64_t top = ((merged * 10486u) >> 20) & (((uint64_t)0x7f << 32) | 0x7fu);
	uint64_t bot = merged - 100u * top;
	uint64_t hundreds = (bot << 16) + top;
	uint64_t tens = (hundreds * 103u) >> 10;
	tens &= ((uint64_t)0xf << 48) | ((uint64_t)0xf << 32) | ((uint64_t)0xf << 16) | 0xfu;
	tens += (hundreds - 10u * tens) << 8;
	return tens;
}

#define ASCII_ZEROS8 0x3030303030303030u

#if !defined(__SSE2__)
/* Leading zero bits of x, 64 for 0. */
static inline int lz64(uint64_t x)
{
	return x != 0 ? __builtin_clzll(x) : 64;
}
#endif
#if !defined(__BYTE_ORDER__) || __BYTE_ORDER__ != __ORDER_LITTLE_ENDIAN__
#error "numfmt.c stores digit words in little-endian byte order"
#endif

void numfmt_digits8(uint32_t x, char out[9])
{
	uint64_t w = digits8(x) + ASCII_ZEROS8;
	memcpy(out, &w, 8);
	out[8] = '\0';
}

#if defined(__SSE2__)
/*
 * The 8 digits of x < 10^8 as the low 16-bit lanes of an SSE2 register,
 * first digit in lane 0, each lane the digit's value: x splits into
 * abcd and efgh (division by 10^4 as multiplication by 0xd1b71759 / 2^45),
 * each is spread over four lanes, divided there by 10^3, 10^2, 10 and 1
 * (multiplications by reciprocals, then by powers of two, keeping the high
 * halves) and the digit above subtracted ten times: the method of
 * W. Mula's SSE2 integer-to-text conversion. Exact for x < 10^8 (test_numfmt
 * checks it against printf: every value below 10^6 and a sample above).
 */
static inline __m128i digits8_sse2(uint32_t x)
{
	assert(x < 100000000u);
	const __m128i div10000 = _mm_set1_epi32((int)0xd1b71759u);
	const __m128i ten4 = _mm_set1_epi32(10000);
	/* 10^3, 10^2, 10, 1 as reciprocals (2^23 / 10^3 rounded up, ...) */
	const __m128i div_powers = _mm_setr_epi16(8389, 5243, 13108, (short)32768, 8389, 5243,
						  13108, (short)32768);
	/* the shifts that go with them: 2^-(23+2-16), 2^-(19+2-16), 2^-3, 2^-1 of 2^16 */
	const __m128i shift_powers = _mm_setr_epi16(1 << 7, 1 << 11, 1 << 13, (short)(1 << 15),
						    1 << 7, 1 << 11, 1 << 13, (short)(1 << 15));
	__m128i abcdefgh = _mm_cvtsi32_si128((int)x);
	__m128i abcd = _mm_srli_epi64(_mm_mul_epu32(abcdefgh, div10000), 45);
	__m128i efgh = _mm_sub_epi32(abcdefgh, _mm_mul_epu32(abcd, ten4));
	__m128i v1 = _mm_slli_epi64(_mm_unpacklo_epi16(abcd, efgh), 2); /* times 4 */
	__m128i v2a = _mm_unpacklo_epi16(v1, v1);
	__m128i v2 = _mm_unpacklo_epi32(v2a, v2a); /* abcd x4 in lanes 0-3, efgh x4 in 4-7 */
	__m128i v4 = _mm_mulhi_epu16(_mm_mulhi_epu16(v2, div_powers), shift_powers);
	/* a, ab, abc, abcd, e, ef, efg, efgh: less ten times the lane before */
	__m128i v6 = _mm_slli_epi64(_mm_mullo_epi16(v4, _mm_set1_epi16(10)), 16);
	return _mm_sub_epi16(v4, v6);
}
#endif

/* The 16 digits of x < 10^16 as text into out (16 bytes, no NUL);
 * returns how many of them are trailing zeros (16 for x = 0). */
static inline int digits16(uint64_t x, char *out)
{
	assert(x < 10000000000000000u);
	uint32_t hi = (uint32_t)(x / 100000000u), lo = (uint32_t)(x - (uint64_t)hi * 100000000u);
#if defined(__SSE2__)
	__m128i dg = _mm_packus_epi16(digits8_sse2(hi), digits8_sse2(lo));
	unsigned zeros = (unsigned)_mm_movemask_epi8(_mm_cmpeq_epi8(dg, _mm_setzero_si128()));
	_mm_storeu_si128((__m128i *)(void *)out, _mm_add_epi8(dg, _mm_set1_epi8('0')));
	/* bit i is digit i being zero: the run of ones from bit 15 down */
	return __builtin_clz(~(zeros << 16));
#else
	uint64_t w1 = digits8(hi), w2 = digits8(lo);
	uint64_t a1 = w1 + ASCII_ZEROS8, a2 = w2 + ASCII_ZEROS8;
	memcpy(out, &a1, 8);
	memcpy(out + 8, &a2, 8);
	/* the zero bytes at the top of the words */
	return w2 != 0 ? lz64(w2) / 8 : 8 + lz64(w1) / 8;
#endif
}

int numfmt_digits16(uint64_t x, char out[17])
{
	int tz = digits16(x, out);
	out[16] = '\0';
	return tz;
}

/*
 * "%.Pg" layout (15 <= P <= 17, trailing zeros dropped) of the value
 * Q 10^(e - 16), Q the 17 digits 10^16 <= Q < 10^17 (the P-digit result
 * times 10^(17 - P)). The text goes straight into the caller's buffer of
 * NUMFMT_FULL_SIZE bytes, by stores of fixed length (no calls, no byte
 * loops); bytes after the NUL up to 27 may be written too.
 */
__attribute__((always_inline)) static inline int layout(char *buf, bool neg, uint64_t Q,
						       int p, int e)
{
	assert(p >= 12); /* numfmt_sig12's 12, numfmt_full's 15..17 */
	assert(p <= 17);
	assert(Q >= POW10[16]);
	assert(Q < POW10[17]);
	uint64_t d0 = Q / POW10[16]; /* constant divisors: multiplications */
	/* the 17 digits, then '0's (read by the fixed-length copies below) */
	char d[40];
	d[0] = (char)('0' + d0);
	/* trailing zeros; the first digit is not zero */
	int n = 17 - digits16(Q - d0 * POW10[16], d + 1); /* significant digits, 1..P */
	uint64_t z8 = ASCII_ZEROS8;
	memcpy(d + 17, &z8, 8);
	memcpy(d + 25, &z8, 8);
	buf[0] = '-';
	char *o = buf + neg;
	int len;
	if (__builtin_expect(e < -4 || e >= p, 0)) {
		o[0] = d[0];
		o[1] = '.';
		memcpy(o + 2, d + 1, 16);
		len = n > 1 ? n + 1 : 1;
		o[len++] = 'e';
		o[len++] = e < 0 ? '-' : '+';
		int a = e < 0 ? -e : e;
		assert(a < 100); /* the fast paths' e is -16..17 */
		memcpy(o + len, DIGIT_PAIRS + 2 * (a % 100), 2);
		len += 2;
	} else if (e >= 0) {
		/* ddd.ddd: the digits, then those after the point one place on */
		memcpy(o, d, 16);
		o[16] = d[16];
		if (e < 8) /* up to 16 digits after the point */
			memcpy(o + e + 2, d + e + 1, 16);
		else /* up to 8 (the copy ends at byte 27 at most) */
			memcpy(o + e + 2, d + e + 1, 8);
		o[e + 1] = '.';
		len = n > e + 1 ? n + 1 : e + 1;
	} else {
		/* 0.000ddd: "0." and -e - 1 zeros, then the digits */
		static const char lead[8] = {'0', '.', '0', '0', '0', '0', '0', '0'};
		memcpy(o, lead, 8);
		memcpy(o + 1 - e, d, 16);
		o[17 - e] = d[16];
		len = 1 - e + n;
	}
	len += neg;
	assert(len < NUMFMT_FULL_SIZE);
	buf[len] = '\0';
	return len;
}

/* The P digits q, rounded up to 10^P or not, laid out. */
static int put_digits(char *buf, bool neg, uint64_t q, int p, int e)
{
	uint64_t Q = q * POW10[17 - p];
	if (Q == POW10[17]) { /* rounded up to the next power of ten */
		Q = POW10[16];
		e++;
	}
	return layout(buf, neg, Q, p, e);
}

/* The exact scaled value X = t17 + r / 2^sh of one double (see above). */
struct scaled {
	uint64_t t17; /* the 17 digits truncated, 10^16 <= t17 < 10^17 */
	u128 r;       /* the rest below them, in units of 2^-sh (0 when sh <= 0) */
	int sh;       /* binary point of N: X = N 2^-sh */
	u128 p5;      /* 5^k: twice the half-ulp, in units of 2^-sh */
	int shp;      /* max(sh, 0): the units of r and lim */
	u128 lim;     /* twice the half-ulp in units of 2^-shp: 5^k 2^max(-sh, 0) */
	uint64_t f58, lim58; /* r / 2^shp and lim / 2^shp, in units of 2^-58, truncated */
};

static inline bool scale(uint64_t m, int e2, int k, struct scaled *x)
{
	if (k < 0 || k > FAST_K_MAX)
		return false;
	u128 n = (u128)m * pow5_128(k);
	int sh = -(e2 + k);
	x->p5 = pow5_128(k);
	x->sh = sh;
	x->shp = sh > 0 ? sh : 0;
	x->lim = x->p5 << (sh < 0 ? -sh : 0);
	if (sh > 0) {
		assert(sh < 128);
		u128 t = n >> sh;
		if (t >= POW10[18]) /* caller retries with another k */
			t = POW10[18];
		x->t17 = (uint64_t)t;
		x->r = n & (((u128)1 << sh) - 1);
	} else {
		assert(-sh < 8);
		x->t17 = (uint64_t)(n << -sh);
		x->r = 0;
	}
	/* lim < 22.4 units of X, so lim58 < 2^63 */
	x->f58 = (uint64_t)(x->shp >= 58 ? x->r >> (x->shp - 58) : x->r << (58 - x->shp));
	x->lim58 = (uint64_t)(x->shp >= 58 ? x->lim >> (x->shp - 58) : x->lim << (58 - x->shp));
	return true;
}

/* Does t17 + d (in units of X) read back as the double M 2^E2 of x?
 * Exactly, in 128 bits, without branches (the answer is data, not a
 * pattern a branch predictor learns). */
static bool reads_back_exact(const struct scaled *x, int64_t d, bool m_odd, bool m_pow2)
{
	int64_t sign = d >> 63; /* -1 or 0; >> of a negative is arithmetic in GCC and clang */
	bool neg = sign != 0;
	/* a = |candidate - X| in units of 2^-shp; below: is it under X? */
	u128 dd = (u128)(uint64_t)((d ^ sign) - sign) << x->shp;
	bool lt = dd < x->r;
	/* selections by masks, which compilers keep free of branches */
	u128 lt_mask = -(u128)lt, neg_mask = -(u128)neg;
	u128 a_pos = ((x->r - dd) & lt_mask) | ((dd - x->r) & ~lt_mask);
	u128 a = ((dd + x->r) & neg_mask) | (a_pos & ~neg_mask);
	bool below = neg | lt;
	a <<= 1 + (below & m_pow2); /* the gap below a power of two is narrower */
	return a < x->lim + !m_odd; /* a <= lim when ties go to v (M even) */
}

/*
 * The same question in 64 bits, for the common case: the rest r and twice
 * the half-ulp (lim) as fixed point with 58 fraction bits, truncated (each
 * under one unit low), and |D| clamped to 14 (a candidate 13 or more off
 * never reads back: H < 11.2), so 4 a + 4 < 2^64. The error of a, scaled
 * by 2 or 4, is under 4 units, so the answer is certain outside a band of
 * a few units around lim; inside it (ties and their like) the exact test
 * decides.
 */
static inline bool reads_back(const struct scaled *x, int64_t d, bool m_pow2, bool *unsure)
{
	int64_t sign = d >> 63; /* -1 or 0; >> of a negative is arithmetic in GCC and clang */
	uint64_t ad = (uint64_t)((d ^ sign) - sign);
	ad = ad < 14u ? ad : 14u;
	uint64_t dd = ad << 58, f = x->f58;
	bool neg = sign != 0, lt = dd < f;
	uint64_t neg_mask = -(uint64_t)neg, lt_mask = -(uint64_t)lt; /* no branches */
	uint64_t a_pos = ((f - dd) & lt_mask) | ((dd - f) & ~lt_mask);
	uint64_t a = ((dd + f) & neg_mask) | (a_pos & ~neg_mask);
	a <<= 1 + ((neg | lt) & m_pow2); /* the gap below a power of two is narrower */
	bool yes = a + 4u < x->lim58, no = a > x->lim58 + 5u;
	*unsure = !(yes | no);
	return yes;
}

__attribute__((noinline)) static int full_fast(double v, char *buf)
{
	uint64_t bits;
	memcpy(&bits, &v, sizeof bits);
	int be = (int)((bits >> 52) & 0x7ffu);
	if (be == 0 || be == 0x7ff) /* zero, subnormal, not finite */
		return -1;
	uint64_t m = (bits & (((uint64_t)1 << 52) - 1)) | ((uint64_t)1 << 52);
	int e2 = be - 1075; /* |v| = m 2^e2, 2^52 <= m < 2^53 */
	int lg = e2 + 52;   /* 2^lg <= |v| < 2^(lg+1) */
	assert(lg > -1650 && lg < 1650);
	/* floor(lg log10 2); >> of a negative int is arithmetic in GCC and clang.
	 * e is that or one more: one comparison with the double nearest the
	 * next power of ten says which, without a branch (when |v| is that
	 * very double, e can still be one off: t17 shows it, below). */
	int e = (int)(((int64_t)lg * 78913) >> 18);
	if (e < FAST_E_MIN - 1 || e > FAST_E_MAX)
		return -1;
	e += fabs(v) >= POW10_DBL[e + 1 - FAST_E_MIN];
	struct scaled x;
	if (!scale(m, e2, 16 - e, &x))
		return -1;
	if (x.t17 >= POW10[17] || x.t17 < POW10[16]) { /* e was one off */
		e += x.t17 >= POW10[17] ? 1 : -1;
		if (!scale(m, e2, 16 - e, &x))
			return -1;
	}
	assert(x.t17 >= POW10[16]);
	assert(x.t17 < POW10[17]);
	bool m_odd = (m & 1u) != 0, m_pow2 = m == (uint64_t)1 << 52;
	/* %.15g, %.16g and %.17g: t17 rounded at 100, at 10 and at 1
	 * (constant divisors, so no division instruction), half to even on
	 * the exact value; then the shortest that reads back, chosen without
	 * branches. */
	bool inexact = x.r != 0;
	uint64_t q15 = x.t17 / 100u, r15 = x.t17 - q15 * 100u;
	q15 += (r15 > 50u) | ((r15 == 50u) & (inexact | (q15 & 1u)));
	uint64_t q16 = x.t17 / 10u, r16 = x.t17 - q16 * 10u;
	q16 += (r16 > 5u) | ((r16 == 5u) & (inexact | (q16 & 1u)));
	u128 half = x.sh > 0 ? (u128)1 << (x.sh - 1) : 1; /* r = 0 when sh <= 0 */
	uint64_t q17 = x.t17 + ((x.r > half) | ((x.r == half) & (x.t17 & 1u)));
	int64_t d15 = (int64_t)(q15 * 100u) - (int64_t)x.t17;
	int64_t d16 = (int64_t)(q16 * 10u) - (int64_t)x.t17;
	bool unsure15, unsure16;
	bool ok15 = reads_back(&x, d15, m_pow2, &unsure15);
	bool ok16 = reads_back(&x, d16, m_pow2, &unsure16);
	if (__builtin_expect(unsure15 | unsure16, 0)) { /* ties and their like */
		ok15 = reads_back_exact(&x, d15, m_odd, m_pow2);
		ok16 = reads_back_exact(&x, d16, m_odd, m_pow2);
	}
	/* q15 if it reads back, else q16 if it does, else q17 (which always
	 * does), by masks */
	uint64_t m15 = -(uint64_t)ok15, m16 = -(uint64_t)(ok16 & !ok15);
	uint64_t q = (q15 & m15) | (q16 & m16) | (q17 & ~(m15 | m16));
	int p = 17 - (ok15 | ok16) - ok15;
	return put_digits(buf, v < 0.0, q, p, e);
}

/* 5^0..5^32 as two words: 5^k = POW5_HI[k] 2^64 + POW5_LO[k]. */
#define P5_27 7450580596923828125u
static const uint64_t POW5_LO[FAST_K_MAX + 1] = {
	1u, 5u, 25u, 125u, 625u, 3125u, 15625u, 78125u, 390625u, 1953125u, 9765625u,
	48828125u, 244140625u, 1220703125u, 6103515625u, 30517578125u, 152587890625u,
	762939453125u, 3814697265625u, 19073486328125u, 95367431640625u, 476837158203125u,
	2384185791015625u, 11920928955078125u, 59604644775390625u, 298023223876953125u,
	1490116119384765625u, P5_27,
	(uint64_t)((u128)P5_27 * 5u), (uint64_t)((u128)P5_27 * 25u),
	(uint64_t)((u128)P5_27 * 125u), (uint64_t)((u128)P5_27 * 625u),
	(uint64_t)((u128)P5_27 * 3125u),
};
static const uint64_t POW5_HI[FAST_K_MAX + 1] = {
	[28] = (uint64_t)(((u128)P5_27 * 5u) >> 64), [29] = (uint64_t)(((u128)P5_27 * 25u) >> 64),
	[30] = (uint64_t)(((u128)P5_27 * 125u) >> 64), [31] = (uint64_t)(((u128)P5_27 * 625u) >> 64),
	[32] = (uint64_t)(((u128)P5_27 * 3125u) >> 64),
};

/* (hi 2^64 + lo) << s for 0 <= s < 64 (told to the compiler, which
 * otherwise selects on s >= 64 for a 128-bit shift by a variable). */
static inline u128 shl128(uint64_t hi, uint64_t lo, unsigned s)
{
	assert(s < 64);
	if (s >= 64)
		__builtin_unreachable(); /* so the shift is one shld and one shl */
	return (((u128)hi << 64) | lo) << s;
}

/*
 * Does t17 + d read back as v, when X = t17 + f 2^-64 exactly? lim_up
 * and lim_down are the distances (in units of 2^-64 of X) a candidate
 * above or below X must stay under: see full_fast64.
 */
static inline bool reads_back64(int64_t d, uint64_t f, u128 lim_up, u128 lim_down)
{
	if (d <= 0) /* |t17 + d - X| = -d + f */
		return (((u128)(uint64_t)-d << 64) | f) < lim_down;
	return (((u128)(uint64_t)d << 64) - f) < lim_up;
}

/*
 * The common case of the fast path, cheaper: when 0 < sh <= 64 (|v| from
 * about 1e-12 to 4.5e15) the whole fraction of X fits 64 bits, so X =
 * t17 + f 2^-64 exactly with t17 and f the two halves of N << (64 - sh),
 * and every rounding and read-back test is exact on (t17, f) without the
 * wider arithmetic of scale(). Returns -1 outside that range (full_fast
 * takes it).
 *
 * A candidate reads back when it lies within half the gap to the next
 * double on its side. The gap above is u = 5^k 2^-sh units of X, in units
 * of 2^-64 of X: 5^k 2^(64 - sh); below a power of two (M = 2^52) the gap
 * below is half as wide. 2 dist < u reads dist < ceil(u / 2), and
 * 4 dist < u reads dist < ceil(u / 4). A candidate (an integer in units of
 * X) is never exactly halfway here: the halfway points are X + u/2 =
 * (2M + 1) 5^k / 2^(sh+1) and X - u/4 = (4M - 1) 5^k / 2^(sh+2), odd over
 * a power of two with sh >= 1, so strtod's ties-to-even never decide.
 */
static inline int full_fast64(double v, char *buf)
{
	uint64_t bits;
	memcpy(&bits, &v, sizeof bits);
	int be = (int)((bits >> 52) & 0x7ffu);
	uint64_t m = (bits & (((uint64_t)1 << 52) - 1)) | ((uint64_t)1 << 52);
	int e2 = be - 1075; /* |v| = m 2^e2, 2^52 <= m < 2^53 (be != 0: checked below) */
	int lg = e2 + 52;
	int e = (int)(((int64_t)lg * 78913) >> 18); /* floor(lg log10 2), see full_fast */
	if (be == 0 || e < FAST_E_MIN - 1 || e > FAST_E_MAX)
		return -1;
	e += fabs(v) >= POW10_DBL[e + 1 - FAST_E_MIN];
	int k = 16 - e, sh = -(e2 + k);
	if (k < 0 || k > FAST_K_MAX || sh < 1 || sh > 64)
		return -1;
	unsigned s = (unsigned)(64 - sh);
	u128 n0 = (u128)m * POW5_LO[k]; /* m 5^k < 2^128 */
	uint64_t n_hi = (uint64_t)(n0 >> 64) + m * POW5_HI[k];
	u128 n = shl128(n_hi, (uint64_t)n0, s); /* X 2^64 < 10^18 2^64: no overflow */
	uint64_t t17 = (uint64_t)(n >> 64);
	if (__builtin_expect(t17 < POW10[16] || t17 >= POW10[17], 0))
		return -1; /* e one off (|v| next to a power of ten): full_fast */
	uint64_t f = (uint64_t)n;
	u128 lim = shl128(POW5_HI[k], POW5_LO[k], s);
	u128 lim_up = (lim + 1u) >> 1;
	u128 lim_down = m == (uint64_t)1 << 52 ? (lim + 3u) >> 2 : lim_up;
	/* %.15g, %.16g: t17 rounded at 100 and at 10, half to even on the
	 * exact value; %.17g: t17 and f rounded half to even. The 15-digit
	 * text is 12 or more from X when the last two digits of t17 are 12..87,
	 * and the half gap is under 10^17 / 2^53 < 11.2: it cannot read back. */
	bool inexact = f != 0;
	uint64_t q15 = t17 / 100u, r15 = t17 - q15 * 100u;
	uint64_t Q;
	int p;
	if (r15 - 12u > 75u) {
		q15 += (r15 > 50u) | ((r15 == 50u) & (inexact | (q15 & 1u)));
		Q = q15 * 100u;
		p = 15;
		if (reads_back64((int64_t)(Q - t17), f, lim_up, lim_down))
			goto done;
	}
	uint64_t q16 = t17 / 10u, r16 = t17 - q16 * 10u;
	q16 += (r16 > 5u) | ((r16 == 5u) & (inexact | (q16 & 1u)));
	Q = q16 * 10u;
	p = 16;
	if (!reads_back64((int64_t)(Q - t17), f, lim_up, lim_down)) {
		const uint64_t half = (uint64_t)1 << 63;
		Q = t17 + ((f > half) | ((f == half) & (t17 & 1u)));
		p = 17;
	}
done:
	/* Never rounded up to 10^17 here: the text would be 10^(e+1), and it
	 * reads back (17 digits always do), so v would be the double nearest
	 * 10^(e+1), which the comparison above counts in the next decade. */
	assert(Q < POW10[17]);
	return layout(buf, v < 0.0, Q, p, e);
}

int numfmt_full(double v, char *buf, size_t buf_size)
{
	assert(buf != NULL);
	assert(buf_size >= NUMFMT_FULL_SIZE);
	assert(isfinite(v));
	if (v == 0.0) { /* no "-0": what %.15g writes for +0 */
		memcpy(buf, "0", 2);
		return 1;
	}
	int n = full_fast64(v, buf);
	if (n > 0)
		return n;
	n = full_fast(v, buf);
	if (n > 0)
		return n;
	return numfmt_full_printf(v, buf, buf_size);
}

/* 10^0..10^22, each exactly a double. */
static const double EXACT_POW10[23] = {
	1e0,  1e1,  1e2,  1e3,  1e4,  1e5,  1e6,  1e7,  1e8,  1e9,  1e10, 1e11,
	1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22,
};

/* |v| scaled by 10^k, -22 <= k <= 22: one correctly rounded operation by an
 * exact power of ten. */
static inline double scale10(double a, int k)
{
	assert(k >= -22 && k <= 22);
	return k >= 0 ? a * EXACT_POW10[k] : a / EXACT_POW10[-k];
}

/*
 * The fast path of numfmt_sig12, for 10^-11 <= |v| < 10^33 (zero,
 * subnormals and the rest return -1 and take printf): Y = |v| 10^(11 - e),
 * e the decimal exponent of |v|, lies in [10^11, 10^12), and the 12 digits
 * are Y rounded to an integer, half to even as glibc's printf rounds the
 * exact value. 10^(11 - e) is an exact double for |11 - e| <= 22, so y, Y
 * computed by one multiplication or division, is Y correctly rounded:
 * |y - Y| <= ulp(y) / 2 <= 2^-14 (y < 2^40). y's fraction (exact: y and
 * its integer part are doubles of one binade) is then on the same side of
 * 1/2 as Y's unless it lies within 2^-14 of 1/2: those, ties among them,
 * go to printf (about one value in 8 000). e is estimated from the binary
 * exponent as in full_fast (floor(lg log10 2), the exponent of |v| or one
 * less) and y >= 10^12 says it was one less.
 */
static inline int sig12_fast(double v, char *buf)
{
	uint64_t bits;
	memcpy(&bits, &v, sizeof bits);
	int be = (int)((bits >> 52) & 0x7ffu);
	int lg = be - 1023; /* 2^lg <= |v| < 2^(lg+1) */
	int e = (int)(((int64_t)lg * 78913) >> 18);
	if (be == 0 || e < -11 || e > 32)
		return -1;
	double a = fabs(v);
	double y = scale10(a, 11 - e);
	if (y >= 1e12) { /* the estimate was one less */
		e++;
		y = scale10(a, 11 - e);
	}
	uint64_t q = (uint64_t)y;
	double frac = y - (double)q;
	if (__builtin_expect(fabs(frac - 0.5) <= 0x1p-14, 0))
		return -1; /* too near a tie to tell from y */
	q += frac > 0.5;
	if (q == POW10[12]) { /* rounded up to the next power of ten */
		q = POW10[11];
		e++;
	}
	assert(q >= POW10[11] && q < POW10[12]);
	return layout(buf, v < 0.0, q * POW10[5], 12, e);
}

int numfmt_sig12(double v, char *buf, size_t buf_size)
{
	assert(buf != NULL);
	assert(buf_size >= NUMFMT_FULL_SIZE);
	assert(isfinite(v));
	int n = sig12_fast(v, buf);
	if (n > 0)
		return n;
	return numfmt_sig12_printf(v, buf, buf_size);
}

int numfmt_sig12_printf(double v, char *buf, size_t buf_size)
{
	assert(buf != NULL);
	assert(buf_size >= NUMFMT_FULL_SIZE);
	assert(isfinite(v));
	if (v == 0.0)
		v = 0.0; /* no "-0" */
	int n = snprintf(buf, buf_size, "%.12g", v);
	assert(n > 0 && (size_t)n < buf_size);
	return n;
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
