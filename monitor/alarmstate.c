/*
 * alarmstate.c - save and restore alarm lifecycles (format in alarmstate.h).
 *
 * Saving streams the lines into PATH.new while the CRC runs over them, then
 * swaps the file in. Loading reads the whole (bounded) file, checks version,
 * checksum and every record into a scratch table, and only then touches the
 * alarms, so a bad file restores nothing. Start-up and shutdown only: the
 * allocations here are not on the per-sample path.
 */
#include "alarmstate.h"

#include <assert.h>
#include <errno.h>
#include <fcntl.h>
#include <inttypes.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

uint32_t alarmstate_crc32(uint32_t crc, const void *data, size_t size)
{
	assert(data != NULL || size == 0);
	const unsigned char *p = data;
	uint32_t c = crc ^ 0xFFFFFFFFu;
	for (size_t i = 0; i < size; i++) {
		c ^= p[i];
		for (int k = 0; k < 8; k++)
			c = (c >> 1) ^ (0xEDB88320u & (0u - (c & 1u)));
	}
	return c ^ 0xFFFFFFFFu;
}

/* ---- save ------------------------------------------------------------------ */

/* Writes one line and runs the CRC over it. */
static int put_line(FILE *f, uint32_t *crc, const char *line, size_t len)
{
	*crc = alarmstate_crc32(*crc, line, len);
	return fwrite(line, 1, len, f) == len ? 0 : -EIO;
}

static int format_alarm(const struct alarm *a, char *line, size_t line_size)
{
	/* Paired assertion, first half: only a consistent state is written. */
	assert(alarm_is_consistent(a));
	assert((unsigned)a->state < ALARM_STATE_COUNT);
	int n = snprintf(line, line_size,
			 "alarm %s active=%d unacked=%d shelved=%d until_t_ms=%" PRId64
			 " oos=%d dsupr=%d name=%s\n",
			 alarm_state_name(a->state), a->active, a->unacked, a->shelved,
			 a->shelve_until_t_ms, a->out_of_service, a->suppressed, a->cfg.name);
	if (n < 0 || (size_t)n >= line_size)
		return -ENAMETOOLONG;
	return n;
}

static int write_all(FILE *f, const struct alarm *alarms, unsigned count, int64_t now_t_ms)
{
	char line[FG_NAME_MAX + 160];
	uint32_t crc = 0;
	int n = snprintf(line, sizeof line, "%s %d\nsaved_t_ms %" PRId64 "\ncount %u\n",
			 ALARMSTATE_MAGIC, ALARMSTATE_VERSION, now_t_ms, count);
	assert(n > 0 && (size_t)n < sizeof line);
	int rc = put_line(f, &crc, line, (size_t)n);
	for (unsigned i = 0; rc == 0 && i < count; i++) {
		n = format_alarm(&alarms[i], line, sizeof line);
		rc = n < 0 ? n : put_line(f, &crc, line, (size_t)n);
	}
	if (rc != 0)
		return rc;
	n = snprintf(line, sizeof line, "crc32 0x%08" PRIx32 "\n", crc);
	assert(n > 0 && (size_t)n < sizeof line);
	return fwrite(line, 1, (size_t)n, f) == (size_t)n ? 0 : -EIO;
}

/* fsync of the directory holding path, so that the rename itself is on disk. */
static int sync_dir(const char *path)
{
	char dir[FG_PATH_MAX];
	const char *slash = strrchr(path, '/');
	if (slash == NULL) {
		strcpy(dir, ".");
	} else {
		size_t len = slash == path ? 1 : (size_t)(slash - path);
		if (len >= sizeof dir)
			return -ENAMETOOLONG;
		memcpy(dir, path, len);
		dir[len] = '\0';
	}
	int fd = open(dir, O_RDONLY | O_DIRECTORY);
	if (fd < 0)
		return -errno;
	int rc = fsync(fd) == 0 ? 0 : -errno;
	close(fd);
	return rc;
}

/*
 * Why this dance: the state file must never be seen half-written, not by the
 * next start after a crash and not after a power cut. rename() replaces PATH
 * atomically, so PATH is always either the old complete file or the new one.
 * But rename can reach the disk before the data it points at (ext4 and XFS
 * delay the allocation), which after a power cut leaves an empty or partial
 * PATH: hence fflush (our buffer to the kernel) and fsync (the kernel to the
 * disk) before the rename, and an fsync of the directory after it so the new
 * name is itself durable. The CRC line catches whatever still goes wrong.
 */
