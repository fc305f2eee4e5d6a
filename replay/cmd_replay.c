/*
 * cmd_replay.c - `floodgauge replay`: the live engine, driven from a
 * historian CSV instead of the plant.
 *
 * One pass over the file (or the files of one series, in time order): each
 * row becomes one engine step at the row's own time; results go to
 * results.csv, alarm transitions to events.jsonl, and a bounded summary of
 * the series to report.html. Rows the reader had to skip are counted and
 * the first of them reported with their line numbers.
 *
 * The stages, each in its own file: reader (histread.c, run in a thread of
 * its own, rows handed over through rowqueue.c) -> engine (engine.c) ->
 * writers (results.c, formatting and writing in a thread of its own; the
 * events lines here, alarmperf.c, report.c). This
 * file wires them: the command line, the outputs, the loops, the summary.
 */
#include <assert.h>
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <time.h>
#include <unistd.h>

#include "alarmperf.h"
#include "commands.h"
#include "histread.h"
#include "offline.h"
#include "engine.h"
#include "numfmt.h"
#include "opwindow.h"
#include "report.h"
#include "results.h"
#include "rowqueue.h"
#include "timefmt.h"

/* Files of one series (`replay -c FILE a.csv b.csv ...`): a year as twelve
 * monthly exports. */
#define REPLAY_FILES_MAX 4096

/* Laid out by who writes what once the reader thread runs: a line of
 * memory that one thread writes per row and the other reads per row moves
 * between the cores each time (false sharing). In one perf profile of the
 * bench replay the loads of ahead_mask beside rd_rows_used were 5 % of the
 * engine thread's samples and 4 % of the reader's. So the reader's fields
 * and the engine side's each start a line of their own (REPLAY_LINE), and
 * the fields set up before the threads start, only read after, come first. */
#define REPLAY_LINE 64
struct replay {
	/* -- set up before the threads start; read-only while they run -- */
	const char *data_paths[REPLAY_FILES_MAX]; /* in time order once sorted */
	unsigned data_count;
	uint64_t bytes_all;               /* progress over every file */
	unsigned threads;                 /* --threads: 2 (reader and results writer apart) or 1 */
	/* With 2 threads the reader thread also evaluates the sections in
	 * ahead_mask, on an engine of its own (engine_premodel),
	 * for the rows use_row will take: its own copy of use_row's verdicts. */
	uint64_t ahead_mask;
	unsigned ahead_count;
	uint64_t bytes_first;             /* size of a single data file (progress) */
	const char *out_dir;
	int64_t from_t_ms, to_t_ms;       /* INT64_MIN / INT64_MAX when open */
	const char *from_text, *to_text;  /* --from/--to as given (read in the zone) */
	const char *event_text[REPORT_MARKERS_MAX]; /* --event as given */
	unsigned event_text_count;
	struct histread_opts hopts;
	struct fg_config *cfg;
	struct engine *eng;
	bool no_results;                  /* --no-results: no results.csv at all */
	int64_t results_every_ms;         /* --results-every S in ms, 0: every row */
	char path_results[FG_PATH_MAX + 32], path_events[FG_PATH_MAX + 32],
		path_report[FG_PATH_MAX + 32], path_summary[FG_PATH_MAX + 32];

	/* -- the queue between them: shared by design, a chunk at a time -- */
	_Alignas(REPLAY_LINE) struct rowq q; /* reader -> engine, with 2 threads */

	/* -- the reader's: written per row by the reader thread (by the only
	 * thread, with --threads 1) -- */
	_Alignas(REPLAY_LINE) struct histread hist;
	const char *data_path;            /* the file being read */
	uint64_t bytes_before;            /* progress: the files before this one */
	struct csvread_stats all;         /* counters summed over the files */
	struct engine *ahead;             /* evaluates the sections in ahead_mask */
	uint64_t rd_rows_used;
	int64_t rd_prev_t_ms;
	struct rowq_chunk *fill;          /* the chunk being filled */
	int reader_rc;                    /* the reader thread's exit status */
	double values[FG_TAGS_MAX];       /* the row read */
	enum tag_status status[FG_TAGS_MAX];
	unsigned text_tags[ROWQ_TEXTS];   /* its status texts, for the queue */
	const char *texts[ROWQ_TEXTS];

	/* -- the engine side's: written per row by the engine thread -- */
	_Alignas(REPLAY_LINE) const struct engine_premodel *cur_pre; /* this row's, NULL: evaluate here */
	uint64_t bytes_seen;              /* reader progress as the engine last saw it */
	uint64_t rows_overlap;            /* rows not after the previous file's last */
	uint64_t rows_used, rows_outside;
	int64_t prev_t_ms;
	bool pending;                     /* a row waits for the end of its interval */
	int64_t pending_t_ms, pending_slot;
	FILE *results, *events;
	struct results_writer rw;         /* results.csv rows, when written */
	/* on a line apart from rw's last fields, which the results writer's
	 * thread writes per number */
	_Alignas(REPLAY_LINE) struct report rp;
	struct report_summary sum;
	struct alarmperf perf;
	/* the operating window: per section, the tag values at the row of the
	 * highest flood_index, and the largest x load seen */
	double ref_flood[FG_SECTIONS_MAX];
	int64_t ref_t_ms[FG_SECTIONS_MAX];
	double x_max[FG_SECTIONS_MAX];
	double loads[2 * FG_SECTIONS_MAX];
	double (*ref_vals)[FG_TAGS_MAX];
	unsigned marker_count;           /* --event, in the order given */
	struct report_marker markers[REPORT_MARKERS_MAX];
}; /* (its alignment pads its size to whole lines: nothing after it shares the last) */

static void replay_usage(FILE *f)
{
	fprintf(f, "usage: floodgauge replay -c FILE DATA.csv... [--out DIR] [--from T] [--to T]\n"
		   "                        [--tz ZONE] [--event T[=LABEL]]...\n"
		   "                        [--no-results | --results-every S] [--threads N]\n\n"
		   "Runs the monitor's engine over recorded data (a historian export, wide:\n"
		   "a time column and one column per tag, or long: time,tag,value[,status];\n"
		   "ISO 8601 or epoch seconds, ',' or ';') and writes DIR/results.csv,\n"
		   "DIR/events.jsonl, DIR/summary.json (alarm performance figures) and\n"
		   "DIR/report.html (default DIR: floodgauge-replay).\n"
		   "--from/--to limit the rows to a time window (seconds optional).\n"
		   "--event marks a known moment (e.g. the flood seen by the operators) on\n"
		   "every chart and gives each alarm's lead time before it; repeat it for\n"
		   "more (at most %d). Its time is read like --from, in the --tz zone.\n"
		   "Several files are one series, taken in the time order of their first\n"
		   "rows (rows where they overlap are skipped and counted).\n"
		   "--threads 1 reads, evaluates and writes in one thread (default 2: the\n"
		   "reader apart, also evaluating some sections ahead, and the results.csv\n"
		   "writer in a thread of its own; the output is the same byte for byte).\n"
		   "--no-results skips results.csv (events, summary and report are still\n"
		   "written; an old results.csv in DIR is removed); --results-every S writes\n"
		   "one results row per S seconds of data, the last sample of each interval.\n"
		   HISTREAD_USAGE
		   "Exit status: 0 ok, 1 output could not be written, 2 bad config or data.\n",
		REPORT_MARKERS_MAX);
}

