/*
 * mbserver.c - the Modbus TCP server (see mbserver.h for the threading).
 *
 * The thread waits in poll() on a wake-up pipe, the listening socket and the
 * client sockets, with a timeout that is the nearest client deadline (idle or
 * request completion), so it costs nothing while idle and stops at once when
 * mbserver_close() writes to the pipe (no signals). Requests are read and
 * framed here, per client and without waiting (a slow sender holds up nobody);
 * a complete one goes to libmodbus: modbus_set_socket() points the one
 * context at that client and modbus_reply() answers from the map under the
 * mutex.
 */
#include "mbserver.h"

#include <assert.h>
#include <errno.h>
#include <fcntl.h>
#include <netdb.h>
#include <poll.h>
#include <stdio.h>
#include <string.h>
#include <sys/socket.h>
#include <time.h>
#include <unistd.h>

#include <netinet/in.h>

static bool table_ok(unsigned start, unsigned count)
{
	return start + count <= 65536u;
}

static int set_flags(int fd, bool nonblock)
{
	int fl = fcntl(fd, F_GETFL);
	if (fl < 0 || fcntl(fd, F_SETFD, FD_CLOEXEC) < 0)
		return -errno;
	if (nonblock && fcntl(fd, F_SETFL, fl | O_NONBLOCK) < 0)
		return -errno;
	return 0;
}

/* Own socket code rather than modbus_tcp_pi_listen(): that one asks
 * getaddrinfo for AI_ADDRCONFIG, which can refuse 127.0.0.1 on a host whose
 * only configured address is the loopback. Returns the fd or -errno. */
static int listen_on(const char *host, int port)
{
	struct addrinfo hints, *list = NULL;
	char service[8];
	int fd = -1, err = -EADDRNOTAVAIL;

	memset(&hints, 0, sizeof hints);
	hints.ai_family = AF_UNSPEC;
	hints.ai_socktype = SOCK_STREAM;
	hints.ai_flags = AI_PASSIVE | AI_NUMERICSERV;
	snprintf(service, sizeof service, "%d", port);
	if (getaddrinfo(host, service, &hints, &list) != 0)
		return -ENOENT;
	for (struct addrinfo *ai = list; ai != NULL; ai = ai->ai_next) {
		int one = 1;
		fd = socket(ai->ai_family, ai->ai_socktype, ai->ai_protocol);
		if (fd < 0) {
			err = -errno;
			continue;
		}
		if (setsockopt(fd, SOL_SOCKET, SO_REUSEADDR, &one, sizeof one) == 0 &&
		    bind(fd, ai->ai_addr, ai->ai_addrlen) == 0 && listen(fd, MBSERVER_BACKLOG) == 0 &&
		    set_flags(fd, true) == 0)
			break;
		err = -errno;
		close(fd);
		fd = -1;
	}
	freeaddrinfo(list);
	return fd >= 0 ? fd : err;
}

static int bound_port(int fd)
{
	struct sockaddr_storage ss;
	socklen_t len = sizeof ss;

	if (getsockname(fd, (struct sockaddr *)&ss, &len) != 0)
		return -1;
	if (ss.ss_family == AF_INET)
		return ntohs(((struct sockaddr_in *)&ss)->sin_port);
	if (ss.ss_family == AF_INET6)
		return ntohs(((struct sockaddr_in6 *)&ss)->sin6_port);
	return -1;
}

