/*
 * command.c - parse operator commands and format their replies (command.h).
 *
 * Parsing follows the cJSON 1.7.15 notes (shared/notes/libraries.md, 5):
 * cJSON_ParseWithLengthOpts with require_null_terminated = 0, then only
 * whitespace may follow the end pointer (cJSON_Parse would accept trailing
 * garbage); members are looked up case-sensitively, and every type is
 * checked before a value is read. The reply is written with snprintf into
 * the caller's buffer, no tree.
 */
#include "command.h"

#include <assert.h>
#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdint.h>
#include <stdio.h>
#include <string.h>

#include <cJSON.h>

#include "timefmt.h"

static const char *const op_names[COMMAND_OP_COUNT] = {
	[COMMAND_OP_NONE] = "",
	[COMMAND_OP_ACK] = "ack",
	[COMMAND_OP_SHELVE] = "shelve",
	[COMMAND_OP_UNSHELVE] = "unshelve",
};

const char *command_op_name(enum command_op op)
{
	if ((unsigned)op >= COMMAND_OP_COUNT)
		return "";
	return op_names[op];
}

static int fail(char *err, size_t err_size, const char *why)
{
	if (err != NULL && err_size > 0)
		snprintf(err, err_size, "%s", why);
	return -EINVAL;
}

static bool is_json_space(char ch)
{
	return ch == ' ' || ch == '\t' || ch == '\n' || ch == '\r';
}

/* A raw NUL, or a \u0000 escape that is not itself an escaped backslash
 * followed by "u0000". cJSON stores strings NUL-terminated, so either would
 * silently shorten a name ("HX\u0000Y" would act on "HX"). */
static bool has_nul(const char *p, size_t len)
{
	if (memchr(p, '\0', len) != NULL)
		return true;
	for (size_t i = 0; i + 6 <= len; i++) {
		if (p[i] != '\\' || memcmp(p + i + 1, "u0000", 5) != 0)
			continue;
		size_t run = 0; /* backslashes before this one */
		while (run < i && p[i - 1 - run] == '\\')
			run++;
		if (run % 2 == 0)
			return true;
	}
	return false;
}

/* Refuses a member given more than once (cJSON keeps both and returns the first). */
static bool has_duplicate(const cJSON *obj)
{
	static const char *const keys[] = {"op", "alarm", "duration_s", "id", "t"};
	for (size_t k = 0; k < sizeof keys / sizeof keys[0]; k++) {
		unsigned seen = 0;
		for (const cJSON *it = obj->child; it != NULL; it = it->next)
			if (it->string != NULL && strcmp(it->string, keys[k]) == 0)
				seen++;
		if (seen > 1)
			return true;
	}
	return false;
}

/* Copies the id. Numbers are re-printed: integers exactly (up to 2^53, the
 * range a double holds exactly), others with 17 significant digits. */
static const char *take_id(const cJSON *id, struct command *out)
{
	if (id == NULL)
		return NULL;
	if (cJSON_IsString(id) && id->valuestring != NULL) {
		size_t n = strlen(id->valuestring);
		if (n >= sizeof out->id)
			return "id too long";
		memcpy(out->id, id->valuestring, n + 1);
		out->id_kind = COMMAND_ID_STRING;
		return NULL;
	}
	if (!cJSON_IsNumber(id) || !isfinite(id->valuedouble))
		return "id must be a string or a number";
	double v = id->valuedouble;
	if (v == trunc(v) && fabs(v) <= 9007199254740992.0)
		snprintf(out->id, sizeof out->id, "%.0f", v);
	else
		snprintf(out->id, sizeof out->id, "%.17g", v);
	out->id_kind = COMMAND_ID_NUMBER;
	return NULL;
}

static const char *take_op(const cJSON *op, struct command *out)
{
	if (op == NULL)
		return "missing op";
	if (!cJSON_IsString(op) || op->valuestring == NULL)
		return "op must be a string";
	for (unsigned i = COMMAND_OP_NONE + 1; i < COMMAND_OP_COUNT; i++) {
		if (strcmp(op->valuestring, op_names[i]) == 0) {
			out->op = (enum command_op)i;
			return NULL;
		}
	}
	return "unknown op";
}

