/*
 * fuzz_regcodec.c - libFuzzer target: the Modbus register codec. Every type
 * and word order decodes any register pair without a fault, and a decoded
 * finite value encodes back to the same registers (integers exactly; a
 * float32 bit pattern too, NaN payloads aside).
 */
#include <assert.h>
#include <math.h>
#include <stdint.h>
#include <string.h>

#include "regcodec.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	if (size < 6)
		return 0;
	unsigned t = data[0] % 5u, o = data[1] % 4u;
	uint16_t regs[2] = {(uint16_t)(data[2] << 8 | data[3]), (uint16_t)(data[4] << 8 | data[5])};
	enum regcodec_type type = (enum regcodec_type)t;
	enum regcodec_order order = (enum regcodec_order)o;
	double v = regcodec_decode(type, order, regs);
	if (!isfinite(v))
		return 0;
	uint16_t back[2] = {0, 0};
	int rc = regcodec_encode(type, order, v, back);
	assert(rc == 0);
	unsigned w = regcodec_width(type);
	assert(w == 1 || w == 2);
	assert(memcmp(back, regs, w * sizeof regs[0]) == 0);
	/* a double from the bytes, encoded: no fault, in range or refused */
	double x;
	if (size >= 14) {
		memcpy(&x, data + 6, sizeof x);
		(void)regcodec_encode(type, order, x, back);
	}
	return 0;
}
