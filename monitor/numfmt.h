/*
 * numfmt.h - how numbers are written: in full for machines, rounded for people.
 *
 * JSON (events.jsonl, summary.json, --json output, MQTT) keeps every bit
 * of a double: numfmt_full writes the shortest of %.15g, %.16g and
 * %.17g that reads back to the same double, so 0.1 stays "0.1" and 1/3 keeps the 16
 * digits it needs. Values from 1e-16 to 1e17 take an exact
 * printf-free path (128-bit integers, see numfmt.c) that gives the same
 * text several times faster. results.csv, millions of numbers a replay,
 * takes 12 significant digits instead (numfmt_sig12: 5e-12 relative, a
 * fifth fewer bytes, formatted in under half the time). What a
 * person reads (tables, the live view, the report, the printed summary) is
 * rounded to a sensible precision by the caller, and durations are written
 * as h:mm:ss by numfmt_duration.
 */
#ifndef NUMFMT_H
#define NUMFMT_H

#include <stddef.h>
#include <stdint.h>

/* Enough for "-1.2345678901234567e-308" and a NUL. */
#define NUMFMT_FULL_SIZE 32
/* Enough for "-2562047788015:12:55" and a NUL. */
#define NUMFMT_DURATION_SIZE 32

/* Writes v in the C locale so that strtod gives v back exactly; -0 is written
 * "0". v must be finite (callers write NaN as an empty field or null).
 * Returns the length written. */
int numfmt_full(double v, char *buf, size_t buf_size);

/* The same text by printf alone (%.15g, %.16g, %.17g and strtod): the
 * definition numfmt_full's printf-free fast path is tested against. */
int numfmt_full_printf(double v, char *buf, size_t buf_size);

/* Writes v to 12 significant digits as printf's "%.12g" does (the exact
 * value rounded half to even, trailing zeros dropped, an exponent below
 * 1e-4 and from 1e12), in the C locale; -0 is written "0"; v must be
 * finite. strtod gives back v within half a unit of the 12th digit (5e-12
 * relative at most). results.csv's numbers. Without printf for
 * 1e-11 <= |v| < 1e33 but near ties. Returns the length written. */
int numfmt_sig12(double v, char *buf, size_t buf_size);

/* The same text by snprintf's "%.12g": the definition numfmt_sig12's fast
 * path is tested against. */
int numfmt_sig12_printf(double v, char *buf, size_t buf_size);

/* The 8 digits of x < 10^8, zero-padded and NUL-terminated, by the
 * word-at-a-time conversion numfmt_full uses (exposed for its test). */
void numfmt_digits8(uint32_t x, char out[9]);

/* The 16 digits of x < 10^16, zero-padded and NUL-terminated, as the
 * layout of numfmt_full makes them (SSE2 where the compiler has it);
 * returns the number of trailing zeros (16 for 0). For its test. */
int numfmt_digits16(uint64_t x, char out[17]);

/* Writes v for a person to read: a percentage (unit "%") to 0.1, anything
 * else to 4 significant figures (%.4g: 1235, 3.457, 0.04231), "-" when not
 * finite, never "-0". unit may be NULL. Returns the length written. */
int numfmt_human(double v, const char *unit, char *buf, size_t buf_size);

/* Writes a duration of s seconds as h:mm:ss (hours unbounded, seconds
 * rounded to the nearest whole second; "-" prefix when negative), or "-" when
 * s is not finite. Returns the length written. */
int numfmt_duration(double s, char *buf, size_t buf_size);

#endif
