/*
 * test_report.c - the replay report: bounded buckets, gaps, shading, escaping,
 * determinism and the page's required content.
 *
 * The page is checked as text (what must be in it, and how often); how it
 * looks is checked by tests/integration/report_render.sh, which renders the
 * demo page this test writes to $FG_REPORT_OUT when that is set.
 *
 * The demo plant (Quillmere Works, column K-7) and all its numbers are
 * invented for this test.
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
#include <dirent.h>
#include <sys/stat.h>
#include <unistd.h>

#include "report.h"
#include "report_int.h"

/* 2026-03-04T05:06:07Z: `date -u -d @1772600767` (GNU coreutils 9.1). */
#define T0_MS 1772600767000LL

static char tmp_dir[64];

/* ------------------------------------------------------------ helpers */

static char *slurp(const char *path, size_t *size_out)
{
	FILE *f = fopen(path, "rb");
	assert_non_null(f);
	assert_int_equal(fseek(f, 0, SEEK_END), 0);
	const long n = ftell(f);
	assert_true(n >= 0);
	rewind(f);
	char *buf = malloc((size_t)n + 1);
	assert_non_null(buf);
	assert_int_equal(fread(buf, 1, (size_t)n, f), (size_t)n);
	buf[n] = '\0';
	fclose(f);
	if (size_out != NULL)
		*size_out = (size_t)n;
	return buf;
}

static size_t count_of(const char *hay, const char *needle)
{
	size_t n = 0;
	const size_t len = strlen(needle);
	for (const char *p = strstr(hay, needle); p != NULL; p = strstr(p + len, needle))
		n++;
	return n;
}

static void tmp_path(char *buf, size_t size, const char *name)
{
	const int n = snprintf(buf, size, "%s/%s", tmp_dir, name);
	assert_true(n > 0 && (size_t)n < size);
}

/* Moves to subpaths commands of the path with class cls (the first such
 * path in the page: the first section's series). */
static size_t path_moves(const char *page, const char *cls)
{
	char key[48];
	snprintf(key, sizeof key, "<path class=\"%s\" d=\"", cls);
	/* The first occurrence is the legend sample in the chart head; the
	 * second is the series itself. */
	const char *p = strstr(page, key);
	assert_non_null(p);
	p = strstr(p + 1, key);
	assert_non_null(p);
	p += strlen(key);
	const char *end = strchr(p, '"');
	assert_non_null(end);
	size_t n = 0;
	for (; p < end; p++)
		n += *p == 'M';
	return n;
}

static void add_section(struct report_layout *l, const char *name, const char *type)
{
	struct report_section *s = &l->sections[l->section_count++];
	snprintf(s->name, sizeof s->name, "%s", name);
	snprintf(s->type, sizeof s->type, "%s", type);
}

static void add_alarm(struct report_layout *l, const char *name, int section, int field,
		      const char *kind, const char *prio, double setpoint)
{
	struct report_alarm *a = &l->alarms[l->alarm_count++];
	snprintf(a->name, sizeof a->name, "%s", name);
	a->section_index = section;
	a->field = field;
	snprintf(a->kind, sizeof a->kind, "%s", kind);
	snprintf(a->priority, sizeof a->priority, "%s", prio);
	a->setpoint = setpoint;
}

/* One-section layout with a high alarm on flood_index at 80 %. */
static void small_layout(struct report_layout *l, const char *section_name)
{
	memset(l, 0, sizeof *l);
	snprintf(l->plant, sizeof l->plant, "Quillmere Works (invented)");
	snprintf(l->data_file, sizeof l->data_file, "k7_test.csv");
	add_section(l, section_name, "tray");
	add_alarm(l, "K7_FLOOD_HI", 0, RF_FLOOD_INDEX, "high", "high", 80.0);
}

static void fill_result(struct section_result *r, double flood)
{
	result_clear(r);
	r->v[RF_FLOOD_INDEX] = flood;
	r->v[RF_FLOOD_PCT] = flood * 0.95;
	r->v[RF_DP_PA] = 400.0 + 6.0 * flood;
	r->v[RF_DP_MODEL_PA] = 380.0 + 6.0 * flood;
	r->v[RF_LIQUID_HOLDUP_FRAC] = 0.04 + 0.0005 * flood;
}

/* Deterministic noise in [-1, 1) (a 32-bit LCG, constants of Numerical
 * Recipes' ranqd1), so the demo never depends on libc's rand(). */
static double noise(uint32_t *state)
{
	*state = *state * 1664525u + 1013904223u;
	return (double)(*state >> 8) / 8388608.0 - 1.0;
}

/* ------------------------------------------------------ the demo upset */

enum { DEMO_SECTIONS = 3, DEMO_ROWS = 2160, DEMO_PERIOD_MS = 10000 };

static void demo_layout(struct report_layout *l)
{
	memset(l, 0, sizeof *l);
	snprintf(l->plant, sizeof l->plant, "Quillmere Works - absorber K-7 (invented plant)");
	snprintf(l->data_file, sizeof l->data_file, "k7_upset_2026-03-04.csv");
	add_section(l, "K7-top-trays", "tray");
	add_section(l, "K7-packed-bed", "packed");
	add_section(l, "K7-quench-spray", "spray");
	add_alarm(l, "K7T_FLOOD_HI", 0, RF_FLOOD_INDEX, "high", "high", 80.0);
	add_alarm(l, "K7T_FLOOD_HH", 0, RF_FLOOD_INDEX, "high", "urgent", 90.0);
	add_alarm(l, "K7P_FLOOD_HI", 1, RF_FLOOD_PCT, "high", "medium", 75.0);
	add_alarm(l, "K7P_DP_HI", 1, RF_DP_PA, "high", "low", 1900.0);
	add_alarm(l, "K7P_QUALITY", 1, -1, "diagnostic", "low", NAN);
	/* rate (per minute) and deviation (a difference): no level on the axis */
	add_alarm(l, "K7T_FLOOD_RISE", 0, RF_FLOOD_INDEX, "rate", "medium", 5.0);
	add_alarm(l, "K7P_DP_DEV", 1, RF_DP_PA, "deviation", "low", 300.0);
	add_alarm(l, "K7S_FLOOD_HH", 2, RF_FLOOD_PCT, "high-high", "high", 95.0);
}

