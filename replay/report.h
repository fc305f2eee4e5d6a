/*
 * report.h - the replay report: one self-contained HTML page with inline SVG
 * trend charts, for a process engineer reviewing an upset.
 *
 * The replay command feeds the report one row of section results at a time
 * (after the engine has run) and every alarm event, then writes the page once
 * at the end. Memory stays bounded for any number of rows: all sections share
 * one grid of at most REPORT_BUCKETS_MAX time buckets, each keeping the first,
 * minimum, maximum and last value of every charted series. When a row falls
 * past the last bucket, neighbouring buckets are merged in pairs and the
 * bucket width doubles, so a spike of one sample still shows as the extreme
 * of its bucket. The event table keeps the first REPORT_EVENTS_MAX events and
 * counts the rest. Alarm shading keeps exact start and end times, at most
 * REPORT_PERIODS_MAX periods per section and priority.
 *
 * Allocation happens in report_init() only; report_add_row() and
 * report_add_event() never allocate. report_write() allocates nothing either
 * beyond stdio's own buffer.
 *
 * The page is byte-identical for the same input: numbers are formatted by our
 * own fixed-precision code (no locale), times as ISO 8601 UTC from the data,
 * never the wall clock.
 */
#ifndef REPORT_H
#define REPORT_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include "alarmperf.h"
#include "fg_limits.h"
#include "fg_result.h"

/* Time buckets per series. 2048 is about two buckets per pixel of the chart
 * width, so merging is invisible on screen and on paper. */
#define REPORT_BUCKETS_MAX 2048

/* Events listed in the table. An upset of a few sections raises tens to
 * hundreds of events; a chattering alarm can raise millions, and a table of
 * more than a thousand rows is no longer read. The rest are counted. */
#define REPORT_EVENTS_MAX 1000

/* Alarm-active periods kept per section and priority. Past this, the two
 * periods closest together are joined (the gap between them shaded too), so
 * a chattering alarm costs no more memory and still shows as active. */
#define REPORT_PERIODS_MAX 256

/* Short strings in the layout: section type, alarm kind, priority, state. */
#define REPORT_WORD_MAX 16

/* "No time": first alarm of a section that raised none, first/last time of
 * a file with no rows. */
#define REPORT_T_NONE INT64_MIN

_Static_assert(REPORT_BUCKETS_MAX % 2 == 0, "buckets merge in pairs");
_Static_assert(REPORT_BUCKETS_MAX >= 64, "charts need some resolution");

/* Alarm priorities, in the order of the summary table. */
enum report_priority {
	REPORT_PRIORITY_LOW,
	REPORT_PRIORITY_MEDIUM,
	REPORT_PRIORITY_HIGH,
	REPORT_PRIORITY_URGENT,
	REPORT_PRIORITY_COUNT
};

/* Shading kinds: the four priorities and "other" (an unknown priority name). */
#define REPORT_SHADE_KINDS (REPORT_PRIORITY_COUNT + 1)

struct report_section {
	char name[FG_NAME_MAX];        /* section name from the config */
	char type[REPORT_WORD_MAX];    /* "tray", "packed", "spray", "bubble", "packed-bubble",
					  "stirred" or "loop" */
	/* The loads that drive the section, charted in their tags' own units
	 * (report_add_row_loads): y = the gas flow, x = the liquid flow, or the
	 * level for a column without liquid through-flow. Empty when none. */
	char load_y_tag[FG_NAME_MAX], load_y_unit[REPORT_WORD_MAX];
	char load_x_tag[FG_NAME_MAX], load_x_unit[REPORT_WORD_MAX];
	char load_x_what[REPORT_WORD_MAX];  /* "liquid flow" or "level" */
	/* DP charted in the DP tag's unit: dp_unit and Pa per one of it (0 or
	 * "" = Pa). */
	char dp_unit[REPORT_WORD_MAX];
	double dp_pa_per_unit;
	double overflow_m;             /* bubble: overflow height for the level chart; 0 = none */
};

/* Points along a limit line of the operating window. */
#define REPORT_WINDOW_POINTS 41

