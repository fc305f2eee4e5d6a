/*
 * test_mbserver.c - the Modbus TCP server, exercised with libmodbus 3.1.6's
 * own client functions (an implementation independent of ours) and with raw
 * sockets for misbehaving clients.
 *
 * Check values: exception codes and function codes are from the Modbus
 * Application Protocol v1.1b3 (section 7: code 1 illegal function, 2 illegal
 * data address), as libmodbus reports them (EMBXILFUN, EMBXILADD). Register
 * values are arbitrary bit patterns compared exactly.
 *
 * Everything listens on 127.0.0.1, on an ephemeral port; the server listens
 * before mbserver_open() returns, so connecting is the readiness check. No
 * sleeps are used for synchronisation: where the server must have dropped a
 * client first, the test waits for the EOF on that client's socket.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <errno.h>
#include <poll.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include <arpa/inet.h>
#include <netinet/in.h>
#include <sys/socket.h>

#include <modbus.h>

#include "mbserver.h"

static const struct mbserver_map_cfg map = {
	.input_start = 100, .input_count = 20,
	.holding_start = 0, .holding_count = 10,
	.discrete_start = 5, .discrete_count = 8,
};

/* A fresh server for every test (setup_ro / setup_rw), so counters start at 0. */
static struct mbserver srv;

static int setup_ro(void **state)
{
	(void)state;
	return mbserver_open(&srv, "127.0.0.1", 0, &map, true) == 0 ? 0 : -1;
}

static int setup_rw(void **state)
{
	(void)state;
	return mbserver_open(&srv, "127.0.0.1", 0, &map, false) == 0 ? 0 : -1;
}

static int teardown(void **state)
{
	(void)state;
	mbserver_close(&srv);
	return 0;
}

static modbus_t *client(void)
{
	modbus_t *ctx = modbus_new_tcp("127.0.0.1", mbserver_port(&srv));
	assert_non_null(ctx);
	modbus_set_response_timeout(ctx, 1, 0);
	assert_int_equal(modbus_connect(ctx), 0);
	return ctx;
}

static void client_done(modbus_t *ctx)
{
	modbus_close(ctx);
	modbus_free(ctx);
}

static int raw_connect(void)
{
	struct sockaddr_in a = {.sin_family = AF_INET};
	int fd = socket(AF_INET, SOCK_STREAM, 0);
	assert_true(fd >= 0);
	a.sin_port = htons((uint16_t)mbserver_port(&srv));
	a.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
	assert_int_equal(connect(fd, (struct sockaddr *)&a, sizeof a), 0);
	return fd;
}

/* Waits (up to 5 s) until the server closes fd: its recv gives 0 or an error. */
static bool wait_closed_by_server(int fd)
{
	char buf[512];
	for (int i = 0; i < 50; i++) {
		struct pollfd p = {.fd = fd, .events = POLLIN};
		if (poll(&p, 1, 100) > 0) {
			ssize_t n = recv(fd, buf, sizeof buf, 0);
			if (n <= 0)
				return true;
		}
	}
	return false;
}

static void test_listens_on_an_ephemeral_loopback_port(void **state)
{
	(void)state;
	assert_true(mbserver_port(&srv) > 0);
	modbus_t *c = client();
	client_done(c);
}

static void test_serves_input_holding_and_discrete_inputs(void **state)
{
	static const uint16_t in[3] = {0x47F1, 0x2000, 0xBEEF};
	static const uint16_t hold[2] = {0x0102, 0xFFFE};
	static const bool di[4] = {true, false, true, true};
	uint16_t r[3];
	uint8_t b[4];
	(void)state;
	assert_int_equal(mbserver_set_input(&srv, 110, in, 3), 0);
	assert_int_equal(mbserver_set_holding(&srv, 8, hold, 2), 0);
	assert_int_equal(mbserver_set_discrete(&srv, 6, di, 4), 0);
	modbus_t *c = client();
	assert_int_equal(modbus_read_input_registers(c, 110, 3, r), 3);
	assert_int_equal(r[0], 0x47F1);
	assert_int_equal(r[1], 0x2000);
	assert_int_equal(r[2], 0xBEEF);
	assert_int_equal(modbus_read_registers(c, 8, 2, r), 2);
	assert_int_equal(r[0], 0x0102);
	assert_int_equal(r[1], 0xFFFE);
	assert_int_equal(modbus_read_input_bits(c, 6, 4, b), 4);
	assert_int_equal(b[0], 1);
	assert_int_equal(b[1], 0);
	assert_int_equal(b[2], 1);
	assert_int_equal(b[3], 1);
	client_done(c);
}