/* Flood index of section k at row i: steady, a ramp to an upset between
 * rows 900 and 1300, recovery by row 1500. */
static double demo_flood(unsigned k, unsigned i, uint32_t *rng)
{
	double base = k == 0 ? 62.0 : k == 1 ? 55.0 : 40.0;
	double peak = k == 0 ? 36.0 : k == 1 ? 30.0 : 12.0;
	double u = 0.0;
	if (i > 900 && i < 1300)
		u = (double)(i - 900) / 400.0;
	else if (i >= 1300 && i < 1500)
		u = 1.0 - (double)(i - 1300) / 200.0;
	return base + peak * u * u + 1.5 * noise(rng);
}

struct demo_alarm_state {
	bool active;
	int64_t since_ms;
};

/* A crude threshold alarm (no deadband or delays) to give the demo events;
 * the real lifecycle is the alarm module's. */
static void demo_alarm_step(struct report *rp, struct report_summary *sum,
			    struct demo_alarm_state *st, int a, int64_t t_ms, double v)
{
	const struct report_alarm *al = &rp->layout.alarms[a];
	if (!st->active && v > al->setpoint) {
		st->active = true;
		st->since_ms = t_ms;
		assert_int_equal(report_add_event(rp, t_ms, a, "unacknowledged", v), 0);
		sum->raised[report_priority_lookup(al->priority)]++;
		if (sum->first_alarm_t_ms[al->section_index] == REPORT_T_NONE)
			sum->first_alarm_t_ms[al->section_index] = t_ms;
	} else if (st->active && v < al->setpoint - 2.0) {
		st->active = false;
		assert_int_equal(report_add_event(rp, t_ms, a, "normal", v), 0);
	}
	if (st->active && t_ms - st->since_ms == 60000)
		assert_int_equal(report_add_event(rp, t_ms, a, "acknowledged", v), 0);
	if (v > al->setpoint) {
		if (!isfinite(sum->above_setpoint_s[a]))
			sum->above_setpoint_s[a] = 0.0;
		sum->above_setpoint_s[a] += DEMO_PERIOD_MS / 1000.0;
	}
}

static void demo_row(struct section_result *res, unsigned i, uint32_t *rng)
{
	for (unsigned k = 0; k < DEMO_SECTIONS; k++) {
		const double fl = demo_flood(k, i, rng);
		fill_result(&res[k], fl);
		res[k].v[RF_DP_PA] = 300.0 + 18.0 * fl + (fl > 80 ? 40.0 * (fl - 80) : 0.0) +
				     15.0 * noise(rng);
		res[k].v[RF_DP_MODEL_PA] = 290.0 + 18.0 * fl;
		res[k].v[RF_LIQUID_HOLDUP_FRAC] = 0.05 + 0.0009 * fl + 0.002 * noise(rng);
		if (k == 2) {   /* spray: no DP model, holdup small */
			res[k].v[RF_DP_MODEL_PA] = NAN;
			res[k].v[RF_LIQUID_HOLDUP_FRAC] = 0.002 + 0.00002 * fl;
		}
	}
	if (i >= 600 && i < 630) { /* a DP transmitter drops out on the packed bed */
		res[1].v[RF_DP_PA] = NAN;
		res[1].v[RF_FLOOD_INDEX] = NAN;
		res[1].quality = FG_QUALITY_BAD;
	}
	if (i >= 1150 && i < 1260) { /* beyond the correlation's range near flood */
		res[0].quality = FG_QUALITY_UNCERTAIN;
		fg_extrap_note(&res[0].extrap, "flow parameter above the chart");
	}
}

/* Builds the demo report and writes it to path. Rows 1700..1759 are missing
 * from the file (a 10-minute historian gap). */
static void write_demo(const char *path)
{
	struct report_layout l;
	demo_layout(&l);
	struct report rp;
	assert_int_equal(report_init(&rp, &l), 0);
	struct report_summary sum;
	report_summary_clear(&sum);
	struct demo_alarm_state st[8] = {{0}};
	struct section_result res[DEMO_SECTIONS];
	uint32_t rng = 12345u;
	for (unsigned i = 0; i < DEMO_ROWS; i++) {
		demo_row(res, i, &rng);
		if (i >= 1700 && i < 1760)
			continue;
		const int64_t t = T0_MS + (int64_t)i * DEMO_PERIOD_MS;
		assert_int_equal(report_add_row(&rp, t, res), 0);
		sum.rows_read++;
		if (sum.first_t_ms == REPORT_T_NONE)
			sum.first_t_ms = t;
		sum.last_t_ms = t;
		demo_alarm_step(&rp, &sum, &st[0], 0, t, res[0].v[RF_FLOOD_INDEX]);
		demo_alarm_step(&rp, &sum, &st[1], 1, t, res[0].v[RF_FLOOD_INDEX]);
		demo_alarm_step(&rp, &sum, &st[2], 2, t, res[1].v[RF_FLOOD_PCT]);
		demo_alarm_step(&rp, &sum, &st[3], 3, t, res[1].v[RF_DP_PA]);
		if (i == 600)
			assert_int_equal(report_add_event(&rp, t, 4, "unacknowledged", NAN), 0);
		if (i == 630)
			assert_int_equal(report_add_event(&rp, t, 4, "returned_unacknowledged", NAN), 0);
	}
	sum.rows_malformed = 2;
	sum.rows_duplicate = 1;
	assert_int_equal(report_write(&rp, path, &sum), 0);
	report_fini(&rp);
}

/* --------------------------------------------------------------- tests */

/* Times on the page are ISO 8601 UTC. Check values: GNU coreutils 9.1
 * `date -u -d @S +%Y-%m-%dT%H:%M:%SZ`, and for milliseconds Python 3.11
 * datetime (epoch + timedelta(milliseconds=...)). */
