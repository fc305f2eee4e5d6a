/*
 * test_command.c - unit tests of monitor/command.c, one behaviour each.
 *
 * Where the expected values come from:
 * - The command grammar (ops, members, 0 < duration_s <= 86400): DESIGN.md
 *   and command.h; the one-day shelve limit is ours (alarm.h).
 * - JSON syntax and string escaping: RFC 8259, sections 2 and 7 (from memory):
 *   '"', '\\' and the control characters U+0000..U+001F must be escaped.
 * - Reply bytes are compared exactly with hand-written strings, and every
 *   reply is also read back with cJSON 1.7.15 (Debian 12), a parser we did not
 *   write, so an escaping slip that happens to match our own expectation still
 *   fails there.
 * No floating-point tolerance is needed: durations and ids used here are exact
 * in binary (integers and 0.5).
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <string.h>

#include <cJSON.h>

#include "command.h"

static int parse(const char *s, struct command *c, char *err, size_t err_size)
{
	return command_parse(s, strlen(s), c, err, err_size);
}

/* Expects -EINVAL and a reason containing want. */
static void expect_refused(const char *payload, const char *want)
{
	struct command c;
	char err[COMMAND_ERR_MAX];
	int rc = parse(payload, &c, err, sizeof err);
	if (rc != -EINVAL || strstr(err, want) == NULL)
		print_error("payload %s: rc %d, err '%s', wanted '%s'\n", payload, rc, err, want);
	assert_int_equal(rc, -EINVAL);
	assert_non_null(strstr(err, want));
}

/* ---- each op ------------------------------------------------------------ */

static void test_ack_is_parsed(void **state)
{
	(void)state;
	struct command c;
	char err[COMMAND_ERR_MAX];
	assert_int_equal(parse("{\"op\":\"ack\",\"alarm\":\"C201_FLOOD_HI\"}", &c, err, sizeof err), 0);
	assert_int_equal(c.op, COMMAND_OP_ACK);
	assert_string_equal(c.alarm, "C201_FLOOD_HI");
	assert_int_equal(c.id_kind, COMMAND_ID_NONE);
	assert_string_equal(c.id, "");
	assert_true(c.duration_s == 0.0);
	assert_string_equal(err, "");
}

static void test_shelve_is_parsed_with_duration(void **state)
{
	(void)state;
	struct command c;
	assert_int_equal(parse(" {\"op\":\"shelve\",\"alarm\":\"W1\",\"duration_s\":3600.5}\n",
			       &c, NULL, 0), 0);
	assert_int_equal(c.op, COMMAND_OP_SHELVE);
	assert_string_equal(c.alarm, "W1");
	assert_true(c.duration_s == 3600.5);
}

static void test_shelve_accepts_the_one_day_limit(void **state)
{
	(void)state;
	struct command c;
	assert_int_equal(parse("{\"op\":\"shelve\",\"alarm\":\"W1\",\"duration_s\":86400}",
			       &c, NULL, 0), 0);
	assert_true(c.duration_s == 86400.0);
}

static void test_unshelve_is_parsed(void **state)
{
	(void)state;
	struct command c;
	assert_int_equal(parse("{\"alarm\":\"T3_WEEP_LO\",\"op\":\"unshelve\"}", &c, NULL, 0), 0);
	assert_int_equal(c.op, COMMAND_OP_UNSHELVE);
	assert_string_equal(c.alarm, "T3_WEEP_LO");
}

static void test_string_id_is_kept(void **state)
{
	(void)state;
	struct command c;
	assert_int_equal(parse("{\"id\":\"req-7\",\"op\":\"ack\",\"alarm\":\"A\"}", &c, NULL, 0), 0);
	assert_int_equal(c.id_kind, COMMAND_ID_STRING);
	assert_string_equal(c.id, "req-7");
}

