/*
 * test_alarmstate.c - unit tests of monitor/alarmstate.c, one behaviour each.
 *
 * Outside checks:
 * - CRC-32: the check value of CRC-32 (IEEE 802.3, "CRC-32/ISO-HDLC" in the
 *   catalogue of parametrised CRC algorithms) for "123456789" is 0xCBF43926
 *   (from memory; confirmed with zlib.crc32 of Debian's /usr/bin/python3);
 * - the fixtures in tests/files/alarmstate/ carry checksums computed by
 *   zlib.crc32 (tests/files/alarmstate/make_fixtures.py), not by our code, so
 *   reading "good.state" also checks our CRC and our reading of the format
 *   against an independent writer.
 * The tests run from the repository root (as tests/run.sh does) and write
 * into a fresh directory under /tmp, removed at the end.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>

#include "alarmstate.h"

#define FIXTURES "tests/files/alarmstate/"
#define T0_MS INT64_C(1767225600000) /* 2026-01-01T00:00:00Z */

static char tmpdir[64];

static int group_setup(void **state)
{
	(void)state;
	if (access(FIXTURES "good.state", R_OK) != 0) {
		fprintf(stderr, "run from the repository root: %sgood.state missing\n", FIXTURES);
		return -1;
	}
	snprintf(tmpdir, sizeof tmpdir, "/tmp/fg_alarmstate_XXXXXX");
	return mkdtemp(tmpdir) == NULL ? -1 : 0;
}

static int group_teardown(void **state)
{
	(void)state;
	static const char *const names[] = {"s", "s.new", "hand"};
	char p[128];
	for (size_t i = 0; i < sizeof names / sizeof names[0]; i++) {
		snprintf(p, sizeof p, "%s/%s", tmpdir, names[i]);
		unlink(p);
	}
	return rmdir(tmpdir) == 0 ? 0 : -1;
}

static const char *tmp_path(const char *name)
{
	static char p[128];
	snprintf(p, sizeof p, "%s/%s", tmpdir, name);
	return p;
}

static void init_alarm(struct alarm *a, const char *name, unsigned index)
{
	struct alarm_cfg c;
	alarm_cfg_defaults(&c);
	snprintf(c.name, sizeof c.name, "%s", name);
	c.kind = ALARM_KIND_HIGH;
	c.field = RF_FLOOD_INDEX;
	c.setpoint = 80.0;
	c.deadband = 2.0;
	alarm_init(a, &c, index);
}

static void feed(struct alarm *a, double v, bool suppressed, double t_s)
{
	struct alarm_input in = {.value = v, .reference = 0.0, .quality = FG_QUALITY_GOOD,
				 .suppressed = suppressed, .diag_reason = NULL};
	struct alarm_event ev;
	alarm_step(a, &in, T0_MS + (int64_t)llround(t_s * 1000.0), &ev);
}

/* Seven alarms, alarms[s] in state s, built through the public API. */
static void alarms_in_every_state(struct alarm *alarms)
{
	static const char *const names[ALARM_STATE_COUNT] = {
		"T1_norm", "T1_unack", "T1_acked", "T1_rtnun", "T1_shlvd", "T1_dsupr", "T1_oosrv"};
	struct alarm_event ev;
	for (int s = 0; s < ALARM_STATE_COUNT; s++) {
		struct alarm *a = &alarms[s];
		init_alarm(a, names[s], (unsigned)s);
		feed(a, 50.0, false, 0);
		if (s != ALARM_STATE_NORM && s != ALARM_STATE_DSUPR && s != ALARM_STATE_OOSRV)
			feed(a, 90.0, false, 1);
		if (s == ALARM_STATE_ACKED)
			alarm_ack(a, T0_MS + 2000, &ev);
		if (s == ALARM_STATE_RTNUN)
			feed(a, 50.0, false, 2);
		if (s == ALARM_STATE_SHLVD)
			alarm_shelve(a, 900.0, T0_MS + 2000, &ev);
		if (s == ALARM_STATE_DSUPR)
			feed(a, 90.0, true, 1);
		if (s == ALARM_STATE_OOSRV)
			alarm_set_out_of_service(a, true, T0_MS + 1000, &ev);
		assert_int_equal(a->state, s);
	}
}