/* --event T[=LABEL]: the time is the text before the first '=' (ISO 8601
 * has none), read like --from in the zone of the data. */
static int parse_event(struct replay *rp, const char *s)
{
	assert(rp->marker_count < REPORT_MARKERS_MAX);
	struct report_marker *m = &rp->markers[rp->marker_count];
	const char *eq = strchr(s, '=');
	char t[64], err[512];
	size_t tlen = eq ? (size_t)(eq - s) : strlen(s);
	if (tlen >= sizeof(t)) {
		fprintf(stderr, "floodgauge replay: --event '%s': not a time\n", s);
		return -EINVAL;
	}
	memcpy(t, s, tlen);
	t[tlen] = '\0';
	if (histread_time_arg(&rp->hist, "--event", t, &m->t_ms, err, sizeof(err)) != 0) {
		fprintf(stderr, "floodgauge replay: %s (use --event T or --event T=LABEL)\n", err);
		return -EINVAL;
	}
	const char *label = eq ? eq + 1 : "";
	if (strlen(label) >= sizeof(m->label)) {
		fprintf(stderr, "floodgauge replay: --event: label '%s' is longer than %zu "
				"characters\n", label, sizeof(m->label) - 1);
		return -EINVAL;
	}
	snprintf(m->label, sizeof(m->label), "%s", label);
	rp->marker_count++;
	return 0;
}

/* --from/--to, read once the zone is known (the config may name it). */
static int window_times(struct replay *rp)
{
	char err[512];
	if ((rp->from_text != NULL &&
	     histread_time_arg(&rp->hist, "--from", rp->from_text, &rp->from_t_ms, err,
			       sizeof(err)) != 0) ||
	    (rp->to_text != NULL &&
	     histread_time_arg(&rp->hist, "--to", rp->to_text, &rp->to_t_ms, err, sizeof(err)) !=
		     0)) {
		fprintf(stderr, "floodgauge replay: %s\n", err);
		return EXIT_USAGE;
	}
	for (unsigned i = 0; i < rp->event_text_count; i++)
		if (parse_event(rp, rp->event_text[i]) != 0)
			return EXIT_USAGE;
	return 0;
}

/* --results-every S: seconds (a decimal), at least 1 ms, at most a year. */
static int parse_every(const char *text, int64_t *every_ms)
{
	char *end;
	errno = 0;
	double s = strtod(text, &end);
	if (end == text || *end != '\0' || errno != 0 || !(s >= 0.001) || s > 3.2e7) {
		fprintf(stderr, "floodgauge replay: --results-every '%s': give seconds, 0.001 to "
				"32000000\n", text);
		return -EINVAL;
	}
	*every_ms = llround(s * 1000.0);
	return 0;
}

static int parse_args(struct replay *rp, int argc, char **argv, const char **cfg_path)
{
	static const struct option opts[] = {{"config", required_argument, NULL, 'c'},
					     {"out", required_argument, NULL, 'o'},
					     {"from", required_argument, NULL, 'f'},
					     {"to", required_argument, NULL, 't'},
					     {"event", required_argument, NULL, 'e'},
					     {"help", no_argument, NULL, 'h'},
					     {"no-results", no_argument, NULL, 'R'},
					     {"results-every", required_argument, NULL, 'E'},
					     {"threads", required_argument, NULL, 'T'},
					     HISTREAD_LONG_OPTIONS,
					     {0}};
	int ch;
	optind = 1;
	while ((ch = getopt_long(argc, argv, "c:o:h", opts, NULL)) != -1) {
		switch (ch) {
		case 'c': *cfg_path = optarg; break;
		case 'o': rp->out_dir = optarg; break;
		case 'f': rp->from_text = optarg; break;
		case 't': rp->to_text = optarg; break;
		case 'e':
			if (rp->event_text_count >= REPORT_MARKERS_MAX) {
				fprintf(stderr, "floodgauge replay: --event: at most %d events\n",
					REPORT_MARKERS_MAX);
				return EXIT_USAGE;
			}
			rp->event_text[rp->event_text_count++] = optarg;
			break;
		case 'h': replay_usage(stdout); return -1;
		case 'R': rp->no_results = true; break;
		case 'T':
			if (strcmp(optarg, "1") != 0 && strcmp(optarg, "2") != 0) {
				fprintf(stderr, "floodgauge replay: --threads is 1 or 2\n");
				return EXIT_USAGE;
			}
			rp->threads = (unsigned)(optarg[0] - '0');
			break;
		case 'E':
			if (parse_every(optarg, &rp->results_every_ms) != 0)
				return EXIT_USAGE;
			break;
		default:
			if (histread_opts_take(&rp->hopts, ch, optarg))
				break;
			replay_usage(stderr);
			return EXIT_USAGE;
		}
	}
	if (*cfg_path == NULL || optind >= argc) {
		replay_usage(stderr);
		return EXIT_USAGE;
	}
	if (argc - optind > REPLAY_FILES_MAX) {
		fprintf(stderr, "floodgauge replay: at most %d data files\n", REPLAY_FILES_MAX);
		return EXIT_USAGE;
	}
	if (rp->no_results && rp->results_every_ms > 0) {
		fprintf(stderr, "floodgauge replay: --no-results and --results-every exclude each "
				"other\n");
		return EXIT_USAGE;
	}
	for (int i = optind; i < argc; i++)
		rp->data_paths[rp->data_count++] = argv[i];
	rp->data_path = rp->data_paths[0];
	return 0;
}

