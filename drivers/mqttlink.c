/*
 * mqttlink.c - the MQTT link (see mqttlink.h) over paho.mqtt.c MQTTAsync.
 *
 * Built in four parts: config checks and the password file (open time only),
 * paho's callbacks (they run on paho's threads: each takes the mutex, copies
 * or marks, and returns; no logging, no blocking, no paho create/destroy),
 * the precious queue (a ring of fixed entries allocated at open, appended and
 * reclaimed by the main thread, entry states changed by the callbacks), and
 * the main-thread calls. The paho behaviours relied on are the ones verified
 * for Debian 12 in shared/notes/libraries.md, section 2.
 */
#include "mqttlink.h"

#include <assert.h>
#include <errno.h>
#include <limits.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include <sys/stat.h>

#include <MQTTAsync.h>

/* ---- logging ------------------------------------------------------------ */

static void say(const struct mqttlink *m, enum mqttlink_log_level level, const char *fmt, ...)
	__attribute__((format(printf, 3, 4)));

static void say(const struct mqttlink *m, enum mqttlink_log_level level, const char *fmt, ...)
{
	char line[320];
	va_list ap;

	if (m->cfg.log == NULL)
		return;
	int n = snprintf(line, sizeof line, "mqtt %s: ", m->cfg.uri);
	if (n < 0 || (size_t)n >= sizeof line)
		n = 0;
	va_start(ap, fmt);
	int k = vsnprintf(line + n, sizeof line - (size_t)n, fmt, ap);
	va_end(ap);
	if (k < 0)
		return;
	if ((size_t)n + (size_t)k >= sizeof line) /* truncated: mark it, never overflow */
		memcpy(line + sizeof line - 4, "...", 4);
	m->cfg.log(m->cfg.log_user, level, line);
}

/* ---- config ------------------------------------------------------------- */

static bool terminated(const char *s, size_t size)
{
	return memchr(s, '\0', size) != NULL;
}

static bool has_prefix(const char *s, const char *p)
{
	return strncmp(s, p, strlen(p)) == 0;
}

/* Topic text we build on: no wildcards, no empty first or last level. */
static bool topic_part_ok(const char *s)
{
	size_t n = strlen(s);
	if (n == 0 || s[0] == '/' || s[n - 1] == '/')
		return false;
	return strpbrk(s, "+#") == NULL;
}

static int check_cfg(const struct mqttlink_cfg *cfg)
{
	assert(cfg != NULL);
	if (!terminated(cfg->uri, sizeof cfg->uri) ||
	    !terminated(cfg->client_id, sizeof cfg->client_id) ||
	    !terminated(cfg->username, sizeof cfg->username) ||
	    !terminated(cfg->password_file, sizeof cfg->password_file) ||
	    !terminated(cfg->ca_file, sizeof cfg->ca_file) ||
	    !terminated(cfg->topic_prefix, sizeof cfg->topic_prefix))
		return -EINVAL;
	if (cfg->uri[0] == '\0' || cfg->client_id[0] == '\0' || !topic_part_ok(cfg->topic_prefix))
		return -EINVAL;
	if (cfg->keepalive_s < MQTTLINK_KEEPALIVE_MIN_S || cfg->keepalive_s > MQTTLINK_KEEPALIVE_MAX_S)
		return -EINVAL;
	if (cfg->buffer_messages < 1 || cfg->buffer_messages > MQTTLINK_BUFFER_MAX)
		return -EINVAL;
	if (cfg->retry_min_s > MQTTLINK_RETRY_MAX_S || cfg->retry_max_s > MQTTLINK_RETRY_MAX_S)
		return -EINVAL;
	if (cfg->retry_min_s != 0 && cfg->retry_max_s != 0 && cfg->retry_min_s > cfg->retry_max_s)
		return -EINVAL;
	return 0;
}

/* Reads the first line of the password file into m->password. */
static int read_password(struct mqttlink *m)
{
	const char *path = m->cfg.password_file;
	FILE *f = fopen(path, "r");
	if (f == NULL) {
		int e = errno;
		say(m, MQTTLINK_LOG_ERROR, "cannot open password file %s: %s", path, strerror(e));
		return -e;
	}
	struct stat st;
	if (fstat(fileno(f), &st) == 0 && (st.st_mode & S_IROTH) != 0)
		say(m, MQTTLINK_LOG_WARNING, "password file %s is readable by everyone", path);
	int rc = 0;
	if (fgets(m->password, sizeof m->password, f) == NULL) {
		m->password[0] = '\0'; /* an empty file is an empty password */
	} else {
		size_t n = strlen(m->password);
		bool whole = n > 0 && m->password[n - 1] == '\n';
		if (!whole && n == sizeof m->password - 1 && fgetc(f) != EOF) {
			say(m, MQTTLINK_LOG_ERROR, "password in %s is longer than %zu bytes", path,
			    sizeof m->password - 1);
			rc = -EINVAL;
		}
		while (n > 0 && (m->password[n - 1] == '\n' || m->password[n - 1] == '\r'))
			m->password[--n] = '\0';
	}
	fclose(f);
	if (rc != 0)
		memset(m->password, 0, sizeof m->password);
	return rc;
}

