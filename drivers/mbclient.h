/*
 * mbclient.h - the Modbus polling client: one source (a PLC or gateway, over
 * TCP or RTU), a fixed list of points, one poll per period.
 *
 * mbclient_init() builds a read plan once: the points of each table (input or
 * holding registers) are sorted by address and merged into as few requests as
 * possible. Two points share a request only when their registers touch or
 * overlap (no gap is read across: a gap may hold addresses the device refuses)
 * and the request stays within FG_MODBUS_READ_MAX registers. A 32-bit point is
 * never split between requests.
 *
 * mbclient_poll() runs the plan and decodes every point to its raw register
 * value (scaling and units are the caller's). Failure handling:
 *   - a Modbus exception (e.g. illegal data address) marks the points of that
 *     request bad; the link is fine and the other requests go on;
 *   - any other failure (timeout, reset, bad or stale reply, CRC) marks every
 *     point bad at once, closes the link (a late TCP reply would otherwise be
 *     taken as the answer to the next request), and schedules a reconnect with
 *     a short, capped back-off: the delays after successive failures are
 *     0.5, 1, 1, 1, ... s, back to 0.5 s after a good poll. The cap is low
 *     on purpose: a peer that comes back is read again within about a
 *     second (a refused connect costs microseconds; an unreachable one at
 *     most timeout_s, which the daemon already budgets per period);
 *   - until the next attempt is due, poll returns at once with every point bad.
 * The link is always closed before it is connected again, and libmodbus's own
 * error recovery stays off (its LINK mode reconnects inside a read and blocks
 * for seconds). One poll blocks for at most about (1 + requests) x timeout_s:
 * one connect and one response timeout per request, stopping at the first
 * link failure (RTU adds one timeout after a timeout, see mbclient.c). Host
 * names are resolved at connect time by the system resolver, which has its
 * own timeouts; use an address where that matters.
 *
 * State changes (down, recovered after N s, a request refused / answered
 * again) go to the log callback of the config. No signals are used.
 *
 * The transport sits behind struct mbclient_backend, so tests can put a fake
 * with fault injection in its place (libmodbus's modbus_backend_t is the
 * model). mbclient_backend_libmodbus is the real one.
 *
 * Not thread-safe: one struct mbclient belongs to one thread.
 */
#ifndef MBCLIENT_H
#define MBCLIENT_H

#include <stdbool.h>
#include <stdint.h>

#include "fg_limits.h"
#include "regcodec.h"

enum mbclient_protocol {
	MBCLIENT_PROTOCOL_TCP,
	MBCLIENT_PROTOCOL_RTU,
};

enum mbclient_table {
	MBCLIENT_TABLE_INPUT,   /* input registers, function code 4 */
	MBCLIENT_TABLE_HOLDING, /* holding registers, function code 3 */
	MBCLIENT_TABLE_COUNT
};

enum mbclient_log_level {
	MBCLIENT_LOG_INFO,    /* connected, recovered */
	MBCLIENT_LOG_WARNING, /* down, request refused */
};

/* Receives one complete line without a trailing newline. msg lives only for the call. */
typedef void mbclient_log_fn(void *user, enum mbclient_log_level level, const char *msg);

/* Baud rates accepted for RTU; libmodbus 3.1.6 silently falls back to 9600
 * for a rate it does not know, so anything else is refused. */
#define MBCLIENT_BAUD_RATES 1200, 2400, 4800, 9600, 19200, 38400, 57600, 115200

/* Reconnect back-off: first delay and cap, ms (see the top comment). */
#define MBCLIENT_BACKOFF_FIRST_MS 500
#define MBCLIENT_BACKOFF_MAX_MS 1000

/* Response timeout limits, s: below 10 ms even a LAN gateway misses; above
 * 10 s one poll would outlast any sensible period. */
#define MBCLIENT_TIMEOUT_MIN_S 0.01
#define MBCLIENT_TIMEOUT_MAX_S 10.0

struct mbclient_source_cfg {
	char name[FG_NAME_MAX];        /* source name, for log lines */
	enum mbclient_protocol protocol;
	char host[FG_TEXT_MAX];        /* TCP: host name or IPv4/IPv6 address */
	int port;                      /* TCP: 1..65535 (502 is the standard port) */
	int unit_id;                   /* TCP: 0..255, 255 unless a gateway needs another;
					  RTU: slave address 1..247 */
	double timeout_s;              /* response timeout, also the TCP connect timeout, s */
	char device[FG_PATH_MAX];      /* RTU: serial device, e.g. /dev/ttyUSB0 */
	int baud;                      /* RTU: one of MBCLIENT_BAUD_RATES, bit/s */
	char parity;                   /* RTU: 'N', 'E' or 'O' */
	int data_bits;                 /* RTU: 8 (Modbus RTU frames are 8-bit) */
	int stop_bits;                 /* RTU: 1 or 2 */
	mbclient_log_fn *log;          /* may be NULL: no logging */
	void *log_user;                /* passed to log */
};

