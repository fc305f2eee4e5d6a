/*
 * cmd_tune.c - `floodgauge tune`: alarm what-if on recorded data.
 *
 * How it is built. The engine runs once over the file, exactly as replay runs
 * it, and after every row the input the chosen alarm was given
 * (engine_alarm_input: value, reference, quality, suppression, diagnostic
 * reason) is stored with the row's time. Each candidate setting (the grid of
 * --setpoint x --deadband x --on-delay) then runs only a fresh copy of the
 * alarm's state machine over the stored inputs and feeds its state changes to
 * the same figures replay writes to summary.json (replay/alarmperf.c). An
 * alarm's state machine depends on nothing but its own inputs, so each
 * candidate's figures equal those of a full replay with that setting in the
 * config; tests/cli/test_tune.py checks that they do.
 *
 * Which candidates are worth a look: "nuisance" counts the activations and
 * chattering episodes that begin outside the two hours before any --event,
 * and the useful lead is the first event's lead_s when the activation behind
 * it began inside those two hours (an alarm standing since long before is a
 * nuisance, not an early warning). A candidate is marked pareto when no other
 * has at least as much useful lead and at most as much nuisance, and is
 * better in one. Without --event there is no lead and the least nuisance wins.
 */
#include <assert.h>
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdbool.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "alarmperf.h"
#include "commands.h"
#include "engine.h"
#include "histread.h"
#include "offline.h"
#include "numfmt.h"
#include "timefmt.h"

/* Values per axis and candidates in all: a grid beyond these is a typo. */
#define TUNE_AXIS_MAX 1000
#define TUNE_CANDIDATES_MAX 100000
/* The window before an event in which an activation is an early warning. */
#define TUNE_WARNING_WINDOW_MS (2LL * 3600 * 1000)

struct axis {
	const char *text;           /* as given, or NULL: the configured value only */
	double v[TUNE_AXIS_MAX];
	unsigned count;
};

struct stored {
	int64_t *t_ms;
	struct alarm_input *in;
	size_t count, cap;
};

struct candidate {
	double setpoint, deadband, on_delay_s;
	struct alarmperf_alarm fig; /* the figures, finished */
	double lead_s;              /* before the first event, NAN when none */
	double useful_lead_s;       /* lead_s when it began in the warning window, else -inf */
	uint64_t nuisance;
	bool pareto;
};

struct tune {
	const char *data_path, *alarm_name;
	const char *from_text, *to_text;
	int64_t from_t_ms, to_t_ms;
	const char *event_text[ALARMPERF_EVENTS_MAX];
	unsigned event_count;
	int64_t event_t_ms[ALARMPERF_EVENTS_MAX];
	bool json;
	struct histread_opts hopts;
	struct axis ax[3];          /* setpoint, deadband, on-delay */
	struct fg_config *cfg;
	struct engine *eng;
	struct histread hist;
	unsigned ai;
	struct stored st;
	struct candidate *cand;
	size_t cand_count;
};

static void tune_usage(FILE *f)
{
	fputs("usage: floodgauge tune -c FILE DATA.csv --alarm NAME [--setpoint A:B:STEP]\n"
	      "                       [--deadband A:B:STEP] [--on-delay A:B:STEP]\n"
	      "                       [--event T]... [--from T] [--to T] [--tz ZONE] [--json]\n\n"
	      "Alarm what-if on recorded data: runs the engine once over the file, then\n"
	      "replays only the alarm's state machine for every combination of the given\n"
	      "settings (A to B in steps of STEP, or one value; the config's value where\n"
	      "an option is left out) and prints the figures of summary.json for each.\n"
	      "Candidates marked pareto are beaten by no other on both lead time before\n"
	      "the first --event (counted only for activations in the 2 h before it) and\n"
	      "nuisance (activations and chattering episodes outside the 2 h before any\n"
	      "event). --json prints an array of objects: setpoint, deadband, on_delay_s,\n"
	      "the per-alarm figures of summary.json, nuisance and pareto.\n", f);
	fputs(HISTREAD_USAGE
	      "Exit status: 0 ok, 1 runtime failure, 2 bad config, data or option.\n", f);
}

