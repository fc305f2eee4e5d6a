/*
 * test_evlog.c - unit tests of monitor/evlog.c, one behaviour each.
 *
 * Faults are injected with RLIMIT_FSIZE (the kernel refuses to grow a file
 * past the soft limit with EFBIG, after writing what fits: a short write, the
 * hard case) and /dev/full (every write fails with ENOSPC). Raising the limit
 * again is "space returns". Files go to a fresh directory under /tmp.
 */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include <errno.h>
#include <signal.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/resource.h>
#include <sys/stat.h>
#include <unistd.h>

#include "evlog.h"

static char dir[64];
static char said[64][600];
static unsigned said_count;
static unsigned said_level[64];

static void book(enum evlog_level level, const char *msg)
{
	if (said_count < 64) {
		snprintf(said[said_count], sizeof said[0], "%s", msg);
		said_level[said_count] = level;
	}
	said_count++;
}

static unsigned said_with(const char *needle)
{
	unsigned n = 0;
	for (unsigned i = 0; i < said_count && i < 64; i++)
		n += strstr(said[i], needle) != NULL;
	return n;
}

static const char *path_of(const char *name)
{
	static char p[128];
	snprintf(p, sizeof p, "%s/%s", dir, name);
	return p;
}

static long file_size(const char *p)
{
	struct stat st;
	return stat(p, &st) == 0 ? (long)st.st_size : -1;
}

static unsigned file_lines(const char *p, char first[64], char last[64])
{
	FILE *f = fopen(p, "r");
	char line[EVLOG_LINE_MAX];
	unsigned n = 0;
	if (f == NULL)
		return 0;
	while (fgets(line, sizeof line, f) != NULL) {
		line[strcspn(line, "\n")] = '\0';
		if (n == 0 && first != NULL)
			snprintf(first, 64, "%.63s", line);
		if (last != NULL)
			snprintf(last, 64, "%.63s", line);
		n++;
	}
	fclose(f);
	return n;
}

static void limit_file_size(rlim_t bytes)
{
	struct rlimit r;
	assert_int_equal(getrlimit(RLIMIT_FSIZE, &r), 0);
	r.rlim_cur = bytes;
	assert_int_equal(setrlimit(RLIMIT_FSIZE, &r), 0);
}

static void unlimit(void)
{
	struct rlimit r;
	assert_int_equal(getrlimit(RLIMIT_FSIZE, &r), 0);
	r.rlim_cur = r.rlim_max;
	assert_int_equal(setrlimit(RLIMIT_FSIZE, &r), 0);
}

static int setup(void **state)
{
	(void)state;
	said_count = 0;
	snprintf(dir, sizeof dir, "/tmp/fg_evlog_XXXXXX");
	signal(SIGXFSZ, SIG_IGN); /* EFBIG instead of the signal */
	return mkdtemp(dir) == NULL ? -1 : 0;
}

static int teardown(void **state)
{
	(void)state;
	char cmd[128];
	unlimit();
	snprintf(cmd, sizeof cmd, "rm -rf %s", dir);
	return system(cmd) == 0 ? 0 : -1;
}

static void test_lines_are_appended_whole(void **state)
{
	struct evlog l;
	char first[64], last[64];
	(void)state;
	assert_int_equal(evlog_open(&l, path_of("ev"), 0, 5, book), 0);
	assert_int_equal(evlog_write(&l, "{\"n\":1}"), 0);
	assert_int_equal(evlog_write(&l, "{\"n\":2}"), 0);
	evlog_close(&l);
	assert_int_equal(file_lines(path_of("ev"), first, last), 2);
	assert_string_equal(first, "{\"n\":1}");
	assert_string_equal(last, "{\"n\":2}");
	assert_int_equal(said_count, 0);
}

static void test_short_write_is_cut_back_held_and_written_on_recovery(void **state)
{
	struct evlog l;
	struct evlog_stats st;
	char first[64], last[64], line[64];
	(void)state;
	assert_int_equal(evlog_open(&l, path_of("ev"), 0, 5, book), 0);
	assert_int_equal(evlog_write(&l, "{\"n\":1}"), 0);
	long before = file_size(path_of("ev"));
	limit_file_size((rlim_t)before + 3); /* the next line gets 3 bytes in */
	for (int i = 2; i <= 4; i++) {
		snprintf(line, sizeof line, "{\"n\":%d}", i);
		assert_int_equal(evlog_write(&l, line), -EAGAIN);
	}
	assert_int_equal(file_size(path_of("ev")), before); /* no half line left */
	assert_int_equal(said_with("cannot write events file"), 1); /* said once */
	assert_int_equal(evlog_retry(&l), 3);
	assert_int_equal(said_with("cannot write events file"), 1);
	unlimit(); /* space returns */
	assert_int_equal(evlog_retry(&l), 0);
	assert_int_equal(said_with("writable again: 3 held"), 1);
	assert_int_equal(evlog_write(&l, "{\"n\":5}"), 0);
	evlog_get_stats(&l, &st);
	assert_int_equal(st.written, 5);
	assert_int_equal(st.held, 3);
	assert_int_equal(st.lost, 0);
	evlog_close(&l);
	assert_int_equal(file_lines(path_of("ev"), first, last), 5);
	assert_string_equal(first, "{\"n\":1}");
	assert_string_equal(last, "{\"n\":5}");
}