static int build_topic(char *out, size_t out_size, const char *prefix, const char *suffix)
{
	int n = snprintf(out, out_size, "%s/%s", prefix, suffix);
	if (n < 0 || (size_t)n >= out_size)
		return -EMSGSIZE;
	return 0;
}

/* ---- paho callbacks (paho's threads) ------------------------------------ */

static void on_connect_failure(void *context, MQTTAsync_failureData *resp)
{
	struct mqttlink *m = context;
	pthread_mutex_lock(&m->lock);
	m->connect_fail_code = resp != NULL ? resp->code : MQTTASYNC_FAILURE;
	snprintf(m->connect_fail_msg, sizeof m->connect_fail_msg, "%s",
		 resp != NULL && resp->message != NULL ? resp->message : "");
	pthread_mutex_unlock(&m->lock);
	atomic_store(&m->connecting, 0);
}

static void on_connect_success(void *context, MQTTAsync_successData *resp)
{
	struct mqttlink *m = context;
	(void)resp;
	atomic_store(&m->connecting, 0);
}

static void on_subscribe_failure(void *context, MQTTAsync_failureData *resp)
{
	struct mqttlink *m = context;
	int code = resp != NULL ? resp->code : MQTTASYNC_FAILURE;
	atomic_store(&m->sub_fail_code, code != 0 ? code : MQTTASYNC_FAILURE);
}

/* On 3.1.1 a refused subscription (an ACL, say) is a SUBACK with return code
 * 0x80, which paho reports as success with that granted QoS. */
static void on_subscribe_success(void *context, MQTTAsync_successData *resp)
{
	struct mqttlink *m = context;
	if (resp != NULL && resp->alt.qos == MQTT_BAD_SUBSCRIBE)
		atomic_store(&m->sub_fail_code, MQTT_BAD_SUBSCRIBE);
}

/* Every connect, first or automatic: subscribe and say "online". paho's API
 * is thread-safe and these calls only queue commands. Their errors surface
 * through sub_fail_code or, for "online", not at all: the next connect
 * publishes it again, and the retained value is only read by late joiners. */
static void on_connected(void *context, char *cause)
{
	struct mqttlink *m = context;
	(void)cause; /* unreliable in 1.3.12: "automatic reconnect" on first connects too */

	MQTTAsync_responseOptions sub = MQTTAsync_responseOptions_initializer;
	sub.onSuccess = on_subscribe_success;
	sub.onFailure = on_subscribe_failure;
	sub.context = m;
	int rc = MQTTAsync_subscribe(m->client, m->cmd_topic, 1, &sub);
	if (rc != MQTTASYNC_SUCCESS)
		atomic_store(&m->sub_fail_code, rc);

	MQTTAsync_message msg = MQTTAsync_message_initializer;
	msg.payload = (void *)"online";
	msg.payloadlen = 6;
	msg.qos = 1;
	msg.retained = 1;
	MQTTAsync_responseOptions ro = MQTTAsync_responseOptions_initializer;
	(void)MQTTAsync_sendMessage(m->client, m->status_topic, &msg, &ro);

	pthread_mutex_lock(&m->lock);
	m->connect_fail_code = 0;
	pthread_mutex_unlock(&m->lock);
	atomic_fetch_add(&m->connect_events, 1u);
}

/* Called when the broker closes the socket, not when the keepalive expires:
 * health comes from MQTTAsync_isConnected() in poll; this count only lets
 * poll report a loss and reconnect that both fell between two polls. */
static void on_connection_lost(void *context, char *cause)
{
	struct mqttlink *m = context;
	(void)cause;
	atomic_fetch_add(&m->lost_events, 1u);
}

static bool is_cmd_topic(const struct mqttlink *m, const char *topic, int topic_len)
{
	size_t n = topic_len > 0 ? (size_t)topic_len : strlen(topic);
	return n == strlen(m->cmd_topic) && memcmp(topic, m->cmd_topic, n) == 0;
}

