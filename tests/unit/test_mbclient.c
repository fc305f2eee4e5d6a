/*
 * test_mbclient.c - the Modbus polling client: read plan, decoding over a
 * real TCP link and a pty RTU line, fault handling and reconnect back-off.
 *
 * Check values: the register vectors are the same as in test_regcodec.c
 * (Python struct.pack big-endian patterns, Debian /usr/bin/python3, and the
 * libmodbus probe in /work/shared/notes/libraries.md section 1); the 125
 * register limit is from the Modbus Application Protocol v1.1b3, section 6.3
 * and 6.4 (as FG_MODBUS_READ_MAX); the back-off sequence is our own
 * specification in mbclient.h. Decoded values are compared exactly
 * (integers and exactly representable binary32 values).
 *
 * Everything listens on 127.0.0.1, on ephemeral ports; readiness is the
 * successful open (the socket listens before mbserver_open returns).
 * Timing checks use CLOCK_MONOTONIC with generous margins and only as upper
 * bounds on blocking, never for synchronisation.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include <arpa/inet.h>
#include <netinet/in.h>
#include <sys/socket.h>

#include "mb_fake.h"
#include "mb_rtuslave.h"
#include "mbclient.h"
#include "mbserver.h"

/* ---- helpers ------------------------------------------------------------ */

struct logbook {
	unsigned count;
	char line[32][256];
};

static void log_to_book(void *user, enum mbclient_log_level level, const char *msg)
{
	struct logbook *b = user;
	(void)level;
	if (b->count < 32)
		snprintf(b->line[b->count++], sizeof b->line[0], "%s", msg);
}

static unsigned book_count(const struct logbook *b, const char *needle)
{
	unsigned n = 0;
	for (unsigned i = 0; i < b->count; i++)
		if (strstr(b->line[i], needle) != NULL)
			n++;
	return n;
}

