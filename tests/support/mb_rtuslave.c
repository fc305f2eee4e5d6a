/*
 * mb_rtuslave.c - RTU test slave on a pty (see mb_rtuslave.h).
 */
#include "mb_rtuslave.h"

#include <errno.h>
#include <poll.h>
#include <pty.h>
#include <string.h>
#include <termios.h>
#include <time.h>
#include <unistd.h>

static void sleep_ms(unsigned ms)
{
	struct timespec ts = {.tv_sec = (time_t)(ms / 1000),
			      .tv_nsec = (long)(ms % 1000) * 1000000L};
	while (nanosleep(&ts, &ts) != 0 && errno == EINTR)
		;
}

static void *slave_thread(void *arg)
{
	struct mb_rtuslave *r = arg;
	uint8_t q[MODBUS_RTU_MAX_ADU_LENGTH];

	for (;;) {
		struct pollfd pfd[2] = {{.fd = r->wake_fd[0], .events = POLLIN},
					{.fd = r->master_fd, .events = POLLIN}};
		if (poll(pfd, 2, -1) < 0) {
			if (errno == EINTR)
				continue;
			break;
		}
		if (pfd[0].revents != 0)
			break;
		int rc = modbus_receive(r->ctx, q);
		if (rc < 0) {
			modbus_flush(r->ctx); /* resynchronise on a broken frame */
			continue;
		}
		if (rc == 0)
			continue; /* addressed to another unit */
		int hdr = modbus_get_header_length(r->ctx);
		int address = (q[hdr + 1] << 8) | q[hdr + 2];
		pthread_mutex_lock(&r->lock);
		unsigned delay = address == r->slow_address ? r->slow_ms : 0;
		pthread_mutex_unlock(&r->lock);
		if (delay > 0)
			sleep_ms(delay); /* a slow device, on purpose */
		modbus_reply(r->ctx, q, rc, r->map);
	}
	return NULL;
}

int mb_rtuslave_start(struct mb_rtuslave *r, int unit_id, const uint16_t *values,
		      unsigned count)
{
	struct termios tio;
	int err;

	memset(r, 0, sizeof *r);
	r->slow_address = -1;
	if (openpty(&r->master_fd, &r->slave_fd, r->path, NULL, NULL) != 0)
		return -errno;
	/* Raw until the client sets its own mode: no echo, no line editing. */
	if (tcgetattr(r->slave_fd, &tio) == 0) {
		cfmakeraw(&tio);
		tcsetattr(r->slave_fd, TCSANOW, &tio);
	}
	if (pipe(r->wake_fd) != 0) {
		err = -errno;
		goto out_pty;
	}
	r->map = modbus_mapping_new_start_address(0, 0, 0, 0, 0, 0, 0, (int)count);
	r->ctx = modbus_new_rtu("/dev/null", 9600, 'N', 8, 1);
	if (r->map == NULL || r->ctx == NULL) {
		err = -ENOMEM;
		goto out_lm;
	}
	memcpy(r->map->tab_input_registers, values, count * sizeof values[0]);
	modbus_set_socket(r->ctx, r->master_fd);
	modbus_set_slave(r->ctx, unit_id);
	pthread_mutex_init(&r->lock, NULL);
	err = pthread_create(&r->thread, NULL, slave_thread, r);
	if (err != 0) {
		err = -err;
		pthread_mutex_destroy(&r->lock);
		goto out_lm;
	}
	return 0;

out_lm:
	if (r->ctx != NULL)
		modbus_free(r->ctx);
	modbus_mapping_free(r->map);
	close(r->wake_fd[0]);
	close(r->wake_fd[1]);
out_pty:
	close(r->master_fd);
	close(r->slave_fd);
	return err;
}

void mb_rtuslave_set_slow(struct mb_rtuslave *r, int address, unsigned delay_ms)
{
	pthread_mutex_lock(&r->lock);
	r->slow_address = address;
	r->slow_ms = delay_ms;
	pthread_mutex_unlock(&r->lock);
}

void mb_rtuslave_stop(struct mb_rtuslave *r)
{
	while (write(r->wake_fd[1], "x", 1) < 0 && errno == EINTR)
		;
	pthread_join(r->thread, NULL);
	modbus_free(r->ctx);
	modbus_mapping_free(r->map);
	pthread_mutex_destroy(&r->lock);
	close(r->wake_fd[0]);
	close(r->wake_fd[1]);
	close(r->master_fd);
	close(r->slave_fd);
}
