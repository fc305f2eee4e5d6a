/*
 * mb_fake.h - a fake mbclient backend with fault injection, for tests.
 *
 * It holds MB_FAKE_REGS registers per table; reading past them gives a
 * Modbus exception (-EMBXILADD), as a real device does. Faults are injected
 * by count: fail the next N connects, or fail reads number K .. K+N-1
 * (counted over the fake's life, from 1) with a chosen error (-ETIMEDOUT,
 * -EMBBADDATA, ...). Every call is counted, and calls made in the wrong link
 * state (connect while connected, read while closed) are counted as misuse,
 * so a test can prove the client closes before it reconnects.
 */
#ifndef MB_FAKE_H
#define MB_FAKE_H

#include <stdbool.h>
#include <stdint.h>

#include "mbclient.h"

#define MB_FAKE_REGS 1024
#define MB_FAKE_LOG_MAX 64

struct mb_fake_read {
	enum mbclient_table table;
	uint16_t address;
	uint16_t count;
};

struct mb_fake {
	uint16_t regs[MBCLIENT_TABLE_COUNT][MB_FAKE_REGS];

	int connect_fail_count;  /* fail this many next connects; -1 = all of them */
	int connect_err;         /* error of a failed connect (default -ECONNREFUSED) */
	unsigned fail_read_at;   /* first read (1-based, over the fake's life) to fail; 0 = none */
	unsigned fail_read_times;/* consecutive reads that fail from fail_read_at (default 1) */
	int fail_read_err;       /* their error (default -ETIMEDOUT) */

	unsigned opens, connects, closes, frees, reads;
	bool connected;
	unsigned misuse;         /* calls made in the wrong link state */
	unsigned log_count;      /* reads recorded in log (the first MB_FAKE_LOG_MAX) */
	struct mb_fake_read log[MB_FAKE_LOG_MAX];
};

/* Zeroes f and sets the defaults above. */
void mb_fake_init(struct mb_fake *f);

/* A backend whose links are f itself. */
struct mbclient_backend mb_fake_backend(struct mb_fake *f);

#endif
