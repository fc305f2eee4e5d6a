/*
 * test_numfmt.c - numbers in full for machines, rounded for people.
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>

#include <cmocka.h>
#include <float.h>
#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "numfmt.h"

/* Every double reads back exactly, in the fewest of 15..17 digits. */
static void test_full_round_trips(void **state)
{
	(void)state;
	const double v[] = {0.1, 1.0 / 3.0, 78.627212345678, 1e-300, -2.5e17, 101325.0,
			    21.7f, 0.30000000000000004};
	for (size_t i = 0; i < sizeof v / sizeof v[0]; i++) {
		char b[NUMFMT_FULL_SIZE];
		numfmt_full(v[i], b, sizeof b);
		assert_true(strtod(b, NULL) == v[i]);
	}
	char b[NUMFMT_FULL_SIZE];
	numfmt_full(0.1, b, sizeof b);
	assert_string_equal(b, "0.1");
	numfmt_full(1.0 / 3.0, b, sizeof b);
	assert_string_equal(b, "0.3333333333333333"); /* 16 digits suffice */
	numfmt_full(-0.0, b, sizeof b);
	assert_string_equal(b, "0");
}

static void test_human_rounds_percent_to_a_tenth(void **state)
{
	(void)state;
	char b[NUMFMT_FULL_SIZE];
	numfmt_human(78.6272, "%", b, sizeof b);
	assert_string_equal(b, "78.6");
	numfmt_human(1234.567, "Pa", b, sizeof b);
	assert_string_equal(b, "1235");
	numfmt_human(0.0423117, "-", b, sizeof b);
	assert_string_equal(b, "0.04231");
	numfmt_human(-0.01, "%", b, sizeof b);
	assert_string_equal(b, "0.0");
	numfmt_human(NAN, "%", b, sizeof b);
	assert_string_equal(b, "-");
}

static void test_duration_is_h_mm_ss(void **state)
{
	(void)state;
	char b[NUMFMT_DURATION_SIZE];
	numfmt_duration(0.0, b, sizeof b);
	assert_string_equal(b, "0:00:00");
	numfmt_duration(59.6, b, sizeof b);
	assert_string_equal(b, "0:01:00");
	numfmt_duration(3723.0, b, sizeof b);
	assert_string_equal(b, "1:02:03");
	numfmt_duration(90000.0, b, sizeof b); /* 25 h: hours are not wrapped into days */
	assert_string_equal(b, "25:00:00");
	numfmt_duration(-61.0, b, sizeof b);
	assert_string_equal(b, "-0:01:01");
	numfmt_duration(INFINITY, b, sizeof b);
	assert_string_equal(b, "-");
}

/* ---- the printf-free path of numfmt_full ------------------------------
 * It must give exactly the text of the printf definition
 * (numfmt_full_printf: the shortest of %.15g..%.17g that glibc's strtod
 * reads back), and that text must read back as the same double. */

static uint64_t rng = 0x853c49e6748fea9bu;

static const uint64_t POW10_TEST[17] = {
	1u, 10u, 100u, 1000u, 10000u, 100000u, 1000000u, 10000000u, 100000000u, 1000000000u,
	10000000000u, 100000000000u, 1000000000000u, 10000000000000u, 100000000000000u,
	1000000000000000u, 10000000000000000u,
};

static uint64_t next_u64(void)
{
	rng ^= rng >> 12;
	rng ^= rng << 25;
	rng ^= rng >> 27;
	return rng * 2685821657736338717u;
}

static void same_as_printf(double v)
{
	char fast[NUMFMT_FULL_SIZE], ref[NUMFMT_FULL_SIZE];
	int n = numfmt_full(v, fast, sizeof fast);
	numfmt_full_printf(v, ref, sizeof ref);
	if (strcmp(fast, ref) != 0)
		fail_msg("%.17g: fast \"%s\", printf \"%s\"", v, fast, ref);
	assert_int_equal(n, (int)strlen(fast));
	if (strtod(fast, NULL) != (v == 0.0 ? 0.0 : v))
		fail_msg("%.17g: \"%s\" does not read back", v, fast);
}