static int64_t mono_ms(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

static struct mbclient_source_cfg tcp_cfg(int port, double timeout_s, struct logbook *book)
{
	struct mbclient_source_cfg cfg;
	memset(&cfg, 0, sizeof cfg);
	snprintf(cfg.name, sizeof cfg.name, "kiln-row-plc");
	cfg.protocol = MBCLIENT_PROTOCOL_TCP;
	snprintf(cfg.host, sizeof cfg.host, "127.0.0.1");
	cfg.port = port;
	cfg.unit_id = 255;
	cfg.timeout_s = timeout_s;
	cfg.log = book != NULL ? log_to_book : NULL;
	cfg.log_user = book;
	return cfg;
}

static struct mbclient_point pt(enum mbclient_table t, uint16_t a, enum regcodec_type ty,
				enum regcodec_order o)
{
	return (struct mbclient_point){.table = t, .address = a, .type = ty, .order = o};
}

#define IN MBCLIENT_TABLE_INPUT
#define HOLD MBCLIENT_TABLE_HOLDING

/* A port nobody listens on: bind an ephemeral one and close it again. */
static int dead_port(void)
{
	struct sockaddr_in a = {.sin_family = AF_INET, .sin_port = 0};
	socklen_t len = sizeof a;
	int fd = socket(AF_INET, SOCK_STREAM, 0);
	assert_true(fd >= 0);
	a.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
	assert_int_equal(bind(fd, (struct sockaddr *)&a, sizeof a), 0);
	assert_int_equal(getsockname(fd, (struct sockaddr *)&a, &len), 0);
	close(fd);
	return ntohs(a.sin_port);
}

/* ---- read plan ---------------------------------------------------------- */

struct plan_fixture {
	struct mb_fake fake;
	struct mbclient_backend be;
	struct mbclient c;
};

static struct plan_fixture pf; /* large: keep it off the stack */

static const struct mbclient_request *plan_of(const struct mbclient_point *p, unsigned n,
					      unsigned *count)
{
	struct mbclient_source_cfg cfg = tcp_cfg(502, 0.5, NULL);
	mb_fake_init(&pf.fake);
	pf.be = mb_fake_backend(&pf.fake);
	assert_int_equal(mbclient_init(&pf.c, &cfg, p, n, &pf.be), 0);
	return mbclient_plan(&pf.c, count);
}

static void test_plan_merges_contiguous_points(void **state)
{
	struct mbclient_point p[] = {
		pt(IN, 0, REGCODEC_UINT16, REGCODEC_ABCD),
		pt(IN, 1, REGCODEC_INT16, REGCODEC_ABCD),
		pt(IN, 2, REGCODEC_UINT16, REGCODEC_ABCD),
		pt(IN, 3, REGCODEC_FLOAT32, REGCODEC_CDAB),
	};
	unsigned n;
	(void)state;
	const struct mbclient_request *r = plan_of(p, 4, &n);
	assert_int_equal(n, 1);
	assert_int_equal(r[0].address, 0);
	assert_int_equal(r[0].count, 5);
	assert_int_equal(r[0].point_count, 4);
	mbclient_fini(&pf.c);
}

static void test_plan_does_not_read_across_gaps(void **state)
{
	struct mbclient_point p[] = {
		pt(HOLD, 0, REGCODEC_UINT16, REGCODEC_ABCD),
		pt(HOLD, 2, REGCODEC_UINT16, REGCODEC_ABCD),
		pt(HOLD, 3, REGCODEC_FLOAT32, REGCODEC_ABCD),
	};
	unsigned n;
	(void)state;
	const struct mbclient_request *r = plan_of(p, 3, &n);
	assert_int_equal(n, 2);
	assert_int_equal(r[0].address, 0);
	assert_int_equal(r[0].count, 1);
	assert_int_equal(r[1].address, 2);
	assert_int_equal(r[1].count, 3);
	mbclient_fini(&pf.c);
}

static void test_plan_merges_overlapping_points(void **state)
{
	/* a float32 at 10..11 and its low word read again as uint16 at 11 */
	struct mbclient_point p[] = {
		pt(IN, 11, REGCODEC_UINT16, REGCODEC_ABCD),
		pt(IN, 10, REGCODEC_FLOAT32, REGCODEC_ABCD),
		pt(IN, 10, REGCODEC_UINT16, REGCODEC_ABCD),
	};
	unsigned n;
	(void)state;
	const struct mbclient_request *r = plan_of(p, 3, &n);
	assert_int_equal(n, 1);
	assert_int_equal(r[0].address, 10);
	assert_int_equal(r[0].count, 2);
	assert_int_equal(r[0].point_count, 3);
	mbclient_fini(&pf.c);
}

static void test_plan_splits_at_125_registers(void **state)
{
	static struct mbclient_point p[130];
	unsigned n;
	(void)state;
	for (unsigned i = 0; i < 130; i++)
		p[i] = pt(IN, (uint16_t)i, REGCODEC_UINT16, REGCODEC_ABCD);
	const struct mbclient_request *r = plan_of(p, 130, &n);
	assert_int_equal(n, 2);
	assert_int_equal(r[0].address, 0);
	assert_int_equal(r[0].count, FG_MODBUS_READ_MAX);
	assert_int_equal(r[1].address, 125);
	assert_int_equal(r[1].count, 5);
	mbclient_fini(&pf.c);
}

static void test_plan_keeps_a_32_bit_point_whole_at_the_limit(void **state)
{
	static struct mbclient_point p[125];
	unsigned n;
	(void)state;
	/* 124 registers, then a float32 at 124..125 that would make 126 */
	for (unsigned i = 0; i < 124; i++)
		p[i] = pt(HOLD, (uint16_t)(1000 + i), REGCODEC_UINT16, REGCODEC_ABCD);
	p[124] = pt(HOLD, 1124, REGCODEC_FLOAT32, REGCODEC_ABCD);
	const struct mbclient_request *r = plan_of(p, 125, &n);
	assert_int_equal(n, 2);
	assert_int_equal(r[0].address, 1000);
	assert_int_equal(r[0].count, 124);
	assert_int_equal(r[1].address, 1124);
	assert_int_equal(r[1].count, 2);
	mbclient_fini(&pf.c);

	/* 123 registers 1000..1122 and a float32 at 1123..1124: exactly 125, one request */
	p[123] = pt(HOLD, 1123, REGCODEC_FLOAT32, REGCODEC_ABCD);
	r = plan_of(p, 124, &n);
	assert_int_equal(n, 1);
	assert_int_equal(r[0].address, 1000);
	assert_int_equal(r[0].count, FG_MODBUS_READ_MAX);
	mbclient_fini(&pf.c);
}

static void test_plan_keeps_tables_apart_and_sorts(void **state)
{
	struct mbclient_point p[] = {
		pt(HOLD, 5, REGCODEC_UINT16, REGCODEC_ABCD),
		pt(IN, 6, REGCODEC_UINT16, REGCODEC_ABCD),
		pt(IN, 5, REGCODEC_UINT16, REGCODEC_ABCD),
		pt(HOLD, 6, REGCODEC_UINT16, REGCODEC_ABCD),
		pt(IN, 50, REGCODEC_UINT16, REGCODEC_ABCD),
	};
	unsigned n;
	(void)state;
	const struct mbclient_request *r = plan_of(p, 5, &n);
	assert_int_equal(n, 3);
	assert_int_equal(r[0].table, IN);
	assert_int_equal(r[0].address, 5);
	assert_int_equal(r[0].count, 2);
	assert_int_equal(r[1].table, IN);
	assert_int_equal(r[1].address, 50);
	assert_int_equal(r[2].table, HOLD);
	assert_int_equal(r[2].address, 5);
	assert_int_equal(r[2].count, 2);
	mbclient_fini(&pf.c);
}

static void test_poll_returns_values_in_the_callers_order(void **state)
{
	struct mbclient_point p[] = {
		pt(HOLD, 7, REGCODEC_UINT16, REGCODEC_ABCD),
		pt(IN, 2, REGCODEC_INT32, REGCODEC_ABCD),
		pt(IN, 1, REGCODEC_UINT16, REGCODEC_ABCD),
	};
	double v[3];
	bool ok[3];
	unsigned n;
	(void)state;
	plan_of(p, 3, &n);
	pf.fake.regs[HOLD][7] = 777;
	pf.fake.regs[IN][1] = 11;
	pf.fake.regs[IN][2] = 0xFFFF; /* int32 -2 [NOTES] */
	pf.fake.regs[IN][3] = 0xFFFE;
	assert_int_equal(mbclient_poll(&pf.c, 0, v, ok, 3), 0);
	assert_true(ok[0] && ok[1] && ok[2]);
	assert_true(v[0] == 777.0);
	assert_true(v[1] == -2.0);
	assert_true(v[2] == 11.0);
	/* input 1..3 is one request (no gap), holding 7 another */
	assert_int_equal(pf.fake.reads, 2);
	assert_int_equal(pf.fake.log[0].address, 1);
	assert_int_equal(pf.fake.log[0].count, 3);
	mbclient_fini(&pf.c);
}

static void test_init_refuses_bad_config_and_points(void **state)
{
	struct mbclient_point good = pt(IN, 0, REGCODEC_UINT16, REGCODEC_ABCD);
	struct mbclient_point past_end = pt(IN, 65535, REGCODEC_FLOAT32, REGCODEC_ABCD);
	struct mbclient_point last = pt(IN, 65535, REGCODEC_UINT16, REGCODEC_ABCD);
	struct mbclient_source_cfg cfg;
	struct mbclient c;
	struct mb_fake fake;
	struct mbclient_backend be;
	(void)state;
	mb_fake_init(&fake);
	be = mb_fake_backend(&fake);

	cfg = tcp_cfg(0, 0.5, NULL);
	assert_int_equal(mbclient_init(&c, &cfg, &good, 1, &be), -EINVAL); /* port 0 */
	cfg = tcp_cfg(502, 0.0, NULL);
	assert_int_equal(mbclient_init(&c, &cfg, &good, 1, &be), -EINVAL);
	cfg = tcp_cfg(502, NAN, NULL);
	assert_int_equal(mbclient_init(&c, &cfg, &good, 1, &be), -EINVAL);
	cfg = tcp_cfg(502, 0.5, NULL);
	cfg.unit_id = 256;
	assert_int_equal(mbclient_init(&c, &cfg, &good, 1, &be), -EINVAL);
	cfg = tcp_cfg(502, 0.5, NULL);
	memset(cfg.host, 'h', sizeof cfg.host); /* no terminating NUL: refused, not truncated */
	assert_int_equal(mbclient_init(&c, &cfg, &good, 1, &be), -EINVAL);
	cfg = tcp_cfg(502, 0.5, NULL);
	assert_int_equal(mbclient_init(&c, &cfg, &past_end, 1, &be), -EINVAL);
	assert_int_equal(mbclient_init(&c, &cfg, &good, FG_TAGS_MAX + 1, &be), -E2BIG);
	assert_int_equal(fake.opens, 0);
	assert_int_equal(mbclient_init(&c, &cfg, &last, 1, &be), 0);
	mbclient_fini(&c);
	mbclient_fini(&c); /* twice is harmless */
	mbclient_fini(NULL);
	assert_int_equal(fake.frees, 1);

	cfg = tcp_cfg(502, 0.5, NULL);
	cfg.protocol = MBCLIENT_PROTOCOL_RTU;
	snprintf(cfg.device, sizeof cfg.device, "/dev/ttyS9");
	cfg.baud = 19200;
	cfg.parity = 'E';
	cfg.data_bits = 8;
	cfg.stop_bits = 1;
	cfg.unit_id = 1;
	assert_int_equal(mbclient_init(&c, &cfg, &good, 1, &be), 0);
	mbclient_fini(&c);
	cfg.unit_id = 0; /* broadcast: no reply ever */
	assert_int_equal(mbclient_init(&c, &cfg, &good, 1, &be), -EINVAL);
	cfg.unit_id = 248;
	assert_int_equal(mbclient_init(&c, &cfg, &good, 1, &be), -EINVAL);
	cfg.unit_id = 1;
	cfg.baud = 250000; /* libmodbus would silently use 9600 */
	assert_int_equal(mbclient_init(&c, &cfg, &good, 1, &be), -EINVAL);
	cfg.baud = 19200;
	cfg.parity = 'X';
	assert_int_equal(mbclient_init(&c, &cfg, &good, 1, &be), -EINVAL);
	cfg.parity = 'N';
	cfg.data_bits = 7;
	assert_int_equal(mbclient_init(&c, &cfg, &good, 1, &be), -EINVAL);
}

/* ---- faults, back-off and recovery against the fake ---------------------- */

static struct mb_fake ff;
static struct mbclient_backend ffbe;
static struct mbclient fc;
static struct logbook fbook;

/* Two requests: input 0..1 (float32) and holding 100 (uint16). */
static void fault_setup(void)
{
	static const struct mbclient_point p[] = {
		{IN, 0, REGCODEC_FLOAT32, REGCODEC_ABCD},
		{HOLD, 100, REGCODEC_UINT16, REGCODEC_ABCD},
	};
	struct mbclient_source_cfg cfg = tcp_cfg(502, 0.5, &fbook);
	memset(&fbook, 0, sizeof fbook);
	mb_fake_init(&ff);
	ffbe = mb_fake_backend(&ff);
	ff.regs[IN][0] = 0x47F1; /* 123456.0f [NOTES] */
	ff.regs[IN][1] = 0x2000;
	ff.regs[HOLD][100] = 42;
	assert_int_equal(mbclient_init(&fc, &cfg, p, 2, &ffbe), 0);
}

static void test_failed_read_marks_every_point_bad_at_once(void **state)
{
	double v[2];
	bool ok[2];
	(void)state;
	fault_setup();
	assert_int_equal(mbclient_poll(&fc, 0, v, ok, 2), 0);
	assert_true(ok[0] && ok[1]);
	assert_true(v[0] == 123456.0);

	ff.fail_read_at = 4; /* the second request of the second poll */
	assert_int_equal(mbclient_poll(&fc, 1000, v, ok, 2), -ETIMEDOUT);
	assert_false(ok[0]); /* read fine, but the poll as a whole is lost */
	assert_false(ok[1]);
	assert_true(isnan(v[0]));
	assert_true(isnan(v[1]));
	assert_false(mbclient_connected(&fc));
	assert_int_equal(ff.closes, 1);
	assert_true(mbclient_next_attempt_mono_ms(&fc) == 1500);
	assert_int_equal(mbclient_last_error(&fc), -ETIMEDOUT);
	mbclient_fini(&fc);
}

static void test_reconnect_backoff_sequence_is_pinned(void **state)
{
	/* Our specification (mbclient.h): 0.5, then 1 s for ever (quick probes:
	 * a peer that comes back is read within about a second). */
	static const int64_t expect[] = {0, 500, 1500, 2500, 3500, 4500, 5500};
	int64_t seen[128];
	unsigned seen_count = 0;
	double v[2];
	bool ok[2];
	(void)state;
	fault_setup();
	ff.connect_fail_count = -1;
	for (int64_t t = 0; t <= 100000; t += 100) {
		unsigned before = ff.connects;
		int rc = mbclient_poll(&fc, t, v, ok, 2);
		assert_false(ok[0]);
		assert_false(ok[1]);
		if (ff.connects != before) {
			assert_int_equal(rc, -ECONNREFUSED);
			assert_true(seen_count < 128);
			seen[seen_count++] = t;
		} else {
			assert_int_equal(rc, -ENOTCONN); /* waiting: returns at once */
		}
	}
	/* 0, 500, then every 1000 ms from 1500 to 99500: 2 + 99 attempts. */
	assert_int_equal(seen_count, 101);
	for (unsigned i = 0; i < sizeof expect / sizeof expect[0]; i++)
		assert_true(seen[i] == expect[i]);
	assert_true(seen[seen_count - 1] == 99500);
	assert_int_equal(ff.reads, 0);
	assert_int_equal(book_count(&fbook, "down: connect: connection refused"), 1);
	mbclient_fini(&fc);
}

static void test_backoff_resets_after_a_good_poll(void **state)
{
	double v[2];
	bool ok[2];
	(void)state;
	fault_setup();
	ff.connect_fail_count = 3; /* at 0, 500, 1500 */
	assert_int_equal(mbclient_poll(&fc, 0, v, ok, 2), -ECONNREFUSED);
	assert_int_equal(mbclient_poll(&fc, 500, v, ok, 2), -ECONNREFUSED);
	assert_int_equal(mbclient_poll(&fc, 1500, v, ok, 2), -ECONNREFUSED);
	assert_true(mbclient_next_attempt_mono_ms(&fc) == 2500);
	assert_int_equal(mbclient_poll(&fc, 2500, v, ok, 2), 0);
	ff.fail_read_at = ff.reads + 1;
	ff.fail_read_err = -ECONNRESET;
	assert_int_equal(mbclient_poll(&fc, 4000, v, ok, 2), -ECONNRESET);
	assert_true(mbclient_next_attempt_mono_ms(&fc) == 4500); /* back to 0.5 s */
	mbclient_fini(&fc);
}

static void test_recovery_restores_values_and_logs_once_each_way(void **state)
{
	double v[2];
	bool ok[2];
	(void)state;
	fault_setup();
	assert_int_equal(mbclient_poll(&fc, 10000, v, ok, 2), 0);
	assert_int_equal(book_count(&fbook, "source kiln-row-plc: connected"), 1);
	ff.fail_read_at = 3;
	ff.fail_read_times = 1;
	ff.fail_read_err = -EMBBADDATA; /* a stale reply */
	ff.connect_fail_count = 2;      /* and the device stays away a while */
	assert_int_equal(mbclient_poll(&fc, 11000, v, ok, 2), -EMBBADDATA);
	assert_int_equal(mbclient_poll(&fc, 11500, v, ok, 2), -ECONNREFUSED);
	assert_int_equal(mbclient_poll(&fc, 12500, v, ok, 2), -ECONNREFUSED);
	assert_int_equal(mbclient_poll(&fc, 13000, v, ok, 2), -ENOTCONN); /* due at 13500 */
	assert_int_equal(mbclient_poll(&fc, 13500, v, ok, 2), 0);
	assert_true(ok[0] && ok[1]);
	assert_true(v[0] == 123456.0);
	assert_true(v[1] == 42.0);
	assert_int_equal(book_count(&fbook, "down: read input 0+2: invalid or stale reply"), 1);
	assert_int_equal(book_count(&fbook, "down"), 1);
	assert_int_equal(book_count(&fbook, "recovered after 2.5 s"), 1);
	/* closed after the bad reply and after each failed connect, never
	 * connected twice without a close in between */
	assert_int_equal(ff.misuse, 0);
	assert_int_equal(ff.closes, 3);
	mbclient_fini(&fc);
	assert_int_equal(ff.closes, 4);
	assert_int_equal(ff.frees, 1);
	assert_int_equal(ff.misuse, 0);
}

static void test_exception_marks_only_its_request_bad_and_keeps_the_link(void **state)
{
	struct mbclient_point p[] = {
		pt(IN, 2000, REGCODEC_UINT16, REGCODEC_ABCD), /* beyond the fake: exception 2 */
		pt(IN, 0, REGCODEC_UINT16, REGCODEC_ABCD),
	};
	struct mbclient_source_cfg cfg = tcp_cfg(502, 0.5, &fbook);
	double v[2];
	bool ok[2];
	(void)state;
	memset(&fbook, 0, sizeof fbook);
	mb_fake_init(&ff);
	ffbe = mb_fake_backend(&ff);
	ff.regs[IN][0] = 9;
	assert_int_equal(mbclient_init(&fc, &cfg, p, 2, &ffbe), 0);
	for (int i = 0; i < 3; i++) {
		assert_int_equal(mbclient_poll(&fc, i * 1000, v, ok, 2), -EMBXILADD);
		assert_false(ok[0]);
		assert_true(ok[1]);
		assert_true(v[1] == 9.0);
		assert_true(mbclient_connected(&fc));
	}
	assert_int_equal(ff.connects, 1);
	assert_int_equal(ff.closes, 0);
	assert_int_equal(book_count(&fbook, "input 2000+1 refused: Modbus exception 2"), 1);
	mbclient_fini(&fc);
}

static void test_strerror_covers_errnos_and_libmodbus_codes(void **state)
{
	(void)state;
	assert_string_equal(mbclient_strerror(-ETIMEDOUT), "timed out");
	assert_string_equal(mbclient_strerror(-EMBXILADD),
			    "Modbus exception 2: illegal data address");
	assert_string_equal(mbclient_strerror(EMBBADDATA), "invalid or stale reply");
	assert_string_equal(mbclient_strerror(-ENOTCONN), "not connected (waiting to reconnect)");
	assert_string_equal(mbclient_strerror(-123456), "unknown error");
}

/* ---- real TCP against our own server ------------------------------------ */

static void test_poll_decodes_each_type_and_order_over_tcp(void **state)
{
	/* input registers 0.. : the vectors of test_regcodec.c */
	static const uint16_t in[] = {
		0x47F1, 0x2000, /* 0  float32 ABCD 123456 */
		0xF147, 0x0020, /* 2  float32 BADC */
		0x2000, 0x47F1, /* 4  float32 CDAB */
		0x0020, 0xF147, /* 6  float32 DCBA */
		0xFFFF, 0xFFFE, /* 8  int32 ABCD -2 */
		0x32EB, 0xF8A4, /* 10 int32 CDAB -123456789 */
		0xEE6B, 0x2800, /* 12 uint32 ABCD 4000000000 */
		0xCFC7,         /* 14 int16 -12345 */
		0xC7CF,         /* 15 int16 BADC -12345 */
		0xCFC7,         /* 16 uint16 53191 */
	};
	static const uint16_t hold[] = {0x0020, 0xF147}; /* holding 40: float32 DCBA */
	struct mbclient_point p[] = {
		pt(IN, 0, REGCODEC_FLOAT32, REGCODEC_ABCD),
		pt(IN, 2, REGCODEC_FLOAT32, REGCODEC_BADC),
		pt(IN, 4, REGCODEC_FLOAT32, REGCODEC_CDAB),
		pt(IN, 6, REGCODEC_FLOAT32, REGCODEC_DCBA),
		pt(IN, 8, REGCODEC_INT32, REGCODEC_ABCD),
		pt(IN, 10, REGCODEC_INT32, REGCODEC_CDAB),
		pt(IN, 12, REGCODEC_UINT32, REGCODEC_ABCD),
		pt(IN, 14, REGCODEC_INT16, REGCODEC_ABCD),
		pt(IN, 15, REGCODEC_INT16, REGCODEC_BADC),
		pt(IN, 16, REGCODEC_UINT16, REGCODEC_ABCD),
		pt(HOLD, 40, REGCODEC_FLOAT32, REGCODEC_DCBA),
	};
	static const double expect[] = {123456, 123456, 123456, 123456, -2, -123456789,
					4000000000.0, -12345, -12345, 53191, 123456};
	struct mbserver_map_cfg map = {.input_start = 0, .input_count = 32,
				       .holding_start = 40, .holding_count = 8};
	struct mbserver srv;
	struct mbclient c;
	double v[11];
	bool ok[11];
	unsigned n;
	(void)state;
	assert_int_equal(mbserver_open(&srv, "127.0.0.1", 0, &map, true), 0);
	assert_int_equal(mbserver_set_input(&srv, 0, in, sizeof in / sizeof in[0]), 0);
	assert_int_equal(mbserver_set_holding(&srv, 40, hold, 2), 0);
	struct mbclient_source_cfg cfg = tcp_cfg(mbserver_port(&srv), 0.5, NULL);
	assert_int_equal(mbclient_init(&c, &cfg, p, 11, &mbclient_backend_libmodbus), 0);
	mbclient_plan(&c, &n);
	assert_int_equal(n, 2);
	assert_int_equal(mbclient_poll(&c, mono_ms(), v, ok, 11), 0);
	for (unsigned i = 0; i < 11; i++) {
		assert_true(ok[i]);
		assert_true(v[i] == expect[i]);
	}
	mbclient_fini(&c);
	mbserver_close(&srv);
}

static void test_connect_refused_then_recovers_when_the_server_appears(void **state)
{
	static const struct mbclient_point p[] = {{HOLD, 0, REGCODEC_UINT16, REGCODEC_ABCD}};
	struct mbserver_map_cfg map = {.holding_start = 0, .holding_count = 4};
	static const uint16_t seven = 7;
	struct logbook book;
	struct mbserver srv;
	struct mbclient c;
	double v[1];
	bool ok[1];
	int port = dead_port();
	(void)state;
	memset(&book, 0, sizeof book);
	struct mbclient_source_cfg cfg = tcp_cfg(port, 0.5, &book);
	assert_int_equal(mbclient_init(&c, &cfg, p, 1, &mbclient_backend_libmodbus), 0);
	assert_int_equal(mbclient_poll(&c, 0, v, ok, 1), -ECONNREFUSED);
	assert_false(ok[0]);
	assert_int_equal(mbclient_poll(&c, 100, v, ok, 1), -ENOTCONN);

	assert_int_equal(mbserver_open(&srv, "127.0.0.1", port, &map, true), 0);
	assert_int_equal(mbserver_set_holding(&srv, 0, &seven, 1), 0);
	assert_int_equal(mbclient_poll(&c, 500, v, ok, 1), 0);
	assert_true(ok[0]);
	assert_true(v[0] == 7.0);
	assert_int_equal(book_count(&book, "down: connect: connection refused"), 1);
	assert_int_equal(book_count(&book, "recovered after 0.5 s"), 1);
	mbclient_fini(&c);
	mbserver_close(&srv);
}

static void test_server_restart_is_survived_by_close_and_reconnect(void **state)
{
	static const struct mbclient_point p[] = {{IN, 3, REGCODEC_UINT16, REGCODEC_ABCD}};
	struct mbserver_map_cfg map = {.input_start = 0, .input_count = 8};
	uint16_t val = 31;
	struct mbserver srv;
	struct mbclient c;
	double v[1];
	bool ok[1];
	(void)state;
	assert_int_equal(mbserver_open(&srv, "127.0.0.1", 0, &map, true), 0);
	int port = mbserver_port(&srv);
	assert_int_equal(mbserver_set_input(&srv, 3, &val, 1), 0);
	struct mbclient_source_cfg cfg = tcp_cfg(port, 0.5, NULL);
	assert_int_equal(mbclient_init(&c, &cfg, p, 1, &mbclient_backend_libmodbus), 0);
	assert_int_equal(mbclient_poll(&c, 0, v, ok, 1), 0);
	assert_true(v[0] == 31.0);

	mbserver_close(&srv);
	int rc = mbclient_poll(&c, 1000, v, ok, 1);
	assert_true(rc == -ECONNRESET || rc == -EPIPE);
	assert_false(ok[0]);
	assert_false(mbclient_connected(&c));

	assert_int_equal(mbserver_open(&srv, "127.0.0.1", port, &map, true), 0);
	val = 32;
	assert_int_equal(mbserver_set_input(&srv, 3, &val, 1), 0);
	assert_int_equal(mbclient_poll(&c, 1500, v, ok, 1), 0);
	assert_true(ok[0]);
	assert_true(v[0] == 32.0);
	mbclient_fini(&c);
	mbserver_close(&srv);
}

static void test_silent_server_times_out_within_the_bound(void **state)
{
	/* Accepts (the kernel's backlog) but never answers. */
	static const struct mbclient_point p[] = {
		{IN, 0, REGCODEC_UINT16, REGCODEC_ABCD},
		{IN, 10, REGCODEC_UINT16, REGCODEC_ABCD},
		{IN, 20, REGCODEC_UINT16, REGCODEC_ABCD},
	};
	struct sockaddr_in a = {.sin_family = AF_INET, .sin_port = 0};
	socklen_t len = sizeof a;
	struct mbclient c;
	double v[3];
	bool ok[3];
	(void)state;
	int fd = socket(AF_INET, SOCK_STREAM, 0);
	assert_true(fd >= 0);
	a.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
	assert_int_equal(bind(fd, (struct sockaddr *)&a, sizeof a), 0);
	assert_int_equal(listen(fd, 4), 0);
	assert_int_equal(getsockname(fd, (struct sockaddr *)&a, &len), 0);

	struct mbclient_source_cfg cfg = tcp_cfg(ntohs(a.sin_port), 0.2, NULL);
	assert_int_equal(mbclient_init(&c, &cfg, p, 3, &mbclient_backend_libmodbus), 0);
	int64_t t0 = mono_ms();
	assert_int_equal(mbclient_poll(&c, 0, v, ok, 3), -ETIMEDOUT);
	int64_t took = mono_ms() - t0;
	assert_false(ok[0] || ok[1] || ok[2]);
	/* one response timeout (0.2 s), then it stops: not 3 x 0.2 s. Lower bound
	 * proves it waited; the upper one allows 0.3 s for a loaded machine. */
	assert_true(took >= 150);
	assert_true(took <= 500);
	assert_false(mbclient_connected(&c));
	mbclient_fini(&c);
	close(fd);
}

/* ---- RTU over a pty ------------------------------------------------------ */

static struct mbclient_source_cfg rtu_cfg(const char *path, int unit, double timeout_s)
{
	struct mbclient_source_cfg cfg = tcp_cfg(502, timeout_s, NULL);
	cfg.protocol = MBCLIENT_PROTOCOL_RTU;
	snprintf(cfg.device, sizeof cfg.device, "%s", path);
	cfg.baud = 19200;
	cfg.parity = 'N';
	cfg.data_bits = 8;
	cfg.stop_bits = 1;
	cfg.unit_id = unit;
	return cfg;
}

static const uint16_t rtu_values[16] = {
	[0] = 111, [1] = 0x47F1, [2] = 0x2000, [10] = 222,
};

static void test_rtu_reads_values_over_a_pty(void **state)
{
	static const struct mbclient_point p[] = {
		{IN, 0, REGCODEC_UINT16, REGCODEC_ABCD},
		{IN, 1, REGCODEC_FLOAT32, REGCODEC_ABCD},
		{IN, 10, REGCODEC_UINT16, REGCODEC_ABCD},
	};
	struct mb_rtuslave slave;
	struct mbclient c;
	double v[3];
	bool ok[3];
	(void)state;
	assert_int_equal(mb_rtuslave_start(&slave, 3, rtu_values, 16), 0);
	struct mbclient_source_cfg cfg = rtu_cfg(slave.path, 3, 0.5);
	assert_int_equal(mbclient_init(&c, &cfg, p, 3, &mbclient_backend_libmodbus), 0);
	assert_int_equal(mbclient_poll(&c, 0, v, ok, 3), 0);
	assert_true(ok[0] && ok[1] && ok[2]);
	assert_true(v[0] == 111.0);
	assert_true(v[1] == 123456.0);
	assert_true(v[2] == 222.0);
	mbclient_fini(&c);
	mb_rtuslave_stop(&slave);
}

static void test_rtu_absent_unit_times_out_and_marks_points_bad(void **state)
{
	static const struct mbclient_point p[] = {{IN, 0, REGCODEC_UINT16, REGCODEC_ABCD}};
	struct mb_rtuslave slave;
	struct mbclient c;
	double v[1];
	bool ok[1];
	(void)state;
	assert_int_equal(mb_rtuslave_start(&slave, 3, rtu_values, 16), 0);
	struct mbclient_source_cfg cfg = rtu_cfg(slave.path, 9, 0.1); /* nobody is unit 9 */
	assert_int_equal(mbclient_init(&c, &cfg, p, 1, &mbclient_backend_libmodbus), 0);
	assert_int_equal(mbclient_poll(&c, 0, v, ok, 1), -ETIMEDOUT);
	assert_false(ok[0]);
	assert_false(mbclient_connected(&c));
	mbclient_fini(&c);
	mb_rtuslave_stop(&slave);
}

static void test_rtu_missing_device_is_a_connect_failure(void **state)
{
	static const struct mbclient_point p[] = {{IN, 0, REGCODEC_UINT16, REGCODEC_ABCD}};
	struct logbook book;
	struct mbclient c;
	double v[1];
	bool ok[1];
	(void)state;
	memset(&book, 0, sizeof book);
	struct mbclient_source_cfg cfg = rtu_cfg("/nonexistent/ttyFG0", 1, 0.1);
	cfg.log = log_to_book;
	cfg.log_user = &book;
	assert_int_equal(mbclient_init(&c, &cfg, p, 1, &mbclient_backend_libmodbus), 0);
	assert_int_equal(mbclient_poll(&c, 0, v, ok, 1), -ENOENT);
	assert_false(ok[0]);
	assert_int_equal(mbclient_poll(&c, 500, v, ok, 1), -ENOENT); /* retried, still absent */
	assert_int_equal(book_count(&book, "down: connect: no such device or host"), 1);
	mbclient_fini(&c);
}

/* RTU has no transaction id: unless the late reply is drained after a
 * timeout, it is taken as the answer to the next request of the same size
 * (notes section 1: "the read at 8 got address 5's"). */
static void test_rtu_late_reply_is_not_taken_for_the_next_answer(void **state)
{
	static const struct mbclient_point p[] = {
		{IN, 0, REGCODEC_UINT16, REGCODEC_ABCD},
		{IN, 10, REGCODEC_UINT16, REGCODEC_ABCD},
	};
	struct mb_rtuslave slave;
	struct mbclient c;
	double v[2];
	bool ok[2];
	(void)state;
	assert_int_equal(mb_rtuslave_start(&slave, 3, rtu_values, 16), 0);
	/* Timeout 0.2 s, answer after 0.25 s: the reply is late by less than
	 * the one extra response time the client waits before it flushes (so it
	 * lands 150 ms before the flush), and without that wait it would arrive
	 * 150 ms before the retried request times out and be taken for its
	 * answer. Both margins are wide for a loaded test machine. */
	mb_rtuslave_set_slow(&slave, 0, 250);
	struct mbclient_source_cfg cfg = rtu_cfg(slave.path, 3, 0.2);
	assert_int_equal(mbclient_init(&c, &cfg, p, 2, &mbclient_backend_libmodbus), 0);
	assert_int_equal(mbclient_poll(&c, 0, v, ok, 2), -ETIMEDOUT);
	mb_rtuslave_set_slow(&slave, -1, 0);
	/* The caller's clock says the back-off is over at once; the real late
	 * reply may still be on the line unless the client drained it. */
	assert_int_equal(mbclient_poll(&c, 500, v, ok, 2), 0);
	assert_true(ok[0] && ok[1]);
	assert_true(v[0] == 111.0);
	assert_true(v[1] == 222.0);
	assert_int_equal(mbclient_poll(&c, 1500, v, ok, 2), 0);
	assert_true(v[0] == 111.0);
	assert_true(v[1] == 222.0);
	mbclient_fini(&c);
	mb_rtuslave_stop(&slave);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_plan_merges_contiguous_points),
		cmocka_unit_test(test_plan_does_not_read_across_gaps),
		cmocka_unit_test(test_plan_merges_overlapping_points),
		cmocka_unit_test(test_plan_splits_at_125_registers),
		cmocka_unit_test(test_plan_keeps_a_32_bit_point_whole_at_the_limit),
		cmocka_unit_test(test_plan_keeps_tables_apart_and_sorts),
		cmocka_unit_test(test_poll_returns_values_in_the_callers_order),
		cmocka_unit_test(test_init_refuses_bad_config_and_points),
		cmocka_unit_test(test_failed_read_marks_every_point_bad_at_once),
		cmocka_unit_test(test_reconnect_backoff_sequence_is_pinned),
		cmocka_unit_test(test_backoff_resets_after_a_good_poll),
		cmocka_unit_test(test_recovery_restores_values_and_logs_once_each_way),
		cmocka_unit_test(test_exception_marks_only_its_request_bad_and_keeps_the_link),
		cmocka_unit_test(test_strerror_covers_errnos_and_libmodbus_codes),
		cmocka_unit_test(test_poll_decodes_each_type_and_order_over_tcp),
		cmocka_unit_test(test_connect_refused_then_recovers_when_the_server_appears),
		cmocka_unit_test(test_server_restart_is_survived_by_close_and_reconnect),
		cmocka_unit_test(test_silent_server_times_out_within_the_bound),
		cmocka_unit_test(test_rtu_reads_values_over_a_pty),
		cmocka_unit_test(test_rtu_absent_unit_times_out_and_marks_points_bad),
		cmocka_unit_test(test_rtu_missing_device_is_a_connect_failure),
		cmocka_unit_test(test_rtu_late_reply_is_not_taken_for_the_next_answer),
	};
	return cmocka_run_group_tests_name("mbclient", tests, NULL, NULL);
}