static void test_number_id_is_kept_as_json_text(void **state)
{
	(void)state;
	struct command c;
	assert_int_equal(parse("{\"id\":42,\"op\":\"ack\",\"alarm\":\"A\"}", &c, NULL, 0), 0);
	assert_int_equal(c.id_kind, COMMAND_ID_NUMBER);
	assert_string_equal(c.id, "42");
	assert_int_equal(parse("{\"id\":-2.5,\"op\":\"ack\",\"alarm\":\"A\"}", &c, NULL, 0), 0);
	assert_string_equal(c.id, "-2.5");
}

static void test_unknown_members_are_ignored(void **state)
{
	(void)state;
	struct command c;
	assert_int_equal(parse("{\"op\":\"ack\",\"alarm\":\"A\",\"by\":\"console 2\",\"x\":[1]}",
			       &c, NULL, 0), 0);
	assert_int_equal(c.op, COMMAND_OP_ACK);
}

static void test_payload_without_nul_terminator_is_parsed(void **state)
{
	(void)state;
	/* An MQTT payload has no NUL: parse exactly len bytes of a longer buffer. */
	const char buf[] = "{\"op\":\"ack\",\"alarm\":\"A\"}XXXX";
	struct command c;
	assert_int_equal(command_parse(buf, strlen(buf) - 4, &c, NULL, 0), 0);
	assert_string_equal(c.alarm, "A");
}

static void test_escaped_alarm_name_is_unescaped(void **state)
{
	(void)state;
	struct command c;
	assert_int_equal(parse("{\"op\":\"ack\",\"alarm\":\"A\\\"B\\u0041\"}", &c, NULL, 0), 0);
	assert_string_equal(c.alarm, "A\"BA");
}

static void test_longest_alarm_name_fits(void **state)
{
	(void)state;
	char name[FG_NAME_MAX];
	char payload[256];
	memset(name, 'N', sizeof name - 1);
	name[sizeof name - 1] = '\0';
	snprintf(payload, sizeof payload, "{\"op\":\"ack\",\"alarm\":\"%s\"}", name);
	struct command c;
	assert_int_equal(parse(payload, &c, NULL, 0), 0);
	assert_string_equal(c.alarm, name);
}

/* ---- malformed payloads ------------------------------------------------- */

static void test_malformed_json_is_refused(void **state)
{
	(void)state;
	expect_refused("{\"op\":\"ack\",\"alarm\":\"A\"", "malformed");
	expect_refused("{\"op\":\"ack\",\"alarm\":\"A\",}", "malformed");
	expect_refused("{'op':'ack'}", "malformed");
	expect_refused("ack A", "malformed");
	expect_refused("   ", "malformed");
}

static void test_empty_payload_is_refused(void **state)
{
	(void)state;
	struct command c;
	char err[COMMAND_ERR_MAX];
	assert_int_equal(command_parse("", 0, &c, err, sizeof err), -EINVAL);
	assert_string_equal(err, "empty payload");
}

static void test_trailing_garbage_is_refused(void **state)
{
	(void)state;
	expect_refused("{\"op\":\"ack\",\"alarm\":\"A\"} xyz", "trailing");
	expect_refused("{\"op\":\"ack\",\"alarm\":\"A\"}{}", "trailing");
}

static void test_trailing_whitespace_is_accepted(void **state)
{
	(void)state;
	struct command c;
	assert_int_equal(parse("{\"op\":\"ack\",\"alarm\":\"A\"} \t\r\n", &c, NULL, 0), 0);
}

static void test_non_object_is_refused(void **state)
{
	(void)state;
	expect_refused("[\"ack\",\"A\"]", "object");
	expect_refused("\"ack\"", "object");
	expect_refused("42", "object");
	expect_refused("null", "object");
}

static void test_missing_op_is_refused(void **state)
{
	(void)state;
	expect_refused("{\"alarm\":\"A\"}", "missing op");
}