/* The operating window of one section (report_set_window): gas load against
 * the x load, in the tags' units, with the model's limits computed at the
 * recorded properties (the operating point named by ref_t_ms). A limit value
 * is NAN where it does not exist (e.g. no flooding within reach). */
struct report_window {
	bool set;
	int64_t ref_t_ms;              /* the row whose P, T and properties were used */
	double x[REPORT_WINDOW_POINTS];
	double y_flood[REPORT_WINDOW_POINTS];  /* model flood limit, capacity_factor 1 */
	double y_cal[REPORT_WINDOW_POINTS];    /* calibrated limit (capacity_factor) */
	double y_weep[REPORT_WINDOW_POINTS];   /* tray weep limit */
	bool has_cal, has_weep;
	char note[FG_TEXT_MAX];        /* what was drawn and what not, for the caption */
};

struct report_alarm {
	char name[FG_NAME_MAX];        /* alarm name from the config */
	int section_index;             /* index into report_layout.sections */
	int field;                     /* enum result_field it watches, -1 = diagnostic */
	char kind[REPORT_WORD_MAX];    /* "high", "low", "rate", "deviation", "diagnostic" */
	char priority[REPORT_WORD_MAX];/* "low", "medium", "high", "urgent" */
	double setpoint;               /* in the field's SI unit; NAN for diagnostic */
};

/* A labelled moment (replay --event T=LABEL), marked on every chart. */
struct report_marker {
	int64_t t_ms;
	char label[FG_NAME_MAX];       /* may be empty */
};
#define REPORT_MARKERS_MAX ALARMPERF_EVENTS_MAX

struct report_layout {
	char plant[FG_TEXT_MAX];       /* plant / monitor name for the header */
	char data_file[FG_PATH_MAX];   /* the replayed data file, as given */
	unsigned section_count;        /* 1..FG_SECTIONS_MAX */
	struct report_section sections[FG_SECTIONS_MAX];
	unsigned alarm_count;          /* 0..FG_ALARMS_MAX */
	struct report_alarm alarms[FG_ALARMS_MAX];
	unsigned marker_count;         /* 0..REPORT_MARKERS_MAX, ascending time */
	struct report_marker markers[REPORT_MARKERS_MAX];
};

/* Filled by the caller (the replay command) before report_write(). */
struct report_summary {
	uint64_t rows_read;            /* data rows read from the file */
	uint64_t rows_malformed;       /* skipped: could not be parsed */
	uint64_t rows_unsorted;        /* skipped: time earlier than the previous row */
	uint64_t rows_duplicate;       /* skipped: same time as the previous row */
	int64_t first_t_ms;            /* first row time, Unix ms UTC, or REPORT_T_NONE */
	int64_t last_t_ms;             /* last row time, Unix ms UTC, or REPORT_T_NONE */
	uint64_t raised[REPORT_PRIORITY_COUNT];        /* alarms raised (to unacknowledged) per priority */
	int64_t first_alarm_t_ms[FG_SECTIONS_MAX];     /* per section, or REPORT_T_NONE */
	double above_setpoint_s[FG_ALARMS_MAX];        /* per alarm, s; NAN = not applicable */
	const struct alarmperf *perf;  /* finished alarm performance figures, or NULL */
};

/* Charted series per section, in drawing order. */
enum report_series {
	REPORT_SERIES_FLOOD_INDEX,
	REPORT_SERIES_FLOOD_PCT,
	REPORT_SERIES_DP,
	REPORT_SERIES_DP_MODEL,
	REPORT_SERIES_HOLDUP,
	REPORT_SERIES_LOAD_Y,          /* gas load, tag unit (report_add_row_loads) */
	REPORT_SERIES_LOAD_X,          /* liquid load or level, tag unit */
	REPORT_SERIES_WEEP,            /* the signals alarms of each type watch */
	REPORT_SERIES_CARRYOVER,
	REPORT_SERIES_GAS_HOLDUP,
	REPORT_SERIES_GAS_HOLDUP_DP,
	REPORT_SERIES_EXPANDED_LEVEL,
	/* Three series whose field depends on the section's type (packed-bubble,
	 * stirred, loop): report_type_series_field(). */
	REPORT_SERIES_TYPE_A,
	REPORT_SERIES_TYPE_B,
	REPORT_SERIES_TYPE_C,
	/* Up to REPORT_ALARM_SERIES fields the section's alarms watch that its
	 * type's charts do not show, each on a chart of its own. */
	REPORT_SERIES_ALARM0,
	REPORT_SERIES_ALARM1,
	REPORT_SERIES_ALARM2,
	REPORT_SERIES_ALARM3,
	REPORT_SERIES_COUNT
};