static int on_message(void *context, char *topic, int topic_len, MQTTAsync_message *msg)
{
	struct mqttlink *m = context;

	pthread_mutex_lock(&m->lock);
	if (!is_cmd_topic(m, topic, topic_len)) {
		m->stats.cmd_dropped_foreign++; /* e.g. left in the session by an older config */
	} else if (msg->retained) {
		/* A retained command would be acted on again at every reconnect. */
		m->stats.cmd_dropped_retained++;
	} else if (msg->payloadlen <= 0 || msg->payloadlen >= MQTTLINK_CMD_MAX) {
		m->stats.cmd_dropped_oversize++;
	} else if (m->cmd_count == MQTTLINK_CMD_SLOTS) {
		m->stats.cmd_dropped_full++;
	} else {
		struct mqttlink_cmd_slot *s = &m->cmd[(m->cmd_head + m->cmd_count) % MQTTLINK_CMD_SLOTS];
		s->len = (unsigned)msg->payloadlen;
		memcpy(s->data, msg->payload, s->len);
		m->cmd_count++;
		m->stats.cmd_received++;
	}
	pthread_mutex_unlock(&m->lock);
	MQTTAsync_freeMessage(&msg);
	MQTTAsync_free(topic);
	return 1; /* handled: paho must not deliver it again */
}

static void on_precious_success(void *context, MQTTAsync_successData *resp)
{
	struct mqttlink_entry *e = context;
	struct mqttlink *m = e->link;
	(void)resp;
	pthread_mutex_lock(&m->lock);
	e->state = MQTTLINK_ENTRY_DONE;
	m->stats.precious_delivered++;
	pthread_mutex_unlock(&m->lock);
}

static void on_precious_failure(void *context, MQTTAsync_failureData *resp)
{
	struct mqttlink_entry *e = context;
	struct mqttlink *m = e->link;
	(void)resp;
	pthread_mutex_lock(&m->lock);
	e->state = MQTTLINK_ENTRY_PENDING; /* poll hands it over again */
	e->retry = true;
	m->stats.precious_retried++;
	pthread_mutex_unlock(&m->lock);
}

/* ---- precious queue (main thread, m->lock held) ------------------------- */

static struct mqttlink_entry *entry_at(struct mqttlink *m, unsigned i)
{
	assert(i < m->queue_count);
	return &m->queue[(m->queue_head + i) % MQTTLINK_PRECIOUS_MAX];
}

static void reclaim(struct mqttlink *m)
{
	while (m->queue_count > 0 && m->queue[m->queue_head].state == MQTTLINK_ENTRY_DONE) {
		m->queue[m->queue_head].state = MQTTLINK_ENTRY_FREE;
		m->queue_head = (m->queue_head + 1) % MQTTLINK_PRECIOUS_MAX;
		m->queue_count--;
	}
}

/* True when an entry after index i carries the same topic: a retried
 * message older than one already handed over must not overwrite it. */
static bool overtaken(struct mqttlink *m, unsigned i)
{
	const char *topic = entry_at(m, i)->topic;
	for (unsigned j = i + 1; j < m->queue_count; j++) {
		const struct mqttlink_entry *later = entry_at(m, j);
		if (later->state != MQTTLINK_ENTRY_PENDING && strcmp(later->topic, topic) == 0)
			return true;
	}
	return false;
}

/* Hands pending entries to paho in order, stopping at the first refusal so
 * that order is kept. The mutex is released around the paho call: paho may
 * run a callback (which takes it) before sendMessage returns. */
static void flush_queue(struct mqttlink *m)
{
	for (unsigned i = 0; i < m->queue_count; i++) {
		struct mqttlink_entry *e = entry_at(m, i);
		if (e->state != MQTTLINK_ENTRY_PENDING)
			continue;
		if (e->retry && overtaken(m, i)) {
			e->state = MQTTLINK_ENTRY_DONE;
			m->stats.precious_superseded++;
			continue;
		}
		e->state = MQTTLINK_ENTRY_SENDING;
		e->retry = false;
		pthread_mutex_unlock(&m->lock);

		MQTTAsync_message msg = MQTTAsync_message_initializer;
		msg.payload = e->payload;
		msg.payloadlen = (int)e->payload_len;
		msg.qos = e->qos;
		msg.retained = e->retained ? 1 : 0;
		MQTTAsync_responseOptions ro = MQTTAsync_responseOptions_initializer;
		ro.onSuccess = on_precious_success;
		ro.onFailure = on_precious_failure;
		ro.context = e;
		int rc = MQTTAsync_sendMessage(m->client, e->topic, &msg, &ro);

		pthread_mutex_lock(&m->lock);
		if (e->state == MQTTLINK_ENTRY_SENDING) /* else a callback already settled it */
			e->state = rc == MQTTASYNC_SUCCESS ? MQTTLINK_ENTRY_SENT : MQTTLINK_ENTRY_PENDING;
		if (rc != MQTTASYNC_SUCCESS)
			break; /* paho's buffer is full or the link just went: retry next poll */
	}
	reclaim(m);
}