static void assert_same_lifecycle(const struct alarm *got, const struct alarm *want)
{
	assert_string_equal(alarm_state_name(got->state), alarm_state_name(want->state));
	assert_int_equal(got->active, want->active);
	assert_int_equal(got->unacked, want->unacked);
	assert_int_equal(got->shelved, want->shelved);
	assert_true(got->shelve_until_t_ms == want->shelve_until_t_ms);
	assert_int_equal(got->out_of_service, want->out_of_service);
	assert_int_equal(got->suppressed, want->suppressed);
	assert_true(alarm_is_consistent(got));
}

/* Three alarms named as in the fixtures, in another order, plus one the
 * fixtures do not know. */
static void fixture_alarms(struct alarm *a)
{
	init_alarm(&a[0], "T1 dp diag", 0);
	init_alarm(&a[1], "T1_weep_lo", 1);
	init_alarm(&a[2], "T1_new_alarm", 2);
	init_alarm(&a[3], "T1_flood_hi", 3);
}

static void write_text(const char *path, const char *text)
{
	FILE *f = fopen(path, "w");
	assert_non_null(f);
	assert_int_equal(fputs(text, f) >= 0, 1);
	assert_int_equal(fclose(f), 0);
}

/* Writes body plus its correct crc32 line, as our own writer would. */
static void write_framed(const char *path, const char *body)
{
	char text[2048];
	uint32_t crc = alarmstate_crc32(0, body, strlen(body));
	snprintf(text, sizeof text, "%scrc32 0x%08x\n", body, (unsigned)crc);
	write_text(path, text);
}

/* Loads path into fixture alarms; asserts the alarms are untouched and returns rc. */
static int load_expect_untouched(const char *path, char *err, size_t err_size)
{
	struct alarm a[4], before[4];
	fixture_alarms(a);
	memcpy(before, a, sizeof a);
	int rc = alarmstate_load(path, a, 4, err, err_size);
	assert_memory_equal(a, before, sizeof a);
	return rc;
}

/* ---- CRC ------------------------------------------------------------------------ */

static void test_crc32_matches_published_check_value(void **state)
{
	(void)state;
	assert_int_equal(alarmstate_crc32(0, "123456789", 9), 0xCBF43926u);
	uint32_t part = alarmstate_crc32(0, "1234", 4);
	assert_int_equal(alarmstate_crc32(part, "56789", 5), 0xCBF43926u);
	assert_int_equal(alarmstate_crc32(0, "", 0), 0u);
}

/* ---- save ------------------------------------------------------------------------- */

static void test_save_then_load_round_trips_every_state(void **state)
{
	(void)state;
	struct alarm saved[ALARM_STATE_COUNT], loaded[ALARM_STATE_COUNT];
	alarms_in_every_state(saved);
	assert_int_equal(alarmstate_save(tmp_path("s"), saved, ALARM_STATE_COUNT, T0_MS + 5000), 0);
	for (int s = 0; s < ALARM_STATE_COUNT; s++)
		init_alarm(&loaded[s], saved[s].cfg.name, (unsigned)s);
	struct alarmstate_info info;
	char err[256];
	int rc = alarmstate_load_info(tmp_path("s"), loaded, ALARM_STATE_COUNT, &info, err,
				      sizeof err);
	assert_int_equal(rc, ALARM_STATE_COUNT);
	assert_string_equal(err, "");
	assert_true(info.file_found);
	assert_int_equal(info.record_count, ALARM_STATE_COUNT);
	assert_int_equal(info.restored_count, ALARM_STATE_COUNT);
	assert_int_equal(info.unknown_count, 0);
	assert_true(info.saved_t_ms == T0_MS + 5000);
	for (int s = 0; s < ALARM_STATE_COUNT; s++)
		assert_same_lifecycle(&loaded[s], &saved[s]);
}

/* A restored alarm carries on where it left off: the shelve ends at the saved
 * expiry (2 s + 900 s), a restored RTNUN acknowledges to NORM, a restored
 * DSUPR released by an in-service sample goes straight to UNACK. */