/* "A:B:STEP" (A <= B, STEP > 0) or "A". 0, or -EINVAL with a message. */
static int parse_axis(const char *opt, struct axis *a)
{
	const char *s = a->text;
	char *end;
	double lo = strtod(s, &end), hi = lo, step = 1.0;
	if (end != s && *end == ':') {
		const char *p = end + 1;
		hi = strtod(p, &end);
		if (end == p || *end != ':')
			goto bad;
		p = end + 1;
		step = strtod(p, &end);
		if (end == p)
			goto bad;
	} else if (end == s) {
		goto bad;
	}
	if (*end != '\0' || !isfinite(lo) || !isfinite(hi) || !isfinite(step) || hi < lo ||
	    step <= 0.0)
		goto bad;
	/* Inclusive of B when B is a whole number of steps from A (to within
	 * rounding: 0.1 steps from 0 to 1 must reach 1). */
	double n = floor((hi - lo) / step + 1e-9);
	if (n + 1.0 > TUNE_AXIS_MAX) {
		fprintf(stderr, "floodgauge tune: %s %s: %.0f values; at most %d\n", opt, s,
			n + 1.0, TUNE_AXIS_MAX);
		return -EINVAL;
	}
	a->count = (unsigned)n + 1;
	for (unsigned i = 0; i < a->count; i++)
		a->v[i] = lo + step * (double)i;
	return 0;
bad:
	fprintf(stderr, "floodgauge tune: %s '%s': expected A:B:STEP with A <= B and STEP > 0, "
			"or one number\n", opt, s);
	return -EINVAL;
}

static int parse_args(struct tune *t, int argc, char **argv, const char **cfg_path)
{
	static const struct option opts[] = {{"config", required_argument, NULL, 'c'},
					     {"alarm", required_argument, NULL, 'a'},
					     {"setpoint", required_argument, NULL, 's'},
					     {"deadband", required_argument, NULL, 'd'},
					     {"on-delay", required_argument, NULL, 'o'},
					     {"event", required_argument, NULL, 'e'},
					     {"from", required_argument, NULL, 'f'},
					     {"to", required_argument, NULL, 't'},
					     {"json", no_argument, NULL, 'j'},
					     {"help", no_argument, NULL, 'h'},
					     HISTREAD_LONG_OPTIONS,
					     {0}};
	int ch;
	optind = 1;
	while ((ch = getopt_long(argc, argv, "c:h", opts, NULL)) != -1) {
		switch (ch) {
		case 'c': *cfg_path = optarg; break;
		case 'a': t->alarm_name = optarg; break;
		case 's': t->ax[0].text = optarg; break;
		case 'd': t->ax[1].text = optarg; break;
		case 'o': t->ax[2].text = optarg; break;
		case 'f': t->from_text = optarg; break;
		case 't': t->to_text = optarg; break;
		case 'j': t->json = true; break;
		case 'e':
			if (t->event_count >= ALARMPERF_EVENTS_MAX) {
				fprintf(stderr, "floodgauge tune: --event: at most %d events\n",
					ALARMPERF_EVENTS_MAX);
				return EXIT_USAGE;
			}
			t->event_text[t->event_count++] = optarg;
			break;
		case 'h': tune_usage(stdout); return -1;
		default:
			if (histread_opts_take(&t->hopts, ch, optarg))
				break;
			tune_usage(stderr);
			return EXIT_USAGE;
		}
	}
	if (*cfg_path == NULL || t->alarm_name == NULL || optind != argc - 1) {
		if (t->alarm_name == NULL && *cfg_path != NULL)
			fprintf(stderr, "floodgauge tune: --alarm NAME is required\n");
		tune_usage(stderr);
		return EXIT_USAGE;
	}
	t->data_path = argv[optind];
	static const char *const names[3] = {"--setpoint", "--deadband", "--on-delay"};
	for (int k = 0; k < 3; k++)
		if (t->ax[k].text != NULL && parse_axis(names[k], &t->ax[k]) != 0)
			return EXIT_USAGE;
	return 0;
}

