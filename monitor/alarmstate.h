/*
 * alarmstate.h - the alarm state file: alarm lifecycles survive a restart.
 *
 * For the daemon to save the lifecycle of every alarm ([monitor] state_file)
 * after each state change and at shutdown, and to restore it at start-up,
 * matching alarms by name. What is kept: the visible state, the condition (active), whether an
 * occurrence awaits acknowledgement, the shelve and its expiry (absolute, ms
 * since the Unix epoch, so a shelve that ran out while the daemon was down
 * ends at the first evaluation after the restart), out of service, and
 * suppression by design (so a restart of a shut-down section shows suppressed_by_design
 * until the first evaluation says otherwise). Not kept: running on- and
 * off-delays, rate history and the diagnostic reason; they rebuild from the
 * first samples.
 *
 * File format, version 1: ASCII text, LF line ends, one record per line.
 *
 *   floodgauge-alarmstate 1
 *   saved_t_ms 1767225600000
 *   count 2
 *   alarm unacknowledged active=1 unacked=1 shelved=0 until_t_ms=0 oos=0 dsupr=0 name=T1_flood_hi
 *   alarm shelved active=0 unacked=0 shelved=1 until_t_ms=1767229200000 oos=0 dsupr=0 name=T1_weep
 *   crc32 0x89abcdef
 *
 * - Line 1 names the format and its version. A different version is refused
 *   (-ENOTSUP) before anything else is read, so a later format may change
 *   everything after this line.
 * - saved_t_ms: the time passed to alarmstate_save (information only).
 * - count: the number of alarm lines that follow; each alarm line has the
 *   fields in exactly this order, bools as 0 or 1, and the alarm name last
 *   (everything after "name=" up to the line end, so a name may hold spaces
 *   or '='). until_t_ms is the shelve expiry (0 when not shelved), dsupr
 *   the suppressed-by-design flag. The visible state must agree with the
 *   other fields.
 * - crc32: the last line; CRC-32 (IEEE 802.3, as zlib's crc32) of every byte
 *   of the file before this line, as 0x and 8 lower-case hex digits. A file
 *   without it is taken as truncated. The checksum turns a torn or hand-edited
 *   file into a clear refusal instead of a silently wrong alarm state.
 */
#ifndef ALARMSTATE_H
#define ALARMSTATE_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include "alarm.h"

#define ALARMSTATE_VERSION 1
#define ALARMSTATE_MAGIC "floodgauge-alarmstate"

/* Largest state file read, bytes: FG_ALARMS_MAX lines of at most ~180 bytes
 * is ~35 KB; twice that leaves room and still bounds a garbage file. */
#define ALARMSTATE_FILE_MAX 65536

_Static_assert(FG_ALARMS_MAX * 200 < ALARMSTATE_FILE_MAX, "state file limit too small");

/* What a load found, for the caller's log line. */
struct alarmstate_info {
	bool file_found;        /* false: no state file (first start); nothing restored */
	unsigned record_count;  /* alarm records in the file */
	unsigned restored_count;/* alarms restored */
	unsigned unknown_count; /* records whose name matches no configured alarm: skipped */
	int64_t saved_t_ms;     /* saved_t_ms of the file, 0 when no file */
};

/* Saves the lifecycle of alarms[0..count) to path, atomically: it writes
 * PATH.new, flushes and fsyncs it, renames it over PATH and fsyncs the
 * directory. Returns 0, or a negative errno (-ENAMETOOLONG when PATH.new does
 * not fit FG_PATH_MAX + 4 bytes, else from the failing call). On a failure
 * before the rename PATH is untouched and PATH.new removed; when only the
 * final fsync of the directory fails, PATH already holds the new state but
 * the error is returned (the rename may not survive a power cut). Asserts
 * every alarm is consistent and that names are unique. */
int alarmstate_save(const char *path, const struct alarm *alarms, unsigned count,
		    int64_t now_t_ms);

/* Restores alarms[0..count), already initialised with alarm_init, from path,
 * by name. Returns the number of alarms restored (>= 0) or a negative errno:
 *   -EBADMSG  corrupt: bad syntax, bad checksum, truncated, inconsistent record,
 *             duplicate name;
 *   -ENOTSUP  another format version;
 *   -EFBIG    larger than ALARMSTATE_FILE_MAX;
 *   other     the errno of open or read.
 * On any error nothing is restored and err says what is wrong (with the path).
 * A missing file is not an error: it returns 0 with err = "" and nothing
 * restored; the caller tells it apart from a file with no matching alarm by
 * alarmstate_load_info's info->file_found. On success err is "" or, when
 * records were skipped, names the first unknown alarm. Restored alarms restart
 * their delays and rate history; the saved out-of-service flag wins over
 * cfg.out_of_service. err may be NULL when err_size is 0. */
int alarmstate_load(const char *path, struct alarm *alarms, unsigned count, char *err,
		    size_t err_size);

/* The same, also filling *info (which may be NULL) on success. */
int alarmstate_load_info(const char *path, struct alarm *alarms, unsigned count,
			 struct alarmstate_info *info, char *err, size_t err_size);

/* CRC-32 (IEEE 802.3, reflected polynomial 0xEDB88320, initial and final
 * xor 0xFFFFFFFF), continuing from crc; start with 0. Same as zlib crc32(). */
uint32_t alarmstate_crc32(uint32_t crc, const void *data, size_t size);

#endif
