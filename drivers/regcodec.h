/*
 * regcodec.h - numbers in Modbus registers: decode and encode the integer and
 * float types a PLC or gateway puts into 16-bit holding or input registers.
 *
 * A Modbus register carries two bytes, high byte first on the wire (Modbus
 * Application Protocol v1.1b3, section 4.2). A 32-bit value is spread over
 * two consecutive registers, and devices disagree on how. Name its bytes
 * A (most significant) B C D (least significant); the order says which byte
 * lands where:
 *
 *   order   regs[0] (lower address)   regs[1]            typical source
 *   ABCD    A<<8 | B                  C<<8 | D           big-endian, high word first
 *   BADC    B<<8 | A                  D<<8 | C           bytes swapped inside each word
 *   CDAB    C<<8 | D                  A<<8 | B           low word first ("word swap")
 *   DCBA    D<<8 | C                  B<<8 | A           little-endian throughout
 *
 * A 16-bit value has only bytes A B. ABCD and CDAB keep them (regs[0] = A<<8 | B);
 * BADC and DCBA swap them (regs[0] = B<<8 | A), since those orders swap bytes
 * inside a word.
 *
 * Example (IEEE 754 single): 123456.0f is 0x47F12000, so ABCD {0x47F1, 0x2000},
 * BADC {0xF147, 0x0020}, CDAB {0x2000, 0x47F1}, DCBA {0x0020, 0xF147}.
 *
 * Everything here is shifts and memcpy on host integers, so it works the same on
 * any host byte order. libmodbus 3.1.6 has float setters whose names do not
 * match what they write; they are not used anywhere in floodgauge.
 * Pure functions: no I/O, no allocation, no state.
 */
#ifndef REGCODEC_H
#define REGCODEC_H

#include <stdint.h>

enum regcodec_type {
	REGCODEC_INT16,   /* two's complement, -32768..32767, one register */
	REGCODEC_UINT16,  /* 0..65535, one register */
	REGCODEC_INT32,   /* two's complement, two registers */
	REGCODEC_UINT32,  /* 0..4294967295, two registers */
	REGCODEC_FLOAT32, /* IEEE 754 binary32, two registers */
	REGCODEC_TYPE_COUNT
};

enum regcodec_order {
	REGCODEC_ABCD,
	REGCODEC_BADC,
	REGCODEC_CDAB,
	REGCODEC_DCBA,
	REGCODEC_ORDER_COUNT
};

/* Registers a value of type t occupies: 1 or 2. */
unsigned regcodec_width(enum regcodec_type t);

/* Decodes regcodec_width(t) registers from regs. Integers come back exactly;
 * a float32 NaN or infinity comes back as NaN or infinity (the caller's
 * validation marks it bad). t and o must be valid enumerators (asserted). */
double regcodec_decode(enum regcodec_type t, enum regcodec_order o, const uint16_t *regs);

/* Encodes value into regcodec_width(t) registers at regs.
 * Integer types round half away from zero. Returns:
 *   0        on success;
 *   -ERANGE  when value lies outside the type's range (integers, or a finite
 *            value beyond FLT_MAX for float32): the nearest end of the range
 *            is written, so a caller that ignores the error still gets a
 *            saturated, not a wrapped, number;
 *   -EDOM    for NaN with an integer type: regs are left untouched.
 * For float32, NaN and infinities are written as such and return 0. */
int regcodec_encode(enum regcodec_type t, enum regcodec_order o, double value, uint16_t *regs);

/* Static names as used in the config ("int16", "abcd"), and the reverse
 * lookups: return the enumerator, or -1 for an unknown name. */
const char *regcodec_type_name(enum regcodec_type t);
const char *regcodec_order_name(enum regcodec_order o);
int regcodec_type_lookup(const char *name);
int regcodec_order_lookup(const char *name);

#endif