static int find_alarm(struct tune *t)
{
	for (unsigned i = 0; i < t->cfg->alarm_count; i++)
		if (strcmp(t->cfg->alarms[i].name, t->alarm_name) == 0) {
			t->ai = i;
			return 0;
		}
	char dym[FG_NAME_MAX + 24];
	fprintf(stderr, "floodgauge tune: --alarm %s: no such alarm%s; the config has:",
		t->alarm_name, config_suggest(t->cfg, CONFIG_NAME_ALARM, t->alarm_name, dym,
					      sizeof(dym)));
	for (unsigned i = 0; i < t->cfg->alarm_count; i++)
		fprintf(stderr, " %s", t->cfg->alarms[i].name);
	fputc('\n', stderr);
	return EXIT_USAGE;
}

/* The configured value where an axis was not given; a diagnostic alarm has no
 * setpoint or deadband to try. */
static int fill_axes(struct tune *t)
{
	const struct alarm_cfg *a = &t->cfg->alarms[t->ai];
	if (a->kind == ALARM_KIND_DIAGNOSTIC && (t->ax[0].text || t->ax[1].text)) {
		fprintf(stderr, "floodgauge tune: %s is a diagnostic alarm: it has no setpoint or "
				"deadband to tune (only --on-delay)\n", a->name);
		return EXIT_USAGE;
	}
	const double cfgv[3] = {a->setpoint, a->deadband, a->on_delay_s};
	for (int k = 0; k < 3; k++)
		if (t->ax[k].text == NULL) {
			t->ax[k].v[0] = cfgv[k];
			t->ax[k].count = 1;
		}
	double n = (double)t->ax[0].count * t->ax[1].count * t->ax[2].count;
	if (n > TUNE_CANDIDATES_MAX) {
		fprintf(stderr, "floodgauge tune: %.0f candidates; at most %d\n", n,
			TUNE_CANDIDATES_MAX);
		return EXIT_USAGE;
	}
	return 0;
}

static int read_times(struct tune *t)
{
	char err[512];
	t->from_t_ms = INT64_MIN;
	t->to_t_ms = INT64_MAX;
	if ((t->from_text != NULL && histread_time_arg(&t->hist, "--from", t->from_text,
						       &t->from_t_ms, err, sizeof(err)) != 0) ||
	    (t->to_text != NULL &&
	     histread_time_arg(&t->hist, "--to", t->to_text, &t->to_t_ms, err, sizeof(err)) != 0))
		goto bad;
	for (unsigned k = 0; k < t->event_count; k++) {
		/* T or T=LABEL (the replay form; the label is not used here) */
		char buf[64];
		const char *eq = strchr(t->event_text[k], '=');
		size_t n = eq ? (size_t)(eq - t->event_text[k]) : strlen(t->event_text[k]);
		if (n >= sizeof(buf))
			n = sizeof(buf) - 1;
		memcpy(buf, t->event_text[k], n);
		buf[n] = '\0';
		if (histread_time_arg(&t->hist, "--event", buf, &t->event_t_ms[k], err,
				      sizeof(err)) != 0)
			goto bad;
	}
	return 0;
bad:
	fprintf(stderr, "floodgauge tune: %s\n", err);
	return EXIT_USAGE;
}

static int store(struct stored *st, int64_t t_ms, const struct alarm_input *in)
{
	if (st->count == st->cap) {
		size_t cap = st->cap ? 2 * st->cap : 4096;
		int64_t *t = realloc(st->t_ms, cap * sizeof(*t));
		if (t == NULL)
			return -ENOMEM;
		st->t_ms = t;
		struct alarm_input *i = realloc(st->in, cap * sizeof(*i));
		if (i == NULL)
			return -ENOMEM;
		st->in = i;
		st->cap = cap;
	}
	st->t_ms[st->count] = t_ms;
	st->in[st->count] = *in;
	st->count++;
	return 0;
}