static void test_event_times_match_reference_dates(void **state)
{
	(void)state;
	static const struct {
		int64_t t_ms;
		const char *iso;
	} cases[] = {
		{0, "1970-01-01T00:00:00Z"},                       /* date */
		{-1000, "1969-12-31T23:59:59Z"},                   /* date */
		{-86400000LL, "1969-12-31T00:00:00Z"},             /* date */
		{951782400000LL, "2000-02-29T00:00:00Z"},          /* date, leap century */
		{1709164800000LL, "2024-02-29T00:00:00Z"},         /* date */
		{1772600767000LL, "2026-03-04T05:06:07Z"},         /* date */
		{4102444799000LL, "2099-12-31T23:59:59Z"},         /* date */
		{1772600767123LL, "2026-03-04T05:06:07.123Z"},     /* python datetime */
		{-1, "1969-12-31T23:59:59.999Z"},                  /* python datetime */
		{253402300799999LL, "9999-12-31T23:59:59.999Z"},   /* python datetime */
	};
	const size_t n = sizeof cases / sizeof cases[0];
	struct report_layout l;
	small_layout(&l, "K7");
	struct report rp;
	assert_int_equal(report_init(&rp, &l), 0);
	for (size_t i = 0; i < n; i++)
		assert_int_equal(report_add_event(&rp, cases[i].t_ms, 0, "normal", 1.0), 0);
	assert_int_equal(report_add_event(&rp, 253402300800000LL, 0, "normal", 1.0), 0);
	struct report_summary sum;
	report_summary_clear(&sum);
	char path[128];
	tmp_path(path, sizeof path, "times.html");
	assert_int_equal(report_write(&rp, path, &sum), 0);
	report_fini(&rp);
	char *page = slurp(path, NULL);
	char cell[64];
	for (size_t i = 0; i < n; i++) {
		snprintf(cell, sizeof cell, "<tr><td class=\"n\">%s</td>", cases[i].iso);
		assert_non_null(strstr(page, cell));
	}
	/* year 10000 is beyond ISO 8601's four-digit years */
	assert_non_null(strstr(page, "<tr><td class=\"n\">(out of range)</td>"));
	free(page);
}

static void test_fixed_format_rounds_without_locale(void **state)
{
	(void)state;
	char b[32];
	report_format_fixed(-12.5, 2, b, sizeof b);
	assert_string_equal(b, "-12.50");
	report_format_fixed(0.125, 2, b, sizeof b); /* exact in binary: half away from zero */
	assert_string_equal(b, "0.13");
	report_format_fixed(-0.04, 1, b, sizeof b); /* no "-0.0" */
	assert_string_equal(b, "0.0");
	report_format_fixed(1234.0, 0, b, sizeof b);
	assert_string_equal(b, "1234");
	report_format_fixed(0.000125, 6, b, sizeof b);
	assert_string_equal(b, "0.000125");
	report_format_fixed(NAN, 3, b, sizeof b);
	assert_string_equal(b, "-");
	report_format_fixed(-INFINITY, 3, b, sizeof b);
	assert_string_equal(b, "-");
	report_format_fixed(2e16, 1, b, sizeof b);
	assert_string_equal(b, ">9e15");
	report_format_fixed(1e12, 9, b, sizeof b); /* too many decimals for int64: fewer */
	assert_string_equal(b, "1000000000000.000");
	assert_int_equal(report_format_fixed(123.456, 3, b, 4), -ENOSPC);
}

/* The digits are written by hand; libc's printf of the same rounded integer
 * is the reference: random magnitudes from 1e-12 to 1e16, both signs, every
 * decimals setting, and every answer must equal it byte for byte. */
static void test_fixed_format_matches_printf(void **state)
{
	(void)state;
	unsigned long long x = 88172645463325252ull;
	char b[40], want[320]; /* room for any width below 256 (the compiler checks) */
	for (int i = 0; i < 300000; i++) {
		x ^= x << 13;
		x ^= x >> 7;
		x ^= x << 17;
		double m = (double)(x >> 11) * 0x1p-53;
		double v = (x & 1 ? -1.0 : 1.0) * m * pow(10.0, (double)(int)(x % 29) - 12.0);
		int decimals = (int)((x >> 5) % 10);
		int n = report_format_fixed(v, decimals, b, sizeof b);
		int d = decimals;
		while (d > 0 && fabs(v) * pow(10.0, d) >= 9e15)
			d--;
		long long scale = 1;
		for (int k = 0; k < d; k++)
			scale *= 10;
		long long q = llround(fabs(v) * (double)scale);
		const char *sign = (v < 0 && q != 0) ? "-" : "";
		if (fabs(v) >= 9e15)
			snprintf(want, sizeof want, "%s", v < 0 ? "<-9e15" : ">9e15");
		else if (d == 0)
			snprintf(want, sizeof want, "%s%lld", sign, q);
		else
			snprintf(want, sizeof want, "%s%lld.%0*lld", sign, q / scale,
				 (int)(unsigned char)d, q % scale);
		assert_string_equal(b, want);
		assert_int_equal(n, (int)strlen(want));
	}
}

static void test_init_rejects_inconsistent_layout(void **state)
{
	(void)state;
	struct report_layout l;
	struct report rp;
	small_layout(&l, "K7");
	l.section_count = 0;
	assert_int_equal(report_init(&rp, &l), -EINVAL);
	report_fini(&rp);
	small_layout(&l, "K7");
	l.alarms[0].section_index = 1;
	assert_int_equal(report_init(&rp, &l), -EINVAL);
	small_layout(&l, "K7");
	l.alarms[0].field = RF_COUNT;
	assert_int_equal(report_init(&rp, &l), -EINVAL);
	small_layout(&l, "K7");
	memset(l.sections[0].name, 'x', sizeof l.sections[0].name); /* no NUL */
	assert_int_equal(report_init(&rp, &l), -EINVAL);
	small_layout(&l, "K7");
	l.alarms[0].field = -1;
	assert_int_equal(report_init(&rp, &l), 0);
	report_fini(&rp);
	report_fini(NULL);
}