static const char *take_alarm(const cJSON *alarm, struct command *out)
{
	if (alarm == NULL)
		return "missing alarm";
	if (!cJSON_IsString(alarm) || alarm->valuestring == NULL)
		return "alarm must be a string";
	const char *s = alarm->valuestring;
	size_t n = strlen(s);
	if (n == 0)
		return "alarm is empty";
	if (n >= sizeof out->alarm)
		return "alarm name too long";
	for (size_t i = 0; i < n; i++)
		if ((unsigned char)s[i] < 0x20 || s[i] == 0x7f)
			return "alarm name has control characters";
	memcpy(out->alarm, s, n + 1);
	return NULL;
}

static const char *take_duration(const cJSON *d, struct command *out)
{
	if (d == NULL)
		return "missing duration_s";
	if (!cJSON_IsNumber(d))
		return "duration_s must be a number";
	/* !(a && b) also refuses NaN; 1e999 parses as inf and is refused too. */
	if (!(d->valuedouble > 0.0 && d->valuedouble <= COMMAND_SHELVE_MAX_S))
		return "duration_s must be > 0 and <= 86400";
	out->duration_s = d->valuedouble;
	return NULL;
}

/* The sender's time of the command: an ISO 8601 string (UTC, or with an
 * offset that is applied). */
static const char *take_time(const cJSON *t, struct command *out)
{
	if (t == NULL)
		return NULL;
	if (!cJSON_IsString(t) || t->valuestring == NULL)
		return "t must be an ISO 8601 time string";
	const char *s = t->valuestring;
	/* timefmt also reads epoch seconds; a command's t is ISO 8601 only. */
	if (strchr(s, '-') == NULL || strchr(s, ':') == NULL ||
	    timefmt_parse(s, strlen(s), &out->t_ms) != 0)
		return "t is not an ISO 8601 time (e.g. 2026-03-04T05:06:07Z)";
	out->has_t = true;
	return NULL;
}

int command_check_age(const struct command *c, int64_t now_ms, double max_age_s, char *err,
		      size_t err_size)
{
	assert(c != NULL);
	if (!c->has_t)
		return 0;
	double age_s = (double)(now_ms - c->t_ms) / 1000.0;
	if (age_s > max_age_s) {
		if (err != NULL && err_size > 0)
			snprintf(err, err_size, "too old: sent %.0f s ago, cmd_max_age_s is %.0f s",
				 age_s, max_age_s);
		return -ETIMEDOUT;
	}
	if (-age_s > max_age_s) {
		if (err != NULL && err_size > 0)
			snprintf(err, err_size, "t is %.0f s in the future: check the sender's clock",
				 -age_s);
		return -ETIMEDOUT;
	}
	return 0;
}

/* Reads the members of a parsed object into out; returns the reason or NULL. */
static const char *take_members(const cJSON *root, struct command *out)
{
	const char *why;

	assert(root != NULL);
	if (!cJSON_IsObject(root))
		return "command must be a JSON object";
	if (has_duplicate(root))
		return "duplicate member";
	why = take_id(cJSON_GetObjectItemCaseSensitive(root, "id"), out);
	if (why == NULL)
		why = take_op(cJSON_GetObjectItemCaseSensitive(root, "op"), out);
	if (why == NULL)
		why = take_time(cJSON_GetObjectItemCaseSensitive(root, "t"), out);
	if (why == NULL)
		why = take_alarm(cJSON_GetObjectItemCaseSensitive(root, "alarm"), out);
	if (why == NULL && out->op == COMMAND_OP_SHELVE)
		why = take_duration(cJSON_GetObjectItemCaseSensitive(root, "duration_s"), out);
	return why;
}

int command_parse(const char *payload, size_t len, struct command *out, char *err,
		  size_t err_size)
{
	assert(out != NULL);
	assert(payload != NULL || len == 0);
	memset(out, 0, sizeof *out);
	out->op = COMMAND_OP_NONE;
	out->id_kind = COMMAND_ID_NONE;
	if (err != NULL && err_size > 0)
		err[0] = '\0';
	if (len == 0)
		return fail(err, err_size, "empty payload");
	if (has_nul(payload, len))
		return fail(err, err_size, "NUL character in payload");

	const char *end = NULL;
	cJSON *root = cJSON_ParseWithLengthOpts(payload, len, &end, 0);
	if (root == NULL)
		return fail(err, err_size, "malformed JSON");
	assert(end != NULL);
	assert(end >= payload);
	for (size_t i = (size_t)(end - payload); i < len; i++) {
		if (!is_json_space(payload[i])) {
			cJSON_Delete(root);
			return fail(err, err_size, "trailing characters after the JSON object");
		}
	}
	const char *why = take_members(root, out);
	cJSON_Delete(root);
	if (why != NULL)
		return fail(err, err_size, why);
	assert(out->op != COMMAND_OP_NONE);
	assert(out->alarm[0] != '\0');
	return 0;
}