/* The one engine pass: the rows replay would use, the alarm's inputs kept. */
static int run_engine(struct tune *t)
{
	static double values[FG_TAGS_MAX];
	static enum tag_status status[FG_TAGS_MAX];
	int64_t t_ms;
	int rc;
	engine_init(t->eng, t->cfg);
	while ((rc = offline_next_in(&t->hist, t->from_t_ms, t->to_t_ms, &t_ms, values, status)) ==
	       1) {
		offline_take_texts(&t->hist, t->eng);
		engine_step(t->eng, t_ms, values, status);
		engine_events_clear(t->eng);
		struct alarm_input in;
		engine_alarm_input(t->eng, t->ai, &in);
		if (store(&t->st, t_ms, &in) != 0) {
			fprintf(stderr, "floodgauge tune: out of memory at %zu rows\n", t->st.count);
			return EXIT_RUNTIME;
		}
	}
	if (rc < 0) {
		fprintf(stderr, "floodgauge tune: reading %s: %s\n", t->data_path, strerror(-rc));
		return EXIT_RUNTIME;
	}
	if (t->st.count == 0) {
		fprintf(stderr, "floodgauge tune: %s: no data rows%s\n", t->data_path,
			t->from_text || t->to_text ? " inside --from/--to" : "");
		return EXIT_USAGE;
	}
	return 0;
}

static bool in_warning_window(const struct tune *t, int64_t start_ms)
{
	for (unsigned k = 0; k < t->event_count; k++)
		if (start_ms < t->event_t_ms[k] && start_ms >= t->event_t_ms[k] - TUNE_WARNING_WINDOW_MS)
			return true;
	return false;
}

/* One candidate: a fresh alarm over the stored inputs. */
static void evaluate(const struct tune *t, struct candidate *c)
{
	struct alarm_cfg cfg = t->cfg->alarms[t->ai];
	cfg.setpoint = c->setpoint;
	cfg.deadband = c->deadband;
	cfg.on_delay_s = c->on_delay_s;
	struct alarm a;
	alarm_init(&a, &cfg, 0);
	static struct alarmperf ap;
	enum alarm_priority prio = cfg.priority;
	int rc = alarmperf_init(&ap, 1, &prio, t->event_t_ms, t->event_count);
	assert(rc == 0);
	(void)rc;
	c->nuisance = 0;
	int64_t useful_start = ALARMPERF_T_NONE;
	for (size_t i = 0; i < t->st.count; i++) {
		struct alarm_event ev;
		if (alarm_step(&a, &t->st.in[i], t->st.t_ms[i], &ev) != 1)
			continue;
		uint64_t act = ap.a[0].activations, chat = ap.a[0].chattering_episodes;
		alarmperf_on_change(&ap, 0, ev.t_ms, ev.prev, ev.state);
		bool inside = in_warning_window(t, ev.t_ms);
		if (ap.a[0].activations > act && !inside)
			c->nuisance++;
		if (ap.a[0].chattering_episodes > chat && !inside)
			c->nuisance++;
	}
	alarmperf_finish(&ap, t->st.t_ms[0], t->st.t_ms[t->st.count - 1]);
	c->fig = ap.a[0];
	c->lead_s = alarmperf_lead_s(&ap, 0, 0);
	if (t->event_count > 0)
		useful_start = ap.a[0].last_start_before_t_ms[0];
	c->useful_lead_s = -INFINITY;
	if (useful_start != ALARMPERF_T_NONE &&
	    useful_start >= ap.event_t_ms[0] - TUNE_WARNING_WINDOW_MS)
		c->useful_lead_s = c->lead_s;
}

