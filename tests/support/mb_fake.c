/*
 * mb_fake.c - fake mbclient backend (see mb_fake.h).
 */
#include "mb_fake.h"

#include <assert.h>
#include <errno.h>
#include <string.h>

#include <modbus.h>

void mb_fake_init(struct mb_fake *f)
{
	assert(f != NULL);
	memset(f, 0, sizeof *f);
	f->connect_err = -ECONNREFUSED;
	f->fail_read_times = 1;
	f->fail_read_err = -ETIMEDOUT;
}

static int fake_open(void *user, const struct mbclient_source_cfg *cfg, void **link)
{
	struct mb_fake *f = user;
	(void)cfg;
	f->opens++;
	*link = f;
	return 0;
}

static int fake_connect(void *link)
{
	struct mb_fake *f = link;
	f->connects++;
	if (f->connected)
		f->misuse++;
	if (f->connect_fail_count != 0) {
		if (f->connect_fail_count > 0)
			f->connect_fail_count--;
		return f->connect_err;
	}
	f->connected = true;
	return 0;
}

static int fake_read(void *link, enum mbclient_table table, uint16_t address, uint16_t count,
		     uint16_t *dest)
{
	struct mb_fake *f = link;
	unsigned n = ++f->reads;

	if (f->log_count < MB_FAKE_LOG_MAX)
		f->log[f->log_count++] = (struct mb_fake_read){table, address, count};
	if (!f->connected) {
		f->misuse++;
		return -EBADF;
	}
	bool faulty = f->fail_read_at != 0 && n >= f->fail_read_at &&
		      n < f->fail_read_at + f->fail_read_times;
	if (faulty)
		return f->fail_read_err;
	if ((unsigned)address + count > MB_FAKE_REGS)
		return -EMBXILADD;
	memcpy(dest, &f->regs[table][address], count * sizeof dest[0]);
	return 0;
}

static void fake_close(void *link)
{
	struct mb_fake *f = link;
	f->closes++;
	f->connected = false;
}

static void fake_free(void *link)
{
	struct mb_fake *f = link;
	if (f->connected)
		f->misuse++; /* the client must close before it frees */
	f->frees++;
}

struct mbclient_backend mb_fake_backend(struct mb_fake *f)
{
	return (struct mbclient_backend){
		.open = fake_open,
		.connect = fake_connect,
		.read_registers = fake_read,
		.close = fake_close,
		.free = fake_free,
		.user = f,
	};
}