static void test_full_backlog_loses_with_a_word_not_silently(void **state)
{
	struct evlog l;
	struct evlog_stats st;
	(void)state;
	assert_int_equal(evlog_open(&l, path_of("ev"), 0, 5, book), 0);
	limit_file_size(1);
	for (int i = 0; i < EVLOG_BACKLOG_MAX; i++)
		assert_int_equal(evlog_write(&l, "{\"x\":1}"), -EAGAIN);
	assert_int_equal(evlog_write(&l, "{\"x\":2}"), -ENOBUFS);
	assert_int_equal(evlog_write(&l, "{\"x\":3}"), -ENOBUFS);
	assert_int_equal(said_with("backlog full"), 1);
	unlimit();
	assert_int_equal(evlog_retry(&l), 0);
	assert_int_equal(said_with("2 event(s) could not be held"), 1);
	evlog_get_stats(&l, &st);
	assert_int_equal(st.lost, 2);
	assert_int_equal(st.written, EVLOG_BACKLOG_MAX);
	evlog_close(&l);
	assert_int_equal(file_lines(path_of("ev"), NULL, NULL), EVLOG_BACKLOG_MAX);
}

static void test_dev_full_holds_and_close_hands_lines_to_the_log(void **state)
{
	struct evlog l;
	(void)state;
	if (access("/dev/full", W_OK) != 0)
		skip(); /* no /dev/full in this container */
	assert_int_equal(evlog_open(&l, "/dev/full", 0, 5, book), 0);
	assert_int_equal(evlog_write(&l, "{\"alarm\":\"A\"}"), -EAGAIN);
	assert_int_equal(evlog_write(&l, "{\"alarm\":\"B\"}"), -EAGAIN);
	assert_int_equal(said_with("No space left on device"), 1);
	evlog_close(&l);
	assert_int_equal(said_with("unwritten event: {\"alarm\":\"A\"}"), 1);
	assert_int_equal(said_with("unwritten event: {\"alarm\":\"B\"}"), 1);
}

static void test_rotation_keeps_n_files(void **state)
{
	struct evlog l;
	struct evlog_stats st;
	char line[64], first[64];
	(void)state;
	/* 10-byte lines ({"n":NN}\n), 25-byte limit: two lines a file. */
	assert_int_equal(evlog_open(&l, path_of("ev"), 25, 2, book), 0);
	for (int i = 10; i < 20; i++) {
		snprintf(line, sizeof line, "{\"n\":%d}", i);
		assert_int_equal(evlog_write(&l, line), 0);
	}
	evlog_get_stats(&l, &st);
	assert_int_equal(st.rotations, 4);
	evlog_close(&l);
	assert_int_equal(file_lines(path_of("ev"), first, NULL), 2);
	assert_string_equal(first, "{\"n\":18}");
	assert_int_equal(file_lines(path_of("ev.1"), first, NULL), 2);
	assert_string_equal(first, "{\"n\":16}");
	assert_int_equal(file_lines(path_of("ev.2"), first, NULL), 2);
	assert_string_equal(first, "{\"n\":14}");
	assert_int_equal(access(path_of("ev.3"), F_OK), -1); /* keep = 2 */
}

static void test_reopen_follows_an_outside_rename(void **state)
{
	struct evlog l;
	(void)state;
	assert_int_equal(evlog_open(&l, path_of("ev"), 0, 5, book), 0);
	assert_int_equal(evlog_write(&l, "{\"n\":1}"), 0);
	char moved[128];
	snprintf(moved, sizeof moved, "%s", path_of("ev.old"));
	assert_int_equal(rename(path_of("ev"), moved), 0);
	assert_int_equal(evlog_reopen(&l), 0);
	assert_int_equal(evlog_write(&l, "{\"n\":2}"), 0);
	evlog_close(&l);
	assert_int_equal(file_lines(path_of("ev"), NULL, NULL), 1);
	assert_int_equal(file_lines(moved, NULL, NULL), 1);
}

static void test_open_refuses_bad_arguments(void **state)
{
	struct evlog l;
	(void)state;
	assert_int_equal(evlog_open(&l, "", 0, 5, book), -EINVAL);
	assert_int_equal(evlog_open(&l, path_of("ev"), 0, 0, book), -EINVAL);
	assert_int_equal(evlog_open(&l, path_of("ev"), 0, EVLOG_KEEP_MAX + 1, book), -EINVAL);
	evlog_close(&l); /* harmless after a failed open */
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test_setup_teardown(test_lines_are_appended_whole, setup, teardown),
		cmocka_unit_test_setup_teardown(
			test_short_write_is_cut_back_held_and_written_on_recovery, setup, teardown),
		cmocka_unit_test_setup_teardown(test_full_backlog_loses_with_a_word_not_silently,
						setup, teardown),
		cmocka_unit_test_setup_teardown(test_dev_full_holds_and_close_hands_lines_to_the_log,
						setup, teardown),
		cmocka_unit_test_setup_teardown(test_rotation_keeps_n_files, setup, teardown),
		cmocka_unit_test_setup_teardown(test_reopen_follows_an_outside_rename, setup,
						teardown),
		cmocka_unit_test_setup_teardown(test_open_refuses_bad_arguments, setup, teardown),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