static void test_read_outside_the_map_is_illegal_data_address(void **state)
{
	uint16_t r[4];
	(void)state;
	modbus_t *c = client();
	assert_int_equal(modbus_read_input_registers(c, 118, 4, r), -1); /* 118..121 > 119 */
	assert_int_equal(errno, EMBXILADD);
	assert_int_equal(modbus_read_registers(c, 100, 1, r), -1); /* holding is 0..9 */
	assert_int_equal(errno, EMBXILADD);
	/* the connection is still good */
	assert_int_equal(modbus_read_registers(c, 0, 1, r), 1);
	client_done(c);
}

static void test_setters_refuse_ranges_outside_the_map(void **state)
{
	uint16_t r[4] = {1, 2, 3, 4};
	bool b[2] = {true, true};
	(void)state;
	assert_int_equal(mbserver_set_input(&srv, 99, r, 1), -ERANGE);
	assert_int_equal(mbserver_set_input(&srv, 118, r, 3), -ERANGE);
	assert_int_equal(mbserver_set_holding(&srv, 9, r, 2), -ERANGE);
	assert_int_equal(mbserver_get_holding(&srv, 10, r, 1), -ERANGE);
	assert_int_equal(mbserver_set_discrete(&srv, 12, b, 2), -ERANGE);
	assert_int_equal(mbserver_set_discrete(&srv, 4, b, 1), -ERANGE);
	assert_int_equal(mbserver_set_input(&srv, 119, r, 1), 0);
}

static void test_read_only_refuses_every_write_with_illegal_function(void **state)
{
	static const uint16_t before[3] = {11, 22, 33};
	uint16_t w[2] = {0xAAAA, 0xBBBB};
	uint8_t bits[2] = {1, 1};
	uint16_t r[3];
	struct mbserver_stats st;
	(void)state;
	assert_int_equal(mbserver_set_holding(&srv, 0, before, 3), 0);
	modbus_t *c = client();
	assert_int_equal(modbus_write_bit(c, 0, 1), -1); /* FC 5 */
	assert_int_equal(errno, EMBXILFUN);
	assert_int_equal(modbus_write_register(c, 0, 0x5555), -1); /* FC 6 */
	assert_int_equal(errno, EMBXILFUN);
	assert_int_equal(modbus_write_bits(c, 0, 2, bits), -1); /* FC 15 */
	assert_int_equal(errno, EMBXILFUN);
	assert_int_equal(modbus_write_registers(c, 0, 2, w), -1); /* FC 16 */
	assert_int_equal(errno, EMBXILFUN);
	assert_int_equal(modbus_mask_write_register(c, 1, 0x0000, 0xFFFF), -1); /* FC 22 */
	assert_int_equal(errno, EMBXILFUN);
	assert_int_equal(modbus_write_and_read_registers(c, 2, 1, w, 0, 3, r), -1); /* FC 23 */
	assert_int_equal(errno, EMBXILFUN);
	/* unchanged, seen by a client and by the owner */
	assert_int_equal(modbus_read_registers(c, 0, 3, r), 3);
	assert_memory_equal(r, before, sizeof before);
	assert_int_equal(mbserver_get_holding(&srv, 0, r, 3), 0);
	assert_memory_equal(r, before, sizeof before);
	mbserver_get_stats(&srv, &st);
	assert_int_equal(st.writes_refused, 6);
	client_done(c);
}