static void test_unknown_op_is_refused(void **state)
{
	(void)state;
	expect_refused("{\"op\":\"reset\",\"alarm\":\"A\"}", "unknown op");
	expect_refused("{\"op\":\"ACK\",\"alarm\":\"A\"}", "unknown op"); /* case matters */
	expect_refused("{\"Op\":\"ack\",\"alarm\":\"A\"}", "missing op");
}

static void test_op_of_wrong_type_is_refused(void **state)
{
	(void)state;
	expect_refused("{\"op\":1,\"alarm\":\"A\"}", "op must be a string");
	expect_refused("{\"op\":null,\"alarm\":\"A\"}", "op must be a string");
}

static void test_missing_alarm_is_refused(void **state)
{
	(void)state;
	expect_refused("{\"op\":\"ack\"}", "missing alarm");
	expect_refused("{\"op\":\"ack\",\"Alarm\":\"A\"}", "missing alarm");
}

static void test_alarm_of_wrong_type_is_refused(void **state)
{
	(void)state;
	expect_refused("{\"op\":\"ack\",\"alarm\":7}", "alarm must be a string");
	expect_refused("{\"op\":\"ack\",\"alarm\":[\"A\"]}", "alarm must be a string");
	expect_refused("{\"op\":\"ack\",\"alarm\":true}", "alarm must be a string");
}

static void test_empty_alarm_is_refused(void **state)
{
	(void)state;
	expect_refused("{\"op\":\"ack\",\"alarm\":\"\"}", "empty");
}

static void test_oversize_alarm_name_is_refused(void **state)
{
	(void)state;
	char name[FG_NAME_MAX + 1];
	char payload[256];
	memset(name, 'N', sizeof name - 1); /* FG_NAME_MAX characters: no room for the NUL */
	name[sizeof name - 1] = '\0';
	snprintf(payload, sizeof payload, "{\"op\":\"ack\",\"alarm\":\"%s\"}", name);
	struct command c;
	char err[COMMAND_ERR_MAX];
	assert_int_equal(parse(payload, &c, err, sizeof err), -EINVAL);
	assert_string_equal(err, "alarm name too long");
	assert_string_equal(c.alarm, ""); /* never truncated into the field */
}

static void test_alarm_with_control_character_is_refused(void **state)
{
	(void)state;
	expect_refused("{\"op\":\"ack\",\"alarm\":\"A\\nB\"}", "control");
}

static void test_nul_in_payload_is_refused(void **state)
{
	(void)state;
	/* Escaped: cJSON would store "HX" and act on another alarm. */
	expect_refused("{\"op\":\"ack\",\"alarm\":\"HX\\u0000Y\"}", "NUL");
	/* Raw NUL byte inside len. */
	const char raw[] = "{\"op\":\"ack\",\"alarm\":\"HX\0Y\"}";
	struct command c;
	char err[COMMAND_ERR_MAX];
	assert_int_equal(command_parse(raw, sizeof raw - 1, &c, err, sizeof err), -EINVAL);
	assert_non_null(strstr(err, "NUL"));
}

static void test_escaped_backslash_before_u0000_text_is_accepted(void **state)
{
	(void)state;
	/* JSON "A\\u0000" is the 7 characters A \ u 0 0 0 0, not a NUL. */
	struct command c;
	assert_int_equal(parse("{\"op\":\"ack\",\"alarm\":\"A\\\\u0000\"}", &c, NULL, 0), 0);
	assert_string_equal(c.alarm, "A\\u0000");
}

static void test_shelve_without_duration_is_refused(void **state)
{
	(void)state;
	expect_refused("{\"op\":\"shelve\",\"alarm\":\"A\"}", "missing duration_s");
}

static void test_shelve_duration_of_wrong_type_is_refused(void **state)
{
	(void)state;
	expect_refused("{\"op\":\"shelve\",\"alarm\":\"A\",\"duration_s\":\"600\"}", "number");
	expect_refused("{\"op\":\"shelve\",\"alarm\":\"A\",\"duration_s\":null}", "number");
}