int alarmstate_save(const char *path, const struct alarm *alarms, unsigned count,
		    int64_t now_t_ms)
{
	assert(path != NULL);
	assert(alarms != NULL || count == 0);
	assert(count <= FG_ALARMS_MAX);
	/* Names are the key: a duplicate would make a file that load refuses.
	 * The config loader refuses duplicate [alarm.NAME] sections. */
	for (unsigned i = 0; i < count; i++)
		for (unsigned k = i + 1; k < count; k++)
			assert(strcmp(alarms[i].cfg.name, alarms[k].cfg.name) != 0);
	char tmp[FG_PATH_MAX + 4];
	int n = snprintf(tmp, sizeof tmp, "%s.new", path);
	if (n < 0 || (size_t)n >= sizeof tmp || strlen(path) >= FG_PATH_MAX)
		return -ENAMETOOLONG;
	FILE *f = fopen(tmp, "w");
	if (f == NULL)
		return -errno;
	int rc = write_all(f, alarms, count, now_t_ms);
	if (rc == 0 && fflush(f) != 0)
		rc = -errno;
	if (rc == 0 && fsync(fileno(f)) != 0)
		rc = -errno;
	if (fclose(f) != 0 && rc == 0)
		rc = -errno;
	if (rc == 0 && rename(tmp, path) != 0)
		rc = -errno;
	if (rc != 0)
		goto out_unlink;
	return sync_dir(path);

out_unlink:
	unlink(tmp);
	return rc;
}

/* ---- load ------------------------------------------------------------------ */

/* One parsed alarm line. */
struct record {
	char name[FG_NAME_MAX];
	enum alarm_state state;
	bool active, unacked, shelved, oos, suppressed;
	int64_t until_t_ms;
};

struct loader {
	const char *path;
	char *err;
	size_t err_size;
};

static int fail(const struct loader *ld, int rc, unsigned line_no, const char *why)
{
	assert(rc < 0);
	if (ld->err_size == 0)
		return rc;
	if (line_no > 0)
		snprintf(ld->err, ld->err_size, "%s:%u: %s", ld->path, line_no, why);
	else
		snprintf(ld->err, ld->err_size, "%s: %s", ld->path, why);
	return rc;
}

/* Reads the whole file into a NUL-terminated heap buffer (*buf_out, freed by
 * the caller). 0, 1 when the file does not exist, or a negative errno. */
static int read_file(const struct loader *ld, char **buf_out, size_t *len_out)
{
	FILE *f = fopen(ld->path, "rb");
	if (f == NULL) {
		if (errno == ENOENT)
			return 1;
		int e = errno;
		return fail(ld, -e, 0, strerror(e));
	}
	char *buf = malloc(ALARMSTATE_FILE_MAX + 1);
	if (buf == NULL) {
		fclose(f);
		return fail(ld, -ENOMEM, 0, "out of memory");
	}
	size_t len = fread(buf, 1, ALARMSTATE_FILE_MAX + 1, f);
	int rc = ferror(f) ? fail(ld, -EIO, 0, "read error") : 0;
	fclose(f);
	if (rc == 0 && len > ALARMSTATE_FILE_MAX)
		rc = fail(ld, -EFBIG, 0, "larger than any alarm state file");
	if (rc == 0 && memchr(buf, '\0', len) != NULL)
		rc = fail(ld, -EBADMSG, 0, "corrupt: contains NUL bytes");
	if (rc != 0) {
		free(buf);
		return rc;
	}
	buf[len] = '\0';
	*buf_out = buf;
	*len_out = len;
	return 0;
}

/* Checks the version line and the checksum line; *body_len is the length of
 * the checksummed part (everything before the crc32 line). */
