/*
 * log.c - see log.h. Used from the main thread only (paho and the export
 * server log through the daemon's own callbacks, which queue nothing here
 * from other threads: they are serialised by a mutex below).
 */
#include "log.h"

#include <pthread.h>
#include <stdarg.h>
#include <stdio.h>
#include <string.h>
#include <stdlib.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include "timefmt.h"

static pthread_mutex_t lock = PTHREAD_MUTEX_INITIALIZER;
static bool ring_on;
static char ring[LOG_RING_LINES][LOG_LINE_MAX];
static unsigned ring_next, ring_count;

static const char *level_name(enum log_level l)
{
	switch (l) {
	case LOG_DEBUG: return "debug";
	case LOG_INFO: return "info";
	case LOG_WARNING: return "warning";
	case LOG_ERROR: return "error";
	}
	return "?";
}

/* syslog(3) priorities, as sd-daemon(3) reads them from a "<N>" prefix. */
static int level_priority(enum log_level l)
{
	switch (l) {
	case LOG_DEBUG: return 7;
	case LOG_INFO: return 6;
	case LOG_WARNING: return 4;
	case LOG_ERROR: return 3;
	}
	return 6;
}

bool log_stderr_is_journal(void)
{
	/* systemd sets JOURNAL_STREAM to "DEV:INODE" of the stream it gave us
	 * (systemd.exec(5)); it still applies only if stderr is that stream. */
	const char *js = getenv("JOURNAL_STREAM");
	unsigned long long dev, ino;
	struct stat st;
	if (js == NULL || sscanf(js, "%llu:%llu", &dev, &ino) != 2)
		return false;
	if (fstat(STDERR_FILENO, &st) != 0)
		return false;
	return (unsigned long long)st.st_dev == dev && (unsigned long long)st.st_ino == ino;
}

static int journal = -1; /* -1: not looked at yet */

void log_msg(enum log_level level, const char *fmt, ...)
{
	char line[LOG_LINE_MAX], ts[TIMEFMT_BUF_SIZE];
	struct timespec now;
	clock_gettime(CLOCK_REALTIME, &now);
	timefmt_format((int64_t)now.tv_sec * 1000, ts, sizeof(ts));
	if (journal < 0)
		journal = log_stderr_is_journal() ? 1 : 0;
	int n;
	if (journal == 1) /* the journal stamps lines itself; the prefix sets the priority */
		n = snprintf(line, sizeof(line), "<%d>%s: ", level_priority(level),
			     level_name(level));
	else
		n = snprintf(line, sizeof(line), "%s %s: ", ts, level_name(level));
	va_list ap;
	va_start(ap, fmt);
	if (n > 0 && (size_t)n < sizeof(line))
		vsnprintf(line + n, sizeof(line) - (size_t)n, fmt, ap);
	va_end(ap);
	pthread_mutex_lock(&lock);
	if (ring_on) {
		memcpy(ring[ring_next], line, sizeof(line));
		ring_next = (ring_next + 1) % LOG_RING_LINES;
		if (ring_count < LOG_RING_LINES)
			ring_count++;
	} else {
		fprintf(stderr, "%s\n", line);
	}
	pthread_mutex_unlock(&lock);
}

void log_to_ring(bool on)
{
	pthread_mutex_lock(&lock);
	if (ring_on && !on) /* hand the kept lines back to the terminal */
		for (unsigned i = 0; i < ring_count; i++)
			fprintf(stderr, "%s\n",
				ring[(ring_next + LOG_RING_LINES - ring_count + i) % LOG_RING_LINES]);
	ring_on = on;
	ring_count = ring_next = 0;
	pthread_mutex_unlock(&lock);
}

bool log_ring_copy(unsigned i, char *buf, unsigned buf_size)
{
	pthread_mutex_lock(&lock);
	bool have = i < ring_count;
	if (have)
		snprintf(buf, buf_size, "%s",
			 ring[(ring_next + LOG_RING_LINES - ring_count + i) % LOG_RING_LINES]);
	pthread_mutex_unlock(&lock);
	return have;
}