static void test_writable_server_takes_holding_writes(void **state)
{
	uint16_t w[2] = {0x1234, 0x5678};
	uint16_t r[2];
	(void)state;
	modbus_t *c = client();
	assert_int_equal(modbus_write_registers(c, 4, 2, w), 2);
	assert_int_equal(modbus_write_register(c, 9, 0x0042), 1);
	assert_int_equal(mbserver_get_holding(&srv, 4, r, 2), 0);
	assert_int_equal(r[0], 0x1234);
	assert_int_equal(r[1], 0x5678);
	assert_int_equal(mbserver_get_holding(&srv, 9, r, 1), 0);
	assert_int_equal(r[0], 0x0042);
	/* no coils exist: exception 2, not a silent success */
	assert_int_equal(modbus_write_bit(c, 0, 1), -1);
	assert_int_equal(errno, EMBXILADD);
	client_done(c);
}

static void test_serves_several_clients_in_turn_and_at_once(void **state)
{
	uint16_t v = 0x0777, r;
	struct mbserver_stats st;
	(void)state;
	assert_int_equal(mbserver_set_holding(&srv, 3, &v, 1), 0);
	for (int i = 0; i < 5; i++) { /* one after another */
		modbus_t *c = client();
		assert_int_equal(modbus_read_registers(c, 3, 1, &r), 1);
		assert_int_equal(r, 0x0777);
		client_done(c);
	}
	modbus_t *a = client(); /* and side by side */
	modbus_t *b = client();
	for (int i = 0; i < 3; i++) {
		assert_int_equal(modbus_read_registers(a, 3, 1, &r), 1);
		assert_int_equal(modbus_read_registers(b, 3, 1, &r), 1);
		assert_int_equal(r, 0x0777);
	}
	client_done(a);
	client_done(b);
	mbserver_get_stats(&srv, &st);
	assert_int_equal(st.clients_accepted, 7);
	assert_int_equal(st.requests, 11);
}

static void test_survives_garbage_and_abrupt_disconnects(void **state)
{
	/* Not an MBAP header: protocol id "ve", length "l " (27680 > 254) */
	static const char junk[] = "level 3 trip?\xff\xff\xff";
	/* A well-framed request with the unknown function 0x20, transaction 0x0304 */
	static const uint8_t unknown[8] = {3, 4, 0, 0, 0, 2, 0xFF, 0x20};
	/* FC 3, read 1 holding register from 0, transaction 0x0102, unit 255 */
	static const uint8_t req[12] = {1, 2, 0, 0, 0, 6, 0xFF, 3, 0, 0, 0, 1};
	uint8_t rsp[64];
	uint16_t r;
	struct mbserver_stats st;
	(void)state;
	modbus_t *good = client(); /* stays connected throughout */

	int fd = raw_connect();
	assert_true(send(fd, junk, sizeof junk - 1, MSG_NOSIGNAL) > 0);
	assert_true(wait_closed_by_server(fd)); /* not Modbus: dropped at once */
	close(fd);

	fd = raw_connect();
	assert_int_equal(send(fd, unknown, sizeof unknown, MSG_NOSIGNAL), 8);
	assert_int_equal(recv(fd, rsp, sizeof rsp, 0), 9); /* exception 1, at once */
	assert_int_equal(rsp[0], 3);
	assert_int_equal(rsp[7], 0x20 | 0x80);
	assert_int_equal(rsp[8], MODBUS_EXCEPTION_ILLEGAL_FUNCTION);
	/* and the same connection is in step */
	assert_int_equal(send(fd, req, sizeof req, MSG_NOSIGNAL), (ssize_t)sizeof req);
	assert_int_equal(recv(fd, rsp, sizeof rsp, 0), 11);
	assert_int_equal(rsp[0], 1);
	assert_int_equal(rsp[1], 2);
	assert_int_equal(rsp[7], 3);
	close(fd);

	fd = raw_connect();
	assert_int_equal(send(fd, "\x00\x01\x00", 3, MSG_NOSIGNAL), 3); /* half a header */
	close(fd);                                                      /* and gone */

	modbus_t *late = client();
	assert_int_equal(modbus_read_registers(late, 0, 1, &r), 1);
	assert_int_equal(modbus_read_registers(good, 0, 1, &r), 1);
	client_done(late);
	client_done(good);
	mbserver_get_stats(&srv, &st);
	assert_true(st.clients_dropped >= 2);
	assert_int_equal(st.clients_accepted, 5);
}