static void test_restored_alarms_carry_on_where_they_left_off(void **state)
{
	(void)state;
	struct alarm saved[ALARM_STATE_COUNT], a[ALARM_STATE_COUNT];
	alarms_in_every_state(saved);
	assert_int_equal(alarmstate_save(tmp_path("s"), saved, ALARM_STATE_COUNT, T0_MS), 0);
	for (int s = 0; s < ALARM_STATE_COUNT; s++)
		init_alarm(&a[s], saved[s].cfg.name, (unsigned)s);
	assert_int_equal(alarmstate_load(tmp_path("s"), a, ALARM_STATE_COUNT, NULL, 0),
			 ALARM_STATE_COUNT);
	struct alarm_event ev;
	feed(&a[ALARM_STATE_SHLVD], 90.0, false, 901.999);
	assert_int_equal(a[ALARM_STATE_SHLVD].state, ALARM_STATE_SHLVD);
	feed(&a[ALARM_STATE_SHLVD], 90.0, false, 902.0);
	assert_int_equal(a[ALARM_STATE_SHLVD].state, ALARM_STATE_UNACK);
	assert_int_equal(alarm_ack(&a[ALARM_STATE_RTNUN], T0_MS + 10000, &ev), 0);
	assert_int_equal(ev.state, ALARM_STATE_NORM);
	feed(&a[ALARM_STATE_DSUPR], 90.0, false, 10);
	assert_int_equal(a[ALARM_STATE_DSUPR].state, ALARM_STATE_UNACK);
}

/* alarmstate.h: PATH.new is renamed over PATH; nothing is left behind, the
 * old content is replaced, and the file is framed as documented. */
static void test_save_replaces_file_and_leaves_no_temp_file(void **state)
{
	(void)state;
	write_text(tmp_path("s"), "old content\n");
	struct alarm a[ALARM_STATE_COUNT];
	alarms_in_every_state(a);
	assert_int_equal(alarmstate_save(tmp_path("s"), a, 2, T0_MS), 0);
	assert_int_equal(access(tmp_path("s.new"), F_OK), -1);
	FILE *f = fopen(tmp_path("s"), "r");
	assert_non_null(f);
	char text[4096];
	size_t n = fread(text, 1, sizeof text - 1, f);
	fclose(f);
	text[n] = '\0';
	const char *head = "floodgauge-alarmstate 1\nsaved_t_ms 1767225600000\ncount 2\n"
			   "alarm normal active=0 unacked=0 shelved=0 until_t_ms=0 oos=0 dsupr=0 "
			   "name=T1_norm\n"
			   "alarm unacknowledged active=1 unacked=1 shelved=0 until_t_ms=0 oos=0 dsupr=0 "
			   "name=T1_unack\n";
	assert_int_equal(strncmp(text, head, strlen(head)), 0);
	char crc_line[32];
	snprintf(crc_line, sizeof crc_line, "crc32 0x%08x\n",
		 (unsigned)alarmstate_crc32(0, head, strlen(head)));
	assert_string_equal(text + strlen(head), crc_line);
}

static void test_save_into_missing_directory_fails_cleanly(void **state)
{
	(void)state;
	struct alarm a[1];
	init_alarm(&a[0], "T1_flood_hi", 0);
	char p[160];
	snprintf(p, sizeof p, "%s/no_such_dir/s", tmpdir);
	assert_int_equal(alarmstate_save(p, a, 1, T0_MS), -ENOENT);
	assert_int_equal(access(p, F_OK), -1);
}

static void test_save_refuses_too_long_path(void **state)
{
	(void)state;
	char p[FG_PATH_MAX + 10];
	memset(p, 'x', sizeof p - 1);
	p[sizeof p - 1] = '\0';
	struct alarm a[1];
	init_alarm(&a[0], "T1_flood_hi", 0);
	assert_int_equal(alarmstate_save(p, a, 1, T0_MS), -ENAMETOOLONG);
}

/* ---- load ------------------------------------------------------------------------- */

/* alarmstate.h: a missing file is the first start: 0, nothing restored,
 * info->file_found false. */
