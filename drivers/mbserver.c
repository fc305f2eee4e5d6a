/*
 * mbserver.c - the Modbus TCP server (see mbserver.h for the threading).
 *
 * The thread waits in poll() on a wake-up pipe, the listening socket and the
 * client sockets, so it costs nothing while idle and stops at once when
 * mbserver_close() writes to the pipe (no signals, no periodic wake-ups).
 * libmodbus does the framing: modbus_set_socket() points the one context at
 * the client whose request is ready, modbus_receive() reads it and
 * modbus_reply() answers from the map under the mutex.
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
		    bind(fd, ai->ai_addr, ai->ai_addrlen) == 0 && listen(fd, 8) == 0 &&
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

static void accept_client(struct mbserver *s)
{
	int fd = accept(s->listen_fd, NULL, NULL);
	if (fd < 0)
		return; /* gone again before we got to it, or EAGAIN */
	/* A fixed, small send buffer (it also stops the kernel growing it): a
	 * client that lets this many replies pile up unread is not a Modbus
	 * client, and is dropped when the next send would block. */
	int sndbuf = MBSERVER_SNDBUF_BYTES;
	setsockopt(fd, SOL_SOCKET, SO_SNDBUF, &sndbuf, sizeof sndbuf);
	for (unsigned i = 0; i < MBSERVER_CLIENTS_MAX; i++) {
		if (s->client_fd[i] < 0 && set_flags(fd, true) == 0) {
			s->client_fd[i] = fd;
			pthread_mutex_lock(&s->lock);
			s->stats.clients_accepted++;
			pthread_mutex_unlock(&s->lock);
			return;
		}
	}
	close(fd);
	pthread_mutex_lock(&s->lock);
	s->stats.clients_refused++;
	pthread_mutex_unlock(&s->lock);
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

/* Answers one request from client slot i. Returns false when the client must
 * be dropped (closed by the peer, garbage, stalled, or its send buffer full). */
static bool serve_one(struct mbserver *s, unsigned i)
{
	int rc, sent;

	modbus_set_socket(s->ctx, s->client_fd[i]);
	rc = modbus_receive(s->ctx, s->query);
	if (rc == 0)
		return true; /* not for us (RTU only; kept for completeness) */
	if (rc < 0)
		return false;
	uint8_t fc = s->query[modbus_get_header_length(s->ctx)];
	pthread_mutex_lock(&s->lock);
	if (s->read_only && is_write_function(fc)) {
		sent = modbus_reply_exception(s->ctx, s->query, MODBUS_EXCEPTION_ILLEGAL_FUNCTION);
		s->stats.writes_refused++;
	} else {
		sent = modbus_reply(s->ctx, s->query, rc, s->map);
	}
	s->stats.requests++;
	pthread_mutex_unlock(&s->lock);
	return sent >= 0;
}

static void drop_client(struct mbserver *s, unsigned i)
{
	close(s->client_fd[i]);
	s->client_fd[i] = -1;
	pthread_mutex_lock(&s->lock);
	s->stats.clients_dropped++;
	pthread_mutex_unlock(&s->lock);
}

static void *server_thread(void *arg)
{
	struct mbserver *s = arg;
	struct pollfd pfd[2 + MBSERVER_CLIENTS_MAX];
	unsigned slot[2 + MBSERVER_CLIENTS_MAX];

	for (;;) {
		nfds_t n = 0;
		pfd[n++] = (struct pollfd){.fd = s->wake_fd[0], .events = POLLIN};
		pfd[n++] = (struct pollfd){.fd = s->listen_fd, .events = POLLIN};
		for (unsigned i = 0; i < MBSERVER_CLIENTS_MAX; i++) {
			if (s->client_fd[i] < 0)
				continue;
			slot[n] = i;
			pfd[n++] = (struct pollfd){.fd = s->client_fd[i], .events = POLLIN};
		}
		if (poll(pfd, n, -1) < 0) {
			if (errno == EINTR)
				continue;
			break; /* cannot happen with valid fds; stop rather than spin */
		}
		if (pfd[0].revents != 0)
			break;
		for (nfds_t k = 2; k < n; k++)
			if (pfd[k].revents != 0 && !serve_one(s, slot[k]))
				drop_client(s, slot[k]);
		if (pfd[1].revents & POLLIN)
			accept_client(s);
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
	int rc;

	assert(s != NULL);
	assert(host != NULL);
	assert(map != NULL);
	memset(s, 0, sizeof *s);
	s->listen_fd = s->wake_fd[0] = s->wake_fd[1] = -1;
	for (unsigned i = 0; i < MBSERVER_CLIENTS_MAX; i++)
		s->client_fd[i] = -1;
	if (port < 0 || port > 65535 || check_map(map) != 0)
		return -EINVAL;
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
	modbus_set_byte_timeout(s->ctx, 0, MBSERVER_BYTE_TIMEOUT_MS * 1000);
	modbus_set_indication_timeout(s->ctx, 0, MBSERVER_BYTE_TIMEOUT_MS * 1000);
	/* libmodbus waits one response timeout before it flushes the input after
	 * a request it cannot parse (unknown function code); keep that short. */
	modbus_set_response_timeout(s->ctx, 0, MBSERVER_FLUSH_WAIT_MS * 1000);
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
		if (s->client_fd[i] >= 0)
			close(s->client_fd[i]);
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