/* Full queue: replace the newest same-topic entry if paho does not have it yet. */
static bool replace_newest(struct mqttlink *m, const char *topic, const char *payload,
			   size_t len, int qos, bool retained)
{
	for (unsigned i = m->queue_count; i-- > 0;) {
		struct mqttlink_entry *e = entry_at(m, i);
		if (strcmp(e->topic, topic) != 0)
			continue;
		if (e->state != MQTTLINK_ENTRY_PENDING)
			return false; /* paho has it (or it is done): cannot take it back */
		memcpy(e->payload, payload, len);
		e->payload_len = (unsigned)len;
		e->qos = qos;
		e->retained = retained;
		return true;
	}
	return false;
}

static int queue_precious(struct mqttlink *m, const char *topic, const char *payload, size_t len,
			  int qos, bool retained)
{
	assert(len <= MQTTLINK_PRECIOUS_PAYLOAD_MAX);
	/* Asked before taking the mutex: no paho call is made while it is held. */
	bool up = MQTTAsync_isConnected(m->client) != 0;
	pthread_mutex_lock(&m->lock);
	reclaim(m);
	if (m->queue_count == MQTTLINK_PRECIOUS_MAX) {
		bool replaced = replace_newest(m, topic, payload, len, qos, retained);
		if (replaced)
			m->stats.precious_superseded++;
		else
			m->stats.precious_overflowed++;
		pthread_mutex_unlock(&m->lock);
		if (replaced) {
			say(m, MQTTLINK_LOG_WARNING,
			    "precious queue full: %s replaced its older queued message", topic);
			return 0;
		}
		if (m->overflow_run++ % MQTTLINK_LOG_EVERY == 0)
			say(m, MQTTLINK_LOG_WARNING,
			    "precious queue full (%u): %s refused (%llu refused in this run)",
			    (unsigned)MQTTLINK_PRECIOUS_MAX, topic, (unsigned long long)m->overflow_run);
		return -ENOBUFS;
	}
	struct mqttlink_entry *e = &m->queue[(m->queue_head + m->queue_count) % MQTTLINK_PRECIOUS_MAX];
	assert(e->state == MQTTLINK_ENTRY_FREE);
	snprintf(e->topic, sizeof e->topic, "%s", topic);
	memcpy(e->payload, payload, len);
	e->payload_len = (unsigned)len;
	e->qos = qos;
	e->retained = retained;
	e->retry = false;
	e->state = MQTTLINK_ENTRY_PENDING;
	m->queue_count++;
	m->stats.precious_queued++;
	if (up)
		flush_queue(m);
	pthread_mutex_unlock(&m->lock);
	if (m->overflow_run > 0) {
		say(m, MQTTLINK_LOG_INFO, "precious queue has room again; %llu refused while full",
		    (unsigned long long)m->overflow_run);
		m->overflow_run = 0;
	}
	return 0;
}

/* ---- open / close ------------------------------------------------------- */

static int create_client(struct mqttlink *m)
{
	MQTTAsync_createOptions co = MQTTAsync_createOptions_initializer;
	co.MQTTVersion = MQTTVERSION_3_1_1;
	co.sendWhileDisconnected = 1;
	co.allowDisconnectedSendAtAnyTime = 1; /* else -3 before the first connect */
	co.maxBufferedMessages = (int)m->cfg.buffer_messages;
	co.deleteOldestMessages = 0; /* dropped ones would never complete: refuse instead */
	MQTTAsync client = NULL;
	int rc = MQTTAsync_createWithOptions(&client, m->cfg.uri, m->cfg.client_id,
					     MQTTCLIENT_PERSISTENCE_NONE, NULL, &co);
	if (rc != MQTTASYNC_SUCCESS) {
		say(m, MQTTLINK_LOG_ERROR, "cannot create client: %s (%d)", MQTTAsync_strerror(rc), rc);
		return rc == MQTTASYNC_BAD_PROTOCOL || rc == MQTTASYNC_BAD_UTF8_STRING ||
				       rc == MQTTASYNC_NULL_PARAMETER ? -EINVAL : -EIO;
	}
	m->client = client;
	rc = MQTTAsync_setCallbacks(client, m, on_connection_lost, on_message, NULL);
	if (rc == MQTTASYNC_SUCCESS)
		rc = MQTTAsync_setConnected(client, m, on_connected);
	if (rc != MQTTASYNC_SUCCESS) {
		say(m, MQTTLINK_LOG_ERROR, "cannot set callbacks: %s (%d)", MQTTAsync_strerror(rc), rc);
		return -EIO;
	}
	return 0;
}