static void test_missing_file_restores_nothing_and_is_not_an_error(void **state)
{
	(void)state;
	struct alarm a[4], before[4];
	fixture_alarms(a);
	memcpy(before, a, sizeof a);
	struct alarmstate_info info;
	memset(&info, 0xff, sizeof info);
	char err[256] = "junk";
	assert_int_equal(alarmstate_load_info(tmp_path("absent"), a, 4, &info, err, sizeof err),
			 0);
	assert_false(info.file_found);
	assert_int_equal(info.restored_count, 0);
	assert_string_equal(err, "");
	assert_memory_equal(a, before, sizeof a);
}

/* good.state (checksum by zlib): restored by name, whatever the order; an
 * alarm the file does not name stays as it was initialised. */
static void test_good_fixture_restores_by_name(void **state)
{
	(void)state;
	struct alarm a[4];
	fixture_alarms(a);
	struct alarmstate_info info;
	char err[256];
	int rc = alarmstate_load_info(FIXTURES "good.state", a, 4, &info, err, sizeof err);
	assert_int_equal(rc, 3);
	assert_string_equal(err, "");
	assert_true(info.saved_t_ms == T0_MS);
	assert_int_equal(a[3].state, ALARM_STATE_UNACK);           /* T1_flood_hi */
	assert_true(a[3].active);
	assert_int_equal(a[1].state, ALARM_STATE_SHLVD);           /* T1_weep_lo */
	assert_true(a[1].shelve_until_t_ms == T0_MS + 3600000);
	assert_int_equal(a[0].state, ALARM_STATE_OOSRV);           /* "T1 dp diag" */
	assert_int_equal(a[2].state, ALARM_STATE_NORM);            /* not in the file */
}

static void test_truncated_fixture_is_refused_and_restores_nothing(void **state)
{
	(void)state;
	char err[256];
	assert_int_equal(load_expect_untouched(FIXTURES "truncated.state", err, sizeof err),
			 -EBADMSG);
	assert_non_null(strstr(err, "truncated"));
	assert_non_null(strstr(err, "truncated.state"));
}

static void test_bad_checksum_fixture_is_refused_and_restores_nothing(void **state)
{
	(void)state;
	char err[256];
	assert_int_equal(load_expect_untouched(FIXTURES "bad_checksum.state", err, sizeof err),
			 -EBADMSG);
	assert_non_null(strstr(err, "checksum"));
}

static void test_wrong_version_fixture_is_refused_and_restores_nothing(void **state)
{
	(void)state;
	char err[256];
	assert_int_equal(load_expect_untouched(FIXTURES "wrong_version.state", err, sizeof err),
			 -ENOTSUP);
	assert_non_null(strstr(err, "version"));
}

/* alarmstate.h: unknown names are skipped and counted, the rest restored. */
static void test_unknown_alarm_name_is_skipped_and_counted(void **state)
{
	(void)state;
	struct alarm a[4];
	fixture_alarms(a);
	struct alarmstate_info info;
	char err[256];
	int rc = alarmstate_load_info(FIXTURES "unknown_name.state", a, 4, &info, err, sizeof err);
	assert_int_equal(rc, 3);
	assert_int_equal(info.record_count, 4);
	assert_int_equal(info.unknown_count, 1);
	assert_non_null(strstr(err, "T1_retired_hi"));
	assert_int_equal(a[3].state, ALARM_STATE_UNACK);
}

/* A record whose visible state contradicts its fields (UNACK but not
 * active) is corrupt even with a correct checksum. */
static void test_inconsistent_record_is_refused(void **state)
{
	(void)state;
	write_framed(tmp_path("hand"),
		     "floodgauge-alarmstate 1\nsaved_t_ms 0\ncount 1\n"
		     "alarm UNACK active=0 unacked=1 shelved=0 until_t_ms=0 oos=0 dsupr=0 "
		     "name=T1_flood_hi\n");
	char err[256];
	assert_int_equal(load_expect_untouched(tmp_path("hand"), err, sizeof err), -EBADMSG);
	assert_non_null(strstr(err, "inconsistent"));
	assert_non_null(strstr(err, ":4:"));
}

