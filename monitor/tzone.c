/*
 * tzone.c - see tzone.h.
 *
 * How it is built: the zone file is the TZif format of RFC 8536. Only its
 * version 2+ part is used (64-bit transition times); a version 1 file is
 * refused. The transitions and their types become two arrays; the footer,
 * a POSIX TZ string such as "CET-1CEST,M3.5.0,M10.5.0/3" (RFC 8536 section
 * 3.3, POSIX.1-2017 XBD 8.3), gives the rule after the last transition. Only
 * the "Mm.w.d" rule form is read: the zones in tzdata use it; a footer in
 * another form leaves the last type in force.
 *
 * A local time L (as if UTC) is converted by trying the offsets in force a
 * day before and a day after it: t = L - o is a solution when the offset at
 * t is o. No solution is the spring gap; two are the repeated autumn hour.
 * This assumes no zone changes its offset twice within two days, which holds
 * for every zone in tzdata since the 1940s.
 */
#include "tzone.h"

#include <assert.h>
#include <errno.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "timefmt.h"

#define TZIF_HEADER_SIZE 44
#define TZIF_FILE_MAX (1u << 20) /* the largest zone file is under 4 KiB */
#define S_PER_DAY 86400

__attribute__((format(printf, 3, 4))) static void set_err(char *err, size_t err_size,
							   const char *fmt, ...)
{
	if (err == NULL || err_size == 0)
		return;
	va_list ap;
	va_start(ap, fmt);
	vsnprintf(err, err_size, fmt, ap);
	va_end(ap);
}

static uint32_t be32(const unsigned char *p)
{
	return (uint32_t)p[0] << 24 | (uint32_t)p[1] << 16 | (uint32_t)p[2] << 8 | p[3];
}

static int64_t be64(const unsigned char *p)
{
	return (int64_t)((uint64_t)be32(p) << 32 | be32(p + 4));
}

