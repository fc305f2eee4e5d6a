/*
 * test_regcodec.c - register codec vectors.
 *
 * Sources of the check values (named again beside each use):
 *  [PY]  Python's struct module (Debian /usr/bin/python3, struct.pack('>f'/'>i'/
 *        '>I'/'>h', v).hex()), run while writing this test: big-endian (ABCD)
 *        bit patterns of IEEE 754 singles and two's complement integers.
 *  [NOTES] /work/shared/notes/libraries.md section 1, probe against libmodbus
 *        3.1.6: 123456.0f = 0x47F12000 and its four register layouts, and
 *        int32 -2 = {FFFF, FFFE}.
 *  [LIBMODBUS] libmodbus 3.1.6's getters modbus_get_float_abcd/_badc/_cdab/_dcba,
 *        which the notes verified to read the layout their names say; called
 *        here at run time as an independent decoder. (Its setters are known
 *        to be wrong and are not used.)
 * Tolerance: none. Every value is an integer or a binary32 number that is
 * exactly representable, so decode must return it exactly.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <errno.h>
#include <float.h>
#include <math.h>
#include <string.h>

#include <modbus.h>

#include "regcodec.h"

/* 123456.0f in the four orders [NOTES], pattern 0x47F12000 [PY]. */
static const uint16_t f123456[REGCODEC_ORDER_COUNT][2] = {
	[REGCODEC_ABCD] = {0x47F1, 0x2000},
	[REGCODEC_BADC] = {0xF147, 0x0020},
	[REGCODEC_CDAB] = {0x2000, 0x47F1},
	[REGCODEC_DCBA] = {0x0020, 0xF147},
};

static void test_width_is_one_for_16_bit_and_two_for_32_bit(void **state)
{
	(void)state;
	assert_int_equal(regcodec_width(REGCODEC_INT16), 1);
	assert_int_equal(regcodec_width(REGCODEC_UINT16), 1);
	assert_int_equal(regcodec_width(REGCODEC_INT32), 2);
	assert_int_equal(regcodec_width(REGCODEC_UINT32), 2);
	assert_int_equal(regcodec_width(REGCODEC_FLOAT32), 2);
}

static void test_float_123456_decodes_in_all_four_orders(void **state)
{
	(void)state;
	for (int o = 0; o < REGCODEC_ORDER_COUNT; o++)
		assert_true(regcodec_decode(REGCODEC_FLOAT32, (enum regcodec_order)o,
					    f123456[o]) == 123456.0);
}

static void test_float_123456_encodes_in_all_four_orders(void **state)
{
	(void)state;
	for (int o = 0; o < REGCODEC_ORDER_COUNT; o++) {
		uint16_t regs[2] = {0, 0};
		assert_int_equal(regcodec_encode(REGCODEC_FLOAT32, (enum regcodec_order)o,
						 123456.0, regs), 0);
		assert_int_equal(regs[0], f123456[o][0]);
		assert_int_equal(regs[1], f123456[o][1]);
	}
}

/* Our encoder against libmodbus's getters [LIBMODBUS], for values whose
 * patterns [PY] gives: -2.5 = C0200000, 0.001f = 3A83126F. */
static void test_float_encoding_agrees_with_libmodbus_getters(void **state)
{
	static const float values[] = {123456.0f, -2.5f, 0.001f, 1.0f};
	(void)state;
	for (size_t i = 0; i < sizeof values / sizeof values[0]; i++) {
		uint16_t r[REGCODEC_ORDER_COUNT][2];
		for (int o = 0; o < REGCODEC_ORDER_COUNT; o++)
			assert_int_equal(regcodec_encode(REGCODEC_FLOAT32, (enum regcodec_order)o,
							 (double)values[i], r[o]), 0);
		assert_true(modbus_get_float_abcd(r[REGCODEC_ABCD]) == values[i]);
		assert_true(modbus_get_float_badc(r[REGCODEC_BADC]) == values[i]);
		assert_true(modbus_get_float_cdab(r[REGCODEC_CDAB]) == values[i]);
		assert_true(modbus_get_float_dcba(r[REGCODEC_DCBA]) == values[i]);
	}
	/* and one pattern checked word by word [PY]: 0.001f = 0x3A83126F */
	uint16_t regs[2];
	assert_int_equal(regcodec_encode(REGCODEC_FLOAT32, REGCODEC_ABCD, 0.001f, regs), 0);
	assert_int_equal(regs[0], 0x3A83);
	assert_int_equal(regs[1], 0x126F);
}