/* A client sending a request a byte every 150 ms (the attack that used to
 * make the server unreachable) holds up nobody, and is dropped when its
 * request is not complete a second after its first byte. */
static void test_byte_at_a_time_client_delays_nobody(void **state)
{
	static const uint8_t req[12] = {0, 9, 0, 0, 0, 6, 0xFF, 3, 0, 0, 0, 1};
	uint16_t r;
	struct mbserver_stats st;
	(void)state;
	int fd = raw_connect();
	modbus_t *c = client();
	bool dropped = false;
	for (unsigned i = 0; i < sizeof req && !dropped; i++) {
		if (send(fd, &req[i], 1, MSG_NOSIGNAL) != 1)
			dropped = true;
		/* the good client is answered between the dribbled bytes */
		assert_int_equal(modbus_read_registers(c, 0, 1, &r), 1);
		struct timespec ts = {.tv_sec = 0, .tv_nsec = 150 * 1000 * 1000};
		nanosleep(&ts, NULL);
	}
	assert_true(wait_closed_by_server(fd)); /* 12 x 150 ms > the 1 s request limit */
	close(fd);
	client_done(c);
	mbserver_get_stats(&srv, &st);
	assert_int_equal(st.clients_timed_out, 1);
}

/* Connections from one address beyond the limit are refused; another
 * address (127.0.0.2, also loopback on Linux) is still served. */
static void test_per_address_limit_keeps_a_slot_for_others(void **state)
{
	int fds[MBSERVER_PER_ADDRESS + 2];
	uint16_t r;
	struct mbserver_stats st;
	(void)state;
	for (unsigned i = 0; i < MBSERVER_PER_ADDRESS + 2; i++)
		fds[i] = raw_connect(); /* idle connections from 127.0.0.1 */
	assert_true(wait_closed_by_server(fds[MBSERVER_PER_ADDRESS]));
	assert_true(wait_closed_by_server(fds[MBSERVER_PER_ADDRESS + 1]));
	struct sockaddr_in from = {.sin_family = AF_INET};
	from.sin_addr.s_addr = htonl(0x7f000002); /* 127.0.0.2 */
	struct sockaddr_in to = {.sin_family = AF_INET};
	to.sin_port = htons((uint16_t)mbserver_port(&srv));
	to.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
	int other = socket(AF_INET, SOCK_STREAM, 0);
	assert_int_equal(bind(other, (struct sockaddr *)&from, sizeof from), 0);
	assert_int_equal(connect(other, (struct sockaddr *)&to, sizeof to), 0);
	modbus_t *ctx = modbus_new_tcp("127.0.0.1", mbserver_port(&srv));
	modbus_set_socket(ctx, other);
	modbus_set_response_timeout(ctx, 1, 0);
	assert_int_equal(modbus_read_registers(ctx, 0, 1, &r), 1);
	modbus_free(ctx);
	close(other);
	for (unsigned i = 0; i < MBSERVER_PER_ADDRESS + 2; i++)
		close(fds[i]);
	mbserver_get_stats(&srv, &st);
	assert_int_equal(st.clients_refused, 2);
}