static int open_outputs(struct replay *rp)
{
	if (mkdir(rp->out_dir, 0777) != 0 && errno != EEXIST) {
		fprintf(stderr, "floodgauge replay: cannot create %s: %s\n", rp->out_dir,
			strerror(errno));
		return EXIT_RUNTIME;
	}
	snprintf(rp->path_results, sizeof(rp->path_results), "%s/results.csv", rp->out_dir);
	snprintf(rp->path_events, sizeof(rp->path_events), "%s/events.jsonl", rp->out_dir);
	snprintf(rp->path_report, sizeof(rp->path_report), "%s/report.html", rp->out_dir);
	snprintf(rp->path_summary, sizeof(rp->path_summary), "%s/summary.json", rp->out_dir);
	if (rp->no_results) {
		/* A results.csv of an earlier run would look like this run's. */
		if (unlink(rp->path_results) != 0 && errno != ENOENT) {
			fprintf(stderr, "floodgauge replay: cannot remove %s: %s\n",
				rp->path_results, strerror(errno));
			return EXIT_RUNTIME;
		}
	} else {
		rp->results = fopen(rp->path_results, "w");
	}
	rp->events = fopen(rp->path_events, "w");
	if ((rp->results == NULL && !rp->no_results) || rp->events == NULL) {
		fprintf(stderr, "floodgauge replay: cannot write in %s: %s\n", rp->out_dir,
			strerror(errno));
		return EXIT_RUNTIME;
	}
	static char buf[1 << 16];
	if (rp->results != NULL)
		setvbuf(rp->results, buf, _IOFBF, sizeof(buf));
	return 0;
}

/* Sorts the files by the time of their first row (files without rows go
 * last) and adds up their sizes for the progress line. */
static int order_files(struct replay *rp)
{
	static int64_t first_t[REPLAY_FILES_MAX];
	static double values[FG_TAGS_MAX];
	static enum tag_status status[FG_TAGS_MAX];
	char err[512];
	for (unsigned i = 0; i < rp->data_count; i++) {
		if (histread_open(&rp->hist, rp->data_paths[i], NULL, err, sizeof(err)) != 0) {
			fprintf(stderr, "floodgauge replay: %s\n", err);
			csvread_close(&rp->hist.csv);
			return -EINVAL;
		}
		uint64_t done, total;
		histread_progress(&rp->hist, &done, &total);
		rp->bytes_all += total;
		int64_t t;
		first_t[i] = histread_next(&rp->hist, &t, values, status) == 1 ? t : INT64_MAX;
		csvread_close(&rp->hist.csv);
	}
	for (unsigned i = 1; i < rp->data_count; i++) /* insertion sort, stable */
		for (unsigned j = i; j > 0 && first_t[j - 1] > first_t[j]; j--) {
			int64_t t = first_t[j];
			first_t[j] = first_t[j - 1];
			first_t[j - 1] = t;
			const char *p = rp->data_paths[j];
			rp->data_paths[j] = rp->data_paths[j - 1];
			rp->data_paths[j - 1] = p;
		}
	return 0;
}

static int bind_columns(struct replay *rp)
{
	char err[512];
	if (histread_init(&rp->hist, rp->cfg, &rp->hopts, err, sizeof(err)) != 0) {
		fprintf(stderr, "floodgauge replay: %s\n", err);
		return EXIT_USAGE;
	}
	int rc = window_times(rp);
	if (rc != 0)
		return rc;
	if (rp->data_count > 1 && order_files(rp) != 0)
		return EXIT_USAGE;
	rp->data_path = rp->data_paths[0];
	if (histread_open(&rp->hist, rp->data_path, stderr, err, sizeof(err)) != 0) {
		fprintf(stderr, "floodgauge replay: %s\n", err);
		return EXIT_USAGE;
	}
	return 0;
}

/* Where a section's loads come from: gas flow (y) and liquid flow, else the
 * level (x); and the DP tag's unit. */
static void section_tags(const struct fg_config *cfg, unsigned k, struct report_section *rs)
{
	const struct section_cfg *s = &cfg->sections[k];
	int g = s->signal[SIGNAL_GAS_FLOW], l = s->signal[SIGNAL_LIQUID_FLOW];
	int x = l >= 0 ? l : s->signal[SIGNAL_LEVEL], dp = s->signal[SIGNAL_DP];
	if (g >= 0) {
		snprintf(rs->load_y_tag, FG_NAME_MAX, "%s", cfg->tags[g].name);
		snprintf(rs->load_y_unit, REPORT_WORD_MAX, "%s",
			 cfg->tags[g].unit ? cfg->tags[g].unit->name : "");
	}
	if (x >= 0) {
		snprintf(rs->load_x_tag, FG_NAME_MAX, "%s", cfg->tags[x].name);
		snprintf(rs->load_x_unit, REPORT_WORD_MAX, "%s",
			 cfg->tags[x].unit ? cfg->tags[x].unit->name : "");
		snprintf(rs->load_x_what, REPORT_WORD_MAX, "%s", l >= 0 ? "liquid flow" : "level");
	}
	if (dp >= 0 && cfg->tags[dp].unit != NULL && units_usable_as_dp(cfg->tags[dp].unit)) {
		snprintf(rs->dp_unit, REPORT_WORD_MAX, "%s", cfg->tags[dp].unit->name);
		rs->dp_pa_per_unit = cfg->tags[dp].unit->factor;
	}
	if (s->geom.type == SECTION_BUBBLE || s->geom.type == SECTION_PACKED_BUBBLE)
		rs->overflow_m = s->geom.bubble.overflow_height_m;
}

static int marker_cmp(const void *a, const void *b)
{
	int64_t x = ((const struct report_marker *)a)->t_ms;
	int64_t y = ((const struct report_marker *)b)->t_ms;
	return (x > y) - (x < y);
}

static int report_layout_from(struct replay *rp)
{
	static struct report_layout lay;
	const struct fg_config *cfg = rp->cfg;
	memset(&lay, 0, sizeof(lay));
	snprintf(lay.plant, sizeof(lay.plant), "%s", cfg->monitor.name);
	if (rp->data_count > 1)
		snprintf(lay.data_file, sizeof(lay.data_file), "%s and %u more files", rp->data_path,
			 rp->data_count - 1);
	else
		snprintf(lay.data_file, sizeof(lay.data_file), "%s", rp->data_path);
	lay.section_count = cfg->section_count;
	for (unsigned i = 0; i < cfg->section_count; i++) {
		snprintf(lay.sections[i].name, FG_NAME_MAX, "%s", cfg->sections[i].name);
		snprintf(lay.sections[i].type, REPORT_WORD_MAX, "%s",
			 config_section_type_name(cfg->sections[i].geom.type));
		section_tags(cfg, i, &lay.sections[i]);
	}
	lay.alarm_count = cfg->alarm_count;
	for (unsigned i = 0; i < cfg->alarm_count; i++) {
		const struct alarm_cfg *a = &cfg->alarms[i];
		struct report_alarm *ra = &lay.alarms[i];
		snprintf(ra->name, FG_NAME_MAX, "%s", a->name);
		ra->section_index = (int)a->section_index;
		ra->field = a->field;
		snprintf(ra->kind, REPORT_WORD_MAX, "%s", alarm_kind_name(a->kind));
		snprintf(ra->priority, REPORT_WORD_MAX, "%s", alarm_priority_name(a->priority));
		ra->setpoint = a->kind == ALARM_KIND_DIAGNOSTIC ? NAN : a->setpoint;
	}
	qsort(rp->markers, rp->marker_count, sizeof(rp->markers[0]), marker_cmp);
	lay.marker_count = rp->marker_count;
	for (unsigned i = 0; i < rp->marker_count; i++)
		lay.markers[i] = rp->markers[i];
	if (report_init(&rp->rp, &lay) != 0) {
		fprintf(stderr, "floodgauge replay: cannot set up the report\n");
		return EXIT_RUNTIME;
	}
	return 0;
}