/* The value sets both formatters are checked on, each value given to
 * check (same_as_printf or sig12_as_printf). */
typedef void (*check_fn)(double v);

/* n random bit patterns, the finite ones. */
static void on_random_bits(check_fn check, int n)
{
	for (int i = 0; i < n; i++) {
		uint64_t bits = next_u64();
		double v;
		memcpy(&v, &bits, sizeof v);
		if (isfinite(v))
			check(v);
	}
}

/* n values of the size results have (1e-8..1e16, either sign), and short
 * decimals as a historian writes them (12.5, 0.0725, 2700) and thirds of
 * them. */
static void on_result_sized_values(check_fn check, int n)
{
	for (int i = 0; i < n; i++) {
		double mant = (double)(next_u64() >> 11) * 0x1p-53;
		double v = mant * pow(10.0, (double)((int)(next_u64() % 24) - 8));
		check(next_u64() & 1 ? v : -v);
		double s = (double)(next_u64() % 1000000) / pow(10.0, (double)(next_u64() % 9));
		check(s);
		check(s / 3.0);
	}
}

/* Every binade from 2^lo to 2^hi: per random significands of either
 * sign, the binade's ends and the values next to them. */
static void on_every_binade(check_fn check, int lo, int hi, int per)
{
	for (int b = lo; b <= hi; b++) {
		for (int i = 0; i < per; i++) {
			uint64_t m = (1ull << 52) | (next_u64() & ((1ull << 52) - 1));
			double v = ldexp((double)m, b - 52);
			check(i & 1 ? -v : v);
		}
		double first = ldexp(1.0, b), last = nextafter(ldexp(1.0, b + 1), 0.0);
		check(first);
		check(nextafter(first, INFINITY));
		check(last);
		check(nextafter(last, 0.0));
	}
}

static void test_full_fast_path_matches_printf_on_random_bits(void **state)
{
	(void)state;
	on_random_bits(same_as_printf, 300000);
}

static void test_full_fast_path_matches_printf_on_result_sized_values(void **state)
{
	(void)state;
	on_result_sized_values(same_as_printf, 1000000);
}

static void test_full_edge_values_match_printf(void **state)
{
	(void)state;
	for (int e = -323; e <= 308; e++) {
		char text[32];
		snprintf(text, sizeof text, "1e%d", e);
		double v = strtod(text, NULL);
		same_as_printf(v);
		same_as_printf(-v);
		same_as_printf(nextafter(v, 0.0));
		same_as_printf(nextafter(v, INFINITY));
	}
	for (int b = -80; b <= 60; b++) { /* powers of two: the wide-ulp edge */
		same_as_printf(ldexp(1.0, b));
		same_as_printf(nextafter(ldexp(1.0, b), 0.0));
		same_as_printf(nextafter(ldexp(1.0, b), INFINITY));
	}
	same_as_printf(DBL_TRUE_MIN);
	same_as_printf(nextafter(DBL_MIN, 0.0)); /* the largest subnormal */
	same_as_printf(DBL_MIN);
	same_as_printf(DBL_MAX);
	same_as_printf(0.1);
	same_as_printf(1.0 / 3.0);
	same_as_printf(9007199254740993.0);
	same_as_printf(-0.0);
	char out[NUMFMT_FULL_SIZE];
	numfmt_full(-0.0, out, sizeof out);
	assert_string_equal(out, "0");
	numfmt_full(74.25, out, sizeof out);
	assert_string_equal(out, "74.25");
	numfmt_full(1.5e-5, out, sizeof out);
	assert_string_equal(out, "1.5e-05");
}

/* Every double of the whole exponent range, not only the results' range:
 * a random exponent (uniform over the binades, so tiny and huge values are
 * as common as ordinary ones) and a random significand. */