static void mark_pareto(struct candidate *c, size_t n)
{
	for (size_t i = 0; i < n; i++) {
		c[i].pareto = true;
		for (size_t j = 0; j < n && c[i].pareto; j++) {
			bool ge = c[j].useful_lead_s >= c[i].useful_lead_s &&
				  c[j].nuisance <= c[i].nuisance;
			bool gt = c[j].useful_lead_s > c[i].useful_lead_s ||
				  c[j].nuisance < c[i].nuisance;
			if (j != i && ge && gt)
				c[i].pareto = false;
		}
	}
}

static int build_candidates(struct tune *t)
{
	const struct axis *s = &t->ax[0], *d = &t->ax[1], *o = &t->ax[2];
	t->cand_count = (size_t)s->count * d->count * o->count;
	t->cand = calloc(t->cand_count, sizeof(*t->cand));
	if (t->cand == NULL)
		return EXIT_RUNTIME;
	size_t n = 0;
	for (unsigned i = 0; i < s->count; i++)
		for (unsigned j = 0; j < d->count; j++)
			for (unsigned k = 0; k < o->count; k++) {
				struct candidate *c = &t->cand[n++];
				c->setpoint = s->v[i];
				c->deadband = d->v[j];
				c->on_delay_s = o->v[k];
				struct alarm_cfg cfg = t->cfg->alarms[t->ai];
				cfg.setpoint = c->setpoint;
				cfg.deadband = c->deadband;
				cfg.on_delay_s = c->on_delay_s;
				char err[256];
				if (alarm_cfg_check(&cfg, err, sizeof(err)) != 0) {
					fprintf(stderr, "floodgauge tune: setpoint %g, deadband %g, "
							"on-delay %g s: %s\n", c->setpoint,
						c->deadband, c->on_delay_s, err);
					return EXIT_USAGE;
				}
			}
	return 0;
}

static int print_json(const struct tune *t)
{
	size_t cap = 1024;
	char *buf = malloc(cap);
	if (buf == NULL)
		return EXIT_RUNTIME;
	static struct alarmperf one; /* a finished alarmperf holding one candidate's figures */
	fputc('[', stdout);
	for (size_t i = 0; i < t->cand_count; i++) {
		const struct candidate *c = &t->cand[i];
		enum alarm_priority prio = t->cfg->alarms[t->ai].priority;
		alarmperf_init(&one, 1, &prio, t->event_t_ms, t->event_count);
		one.a[0] = c->fig;
		one.finished = true;
		struct jsonw w;
		jsonw_init(&w, buf, cap);
		jsonw_open(&w);
		jsonw_num(&w, "setpoint", c->setpoint);
		jsonw_num(&w, "deadband", c->deadband);
		jsonw_num(&w, "on_delay_s", c->on_delay_s);
		alarmperf_alarm_json(&one, 0, &w);
		jsonw_num(&w, "nuisance", (double)c->nuisance);
		jsonw_bool(&w, "pareto", c->pareto);
		jsonw_close(&w);
		if (jsonw_finish(&w) < 0) {
			free(buf);
			return EXIT_RUNTIME;
		}
		printf("%s%s", i ? ",\n " : "", buf);
	}
	fputs("]\n", stdout);
	free(buf);
	return 0;
}