static void test_shelve_duration_out_of_range_is_refused(void **state)
{
	(void)state;
	expect_refused("{\"op\":\"shelve\",\"alarm\":\"A\",\"duration_s\":0}", "> 0");
	expect_refused("{\"op\":\"shelve\",\"alarm\":\"A\",\"duration_s\":-5}", "> 0");
	expect_refused("{\"op\":\"shelve\",\"alarm\":\"A\",\"duration_s\":86400.001}", "<= 86400");
	expect_refused("{\"op\":\"shelve\",\"alarm\":\"A\",\"duration_s\":1e999}", "<= 86400");
}

static void test_bad_id_is_refused(void **state)
{
	(void)state;
	expect_refused("{\"id\":[1],\"op\":\"ack\",\"alarm\":\"A\"}", "id must be");
	expect_refused("{\"id\":true,\"op\":\"ack\",\"alarm\":\"A\"}", "id must be");
	expect_refused("{\"id\":1e999,\"op\":\"ack\",\"alarm\":\"A\"}", "id must be");
	char id[COMMAND_ID_MAX + 1];
	char payload[256];
	memset(id, 'i', sizeof id - 1);
	id[sizeof id - 1] = '\0';
	snprintf(payload, sizeof payload, "{\"id\":\"%s\",\"op\":\"ack\",\"alarm\":\"A\"}", id);
	expect_refused(payload, "id too long");
}

static void test_duplicate_member_is_refused(void **state)
{
	(void)state;
	expect_refused("{\"op\":\"ack\",\"alarm\":\"A\",\"alarm\":\"B\"}", "duplicate");
	expect_refused("{\"op\":\"unshelve\",\"op\":\"ack\",\"alarm\":\"A\"}", "duplicate");
}

static void test_failed_parse_keeps_the_id_for_the_reply(void **state)
{
	(void)state;
	struct command c;
	char err[COMMAND_ERR_MAX];
	assert_int_equal(parse("{\"id\":9,\"op\":\"shelve\",\"alarm\":\"A\"}", &c, err, sizeof err),
			 -EINVAL);
	assert_int_equal(c.id_kind, COMMAND_ID_NUMBER);
	assert_string_equal(c.id, "9");
	assert_int_equal(c.op, COMMAND_OP_SHELVE);
	assert_string_equal(c.alarm, "A");
}

static void test_short_error_buffer_is_terminated(void **state)
{
	(void)state;
	struct command c;
	char err[5];
	memset(err, 'x', sizeof err);
	assert_int_equal(parse("{}", &c, err, sizeof err), -EINVAL);
	assert_string_equal(err, "miss");
}

/* ---- replies ------------------------------------------------------------ */

/* Reads a reply back with cJSON and checks the members we can name. */
static cJSON *read_back(const char *json)
{
	const char *end = NULL;
	/* require_null_terminated: the NUL must lie inside the length given. */
	cJSON *root = cJSON_ParseWithLengthOpts(json, strlen(json) + 1, &end, 1);
	assert_non_null(root);
	assert_true(cJSON_IsObject(root));
	return root;
}

static void test_ok_reply_has_id_op_alarm_and_state(void **state)
{
	(void)state;
	struct command c;
	char buf[256];
	assert_int_equal(parse("{\"id\":\"r1\",\"op\":\"ack\",\"alarm\":\"C201_FLOOD_HI\"}", &c, NULL, 0),
			 0);
	int n = command_reply_json(&c, true, NULL, "acknowledged", buf, sizeof buf);
	const char *want =
		"{\"id\":\"r1\",\"op\":\"ack\",\"alarm\":\"C201_FLOOD_HI\",\"ok\":true,\"state\":\"acknowledged\"}";
	assert_string_equal(buf, want);
	assert_int_equal(n, (int)strlen(want));
	cJSON *r = read_back(buf);
	assert_true(cJSON_IsTrue(cJSON_GetObjectItemCaseSensitive(r, "ok")));
	assert_string_equal(cJSON_GetObjectItemCaseSensitive(r, "state")->valuestring, "acknowledged");
	cJSON_Delete(r);
}