static void test_full_matches_printf_across_the_exponent_range(void **state)
{
	(void)state;
	for (int i = 0; i < 150000; i++) {
		uint64_t exp = next_u64() % 2046u + 1u; /* normal binades 1..2046 */
		uint64_t bits = (next_u64() & ((1ull << 52) - 1)) | (exp << 52);
		if (i & 1)
			bits |= 1ull << 63;
		double v;
		memcpy(&v, &bits, sizeof v);
		same_as_printf(v);
	}
}

/* Subnormals (below DBL_MIN), every power of two with its neighbours (the
 * narrower gap below a power of two), and the edges of the fast path
 * (1e-16 and 1e17, where numfmt_full hands over to printf). */
static void test_full_subnormals_and_powers_of_two_match_printf(void **state)
{
	(void)state;
	for (int i = 0; i < 100000; i++) {
		uint64_t bits = next_u64() & ((1ull << 52) - 1); /* exponent field 0 */
		double v;
		memcpy(&v, &bits, sizeof v);
		same_as_printf(v);
		same_as_printf(-v);
	}
	for (int b = -1074; b <= 1023; b++) {
		double v = ldexp(1.0, b);
		same_as_printf(v);
		same_as_printf(nextafter(v, 0.0));
		same_as_printf(nextafter(v, INFINITY));
		same_as_printf(-v);
	}
	const char *edges[] = {"1e-16", "1e17", "9.999999999999999e-17", "9.99999999999999e16",
			       "1e16", "1e-5", "1e-4", "0.0001", "1e15"};
	for (size_t i = 0; i < sizeof edges / sizeof edges[0]; i++) {
		double v = strtod(edges[i], NULL);
		for (int k = 0; k < 40; k++) {
			same_as_printf(v);
			v = nextafter(v, INFINITY);
		}
		v = strtod(edges[i], NULL);
		for (int k = 0; k < 40; k++) {
			same_as_printf(v);
			v = nextafter(v, 0.0);
		}
	}
}

/* Values next to the rounding boundaries: a short decimal (15 or 16 digits)
 * read as a double and its neighbours a few ulps away, where the 15- or
 * 16-digit text just stops (or just starts) reading back; and doubles whose
 * exact value has 18 digits ending in 5 (odd multiples of 1/8 near 2^52),
 * where %.17g rounds a tie half to even. */
static void test_full_rounding_boundaries_match_printf(void **state)
{
	(void)state;
	for (int i = 0; i < 60000; i++) {
		char text[40];
		int digits = 15 + (int)(next_u64() % 2u);
		uint64_t lo = 1, hi;
		for (int k = 1; k < digits; k++)
			lo *= 10u;
		hi = lo * 10u;
		uint64_t mant = lo + next_u64() % (hi - lo);
		int e10 = (int)(next_u64() % 40u) - 25;
		snprintf(text, sizeof text, "%llue%d", (unsigned long long)mant, e10);
		double v = strtod(text, NULL);
		double up = v, down = v;
		for (int k = 0; k < 3; k++) {
			up = nextafter(up, INFINITY);
			down = nextafter(down, -INFINITY);
			same_as_printf(up);
			same_as_printf(down);
		}
		same_as_printf(v);
	}
	for (int i = 0; i < 50000; i++) {
		uint64_t m = (1ull << 52) + (next_u64() & ((1ull << 52) - 1));
		for (int s = 1; s <= 4; s++) /* 2^52..2^53 times 1/2..1/16 */
			same_as_printf(ldexp((double)m, -s));
	}
	/* hand-checked ties: 2^50 + 0.25 and + 0.75 (ulp 0.25) need 17 digits,
	 * and their 18th is a 5 with nothing after it: half to even */
	char out[NUMFMT_FULL_SIZE];
	numfmt_full(1125899906842624.25, out, sizeof out);
	assert_string_equal(out, "1125899906842624.2");
	numfmt_full(1125899906842624.75, out, sizeof out);
	assert_string_equal(out, "1125899906842624.8");
}