static void test_duplicate_name_is_refused(void **state)
{
	(void)state;
	write_framed(tmp_path("hand"),
		     "floodgauge-alarmstate 1\nsaved_t_ms 0\ncount 2\n"
		     "alarm NORM active=0 unacked=0 shelved=0 until_t_ms=0 oos=0 dsupr=0 "
		     "name=T1_flood_hi\n"
		     "alarm RTNUN active=0 unacked=1 shelved=0 until_t_ms=0 oos=0 dsupr=0 "
		     "name=T1_flood_hi\n");
	char err[256];
	assert_int_equal(load_expect_untouched(tmp_path("hand"), err, sizeof err), -EBADMSG);
	assert_non_null(strstr(err, "duplicate"));
}

/* count says 2, one line follows, checksum right: lines went missing. */
static void test_count_mismatch_is_refused(void **state)
{
	(void)state;
	write_framed(tmp_path("hand"),
		     "floodgauge-alarmstate 1\nsaved_t_ms 0\ncount 2\n"
		     "alarm NORM active=0 unacked=0 shelved=0 until_t_ms=0 oos=0 dsupr=0 "
		     "name=T1_flood_hi\n");
	char err[256];
	assert_int_equal(load_expect_untouched(tmp_path("hand"), err, sizeof err), -EBADMSG);
	assert_non_null(strstr(err, "fewer"));
}

static void test_bad_field_value_is_refused(void **state)
{
	(void)state;
	write_framed(tmp_path("hand"),
		     "floodgauge-alarmstate 1\nsaved_t_ms 0\ncount 1\n"
		     "alarm NORM active=2 unacked=0 shelved=0 until_t_ms=0 oos=0 dsupr=0 "
		     "name=T1_flood_hi\n");
	char err[256];
	assert_int_equal(load_expect_untouched(tmp_path("hand"), err, sizeof err), -EBADMSG);
	write_framed(tmp_path("hand"),
		     "floodgauge-alarmstate 1\nsaved_t_ms 0\ncount 1\n"
		     "alarm HAPPY active=0 unacked=0 shelved=0 until_t_ms=0 oos=0 dsupr=0 "
		     "name=T1_flood_hi\n");
	assert_int_equal(load_expect_untouched(tmp_path("hand"), err, sizeof err), -EBADMSG);
}

static void test_empty_or_foreign_file_is_refused(void **state)
{
	(void)state;
	char err[256];
	write_text(tmp_path("hand"), "");
	assert_int_equal(load_expect_untouched(tmp_path("hand"), err, sizeof err), -EBADMSG);
	assert_non_null(strstr(err, "truncated"));
	write_text(tmp_path("hand"), "[monitor]\nname = T1\n");
	assert_int_equal(load_expect_untouched(tmp_path("hand"), err, sizeof err), -EBADMSG);
	assert_non_null(strstr(err, "not an alarm state file"));
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_crc32_matches_published_check_value),
		cmocka_unit_test(test_save_then_load_round_trips_every_state),
		cmocka_unit_test(test_restored_alarms_carry_on_where_they_left_off),
		cmocka_unit_test(test_save_replaces_file_and_leaves_no_temp_file),
		cmocka_unit_test(test_save_into_missing_directory_fails_cleanly),
		cmocka_unit_test(test_save_refuses_too_long_path),
		cmocka_unit_test(test_missing_file_restores_nothing_and_is_not_an_error),
		cmocka_unit_test(test_good_fixture_restores_by_name),
		cmocka_unit_test(test_truncated_fixture_is_refused_and_restores_nothing),
		cmocka_unit_test(test_bad_checksum_fixture_is_refused_and_restores_nothing),
		cmocka_unit_test(test_wrong_version_fixture_is_refused_and_restores_nothing),
		cmocka_unit_test(test_unknown_alarm_name_is_skipped_and_counted),
		cmocka_unit_test(test_inconsistent_record_is_refused),
		cmocka_unit_test(test_duplicate_name_is_refused),
		cmocka_unit_test(test_count_mismatch_is_refused),
		cmocka_unit_test(test_bad_field_value_is_refused),
		cmocka_unit_test(test_empty_or_foreign_file_is_refused),
	};
	return cmocka_run_group_tests_name("alarmstate", tests, group_setup, group_teardown);
}
