/*
 * command.h - operator commands received on PREFIX/cmd, and their replies.
 *
 * A command is one JSON object:
 *   {"op":"ack",      "alarm":"NAME"}
 *   {"op":"shelve",   "alarm":"NAME", "duration_s":N}     0 < N <= 86400
 *   {"op":"unshelve", "alarm":"NAME"}
 * with an optional "id" (a string or a number) that the reply echoes, so a
 * client that sends several commands can match the answers, and an optional
 * "t" (ISO 8601, UTC or with an offset): when the sender sent it. A command
 * whose t is older than [mqtt] cmd_max_age_s is refused (command_check_age). Members other
 * than op, alarm, duration_s, id and t are ignored (room for later additions);
 * a member given twice is refused, because cJSON would silently use the
 * first and the sender may have meant the second.
 *
 * The reply, published on PREFIX/cmd/reply, is
 *   {"id":..,"op":"ack","alarm":"X","ok":true,"state":"acknowledged"}
 *   {"id":..,"op":"ack","alarm":"X","ok":false,"error":"unknown alarm"}
 * where id, op and alarm appear only when the command got far enough to
 * have them (a payload that is not JSON has none of them).
 *
 * Pure: no MQTT, no clock, no I/O. command_parse allocates (cJSON builds a
 * tree), which is fine: commands arrive at human pace, outside the
 * per-sample path.
 */
#ifndef COMMAND_H
#define COMMAND_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include "fg_limits.h"

enum command_op {
	COMMAND_OP_NONE,     /* not (yet) known: parse failed before the op */
	COMMAND_OP_ACK,      /* acknowledge the alarm */
	COMMAND_OP_SHELVE,   /* shelve it for duration_s */
	COMMAND_OP_UNSHELVE, /* end a shelve early */
	COMMAND_OP_COUNT
};

enum command_id_kind {
	COMMAND_ID_NONE,   /* no "id" member */
	COMMAND_ID_STRING, /* id holds the string, unescaped */
	COMMAND_ID_NUMBER, /* id holds the number as JSON text */
};

/* Longest id, bytes including the NUL. An id is a correlation tag (a
 * counter, a UUID of 36 characters), not a message. */
#define COMMAND_ID_MAX 64

/* Longest shelve, s. Shelving must be time-limited (ISA-18.2); one day is
 * our limit, the same as ALARM_SHELVE_MAX_S in alarm.h. */
#define COMMAND_SHELVE_MAX_S 86400.0

/* Longest reason text written to err by command_parse, bytes with the NUL. */
#define COMMAND_ERR_MAX 64

struct command {
	enum command_op op;
	char alarm[FG_NAME_MAX];     /* alarm name, "" until parsed */
	double duration_s;           /* shelve: duration, s, 0 < d <= COMMAND_SHELVE_MAX_S;
					0 for other ops */
	enum command_id_kind id_kind;
	char id[COMMAND_ID_MAX];     /* see enum command_id_kind; "" when none */
	bool has_t;                  /* "t" given */
	int64_t t_ms;                /* "t": when the sender sent it, ms since the epoch (UTC) */
};

/*
 * Parses len bytes of payload (need not be NUL-terminated; an MQTT payload
 * is not). Only whitespace may follow the JSON value. Returns 0 with *out
 * filled, or -EINVAL with a short reason in err (always NUL-terminated when
 * err_size > 0; err may be NULL). On failure *out holds what was parsed
 * before the fault (id, op, alarm as far as known), so the reply can still
 * echo the id; fields not reached are NONE / "".
 * Refused: a NUL byte or \u0000 escape anywhere (cJSON would cut a string
 * short there), malformed JSON, trailing characters, a non-object, a
 * missing or non-string or unknown op, a missing, non-string, empty or
 * too long (>= FG_NAME_MAX bytes) alarm, an alarm name with control
 * characters, a missing, non-number or out-of-range duration_s for shelve,
 * an id that is neither string nor finite number or is too long, and a
 * duplicated member.
 */
int command_parse(const char *payload, size_t len, struct command *out, char *err,
		  size_t err_size);

/*
 * Refuses a command older than max_age_s at now_ms (or as far in the
 * future: a sender's clock that wrong cannot date anything). A command
 * without t passes. Returns 0 or -ETIMEDOUT with the reason in err.
 */
int command_check_age(const struct command *c, int64_t now_ms, double max_age_s, char *err,
		      size_t err_size);

/*
 * Writes the reply to c into buf (NUL-terminated). c may be NULL (nothing
 * was parsed). alarm_state, when ok and not NULL, becomes "state"; error
 * must be given when !ok and becomes "error"; both are JSON-escaped, as are
 * the id and the alarm name. Returns the length without the NUL, or -ENOSPC
 * when it did not fit (buf then holds "" when size > 0).
 */
int command_reply_json(const struct command *c, bool ok, const char *error,
		       const char *alarm_state, char *buf, size_t size);

/*
 * Copies len bytes of payload into out as one printable ASCII line for the
 * log: bytes outside 0x20..0x7e become \xNN and a backslash becomes two, so
 * a payload cannot end a log line, forge another or send terminal escapes.
 * Cut with "..." to fit out_size (>= 8). Returns the length written.
 */
size_t command_log_escape(const char *payload, size_t len, char *out, size_t out_size);

/* "ack", "shelve", "unshelve", or "" for COMMAND_OP_NONE. Static. */
const char *command_op_name(enum command_op op);

#endif
