/*
 * mbserver.h - a small Modbus TCP server: the export of results to the
 * control system, and the register map of `floodgauge feed` (a stand-in for
 * the plant).
 *
 * Threading, and why: the server runs in its own thread, and a mutex guards
 * the register map. A poll-style step called from the daemon loop would
 * answer only between the loop's own work, and that work includes Modbus
 * polls that may each block for a response timeout: a control system asking
 * with a 1 s timeout would see us time out exactly when the plant link is in
 * trouble, which is when it most wants the diagnostics. The thread answers at
 * once, whatever the loop is doing.
 *
 * The caller's loop never waits on the network: the setters hold the mutex
 * only while one request is answered, client sockets are non-blocking (a
 * client that stops reading its replies is dropped, never waited for), and a
 * reply is built and sent in microseconds. A block of registers given to one
 * setter call changes atomically for readers, so write a float32 (two
 * registers) or a whole export block in one call.
 *
 * Hostile clients. Up to MBSERVER_CLIENTS_MAX clients are served side by
 * side, at most limits.per_address of them from one client address, so that
 * nobody can take every slot from the control system's poller (existing
 * clients are never evicted; a newcomer over a limit is accepted and closed
 * at once, and counted). Each client has its own receive buffer: the thread
 * reads whatever has arrived from each client without waiting, and answers
 * a request only when its frame is complete (the MBAP length says how long
 * it is), so a client sending a byte at a time delays nobody else. A client
 * is dropped when a request is not complete limits.request_timeout_ms after
 * its first byte, when it has sent nothing for limits.idle_timeout_ms, when
 * its MBAP header is not Modbus (protocol id not 0, length outside 2..254),
 * when it disconnects, or when it stops reading its replies. A well-framed
 * request with a function code we do not serve is answered with exception 1
 * and the client stays in step. The listening address is the caller's: pass
 * "127.0.0.1" unless the control system must reach it from outside.
 *
 * read_only: every write function code (5, 6, 15, 16, 22, 23) is answered
 * with exception 1 (illegal function) and the map stays as it is. Otherwise
 * clients may write holding registers (coils do not exist: exception 2).
 */
#ifndef MBSERVER_H
#define MBSERVER_H

#include <pthread.h>
#include <stdbool.h>
#include <stdint.h>

#include <modbus.h>

/* Clients served at once: the control system's pollers (often a redundant
 * pair), HMIs, an engineer's tool, with room to spare; at most
 * limits.per_address from one address. */
#define MBSERVER_CLIENTS_MAX 32

/* Defaults of struct mbserver_limits (mbserver_open uses them). A poller asks
 * every second or few: a minute of silence is a forgotten client holding a
 * slot. A request is at most 260 bytes, sent at once by any real client: a
 * second from its first byte to its last is generous. Four connections per
 * address leave room for a redundant poller pair and a reconnect overlap. */
#define MBSERVER_IDLE_TIMEOUT_MS 60000

/* Pending connections the kernel queues for accept(): room for a burst
 * twice the client table, so a flood of connects is refused by us (and
 * counted) rather than left to SYN retries that also delay real clients. */
#define MBSERVER_BACKLOG (2 * MBSERVER_CLIENTS_MAX)
#define MBSERVER_REQUEST_TIMEOUT_MS 1000
#define MBSERVER_PER_ADDRESS 4

/* Kernel send buffer per client, bytes (Linux doubles it): about 600 short
 * replies. A client that lets more pile up unread is dropped. */
#define MBSERVER_SNDBUF_BYTES 16384

/* The register map. Each table covers [start, start + count), start + count
 * <= 65536; a table with count 0 does not exist (reads get exception 2). */
struct mbserver_map_cfg {
	uint16_t input_start;     /* input registers, function code 4 */
	uint16_t input_count;
	uint16_t holding_start;   /* holding registers, function code 3 (6, 16, 22, 23) */
	uint16_t holding_count;
	uint16_t discrete_start;  /* discrete inputs, function code 2 */
	uint16_t discrete_count;
};