static bool name_ok(const char *name)
{
	size_t n = strlen(name);
	if (n == 0 || n >= TZONE_NAME_MAX || name[0] == '/' || strstr(name, "..") != NULL)
		return false;
	for (size_t i = 0; i < n; i++) {
		char c = name[i];
		bool ok = (c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9') ||
			  c == '/' || c == '_' || c == '-' || c == '+';
		if (!ok)
			return false;
	}
	return true;
}

static int read_file(const char *path, unsigned char **data, size_t *size)
{
	FILE *f = fopen(path, "rb");
	if (f == NULL)
		return errno == ENOENT || errno == ENOTDIR ? -ENOENT : -errno;
	unsigned char *buf = malloc(TZIF_FILE_MAX);
	if (buf == NULL) {
		fclose(f);
		return -ENOMEM;
	}
	size_t n = fread(buf, 1, TZIF_FILE_MAX, f);
	bool bad = ferror(f) != 0 || n == TZIF_FILE_MAX;
	fclose(f);
	if (bad) {
		free(buf);
		return -EILSEQ;
	}
	*data = buf;
	*size = n;
	return 0;
}

/* ---- the POSIX TZ footer ----------------------------------------------- */

static const char *skip_zone_name(const char *p)
{
	if (*p == '<') {
		const char *q = strchr(p, '>');
		return q != NULL ? q + 1 : NULL;
	}
	const char *s = p;
	while ((*p >= 'A' && *p <= 'Z') || (*p >= 'a' && *p <= 'z'))
		p++;
	return p - s >= 3 ? p : NULL;
}

/* [+-]hh[:mm[:ss]] -> seconds; NULL when there is none. */
static const char *read_hms(const char *p, int32_t *out)
{
	int32_t sign = 1;
	if (*p == '+' || *p == '-')
		sign = *p++ == '-' ? -1 : 1;
	if (*p < '0' || *p > '9')
		return NULL;
	int32_t part[3] = {0, 0, 0};
	for (int k = 0; k < 3; k++) {
		if (k > 0) {
			if (*p != ':')
				break;
			p++;
		}
		int digits = 0;
		while (*p >= '0' && *p <= '9' && digits < 3) {
			part[k] = part[k] * 10 + (*p++ - '0');
			digits++;
		}
		if (digits == 0)
			return NULL;
	}
	*out = sign * (part[0] * 3600 + part[1] * 60 + part[2]);
	return p;
}

static const char *read_rule(const char *p, struct tzone_rule *r)
{
	unsigned m = 0, w = 0, d = 0;
	int used = 0;
	if (sscanf(p, "M%u.%u.%u%n", &m, &w, &d, &used) != 3 || m < 1 || m > 12 || w < 1 ||
	    w > 5 || d > 6)
		return NULL;
	p += used;
	r->month = m;
	r->week = w;
	r->wday = d;
	r->time_s = 2 * 3600;
	if (*p == '/')
		p = read_hms(p + 1, &r->time_s);
	return p;
}

static void parse_footer(struct tzone *z, const char *s)
{
	int32_t off = 0;
	const char *p = skip_zone_name(s);
	if (p == NULL || (p = read_hms(p, &off)) == NULL)
		return;
	z->std_offset_s = -off; /* POSIX offsets are west-positive */
	z->dst_offset_s = z->std_offset_s + 3600;
	if (*p == '\0') {
		z->has_rule = true; /* a fixed offset */
		return;
	}
	p = skip_zone_name(p);
	if (p == NULL)
		return;
	if (*p != ',' && *p != '\0') {
		p = read_hms(p, &off);
		if (p == NULL)
			return;
		z->dst_offset_s = -off;
	}
	if (*p != ',' || (p = read_rule(p + 1, &z->start)) == NULL || *p != ',' ||
	    (p = read_rule(p + 1, &z->end)) == NULL || *p != '\0')
		return;
	z->has_rule = true;
	z->rule_dst = true;
}

/* UTC second of a rule's change in year y, from local time at offset_s. */
static int64_t rule_utc_s(const struct tzone_rule *r, int64_t y, int32_t offset_s)
{
	int64_t first = timefmt_days_from_civil(y, r->month, 1);
	unsigned wd_first = (unsigned)(((first + 4) % 7 + 7) % 7); /* 1970-01-01 was a Thursday */
	int64_t day = first + (int64_t)((r->wday + 7 - wd_first) % 7) + 7 * (int64_t)(r->week - 1);
	unsigned len = timefmt_days_in_month(y, r->month);
	while (day - first >= (int64_t)len)
		day -= 7; /* week 5 is "the last" */
	return day * S_PER_DAY + r->time_s - offset_s;
}

static int32_t rule_offset_s(const struct tzone *z, int64_t t_s)
{
	if (!z->rule_dst)
		return z->std_offset_s;
	int64_t days = (t_s + z->std_offset_s) / S_PER_DAY - ((t_s + z->std_offset_s) % S_PER_DAY < 0);
	int64_t y;
	unsigned m, d;
	timefmt_civil_from_days(days, &y, &m, &d);
	int64_t start = rule_utc_s(&z->start, y, z->std_offset_s);
	int64_t end = rule_utc_s(&z->end, y, z->dst_offset_s);
	bool dst = start < end ? t_s >= start && t_s < end : !(t_s >= end && t_s < start);
	return dst ? z->dst_offset_s : z->std_offset_s;
}

/* ---- the TZif body ----------------------------------------------------- */

static int parse_tzif(struct tzone *z, const unsigned char *d, size_t size)
{
	if (size < TZIF_HEADER_SIZE || memcmp(d, "TZif", 4) != 0 || d[4] < '2')
		return -EILSEQ;
	/* Skip the version 1 block to reach the 64-bit one. */
	uint32_t c1[6];
	for (int i = 0; i < 6; i++)
		c1[i] = be32(d + 20 + 4 * i);
	size_t v1 = (size_t)c1[3] * 5 + (size_t)c1[4] * 6 + c1[5] + (size_t)c1[2] * 8 + c1[1] +
		    c1[0];
	size_t h2 = TZIF_HEADER_SIZE + v1;
	if (size < h2 + TZIF_HEADER_SIZE || memcmp(d + h2, "TZif", 4) != 0)
		return -EILSEQ;
	uint32_t isut = be32(d + h2 + 20), isstd = be32(d + h2 + 24), leap = be32(d + h2 + 28);
	uint32_t timecnt = be32(d + h2 + 32), typecnt = be32(d + h2 + 36);
	uint32_t charcnt = be32(d + h2 + 40);
	if (typecnt == 0 || typecnt > TZONE_TYPES_MAX || leap != 0 || timecnt > 100000)
		return -EILSEQ; /* leap-second ("right/") zones are not supported */
	const unsigned char *p = d + h2 + TZIF_HEADER_SIZE;
	size_t body = (size_t)timecnt * 9 + (size_t)typecnt * 6 + charcnt + isstd + isut;
	if ((size_t)(p - d) + body > size)
		return -EILSEQ;
	z->transition_s = malloc((timecnt > 0 ? timecnt : 1) * sizeof *z->transition_s);
	z->transition_type = malloc(timecnt > 0 ? timecnt : 1);
	if (z->transition_s == NULL || z->transition_type == NULL)
		return -ENOMEM;
	z->transition_count = timecnt;
	z->type_count = typecnt;
	for (uint32_t i = 0; i < timecnt; i++)
		z->transition_s[i] = be64(p + 8 * i);
	p += 8 * (size_t)timecnt;
	for (uint32_t i = 0; i < timecnt; i++) {
		if (p[i] >= typecnt)
			return -EILSEQ;
		z->transition_type[i] = p[i];
	}
	p += timecnt;
	for (uint32_t i = 0; i < typecnt; i++) {
		z->type_offset_s[i] = (int32_t)be32(p + 6 * i);
		z->type_dst[i] = p[6 * i + 4] != 0;
	}
	p += 6 * (size_t)typecnt + charcnt + isstd + isut;
	/* Footer: "\n" TZ "\n". */
	size_t rest = size - (size_t)(p - d);
	if (rest >= 2 && p[0] == '\n' && p[rest - 1] == '\n' && rest < 128) {
		char tz[128];
		memcpy(tz, p + 1, rest - 2);
		tz[rest - 2] = '\0';
		parse_footer(z, tz);
	}
	return 0;
}

int tzone_load(struct tzone *z, const char *name, char *err, size_t err_size)
{
	assert(z != NULL);
	assert(name != NULL);
	memset(z, 0, sizeof *z);
	if (!name_ok(name)) {
		set_err(err, err_size, "'%s' is not a time zone name (such as Europe/Berlin)", name);
		return -EINVAL;
	}
	const char *dir = getenv("TZDIR");
	if (dir == NULL || dir[0] == '\0')
		dir = "/usr/share/zoneinfo";
	char path[512];
	snprintf(path, sizeof path, "%s/%s", dir, name);
	unsigned char *data = NULL;
	size_t size = 0;
	int rc = read_file(path, &data, &size);
	if (rc == 0) {
		rc = parse_tzif(z, data, size);
		free(data);
	}
	if (rc != 0) {
		tzone_free(z);
		if (rc == -ENOENT)
			set_err(err, err_size, "time zone '%s' is not installed (no %s; install "
					       "tzdata)", name, path);
		else if (rc == -EILSEQ)
			set_err(err, err_size, "%s is not a zoneinfo (TZif v2+) file", path);
		else
			set_err(err, err_size, "%s: %s", path, strerror(-rc));
		return rc;
	}
	snprintf(z->name, sizeof z->name, "%s", name);
	return 0;
}

void tzone_free(struct tzone *z)
{
	if (z == NULL)
		return;
	free(z->transition_s);
	free(z->transition_type);
	memset(z, 0, sizeof *z);
}

int32_t tzone_offset_s(const struct tzone *z, int64_t t_s)
{
	assert(z != NULL);
	assert(z->type_count > 0);
	unsigned n = z->transition_count;
	if (n == 0 || t_s < z->transition_s[0])
		return n == 0 && z->has_rule ? rule_offset_s(z, t_s) : z->type_offset_s[0];
	if (t_s >= z->transition_s[n - 1] && z->has_rule)
		return rule_offset_s(z, t_s);
	unsigned lo = 0, hi = n; /* last transition <= t_s */
	while (hi - lo > 1) {
		unsigned mid = lo + (hi - lo) / 2;
		if (z->transition_s[mid] <= t_s)
			lo = mid;
		else
			hi = mid;
	}
	return z->type_offset_s[z->transition_type[lo]];
}

static int64_t floor_s(int64_t ms)
{
	return ms / 1000 - (ms % 1000 < 0);
}

int tzone_local_to_utc(const struct tzone *z, int64_t local_ms, int64_t after_t_ms,
		       int64_t *t_ms)
{
	assert(z != NULL);
	assert(t_ms != NULL);
	int64_t local_s = floor_s(local_ms);
	int32_t o[2] = {tzone_offset_s(z, local_s - S_PER_DAY), tzone_offset_s(z, local_s + S_PER_DAY)};
	int64_t cand[2];
	unsigned n = 0;
	for (unsigned k = 0; k < 2; k++) {
		if (k == 1 && o[1] == o[0])
			break;
		int64_t t = local_ms - (int64_t)o[k] * 1000;
		if (tzone_offset_s(z, floor_s(t)) == o[k])
			cand[n++] = t;
	}
	if (n == 0)
		return -ERANGE;
	if (n == 2 && cand[1] < cand[0]) {
		int64_t x = cand[0];
		cand[0] = cand[1];
		cand[1] = x;
	}
	*t_ms = n == 2 && after_t_ms != INT64_MIN && cand[0] < after_t_ms ? cand[1] : cand[0];
	return 0;
}