struct mbclient_point {
	enum mbclient_table table;
	uint16_t address;              /* 0-based wire address of the first register */
	enum regcodec_type type;
	enum regcodec_order order;
};

/*
 * The transport. Each action returns 0 or a negative errno or negative
 * libmodbus code (-EMBXILADD, ...). link is whatever open created.
 *  open            creates the link from cfg without any I/O (called by
 *                  mbclient_init); fills *link.
 *  connect         connects a closed link (never called on a connected one).
 *  read_registers  reads count (1..FG_MODBUS_READ_MAX) registers from address
 *                  of table into dest; dest may be clobbered on failure.
 *  close           closes the connection; the link may be connected again.
 *  free            releases the link (closed first by the caller).
 * user is passed to open only.
 */
struct mbclient_backend {
	int (*open)(void *user, const struct mbclient_source_cfg *cfg, void **link);
	int (*connect)(void *link);
	int (*read_registers)(void *link, enum mbclient_table table, uint16_t address,
			      uint16_t count, uint16_t *dest);
	void (*close)(void *link);
	void (*free)(void *link);
	void *user;
};

/* The libmodbus 3.1.6 backend (TCP via modbus_new_tcp_pi, RTU via modbus_new_rtu). */
extern const struct mbclient_backend mbclient_backend_libmodbus;

/* One request of the read plan. */
struct mbclient_request {
	enum mbclient_table table;
	uint16_t address;              /* first register */
	uint16_t count;                /* registers, 1..FG_MODBUS_READ_MAX */
	unsigned first;                /* index into mbclient.sorted of its first point */
	unsigned point_count;          /* points it carries */
};

/* Everything is private; read it through the functions below. */
struct mbclient {
	struct mbclient_source_cfg cfg;
	const struct mbclient_backend *be;
	void *link;
	unsigned point_count;
	struct mbclient_point points[FG_TAGS_MAX];
	uint16_t offset[FG_TAGS_MAX];          /* point's first register within its request */
	uint16_t sorted[FG_TAGS_MAX];          /* point indices by (table, address) */
	unsigned request_count;
	struct mbclient_request requests[FG_TAGS_MAX];
	bool request_refused[FG_TAGS_MAX];     /* last answer was an exception (for logging) */
	uint16_t regs[FG_MODBUS_READ_MAX];     /* one response */
	bool connected;
	bool ever_up;                          /* a poll has succeeded since init */
	bool down;                             /* down has been logged and not yet recovered */
	int64_t down_since_mono_ms;
	int64_t next_attempt_mono_ms;
	int64_t backoff_ms;                    /* delay after the next link failure */
	int last_err;
};

/*
 * Validates cfg and points, builds the read plan and opens the backend's link
 * (no I/O yet: the first poll connects). Copies cfg and points.
 * Returns 0, or -EINVAL (a field out of range, an unterminated string, a
 * point running past address 65535, an unknown baud rate), -E2BIG (more than
 * FG_TAGS_MAX points), or the backend's open error. On failure nothing is
 * held and mbclient_fini(c) is harmless.
 */
int mbclient_init(struct mbclient *c, const struct mbclient_source_cfg *cfg,
		  const struct mbclient_point *points, unsigned point_count,
		  const struct mbclient_backend *be);

/* Closes and frees the link. NULL-safe, and safe after a failed init. */
void mbclient_fini(struct mbclient *c);

/*
 * One poll at now_mono_ms (CLOCK_MONOTONIC, ms; the caller's clock). values
 * and ok have room for count >= point_count entries, in the order the points
 * were given: values[i] is point i's raw decoded value when ok[i], NAN when
 * not. Returns 0 when every point was read; -ENOTCONN while waiting for the
 * next reconnect attempt; the connect or read error that took the link down;
 * or, with the link still up, the first Modbus exception (-EMBXILADD, ...)
 * when some requests were refused.
 */
int mbclient_poll(struct mbclient *c, int64_t now_mono_ms, double *values, bool *ok,
		  unsigned count);

/* The read plan, request_count entries, valid while c lives. */
const struct mbclient_request *mbclient_plan(const struct mbclient *c, unsigned *request_count);

bool mbclient_connected(const struct mbclient *c);
/* When the next connect will be tried (meaningful while not connected). */
int64_t mbclient_next_attempt_mono_ms(const struct mbclient *c);
/* The error of the last failed poll, 0 if none since the last good poll. */
int mbclient_last_error(const struct mbclient *c);

/* Text for a negative errno or negative libmodbus code as returned above
 * (positive values are accepted too). Static strings; thread-safe. */
const char *mbclient_strerror(int err);

#endif