static void test_error_reply_has_reason_and_no_state(void **state)
{
	(void)state;
	struct command c;
	char buf[256];
	assert_int_equal(parse("{\"id\":5,\"op\":\"shelve\",\"alarm\":\"W1\",\"duration_s\":60}",
			       &c, NULL, 0), 0);
	int n = command_reply_json(&c, false, "unknown alarm", "normal", buf, sizeof buf);
	assert_true(n > 0);
	assert_string_equal(buf, "{\"id\":5,\"op\":\"shelve\",\"alarm\":\"W1\",\"ok\":false,"
				 "\"error\":\"unknown alarm\"}");
	cJSON *r = read_back(buf);
	assert_true(cJSON_GetObjectItemCaseSensitive(r, "id")->valuedouble == 5.0);
	assert_null(cJSON_GetObjectItemCaseSensitive(r, "state"));
	cJSON_Delete(r);
}

static void test_reply_to_unparsable_payload_has_only_ok_and_error(void **state)
{
	(void)state;
	struct command c;
	char err[COMMAND_ERR_MAX];
	char buf[128];
	assert_int_equal(parse("not json", &c, err, sizeof err), -EINVAL);
	assert_true(command_reply_json(&c, false, err, NULL, buf, sizeof buf) > 0);
	assert_string_equal(buf, "{\"ok\":false,\"error\":\"malformed JSON\"}");
	assert_true(command_reply_json(NULL, false, "x", NULL, buf, sizeof buf) > 0);
	assert_string_equal(buf, "{\"ok\":false,\"error\":\"x\"}");
}

static void test_reply_escapes_strings(void **state)
{
	(void)state;
	struct command c;
	char buf[256];
	/* id with quote, backslash, tab and U+0001; alarm with a quote. */
	assert_int_equal(parse("{\"id\":\"a\\\"b\\\\c\\td\\u0001\",\"op\":\"ack\",\"alarm\":\"Q\\\"1\"}",
			       &c, NULL, 0), 0);
	assert_string_equal(c.id, "a\"b\\c\td\x01");
	assert_true(command_reply_json(&c, false, "bad \"x\"\n", NULL, buf, sizeof buf) > 0);
	assert_string_equal(buf, "{\"id\":\"a\\\"b\\\\c\\td\\u0001\",\"op\":\"ack\",\"alarm\":\"Q\\\"1\","
				 "\"ok\":false,\"error\":\"bad \\\"x\\\"\\n\"}");
	cJSON *r = read_back(buf);
	assert_string_equal(cJSON_GetObjectItemCaseSensitive(r, "id")->valuestring, "a\"b\\c\td\x01");
	assert_string_equal(cJSON_GetObjectItemCaseSensitive(r, "alarm")->valuestring, "Q\"1");
	assert_string_equal(cJSON_GetObjectItemCaseSensitive(r, "error")->valuestring, "bad \"x\"\n");
	cJSON_Delete(r);
}

static void test_reply_that_does_not_fit_is_refused(void **state)
{
	(void)state;
	struct command c;
	char buf[128];
	assert_int_equal(parse("{\"op\":\"ack\",\"alarm\":\"C201_FLOOD_HI\"}", &c, NULL, 0), 0);
	int full = command_reply_json(&c, true, NULL, "acknowledged", buf, sizeof buf);
	assert_true(full > 0);
	/* Exactly enough (length + NUL) fits; one byte less does not. */
	char exact[128];
	assert_int_equal(command_reply_json(&c, true, NULL, "acknowledged", exact, (size_t)full + 1), full);
	assert_string_equal(exact, buf);
	assert_int_equal(command_reply_json(&c, true, NULL, "acknowledged", exact, (size_t)full), -ENOSPC);
	assert_string_equal(exact, "");
	assert_int_equal(command_reply_json(&c, true, NULL, "acknowledged", NULL, 0), -ENOSPC);
}

