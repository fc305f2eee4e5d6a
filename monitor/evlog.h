/*
 * evlog.h - the daemon's events file (JSON Lines, one alarm event a line),
 * written so that no event is lost without a word.
 *
 * Every line is written with write(2) on an O_APPEND descriptor and the
 * result checked. When a line cannot be written whole (disk full, quota, I/O
 * error, file removed from under us on a read-only remount), the partial
 * tail is cut off again (ftruncate to the size before the write, so the file
 * never holds half a line) and the line goes into a backlog of
 * EVLOG_BACKLOG_MAX lines held in memory. The backlog is written, oldest
 * first, before any newer line, at every evlog_write() and evlog_retry():
 * order in the file is the order of the events. The owner is told of each
 * change through the log callback: once when writing starts to fail (with
 * the reason), once when it works again (with how many held lines were
 * written), and when the backlog is full (with how many lines could not be
 * held; those lines are then lost from the file only, never silently).
 *
 * Rotation: with max_bytes > 0 a line that would take the file past
 * max_bytes first renames PATH to PATH.1 (PATH.1 to PATH.2, ... up to
 * PATH.keep; the oldest is removed) and starts a new PATH. evlog_reopen()
 * closes and reopens PATH (for logrotate's "move, then signal"; the daemon
 * calls it on SIGUSR1).
 *
 * Not thread-safe: the daemon's main loop owns it.
 */
#ifndef EVLOG_H
#define EVLOG_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include "fg_limits.h"

/* Lines held while the file cannot be written: an hour of a busy unit
 * (ISA-18.2's target is under 12 alarms an hour per operator, a flood is
 * 10 in 10 min) many times over; 512 x 1 KiB is allocated once at open. */
#define EVLOG_BACKLOG_MAX 512
/* Longest line, bytes with the newline and the NUL (an event is ~300). */
#define EVLOG_LINE_MAX 1024
/* Rotated files kept at most. */
#define EVLOG_KEEP_MAX 99

enum evlog_level { EVLOG_INFO, EVLOG_WARNING, EVLOG_ERROR };
typedef void evlog_log_fn(enum evlog_level level, const char *msg);

struct evlog_stats {
	uint64_t written;      /* lines in the file (first try or from the backlog) */
	uint64_t held;         /* lines that went into the backlog */
	uint64_t lost;         /* lines refused: backlog full (each reported) */
	uint64_t rotations;
	unsigned pending;      /* lines in the backlog now */
};

struct evlog {
	char path[FG_PATH_MAX];
	int fd;                  /* -1: not open (open failed: retried at each write) */
	uint64_t max_bytes;      /* 0: no rotation */
	unsigned keep;           /* rotated files kept, 1..EVLOG_KEEP_MAX */
	evlog_log_fn *log;       /* may be NULL */
	char (*backlog)[EVLOG_LINE_MAX]; /* ring of EVLOG_BACKLOG_MAX lines */
	unsigned head, count;
	bool failing;            /* inside a run of failures (said once) */
	uint64_t lost_in_run;    /* lost lines since the last report */
	struct evlog_stats stats;
};

/*
 * Opens (creating, mode 0644) PATH for appending. Returns 0, -ENOMEM, or
 * -EINVAL (path too long, keep out of range). A file that cannot be opened
 * now is not an error: it is reported through log and retried at each
 * write, with lines held meanwhile.
 */
int evlog_open(struct evlog *l, const char *path, uint64_t max_bytes, unsigned keep,
	       evlog_log_fn *log);

/* Writes one line (without its newline; it is added). Returns 0 when it is
 * in the file, -EAGAIN when it is held in the backlog, -ENOBUFS when it was
 * refused (backlog full; reported), -EMSGSIZE when too long (reported). */
int evlog_write(struct evlog *l, const char *line);

/* Tries the backlog again. Returns the number of lines still held. */
unsigned evlog_retry(struct evlog *l);

/* Closes and reopens PATH (after an outside rotation). 0 or -errno. */
int evlog_reopen(struct evlog *l);

void evlog_get_stats(const struct evlog *l, struct evlog_stats *out);

/* Tries the backlog a last time, reports what is still held, closes.
 * NULL-safe and safe after a failed open. */
void evlog_close(struct evlog *l);

#endif