static void test_page_has_sections_charts_setpoints_and_caution(void **state)
{
	(void)state;
	char path[128];
	tmp_path(path, sizeof path, "demo.html");
	write_demo(path);
	char *page = slurp(path, NULL);
	assert_non_null(strstr(page, "<h3>K7-top-trays"));
	assert_non_null(strstr(page, "<h3>K7-packed-bed"));
	assert_non_null(strstr(page, "<h3>K7-quench-spray"));
	/* the charts of each type, each its own <svg: tray 6 (gas and liquid
	 * load, flood, DP, weep margin, holdup), packed 5 (no weep), spray 4
	 * (loads, flood, carry-over); no operating window without one set */
	assert_int_equal(count_of(page, "<svg"), 6 + 5 + 4);
	/* one dashed line per level alarm (high, high-high, low) on a charted
	 * field: 2 + 2 + 1; the diagnostic, rate and deviation alarms have none */
	assert_int_equal(count_of(page, "<line class=\"sp\""), 5);
	assert_null(strstr(page, ">K7T_FLOOD_RISE:"));
	assert_null(strstr(page, ">K7P_DP_DEV:"));
	assert_non_null(strstr(page, ">K7S_FLOOD_HH: flood_pct 95.0 %</text>"));
	assert_non_null(strstr(page, "<td>K7T_FLOOD_RISE</td><td>K7-top-trays</td>"
				     "<td>flood_index</td><td>rate</td><td>medium</td>"
				     "<td class=\"n\">5.00 %/min</td>"));
	assert_non_null(strstr(page, "<td class=\"n\">300.0 Pa</td>"));
	assert_non_null(strstr(page, ">K7T_FLOOD_HI: flood_index 80.0 %</text>"));
	assert_non_null(strstr(page, ">K7T_FLOOD_HH: flood_index 90.0 %</text>"));
	assert_non_null(strstr(page, ">K7P_FLOOD_HI: flood_pct 75.0 %</text>"));
	assert_non_null(strstr(page, ">K7P_DP_HI: dp_pa 1900 Pa</text>"));
	assert_non_null(strstr(page, "not a safety system"));
	assert_non_null(strstr(page, "validity range"));
	assert_non_null(strstr(page, "flagged as extrapolated"));
	assert_non_null(strstr(page, "licensed engineers"));
	assert_non_null(strstr(page, "Local codes, site procedures"));
	/* header: plant, data file, span (6 h minus one period) */
	assert_non_null(strstr(page, "Quillmere Works - absorber K-7"));
	assert_non_null(strstr(page, "<b>k7_upset_2026-03-04.csv</b>"));
	assert_non_null(strstr(page, "<b>2026-03-04T05:06:07Z</b> to <b>2026-03-04T11:05:57Z</b>"));
	assert_non_null(strstr(page, "(5:59:50)"));
	/* this demo gives no loads: each section's gas load chart says so, once */
	assert_int_equal(count_of(page, ">gas flow: no values</text>"), 3);
	assert_non_null(strstr(page, "First alarm: none"));
	/* one small inline script (zoom, read-out), no external assets */
	assert_int_equal(count_of(page, "<script"), 1);
	assert_null(strstr(page, "<script src"));
	assert_null(strstr(page, "href="));
	assert_null(strstr(page, "src="));
	free(page);
}

static void test_names_are_html_escaped(void **state)
{
	(void)state;
	struct report_layout l;
	small_layout(&l, "A<&>B");
	snprintf(l.plant, sizeof l.plant, "Plant \"Q\" & 'R'");
	snprintf(l.alarms[0].name, sizeof l.alarms[0].name, "HI<script>");
	struct report rp;
	assert_int_equal(report_init(&rp, &l), 0);
	struct section_result r;
	fill_result(&r, 50.0);
	assert_int_equal(report_add_row(&rp, T0_MS, &r), 0);
	assert_int_equal(report_add_row(&rp, T0_MS + 1000, &r), 0);
	assert_int_equal(report_add_event(&rp, T0_MS + 1000, 0, "unacknowledged", 85.0), 0);
	struct report_summary sum;
	report_summary_clear(&sum);
	char path[128];
	tmp_path(path, sizeof path, "escape.html");
	assert_int_equal(report_write(&rp, path, &sum), 0);
	report_fini(&rp);
	char *page = slurp(path, NULL);
	assert_non_null(strstr(page, "A&lt;&amp;&gt;B"));
	assert_null(strstr(page, "A<&>B"));
	assert_non_null(strstr(page, "Plant &quot;Q&quot; &amp; &#39;R&#39;"));
	assert_non_null(strstr(page, "HI&lt;script&gt;"));
	assert_int_equal(count_of(page, "<script"), 1); /* ours only */
	free(page);
}

static void test_two_runs_give_identical_files(void **state)
{
	(void)state;
	char a[128], b[128];
	tmp_path(a, sizeof a, "run1.html");
	tmp_path(b, sizeof b, "run2.html");
	write_demo(a);
	write_demo(b);
	size_t na, nb;
	char *pa = slurp(a, &na), *pb = slurp(b, &nb);
	assert_int_equal(na, nb);
	assert_true(na > 10000);
	assert_int_equal(memcmp(pa, pb, na), 0);
	free(pa);
	free(pb);
}

static void test_write_goes_through_temp_file(void **state)
{
	(void)state;
	struct report_layout l;
	small_layout(&l, "K7");
	struct report rp;
	assert_int_equal(report_init(&rp, &l), 0);
	struct report_summary sum;
	report_summary_clear(&sum);
	char path[128], tmp[160];
	tmp_path(path, sizeof path, "atomic.html");
	snprintf(tmp, sizeof tmp, "%s.new", path);
	assert_int_equal(report_write(&rp, path, &sum), 0);
	assert_int_equal(access(path, F_OK), 0);
	assert_int_equal(access(tmp, F_OK), -1);
	char *page = slurp(path, NULL);
	assert_non_null(strstr(page, "No data rows were replayed"));
	free(page);
	char bad[160];
	tmp_path(bad, sizeof bad, "no-such-dir/report.html");
	assert_int_equal(report_write(&rp, bad, &sum), -ENOENT);
	report_fini(&rp);
}

/* One million rows at 1 s: the grid must stay within REPORT_BUCKETS_MAX.
 * The span is 999 999 s; 2^18 ms buckets would need 3815, so the width must
 * have doubled to 2^19 ms = 524 288 ms, giving 1908 buckets. A single-row
 * spike and a single-row dip, early enough to go through about ten merges,
 * must survive as the maximum and minimum of their buckets. */