static void test_int32_minus_two_is_ffff_fffe(void **state)
{
	/* [NOTES] int32 -2 = {FFFF, FFFE}; [PY] struct.pack('>i', -2) = fffffffe */
	static const uint16_t abcd[2] = {0xFFFF, 0xFFFE};
	static const uint16_t cdab[2] = {0xFFFE, 0xFFFF};
	static const uint16_t badc[2] = {0xFFFF, 0xFEFF};
	static const uint16_t dcba[2] = {0xFEFF, 0xFFFF};
	uint16_t regs[2];
	(void)state;
	assert_true(regcodec_decode(REGCODEC_INT32, REGCODEC_ABCD, abcd) == -2.0);
	assert_true(regcodec_decode(REGCODEC_INT32, REGCODEC_CDAB, cdab) == -2.0);
	assert_true(regcodec_decode(REGCODEC_INT32, REGCODEC_BADC, badc) == -2.0);
	assert_true(regcodec_decode(REGCODEC_INT32, REGCODEC_DCBA, dcba) == -2.0);
	assert_int_equal(regcodec_encode(REGCODEC_INT32, REGCODEC_ABCD, -2.0, regs), 0);
	assert_int_equal(regs[0], 0xFFFF);
	assert_int_equal(regs[1], 0xFFFE);
	/* the same bits read as uint32 are 2^32 - 2 */
	assert_true(regcodec_decode(REGCODEC_UINT32, REGCODEC_ABCD, abcd) == 4294967294.0);
}

static void test_int32_word_swapped_large_negative(void **state)
{
	/* [PY] struct.pack('>i', -123456789) = f8a432eb */
	static const uint16_t cdab[2] = {0x32EB, 0xF8A4};
	uint16_t regs[2];
	(void)state;
	assert_true(regcodec_decode(REGCODEC_INT32, REGCODEC_CDAB, cdab) == -123456789.0);
	assert_int_equal(regcodec_encode(REGCODEC_INT32, REGCODEC_DCBA, -123456789.0, regs), 0);
	assert_int_equal(regs[0], 0xEB32); /* D C */
	assert_int_equal(regs[1], 0xA4F8); /* B A */
}

static void test_uint32_above_int32_range_decodes_unsigned(void **state)
{
	/* [PY] struct.pack('>I', 4000000000) = ee6b2800 */
	static const uint16_t abcd[2] = {0xEE6B, 0x2800};
	(void)state;
	assert_true(regcodec_decode(REGCODEC_UINT32, REGCODEC_ABCD, abcd) == 4000000000.0);
	assert_true(regcodec_decode(REGCODEC_INT32, REGCODEC_ABCD, abcd) ==
		    4000000000.0 - 4294967296.0);
}

static void test_int16_byte_order_swaps_only_for_badc_and_dcba(void **state)
{
	/* [PY] struct.pack('>h', -12345) = cfc7 */
	uint16_t straight = 0xCFC7;
	uint16_t swapped = 0xC7CF;
	uint16_t regs[1];
	(void)state;
	assert_true(regcodec_decode(REGCODEC_INT16, REGCODEC_ABCD, &straight) == -12345.0);
	assert_true(regcodec_decode(REGCODEC_INT16, REGCODEC_CDAB, &straight) == -12345.0);
	assert_true(regcodec_decode(REGCODEC_INT16, REGCODEC_BADC, &swapped) == -12345.0);
	assert_true(regcodec_decode(REGCODEC_INT16, REGCODEC_DCBA, &swapped) == -12345.0);
	assert_true(regcodec_decode(REGCODEC_UINT16, REGCODEC_ABCD, &straight) == 53191.0);
	assert_int_equal(regcodec_encode(REGCODEC_INT16, REGCODEC_DCBA, -12345.0, regs), 0);
	assert_int_equal(regs[0], 0xC7CF);
}

static void test_encode_rounds_half_away_from_zero(void **state)
{
	uint16_t regs[2];
	(void)state;
	assert_int_equal(regcodec_encode(REGCODEC_INT16, REGCODEC_ABCD, 2.5, regs), 0);
	assert_int_equal(regs[0], 3);
	assert_int_equal(regcodec_encode(REGCODEC_INT16, REGCODEC_ABCD, -2.5, regs), 0);
	assert_int_equal(regs[0], 0xFFFD); /* -3 */
	assert_int_equal(regcodec_encode(REGCODEC_UINT16, REGCODEC_ABCD, 41.49, regs), 0);
	assert_int_equal(regs[0], 41);
	assert_int_equal(regcodec_encode(REGCODEC_UINT32, REGCODEC_ABCD, 65535.5, regs), 0);
	assert_int_equal(regs[0], 0x0001);
	assert_int_equal(regs[1], 0x0000);
}