/* Time above (high kinds) or below (low) the setpoint, per alarm. */
static void accumulate_above(struct replay *rp, double dt_s)
{
	const struct fg_config *cfg = rp->cfg;
	for (unsigned i = 0; i < cfg->alarm_count; i++) {
		const struct alarm_cfg *a = &cfg->alarms[i];
		bool hi = a->kind == ALARM_KIND_HIGH || a->kind == ALARM_KIND_HIGH_HIGH;
		if (!hi && a->kind != ALARM_KIND_LOW)
			continue;
		if (isnan(rp->sum.above_setpoint_s[i]))
			rp->sum.above_setpoint_s[i] = 0.0;
		double v = rp->eng->sec[a->section_index].r.v[a->field];
		if (isfinite(v) && (hi ? v >= a->setpoint : v <= a->setpoint))
			rp->sum.above_setpoint_s[i] += dt_s;
	}
}

static int write_events(struct replay *rp)
{
	const struct engine *e = rp->eng;
	for (unsigned k = 0; k < engine_event_count(e); k++) {
		const struct alarm_event *ev = &e->events[k];
		const struct alarm_cfg *a = &rp->cfg->alarms[ev->alarm_index];
		const char *sec = rp->cfg->sections[a->section_index].name;
		char ts[TIMEFMT_BUF_SIZE], line[1024];
		timefmt_format(ev->t_ms, ts, sizeof(ts));
		if (alarm_event_json(ev, a, sec, ts, line, sizeof(line)) < 0)
			return -ENOSPC;
		fprintf(rp->events, "%s\n", line);
		report_add_event(&rp->rp, ev->t_ms, (int)ev->alarm_index, alarm_state_name(ev->state),
				 ev->value);
		alarmperf_on_change(&rp->perf, ev->alarm_index, ev->t_ms, ev->prev, ev->state);
		if (ev->state == ALARM_STATE_UNACK && ev->prev != ALARM_STATE_ACKED) {
			rp->sum.raised[a->priority]++;
			int64_t *first = &rp->sum.first_alarm_t_ms[a->section_index];
			if (*first == REPORT_T_NONE)
				*first = ev->t_ms;
		}
	}
	return 0;
}

_Static_assert((int)REPORT_PRIORITY_URGENT == (int)ALARM_PRIORITY_URGENT &&
		       (int)REPORT_PRIORITY_LOW == (int)ALARM_PRIORITY_LOW,
	       "report and alarm priorities share their order");

static int64_t floor_div_ms(int64_t t, int64_t d)
{
	int64_t q = t / d;
	return (t % d != 0 && (t < 0) != (d < 0)) ? q - 1 : q;
}

/* The results of the row waiting for the end of its --results-every
 * interval (copied: the engine moves on). */
static struct section_result pending_res[FG_SECTIONS_MAX];

static int flush_pending(struct replay *rp)
{
	if (!rp->pending)
		return 0;
	const struct section_result *res[FG_SECTIONS_MAX];
	for (unsigned s = 0; s < rp->cfg->section_count; s++)
		res[s] = &pending_res[s];
	rp->pending = false;
	return results_writer_row(&rp->rw, rp->pending_t_ms, res);
}

/* One row of results.csv: every row, none (--no-results), or the last row
 * of each interval of --results-every (intervals aligned to the epoch, so
 * the same data give the same rows whatever --from says). */
static int write_results(struct replay *rp, int64_t t_ms,
			 const struct section_result *const *res)
{
	if (rp->no_results)
		return 0;
	if (rp->results_every_ms == 0)
		return results_writer_row(&rp->rw, t_ms, res);
	int64_t slot = floor_div_ms(t_ms, rp->results_every_ms);
	if (rp->pending && slot != rp->pending_slot && flush_pending(rp) != 0)
		return -EIO;
	for (unsigned s = 0; s < rp->cfg->section_count; s++)
		pending_res[s] = *res[s];
	rp->pending = true;
	rp->pending_t_ms = t_ms;
	rp->pending_slot = slot;
	return 0;
}

static double tag_now(const struct engine *e, int ti)
{
	if (ti < 0 || e->tags[ti].quality == FG_QUALITY_BAD)
		return NAN;
	return e->tags[ti].value;
}

/* The loads of every section in their tags' units, for the report; and the
 * row of each section's highest flood_index, whose tag values set the
 * operating window's limits. */
static void track_loads(struct replay *rp, int64_t t_ms)
{
	static double ref_vals[FG_SECTIONS_MAX][FG_TAGS_MAX];
	const struct fg_config *cfg = rp->cfg;
	const struct engine *e = rp->eng;
	for (unsigned k = 0; k < cfg->section_count; k++) {
		const struct section_cfg *s = &cfg->sections[k];
		int l = s->signal[SIGNAL_LIQUID_FLOW];
		rp->loads[2 * k] = tag_now(e, s->signal[SIGNAL_GAS_FLOW]);
		rp->loads[2 * k + 1] = tag_now(e, l >= 0 ? l : s->signal[SIGNAL_LEVEL]);
		if (isfinite(rp->loads[2 * k + 1]) && !(rp->loads[2 * k + 1] <= rp->x_max[k]))
			rp->x_max[k] = rp->loads[2 * k + 1];
		double fi = e->sec[k].r.v[RF_FLOOD_INDEX];
		if (e->sec[k].r.quality == FG_QUALITY_BAD || !isfinite(fi) ||
		    !isfinite(rp->loads[2 * k]) || fi <= rp->ref_flood[k])
			continue;
		rp->ref_flood[k] = fi;
		rp->ref_t_ms[k] = t_ms;
		for (unsigned ti = 0; ti < cfg->tag_count; ti++)
			ref_vals[k][ti] = e->tags[ti].value;
	}
	rp->ref_vals = ref_vals;
}

/* The operating windows, at the end of the run. */
static void set_windows(struct replay *rp)
{
	for (unsigned k = 0; k < rp->cfg->section_count; k++) {
		static struct report_window w;
		memset(&w, 0, sizeof(w));
		if (rp->ref_vals == NULL || rp->ref_t_ms[k] == REPORT_T_NONE ||
		    opwindow_compute(rp->cfg, k, rp->ref_vals[k], rp->x_max[k] * 1.25, &w) != 0)
			continue;
		w.ref_t_ms = rp->ref_t_ms[k];
		report_set_window(&rp->rp, k, &w);
	}
}