static int64_t mono_ms(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

/* The peer's address as 16 bytes (IPv4 as an IPv4-mapped IPv6 address), so
 * one client reaching us over both families still counts as one. */
static void peer_address(const struct sockaddr_storage *ss, unsigned char out[16])
{
	memset(out, 0, 16);
	if (ss->ss_family == AF_INET) {
		const struct sockaddr_in *a = (const struct sockaddr_in *)ss;
		out[10] = out[11] = 0xff;
		memcpy(out + 12, &a->sin_addr, 4);
	} else if (ss->ss_family == AF_INET6) {
		memcpy(out, &((const struct sockaddr_in6 *)ss)->sin6_addr, 16);
	}
}

static void count(struct mbserver *s, unsigned long *counter)
{
	pthread_mutex_lock(&s->lock);
	(*counter)++;
	pthread_mutex_unlock(&s->lock);
}

static void accept_client(struct mbserver *s, int64_t now)
{
	struct sockaddr_storage ss;
	socklen_t len = sizeof ss;
	int fd = accept(s->listen_fd, (struct sockaddr *)&ss, &len);
	if (fd < 0)
		return; /* gone again before we got to it, or EAGAIN */
	unsigned char addr[16];
	peer_address(&ss, addr);
	unsigned same = 0, free_slot = MBSERVER_CLIENTS_MAX;
	for (unsigned i = 0; i < MBSERVER_CLIENTS_MAX; i++) {
		if (s->client[i].fd < 0) {
			if (free_slot == MBSERVER_CLIENTS_MAX)
				free_slot = i;
		} else if (memcmp(s->client[i].addr, addr, 16) == 0) {
			same++;
		}
	}
	/* A fixed, small send buffer (it also stops the kernel growing it): a
	 * client that lets this many replies pile up unread is not a Modbus
	 * client, and is dropped when the next send would block. */
	int sndbuf = MBSERVER_SNDBUF_BYTES;
	setsockopt(fd, SOL_SOCKET, SO_SNDBUF, &sndbuf, sizeof sndbuf);
	if (free_slot == MBSERVER_CLIENTS_MAX || same >= s->limits.per_address ||
	    set_flags(fd, true) != 0) {
		close(fd); /* never evict a client already served */
		count(s, &s->stats.clients_refused);
		return;
	}
	struct mbserver_client *c = &s->client[free_slot];
	c->fd = fd;
	memcpy(c->addr, addr, 16);
	c->have = 0;
	c->last_seen_mono_ms = now;
	count(s, &s->stats.clients_accepted);
}

static bool is_write_function(uint8_t fc)
{
	switch (fc) {
	case MODBUS_FC_WRITE_SINGLE_COIL:
	case MODBUS_FC_WRITE_SINGLE_REGISTER:
	case MODBUS_FC_WRITE_MULTIPLE_COILS:
	case MODBUS_FC_WRITE_MULTIPLE_REGISTERS:
	case MODBUS_FC_MASK_WRITE_REGISTER:
	case MODBUS_FC_WRITE_AND_READ_REGISTERS:
		return true;
	default:
		return false;
	}
}

/* The MBAP length (unit id + PDU) a request of function fc must have, from
 * the Modbus Application Protocol v1.1b3 section 6 request layouts; 0 for a
 * function we do not serve. buf holds at least the first 13 bytes when the
 * function has a byte count (15, 16: byte 12; 23: byte 16 is checked later). */
static unsigned expected_length(const uint8_t *frame, unsigned have)
{
	uint8_t fc = frame[7];
	switch (fc) {
	case MODBUS_FC_READ_COILS:
	case MODBUS_FC_READ_DISCRETE_INPUTS:
	case MODBUS_FC_READ_HOLDING_REGISTERS:
	case MODBUS_FC_READ_INPUT_REGISTERS:
	case MODBUS_FC_WRITE_SINGLE_COIL:
	case MODBUS_FC_WRITE_SINGLE_REGISTER:
		return 6;
	case MODBUS_FC_MASK_WRITE_REGISTER:
		return 8;
	case MODBUS_FC_REPORT_SLAVE_ID:
		return 2;
	case MODBUS_FC_WRITE_MULTIPLE_COILS:
	case MODBUS_FC_WRITE_MULTIPLE_REGISTERS:
		return have > 12 ? 7u + frame[12] : 0;
	case MODBUS_FC_WRITE_AND_READ_REGISTERS:
		return have > 16 ? 11u + frame[16] : 0;
	default:
		return 0;
	}
}

/* Answers the complete request in c->buf (total bytes). Returns false when
 * the client must be dropped (its send buffer is full, or it is gone). */
static bool answer(struct mbserver *s, struct mbserver_client *c, unsigned total)
{
	uint8_t fc = c->buf[7];
	unsigned mbap_len = total - 6;
	int sent;
	modbus_set_socket(s->ctx, c->fd);
	pthread_mutex_lock(&s->lock);
	if (s->read_only && is_write_function(fc)) {
		sent = modbus_reply_exception(s->ctx, c->buf, MODBUS_EXCEPTION_ILLEGAL_FUNCTION);
		s->stats.writes_refused++;
	} else if (expected_length(c->buf, total) == 0 && !is_write_function(fc) &&
		   fc != MODBUS_FC_REPORT_SLAVE_ID) {
		/* Not served: answered here, since libmodbus would sleep and
		 * flush the socket first, holding up every other client. */
		sent = modbus_reply_exception(s->ctx, c->buf, MODBUS_EXCEPTION_ILLEGAL_FUNCTION);
	} else if (expected_length(c->buf, total) != mbap_len) {
		sent = modbus_reply_exception(s->ctx, c->buf, MODBUS_EXCEPTION_ILLEGAL_DATA_VALUE);
	} else {
		sent = modbus_reply(s->ctx, c->buf, (int)total, s->map);
	}
	s->stats.requests++;
	pthread_mutex_unlock(&s->lock);
	return sent >= 0;
}

/* Reads what client c has sent, without waiting; answers each complete
 * request. Returns false when the client must be dropped. */
static bool serve_client(struct mbserver *s, struct mbserver_client *c, int64_t now)
{
	/* Up to 8 requests per wake-up, so one busy client cannot starve the
	 * others; each pass either reads more, answers, or returns. */
	for (unsigned answered = 0; answered < 8;) {
		unsigned need = 7; /* the MBAP header first */
		if (c->have >= 7) {
			unsigned len = ((unsigned)c->buf[4] << 8) | c->buf[5];
			unsigned proto = ((unsigned)c->buf[2] << 8) | c->buf[3];
			if (proto != 0 || len < 2 || len > MODBUS_TCP_MAX_ADU_LENGTH - 6)
				return false; /* not Modbus: never in step again */
			need = 6 + len;
		}
		if (c->have < need) {
			ssize_t n = recv(c->fd, c->buf + c->have, need - c->have, 0);
			if (n == 0)
				return false; /* closed by the peer */
			if (n < 0)
				return errno == EAGAIN || errno == EWOULDBLOCK || errno == EINTR;
			if (c->have == 0)
				c->first_byte_mono_ms = now;
			c->have += (unsigned)n;
			c->last_seen_mono_ms = now;
			continue;
		}
		bool keep = answer(s, c, need);
		c->have = 0;
		answered++;
		if (!keep)
			return false;
	}
	return true; /* more may be waiting: the next poll() says so */
}

static void drop_client(struct mbserver *s, unsigned i, bool timed_out)
{
	close(s->client[i].fd);
	s->client[i].fd = -1;
	s->client[i].have = 0;
	pthread_mutex_lock(&s->lock);
	s->stats.clients_dropped++;
	if (timed_out)
		s->stats.clients_timed_out++;
	pthread_mutex_unlock(&s->lock);
}

/* Drops clients past a deadline; returns ms until the next deadline (-1: none). */
static int expire(struct mbserver *s, int64_t now)
{
	int64_t next = INT64_MAX;
	for (unsigned i = 0; i < MBSERVER_CLIENTS_MAX; i++) {
		struct mbserver_client *c = &s->client[i];
		if (c->fd < 0)
			continue;
		int64_t idle_due = c->last_seen_mono_ms + s->limits.idle_timeout_ms;
		int64_t req_due = c->have > 0 ? c->first_byte_mono_ms + s->limits.request_timeout_ms
					      : INT64_MAX;
		int64_t due = idle_due < req_due ? idle_due : req_due;
		if (now >= due) {
			drop_client(s, i, true);
			continue;
		}
		if (due < next)
			next = due;
	}
	if (next == INT64_MAX)
		return -1;
	return (int)(next - now);
}

static void *server_thread(void *arg)
{
	struct mbserver *s = arg;
	struct pollfd pfd[2 + MBSERVER_CLIENTS_MAX];
	unsigned slot[2 + MBSERVER_CLIENTS_MAX];

	for (;;) {
		int wait_ms = expire(s, mono_ms());
		nfds_t n = 0;
		pfd[n++] = (struct pollfd){.fd = s->wake_fd[0], .events = POLLIN};
		pfd[n++] = (struct pollfd){.fd = s->listen_fd, .events = POLLIN};
		for (unsigned i = 0; i < MBSERVER_CLIENTS_MAX; i++) {
			if (s->client[i].fd < 0)
				continue;
			slot[n] = i;
			pfd[n++] = (struct pollfd){.fd = s->client[i].fd, .events = POLLIN};
		}
		if (poll(pfd, n, wait_ms) < 0) {
			if (errno == EINTR)
				continue;
			break; /* cannot happen with valid fds; stop rather than spin */
		}
		if (pfd[0].revents != 0)
			break;
		int64_t now = mono_ms();
		for (nfds_t k = 2; k < n; k++)
			if (pfd[k].revents != 0 && !serve_client(s, &s->client[slot[k]], now))
				drop_client(s, slot[k], false);
		if (pfd[1].revents & POLLIN)
			accept_client(s, now);
	}
	return NULL;
}

static int check_map(const struct mbserver_map_cfg *m)
{
	if (!table_ok(m->input_start, m->input_count) ||
	    !table_ok(m->holding_start, m->holding_count) ||
	    !table_ok(m->discrete_start, m->discrete_count))
		return -EINVAL;
	return 0;
}

int mbserver_open(struct mbserver *s, const char *host, int port,
		  const struct mbserver_map_cfg *map, bool read_only)
{
	const struct mbserver_limits lim = {
		.idle_timeout_ms = MBSERVER_IDLE_TIMEOUT_MS,
		.request_timeout_ms = MBSERVER_REQUEST_TIMEOUT_MS,
		.per_address = MBSERVER_PER_ADDRESS,
	};
	return mbserver_open_limits(s, host, port, map, read_only, &lim);
}

int mbserver_open_limits(struct mbserver *s, const char *host, int port,
			 const struct mbserver_map_cfg *map, bool read_only,
			 const struct mbserver_limits *limits)
{
	int rc;

	assert(s != NULL);
	assert(host != NULL);
	assert(map != NULL);
	assert(limits != NULL);
	memset(s, 0, sizeof *s);
	s->listen_fd = s->wake_fd[0] = s->wake_fd[1] = -1;
	for (unsigned i = 0; i < MBSERVER_CLIENTS_MAX; i++)
		s->client[i].fd = -1;
	if (port < 0 || port > 65535 || check_map(map) != 0)
		return -EINVAL;
	if (limits->idle_timeout_ms == 0 || limits->request_timeout_ms == 0 ||
	    limits->per_address == 0 || limits->per_address > MBSERVER_CLIENTS_MAX)
		return -EINVAL;
	s->limits = *limits;
	s->read_only = read_only;
	s->map = modbus_mapping_new_start_address(0, 0, map->discrete_start, map->discrete_count,
						  map->holding_start, map->holding_count,
						  map->input_start, map->input_count);
	if (s->map == NULL)
		return -ENOMEM;
	s->ctx = modbus_new_tcp("127.0.0.1", port); /* framing only: never connects */
	if (s->ctx == NULL) {
		rc = -ENOMEM;
		goto out_map;
	}
	/* libmodbus only frames replies here: requests are read and framed by
	 * serve_client, and functions it would answer after a sleep and a flush
	 * are answered by answer() itself. */
	if (pipe(s->wake_fd) != 0) {
		rc = -errno;
		goto out_ctx;
	}
	rc = listen_on(host, port);
	if (rc < 0)
		goto out_pipe;
	s->listen_fd = rc;
	s->port = bound_port(s->listen_fd);
	if (pthread_mutex_init(&s->lock, NULL) != 0) {
		rc = -ENOMEM;
		goto out_listen;
	}
	rc = pthread_create(&s->thread, NULL, server_thread, s);
	if (rc != 0) {
		rc = -rc;
		goto out_mutex;
	}
	s->opened = true;
	return 0;

out_mutex:
	pthread_mutex_destroy(&s->lock);
out_listen:
	close(s->listen_fd);
	s->listen_fd = -1;
out_pipe:
	close(s->wake_fd[0]);
	close(s->wake_fd[1]);
	s->wake_fd[0] = s->wake_fd[1] = -1;
out_ctx:
	modbus_free(s->ctx);
	s->ctx = NULL;
out_map:
	modbus_mapping_free(s->map);
	s->map = NULL;
	return rc;
}

int mbserver_port(const struct mbserver *s)
{
	assert(s != NULL);
	return s->opened ? s->port : -1;
}

/* Copies between the caller's registers and a table under the lock.
 * to_map: caller -> map. Returns 0 or -ERANGE. */
static int copy_regs(struct mbserver *s, uint16_t *table, unsigned start, unsigned nb,
		     uint16_t address, uint16_t *regs, unsigned count, bool to_map)
{
	assert(s->opened);
	assert(regs != NULL || count == 0);
	if (address < start || (unsigned)address + count > start + nb)
		return -ERANGE;
	if (count == 0)
		return 0;
	pthread_mutex_lock(&s->lock);
	if (to_map)
		memcpy(&table[address - start], regs, count * sizeof regs[0]);
	else
		memcpy(regs, &table[address - start], count * sizeof regs[0]);
	pthread_mutex_unlock(&s->lock);
	return 0;
}

int mbserver_set_input(struct mbserver *s, uint16_t address, const uint16_t *regs,
		       unsigned count)
{
	assert(s != NULL);
	return copy_regs(s, s->map->tab_input_registers, s->map->start_input_registers,
			 (unsigned)s->map->nb_input_registers, address, (uint16_t *)regs, count,
			 true);
}

int mbserver_set_holding(struct mbserver *s, uint16_t address, const uint16_t *regs,
			 unsigned count)
{
	assert(s != NULL);
	return copy_regs(s, s->map->tab_registers, s->map->start_registers,
			 (unsigned)s->map->nb_registers, address, (uint16_t *)regs, count, true);
}

int mbserver_get_holding(struct mbserver *s, uint16_t address, uint16_t *regs, unsigned count)
{
	assert(s != NULL);
	return copy_regs(s, s->map->tab_registers, s->map->start_registers,
			 (unsigned)s->map->nb_registers, address, regs, count, false);
}

int mbserver_set_discrete(struct mbserver *s, uint16_t address, const bool *bits,
			  unsigned count)
{
	assert(s != NULL);
	assert(s->opened);
	assert(bits != NULL || count == 0);
	unsigned start = s->map->start_input_bits;
	if (address < start || (unsigned)address + count > start + (unsigned)s->map->nb_input_bits)
		return -ERANGE;
	pthread_mutex_lock(&s->lock);
	for (unsigned i = 0; i < count; i++)
		s->map->tab_input_bits[address - start + i] = bits[i] ? 1 : 0;
	pthread_mutex_unlock(&s->lock);
	return 0;
}

void mbserver_get_stats(struct mbserver *s, struct mbserver_stats *out)
{
	assert(s != NULL);
	assert(out != NULL);
	assert(s->opened);
	pthread_mutex_lock(&s->lock);
	*out = s->stats;
	pthread_mutex_unlock(&s->lock);
}

void mbserver_close(struct mbserver *s)
{
	if (s == NULL || !s->opened)
		return;
	/* One byte wakes the thread's poll(); retry only on EINTR. */
	while (write(s->wake_fd[1], "x", 1) < 0 && errno == EINTR)
		;
	pthread_join(s->thread, NULL);
	for (unsigned i = 0; i < MBSERVER_CLIENTS_MAX; i++)
		if (s->client[i].fd >= 0)
			close(s->client[i].fd);
	close(s->listen_fd);
	close(s->wake_fd[0]);
	close(s->wake_fd[1]);
	pthread_mutex_destroy(&s->lock);
	modbus_free(s->ctx); /* its socket is a client fd, closed above */
	modbus_mapping_free(s->map);
	s->opened = false;
	s->listen_fd = s->wake_fd[0] = s->wake_fd[1] = -1;
	s->ctx = NULL;
	s->map = NULL;
}