static int check_frame(const struct loader *ld, const char *buf, size_t len, size_t *body_len)
{
	const char *nl = strchr(buf, '\n');
	size_t magic_len = strlen(ALARMSTATE_MAGIC);
	if (nl == NULL || strncmp(buf, ALARMSTATE_MAGIC " ", magic_len + 1) != 0)
		return fail(ld, -EBADMSG, 1,
			    len == 0 ? "truncated: empty file" : "not an alarm state file");
	char *end = NULL;
	errno = 0;
	long version = strtol(buf + magic_len + 1, &end, 10);
	if (end == buf + magic_len + 1 || end != nl || errno != 0)
		return fail(ld, -EBADMSG, 1, "bad version line");
	if (version != ALARMSTATE_VERSION)
		return fail(ld, -ENOTSUP, 1, "format version not supported (this build reads 1)");
	if (buf[len - 1] != '\n')
		return fail(ld, -EBADMSG, 0, "truncated: last line incomplete");
	size_t last = len - 1;
	while (last > 0 && buf[last - 1] != '\n')
		last--;
	unsigned crc_file = 0;
	int used = 0;
	if (sscanf(buf + last, "crc32 0x%8x%n", &crc_file, &used) != 1 || used != 16 ||
	    buf[last + 16] != '\n')
		return fail(ld, -EBADMSG, 0, "truncated: no checksum line at the end");
	if (alarmstate_crc32(0, buf, last) != (uint32_t)crc_file)
		return fail(ld, -EBADMSG, 0, "corrupt: checksum mismatch");
	*body_len = last;
	return 0;
}

static bool parse_bool(int v, bool *out)
{
	*out = v == 1;
	return v == 0 || v == 1;
}

/* Parses one alarm line (without its '\n') into *r. 0 or -EBADMSG. */
static int parse_alarm(const char *line, struct record *r)
{
	char state[32]; /* "returned_unacknowledged" is the longest name */
	int act, unack, shel, oos, supr, off = -1;
	int64_t until;
	int got = sscanf(line,
			 "alarm %31s active=%d unacked=%d shelved=%d until_t_ms=%" SCNd64
			 " oos=%d dsupr=%d name=%n",
			 state, &act, &unack, &shel, &until, &oos, &supr, &off);
	if (got != 7 || off < 0)
		return -EBADMSG;
	if (alarm_state_parse(state, &r->state) != 0)
		return -EBADMSG;
	bool ok = parse_bool(act, &r->active) && parse_bool(unack, &r->unacked) &&
		  parse_bool(shel, &r->shelved) && parse_bool(oos, &r->oos) &&
		  parse_bool(supr, &r->suppressed);
	size_t name_len = strlen(line + off);
	if (!ok || name_len == 0 || name_len >= FG_NAME_MAX)
		return -EBADMSG;
	memcpy(r->name, line + off, name_len + 1);
	r->until_t_ms = until;
	return 0;
}

/* Applies r to a. Used both to validate a record (on a scratch alarm) and to
 * restore it. Returns whether the result is a consistent alarm. */
static bool apply_record(struct alarm *a, const struct record *r)
{
	a->active = r->active;
	a->unacked = r->unacked;
	a->shelved = r->shelved;
	a->shelve_until_t_ms = r->until_t_ms;
	a->out_of_service = r->oos;
	a->suppressed = r->suppressed;
	a->state = r->state;
	a->pending_since_t_ms = ALARM_T_NONE;
	a->rate.sample_count = 0;
	if (r->shelved && r->until_t_ms == 0)
		return false;
	return alarm_is_consistent(a);
}

/* Copies the line at *cursor into out, without its '\n', and moves *cursor
 * past it. NULL at the end; *too_long when the line does not fit out. */
static const char *next_line(const char **cursor, char *out, size_t out_size, bool *too_long)
{
	const char *p = *cursor;
	if (*p == '\0')
		return NULL;
	const char *nl = strchr(p, '\n');
	assert(nl != NULL); /* check_frame saw the body end with '\n' */
	size_t n = (size_t)(nl - p);
	*too_long = n >= out_size;
	if (!*too_long) {
		memcpy(out, p, n);
		out[n] = '\0';
	}
	*cursor = nl + 1;
	return out;
}

/* Parses the header lines and the alarm lines of body into recs (capacity
 * FG_ALARMS_MAX). Returns the record count or a negative errno. */