/* Every binade from 2^-60 to 2^62 with random significands, their ends
 * and the values next to them, either sign: this crosses each edge of the
 * 64-bit-fraction path (binary point 1..64 bits into the fraction, about
 * 1e-12 to 4.5e15) and of the wider path beside it, every decimal exponent
 * the layouts have (0.000ddd, ddd.ddd with up to 16 digits after the
 * point or up to 8, d.ddde-05, d.ddde+15), and every length 15..17. */
static void test_full_every_binade_of_the_fast_paths_matches_printf(void **state)
{
	(void)state;
	on_every_binade(same_as_printf, -60, 62, 4000);
	/* short decimals in every decade of the range: 15 digits or fewer */
	for (int d = -13; d <= 16; d++)
		for (int i = 0; i < 2000; i++) {
			char text[40];
			snprintf(text, sizeof text, "%llue%d",
				 (unsigned long long)(next_u64() % 1000000000000000u), d - 14);
			same_as_printf(strtod(text, NULL));
		}
}

/* The layouts of the fast path, each checked against text worked out by
 * hand (the %g rules: exponent below -4 or at least the precision gives
 * d.ddde+XX, else fixed; trailing zeros dropped). */
static void test_full_layouts(void **state)
{
	(void)state;
	const struct {
		double v;
		const char *text;
	} cases[] = {
		{17086.0, "17086"},
		{2898.6, "2898.6"},
		{-0.25, "-0.25"},
		{0.000123, "0.000123"},            /* e = -4: still fixed */
		{1.2e-5, "1.2e-05"},               /* e = -5: exponent */
		{123456789.12345678, "123456789.12345678"}, /* 8 after the point, 17 digits */
		{1234567.5, "1234567.5"},
		{1e15, "1e+15"},                   /* e = 15 = precision: exponent */
		{1234567890123450.0, "1.23456789012345e+15"},
		{1234567890123456.0, "1234567890123456"}, /* 16 digits, e = 15 < 16 */
		{0.1 + 0.2, "0.30000000000000004"},
		{-1e-12, "-1e-12"},
		{9.999999999999999e-5, "9.999999999999999e-05"},
	};
	for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
		char out[NUMFMT_FULL_SIZE];
		int n = numfmt_full(cases[i].v, out, sizeof out);
		assert_string_equal(out, cases[i].text);
		assert_int_equal(n, (int)strlen(cases[i].text));
		same_as_printf(cases[i].v);
	}
}

/* The word-at-a-time digits agree with printf's %08u: every value below
 * 10^6, the ends of the range, and random values (all 10^8 were checked
 * once by hand, which takes too long for every test run). */
static void test_digits8_matches_printf(void **state)
{
	(void)state;
	char a[9], b[16];
	for (uint32_t x = 0; x < 100000000u; x = x < 1000000u ? x + 1u : x + 1u + (uint32_t)(next_u64() % 200u)) {
		numfmt_digits8(x, a);
		snprintf(b, sizeof b, "%08u", x);
		if (strcmp(a, b) != 0)
			fail_msg("%u: \"%s\"", x, a);
	}
	numfmt_digits8(99999999u, a);
	assert_string_equal(a, "99999999");
	numfmt_digits8(10000000u, a);
	assert_string_equal(a, "10000000");
}

/* The 16 digits of the layout and their trailing zeros agree with
 * printf's %016llu: every 8-digit half below 10^6 (with the other half
 * random), the ends of the range, powers of ten and random values. */
