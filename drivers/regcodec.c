/*
 * regcodec.c - register codecs. See regcodec.h for the byte orders.
 *
 * Every 32-bit value is first turned into its big-endian bit pattern
 * (A B C D as a host uint32_t, A in bits 31..24) and then spread over the two
 * registers by the order; decoding is the exact inverse. Signed values are
 * converted with arithmetic on int64_t rather than by casting an out-of-range
 * unsigned number to a signed type, which C leaves implementation-defined.
 */
#include "regcodec.h"

#include <assert.h>
#include <errno.h>
#include <float.h>
#include <math.h>
#include <stdbool.h>
#include <string.h>

_Static_assert(sizeof(float) == 4, "float32 codec needs a 4-byte float");
_Static_assert(FLT_MANT_DIG == 24 && FLT_MAX_EXP == 128, "float must be IEEE 754 binary32");

static const char *const type_names[REGCODEC_TYPE_COUNT] = {
	"int16", "uint16", "int32", "uint32", "float32",
};
static const char *const order_names[REGCODEC_ORDER_COUNT] = {
	"abcd", "badc", "cdab", "dcba",
};

static uint16_t swap_bytes(uint16_t w)
{
	return (uint16_t)((unsigned)(w >> 8) | ((unsigned)(w & 0xFFu) << 8));
}

static bool order_swaps_bytes(enum regcodec_order o)
{
	return o == REGCODEC_BADC || o == REGCODEC_DCBA;
}

static bool order_swaps_words(enum regcodec_order o)
{
	return o == REGCODEC_CDAB || o == REGCODEC_DCBA;
}

/* bits = A<<24 | B<<16 | C<<8 | D */
static uint32_t get32(enum regcodec_order o, const uint16_t *regs)
{
	uint16_t first = regs[0];
	uint16_t second = regs[1];

	assert(o < REGCODEC_ORDER_COUNT);
	if (order_swaps_bytes(o)) {
		first = swap_bytes(first);
		second = swap_bytes(second);
	}
	uint16_t hi = order_swaps_words(o) ? second : first;
	uint16_t lo = order_swaps_words(o) ? first : second;
	return ((uint32_t)hi << 16) | (uint32_t)lo;
}

static void put32(enum regcodec_order o, uint32_t bits, uint16_t *regs)
{
	uint16_t hi = (uint16_t)(bits >> 16);
	uint16_t lo = (uint16_t)(bits & 0xFFFFu);

	assert(o < REGCODEC_ORDER_COUNT);
	if (order_swaps_bytes(o)) {
		hi = swap_bytes(hi);
		lo = swap_bytes(lo);
	}
	regs[0] = order_swaps_words(o) ? lo : hi;
	regs[1] = order_swaps_words(o) ? hi : lo;
}

static uint16_t get16(enum regcodec_order o, const uint16_t *regs)
{
	assert(o < REGCODEC_ORDER_COUNT);
	return order_swaps_bytes(o) ? swap_bytes(regs[0]) : regs[0];
}

static void put16(enum regcodec_order o, uint16_t bits, uint16_t *regs)
{
	assert(o < REGCODEC_ORDER_COUNT);
	regs[0] = order_swaps_bytes(o) ? swap_bytes(bits) : bits;
}

unsigned regcodec_width(enum regcodec_type t)
{
	assert(t < REGCODEC_TYPE_COUNT);
	return (t == REGCODEC_INT16 || t == REGCODEC_UINT16) ? 1u : 2u;
}