/* An idle client is dropped after the idle timeout (200 ms here). */
static void test_idle_client_is_dropped(void **state)
{
	struct mbserver s2;
	struct mbserver_stats st;
	const struct mbserver_limits lim = {
		.idle_timeout_ms = 200, .request_timeout_ms = 100, .per_address = 2};
	(void)state;
	assert_int_equal(mbserver_open_limits(&s2, "127.0.0.1", 0, &map, true, &lim), 0);
	struct sockaddr_in a = {.sin_family = AF_INET};
	a.sin_port = htons((uint16_t)mbserver_port(&s2));
	a.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
	int fd = socket(AF_INET, SOCK_STREAM, 0);
	assert_int_equal(connect(fd, (struct sockaddr *)&a, sizeof a), 0);
	assert_true(wait_closed_by_server(fd));
	close(fd);
	mbserver_get_stats(&s2, &st);
	assert_int_equal(st.clients_timed_out, 1);
	mbserver_close(&s2);
	const struct mbserver_limits bad = {.idle_timeout_ms = 0, .request_timeout_ms = 1,
					    .per_address = 1};
	assert_int_equal(mbserver_open_limits(&s2, "127.0.0.1", 0, &map, true, &bad), -EINVAL);
}

static void test_request_with_a_wrong_length_gets_exception_3(void **state)
{
	/* FC 3 with an MBAP length of 8 (two stray bytes): illegal data value */
	static const uint8_t req[14] = {0, 7, 0, 0, 0, 8, 0xFF, 3, 0, 0, 0, 1, 0, 0};
	uint8_t rsp[64];
	(void)state;
	int fd = raw_connect();
	assert_int_equal(send(fd, req, sizeof req, MSG_NOSIGNAL), (ssize_t)sizeof req);
	assert_int_equal(recv(fd, rsp, sizeof rsp, 0), 9);
	assert_int_equal(rsp[7], 3 | 0x80);
	assert_int_equal(rsp[8], MODBUS_EXCEPTION_ILLEGAL_DATA_VALUE);
	close(fd);
}

static void test_client_stalled_mid_frame_is_dropped_and_others_served(void **state)
{
	uint16_t r;
	(void)state;
	int fd = raw_connect();
	/* five bytes of a header, and nothing more */
	assert_int_equal(send(fd, "\x00\x01\x00\x00\x00", 5, MSG_NOSIGNAL), 5);
	modbus_t *c = client();
	assert_int_equal(modbus_read_registers(c, 0, 1, &r), 1); /* within its 1 s timeout */
	assert_true(wait_closed_by_server(fd));
	close(fd);
	client_done(c);
}

/* A client that sends requests and never reads the replies must not make
 * the owner's setters wait: the server drops it when its buffer is full. */
static void test_setters_do_not_wait_for_a_client_that_does_not_read(void **state)
{
	/* FC 4, read 20 input registers from 100, MBAP unit 255 */
	static const uint8_t req[12] = {0, 1, 0, 0, 0, 6, 0xFF, 4, 0, 100, 0, 20};
	uint16_t v[20] = {0};
	int64_t worst_us = 0;
	struct timespec t0, t1, start;
	bool dropped = false;
	(void)state;
	int small = 4096;
	int fd = socket(AF_INET, SOCK_STREAM, 0);
	assert_true(fd >= 0);
	setsockopt(fd, SOL_SOCKET, SO_RCVBUF, &small, sizeof small); /* before connect */
	struct sockaddr_in a = {.sin_family = AF_INET};
	a.sin_port = htons((uint16_t)mbserver_port(&srv));
	a.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
	assert_int_equal(connect(fd, (struct sockaddr *)&a, sizeof a), 0);
	clock_gettime(CLOCK_MONOTONIC, &start);
	for (unsigned i = 0; !dropped; i++) {
		if (send(fd, req, sizeof req, MSG_NOSIGNAL | MSG_DONTWAIT) < 0) {
			if (errno != EAGAIN && errno != EWOULDBLOCK)
				dropped = true; /* reset by the server */
			struct pollfd p = {.fd = fd, .events = POLLOUT};
			poll(&p, 1, 10);
		}
		if (i % 32 == 0) {
			struct mbserver_stats st;
			clock_gettime(CLOCK_MONOTONIC, &t0);
			assert_int_equal(mbserver_set_input(&srv, 100, v, 20), 0);
			clock_gettime(CLOCK_MONOTONIC, &t1);
			int64_t us = (t1.tv_sec - t0.tv_sec) * 1000000;
			us += (t1.tv_nsec - t0.tv_nsec) / 1000;
			if (us > worst_us)
				worst_us = us;
			mbserver_get_stats(&srv, &st);
			if (st.clients_dropped > 0)
				dropped = true;
			assert_true(t1.tv_sec - start.tv_sec < 10); /* gives up rather than hang */
		}
	}
	close(fd);
	/* 50 ms: far above a memcpy under a briefly held mutex, far below a
	 * blocked send (which would last until the test ended). */
	assert_true(worst_us < 50000);
}