static void test_digits16_matches_printf(void **state)
{
	(void)state;
	char a[17], b[32];
	for (int i = 0; i < 3000000; i++) {
		uint64_t x;
		if (i < 1000000)
			x = (uint64_t)i + (next_u64() % 100000000u) * 100000000u;
		else if (i < 2000000)
			x = (uint64_t)(i - 1000000) * 100000000u + next_u64() % 100000000u;
		else
			x = next_u64() % 10000000000000000u;
		if (i % 7 == 0) /* trailing zeros of every length */
			x -= x % POW10_TEST[next_u64() % 17u];
		int tz = numfmt_digits16(x, a);
		snprintf(b, sizeof b, "%016llu", (unsigned long long)x);
		if (strcmp(a, b) != 0)
			fail_msg("%llu: \"%s\"", (unsigned long long)x, a);
		int want = 0;
		while (want < 16 && b[15 - want] == '0')
			want++;
		assert_int_equal(tz, want);
	}
	for (int k = 0; k < 16; k++) {
		numfmt_digits16(POW10_TEST[k], a);
		snprintf(b, sizeof b, "%016llu", (unsigned long long)POW10_TEST[k]);
		assert_string_equal(a, b);
		assert_int_equal(numfmt_digits16(POW10_TEST[k], a), k); /* 10^k: k zeros after the 1 */
	}
	assert_int_equal(numfmt_digits16(0, a), 16);
	assert_string_equal(a, "0000000000000000");
	assert_int_equal(numfmt_digits16(9999999999999999u, a), 0);
	assert_string_equal(a, "9999999999999999");
}

/* numfmt_sig12 against its definition, snprintf's "%.12g" (-0 as "0"),
 * and read back by strtod to within half a unit of the 12th digit. */
static void sig12_as_printf(double v)
{
	char fast[NUMFMT_FULL_SIZE], ref[NUMFMT_FULL_SIZE];
	int n = numfmt_sig12(v, fast, sizeof fast);
	snprintf(ref, sizeof ref, "%.12g", v == 0.0 ? 0.0 : v);
	if (strcmp(fast, ref) != 0)
		fail_msg("%.17g: fast \"%s\", printf \"%s\"", v, fast, ref);
	assert_int_equal(n, (int)strlen(fast));
	numfmt_sig12_printf(v, ref, sizeof ref);
	assert_string_equal(fast, ref);
	double back = strtod(fast, NULL);
	/* the 12 digits' half unit: 5e-12 of the leading digit's place (the
	 * largest share of |v| when v is 1.00000000000 10^e); a subnormal's
	 * own spacing as well */
	if (!(fabs(back - v) <= 5e-12 * fabs(v) * (1.0 + 1e-15) + DBL_TRUE_MIN))
		fail_msg("%.17g: \"%s\" reads back as %.17g", v, fast, back);
}

static void test_sig12_matches_printf_on_random_bits(void **state)
{
	(void)state;
	on_random_bits(sig12_as_printf, 300000);
	for (int i = 0; i < 100000; i++) { /* subnormals */
		uint64_t bits = next_u64() & ((1ull << 52) - 1);
		double v;
		memcpy(&v, &bits, sizeof v);
		sig12_as_printf(v);
		sig12_as_printf(-v);
	}
}

/* Every binade from 2^-60 to 2^115 (past both ends of the fast path,
 * 1e-11 and 1e33), and result-sized values and short decimals. */
static void test_sig12_every_binade_matches_printf(void **state)
{
	(void)state;
	on_every_binade(sig12_as_printf, -60, 115, 4000);
	on_result_sized_values(sig12_as_printf, 500000);
}

/* Powers of ten and their neighbours (where the decimal exponent is
 * estimated one low, and where 9.999999999995 rounds up to the next
 * power), and values next to the ties of the 12th digit: the 13-digit
 * decimal d.ddddddddddd5 10^e read as a double and the doubles a few ulps
 * either side, where y's fraction lies within 2^-14 of 1/2 and printf
 * decides. */