static void test_op_names(void **state)
{
	(void)state;
	assert_string_equal(command_op_name(COMMAND_OP_ACK), "ack");
	assert_string_equal(command_op_name(COMMAND_OP_SHELVE), "shelve");
	assert_string_equal(command_op_name(COMMAND_OP_UNSHELVE), "unshelve");
	assert_string_equal(command_op_name(COMMAND_OP_NONE), "");
	assert_string_equal(command_op_name(COMMAND_OP_COUNT), "");
}

/* 2026-03-04T05:06:07Z in ms since the epoch: 20516 days (date -u -d
 * 2026-03-04 +%s = 1772582400) plus 18367 s. */
#define CMD_T_MS INT64_C(1772600767000)

static void test_time_is_read_and_age_checked(void **state)
{
	struct command c;
	char err[COMMAND_ERR_MAX + 64];
	(void)state;
	assert_int_equal(parse("{\"op\":\"ack\",\"alarm\":\"A\",\"t\":\"2026-03-04T05:06:07Z\"}", &c,
			       err, sizeof err), 0);
	assert_true(c.has_t);
	assert_true(c.t_ms == CMD_T_MS);
	/* 29 s old: carried out; 31 s old: refused with the reason. */
	assert_int_equal(command_check_age(&c, CMD_T_MS + 29000, 30.0, err, sizeof err), 0);
	assert_int_equal(command_check_age(&c, CMD_T_MS + 31000, 30.0, err, sizeof err),
			 -ETIMEDOUT);
	assert_non_null(strstr(err, "too old: sent 31 s ago, cmd_max_age_s is 30 s"));
	/* From a clock far ahead of ours: refused too. */
	assert_int_equal(command_check_age(&c, CMD_T_MS - 60000, 30.0, err, sizeof err),
			 -ETIMEDOUT);
	assert_non_null(strstr(err, "in the future"));
	/* An offset is applied: 07:06:07+02:00 is 05:06:07Z. */
	assert_int_equal(parse("{\"op\":\"ack\",\"alarm\":\"A\",\"t\":\"2026-03-04T07:06:07+02:00\"}",
			       &c, err, sizeof err), 0);
	assert_true(c.t_ms == CMD_T_MS);
}

static void test_command_without_time_passes_the_age_check(void **state)
{
	struct command c;
	char err[COMMAND_ERR_MAX];
	(void)state;
	assert_int_equal(parse("{\"op\":\"ack\",\"alarm\":\"A\"}", &c, err, sizeof err), 0);
	assert_false(c.has_t);
	assert_int_equal(command_check_age(&c, CMD_T_MS, 30.0, err, sizeof err), 0);
}

static void test_bad_time_is_refused(void **state)
{
	(void)state;
	expect_refused("{\"op\":\"ack\",\"alarm\":\"A\",\"t\":12}", "t must be an ISO 8601 time string");
	expect_refused("{\"op\":\"ack\",\"alarm\":\"A\",\"t\":\"1772600767\"}",
		       "t is not an ISO 8601 time (e.g. 2026-03-04T05:06:07Z)");
	expect_refused("{\"op\":\"ack\",\"alarm\":\"A\",\"t\":\"2026-13-04T05:06:07Z\"}",
		       "t is not an ISO 8601 time (e.g. 2026-03-04T05:06:07Z)");
	expect_refused("{\"op\":\"ack\",\"alarm\":\"A\",\"t\":\"2026-03-04T05:06:07Z\","
		       "\"t\":\"2026-03-04T05:06:07Z\"}", "duplicate member");
}