static void test_million_rows_keep_bucket_count_bounded(void **state)
{
	(void)state;
	struct report_layout l;
	small_layout(&l, "K7");
	struct report rp;
	assert_int_equal(report_init(&rp, &l), 0);
	struct section_result r;
	for (unsigned i = 0; i < 1000000; i++) {
		fill_result(&r, 50.0 + 10.0 * sin((double)i * 1e-4));
		if (i == 4321)
			r.v[RF_FLOOD_INDEX] = 250.0;
		if (i == 5432)
			r.v[RF_FLOOD_INDEX] = -40.0;
		assert_int_equal(report_add_row(&rp, T0_MS + (int64_t)i * 1000, &r), 0);
		assert_true(report_bucket_count(&rp) <= REPORT_BUCKETS_MAX);
	}
	assert_int_equal(report_bucket_width_ms(&rp), 524288);
	assert_int_equal(report_bucket_count(&rp), 1908);
	double top = -INFINITY, bottom = INFINITY;
	uint64_t samples = 0;
	for (size_t b = 0; b < report_bucket_count(&rp); b++) {
		const struct report_cell *c = &rp.cells[cell_at(0, REPORT_SERIES_FLOOD_INDEX, b)];
		samples += c->finite_count;
		if (c->finite_count > 0 && c->max > top)
			top = c->max;
		if (c->finite_count > 0 && c->min < bottom)
			bottom = c->min;
	}
	assert_true(top == 250.0);
	assert_true(bottom == -40.0);
	assert_int_equal(samples, 1000000); /* merging lost no sample */
	struct report_summary sum;
	report_summary_clear(&sum);
	char path[128];
	tmp_path(path, sizeof path, "million.html");
	assert_int_equal(report_write(&rp, path, &sum), 0);
	report_fini(&rp);
	size_t size;
	char *page = slurp(path, &size);
	/* bounded output too: five series x 1908 buckets x <= 4 points */
	assert_true(size < 1000000);
	/* the flood axis stays 0..150; the spike and the dip are drawn at its
	 * edges and marked with their extremes */
	assert_non_null(strstr(page, ">150</text>"));
	assert_non_null(strstr(page, "above the axis (red bar on top), up to 250.0</text>"));
	assert_non_null(strstr(page, "below the axis (red bar at the bottom), down to -40.0</text>"));
	assert_non_null(strstr(page, "1908 buckets of 0:08:44"));
	free(page);
}

/* Writes a one-section report from n flood values (NAN allowed) at times
 * t_ms[i] and returns the page. */
static char *page_from(const int64_t *t_ms, const double *flood, size_t n, const char *name)
{
	struct report_layout l;
	small_layout(&l, "K7");
	struct report rp;
	assert_int_equal(report_init(&rp, &l), 0);
	struct section_result r;
	for (size_t i = 0; i < n; i++) {
		fill_result(&r, flood[i]);
		assert_int_equal(report_add_row(&rp, t_ms[i], &r), 0);
	}
	struct report_summary sum;
	report_summary_clear(&sum);
	char path[128];
	tmp_path(path, sizeof path, name);
	assert_int_equal(report_write(&rp, path, &sum), 0);
	report_fini(&rp);
	return slurp(path, NULL);
}

static void test_time_gap_breaks_the_line(void **state)
{
	(void)state;
	enum { N = 200 };
	int64_t t[N];
	double v[N];
	for (size_t i = 0; i < N; i++) {
		/* rows 0..99 and 100..199 at 1 s, with 101 s missing between */
		t[i] = T0_MS + (int64_t)(i < 100 ? i : i + 100) * 1000;
		v[i] = 40.0 + (double)(i % 7);
	}
	char *page = page_from(t, v, N, "gap.html");
	assert_int_equal(path_moves(page, "s0"), 2);
	assert_int_equal(path_moves(page, "s4"), 2);
	free(page);
	/* the same rows without the gap: one unbroken line */
	for (size_t i = 0; i < N; i++)
		t[i] = T0_MS + (int64_t)i * 1000;
	page = page_from(t, v, N, "nogap.html");
	assert_int_equal(path_moves(page, "s0"), 1);
	free(page);
	/* a gap of 2.5x the period stays joined (threshold is about 3x) */
	for (size_t i = 0; i < N; i++)
		t[i] = T0_MS + (int64_t)i * 1000 + (i >= 100 ? 1500 : 0);
	page = page_from(t, v, N, "shortgap.html");
	assert_int_equal(path_moves(page, "s0"), 1);
	free(page);
}

/* A 5 s gap in 1 s rows that first lies between two 8192 ms buckets
 * (9 838 s | 9 843 s, boundary 1201 x 8192 ms = 9 838.592 s) and then, once
 * 20 000 rows have doubled the width to 16 384 ms, inside one bucket: the
 * merge must keep it, and that bucket is drawn on its own (three pieces). */
static void test_gap_survives_bucket_merge(void **state)
{
	(void)state;
	enum { N = 20000 };
	int64_t *t = malloc(N * sizeof *t);
	double *v = malloc(N * sizeof *v);
	assert_non_null(t);
	assert_non_null(v);
	for (size_t i = 0; i < N; i++) {
		t[i] = T0_MS + (int64_t)(i <= 9838 ? i : i + 4) * 1000;
		v[i] = 50.0 + (double)(i % 5);
	}
	char *page = page_from(t, v, N, "mergegap.html");
	assert_non_null(strstr(page, "1221 buckets of 16.384 s"));
	assert_int_equal(path_moves(page, "s0"), 3);
	free(page);
	free(t);
	free(v);
}

static void test_nan_breaks_the_line(void **state)
{
	(void)state;
	enum { N = 300 };
	int64_t t[N];
	double v[N];
	for (size_t i = 0; i < N; i++) {
		t[i] = T0_MS + (int64_t)i * 1000;
		v[i] = (i == 100 || (i >= 200 && i < 210)) ? NAN : 50.0 + (double)(i % 5);
	}
	char *page = page_from(t, v, N, "nan.html");
	assert_int_equal(path_moves(page, "s0"), 3);
	free(page);
	for (size_t i = 0; i < N; i++)
		v[i] = NAN;
	page = page_from(t, v, N, "allnan.html");
	assert_int_equal(path_moves(page, "s0"), 0);
	assert_non_null(strstr(page, "no values for this section"));
	free(page);
	/* 20000 rows merge into buckets of 16 rows (16.384 s); one NAN inside
	 * such a bucket must still break the line: the bucket is drawn on its
	 * own, so the line has three pieces. */
	enum { LONG_N = 20000 };
	int64_t *tl = malloc(LONG_N * sizeof *tl);
	double *vl = malloc(LONG_N * sizeof *vl);
	assert_non_null(tl);
	assert_non_null(vl);
	for (size_t i = 0; i < LONG_N; i++) {
		tl[i] = T0_MS + (int64_t)i * 1000;
		vl[i] = i == 10007 ? NAN : 50.0 + (double)(i % 5);
	}
	page = page_from(tl, vl, LONG_N, "longnan.html");
	assert_int_equal(path_moves(page, "s0"), 3);
	free(tl);
	free(vl);
	free(page);
}

