/*
 * log.h - the daemon's log: one line per message on stderr, prefixed with
 * the UTC time and a level (under systemd: a syslog priority, see
 * log_stderr_is_journal). While the live view owns the terminal, lines go
 * to a small ring the view shows at its foot instead, so they neither
 * scroll the view away nor get lost (and the ring is dumped when the view
 * ends).
 */
#ifndef LOG_H
#define LOG_H

#include <stdbool.h>

enum log_level { LOG_DEBUG, LOG_INFO, LOG_WARNING, LOG_ERROR };

/* Lines kept for the live view. */
#define LOG_RING_LINES 6
#define LOG_LINE_MAX 240

void log_msg(enum log_level level, const char *fmt, ...) __attribute__((format(printf, 2, 3)));

/* True when stderr is the systemd journal's stream (JOURNAL_STREAM): lines
 * then start with a syslog priority "<3>" error, "<4>" warning, "<6>" info,
 * "<7>" debug, so `journalctl -p warning` filters, and carry no time stamp. */
bool log_stderr_is_journal(void);

/* true: keep lines in the ring instead of writing them (live view active). */
void log_to_ring(bool on);

/* Copies ring line i (0 = oldest kept) into buf; false when there is none. */
bool log_ring_copy(unsigned i, char *buf, unsigned buf_size);

#endif