static int parse_body(const struct loader *ld, const char *body, struct record *recs,
		      int64_t *saved_t_ms)
{
	char line[FG_NAME_MAX + 160];
	const char *cur = body;
	bool too_long = false;
	unsigned line_no = 1, count = 0, n = 0;
	next_line(&cur, line, sizeof line, &too_long); /* the version line, checked */
	line_no++;
	if (next_line(&cur, line, sizeof line, &too_long) == NULL || too_long ||
	    sscanf(line, "saved_t_ms %" SCNd64, saved_t_ms) != 1)
		return fail(ld, -EBADMSG, line_no, "corrupt: expected saved_t_ms");
	line_no++;
	if (next_line(&cur, line, sizeof line, &too_long) == NULL || too_long ||
	    sscanf(line, "count %u", &count) != 1 || count > FG_ALARMS_MAX)
		return fail(ld, -EBADMSG, line_no, "corrupt: expected count (at most 192)");
	while (next_line(&cur, line, sizeof line, &too_long) != NULL) {
		line_no++;
		if (too_long || n >= count || parse_alarm(line, &recs[n]) != 0)
			return fail(ld, -EBADMSG, line_no, "corrupt: bad alarm line");
		struct alarm scratch;
		memset(&scratch, 0, sizeof scratch);
		if (!apply_record(&scratch, &recs[n]))
			return fail(ld, -EBADMSG, line_no, "corrupt: inconsistent alarm state");
		for (unsigned k = 0; k < n; k++)
			if (strcmp(recs[k].name, recs[n].name) == 0)
				return fail(ld, -EBADMSG, line_no, "corrupt: duplicate alarm name");
		n++;
	}
	if (n != count)
		return fail(ld, -EBADMSG, line_no, "truncated: fewer alarm lines than count");
	return (int)n;
}

/* Restores the parsed records into the matching alarms. */
static unsigned restore(struct alarm *alarms, unsigned count, const struct record *recs,
			unsigned rec_count, struct alarmstate_info *info, const struct loader *ld)
{
	unsigned restored = 0;
	for (unsigned r = 0; r < rec_count; r++) {
		struct alarm *a = NULL;
		for (unsigned i = 0; i < count && a == NULL; i++)
			if (strcmp(alarms[i].cfg.name, recs[r].name) == 0)
				a = &alarms[i];
		if (a == NULL) {
			if (info->unknown_count++ == 0 && ld->err_size > 0)
				snprintf(ld->err, ld->err_size, "%s: skipped unknown alarm \"%s\"",
					 ld->path, recs[r].name);
			continue;
		}
		bool ok = apply_record(a, &recs[r]);
		/* Paired assertion, second half: the validated record gave a
		 * consistent alarm with a valid state. */
		assert(ok);
		assert((unsigned)a->state < ALARM_STATE_COUNT);
		(void)ok;
		restored++;
	}
	return restored;
}

int alarmstate_load_info(const char *path, struct alarm *alarms, unsigned count,
			 struct alarmstate_info *info, char *err, size_t err_size)
{
	assert(path != NULL);
	assert(alarms != NULL || count == 0);
	assert(err != NULL || err_size == 0);
	struct loader ld = {.path = path, .err = err, .err_size = err_size};
	struct alarmstate_info local = {0};
	if (err_size > 0)
		err[0] = '\0';
	for (unsigned i = 0; i < count; i++)
		assert(alarm_is_consistent(&alarms[i]));
	char *buf = NULL;
	size_t len = 0, body_len = 0;
	int rc = read_file(&ld, &buf, &len);
	if (rc == 1) {
		if (info != NULL)
			*info = local;
		return 0; /* no file: first start */
	}
	if (rc < 0)
		return rc;
	struct record *recs = NULL;
	rc = check_frame(&ld, buf, len, &body_len);
	if (rc == 0) {
		buf[body_len] = '\0';
		recs = calloc(FG_ALARMS_MAX, sizeof *recs);
		rc = recs == NULL ? fail(&ld, -ENOMEM, 0, "out of memory")
				  : parse_body(&ld, buf, recs, &local.saved_t_ms);
	}
	if (rc >= 0) {
		local.file_found = true;
		local.record_count = (unsigned)rc;
		local.restored_count = restore(alarms, count, recs, local.record_count, &local, &ld);
		rc = (int)local.restored_count;
		if (info != NULL)
			*info = local;
	}
	free(recs);
	free(buf);
	return rc;
}

int alarmstate_load(const char *path, struct alarm *alarms, unsigned count, char *err,
		    size_t err_size)
{
	return alarmstate_load_info(path, alarms, count, NULL, err, err_size);
}