/* The typical period is the median interval: exact for periodic rows, and
 * within one histogram bin (1/8 octave, a factor 2^(1/8) = 1.0905, so 9.1 %)
 * for jittery ones. */
static void test_typical_period_is_median_interval(void **state)
{
	(void)state;
	struct report_layout l;
	small_layout(&l, "K7");
	struct report rp;
	assert_int_equal(report_init(&rp, &l), 0);
	assert_int_equal(report_typical_period_ms(&rp), 0);
	struct section_result r;
	fill_result(&r, 50.0);
	int64_t t = T0_MS;
	for (unsigned i = 0; i < 1000; i++) {
		/* 90 % of intervals 1 s, 10 % of 30 s: the median is 1 s */
		t += (i % 10 == 9) ? 30000 : 1000;
		assert_int_equal(report_add_row(&rp, t, &r), 0);
	}
	assert_int_equal(report_typical_period_ms(&rp), 1000);
	report_fini(&rp);
	/* jitter of +-40 ms around 1 s (960..1040 spans two bins): the median
	 * is 1000 ms to within 9.1 % */
	assert_int_equal(report_init(&rp, &l), 0);
	t = T0_MS;
	for (unsigned i = 0; i < 1000; i++) {
		t += 960 + (int64_t)(i * 37 % 81);
		assert_int_equal(report_add_row(&rp, t, &r), 0);
	}
	const int64_t typ = report_typical_period_ms(&rp);
	assert_true(llabs(typ - 1000) <= 91);
	assert_true(typ != 1000); /* not the exact branch: the bin holds different intervals */
	report_fini(&rp);
}

static void test_out_of_order_row_is_refused(void **state)
{
	(void)state;
	struct report_layout l;
	small_layout(&l, "K7");
	struct report rp;
	assert_int_equal(report_init(&rp, &l), 0);
	struct section_result r;
	fill_result(&r, 50.0);
	assert_int_equal(report_add_row(&rp, T0_MS + 5000, &r), 0);
	assert_int_equal(report_add_row(&rp, T0_MS, &r), -EINVAL);
	assert_int_equal(report_bucket_count(&rp), 1);
	assert_int_equal(report_add_event(&rp, T0_MS, 0, "ALARM", 1.0), -EINVAL);
	assert_int_equal(report_add_event(&rp, T0_MS, 0, "unack", 1.0), -EINVAL);
	report_fini(&rp);
}

/* UNACK at row 100 and NORM at row 200 of 400 rows at 1 s on a high-priority
 * alarm: one shaded rectangle per chart of the section, from x(100 s) to
 * x(200 s). The plot spans x 72..1146 over 399 s. */
static void test_alarm_period_is_shaded_in_priority_colour(void **state)
{
	(void)state;
	struct report_layout l;
	small_layout(&l, "K7");
	struct report rp;
	assert_int_equal(report_init(&rp, &l), 0);
	struct section_result r;
	for (unsigned i = 0; i < 400; i++) {
		const int64_t t = T0_MS + (int64_t)i * 1000;
		fill_result(&r, i >= 100 && i < 200 ? 85.0 : 60.0);
		assert_int_equal(report_add_row(&rp, t, &r), 0);
		if (i == 100)
			assert_int_equal(report_add_event(&rp, t, 0, "unacknowledged", 85.0), 0);
		if (i == 150)
			assert_int_equal(report_add_event(&rp, t, 0, "acknowledged", 85.0), 0);
		if (i == 200)
			assert_int_equal(report_add_event(&rp, t, 0, "normal", 60.0), 0);
	}
	struct report_summary sum;
	report_summary_clear(&sum);
	char path[128];
	tmp_path(path, sizeof path, "shade.html");
	assert_int_equal(report_write(&rp, path, &sum), 0);
	report_fini(&rp);
	char *page = slurp(path, NULL);
	/* x(100 s) = 72 + 100/399*1074 = 341.2; width 100/399*1074 = 269.2 */
	const char *rect = "<rect x=\"341.2\" y=\"28.0\" width=\"269.2\" height=\"200.0\" "
			   "fill=\"rgba(240,130,40,0.35)\"/>";
	assert_non_null(strstr(page, rect));
	assert_int_equal(count_of(page, "<rect x=\"341.2\""), 6); /* the six tray charts */
	assert_null(strstr(page, "fill=\"rgba(215,45,45,0.32)\"/>")); /* no urgent period */
	assert_int_equal(count_of(page, "class=\"st st-"), 3);
	free(page);
}

/* 1000 short alarm periods, with the gap before every 10th one only 1 s and
 * the others 9 s: past REPORT_PERIODS_MAX the closest pairs are joined first,
 * so 744 joins leave 256 periods that still start at the first UNACK and end
 * at the last NORM. */
static void test_chattering_alarm_keeps_bounded_periods(void **state)
{
	(void)state;
	struct report_layout l;
	small_layout(&l, "K7");
	struct report rp;
	assert_int_equal(report_init(&rp, &l), 0);
	struct section_result r;
	fill_result(&r, 50.0);
	int64_t t = T0_MS;
	assert_int_equal(report_add_row(&rp, t, &r), 0);
	for (unsigned i = 0; i < 1000; i++) {
		t += (i % 10 == 0) ? 1000 : 9000;
		assert_int_equal(report_add_event(&rp, t, 0, "unacknowledged", 81.0), 0);
		t += 1000;
		assert_int_equal(report_add_event(&rp, t, 0, "normal", 79.0), 0);
	}
	assert_int_equal(report_add_row(&rp, t + 1000, &r), 0);
	const unsigned p = REPORT_PRIORITY_HIGH;
	assert_int_equal(rp.period_count[0][p], REPORT_PERIODS_MAX);
	assert_int_equal(rp.periods_joined, 1000 - REPORT_PERIODS_MAX);
	const struct report_period *pr = &rp.periods[p * REPORT_PERIODS_MAX];
	assert_true(pr[0].start_ms == T0_MS + 1000);
	assert_true(pr[REPORT_PERIODS_MAX - 1].end_ms == t);
	/* the 99 one-second gaps went first: every gap left is 9 s */
	for (unsigned i = 1; i < REPORT_PERIODS_MAX; i++)
		assert_true(pr[i].start_ms - pr[i - 1].end_ms == 9000);
	report_fini(&rp);
}