#define REPORT_ALARM_SERIES 4

/* One bucket of one series. Only finite values enter first/min/max/last. */
struct report_cell {
	double first, min, max, last;
	uint32_t finite_count;         /* finite samples in the bucket */
	uint32_t nan_count;            /* NAN or infinite samples in the bucket */
};

/* One bucket of the shared time grid (rows, not values). */
struct report_slot {
	int64_t t_first_ms;            /* time of the first row in the bucket */
	int64_t t_last_ms;             /* time of the last row in the bucket */
	int64_t gap_before_ms;         /* from the previous row to t_first_ms; 0 for row one */
	int64_t gap_inside_ms;         /* longest interval between two rows inside the bucket */
	uint32_t row_count;            /* rows in the bucket, 0 = empty */
};

/* One bucket of one section's state: worst quality and extrapolation. */
struct report_mark {
	uint8_t quality;               /* worst enum fg_quality of the bucket's rows */
	uint8_t extrapolated;          /* 1 when any row was extrapolated */
};

/* A period during which at least one alarm of a section and priority was
 * active; end_ms is INT64_MAX while it lasts. */
struct report_period {
	int64_t start_ms, end_ms;
};

/* Log-spaced histogram of row intervals, 8 bins per octave, to find the
 * typical sample period (its median) without keeping the intervals. */
#define REPORT_DT_BINS (8 * 64)

struct report_event {
	int64_t t_ms;
	int alarm_index;
	char state[32];                /* an ISA-18.2 state name, the longest 23 characters */
	double value;
};

/* Private: use the functions below. Defined here so it can live on the
 * caller's stack or inside another struct (in-place init). */
struct report {
	int series_field[FG_SECTIONS_MAX][REPORT_SERIES_COUNT]; /* enum result_field, -1: none */
	/* The series of series_field that have a field, as (series, field)
	 * pairs, so that a row visits only those (report_add_row_loads). */
	unsigned char field_series_count[FG_SECTIONS_MAX];
	unsigned char field_series[FG_SECTIONS_MAX][REPORT_SERIES_COUNT][2];
	unsigned width_shift;          /* width_ms = 2^width_shift */
	struct report_layout layout;
	int64_t origin_ms;             /* start of bucket 0 */
	int64_t width_ms;              /* bucket width, a power of two >= 1 */
	size_t bucket_count;           /* buckets in use, last used index + 1 */
	bool started;                  /* the first row or event has set origin_ms */
	int64_t prev_row_ms;           /* time of the previous row, or REPORT_T_NONE */
	int64_t t_min_ms, t_max_ms;    /* first and last row time, REPORT_T_NONE when no row */
	uint64_t row_count;            /* rows added */
	struct report_slot *slots;     /* [REPORT_BUCKETS_MAX] */
	struct report_cell *cells;     /* [section][series][bucket] */
	struct report_mark *marks;     /* [section][bucket] */
	uint64_t dt_hist[REPORT_DT_BINS];
	int64_t last_dt_ms;         /* the last step and its bin (dt_bin once per step length) */
	unsigned last_dt_bin;
	int64_t dt_bin_min_ms[REPORT_DT_BINS]; /* shortest and longest interval in each bin */
	int64_t dt_bin_max_ms[REPORT_DT_BINS];
	uint64_t sec_rows_bad[FG_SECTIONS_MAX];
	uint64_t sec_rows_uncertain[FG_SECTIONS_MAX];
	uint64_t sec_rows_extrap[FG_SECTIONS_MAX];
	bool alarm_active[FG_ALARMS_MAX];
	uint8_t alarm_shade[FG_ALARMS_MAX];   /* shading kind of each alarm's priority */
	unsigned active_count[FG_SECTIONS_MAX][REPORT_SHADE_KINDS]; /* alarms active now */
	struct report_period *periods;        /* [section][kind][REPORT_PERIODS_MAX] */
	unsigned period_count[FG_SECTIONS_MAX][REPORT_SHADE_KINDS];
	uint64_t periods_joined;              /* joins forced by REPORT_PERIODS_MAX */
	struct report_window *windows; /* [section_count] */
	struct report_event *events;   /* [REPORT_EVENTS_MAX] */
	size_t event_count;            /* events kept, <= REPORT_EVENTS_MAX */
	uint64_t events_dropped;       /* events counted but not kept */
};