static int step_row(struct replay *rp, int64_t t_ms, const double *values,
		    const enum tag_status *status)
{
	engine_step_ahead(rp->eng, t_ms, values, status, rp->cur_pre != NULL ? rp->ahead_mask : 0,
			  rp->cur_pre);
	const struct section_result *res[FG_SECTIONS_MAX];
	for (unsigned s = 0; s < rp->cfg->section_count; s++)
		res[s] = &rp->eng->sec[s].r;
	if (write_results(rp, t_ms, res) != 0 || write_events(rp) != 0)
		return -EIO;
	engine_events_clear(rp->eng);
	track_loads(rp, t_ms);
	report_add_row_at(&rp->rp, t_ms, res, rp->loads);
	if (rp->rows_used > 0) {
		/* Gaps longer than ten periods count for one period only. */
		double dt_s = (double)(t_ms - rp->prev_t_ms) / 1000.0;
		accumulate_above(rp, fmin(dt_s, 10.0 * rp->cfg->monitor.period_s));
	}
	if (rp->rows_used == 0)
		rp->sum.first_t_ms = t_ms;
	rp->sum.last_t_ms = t_ms;
	rp->prev_t_ms = t_ms;
	rp->rows_used++;
	return 0;
}

static double wall_s(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (double)ts.tv_sec + (double)ts.tv_nsec * 1e-9;
}

static void progress(const struct replay *rp, double t0, double *next, bool final)
{
	double now = wall_s();
	if (!final && now < *next)
		return;
	*next = now + 0.5;
	uint64_t done = 0, total = 0;
	if (rp->threads == 2) { /* the reader's own counters belong to its thread */
		done = rp->bytes_seen;
		total = rp->data_count > 1 ? rp->bytes_all : rp->bytes_first;
	} else {
		histread_progress(&rp->hist, &done, &total);
		if (rp->data_count > 1) {
			done += rp->bytes_before;
			total = rp->bytes_all;
		}
	}
	double rate = (double)rp->rows_used / fmax(now - t0, 1e-3);
	if (total > 0 && done > 0) {
		double left = (now - t0) * (double)(total - done) / (double)done;
		fprintf(stderr, "\r%llu rows, %.0f rows/s, %3.0f %%, %.0f s left   ",
			(unsigned long long)rp->rows_used, rate, 100.0 * (double)done / (double)total,
			left);
	} else {
		fprintf(stderr, "\r%llu rows, %.0f rows/s   ", (unsigned long long)rp->rows_used, rate);
	}
	if (final)
		fputc('\n', stderr);
}

static int perf_init(struct replay *rp)
{
	static enum alarm_priority prio[FG_ALARMS_MAX];
	int64_t ev[REPORT_MARKERS_MAX];
	for (unsigned i = 0; i < rp->cfg->alarm_count; i++)
		prio[i] = rp->cfg->alarms[i].priority;
	for (unsigned i = 0; i < rp->marker_count; i++)
		ev[i] = rp->markers[i].t_ms;
	return alarmperf_init(&rp->perf, rp->cfg->alarm_count, prio, ev, rp->marker_count);
}

static int write_summary_json(struct replay *rp)
{
	static const char *names[FG_ALARMS_MAX];
	for (unsigned i = 0; i < rp->cfg->alarm_count; i++)
		names[i] = rp->cfg->alarms[i].name;
	FILE *f = fopen(rp->path_summary, "w");
	int rc = f == NULL ? -errno : alarmperf_write_summary(&rp->perf, names, f);
	if (f != NULL && fclose(f) != 0 && rc == 0)
		rc = -EIO;
	if (rc != 0)
		fprintf(stderr, "floodgauge replay: cannot write %s: %s\n", rp->path_summary,
			strerror(-rc));
	return rc;
}

/* The alarm performance figures, with the definition each one follows. */
static void print_perf(const struct replay *rp)
{
	const struct alarmperf *ap = &rp->perf;
	printf("  alarm performance (activations, chattering: 3+ in 60 s, ISA-18.2; fleeting: "
	       "under 10 s, EEMUA 191):\n");
	printf("    %-24s %6s %6s %6s %9s %9s  %-20s", "alarm", "activ", "chatt", "fleet",
	       "in alarm", "longest", "first activation");
	if (ap->event_count > 0)
		printf(" %9s", "lead");
	putchar('\n');
	for (unsigned i = 0; i < ap->alarm_count; i++) {
		const struct alarmperf_alarm *a = &ap->a[i];
		char tin[NUMFMT_DURATION_SIZE], lng[NUMFMT_DURATION_SIZE], lead[NUMFMT_DURATION_SIZE];
		char first[TIMEFMT_BUF_SIZE] = "-";
		numfmt_duration(a->time_in_alarm_s, tin, sizeof(tin));
		numfmt_duration(a->longest_active_s, lng, sizeof(lng));
		if (a->first_activation_t_ms != ALARMPERF_T_NONE)
			timefmt_format(a->first_activation_t_ms, first, sizeof(first));
		printf("    %-24s %6llu %6llu %6llu %9s %9s  %-20s", rp->cfg->alarms[i].name,
		       (unsigned long long)a->activations,
		       (unsigned long long)a->chattering_episodes, (unsigned long long)a->fleeting,
		       tin, lng, first);
		if (ap->event_count > 0) {
			numfmt_duration(alarmperf_lead_s(ap, i, 0), lead, sizeof(lead));
			printf(" %9s", lead);
		}
		putchar('\n');
	}
	struct alarmperf_overall o;
	alarmperf_overall(ap, &o);
	printf("    alarm rate per 10 min (clock-aligned periods, EEMUA 191 / ISA-18.2): "
	       "average %.2f, max %.0f; periods with more than 10: %.1f %%\n",
	       o.rate_per_10min_avg, o.rate_per_10min_max, o.pct_10min_over_10);
	printf("    standing alarms at the end (EEMUA 191): %u; priority share (EEMUA 191):",
	       o.standing_alarms);
	for (int p = ALARM_PRIORITY_COUNT - 1; p >= 0; p--) {
		if (isfinite(o.priority_share[p]))
			printf(" %s %.1f %%", alarm_priority_name((enum alarm_priority)p),
			       100.0 * o.priority_share[p]);
		else
			printf(" %s -", alarm_priority_name((enum alarm_priority)p));
	}
	putchar('\n');
	for (unsigned k = 0; k < rp->marker_count; k++) {
		char t[TIMEFMT_BUF_SIZE];
		timefmt_format(ap->event_t_ms[k], t, sizeof(t));
		if (k == 0)
			printf("    lead = event time - start of the last activation before it; "
			       "lead_s in summary.json is for the first event\n");
		printf("    event %u at %s%s%s\n", k + 1, t, rp->markers[k].label[0] ? ": " : "",
		       rp->markers[k].label);
	}
}