/* ---- reply -------------------------------------------------------------- */

struct outbuf {
	char *buf;
	size_t size;
	size_t len;
	bool overflow;
};

static void put(struct outbuf *o, const char *fmt, ...) __attribute__((format(printf, 2, 3)));
static void put(struct outbuf *o, const char *fmt, ...)
{
	if (o->overflow)
		return;
	va_list ap;
	va_start(ap, fmt);
	int n = vsnprintf(o->buf + o->len, o->size - o->len, fmt, ap);
	va_end(ap);
	if (n < 0 || (size_t)n >= o->size - o->len) {
		o->overflow = true;
		return;
	}
	o->len += (size_t)n;
}

/* A JSON string: quote, backslash and control characters escaped (RFC 8259,
 * section 7); other bytes, UTF-8 included, pass through. */
static void put_string(struct outbuf *o, const char *s)
{
	put(o, "\"");
	for (const unsigned char *p = (const unsigned char *)s; *p != '\0'; p++) {
		switch (*p) {
		case '"': put(o, "\\\""); break;
		case '\\': put(o, "\\\\"); break;
		case '\n': put(o, "\\n"); break;
		case '\r': put(o, "\\r"); break;
		case '\t': put(o, "\\t"); break;
		default:
			if (*p < 0x20 || *p == 0x7f)
				put(o, "\\u%04x", (unsigned)*p);
			else
				put(o, "%c", (char)*p);
		}
	}
	put(o, "\"");
}

static void put_command(struct outbuf *o, const struct command *c)
{
	if (c == NULL)
		return;
	if (c->id_kind == COMMAND_ID_STRING) {
		put(o, "\"id\":");
		put_string(o, c->id);
		put(o, ",");
	} else if (c->id_kind == COMMAND_ID_NUMBER) {
		put(o, "\"id\":%s,", c->id); /* already JSON number text (take_id) */
	}
	if (c->op != COMMAND_OP_NONE && (unsigned)c->op < COMMAND_OP_COUNT)
		put(o, "\"op\":\"%s\",", op_names[c->op]);
	if (memchr(c->alarm, '\0', sizeof c->alarm) != NULL && c->alarm[0] != '\0') {
		put(o, "\"alarm\":");
		put_string(o, c->alarm);
		put(o, ",");
	}
}

int command_reply_json(const struct command *c, bool ok, const char *error,
		       const char *alarm_state, char *buf, size_t size)
{
	assert(buf != NULL || size == 0);
	assert(ok || error != NULL);
	struct outbuf o = {.buf = buf, .size = size, .len = 0, .overflow = size == 0};

	put(&o, "{");
	put_command(&o, c);
	put(&o, "\"ok\":%s", ok ? "true" : "false");
	if (ok && alarm_state != NULL) {
		put(&o, ",\"state\":");
		put_string(&o, alarm_state);
	}
	if (!ok) {
		put(&o, ",\"error\":");
		put_string(&o, error);
	}
	put(&o, "}");
	if (o.overflow) {
		if (size > 0)
			buf[0] = '\0';
		return -ENOSPC;
	}
	assert(o.len < size);
	return (int)o.len;
}

size_t command_log_escape(const char *payload, size_t len, char *out, size_t out_size)
{
	assert(out != NULL);
	assert(out_size >= 8);
	assert(payload != NULL || len == 0);
	static const char hex[] = "0123456789abcdef";
	size_t o = 0;
	for (size_t i = 0; i < len; i++) {
		unsigned char ch = (unsigned char)payload[i];
		bool plain = ch >= 0x20 && ch < 0x7f && ch != '\\';
		size_t need = plain ? 1 : (ch == '\\' ? 2 : 4);
		if (o + need + 4 > out_size) { /* room for "..." and the NUL */
			memcpy(out + o, "...", 4);
			return o + 3;
		}
		if (plain) {
			out[o++] = (char)ch;
		} else if (ch == '\\') {
			out[o++] = '\\';
			out[o++] = '\\';
		} else {
			out[o++] = '\\';
			out[o++] = 'x';
			out[o++] = hex[ch >> 4];
			out[o++] = hex[ch & 15];
		}
	}
	out[o] = '\0';
	return o;
}