static void print_table(const struct tune *t)
{
	const struct alarm_cfg *a = &t->cfg->alarms[t->ai];
	const char *unit = a->field >= 0 ? result_fields[a->field].unit : "";
	printf("tune %s (%s %s on %s, %s) over %zu rows of %s\n", a->name,
	       alarm_priority_name(a->priority), alarm_kind_name(a->kind),
	       a->field >= 0 ? result_fields[a->field].name : "quality",
	       t->cfg->sections[a->section_index].name, t->st.count, t->data_path);
	for (unsigned k = 0; k < t->event_count; k++) {
		char ts[TIMEFMT_BUF_SIZE];
		timefmt_format(t->event_t_ms[k], ts, sizeof(ts));
		printf("  event %u at %s\n", k + 1, ts);
	}
	printf("  %10s %9s %9s %6s %6s %6s %9s %9s  %-20s %9s %8s  %s\n", "setpoint", "deadband",
	       "on-delay", "activ", "chatt", "fleet", "in alarm", "longest", "first activation",
	       "lead", "nuisance", "pareto");
	for (size_t i = 0; i < t->cand_count; i++) {
		const struct candidate *c = &t->cand[i];
		char sp[NUMFMT_FULL_SIZE], db[NUMFMT_FULL_SIZE], od[NUMFMT_DURATION_SIZE];
		char tin[NUMFMT_DURATION_SIZE], lng[NUMFMT_DURATION_SIZE], lead[NUMFMT_DURATION_SIZE];
		char first[TIMEFMT_BUF_SIZE] = "-";
		numfmt_human(c->setpoint, unit, sp, sizeof(sp));
		numfmt_human(c->deadband, unit, db, sizeof(db));
		numfmt_duration(c->on_delay_s, od, sizeof(od));
		numfmt_duration(c->fig.time_in_alarm_s, tin, sizeof(tin));
		numfmt_duration(c->fig.longest_active_s, lng, sizeof(lng));
		numfmt_duration(c->lead_s, lead, sizeof(lead));
		if (c->fig.first_activation_t_ms != ALARMPERF_T_NONE)
			timefmt_format(c->fig.first_activation_t_ms, first, sizeof(first));
		printf("  %10s %9s %9s %6llu %6llu %6llu %9s %9s  %-20s %9s %8llu  %s\n", sp, db,
		       od, (unsigned long long)c->fig.activations,
		       (unsigned long long)c->fig.chattering_episodes,
		       (unsigned long long)c->fig.fleeting, tin, lng, first, lead,
		       (unsigned long long)c->nuisance, c->pareto ? "true" : "false");
	}
	printf("  setpoint and deadband in %s; durations h:mm:ss; lead before the first event;\n"
	       "  nuisance: activations and chattering episodes outside the 2 h before an "
	       "event\n", unit[0] ? unit : "the signal's unit");
	fg_caution_print(stdout);
}

static int tune_run(struct tune *t)
{
	char err[512];
	int rc = find_alarm(t);
	if (rc == 0)
		rc = fill_axes(t);
	if (rc == 0)
		rc = build_candidates(t);
	if (rc != 0)
		return rc;
	if (histread_init(&t->hist, t->cfg, &t->hopts, err, sizeof(err)) != 0) {
		fprintf(stderr, "floodgauge tune: %s\n", err);
		return EXIT_USAGE;
	}
	rc = read_times(t);
	if (rc != 0)
		return rc;
	if (histread_open(&t->hist, t->data_path, stderr, err, sizeof(err)) != 0) {
		fprintf(stderr, "floodgauge tune: %s\n", err);
		return EXIT_USAGE;
	}
	rc = run_engine(t);
	if (rc != 0)
		return rc;
	/* alarmperf sorts its events; keep ours in the same order */
	for (unsigned i = 1; i < t->event_count; i++)
		for (unsigned j = i; j > 0 && t->event_t_ms[j] < t->event_t_ms[j - 1]; j--) {
			int64_t x = t->event_t_ms[j];
			t->event_t_ms[j] = t->event_t_ms[j - 1];
			t->event_t_ms[j - 1] = x;
		}
	for (size_t i = 0; i < t->cand_count; i++)
		evaluate(t, &t->cand[i]);
	mark_pareto(t->cand, t->cand_count);
	if (t->json)
		return print_json(t);
	print_table(t);
	return 0;
}

int cmd_tune(int argc, char **argv)
{
	static struct tune t;
	memset(&t, 0, sizeof(t));
	const char *cfg_path = NULL;
	int rc = parse_args(&t, argc, argv, &cfg_path);
	if (rc != 0)
		return rc < 0 ? 0 : rc;
	rc = offline_setup(cfg_path, &t.cfg, &t.eng);
	if (rc != 0)
		goto out_free;
	rc = tune_run(&t);
out_free:
	histread_fini(&t.hist);
	free(t.cand);
	free(t.st.t_ms);
	free(t.st.in);
	free(t.eng);
	free(t.cfg);
	return rc;
}