static void test_open_refuses_a_bad_map_and_a_busy_port(void **state)
{
	struct mbserver other;
	struct mbserver_map_cfg bad = {.input_start = 65530, .input_count = 10};
	(void)state;
	assert_int_equal(mbserver_open(&other, "127.0.0.1", 0, &bad, true), -EINVAL);
	mbserver_close(&other); /* harmless after a failed open */
	assert_int_equal(mbserver_port(&other), -1);
	assert_int_equal(mbserver_open(&other, "127.0.0.1", mbserver_port(&srv), &map, true),
			 -EADDRINUSE);
	assert_int_equal(mbserver_open(&other, "127.0.0.1", 70000, &map, true), -EINVAL);
	mbserver_close(NULL);
}

static void test_close_stops_listening_and_is_idempotent(void **state)
{
	struct mbserver s2;
	(void)state;
	assert_int_equal(mbserver_open(&s2, "127.0.0.1", 0, &map, true), 0);
	int port = mbserver_port(&s2);
	modbus_t *c = modbus_new_tcp("127.0.0.1", port);
	assert_int_equal(modbus_connect(c), 0); /* a client still connected at close */
	mbserver_close(&s2);
	mbserver_close(&s2);
	uint16_t r;
	assert_int_equal(modbus_read_registers(c, 0, 1, &r), -1);
	modbus_close(c);
	assert_int_equal(modbus_connect(c), -1);
	assert_int_equal(errno, ECONNREFUSED);
	modbus_free(c);
}

/* Each test gets its own fresh read-only server. */
#define T_RO(f) cmocka_unit_test_setup_teardown(f, setup_ro, teardown)

int main(void)
{
	const struct CMUnitTest ro[] = {
		T_RO(test_listens_on_an_ephemeral_loopback_port),
		T_RO(test_serves_input_holding_and_discrete_inputs),
		T_RO(test_read_outside_the_map_is_illegal_data_address),
		T_RO(test_setters_refuse_ranges_outside_the_map),
		T_RO(test_read_only_refuses_every_write_with_illegal_function),
		T_RO(test_serves_several_clients_in_turn_and_at_once),
		T_RO(test_survives_garbage_and_abrupt_disconnects),
		T_RO(test_client_stalled_mid_frame_is_dropped_and_others_served),
		T_RO(test_byte_at_a_time_client_delays_nobody),
		T_RO(test_per_address_limit_keeps_a_slot_for_others),
		T_RO(test_idle_client_is_dropped),
		T_RO(test_request_with_a_wrong_length_gets_exception_3),
		T_RO(test_setters_do_not_wait_for_a_client_that_does_not_read),
		T_RO(test_open_refuses_a_bad_map_and_a_busy_port),
		T_RO(test_close_stops_listening_and_is_idempotent),
	};
	const struct CMUnitTest rw[] = {
		cmocka_unit_test_setup_teardown(test_writable_server_takes_holding_writes, setup_rw,
						teardown),
	};
	int failed = cmocka_run_group_tests_name("mbserver_read_only", ro, NULL, NULL);
	failed += cmocka_run_group_tests_name("mbserver_writable", rw, NULL, NULL);
	return failed;
}