/* Ends the current file: its warnings, its counters into rp->all. */
static void end_file(struct replay *rp)
{
	const struct csvread_stats *st = histread_stats(&rp->hist);
	offline_warn_skipped(&rp->hist, "replay", rp->data_path);
	rp->all.rows_read += st->rows_read;
	rp->all.rows_malformed += st->rows_malformed;
	rp->all.rows_unsorted += st->rows_unsorted;
	rp->all.rows_duplicate += st->rows_duplicate;
	uint64_t done, total;
	histread_progress(&rp->hist, &done, &total);
	rp->bytes_before += done;
}

/* Opens file fi of the series (the reader keeps its zone and bindings). */
static int next_file(struct replay *rp, unsigned fi)
{
	char err[512];
	csvread_close(&rp->hist.csv);
	rp->data_path = rp->data_paths[fi];
	if (histread_open(&rp->hist, rp->data_path, stderr, err, sizeof(err)) != 0) {
		fprintf(stderr, "floodgauge replay: %s\n", err);
		return EXIT_USAGE;
	}
	return 0;
}

enum row_verdict { ROW_USED, ROW_OUTSIDE, ROW_OVERLAP };

/* Whether a row at t_ms is used, given how many were used before and the
 * last one's time: use_row's rule, which the reader thread applies too. */
static enum row_verdict row_verdict(const struct replay *rp, int64_t t_ms, uint64_t used,
				    int64_t prev_t_ms)
{
	if (t_ms < rp->from_t_ms || t_ms > rp->to_t_ms)
		return ROW_OUTSIDE;
	/* Files of one series may overlap: a row not after the last one used
	 * is out of time order, as within a file. */
	if (used > 0 && t_ms <= prev_t_ms)
		return ROW_OVERLAP;
	return ROW_USED;
}

/* One row through the engine and the writers, unless --from/--to or an
 * overlap of files leaves it out. Returns 0 or EXIT_RUNTIME. */
static int use_row(struct replay *rp, int64_t t_ms, const double *values,
		   const enum tag_status *status)
{
	enum row_verdict v = row_verdict(rp, t_ms, rp->rows_used, rp->prev_t_ms);
	/* The reader thread worked out the models of exactly these rows. */
	assert(rp->ahead_mask == 0 || rp->threads == 1 || (v == ROW_USED) == (rp->cur_pre != NULL));
	if (v == ROW_OUTSIDE) {
		rp->rows_outside++;
		return 0;
	}
	if (v == ROW_OVERLAP) {
		rp->rows_overlap++;
		return 0;
	}
	if (step_row(rp, t_ms, values, status) != 0) {
		fprintf(stderr, "floodgauge replay: writing %s: %s\n", rp->out_dir, strerror(errno));
		return EXIT_RUNTIME;
	}
	return 0;
}

/* Reads every file in order, handing each row to row(): the single-thread
 * loop, and the reader thread's. Returns 0, or the exit status. */
static int read_all(struct replay *rp, int (*row)(struct replay *, int64_t, const double *,
						    const enum tag_status *))
{
	double *values = rp->values;
	enum tag_status *status = rp->status;
	int64_t t_ms;
	int rc = 0;
	for (unsigned fi = 0; fi < rp->data_count; fi++) {
		if (fi > 0 && (rc = next_file(rp, fi)) != 0)
			return rc;
		while ((rc = histread_next(&rp->hist, &t_ms, values, status)) == 1)
			if ((rc = row(rp, t_ms, values, status)) != 0)
				return rc;
		if (rc < 0) {
			fprintf(stderr, "floodgauge replay: reading %s: %s\n", rp->data_path,
				strerror(-rc));
			return EXIT_RUNTIME;
		}
		end_file(rp);
	}
	return 0;
}

static double progress_t0, progress_next;
static bool progress_tty; /* stderr is a terminal (asked once, not per row) */

static int row_direct(struct replay *rp, int64_t t_ms, const double *values,
		      const enum tag_status *status)
{
	offline_take_texts(&rp->hist, rp->eng);
	int rc = use_row(rp, t_ms, values, status);
	if (rc == 0 && progress_tty)
		progress(rp, progress_t0, &progress_next, false);
	return rc;
}

/* ---- two threads: the reader apart (rowqueue.h) ------------------------ */

static void publish(struct replay *rp, int end_rc)
{
	uint64_t done, total;
	histread_progress(&rp->hist, &done, &total);
	rp->fill->bytes_done = rp->bytes_before + done;
	rp->fill->end_rc = end_rc;
	rowq_fill_end(&rp->q, rp->fill);
	rp->fill = end_rc == 1 ? rowq_fill_begin(&rp->q) : NULL;
}

/* What the reader thread worked out ahead for one row (rowq_extra). */
struct ahead_row {
	bool used;                        /* use_row will take the row */
	struct engine_premodel pre[];     /* ahead_count, when used */
};

static void work_ahead(struct replay *rp, struct ahead_row *x, int64_t t_ms,
		       const double *values, const enum tag_status *status)
{
	x->used = row_verdict(rp, t_ms, rp->rd_rows_used, rp->rd_prev_t_ms) == ROW_USED;
	if (!x->used)
		return;
	rp->rd_rows_used++;
	rp->rd_prev_t_ms = t_ms;
	engine_premodel(rp->ahead, t_ms, values, status, rp->ahead_mask, x->pre);
}

/* The sections the reader thread evaluates: the heaviest first, each to
 * the thread with less work so far, in rough hundreds of ns per row
 * (`benchtool engine` and callgrind on the bench and demo configs, after
 * the closed-form DP exponent): parsing a row and the hand-over about 2 on
 * the reader's side; the alarms, the report and the other tags' checks
 * about 3 on the engine's (results.csv is formatted in a thread of its
 * own); a section with its tags and soft sensors 6 (tray, 600 ns), 5
 * (packed, 520-600 ns), 4 (spray), 2 (the others, 190-250 ns). Which
 * thread evaluates a section changes no result, only how fast the replay
 * runs. */