struct mbserver_limits {
	unsigned idle_timeout_ms;      /* drop a client silent this long (> 0) */
	unsigned request_timeout_ms;   /* drop a client whose request is not complete this
					  long after its first byte (> 0) */
	unsigned per_address;          /* connections one client address may hold,
					  1..MBSERVER_CLIENTS_MAX */
};

struct mbserver_stats {
	unsigned long requests;         /* requests answered (with data or an exception) */
	unsigned long writes_refused;   /* write requests refused because read-only */
	unsigned long clients_accepted;
	unsigned long clients_dropped;  /* disconnected, garbage, timed out, or not reading */
	unsigned long clients_timed_out;/* of the dropped: idle or request too slow */
	unsigned long clients_refused;  /* over MBSERVER_CLIENTS_MAX or per_address */
};

/* One client slot (private). */
struct mbserver_client {
	int fd;                                /* -1 = free slot */
	unsigned char addr[16];                /* peer address (IPv4 mapped into 16 bytes) */
	unsigned have;                         /* bytes of the current request in buf */
	int64_t first_byte_mono_ms;            /* when the current request began */
	int64_t last_seen_mono_ms;             /* accept or last byte received */
	uint8_t buf[MODBUS_TCP_MAX_ADU_LENGTH];
};

/* Private: use the functions below. */
struct mbserver {
	bool opened;
	bool read_only;
	int port;
	int listen_fd;
	int wake_fd[2];                        /* close writes wake_fd[1] to stop the thread */
	struct mbserver_limits limits;
	struct mbserver_client client[MBSERVER_CLIENTS_MAX];
	modbus_t *ctx;                         /* framing only, never connected */
	modbus_mapping_t *map;                 /* guarded by lock */
	struct mbserver_stats stats;           /* guarded by lock */
	pthread_mutex_t lock;
	pthread_t thread;
};

/*
 * Listens on host:port (port 0: an ephemeral port, see mbserver_port) and
 * starts the server thread. host is a numeric address or a name.
 * Returns 0, -EINVAL (bad map or port), -ENOMEM, or the socket error
 * (-EADDRINUSE, -EADDRNOTAVAIL, ...; -ENOENT when host does not resolve).
 * On failure nothing is left open and mbserver_close(s) is harmless.
 * mbserver_open uses the default limits (MBSERVER_*_MS, MBSERVER_PER_ADDRESS);
 * mbserver_open_limits takes them (-EINVAL when one is out of range).
 */
int mbserver_open(struct mbserver *s, const char *host, int port,
		  const struct mbserver_map_cfg *map, bool read_only);
int mbserver_open_limits(struct mbserver *s, const char *host, int port,
			 const struct mbserver_map_cfg *map, bool read_only,
			 const struct mbserver_limits *limits);

/* The port listened on, or -1 when not open. */
int mbserver_port(const struct mbserver *s);

/*
 * Set count registers (or discrete inputs) from address on. Atomic for
 * readers. Return 0, or -ERANGE when [address, address + count) is not inside
 * the table (nothing is changed).
 */
int mbserver_set_input(struct mbserver *s, uint16_t address, const uint16_t *regs,
		       unsigned count);
int mbserver_set_holding(struct mbserver *s, uint16_t address, const uint16_t *regs,
			 unsigned count);
int mbserver_set_discrete(struct mbserver *s, uint16_t address, const bool *bits,
			  unsigned count);

/* Reads holding registers back (what clients may have written). 0 or -ERANGE. */
int mbserver_get_holding(struct mbserver *s, uint16_t address, uint16_t *regs, unsigned count);

/* A consistent snapshot of the counters. */
void mbserver_get_stats(struct mbserver *s, struct mbserver_stats *out);

/* Stops the thread, closes every socket, frees the map. NULL-safe, and safe
 * on a server whose open failed or that is already closed. */
void mbserver_close(struct mbserver *s);

#endif