static int start_connect(struct mqttlink *m)
{
	MQTTAsync_willOptions will = MQTTAsync_willOptions_initializer;
	will.topicName = m->status_topic;
	will.message = "offline";
	will.retained = 1;
	will.qos = 1;
	MQTTAsync_SSLOptions ssl = MQTTAsync_SSLOptions_initializer;
	ssl.trustStore = m->cfg.ca_file[0] != '\0' ? m->cfg.ca_file : NULL;
	ssl.enableServerCertAuth = 1;
	ssl.verify = 1; /* the initializer leaves 0: no host name check */

	MQTTAsync_connectOptions o = MQTTAsync_connectOptions_initializer;
	o.MQTTVersion = MQTTVERSION_3_1_1;
	o.keepAliveInterval = (int)m->cfg.keepalive_s;
	/* A clean session: the broker keeps nothing for us while we are away,
	 * so commands sent then are not queued and carried out on our return
	 * (stale by then). Our own precious queue, not the session, resends
	 * alarm messages that were in flight at a loss. */
	o.cleansession = 1;
	/* Reconnects are ours (probe(), from mqttlink_poll): paho's own timer
	 * is checked about once a second and only after a full interval, which
	 * put the link back 2 to 4 s after the broker. */
	o.automaticReconnect = 0;
	o.connectTimeout = 10;
	o.will = &will; /* paho copies the will and the credentials at connect */
	o.username = m->cfg.username[0] != '\0' ? m->cfg.username : NULL;
	o.password = m->cfg.password_file[0] != '\0' ? m->password : NULL;
	o.ssl = m->tls ? &ssl : NULL;
	o.onSuccess = on_connect_success;
	o.onFailure = on_connect_failure;
	o.context = m;
	atomic_store(&m->connecting, 1);
	int rc = MQTTAsync_connect(m->client, &o);
	if (rc != MQTTASYNC_SUCCESS) {
		atomic_store(&m->connecting, 0);
		say(m, MQTTLINK_LOG_ERROR, "cannot start connecting: %s (%d)", MQTTAsync_strerror(rc),
		    rc);
		return rc == MQTTASYNC_BAD_STRUCTURE || rc == MQTTASYNC_NULL_PARAMETER ? -EINVAL : -EIO;
	}
	return 0;
}

static int prepare(struct mqttlink *m, const struct mqttlink_cfg *cfg)
{
	int rc = check_cfg(cfg);
	if (rc != 0) {
		say(m, MQTTLINK_LOG_ERROR, "invalid configuration");
		return rc;
	}
	m->tls = has_prefix(cfg->uri, "ssl://") || has_prefix(cfg->uri, "mqtts://") ||
		 has_prefix(cfg->uri, "wss://");
	if (cfg->ca_file[0] != '\0' && !m->tls) {
		say(m, MQTTLINK_LOG_ERROR, "ca_file given but the URI is not ssl:// or mqtts://");
		return -EINVAL;
	}
	if (build_topic(m->status_topic, sizeof m->status_topic, cfg->topic_prefix, "status") != 0 ||
	    build_topic(m->cmd_topic, sizeof m->cmd_topic, cfg->topic_prefix, "cmd") != 0) {
		say(m, MQTTLINK_LOG_ERROR, "topic prefix too long");
		return -EINVAL;
	}
	if (cfg->password_file[0] != '\0')
		return read_password(m);
	return 0;
}

int mqttlink_open(struct mqttlink *m, const struct mqttlink_cfg *cfg)
{
	assert(m != NULL);
	assert(cfg != NULL);
	memset(m, 0, sizeof *m);
	m->cfg = *cfg;
	m->cfg.uri[sizeof m->cfg.uri - 1] = '\0'; /* for say() before the check */
	m->lost_since_mono_ms = -1;

	int rc = prepare(m, cfg);
	if (rc != 0)
		goto out_clear;
	m->queue = calloc(MQTTLINK_PRECIOUS_MAX, sizeof m->queue[0]);
	if (m->queue == NULL) {
		rc = -ENOMEM;
		goto out_clear;
	}
	for (unsigned i = 0; i < MQTTLINK_PRECIOUS_MAX; i++)
		m->queue[i].link = m;
	if (pthread_mutex_init(&m->lock, NULL) != 0) {
		rc = -ENOMEM;
		goto out_free;
	}
	m->retry_first_ms = m->cfg.retry_min_s != 0 ? 1000 * (int64_t)m->cfg.retry_min_s
						    : MQTTLINK_RETRY_FIRST_DEFAULT_MS;
	m->retry_max_ms = m->cfg.retry_max_s != 0 ? 1000 * (int64_t)m->cfg.retry_max_s
						  : MQTTLINK_RETRY_MAX_DEFAULT_MS;
	if (m->retry_max_ms < m->retry_first_ms)
		m->retry_max_ms = m->retry_first_ms;
	m->backoff_ms = m->retry_first_ms;
	m->next_probe_mono_ms = INT64_MIN;
	rc = create_client(m);
	if (rc == 0)
		rc = start_connect(m);
	if (rc != 0)
		goto out_destroy;
	m->open = true;
	return 0;

out_destroy:
	if (m->client != NULL)
		MQTTAsync_destroy(&m->client);
	pthread_mutex_destroy(&m->lock);
out_free:
	free(m->queue);
out_clear:
	memset(m->password, 0, sizeof m->password);
	m->queue = NULL;
	m->client = NULL;
	m->open = false;
	return rc;
}