static void test_events_beyond_limit_are_counted(void **state)
{
	(void)state;
	struct report_layout l;
	small_layout(&l, "K7");
	struct report rp;
	assert_int_equal(report_init(&rp, &l), 0);
	struct section_result r;
	fill_result(&r, 50.0);
	assert_int_equal(report_add_row(&rp, T0_MS, &r), 0);
	for (unsigned i = 0; i < REPORT_EVENTS_MAX + 500; i++)
		assert_int_equal(
			report_add_event(&rp, T0_MS + i, 0, i % 2 ? "normal" : "unacknowledged", 81.0), 0);
	struct report_summary sum;
	report_summary_clear(&sum);
	char path[128];
	tmp_path(path, sizeof path, "events.html");
	assert_int_equal(report_write(&rp, path, &sum), 0);
	report_fini(&rp);
	char *page = slurp(path, NULL);
	assert_int_equal(count_of(page, "class=\"st st-"), REPORT_EVENTS_MAX);
	assert_non_null(strstr(page, "1500 in all; the first 1000 are listed, the remaining 500 "
				     "are counted but not listed"));
	free(page);
}

static void test_bad_quality_and_extrapolation_show_in_strip(void **state)
{
	(void)state;
	struct report_layout l;
	small_layout(&l, "K7");
	struct report rp;
	assert_int_equal(report_init(&rp, &l), 0);
	struct section_result r;
	for (unsigned i = 0; i < 300; i++) {
		fill_result(&r, 50.0);
		if (i >= 100 && i < 150)
			r.quality = FG_QUALITY_BAD;
		if (i >= 200 && i < 220)
			fg_extrap_note(&r.extrap, "test");
		/* 60 s without data after row 250 */
		const int64_t t = T0_MS + (int64_t)i * 1000 + (i > 250 ? 60000 : 0);
		assert_int_equal(report_add_row(&rp, t, &r), 0);
	}
	struct report_summary sum;
	report_summary_clear(&sum);
	char path[128];
	tmp_path(path, sizeof path, "quality.html");
	assert_int_equal(report_write(&rp, path, &sum), 0);
	report_fini(&rp);
	char *page = slurp(path, NULL);
	/* good, bad, good, (no data), good: four runs; one extrapolated run */
	assert_int_equal(count_of(page, "class=\"q0\"/>"), 3);
	assert_int_equal(count_of(page, "class=\"q2\"/>"), 1);
	assert_int_equal(count_of(page, "class=\"qx0\"/>"), 1);
	assert_non_null(strstr(page, "rows with bad quality: 50, uncertain: 0, extrapolated: 20"));
	free(page);
}

/* --event markers on every chart, and the alarm performance section with the
 * lead before each event: an activation at +600 s, events at +1500 s
 * (lead 900 s = 0:15:00) and +2400 s (the same activation: 0:30:00). */
static void test_event_markers_and_alarm_performance(void **state)
{
	(void)state;
	struct report_layout l;
	small_layout(&l, "K7");
	l.marker_count = 2;
	l.markers[0].t_ms = T0_MS + 1500000;
	snprintf(l.markers[0].label, sizeof l.markers[0].label, "flood <seen>");
	l.markers[1].t_ms = T0_MS + 2400000;
	struct report rp;
	assert_int_equal(report_init(&rp, &l), 0);
	struct alarmperf ap;
	enum alarm_priority pr[1] = {ALARM_PRIORITY_HIGH};
	int64_t ev[2] = {l.markers[0].t_ms, l.markers[1].t_ms};
	assert_int_equal(alarmperf_init(&ap, 1, pr, ev, 2), 0);
	struct section_result r;
	for (int i = 0; i <= 3000; i += 10) {
		fill_result(&r, i >= 600 ? 90.0 : 60.0);
		assert_int_equal(report_add_row(&rp, T0_MS + i * 1000, &r), 0);
	}
	assert_int_equal(report_add_event(&rp, T0_MS + 600000, 0, "unacknowledged", 90.0), 0);
	alarmperf_on_change(&ap, 0, T0_MS + 600000, ALARM_STATE_NORM, ALARM_STATE_UNACK);
	/* the longest state name is kept whole in the event table */
	assert_int_equal(report_add_event(&rp, T0_MS + 2900000, 0, "returned_unacknowledged",
					  60.0), 0);
	alarmperf_finish(&ap, T0_MS, T0_MS + 3000000);
	struct report_summary sum;
	report_summary_clear(&sum);
	sum.perf = &ap;
	char path[128];
	tmp_path(path, sizeof path, "markers.html");
	assert_int_equal(report_write(&rp, path, &sum), 0);
	report_fini(&rp);
	char *page = slurp(path, NULL);
	/* two markers on each of the six tray charts */
	assert_int_equal(count_of(page, "<line class=\"ev\""), 12);
	assert_int_equal(count_of(page, ">1 flood &lt;seen&gt;</text>"), 6);
	assert_non_null(strstr(page, "<h2>Alarm performance</h2>"));
	assert_non_null(strstr(page, "Lead before event 2"));
	assert_non_null(strstr(page, "<td class=\"n\">0:15:00</td><td class=\"n\">0:30:00</td>"));
	assert_non_null(strstr(page, "st-returned_unacknowledged\">returned_unacknowledged</td>"));
	/* the standing activation: 2400 s in alarm at the end of the data */
	assert_non_null(strstr(page, "<td class=\"n\">0:40:00</td>"));
	free(page);
}

/* Every alarm's watched signal is charted: a high alarm on dp_slope of a
 * tray (a field no tray chart shows) gets a chart of its own with its
 * setpoint; a second alarm on the same field shares it; a diagnostic alarm
 * (quality) gets none. */