static void choose_ahead(struct replay *rp)
{
	const struct fg_config *cfg = rp->cfg;
	double cost[FG_SECTIONS_MAX];
	double reader = 2.0, engine = 3.0;
	for (unsigned i = 0; i < cfg->section_count; i++) {
		switch (cfg->sections[i].geom.type) {
		case SECTION_TRAY: cost[i] = 6.0; break;
		case SECTION_PACKED: cost[i] = 5.0; break;
		case SECTION_SPRAY: cost[i] = 4.0; break;
		default: cost[i] = 2.0; break;
		}
	}
	rp->ahead_mask = 0;
	rp->ahead_count = 0;
	uint64_t done = 0;
	for (unsigned n = 0; n < cfg->section_count; n++) {
		unsigned best = 0;
		double best_cost = -1.0;
		for (unsigned i = 0; i < cfg->section_count; i++)
			if (!(done >> i & 1u) && cost[i] > best_cost) {
				best = i;
				best_cost = cost[i];
			}
		done |= 1ull << best;
		if (reader < engine) {
			reader += best_cost;
			rp->ahead_mask |= 1ull << best;
			rp->ahead_count++;
		} else {
			engine += best_cost;
		}
	}
}

static int row_queued(struct replay *rp, int64_t t_ms, const double *values,
		      const enum tag_status *status)
{
	unsigned *tags = rp->text_tags;
	const char **texts = rp->texts;
	unsigned n = histread_text_count(&rp->hist);
	for (unsigned k = 0; k < n && k < ROWQ_TEXTS; k++)
		histread_text_at(&rp->hist, k, &tags[k], &texts[k]);
	if (n > ROWQ_TEXTS)
		n = ROWQ_TEXTS;
	if (rp->fill == NULL)
		return -ECANCELED;
	if (!rowq_add(&rp->q, rp->fill, t_ms, values, status, n, tags, texts)) {
		publish(rp, 1);
		if (rp->fill == NULL)
			return -ECANCELED; /* the engine side gave up */
		bool ok = rowq_add(&rp->q, rp->fill, t_ms, values, status, n, tags, texts);
		assert(ok);
		(void)ok;
	}
	if (rp->ahead_mask != 0)
		work_ahead(rp, rowq_extra(&rp->q, rp->fill, rp->fill->row_count - 1), t_ms, values, status);
	return 0;
}

static void *reader_main(void *arg)
{
	struct replay *rp = arg;
	rp->fill = rowq_fill_begin(&rp->q);
	int rc = rp->fill != NULL ? read_all(rp, row_queued) : 0;
	rp->reader_rc = rc == -ECANCELED ? 0 : rc;
	if (rp->fill != NULL)
		publish(rp, rc == 0 ? 0 : -1);
	return NULL;
}

/* The engine and writers' side: takes chunks until the end marker. */
static int engine_side(struct replay *rp)
{
	for (;;) {
		struct rowq_chunk *c = rowq_take_begin(&rp->q);
		for (unsigned r = 0; r < c->row_count; r++) {
			const struct rowq_row *row = &c->rows[r];
			for (unsigned k = 0; k < row->text_count; k++)
				engine_tag_status_text(rp->eng, c->text_tag[row->text_first + k],
						       c->text[row->text_first + k]);
			rp->cur_pre = NULL;
			if (rp->ahead_mask != 0) {
				const struct ahead_row *x = rowq_extra(&rp->q, c, r);
				rp->cur_pre = x->used ? x->pre : NULL;
			}
			if (use_row(rp, row->t_ms, rowq_values(&rp->q, c, r),
				    rowq_status(&rp->q, c, r)) != 0) {
				rowq_take_end(&rp->q, c);
				rowq_cancel(&rp->q);
				return EXIT_RUNTIME;
			}
		}
		rp->bytes_seen = c->bytes_done;
		bool end = c->end_rc != 1;
		rowq_take_end(&rp->q, c);
		if (progress_tty)
			progress(rp, progress_t0, &progress_next, false);
		if (end)
			return 0;
	}
}

static int run_threaded(struct replay *rp)
{
	uint64_t done;
	histread_progress(&rp->hist, &done, &rp->bytes_first);
	choose_ahead(rp);
	/* The reader's engine on lines of its own, as the fields in struct replay. */
	size_t ahead_bytes = (sizeof *rp->ahead + REPLAY_LINE - 1) / REPLAY_LINE * REPLAY_LINE;
	rp->ahead = rp->ahead_mask != 0 ? aligned_alloc(REPLAY_LINE, ahead_bytes) : NULL;
	bool bad = rowq_init(&rp->q, rp->cfg->tag_count) != 0;
	/* Without results.csv the reader and the engine are the only busy
	 * threads: on two cores or more a wait spins before it sleeps. Timed
	 * side by side on 1 M bench rows (the 2-core VM): medians 1.29 -> 1.14 s
	 * in a busy spell of its host, 1.003 -> 0.997 s on a quiet minute. With
	 * the results writer's thread also running it made the replay slower
	 * (2.06 -> 2.41 s), so not then. */
	if (!bad)
		rowq_set_spin(&rp->q, rp->no_results && rowq_cores_for_two());
	if (!bad && rp->ahead_mask != 0)
		bad = rp->ahead == NULL ||
		      rowq_set_extra(&rp->q, sizeof(struct ahead_row) +
					     rp->ahead_count * sizeof(struct engine_premodel)) != 0;
	if (bad) {
		rowq_fini(&rp->q);
		free(rp->ahead);
		fprintf(stderr, "floodgauge replay: out of memory\n");
		return EXIT_RUNTIME;
	}
	if (rp->ahead != NULL)
		engine_init(rp->ahead, rp->cfg);
	rp->rd_rows_used = 0;
	rp->rd_prev_t_ms = 0;
	pthread_t reader;
	if (pthread_create(&reader, NULL, reader_main, rp) != 0) {
		rowq_fini(&rp->q);
		free(rp->ahead);
		fprintf(stderr, "floodgauge replay: cannot start the reader thread\n");
		return EXIT_RUNTIME;
	}
	int rc = engine_side(rp);
	pthread_join(reader, NULL);
	rowq_fini(&rp->q);
	free(rp->ahead);
	rp->ahead = NULL;
	return rc != 0 ? rc : rp->reader_rc;
}

static int run_rows(struct replay *rp)
{
	progress_t0 = wall_s();
	progress_next = progress_t0 + 0.5;
	progress_tty = isatty(STDERR_FILENO);
	int rc = rp->threads == 2 ? run_threaded(rp) : read_all(rp, row_direct);
	if (rc != 0)
		return rc;
	if (progress_tty)
		progress(rp, progress_t0, &progress_next, true);
	if (rp->rows_overlap > 0)
		fprintf(stderr, "floodgauge replay: %llu rows skipped where the files overlap in "
				"time\n", (unsigned long long)rp->rows_overlap);
	return 0;
}

