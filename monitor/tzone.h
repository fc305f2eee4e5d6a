/*
 * tzone.h - local wall-clock time to UTC for one IANA time zone, read from
 * the system's zoneinfo (the tzdata package; TZDIR overrides the directory).
 *
 * Historian exports are often written in the plant's local time without an
 * offset. `--tz Europe/Berlin` names the zone; this module turns such a time
 * into t_ms (UTC). Two local times need a rule:
 *  - a time in the spring gap (02:30 on the night the clocks go forward)
 *    never happened: tzone_local_to_utc() returns -ERANGE and the caller
 *    reports the time as invalid;
 *  - a time in the repeated autumn hour happened twice. It is resolved by
 *    order: the earlier instant (the summer-time offset) unless that would
 *    come before the previous time of the file (after_t_ms), in which case
 *    it is the later one. So a file written in order through the repeated
 *    hour reads first pass, second pass, and times never go back in UTC.
 *
 * Nothing here depends on TZ, the locale or the C library's own zone
 * handling, so a replay gives the same times on every machine that has the
 * same tzdata.
 */
#ifndef TZONE_H
#define TZONE_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

/* IANA zone names ("America/Argentina/Buenos_Aires" is 30), with the NUL. */
#define TZONE_NAME_MAX 64

/* Local-time types of one zone file (TZif allows 256). */
#define TZONE_TYPES_MAX 256

/* A POSIX TZ rule "Mm.w.d/time" (the TZif footer, for times after the last
 * transition of the table). */
struct tzone_rule {
	unsigned month;   /* 1..12 */
	unsigned week;    /* 1..5, 5 = the last */
	unsigned wday;    /* 0 = Sunday */
	int32_t time_s;   /* local time of day of the change, s (may be < 0 or > 24 h) */
};

struct tzone {
	char name[TZONE_NAME_MAX];
	unsigned transition_count;
	int64_t *transition_s;      /* UTC seconds, ascending (allocated) */
	uint8_t *transition_type;   /* type index after each transition (allocated) */
	unsigned type_count;
	int32_t type_offset_s[TZONE_TYPES_MAX]; /* UTC offset, east positive */
	bool type_dst[TZONE_TYPES_MAX];
	/* The footer rule; has_rule false: the last type holds for ever. */
	bool has_rule;
	bool rule_dst;              /* the rule has a daylight-saving part */
	int32_t std_offset_s, dst_offset_s;
	struct tzone_rule start, end;
};

/*
 * Loads zone name ("Europe/Berlin", "UTC"). Returns 0, or a negative errno
 * with a message in err: -EINVAL for a name that is not a zone name (empty,
 * too long, absolute, with ".."), -ENOENT when the zone is not installed,
 * -EILSEQ when the file is not a TZif file, -ENOMEM. z is left freed on
 * failure.
 */
int tzone_load(struct tzone *z, const char *name, char *err, size_t err_size);

/* Frees what tzone_load allocated; accepts a zeroed or freed z. */
void tzone_free(struct tzone *z);

/* The UTC offset, s (east positive), in force at UTC second t_s. */
int32_t tzone_offset_s(const struct tzone *z, int64_t t_s);

/*
 * Converts a local wall-clock time, given as if it were UTC (local_ms, as
 * timefmt_parse_zoned() returns it), to UTC. after_t_ms picks the pass in
 * the repeated autumn hour (see above; INT64_MIN: the earlier instant).
 * Returns 0 with *t_ms, or -ERANGE for a time in the spring gap.
 */
int tzone_local_to_utc(const struct tzone *z, int64_t local_ms, int64_t after_t_ms,
		       int64_t *t_ms);

#endif