double regcodec_decode(enum regcodec_type t, enum regcodec_order o, const uint16_t *regs)
{
	assert(t < REGCODEC_TYPE_COUNT);
	assert(o < REGCODEC_ORDER_COUNT);
	assert(regs != NULL);

	switch (t) {
	case REGCODEC_INT16: {
		int32_t u = get16(o, regs);
		return (double)(u >= 0x8000 ? u - 0x10000 : u);
	}
	case REGCODEC_UINT16:
		return (double)get16(o, regs);
	case REGCODEC_INT32: {
		int64_t u = get32(o, regs);
		return (double)(u >= INT64_C(0x80000000) ? u - INT64_C(0x100000000) : u);
	}
	case REGCODEC_UINT32:
		return (double)get32(o, regs);
	case REGCODEC_FLOAT32: {
		uint32_t bits = get32(o, regs);
		float f;
		memcpy(&f, &bits, sizeof f);
		return (double)f;
	}
	case REGCODEC_TYPE_COUNT:
		break;
	}
	assert(0 && "unreachable: type checked above");
	return NAN;
}

/* Rounds value half away from zero and clamps it to [lo, hi]. Returns 0 or
 * -ERANGE (clamped); *out receives the integer. value is not NaN. */
static int round_clamp(double value, int64_t lo, int64_t hi, int64_t *out)
{
	assert(!isnan(value));
	double r = round(value);
	if (r < (double)lo) {
		*out = lo;
		return -ERANGE;
	}
	if (r > (double)hi) {
		*out = hi;
		return -ERANGE;
	}
	*out = (int64_t)r;
	return 0;
}

static int encode_float32(enum regcodec_order o, double value, uint16_t *regs)
{
	int rc = 0;
	float f;
	uint32_t bits;

	if (isnan(value)) {
		bits = 0x7FC00000u; /* the canonical quiet NaN */
		put32(o, bits, regs);
		return 0;
	}
	if (isfinite(value) && fabs(value) > (double)FLT_MAX) {
		value = value > 0 ? (double)FLT_MAX : -(double)FLT_MAX;
		rc = -ERANGE;
	}
	f = (float)value;
	memcpy(&bits, &f, sizeof bits);
	put32(o, bits, regs);
	return rc;
}

int regcodec_encode(enum regcodec_type t, enum regcodec_order o, double value, uint16_t *regs)
{
	int64_t v = 0;
	int rc;

	assert(t < REGCODEC_TYPE_COUNT);
	assert(o < REGCODEC_ORDER_COUNT);
	assert(regs != NULL);

	if (t == REGCODEC_FLOAT32)
		return encode_float32(o, value, regs);
	if (isnan(value))
		return -EDOM;

	switch (t) {
	case REGCODEC_INT16:
		rc = round_clamp(value, INT16_MIN, INT16_MAX, &v);
		put16(o, (uint16_t)(v < 0 ? v + 0x10000 : v), regs);
		return rc;
	case REGCODEC_UINT16:
		rc = round_clamp(value, 0, UINT16_MAX, &v);
		put16(o, (uint16_t)v, regs);
		return rc;
	case REGCODEC_INT32:
		rc = round_clamp(value, INT32_MIN, INT32_MAX, &v);
		put32(o, (uint32_t)(v < 0 ? v + INT64_C(0x100000000) : v), regs);
		return rc;
	case REGCODEC_UINT32:
		rc = round_clamp(value, 0, UINT32_MAX, &v);
		put32(o, (uint32_t)v, regs);
		return rc;
	case REGCODEC_FLOAT32:
	case REGCODEC_TYPE_COUNT:
		break;
	}
	assert(0 && "unreachable: type checked above");
	return -EINVAL;
}

const char *regcodec_type_name(enum regcodec_type t)
{
	assert(t < REGCODEC_TYPE_COUNT);
	return type_names[t];
}

const char *regcodec_order_name(enum regcodec_order o)
{
	assert(o < REGCODEC_ORDER_COUNT);
	return order_names[o];
}

int regcodec_type_lookup(const char *name)
{
	assert(name != NULL);
	for (int i = 0; i < REGCODEC_TYPE_COUNT; i++)
		if (strcmp(name, type_names[i]) == 0)
			return i;
	return -1;
}

int regcodec_order_lookup(const char *name)
{
	assert(name != NULL);
	for (int i = 0; i < REGCODEC_ORDER_COUNT; i++)
		if (strcmp(name, order_names[i]) == 0)
			return i;
	return -1;
}