static void test_encode_saturates_out_of_range_with_erange(void **state)
{
	uint16_t regs[2];
	(void)state;
	assert_int_equal(regcodec_encode(REGCODEC_INT16, REGCODEC_ABCD, 32767.5, regs), -ERANGE);
	assert_int_equal(regs[0], 0x7FFF);
	assert_int_equal(regcodec_encode(REGCODEC_INT16, REGCODEC_ABCD, -40000.0, regs), -ERANGE);
	assert_int_equal(regs[0], 0x8000);
	assert_int_equal(regcodec_encode(REGCODEC_UINT16, REGCODEC_ABCD, -1.0, regs), -ERANGE);
	assert_int_equal(regs[0], 0);
	assert_int_equal(regcodec_encode(REGCODEC_UINT32, REGCODEC_ABCD, 5e9, regs), -ERANGE);
	assert_int_equal(regs[0], 0xFFFF);
	assert_int_equal(regs[1], 0xFFFF);
	assert_int_equal(regcodec_encode(REGCODEC_INT32, REGCODEC_ABCD, -INFINITY, regs), -ERANGE);
	assert_int_equal(regs[0], 0x8000);
	assert_int_equal(regs[1], 0x0000);
	assert_int_equal(regcodec_encode(REGCODEC_FLOAT32, REGCODEC_ABCD, 1e39, regs), -ERANGE);
	assert_true(regcodec_decode(REGCODEC_FLOAT32, REGCODEC_ABCD, regs) == (double)FLT_MAX);
}

static void test_encode_nan_into_integer_is_edom_and_leaves_regs(void **state)
{
	uint16_t regs[2] = {0x1234, 0x5678};
	(void)state;
	for (int t = 0; t < REGCODEC_FLOAT32; t++) {
		assert_int_equal(regcodec_encode((enum regcodec_type)t, REGCODEC_ABCD, NAN, regs),
				 -EDOM);
		assert_int_equal(regs[0], 0x1234);
		assert_int_equal(regs[1], 0x5678);
	}
}

static void test_float_nan_and_infinity_pass_through(void **state)
{
	uint16_t regs[2];
	(void)state;
	assert_int_equal(regcodec_encode(REGCODEC_FLOAT32, REGCODEC_CDAB, NAN, regs), 0);
	assert_true(isnan(regcodec_decode(REGCODEC_FLOAT32, REGCODEC_CDAB, regs)));
	assert_int_equal(regcodec_encode(REGCODEC_FLOAT32, REGCODEC_BADC, -INFINITY, regs), 0);
	assert_true(regcodec_decode(REGCODEC_FLOAT32, REGCODEC_BADC, regs) == -INFINITY);
	/* IEEE 754: -inf is 0xFF800000; BADC swaps the bytes of each word */
	assert_int_equal(regs[0], 0x80FF);
	assert_int_equal(regs[1], 0x0000);
}

static void test_round_trip_every_type_and_order(void **state)
{
	static const double v[] = {0, 1, -1, 255, 256, 1000, -32768, 32767, 65535};
	(void)state;
	for (int t = 0; t < REGCODEC_TYPE_COUNT; t++) {
		for (int o = 0; o < REGCODEC_ORDER_COUNT; o++) {
			for (size_t i = 0; i < sizeof v / sizeof v[0]; i++) {
				uint16_t regs[2] = {0, 0};
				int rc = regcodec_encode((enum regcodec_type)t,
							 (enum regcodec_order)o, v[i], regs);
				if (rc != 0)
					continue; /* out of range for this type */
				assert_true(regcodec_decode((enum regcodec_type)t,
							    (enum regcodec_order)o, regs) == v[i]);
			}
		}
	}
}

static void test_names_round_trip_and_unknown_is_minus_one(void **state)
{
	(void)state;
	for (int t = 0; t < REGCODEC_TYPE_COUNT; t++) {
		const char *name = regcodec_type_name((enum regcodec_type)t);
		assert_int_equal(regcodec_type_lookup(name), t);
	}
	for (int o = 0; o < REGCODEC_ORDER_COUNT; o++)
		assert_int_equal(regcodec_order_lookup(regcodec_order_name((enum regcodec_order)o)),
				 o);
	assert_int_equal(regcodec_type_lookup("float64"), -1);
	assert_int_equal(regcodec_order_lookup("ABCD"), -1); /* config names are lower case */
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_width_is_one_for_16_bit_and_two_for_32_bit),
		cmocka_unit_test(test_float_123456_decodes_in_all_four_orders),
		cmocka_unit_test(test_float_123456_encodes_in_all_four_orders),
		cmocka_unit_test(test_float_encoding_agrees_with_libmodbus_getters),
		cmocka_unit_test(test_int32_minus_two_is_ffff_fffe),
		cmocka_unit_test(test_int32_word_swapped_large_negative),
		cmocka_unit_test(test_uint32_above_int32_range_decodes_unsigned),
		cmocka_unit_test(test_int16_byte_order_swaps_only_for_badc_and_dcba),
		cmocka_unit_test(test_encode_rounds_half_away_from_zero),
		cmocka_unit_test(test_encode_saturates_out_of_range_with_erange),
		cmocka_unit_test(test_encode_nan_into_integer_is_edom_and_leaves_regs),
		cmocka_unit_test(test_float_nan_and_infinity_pass_through),
		cmocka_unit_test(test_round_trip_every_type_and_order),
		cmocka_unit_test(test_names_round_trip_and_unknown_is_minus_one),
	};
	return cmocka_run_group_tests_name("regcodec", tests, NULL, NULL);
}
