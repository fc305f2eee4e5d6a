/*
 * daemon.c - see daemon.h.
 */
#include "daemon.h"

#include <errno.h>
#include <math.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>
#include <unistd.h>

#include "command.h"
#include "commands.h"
#include "jsonw.h"
#include "liveview.h"
#include "log.h"
#include "notify.h"
#include "sig.h"
#include "timefmt.h"

_Static_assert((long)COMMAND_SHELVE_MAX_S == (long)ALARM_SHELVE_MAX_S, "shelve limits agree");

static int64_t mono_ms(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

static int64_t wall_ms(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_REALTIME, &ts);
	return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

/* How often a listen address that did not resolve is tried again, ms. */
#define DAEMON_EXPORT_RETRY_MS 5000

/* Longest sleep between looks at the MQTT link, ms. */
#define DAEMON_LINK_SLICE_MS 100

static void sleep_until(int64_t t_mono_ms)
{
	struct timespec ts = {.tv_sec = (time_t)(t_mono_ms / 1000),
			      .tv_nsec = (long)(t_mono_ms % 1000) * 1000000L};
	/* A signal ends the sleep early: the loop looks at the flags at once. */
	clock_nanosleep(CLOCK_MONOTONIC, TIMER_ABSTIME, &ts, NULL);
}

static void events_log(enum evlog_level level, const char *msg)
{
	log_msg(level == EVLOG_INFO ? LOG_INFO : level == EVLOG_WARNING ? LOG_WARNING : LOG_ERROR,
		"%s", msg);
}

static void take_events(struct daemon *d)
{
	const struct fg_config *cfg = d->cfg;
	for (unsigned k = 0; k < engine_event_count(d->eng); k++) {
		const struct alarm_event *ev = &d->eng->events[k];
		const struct alarm_cfg *a = &cfg->alarms[ev->alarm_index];
		char ts[TIMEFMT_BUF_SIZE], json[1024];
		timefmt_format(ev->t_ms, ts, sizeof(ts));
		if (alarm_event_json(ev, a, cfg->sections[a->section_index].name, ts, json,
				     sizeof(json)) < 0)
			continue;
		if (d->events_on)
			evlog_write(&d->events, json); /* checked inside; failures are held and said */
		publish_alarm(&d->pub, a->name, json);
		log_msg(ev->state == ALARM_STATE_UNACK ? LOG_WARNING : LOG_INFO,
			"alarm %s %s -> %s (%s %s, value %.4g, setpoint %.4g%s%s)", a->name,
			alarm_state_name(ev->prev), alarm_state_name(ev->state),
			alarm_priority_name(a->priority), alarm_kind_name(a->kind), ev->value,
			ev->setpoint, ev->reason ? ", " : "", ev->reason ? ev->reason : "");
		d->state_dirty = true;
	}
	engine_events_clear(d->eng);
}

/* Carries out a parsed command on alarm ai (-1: no such alarm). */
static int apply_command(struct daemon *d, const struct command *c, int ai, int64_t t_ms)
{
	if (ai < 0)
		return -ENOENT;
	switch (c->op) {
	case COMMAND_OP_ACK: return engine_ack(d->eng, (unsigned)ai, t_ms);
	case COMMAND_OP_SHELVE: return engine_shelve(d->eng, (unsigned)ai, c->duration_s, t_ms);
	case COMMAND_OP_UNSHELVE: return engine_unshelve(d->eng, (unsigned)ai, t_ms);
	case COMMAND_OP_NONE:
	case COMMAND_OP_COUNT: break;
	}
	return -EINVAL;
}

static const char *command_error_text(int rc)
{
	switch (rc) {
	case -ENOENT: return "unknown alarm";
	case -EALREADY: return "nothing to do in the alarm's current state";
	case -EPERM: return "not allowed in the alarm's current state";
	case -EINVAL: return "invalid argument";
	default: return "failed";
	}
}

/* Commands the link had to drop (queue full, oversize, retained) get one
 * reply and one log line per batch: their ids were not kept. */
static void report_dropped_commands(struct daemon *d)
{
	if (!d->pub.enabled)
		return;
	struct mqttlink_stats st;
	mqttlink_get_stats(&d->pub.link, &st);
	uint64_t full = st.cmd_dropped_full, bad = st.cmd_dropped_oversize,
		 old = st.cmd_dropped_retained;
	char reply[256];
	if (full > d->cmd_full_seen) {
		snprintf(reply, sizeof(reply), "{\"ok\":false,\"error\":\"%llu command(s) not carried "
			 "out: more than %d arrived within one period; send them again\"}",
			 (unsigned long long)(full - d->cmd_full_seen), MQTTLINK_CMD_SLOTS);
		log_msg(LOG_WARNING, "commands: %llu dropped, more than %d in one period",
			(unsigned long long)(full - d->cmd_full_seen), MQTTLINK_CMD_SLOTS);
		publish_reply(&d->pub, reply);
	}
	if (bad > d->cmd_bad_seen) {
		snprintf(reply, sizeof(reply), "{\"ok\":false,\"error\":\"%llu command(s) not carried "
			 "out: empty or larger than %d bytes\"}",
			 (unsigned long long)(bad - d->cmd_bad_seen), MQTTLINK_CMD_MAX - 1);
		publish_reply(&d->pub, reply);
	}
	if (old > d->cmd_retained_seen) {
		snprintf(reply, sizeof(reply), "{\"ok\":false,\"error\":\"%llu retained command(s) "
			 "not carried out: commands must not be retained\"}",
			 (unsigned long long)(old - d->cmd_retained_seen));
		publish_reply(&d->pub, reply);
	}
	d->cmd_full_seen = full;
	d->cmd_bad_seen = bad;
	d->cmd_retained_seen = old;
}

static void commands(struct daemon *d, int64_t t_ms)
{
	char payload[1024], err[256], reply[1024], shown[256];
	int n;
	while ((n = publish_take_command(&d->pub, payload, sizeof(payload))) > 0) {
		struct command c;
		int rc = command_parse(payload, (size_t)n, &c, err, sizeof(err));
		bool parsed = rc == 0;
		const char *state = NULL;
		if (parsed)
			rc = command_check_age(&c, t_ms, d->cfg->mqtt.cmd_max_age_s, err, sizeof(err));
		if (parsed && rc == 0) {
			int ai = config_alarm_index(d->cfg, c.alarm);
			rc = apply_command(d, &c, ai, t_ms);
			if (ai >= 0)
				state = alarm_state_name(d->eng->alarms[ai].state);
			char dym[FG_NAME_MAX + 24] = ""; /* " (did you mean 'NAME'?)" */
			if (ai < 0)
				config_suggest(d->cfg, CONFIG_NAME_ALARM, c.alarm, dym, sizeof(dym));
			if (rc != 0)
				snprintf(err, sizeof(err), "%s%s", command_error_text(rc), dym);
		}
		/* Escaped: a payload must not forge log lines or steer a terminal. */
		command_log_escape(payload, (size_t)n, shown, sizeof(shown));
		log_msg(rc == 0 ? LOG_INFO : LOG_WARNING, "command %s: %s", shown,
			rc == 0 ? "done" : err);
		if (command_reply_json(parsed ? &c : NULL, rc == 0, rc == 0 ? NULL : err, state,
				       reply, sizeof(reply)) > 0)
			publish_reply(&d->pub, reply);
		take_events(d);
	}
	report_dropped_commands(d);
}

static void publish_states(struct daemon *d, int64_t t_ms, int64_t now_mono)
{
	if (!d->pub.enabled)
		return;
	double every_ms = d->cfg->mqtt.state_interval_s * 1000.0;
	if (d->cycle > 0 && (double)(now_mono - d->last_state_pub_mono_ms) < every_ms)
		return;
	d->last_state_pub_mono_ms = now_mono;
	char ts[TIMEFMT_BUF_SIZE], buf[4096];
	timefmt_format(t_ms, ts, sizeof(ts));
	for (unsigned s = 0; s < d->cfg->section_count; s++) {
		const struct engine_section *es = &d->eng->sec[s];
		struct jsonw w;
		jsonw_init(&w, buf, sizeof(buf));
		jsonw_open(&w);
		jsonw_str(&w, "t", ts);
		jsonw_str(&w, "section", d->cfg->sections[s].name);
		jsonw_str(&w, "type", config_section_type_name(d->cfg->sections[s].geom.type));
		jsonw_result(&w, &es->r);
		jsonw_bool(&w, "in_service", es->in_service);
		if (es->diag_reason != NULL)
			jsonw_str(&w, "input_problem", es->diag_reason);
		jsonw_close(&w);
		if (jsonw_finish(&w) > 0)
			publish_state(&d->pub, d->cfg->sections[s].name, buf);
	}
}

/* A failing state file is said once and its recovery once; it stays dirty,
 * so every cycle tries again until it is written. */
static void save_state(struct daemon *d, int64_t t_ms)
{
	if (!d->state_dirty || d->cfg->monitor.state_file[0] == '\0')
		return;
	int rc = engine_state_save(d->eng, d->cfg->monitor.state_file, t_ms);
	if (rc != 0) {
		if (!d->state_failing)
			log_msg(LOG_ERROR, "cannot save alarm state to %s: %s; retrying every cycle",
				d->cfg->monitor.state_file, strerror(-rc));
		d->state_failing = true;
		return;
	}
	if (d->state_failing)
		log_msg(LOG_INFO, "alarm state saved to %s again", d->cfg->monitor.state_file);
	d->state_failing = false;
	d->state_dirty = false;
}

/* Every configured alarm's current state on its retained topic, so that a
 * subscriber joining after a broker restart (brokers often run without
 * persistence) sees the truth; one that never fired says normal. */
static void republish_alarms(struct daemon *d, int64_t t_ms)
{
	const struct fg_config *cfg = d->cfg;
	char ts[TIMEFMT_BUF_SIZE], json[1024];
	timefmt_format(t_ms, ts, sizeof(ts));
	for (unsigned i = 0; i < cfg->alarm_count; i++) {
		const struct alarm *a = &d->eng->alarms[i];
		const struct alarm_cfg *ac = &cfg->alarms[i];
		struct alarm_event ev = {
			.t_ms = t_ms,
			.alarm_index = i,
			.state = a->state,
			.prev = a->state,
			.value = a->last_value,
			.setpoint = ac->kind == ALARM_KIND_DIAGNOSTIC ? NAN : ac->setpoint,
			.reason = a->diag_reason,
		};
		if (alarm_event_json(&ev, ac, cfg->sections[ac->section_index].name, ts, json,
				     sizeof(json)) > 0)
			publish_alarm(&d->pub, ac->name, json);
	}
}

static void mqtt_housekeeping(struct daemon *d, int64_t now_mono, int64_t t_ms)
{
	publish_poll(&d->pub, now_mono);
	unsigned n = publish_connect_count(&d->pub);
	if (n != d->mqtt_connects) {
		d->mqtt_connects = n;
		republish_alarms(d, t_ms);
		log_msg(LOG_INFO, "mqtt: (re)connected: %u alarm state(s) republished",
			d->cfg->alarm_count);
	}
}

/* Starts the export server. A listen address that does not resolve or is not
 * configured yet (DNS or the interface late at boot) is retried every
 * DAEMON_EXPORT_RETRY_MS from the loop, said once; other errors (the port in
 * use, say) are fatal at start. Returns 0, or -1 when run must stop. */
static int open_export(struct daemon *d, bool first)
{
	int rc = export_open(&d->exp, d->cfg);
	const char *host = d->cfg->exp.host;
	if (rc == 0) {
		log_msg(LOG_INFO, "export: serving on %s:%d", host, d->cfg->exp.port);
		d->export_waiting = false;
		return 0;
	}
	if (rc == -ENOENT || rc == -EADDRNOTAVAIL) {
		if (!d->export_waiting)
			log_msg(LOG_WARNING, "export: cannot listen on %s:%d: %s; retrying every %d s",
				host, d->cfg->exp.port,
				rc == -ENOENT ? "the host name does not resolve" : strerror(-rc),
				DAEMON_EXPORT_RETRY_MS / 1000);
		d->export_waiting = true;
		return 0;
	}
	log_msg(LOG_ERROR, "export: cannot listen on %s:%d: %s", host, d->cfg->exp.port,
		strerror(-rc));
	return first ? -1 : 0;
}

/* Opens the plant, the export and MQTT for d->cfg. Returns 0 or an exit code. */
static int open_links(struct daemon *d)
{
	if (plant_open(&d->plant, d->cfg, &mbclient_backend_libmodbus) != 0)
		return EXIT_USAGE;
	/* Each request may block for its source's timeout: a plant link in
	 * trouble must not make the loop miss its period (STYLE: bound loops). */
	double worst_s = 0.0;
	for (unsigned i = 0; i < d->plant.source_count; i++) {
		unsigned n = 0;
		mbclient_plan(&d->plant.src[i].client, &n);
		worst_s += (1.0 + n) * d->cfg->sources[i].timeout_s;
	}
	if (worst_s > d->cfg->monitor.period_s)
		log_msg(LOG_WARNING, "a poll of every source may block %.2f s when devices time "
				     "out, more than period_s %.2f s: cycles will overrun then",
			worst_s, d->cfg->monitor.period_s);
	if (d->cfg->exp.enabled && open_export(d, true) != 0)
		return EXIT_RUNTIME;
	d->mqtt_connects = 0; /* a new link counts from 0 */
	d->cmd_full_seen = d->cmd_bad_seen = d->cmd_retained_seen = 0;
	if (publish_open(&d->pub, d->cfg) != 0)
		return EXIT_USAGE;
	return 0;
}

static void close_links(struct daemon *d)
{
	publish_close(&d->pub);
	export_close(&d->exp);
	plant_close(&d->plant);
}

static void restore_state(struct daemon *d, const char *path)
{
	char err[256] = "";
	int n = engine_state_load(d->eng, path, err, sizeof(err));
	if (n < 0)
		log_msg(LOG_WARNING, "alarm state not restored: %s", err);
	else if (n > 0)
		log_msg(LOG_INFO, "alarm state restored for %d alarm(s) from %s", n, path);
}

/* SIGHUP: a new config in fresh storage; swapped in only when valid. The
 * alarm lifecycles carry over by name through a temporary state file. */
static void reload(struct daemon *d)
{
	struct fg_config *ncfg = malloc(sizeof(*ncfg));
	struct engine *neng = malloc(sizeof(*neng));
	if (ncfg == NULL || neng == NULL || config_load(ncfg, d->cfg_path, stderr) != 0) {
		log_msg(LOG_ERROR, "reload: %s is not valid; keeping the running config",
			d->cfg_path);
		free(ncfg);
		free(neng);
		return;
	}
	char tmp[] = "/tmp/floodgauge-reload-XXXXXX";
	int fd = mkstemp(tmp);
	if (fd >= 0)
		close(fd);
	bool carried = fd >= 0 && engine_state_save(d->eng, tmp, wall_ms()) == 0;
	close_links(d);
	free(d->eng);
	free(d->cfg);
	d->cfg = ncfg;
	d->eng = neng;
	engine_init(d->eng, d->cfg);
	if (carried)
		restore_state(d, tmp);
	if (fd >= 0)
		unlink(tmp);
	if (open_links(d) != 0)
		log_msg(LOG_ERROR, "reload: links could not all be opened");
	log_msg(LOG_INFO, "reload: %s loaded (%u sections, %u alarms)", d->cfg_path,
		d->cfg->section_count, d->cfg->alarm_count);
}

static void cycle(struct daemon *d, int64_t now_mono)
{
	int64_t t_ms = wall_ms();
	plant_poll(&d->plant, now_mono, d->values, d->status);
	engine_step(d->eng, t_ms, d->values, d->status);
	take_events(d);
	if (d->events_on)
		evlog_retry(&d->events);
	mqtt_housekeeping(d, now_mono, t_ms);
	commands(d, t_ms);
	publish_states(d, t_ms, now_mono);
	if (d->export_waiting && now_mono - d->export_tried_mono_ms >= DAEMON_EXPORT_RETRY_MS) {
		d->export_tried_mono_ms = now_mono;
		open_export(d, false);
	}
	export_update(&d->exp, d->eng);
	save_state(d, t_ms);
	if (d->view) {
		struct liveview_links l = {
			.sources = d->plant.source_count,
			.mqtt_enabled = d->pub.enabled,
			.mqtt_up = publish_connected(&d->pub),
			.export_enabled = d->exp.opened,
			.overruns = d->overruns,
		};
		for (unsigned i = 0; i < d->plant.source_count; i++)
			l.sources_up += mbclient_connected(&d->plant.src[i].client);
		liveview_draw(stdout, d->eng, &l, t_ms);
	}
	notify_watchdog(now_mono);
	d->cycle++;
}

/* --once is for scripts and checks: give MQTT a bounded moment to connect,
 * so the one cycle's messages (and "offline" after it) reach the broker. */
static void wait_for_mqtt(struct daemon *d)
{
	int64_t end = mono_ms() + 3000;
	while (d->pub.enabled && !publish_connected(&d->pub) && mono_ms() < end && !sig_stop) {
		publish_poll(&d->pub, mono_ms());
		sleep_until(mono_ms() + 50);
	}
}

static void run_loop(struct daemon *d)
{
	if (d->once)
		wait_for_mqtt(d);
	d->start_mono_ms = mono_ms();
	int64_t period_ms = (int64_t)llround(d->cfg->monitor.period_s * 1000.0);
	uint64_t n = 0;
	while (!sig_stop) {
		int64_t due = d->start_mono_ms + (int64_t)n * period_ms;
		int64_t now = mono_ms();
		if (now < due) {
			/* Between cycles the MQTT link is looked after in short slices,
			 * so a returning broker is probed and greeted (alarm states
			 * republished) within a fraction of a second, not a period. */
			sleep_until(due < now + DAEMON_LINK_SLICE_MS ? due : now + DAEMON_LINK_SLICE_MS);
			mqtt_housekeeping(d, mono_ms(), wall_ms());
			notify_watchdog(mono_ms()); /* the loop is alive, whatever period_s is */
			continue; /* woken early by a signal: look at the flags first */
		}
		cycle(d, now);
		if (d->once)
			break;
		if (sig_reopen) {
			sig_reopen = 0;
			if (d->events_on)
				evlog_reopen(&d->events);
		}
		if (sig_reload) {
			sig_reload = 0;
			notify_reloading();
			reload(d);
			notify_ready("running (reloaded)");
			period_ms = (int64_t)llround(d->cfg->monitor.period_s * 1000.0);
			d->start_mono_ms = mono_ms();
			n = 0;
		}
		n++;
		/* Behind by more than a period: skip the missed slots, count them. */
		int64_t late = mono_ms() - (d->start_mono_ms + (int64_t)n * period_ms);
		if (late > period_ms) {
			uint64_t skip = (uint64_t)(late / period_ms);
			n += skip;
			d->overruns += (unsigned)skip;
			log_msg(LOG_WARNING, "cycle overran: %llu period(s) skipped",
				(unsigned long long)skip);
		}
	}
}

int daemon_main(struct daemon *d)
{
	d->cfg = malloc(sizeof(*d->cfg));
	d->eng = malloc(sizeof(*d->eng));
	if (d->cfg == NULL || d->eng == NULL) {
		free(d->cfg);
		free(d->eng);
		return EXIT_RUNTIME;
	}
	int rc = EXIT_USAGE;
	if (config_load(d->cfg, d->cfg_path, stderr) != 0)
		goto out_free;
	engine_init(d->eng, d->cfg);
	if (d->cfg->monitor.state_file[0] != '\0')
		restore_state(d, d->cfg->monitor.state_file);
	if (d->cfg->monitor.events_file[0] != '\0') {
		const struct monitor_cfg *m = &d->cfg->monitor;
		d->events_on = evlog_open(&d->events, m->events_file, (uint64_t)m->events_max_bytes,
					  m->events_keep, events_log) == 0;
		if (!d->events_on)
			log_msg(LOG_ERROR, "cannot set up the events file %s", m->events_file);
	}
	sig_install();
	rc = open_links(d);
	if (rc != 0)
		goto out_close;
	log_msg(LOG_INFO, "running %s: %u section(s), %u alarm(s), period %.3g s",
		d->cfg->monitor.name, d->cfg->section_count, d->cfg->alarm_count,
		d->cfg->monitor.period_s);
	notify_ready("running");
	if (d->view)
		log_to_ring(true);
	run_loop(d);
	notify_stopping();
	if (d->view)
		log_to_ring(false);
	d->state_dirty = true;
	save_state(d, wall_ms());
	log_msg(LOG_INFO, "stopped after %llu cycle(s)", (unsigned long long)d->cycle);
	rc = 0;
out_close:
	close_links(d);
	if (d->events_on)
		evlog_close(&d->events);
out_free:
	free(d->eng);
	free(d->cfg);
	return rc;
}