/* Copies the layout and allocates the bucket grid. Returns 0, -EINVAL when
 * the layout is inconsistent (no section, a count above its limit, an alarm
 * pointing at no section or field, a string without its NUL) or -ENOMEM; on
 * failure rp holds nothing to free (report_fini is still safe). */
int report_init(struct report *rp, const struct report_layout *layout);

/* Records one row: results[i] for section i, section_count entries. Rows must
 * come in rising time; a row earlier than the previous one is ignored and
 * -EINVAL returned (the caller skips unsorted rows before this). Returns 0. */
int report_add_row(struct report *rp, int64_t t_ms, const struct section_result *results);

/* The same with the loads of every section: loads[2k] the gas load (y) and
 * loads[2k + 1] the x load of section k, in their tags' units (NAN = none).
 * loads may be NULL. */
int report_add_row_loads(struct report *rp, int64_t t_ms, const struct section_result *results,
			 const double *loads);

/* The same with results[i] pointing at section i's result (where the
 * results lie, without copying them together). */
int report_add_row_at(struct report *rp, int64_t t_ms, const struct section_result *const *results,
		      const double *loads);

/* Sets the operating window of section k (copied). Returns 0 or -EINVAL. */
int report_set_window(struct report *rp, unsigned k, const struct report_window *w);

/* Records one alarm event. state is one of the ISA-18.2 names alarm_state_name
 * gives (normal, unacknowledged, acknowledged, returned_unacknowledged,
 * shelved, suppressed_by_design, out_of_service); an alarm counts as active
 * (and is shaded) in unacknowledged and acknowledged.
 * Returns 0, or -EINVAL for an unknown state (event ignored). */
int report_add_event(struct report *rp, int64_t t_ms, int alarm_index, const char *state,
		     double value);

/* Writes the page to path through path.new, fsync and rename. Returns 0, or
 * a negative errno (-EIO when a write failed); on failure path is untouched
 * and path.new removed. */
int report_write(const struct report *rp, const char *path, const struct report_summary *sum);

/* Frees the grid. NULL-safe; rp may be reused with report_init afterwards. */
void report_fini(struct report *rp);

/* Sets every count of sum to zero and every time to REPORT_T_NONE, every
 * above_setpoint_s to NAN. */
void report_summary_clear(struct report_summary *sum);

/* Index of a priority name ("low", "medium", "high", "urgent"), or -1. */
int report_priority_lookup(const char *name);

/* Buckets in use (<= REPORT_BUCKETS_MAX) and their width, for tests and the
 * replay command's progress line. */
size_t report_bucket_count(const struct report *rp);
int64_t report_bucket_width_ms(const struct report *rp);

/* Typical sample period, ms: the median row interval, exact when the
 * intervals in the median's histogram bin are all equal (a periodic
 * historian), else the middle of that bin's range (within 1/8 octave, 9 %).
 * 0 with fewer than two rows. Intervals above 3x this break the lines. */
int64_t report_typical_period_ms(const struct report *rp);

/* Formats v with exactly decimals (0..9) digits after the point, without
 * the locale: "-12.50". NAN and inf give "-". Values too large for the
 * requested decimals lose decimals; |v| >= 9e15 gives ">9e15" or "<-9e15".
 * Returns the length, or -ENOSPC (buf then holds ""). */
int report_format_fixed(double v, int decimals, char *buf, size_t buf_size);

#endif
