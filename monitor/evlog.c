/*
 * evlog.c - see evlog.h.
 */
#include "evlog.h"

#include <assert.h>
#include <errno.h>
#include <fcntl.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

static void say(const struct evlog *l, enum evlog_level level, const char *fmt, ...)
	__attribute__((format(printf, 3, 4)));

static void say(const struct evlog *l, enum evlog_level level, const char *fmt, ...)
{
	if (l->log == NULL)
		return;
	char msg[512];
	va_list ap;
	va_start(ap, fmt);
	vsnprintf(msg, sizeof msg, fmt, ap);
	va_end(ap);
	l->log(level, msg);
}

static int open_fd(struct evlog *l)
{
	if (l->fd >= 0)
		return 0;
	l->fd = open(l->path, O_WRONLY | O_APPEND | O_CREAT | O_CLOEXEC, 0644);
	return l->fd >= 0 ? 0 : -errno;
}

int evlog_open(struct evlog *l, const char *path, uint64_t max_bytes, unsigned keep,
	       evlog_log_fn *log)
{
	assert(l != NULL);
	assert(path != NULL);
	memset(l, 0, sizeof *l);
	l->fd = -1;
	l->log = log;
	if (strlen(path) >= sizeof l->path || path[0] == '\0')
		return -EINVAL;
	if (keep < 1 || keep > EVLOG_KEEP_MAX)
		return -EINVAL;
	memcpy(l->path, path, strlen(path) + 1);
	l->max_bytes = max_bytes;
	l->keep = keep;
	l->backlog = calloc(EVLOG_BACKLOG_MAX, sizeof l->backlog[0]);
	if (l->backlog == NULL)
		return -ENOMEM;
	int rc = open_fd(l);
	if (rc != 0) {
		say(l, EVLOG_ERROR, "cannot open events file %s: %s; events are held in memory "
				    "(up to %d) and the file is tried again", l->path, strerror(-rc),
		    EVLOG_BACKLOG_MAX);
		l->failing = true;
	}
	return 0;
}

/* PATH.k-1 -> PATH.k for k = keep..2, PATH -> PATH.1, then a new PATH. */
static int rotate(struct evlog *l)
{
	char from[FG_PATH_MAX + 16], to[FG_PATH_MAX + 16];
	snprintf(to, sizeof to, "%s.%u", l->path, l->keep);
	(void)unlink(to); /* the oldest goes; ENOENT is fine */
	for (unsigned k = l->keep; k >= 2; k--) {
		snprintf(from, sizeof from, "%s.%u", l->path, k - 1);
		snprintf(to, sizeof to, "%s.%u", l->path, k);
		if (rename(from, to) != 0 && errno != ENOENT)
			return -errno;
	}
	snprintf(to, sizeof to, "%s.1", l->path);
	if (rename(l->path, to) != 0)
		return -errno;
	close(l->fd);
	l->fd = -1;
	l->stats.rotations++;
	return open_fd(l);
}

/* Writes buf (len bytes, a whole line) or nothing: a short write is cut off
 * again so the file never ends in half a line. Returns 0 or -errno. */
static int write_whole(struct evlog *l, const char *buf, size_t len)
{
	int rc = open_fd(l);
	if (rc != 0)
		return rc;
	off_t before = lseek(l->fd, 0, SEEK_END);
	if (l->max_bytes > 0 && before > 0 && (uint64_t)before + len > l->max_bytes) {
		rc = rotate(l);
		if (rc != 0)
			return rc;
		before = 0;
	}
	size_t done = 0;
	while (done < len) {
		ssize_t n = write(l->fd, buf + done, len - done);
		if (n < 0 && errno == EINTR)
			continue;
		if (n <= 0) {
			rc = n < 0 ? -errno : -ENOSPC;
			if (done > 0 && before >= 0)
				(void)ftruncate(l->fd, before);
			return rc;
		}
		done += (size_t)n;
	}
	return 0;
}

static void note_failure(struct evlog *l, int rc)
{
	if (l->failing)
		return;
	l->failing = true;
	say(l, EVLOG_ERROR, "cannot write events file %s: %s; events are held in memory (up to %d) "
			    "until it can be written again", l->path, strerror(-rc), EVLOG_BACKLOG_MAX);
}