static void test_log_escape_defuses_newlines_and_escapes(void **state)
{
	char out[64];
	(void)state;
	const char in[] = "{\"op\":\"x\"}\n2026 error: forged\x1b[2J\\";
	size_t n = command_log_escape(in, sizeof in - 1, out, sizeof out);
	assert_string_equal(out, "{\"op\":\"x\"}\\x0a2026 error: forged\\x1b[2J\\\\");
	assert_int_equal(n, strlen(out));
	/* Too long: cut with "...", still NUL-terminated within the buffer. */
	char small[16];
	n = command_log_escape("abcdefghijklmnopqrstuvwxyz", 26, small, sizeof small);
	assert_string_equal(small, "abcdefghijkl...");
	assert_int_equal(n, 15);
	/* Bytes above 0x7e are escaped too (no raw UTF-8 or C1 controls). */
	n = command_log_escape("\xc3\xa9\x9b", 3, out, sizeof out);
	assert_string_equal(out, "\\xc3\\xa9\\x9b");
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_ack_is_parsed),
		cmocka_unit_test(test_shelve_is_parsed_with_duration),
		cmocka_unit_test(test_shelve_accepts_the_one_day_limit),
		cmocka_unit_test(test_unshelve_is_parsed),
		cmocka_unit_test(test_string_id_is_kept),
		cmocka_unit_test(test_number_id_is_kept_as_json_text),
		cmocka_unit_test(test_unknown_members_are_ignored),
		cmocka_unit_test(test_payload_without_nul_terminator_is_parsed),
		cmocka_unit_test(test_escaped_alarm_name_is_unescaped),
		cmocka_unit_test(test_longest_alarm_name_fits),
		cmocka_unit_test(test_malformed_json_is_refused),
		cmocka_unit_test(test_empty_payload_is_refused),
		cmocka_unit_test(test_trailing_garbage_is_refused),
		cmocka_unit_test(test_trailing_whitespace_is_accepted),
		cmocka_unit_test(test_non_object_is_refused),
		cmocka_unit_test(test_missing_op_is_refused),
		cmocka_unit_test(test_unknown_op_is_refused),
		cmocka_unit_test(test_op_of_wrong_type_is_refused),
		cmocka_unit_test(test_missing_alarm_is_refused),
		cmocka_unit_test(test_alarm_of_wrong_type_is_refused),
		cmocka_unit_test(test_empty_alarm_is_refused),
		cmocka_unit_test(test_oversize_alarm_name_is_refused),
		cmocka_unit_test(test_alarm_with_control_character_is_refused),
		cmocka_unit_test(test_nul_in_payload_is_refused),
		cmocka_unit_test(test_escaped_backslash_before_u0000_text_is_accepted),
		cmocka_unit_test(test_shelve_without_duration_is_refused),
		cmocka_unit_test(test_shelve_duration_of_wrong_type_is_refused),
		cmocka_unit_test(test_shelve_duration_out_of_range_is_refused),
		cmocka_unit_test(test_bad_id_is_refused),
		cmocka_unit_test(test_duplicate_member_is_refused),
		cmocka_unit_test(test_failed_parse_keeps_the_id_for_the_reply),
		cmocka_unit_test(test_short_error_buffer_is_terminated),
		cmocka_unit_test(test_ok_reply_has_id_op_alarm_and_state),
		cmocka_unit_test(test_error_reply_has_reason_and_no_state),
		cmocka_unit_test(test_reply_to_unparsable_payload_has_only_ok_and_error),
		cmocka_unit_test(test_reply_escapes_strings),
		cmocka_unit_test(test_reply_that_does_not_fit_is_refused),
		cmocka_unit_test(test_op_names),
		cmocka_unit_test(test_time_is_read_and_age_checked),
		cmocka_unit_test(test_command_without_time_passes_the_age_check),
		cmocka_unit_test(test_bad_time_is_refused),
		cmocka_unit_test(test_log_escape_defuses_newlines_and_escapes),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