static void test_alarm_on_an_uncharted_field_gets_its_own_chart(void **state)
{
	(void)state;
	struct report_layout l;
	small_layout(&l, "K7");
	add_alarm(&l, "K7_SLOPE_HI", 0, RF_DP_SLOPE, "high", "medium", 4.0);
	add_alarm(&l, "K7_SLOPE_HH", 0, RF_DP_SLOPE, "high-high", "high", 6.0);
	add_alarm(&l, "K7_DIAG", 0, -1, "diagnostic", "low", NAN);
	struct report rp;
	assert_int_equal(report_init(&rp, &l), 0);
	struct section_result r;
	for (int i = 0; i < 600; i += 10) {
		fill_result(&r, 70.0);
		r.v[RF_DP_SLOPE] = 2.0 + i / 200.0;
		assert_int_equal(report_add_row(&rp, T0_MS + i * 1000, &r), 0);
	}
	struct report_summary sum;
	report_summary_clear(&sum);
	char path[128];
	tmp_path(path, sizeof path, "slope.html");
	assert_int_equal(report_write(&rp, path, &sum), 0);
	report_fini(&rp);
	char *page = slurp(path, NULL);
	assert_int_equal(count_of(page, ">Watched by an alarm: dp_slope</text>"), 1);
	assert_int_equal(count_of(page, "<svg"), 6 + 1); /* the tray's six and dp_slope's */
	assert_non_null(strstr(page, ">K7_SLOPE_HI: dp_slope 4.00</text>"));
	assert_non_null(strstr(page, ">K7_SLOPE_HH: dp_slope 6.00</text>"));
	assert_int_equal(count_of(page, "<path class=\"s15\" d=\"M"), 2); /* legend + line */
	free(page);
}

/* DP in the DP tag's unit: values, axis and setpoint label in mbar
 * (100 Pa per mbar); the loads' axes name their tags' units. */
static void test_dp_in_its_tags_unit(void **state)
{
	(void)state;
	struct report_layout l;
	small_layout(&l, "K7");
	snprintf(l.sections[0].dp_unit, sizeof l.sections[0].dp_unit, "mbar");
	l.sections[0].dp_pa_per_unit = 100.0;
	snprintf(l.sections[0].load_y_tag, sizeof l.sections[0].load_y_tag, "K7_FI_GAS");
	snprintf(l.sections[0].load_y_unit, sizeof l.sections[0].load_y_unit, "t/h");
	add_alarm(&l, "K7_DP_HI", 0, RF_DP_PA, "high", "medium", 1900.0);
	struct report rp;
	assert_int_equal(report_init(&rp, &l), 0);
	struct section_result r;
	double loads[2] = {24.0, NAN};
	for (int i = 0; i < 600; i += 10) {
		fill_result(&r, 70.0); /* dp_pa 400 + 6 x 70 = 820 Pa = 8.2 mbar */
		assert_int_equal(report_add_row_loads(&rp, T0_MS + i * 1000, &r, loads), 0);
	}
	struct report_summary sum;
	report_summary_clear(&sum);
	char path[128];
	tmp_path(path, sizeof path, "dpunit.html");
	assert_int_equal(report_write(&rp, path, &sum), 0);
	report_fini(&rp);
	char *page = slurp(path, NULL);
	assert_non_null(strstr(page, "rotate(-90)\">DP, mbar</text>"));
	assert_non_null(strstr(page, ">K7_DP_HI: dp_pa 19.0 mbar</text>"));
	assert_non_null(strstr(page, "rotate(-90)\">gas, t/h</text>"));
	assert_non_null(strstr(page, ">K7_FI_GAS</text>"));
	/* the DP axis spans the data and the setpoint in mbar: 0..20 */
	assert_non_null(strstr(page, ">20</text>"));
	free(page);
}

/* With FG_REPORT_OUT set, the demo page also goes there, for the render
 * test (tests/integration/report_render.sh) to look at. */
static void test_demo_page_for_render_check(void **state)
{
	(void)state;
	const char *out = getenv("FG_REPORT_OUT");
	char path[128];
	tmp_path(path, sizeof path, "render.html");
	write_demo(out != NULL && out[0] != '\0' ? out : path);
	char *page = slurp(out != NULL && out[0] != '\0' ? out : path, NULL);
	assert_non_null(strstr(page, "</html>\n"));
	free(page);
}

static int group_setup(void **state)
{
	(void)state;
	snprintf(tmp_dir, sizeof tmp_dir, "/tmp/test_report.XXXXXX");
	return mkdtemp(tmp_dir) == NULL ? -1 : 0;
}

/* Removes every file the tests wrote, also those of a test that failed
 * half-way, then the directory. */
static int group_teardown(void **state)
{
	(void)state;
	DIR *d = opendir(tmp_dir);
	if (d == NULL)
		return -1;
	char path[320];
	for (struct dirent *e = readdir(d); e != NULL; e = readdir(d)) {
		if (strcmp(e->d_name, ".") == 0 || strcmp(e->d_name, "..") == 0)
			continue;
		snprintf(path, sizeof path, "%s/%s", tmp_dir, e->d_name);
		unlink(path);
	}
	closedir(d);
	return rmdir(tmp_dir);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(test_event_times_match_reference_dates),
		cmocka_unit_test(test_fixed_format_rounds_without_locale),
		cmocka_unit_test(test_fixed_format_matches_printf),
		cmocka_unit_test(test_init_rejects_inconsistent_layout),
		cmocka_unit_test(test_page_has_sections_charts_setpoints_and_caution),
		cmocka_unit_test(test_names_are_html_escaped),
		cmocka_unit_test(test_two_runs_give_identical_files),
		cmocka_unit_test(test_write_goes_through_temp_file),
		cmocka_unit_test(test_million_rows_keep_bucket_count_bounded),
		cmocka_unit_test(test_time_gap_breaks_the_line),
		cmocka_unit_test(test_gap_survives_bucket_merge),
		cmocka_unit_test(test_nan_breaks_the_line),
		cmocka_unit_test(test_typical_period_is_median_interval),
		cmocka_unit_test(test_out_of_order_row_is_refused),
		cmocka_unit_test(test_alarm_period_is_shaded_in_priority_colour),
		cmocka_unit_test(test_chattering_alarm_keeps_bounded_periods),
		cmocka_unit_test(test_events_beyond_limit_are_counted),
		cmocka_unit_test(test_bad_quality_and_extrapolation_show_in_strip),
		cmocka_unit_test(test_event_markers_and_alarm_performance),
		cmocka_unit_test(test_alarm_on_an_uncharted_field_gets_its_own_chart),
		cmocka_unit_test(test_dp_in_its_tags_unit),
		cmocka_unit_test(test_demo_page_for_render_check),
	};
	return cmocka_run_group_tests_name("report", tests, group_setup, group_teardown);
}