static void wait_flag(atomic_int *flag, int timeout_ms)
{
	const struct timespec step = {.tv_sec = 0, .tv_nsec = 5 * 1000 * 1000};
	for (int waited = 0; waited < timeout_ms && atomic_load(flag) == 0; waited += 5)
		nanosleep(&step, NULL);
}

static void on_disconnected(void *context, MQTTAsync_successData *resp)
{
	(void)resp;
	atomic_store((atomic_int *)context, 1);
}

static void on_disconnect_failed(void *context, MQTTAsync_failureData *resp)
{
	(void)resp;
	atomic_store((atomic_int *)context, -1);
}

/* Publishes "offline" and waits, bounded, for its acknowledgement. */
static void say_offline(struct mqttlink *m)
{
	MQTTAsync_message msg = MQTTAsync_message_initializer;
	msg.payload = (void *)"offline";
	msg.payloadlen = 7;
	msg.qos = 1;
	msg.retained = 1;
	MQTTAsync_responseOptions ro = MQTTAsync_responseOptions_initializer;
	int rc = MQTTAsync_sendMessage(m->client, m->status_topic, &msg, &ro);
	if (rc == MQTTASYNC_SUCCESS)
		rc = MQTTAsync_waitForCompletion(m->client, ro.token, MQTTLINK_CLOSE_WAIT_MS);
	if (rc != MQTTASYNC_SUCCESS)
		say(m, MQTTLINK_LOG_WARNING, "\"offline\" not confirmed: %s (%d)",
		    MQTTAsync_strerror(rc), rc);
}

