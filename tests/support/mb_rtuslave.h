/*
 * mb_rtuslave.h - a Modbus RTU slave on a pseudo-terminal, for tests.
 *
 * openpty() gives a master and a slave side; the client under test opens the
 * slave side by its path (mb_rtuslave.path) as if it were a serial port, and
 * this slave answers on the master side in its own thread (libmodbus
 * modbus_new_rtu("/dev/null") + modbus_set_socket(master), no connect). The
 * pty's slave side stays open here for the whole test, so the master never
 * sees a hang-up while the client closes and reopens the port, and bytes
 * written while the client has it closed stay queued, as on a real line.
 *
 * One address can be made slow: a read starting there is answered only after
 * a delay, to produce the late reply that RTU cannot tell from a fresh one.
 */
#ifndef MB_RTUSLAVE_H
#define MB_RTUSLAVE_H

#include <pthread.h>
#include <stdint.h>

#include <modbus.h>

struct mb_rtuslave {
	char path[128];        /* the device the client opens */
	int master_fd;
	int slave_fd;
	int wake_fd[2];
	modbus_t *ctx;
	modbus_mapping_t *map;  /* input registers 0..count-1 */
	pthread_mutex_t lock;   /* guards slow_address, slow_ms */
	int slow_address;       /* -1: none */
	unsigned slow_ms;
	pthread_t thread;
};

/* Starts a slave with the given unit id whose input registers 0..count-1
 * hold values. Returns 0 or -errno. */
int mb_rtuslave_start(struct mb_rtuslave *r, int unit_id, const uint16_t *values,
		      unsigned count);

/* Makes reads starting at address answer after delay_ms (address -1: none). */
void mb_rtuslave_set_slow(struct mb_rtuslave *r, int address, unsigned delay_ms);

/* Stops the thread and closes everything. */
void mb_rtuslave_stop(struct mb_rtuslave *r);

#endif