static void test_sig12_powers_of_ten_and_ties_match_printf(void **state)
{
	(void)state;
	for (int e = -323; e <= 308; e++) {
		char text[32];
		snprintf(text, sizeof text, "1e%d", e);
		double v = strtod(text, NULL);
		for (int k = 0; k < 4; k++) {
			sig12_as_printf(v);
			sig12_as_printf(-v);
			v = nextafter(v, 0.0);
		}
		snprintf(text, sizeof text, "9.999999999995e%d", e);
		v = strtod(text, NULL);
		if (!isfinite(v)) /* 9.999999999995e308 is past DBL_MAX */
			continue;
		sig12_as_printf(v);
		sig12_as_printf(nextafter(v, 0.0));
		sig12_as_printf(nextafter(v, INFINITY));
	}
	for (int i = 0; i < 200000; i++) {
		char text[40];
		uint64_t mant = 100000000000u + next_u64() % 900000000000u;
		int e10 = (int)(next_u64() % 50u) - 25;
		snprintf(text, sizeof text, "%llu5e%d", (unsigned long long)mant, e10);
		double v = strtod(text, NULL), up = v, down = v;
		sig12_as_printf(v);
		for (int k = 0; k < 3; k++) {
			up = nextafter(up, INFINITY);
			down = nextafter(down, -INFINITY);
			sig12_as_printf(up);
			sig12_as_printf(down);
		}
	}
	/* exact ties, half to even: 0.5, 1.5 and 2.5 units of the 12th digit */
	char out[NUMFMT_FULL_SIZE];
	numfmt_sig12(100000000000.5, out, sizeof out);
	assert_string_equal(out, "100000000000");
	numfmt_sig12(100000000001.5, out, sizeof out);
	assert_string_equal(out, "100000000002");
	numfmt_sig12(100000000002.5, out, sizeof out);
	assert_string_equal(out, "100000000002");
}

/* The layouts, worked out by hand from the %g rules (exponent below -4 or
 * from the precision, 12, up: d.ddde+XX; else fixed; trailing zeros and a
 * bare point dropped), and what the bench rows print. */
static void test_sig12_layouts(void **state)
{
	(void)state;
	const struct {
		double v;
		const char *text;
	} cases[] = {
		{0.0, "0"},
		{-0.0, "0"},
		{1.0, "1"},
		{-2.5, "-2.5"},
		{0.1, "0.1"},
		{1.0 / 3.0, "0.333333333333"},
		{2.0 / 3.0, "0.666666666667"},
		{3191.7999999999997, "3191.8"},
		{71.40963124627822, "71.4096312463"},
		{0.06022339177600404, "0.060223391776"},
		{18753.0, "18753"},
		{0.0001, "0.0001"},
		{0.00012345678901234, "0.000123456789012"},
		{0.000012345678901234, "1.23456789012e-05"},
		{999999999999.0, "999999999999"},
		{999999999999.5, "1e+12"},
		{1234567890123.0, "1.23456789012e+12"},
		{-1.5e-300, "-1.5e-300"},
		{1e33, "1e+33"},
		{123456789012345678.0, "1.23456789012e+17"},
	};
	for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
		char out[NUMFMT_FULL_SIZE];
		int n = numfmt_sig12(cases[i].v, out, sizeof out);
		assert_string_equal(out, cases[i].text);
		assert_int_equal(n, (int)strlen(cases[i].text));
	}
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_full_round_trips),
		cmocka_unit_test(test_human_rounds_percent_to_a_tenth),
		cmocka_unit_test(test_duration_is_h_mm_ss),
		cmocka_unit_test(test_full_fast_path_matches_printf_on_random_bits),
		cmocka_unit_test(test_full_fast_path_matches_printf_on_result_sized_values),
		cmocka_unit_test(test_full_edge_values_match_printf),
		cmocka_unit_test(test_full_matches_printf_across_the_exponent_range),
		cmocka_unit_test(test_full_subnormals_and_powers_of_two_match_printf),
		cmocka_unit_test(test_full_rounding_boundaries_match_printf),
		cmocka_unit_test(test_full_every_binade_of_the_fast_paths_matches_printf),
		cmocka_unit_test(test_full_layouts),
		cmocka_unit_test(test_digits8_matches_printf),
		cmocka_unit_test(test_digits16_matches_printf),
		cmocka_unit_test(test_sig12_matches_printf_on_random_bits),
		cmocka_unit_test(test_sig12_every_binade_matches_printf),
		cmocka_unit_test(test_sig12_powers_of_ten_and_ties_match_printf),
		cmocka_unit_test(test_sig12_layouts),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