/* Writes held lines, oldest first, while the file takes them. */
static void drain(struct evlog *l)
{
	unsigned wrote = 0;
	int rc = 0;
	while (l->count > 0) {
		const char *line = l->backlog[l->head];
		rc = write_whole(l, line, strlen(line));
		if (rc != 0)
			break;
		l->head = (l->head + 1) % EVLOG_BACKLOG_MAX;
		l->count--;
		l->stats.written++;
		wrote++;
	}
	if (rc != 0) {
		note_failure(l, rc);
		return;
	}
	if (l->failing) {
		l->failing = false;
		say(l, EVLOG_INFO, "events file %s writable again: %u held event(s) written", l->path,
		    wrote);
	}
	if (l->lost_in_run > 0) {
		say(l, EVLOG_ERROR, "events file %s: %llu event(s) could not be held and are missing "
				    "from it (they were logged and published)", l->path,
		    (unsigned long long)l->lost_in_run);
		l->lost_in_run = 0;
	}
}

static int hold(struct evlog *l, const char *line, size_t len)
{
	if (l->count == EVLOG_BACKLOG_MAX) {
		l->stats.lost++;
		if (l->lost_in_run++ == 0)
			say(l, EVLOG_ERROR, "events file %s: backlog full (%d events): further events "
					    "are not kept for the file until it is writable", l->path,
			    EVLOG_BACKLOG_MAX);
		return -ENOBUFS;
	}
	char *slot = l->backlog[(l->head + l->count) % EVLOG_BACKLOG_MAX];
	memcpy(slot, line, len);
	slot[len] = '\0';
	l->count++;
	l->stats.held++;
	return -EAGAIN;
}

int evlog_write(struct evlog *l, const char *line)
{
	assert(l != NULL);
	assert(line != NULL);
	char buf[EVLOG_LINE_MAX];
	int n = snprintf(buf, sizeof buf, "%s\n", line);
	if (n < 0 || (size_t)n >= sizeof buf) {
		say(l, EVLOG_ERROR, "events file %s: an event of %zu bytes is too long to write",
		    l->path, strlen(line));
		l->stats.lost++;
		return -EMSGSIZE;
	}
	if (l->backlog == NULL)
		return -ENOBUFS;
	drain(l);
	if (l->count > 0)
		return hold(l, buf, (size_t)n);
	int rc = write_whole(l, buf, (size_t)n);
	if (rc == 0) {
		l->stats.written++;
		return 0;
	}
	note_failure(l, rc);
	return hold(l, buf, (size_t)n);
}

unsigned evlog_retry(struct evlog *l)
{
	assert(l != NULL);
	if (l->backlog != NULL && (l->count > 0 || l->failing))
		drain(l);
	return l->count;
}

int evlog_reopen(struct evlog *l)
{
	assert(l != NULL);
	if (l->fd >= 0)
		close(l->fd);
	l->fd = -1;
	int rc = open_fd(l);
	if (rc != 0)
		note_failure(l, rc);
	else
		say(l, EVLOG_INFO, "events file %s reopened", l->path);
	return rc;
}

void evlog_get_stats(const struct evlog *l, struct evlog_stats *out)
{
	assert(l != NULL);
	assert(out != NULL);
	*out = l->stats;
	out->pending = l->count;
}

void evlog_close(struct evlog *l)
{
	if (l == NULL || l->backlog == NULL)
		return;
	evlog_retry(l);
	if (l->count > 0) {
		/* The last place left for them is the log (the journal). */
		say(l, EVLOG_ERROR, "events file %s: %u held event(s) could not be written before "
				    "the stop; they follow", l->path, l->count);
		for (; l->count > 0; l->count--, l->head = (l->head + 1) % EVLOG_BACKLOG_MAX) {
			char *line = l->backlog[l->head];
			line[strcspn(line, "\n")] = '\0';
			say(l, EVLOG_ERROR, "unwritten event: %s", line);
		}
	}
	if (l->fd >= 0 && fsync(l->fd) != 0 && errno != EINVAL)
		say(l, EVLOG_WARNING, "events file %s: fsync: %s", l->path, strerror(errno));
	if (l->fd >= 0)
		close(l->fd);
	l->fd = -1;
	free(l->backlog);
	l->backlog = NULL;
}