static void print_summary(const struct replay *rp)
{
	const struct fg_config *cfg = rp->cfg;
	const struct report_summary *s = &rp->sum;
	char a[TIMEFMT_BUF_SIZE] = "-", b[TIMEFMT_BUF_SIZE] = "-";
	if (rp->rows_used > 0) {
		timefmt_format(s->first_t_ms, a, sizeof(a));
		timefmt_format(s->last_t_ms, b, sizeof(b));
	}
	char span[NUMFMT_DURATION_SIZE];
	numfmt_duration(rp->rows_used ? (double)(s->last_t_ms - s->first_t_ms) / 1000.0 : 0.0, span,
			sizeof(span));
	if (rp->data_count > 1)
		printf("replay of %u files (%s ... %s) on %s\n", rp->data_count, rp->data_paths[0],
		       rp->data_paths[rp->data_count - 1], cfg->monitor.name);
	else
		printf("replay of %s on %s\n", rp->data_path, cfg->monitor.name);
	printf("  rows used %llu, from %s to %s (%s)\n", (unsigned long long)rp->rows_used, a, b,
	       span);
	printf("  rows skipped: %llu malformed, %llu out of time order, %llu duplicate time, "
	       "%llu outside --from/--to\n", (unsigned long long)s->rows_malformed,
	       (unsigned long long)s->rows_unsorted, (unsigned long long)s->rows_duplicate,
	       (unsigned long long)rp->rows_outside);
	const struct csvread_stats *st = histread_stats(&rp->hist);
	if (st->cells_text > 0)
		printf("  samples the historian marked bad (reason historian_status): %llu\n",
		       (unsigned long long)st->cells_text);
	printf("  alarms raised: urgent %llu, high %llu, medium %llu, low %llu\n",
	       (unsigned long long)s->raised[REPORT_PRIORITY_URGENT],
	       (unsigned long long)s->raised[REPORT_PRIORITY_HIGH],
	       (unsigned long long)s->raised[REPORT_PRIORITY_MEDIUM],
	       (unsigned long long)s->raised[REPORT_PRIORITY_LOW]);
	printf("  first alarm per section:\n");
	for (unsigned i = 0; i < cfg->section_count; i++) {
		char t[TIMEFMT_BUF_SIZE] = "none";
		if (s->first_alarm_t_ms[i] != REPORT_T_NONE)
			timefmt_format(s->first_alarm_t_ms[i], t, sizeof(t));
		printf("    %-16s %s\n", cfg->sections[i].name, t);
	}
	printf("  time beyond setpoint (h:mm:ss):\n");
	for (unsigned i = 0; i < cfg->alarm_count; i++) {
		char d[NUMFMT_DURATION_SIZE];
		if (!isfinite(s->above_setpoint_s[i]))
			continue;
		numfmt_duration(s->above_setpoint_s[i], d, sizeof(d));
		printf("    %-24s %10s\n", cfg->alarms[i].name, d);
	}
	print_perf(rp);
	if (rp->no_results)
		printf("  wrote %s, %s, %s (no results.csv: --no-results)\n", rp->path_events,
		       rp->path_summary, rp->path_report);
	else
		printf("  wrote %s, %s, %s, %s\n", rp->path_results, rp->path_events,
		       rp->path_summary, rp->path_report);
	fg_caution_print(stdout);
}

static int replay_run(struct replay *rp)
{
	int rc = bind_columns(rp);
	if (rc == 0)
		rc = open_outputs(rp);
	if (rc == 0)
		rc = report_layout_from(rp);
	if (rc != 0)
		return rc;
	engine_init(rp->eng, rp->cfg);
	report_summary_clear(&rp->sum);
	for (unsigned k = 0; k < FG_SECTIONS_MAX; k++) {
		rp->ref_flood[k] = -INFINITY;
		rp->ref_t_ms[k] = REPORT_T_NONE;
		rp->x_max[k] = NAN;
	}
	if (perf_init(rp) != 0)
		return EXIT_RUNTIME;
	if (rp->results != NULL && results_write_header(rp->results, rp->cfg) != 0)
		return EXIT_RUNTIME;
	/* With two threads, results.csv is formatted and written in a third:
	 * on two cores the engine and the formatter then run side by side
	 * (the reader is light), and the bytes are the same. */
	if (rp->results != NULL &&
	    results_writer_start(&rp->rw, rp->results, rp->cfg, rp->threads == 2) != 0) {
		fprintf(stderr, "floodgauge replay: cannot set up the results writer\n");
		return EXIT_RUNTIME;
	}
	rc = run_rows(rp);
	if (rc != 0)
		return rc;
	rp->sum.rows_read = rp->all.rows_read;
	rp->sum.rows_malformed = rp->all.rows_malformed;
	rp->sum.rows_unsorted = rp->all.rows_unsorted + rp->rows_overlap;
	rp->sum.rows_duplicate = rp->all.rows_duplicate;
	if ((rp->results != NULL && (flush_pending(rp) != 0 || results_writer_finish(&rp->rw) != 0 ||
				     fflush(rp->results) != 0)) ||
	    fflush(rp->events) != 0) {
		fprintf(stderr, "floodgauge replay: writing %s: %s\n", rp->out_dir, strerror(errno));
		return EXIT_RUNTIME;
	}
	if (rp->rows_used == 0) {
		fprintf(stderr, "floodgauge replay: %s: no data rows%s\n", rp->data_path,
			rp->rows_outside ? " inside --from/--to" : "");
		return EXIT_USAGE;
	}
	alarmperf_finish(&rp->perf, rp->sum.first_t_ms, rp->sum.last_t_ms);
	set_windows(rp);
	rp->sum.perf = &rp->perf;
	if (write_summary_json(rp) != 0)
		return EXIT_RUNTIME;
	if (report_write(&rp->rp, rp->path_report, &rp->sum) != 0) {
		fprintf(stderr, "floodgauge replay: cannot write %s\n", rp->path_report);
		return EXIT_RUNTIME;
	}
	print_summary(rp);
	return 0;
}

int cmd_replay(int argc, char **argv)
{
	static struct replay rp;
	memset(&rp, 0, sizeof(rp));
	rp.out_dir = "floodgauge-replay";
	rp.from_t_ms = INT64_MIN;
	rp.threads = 2;
	rp.to_t_ms = INT64_MAX;
	const char *cfg_path = NULL;
	int rc = parse_args(&rp, argc, argv, &cfg_path);
	if (rc != 0)
		return rc < 0 ? 0 : rc;
	rc = offline_setup(cfg_path, &rp.cfg, &rp.eng);
	if (rc != 0)
		goto out_free;
	rc = replay_run(&rp);
out_free:
	results_writer_finish(&rp.rw); /* after an error: ends its thread */
	if (rp.results)
		fclose(rp.results);
	if (rp.events)
		fclose(rp.events);
	report_fini(&rp.rp);
	histread_fini(&rp.hist);
	free(rp.eng);
	free(rp.cfg);
	return rc;
}
