/*
 * timefmt.h - wall-clock time as text: parsing historian time stamps and
 * formatting result and event times.
 *
 * Time is an int64_t count of milliseconds since 1970-01-01T00:00:00Z (UTC),
 * named t_ms, on the proleptic Gregorian calendar without leap seconds (the
 * POSIX "seconds since the epoch" rule, scaled to milliseconds). The
 * calendar arithmetic is done here from the Gregorian leap-year rule; nothing
 * depends on timegm(), the locale or TZ, so a replay gives the same times on
 * every machine.
 *
 * Supported range: years 0000 to 9999, i.e. TIMEFMT_MIN_MS..TIMEFMT_MAX_MS.
 */
#ifndef TIMEFMT_H
#define TIMEFMT_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

/* 0000-01-01T00:00:00.000Z and 9999-12-31T23:59:59.999Z, ms since the epoch. */
#define TIMEFMT_MIN_MS (-62167219200000LL)
#define TIMEFMT_MAX_MS (253402300799999LL)

/* Longest text timefmt_format() writes, "YYYY-MM-DDTHH:MM:SS.mmmZ", plus NUL. */
#define TIMEFMT_BUF_SIZE 25

/*
 * Parses one time stamp of exactly len bytes (s need not be NUL-terminated;
 * blanks, i.e. spaces and tabs, around it are ignored). Accepted forms:
 *
 *   ISO 8601 extended date and time, "2026-03-04T05:06:07Z":
 *     - 'T', 't' or one space between date and time (so the spreadsheet
 *       form "2026-03-04 05:06:07.250" is accepted too); seconds may be
 *       left out ("2026-03-04T05:06Z" is 05:06:00);
 *     - fractional seconds of any length after '.' or ',' (ISO 8601 allows
 *       both marks), rounded to the nearest millisecond, halves up;
 *     - zone "Z"/"z", or an offset "+HH:MM", "+HHMM" or "+HH" (or '-'),
 *       which is subtracted to give UTC (05:06+01:00 is 04:06Z);
 *     - no zone at all: the wall-clock time is returned as if it were UTC;
 *       timefmt_parse_zoned() says so, and the caller converts it from a
 *       local zone (tzone.h) when one is given (--tz);
 *     - second 60 (a leap second) is accepted and, as in POSIX time, counts
 *       as second 0 of the next minute.
 *   Epoch seconds: an optional sign, digits, and optionally '.' or ','
 *     and more digits ("1772600767.25", "-1.5"), rounded to the nearest
 *     millisecond, halves away from zero (so "-x" parses to minus "x").
 *
 * Ranges are checked: month 1..12, day within the month (Gregorian leap
 * years), hour 0..23, minute 0..59, second 0..60, offset hour 0..23 and
 * minute 0..59, and the result within TIMEFMT_MIN_MS..TIMEFMT_MAX_MS.
 * Returns 0 and sets *t_ms, or -EINVAL (and leaves *t_ms alone).
 */
int timefmt_parse(const char *s, size_t len, int64_t *t_ms);

/* The same, and *zoned tells whether the text fixed its zone (a zone
 * designator or offset, or epoch seconds): false for a bare wall-clock time,
 * which the caller may convert from a local zone. */
int timefmt_parse_zoned(const char *s, size_t len, int64_t *t_ms, bool *zoned);

/*
 * Writes t_ms as "2026-03-04T05:06:07Z", or "2026-03-04T05:06:07.123Z" when
 * the milliseconds are not zero, NUL-terminated. Returns the length written
 * (20 or 24, without the NUL), -ENOSPC when buf_size cannot hold the text and
 * its NUL (buf then holds an empty string if buf_size > 0), or -ERANGE when
 * t_ms is outside TIMEFMT_MIN_MS..TIMEFMT_MAX_MS.
 */
int timefmt_format(int64_t t_ms, char *buf, size_t buf_size);

/* Days from 1970-01-01 to the given proleptic Gregorian date (negative
 * before it). month 1..12, day 1..31; the caller validates the date. */
int64_t timefmt_days_from_civil(int64_t year, unsigned month, unsigned day);

/* The inverse: the date of day number days (0 = 1970-01-01). */
void timefmt_civil_from_days(int64_t days, int64_t *year, unsigned *month, unsigned *day);

/* Days in the month (28..31) of the given year, month 1..12. */
unsigned timefmt_days_in_month(int64_t year, unsigned month);

#endif
