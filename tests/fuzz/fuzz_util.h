/*
 * fuzz_util.h - shared by the libFuzzer targets: the input as a file the
 * readers under test open by path (a memfd, so nothing touches the disk and
 * nothing is left behind). Built with -D_GNU_SOURCE (memfd_create).
 */
#ifndef FUZZ_UTIL_H
#define FUZZ_UTIL_H


#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <sys/mman.h>
#include <unistd.h>

/* Writes data into a fresh memfd; *path gets "/proc/self/fd/N". Returns the
 * fd (close it after use) or -1. */
static inline int fuzz_file(const uint8_t *data, size_t size, char *path, size_t path_size)
{
	int fd = memfd_create("fuzz", MFD_CLOEXEC);
	if (fd < 0)
		return -1;
	size_t done = 0;
	while (done < size) {
		ssize_t n = write(fd, data + done, size - done);
		if (n <= 0) {
			close(fd);
			return -1;
		}
		done += (size_t)n;
	}
	snprintf(path, path_size, "/proc/self/fd/%d", fd);
	return fd;
}

#endif