static int64_t mono_now_ms(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

static void probe(struct mqttlink *m, bool up, int64_t now_mono_ms);

/* Hands every queued precious message to paho and waits, bounded, until the
 * broker has acknowledged them all (or the link goes). Returns those left. */
static unsigned flush_before_close(struct mqttlink *m)
{
	const struct timespec step = {.tv_sec = 0, .tv_nsec = 10 * 1000 * 1000};
	unsigned left = 0;
	for (int waited = 0; waited <= MQTTLINK_CLOSE_WAIT_MS; waited += 10) {
		bool up = MQTTAsync_isConnected(m->client) != 0;
		pthread_mutex_lock(&m->lock);
		if (up)
			flush_queue(m);
		reclaim(m);
		left = m->queue_count;
		pthread_mutex_unlock(&m->lock);
		if (left == 0 || !up)
			break;
		nanosleep(&step, NULL);
	}
	return left;
}

void mqttlink_close(struct mqttlink *m)
{
	if (m == NULL || !m->open)
		return;
	pthread_mutex_lock(&m->lock);
	reclaim(m);
	bool pending = m->queue_count > 0;
	pthread_mutex_unlock(&m->lock);
	/* Alarm messages are waiting and the broker is away (or just back and
	 * paho not yet reconnected): give it a bounded moment. */
	const struct timespec step = {.tv_sec = 0, .tv_nsec = 10 * 1000 * 1000};
	for (int waited = 0; pending && waited < MQTTLINK_CLOSE_CONNECT_WAIT_MS &&
			     !MQTTAsync_isConnected(m->client); waited += 10) {
		probe(m, false, mono_now_ms());
		nanosleep(&step, NULL);
	}
	if (MQTTAsync_isConnected(m->client)) {
		/* Alarm messages first: "offline" must be the last word. */
		flush_before_close(m);
		say_offline(m);
		atomic_int done = 0;
		MQTTAsync_disconnectOptions d = MQTTAsync_disconnectOptions_initializer;
		d.timeout = MQTTLINK_CLOSE_WAIT_MS;
		d.onSuccess = on_disconnected;
		d.onFailure = on_disconnect_failed;
		d.context = &done;
		if (MQTTAsync_disconnect(m->client, &d) == MQTTASYNC_SUCCESS)
			wait_flag(&done, MQTTLINK_CLOSE_WAIT_MS);
		/* done lives on this stack: destroy below ends every callback first. */
	} else {
		say(m, MQTTLINK_LOG_WARNING, "closing while disconnected: the broker's last will "
					     "reports offline");
	}
	pthread_mutex_lock(&m->lock);
	reclaim(m);
	unsigned left = m->queue_count;
	pthread_mutex_unlock(&m->lock);
	if (left > 0)
		say(m, MQTTLINK_LOG_WARNING, "%u precious messages not delivered at close", left);
	MQTTAsync_destroy(&m->client);
	pthread_mutex_destroy(&m->lock);
	free(m->queue);
	m->queue = NULL;
	m->client = NULL;
	memset(m->password, 0, sizeof m->password);
	m->open = false;
	say(m, MQTTLINK_LOG_INFO, "closed");
}

/* ---- publish, poll, commands -------------------------------------------- */

static bool suffix_ok(const char *s)
{
	return s[0] != '\0' && s[0] != '/' && strpbrk(s, "+#") == NULL;
}

static int publish_state(struct mqttlink *m, const char *topic, const char *payload, size_t len,
			 int qos, bool retained)
{
	MQTTAsync_message msg = MQTTAsync_message_initializer;
	msg.payload = (void *)payload; /* paho copies topic and payload */
	msg.payloadlen = (int)len;
	msg.qos = qos;
	msg.retained = retained ? 1 : 0;
	MQTTAsync_responseOptions ro = MQTTAsync_responseOptions_initializer;
	int rc = MQTTAsync_sendMessage(m->client, topic, &msg, &ro);

	pthread_mutex_lock(&m->lock);
	if (rc == MQTTASYNC_SUCCESS)
		m->stats.published++;
	else
		m->stats.dropped++;
	pthread_mutex_unlock(&m->lock);
	if (rc == MQTTASYNC_SUCCESS) {
		if (m->dropping)
			say(m, MQTTLINK_LOG_INFO, "state messages accepted again after %llu dropped",
			    (unsigned long long)m->drop_run);
		m->dropping = false;
		m->drop_run = 0;
		return 0;
	}
	if (m->drop_run++ % MQTTLINK_LOG_EVERY == 0)
		say(m, MQTTLINK_LOG_WARNING, "state message on %s dropped: %s (%d)", topic,
		    rc == MQTTASYNC_MAX_BUFFERED_MESSAGES ? "offline buffer full"
							  : MQTTAsync_strerror(rc), rc);
	m->dropping = true;
	return rc == MQTTASYNC_MAX_BUFFERED_MESSAGES ? -ENOBUFS : -EIO;
}

int mqttlink_publish(struct mqttlink *m, const char *topic_suffix, const char *payload, int qos,
		     bool retained, bool precious)
{
	assert(m != NULL);
	assert(topic_suffix != NULL);
	assert(payload != NULL);
	if (!m->open)
		return -ENOTCONN;
	if (qos < 0 || qos > 2 || !suffix_ok(topic_suffix))
		return -EINVAL;
	if (strlen(topic_suffix) >= MQTTLINK_SUFFIX_MAX)
		return -EMSGSIZE;
	char topic[MQTTLINK_TOPIC_MAX];
	if (build_topic(topic, sizeof topic, m->cfg.topic_prefix, topic_suffix) != 0)
		return -EMSGSIZE;
	size_t len = strlen(payload);
	if (precious) {
		if (len > MQTTLINK_PRECIOUS_PAYLOAD_MAX)
			return -EMSGSIZE;
		return queue_precious(m, topic, payload, len, qos, retained);
	}
	if (len > INT_MAX)
		return -EMSGSIZE;
	return publish_state(m, topic, payload, len, qos, retained);
}

/* Logs link transitions and connect failures (main thread). The count of
 * reconnects comes from paho's connected callback (mqttlink_get_stats). */
static void track_connection(struct mqttlink *m, bool up, int64_t now_mono_ms)
{
	unsigned lost = atomic_load(&m->lost_events);
	bool blip = lost != m->seen_lost_events && up && m->was_connected;
	m->seen_lost_events = lost;

	if (up && !m->was_connected) {
		if (!m->ever_connected)
			say(m, MQTTLINK_LOG_INFO, "connected");
		else
			say(m, MQTTLINK_LOG_INFO, "reconnected after %.1f s",
			    (double)(now_mono_ms - m->lost_since_mono_ms) / 1000.0);
		m->ever_connected = true;
		m->logged_fail_code = 0;
	} else if (blip) {
		say(m, MQTTLINK_LOG_WARNING, "connection lost and restored between two polls");
	} else if (!up && m->was_connected) {
		say(m, MQTTLINK_LOG_WARNING, "connection lost; retrying");
		m->lost_since_mono_ms = now_mono_ms;
	}
	if (!up && m->lost_since_mono_ms < 0)
		m->lost_since_mono_ms = now_mono_ms;
	m->was_connected = up;

	pthread_mutex_lock(&m->lock);
	int code = m->connect_fail_code;
	char msg[sizeof m->connect_fail_msg];
	memcpy(msg, m->connect_fail_msg, sizeof msg);
	pthread_mutex_unlock(&m->lock);
	if (!up && code != 0 && code != m->logged_fail_code) {
		/* Positive codes are CONNACK return codes (5: not authorised). */
		say(m, MQTTLINK_LOG_WARNING, "connect failed: %s (%d)%s%s; retrying",
		    code < 0 ? MQTTAsync_strerror(code) : "refused by the broker", code,
		    msg[0] != '\0' ? ": " : "", msg);
		m->logged_fail_code = code;
	}
}

static void log_command_drops(struct mqttlink *m)
{
	pthread_mutex_lock(&m->lock);
	struct mqttlink_stats s = m->stats;
	pthread_mutex_unlock(&m->lock);
	uint64_t drops = s.cmd_dropped_oversize + s.cmd_dropped_full + s.cmd_dropped_retained +
			 s.cmd_dropped_foreign;
	if (drops != m->logged_cmd_drops) {
		say(m, MQTTLINK_LOG_WARNING, "commands dropped so far: %llu oversize or empty, %llu "
					     "ring full, %llu retained, %llu on other topics",
		    (unsigned long long)s.cmd_dropped_oversize, (unsigned long long)s.cmd_dropped_full,
		    (unsigned long long)s.cmd_dropped_retained,
		    (unsigned long long)s.cmd_dropped_foreign);
		m->logged_cmd_drops = drops;
	}
	if (s.precious_superseded != m->logged_superseded) {
		say(m, MQTTLINK_LOG_WARNING, "precious messages superseded so far: %llu",
		    (unsigned long long)s.precious_superseded);
		m->logged_superseded = s.precious_superseded;
	}
}

/* While down and no attempt is under way: a new connect, at once after a
 * loss, then after a back-off from retry_min to retry_max (ms below a second
 * by default: 250, 500, 500, ...), reset by a good connection. A
 * refused connect costs microseconds; one to a silent host ends by paho's
 * connect timeout before the next is started. */
static void probe(struct mqttlink *m, bool up, int64_t now_mono_ms)
{
	if (up) {
		m->backoff_ms = m->retry_first_ms;
		m->next_probe_mono_ms = now_mono_ms; /* a loss is retried at once */
		return;
	}
	if (atomic_load(&m->connecting) != 0 || now_mono_ms < m->next_probe_mono_ms)
		return;
	m->next_probe_mono_ms = now_mono_ms + m->backoff_ms;
	m->backoff_ms = m->backoff_ms * 2 > m->retry_max_ms ? m->retry_max_ms : m->backoff_ms * 2;
	(void)start_connect(m); /* a failure to start is logged and retried */
}

int mqttlink_poll(struct mqttlink *m, int64_t now_mono_ms)
{
	assert(m != NULL);
	if (!m->open)
		return -ENOTCONN;
	bool up = MQTTAsync_isConnected(m->client) != 0;
	track_connection(m, up, now_mono_ms);
	probe(m, up, now_mono_ms);
	int sub = atomic_exchange(&m->sub_fail_code, 0);
	if (sub != 0)
		say(m, MQTTLINK_LOG_WARNING, "subscribing to %s failed (%d): commands will not arrive "
					     "until the next reconnect", m->cmd_topic, sub);
	if (up) {
		pthread_mutex_lock(&m->lock);
		flush_queue(m);
		pthread_mutex_unlock(&m->lock);
	}
	log_command_drops(m);
	return up ? 0 : -ENOTCONN;
}

unsigned mqttlink_connect_count(const struct mqttlink *m)
{
	assert(m != NULL);
	return m->open ? atomic_load(&((struct mqttlink *)m)->connect_events) : 0;
}

bool mqttlink_connected(const struct mqttlink *m)
{
	assert(m != NULL);
	return m->open && MQTTAsync_isConnected(m->client) != 0;
}

int mqttlink_take_command(struct mqttlink *m, char *buf, size_t buf_size)
{
	assert(m != NULL);
	assert(buf != NULL || buf_size == 0);
	if (!m->open)
		return 0;
	pthread_mutex_lock(&m->lock);
	if (m->cmd_count == 0) {
		pthread_mutex_unlock(&m->lock);
		return 0;
	}
	const struct mqttlink_cmd_slot *s = &m->cmd[m->cmd_head];
	int rc;
	if ((size_t)s->len + 1 > buf_size) {
		m->stats.cmd_dropped_oversize++;
		rc = -ENOSPC;
	} else {
		memcpy(buf, s->data, s->len);
		buf[s->len] = '\0';
		rc = (int)s->len;
	}
	m->cmd_head = (m->cmd_head + 1) % MQTTLINK_CMD_SLOTS;
	m->cmd_count--;
	pthread_mutex_unlock(&m->lock);
	return rc;
}

void mqttlink_get_stats(struct mqttlink *m, struct mqttlink_stats *out)
{
	assert(m != NULL);
	assert(out != NULL);
	memset(out, 0, sizeof *out);
	if (!m->open)
		return;
	pthread_mutex_lock(&m->lock);
	reclaim(m);
	*out = m->stats;
	out->precious_pending = m->queue_count;
	unsigned connects = atomic_load(&m->connect_events);
	out->reconnects = connects > 1 ? connects - 1 : 0;
	pthread_mutex_unlock(&m->lock);
}
