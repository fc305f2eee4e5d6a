/*
 * mqttlink.h - a non-blocking MQTT publisher and command channel over
 * paho.mqtt.c's asynchronous client (MQTTAsync, Debian 12's 1.3.12, linked
 * as paho-mqtt3as). It knows topics and payload bytes, nothing of the engine.
 *
 * Topics, under a configured PREFIX:
 *   PREFIX/status     "online" retained QoS 1, published on every (re)connect;
 *                     "offline" retained QoS 1 as the last will (sent by the
 *                     broker when the link dies uncleanly) and published by
 *                     mqttlink_close() itself (a clean disconnect fires no
 *                     will);
 *   PREFIX/cmd        subscribed (QoS 1) on every (re)connect; payloads are
 *                     handed to the main loop by mqttlink_take_command();
 *   PREFIX/SUFFIX     whatever mqttlink_publish() is given.
 *
 * Session. MQTT 3.1.1 (set explicitly: with paho's default the first retry
 * after a loss used 3.1), cleansession = 1: the broker queues nothing for us
 * while we are away, so commands sent meanwhile are never carried out late;
 * a precious message in flight at a loss fails in paho and our own queue
 * resends it. Reconnects are driven by mqttlink_poll() (paho's automatic
 * reconnect checks its timer about once a second and only after a full
 * interval): a loss is retried at once, then with a back-off doubling from
 * retry_min_s to retry_max_s (default 0.25 s to 0.5 s) and reset by a good
 * connection, so the link is back within about a second of the broker. Persistence is NONE (memory only): a
 * restart loses what was buffered, and nothing is ever written into the
 * current directory. A broker that is down at open is not an error: the
 * link keeps trying.
 *
 * Two kinds of message:
 *   state     (precious = false) go straight to paho. While disconnected
 *             paho buffers up to buffer_messages of them (the bound counts
 *             messages queued while connected too); beyond that a publish is
 *             refused at once, counted in stats.dropped, and logged (the first
 *             drop of a run, every MQTTLINK_LOG_EVERY-th, and the total when
 *             messages are taken again). A later state message makes up for a lost one.
 *   precious  (precious = true: alarm events) are copied into our own queue
 *             of MQTTLINK_PRECIOUS_MAX entries and stay there until the broker
 *             has acknowledged them (paho's per-message onSuccess), so a
 *             message paho refuses or reports failed is handed over again by
 *             mqttlink_poll() once connected, in the order published. They are
 *             handed to paho only while connected, so they never compete with
 *             state messages for paho's offline buffer. Delivery is at least
 *             once: a retry can repeat a message, never reorder the messages
 *             of one topic (a retried message that a newer one on its topic
 *             has overtaken is retired instead of resent, counted in
 *             stats.precious_superseded).
 *
 * When even the precious queue is full (MQTTLINK_PRECIOUS_MAX messages not
 * yet acknowledged, four per possible alarm), mqttlink_publish() of a
 * precious message
 *   1. replaces, in place, the newest queued message on the same topic if
 *      paho does not have that one yet: the broker's retained value for the
 *      topic still ends as the newest; the event it replaced is lost from the
 *      history, counted in stats.precious_superseded and logged;
 *   2. otherwise refuses the new message: returns -ENOBUFS, counts it in
 *      stats.precious_overflowed and logs a warning (the first refusal of
 *      each run, then every MQTTLINK_LOG_EVERY-th, and the total when the
 *      queue has room again). Nothing is dropped silently.
 * mqttlink_close() first hands the queue to paho and waits, bounded by
 * MQTTLINK_CLOSE_WAIT_MS, for the broker to acknowledge it all, then says
 * "offline"; messages still queued after that are lost with the process,
 * and the close logs how many.
 *
 * Threads. All mqttlink_* functions belong to one thread (the daemon's main
 * loop). paho runs its callbacks on its own threads; they only copy data
 * into the command ring or mark queue entries, under one mutex, and never
 * block or log. Connection health is taken from MQTTAsync_isConnected() in
 * mqttlink_poll(), because paho 1.3.12 does not call connectionLost when the
 * keepalive expires. Log lines come only from the main thread.
 *
 * struct mqttlink must stay at one address from open to close: paho holds
 * pointers into it (callback context, will, credentials).
 *
 * It is part of an advisory tool, not a safety system.
 */
#ifndef MQTTLINK_H
#define MQTTLINK_H

#include <pthread.h>
#include <stdatomic.h>
#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#include "fg_limits.h"

enum mqttlink_log_level {
	MQTTLINK_LOG_INFO,    /* connected, reconnected, closed */
	MQTTLINK_LOG_WARNING, /* lost, connect failed, drops, overflow */
	MQTTLINK_LOG_ERROR,   /* open refused */
};

/* Receives one complete line without a trailing newline; msg lives only for
 * the call. Called only from the thread calling mqttlink_* functions. */
typedef void mqttlink_log_fn(void *user, enum mqttlink_log_level level, const char *msg);

/* Precious messages held until acknowledged: four per possible alarm (an
 * alarm goes through at most unacknowledged, acknowledged, returned_unacknowledged,
 * normal in an outage before
 * repeating itself; beyond that the replace-in-place rule keeps the newest). */
#define MQTTLINK_PRECIOUS_MAX (4 * FG_ALARMS_MAX)

/* Largest precious payload, bytes without the NUL. An alarm event (DESIGN.md:
 * t, alarm, section, kind, priority, state, value, setpoint, reason) is about
 * 250 bytes with names of FG_NAME_MAX; four times that leaves room. */
#define MQTTLINK_PRECIOUS_PAYLOAD_MAX 1024

/* Longest topic suffix (SECTION/state, alarm/NAME, cmd/reply), bytes with the
 * NUL, and so the longest topic: PREFIX "/" SUFFIX. */
#define MQTTLINK_SUFFIX_MAX (2 * FG_NAME_MAX)
#define MQTTLINK_TOPIC_MAX (FG_TEXT_MAX + MQTTLINK_SUFFIX_MAX)

/* Commands: slots in the ring and the largest payload, bytes without the NUL.
 * Operators send a few commands a minute; a script acknowledging a flood of
 * alarms may send dozens at once: 64 between two polls (64 KiB). A command
 * is under 200 bytes; anything at or above the limit is dropped. Every drop
 * is counted by kind, and the daemon replies to it (without the id, which
 * was not kept) and logs it. */
#define MQTTLINK_CMD_SLOTS 64
#define MQTTLINK_CMD_MAX 1024

/* Bounds of the config. keepalive: MQTT 3.1.1 allows up to 65535 s; an hour
 * is already far too slow to notice a dead broker. Buffer: at least one. */
#define MQTTLINK_KEEPALIVE_MIN_S 1
#define MQTTLINK_KEEPALIVE_MAX_S 3600
#define MQTTLINK_BUFFER_MAX 100000
/* Reconnect back-off when the config gives 0, ms: 250, 500, 500, ... (a
 * refused connect costs microseconds; back within about half a second of
 * the broker when mqttlink_poll() is called often enough). */
#define MQTTLINK_RETRY_FIRST_DEFAULT_MS 250
#define MQTTLINK_RETRY_MAX_DEFAULT_MS 500
#define MQTTLINK_RETRY_MAX_S 3600

/* How long mqttlink_close() waits for "offline" to be acknowledged, and then
 * for the disconnect, ms (each bounded; the daemon is shutting down). */
#define MQTTLINK_CLOSE_WAIT_MS 2000
/* How long mqttlink_close() waits for a connection when alarm messages are
 * still queued and the broker is away (a reconnect takes about 1.3 s), ms. */
#define MQTTLINK_CLOSE_CONNECT_WAIT_MS 3000

/* Repeated warnings (drops, overflow) are logged first and every Nth. */
#define MQTTLINK_LOG_EVERY 100

struct mqttlink_cfg {
	char uri[FG_TEXT_MAX];           /* tcp://host:port, ssl://host:port or mqtts://host:port */
	char client_id[FG_NAME_MAX];     /* stable and unique per daemon (the session is kept) */
	char username[FG_NAME_MAX];      /* "" = none */
	char password_file[FG_PATH_MAX]; /* "" = none; else its first line is the password
					    (trailing CR/LF stripped); world-readable -> warning */
	char ca_file[FG_PATH_MAX];       /* TLS trust store (PEM); "" = the system's. Only for
					    ssl:// or mqtts://; the host name is verified */
	char topic_prefix[FG_TEXT_MAX];  /* e.g. "site/unit3/floodgauge"; no '+', '#', no
					    leading or trailing '/' */
	unsigned keepalive_s;            /* MQTTLINK_KEEPALIVE_MIN_S..MAX_S */
	unsigned buffer_messages;        /* paho offline buffer for state messages, 1..MAX */
	unsigned retry_min_s;            /* first reconnect interval, s; 0 = default */
	unsigned retry_max_s;            /* longest reconnect interval, s; 0 = default */
	mqttlink_log_fn *log;            /* may be NULL: no logging */
	void *log_user;                  /* passed to log */
};

struct mqttlink_stats {
	uint64_t published;            /* state messages accepted by paho (sent or buffered) */
	uint64_t dropped;              /* state messages refused (buffer full or paho error) */
	uint64_t precious_queued;      /* precious messages accepted into the queue */
	uint64_t precious_delivered;   /* precious messages acknowledged by the broker */
	uint64_t precious_superseded;  /* retired or replaced by a newer one on their topic */
	uint64_t precious_overflowed;  /* refused: queue full and nothing to replace */
	uint64_t precious_retried;     /* handed to paho again after a reported failure */
	unsigned precious_pending;     /* in the queue now, not yet acknowledged */
	uint64_t reconnects;           /* connections after the first (paho's count) */
	uint64_t cmd_received;         /* commands put into the ring */
	uint64_t cmd_dropped_oversize; /* empty, >= MQTTLINK_CMD_MAX, or larger than the
					  caller's buffer */
	uint64_t cmd_dropped_full;     /* ring full */
	uint64_t cmd_dropped_retained; /* retained (stale) commands, never acted on */
	uint64_t cmd_dropped_foreign;  /* messages on a topic other than PREFIX/cmd */
};

/* Private below this line: read it through the functions. */
enum mqttlink_entry_state {
	MQTTLINK_ENTRY_FREE,
	MQTTLINK_ENTRY_PENDING, /* queued, not handed to paho (or to be handed again) */
	MQTTLINK_ENTRY_SENDING, /* being handed to paho by the main thread */
	MQTTLINK_ENTRY_SENT,    /* paho has it; waiting for onSuccess/onFailure */
	MQTTLINK_ENTRY_DONE,    /* acknowledged or retired; reclaimed from the head */
};

struct mqttlink;

struct mqttlink_entry {
	struct mqttlink *link;          /* back pointer for paho's callbacks */
	enum mqttlink_entry_state state;/* under link->lock */
	bool retry;                     /* paho reported a failure: check for overtaking */
	int qos;
	bool retained;
	unsigned payload_len;
	char topic[MQTTLINK_TOPIC_MAX];
	char payload[MQTTLINK_PRECIOUS_PAYLOAD_MAX];
};

struct mqttlink_cmd_slot {
	unsigned len;                   /* bytes of data, 1..MQTTLINK_CMD_MAX-1 */
	char data[MQTTLINK_CMD_MAX];
};

struct mqttlink {
	bool open;
	void *client;                   /* MQTTAsync */
	struct mqttlink_cfg cfg;
	char password[FG_TEXT_MAX];
	char status_topic[MQTTLINK_TOPIC_MAX];
	char cmd_topic[MQTTLINK_TOPIC_MAX];
	bool tls;

	pthread_mutex_t lock;           /* guards everything down to stats */
	struct mqttlink_entry *queue;   /* MQTTLINK_PRECIOUS_MAX entries, allocated at open */
	unsigned queue_head;            /* oldest entry */
	unsigned queue_count;
	struct mqttlink_cmd_slot cmd[MQTTLINK_CMD_SLOTS];
	unsigned cmd_head, cmd_count;
	int connect_fail_code;          /* last connect failure seen by paho's thread */
	char connect_fail_msg[128];
	struct mqttlink_stats stats;

	atomic_uint connect_events;     /* bumped by paho's connected callback */
	atomic_uint lost_events;        /* bumped by paho's connectionLost callback */
	atomic_int sub_fail_code;       /* subscribe failure, 0 = none */
	atomic_int connecting;          /* a connect attempt is under way */

	/* Main thread only. */
	bool was_connected;
	bool ever_connected;
	unsigned seen_lost_events;
	int64_t lost_since_mono_ms;     /* -1: not known */
	int64_t next_probe_mono_ms;     /* next connect attempt while down */
	int64_t backoff_ms;             /* delay after the next failed attempt */
	int64_t retry_first_ms, retry_max_ms;
	int logged_fail_code;
	bool dropping;                  /* inside a run of state drops */
	uint64_t drop_run;
	uint64_t overflow_run;
	uint64_t logged_cmd_drops;      /* sum of the cmd drop counters last logged */
	uint64_t logged_superseded;
};

/*
 * Validates cfg, reads the password file, creates the paho client with its
 * last will (PREFIX/status "offline", retained, QoS 1) and starts connecting:
 * returns at once; the first and every later connect subscribes to PREFIX/cmd
 * and publishes "online". Returns 0, or -EINVAL (a field out of range or
 * unterminated, a bad prefix, a URI paho refuses, ca_file with a tcp:// URI,
 * a password line longer than FG_TEXT_MAX - 1), a negative errno from
 * reading the password file (-ENOENT, -EACCES), -ENOMEM, or -EIO for any
 * other paho failure; each logged. On failure nothing is held and
 * mqttlink_close(m) is harmless.
 */
int mqttlink_open(struct mqttlink *m, const struct mqttlink_cfg *cfg);

/*
 * Publishes payload (a NUL-terminated string, sent without the NUL) on
 * PREFIX/topic_suffix with qos 0..2. Never blocks on the network (paho's
 * sendMessage returns at once, connected or not). Returns 0 when the message
 * was taken (state: by paho; precious: into the queue, to be delivered),
 * -ENOBUFS when it was refused for lack of room (see the top comment),
 * -EINVAL for a bad suffix (empty, '+', '#', leading '/') or qos, -EMSGSIZE
 * for a topic too long or a precious payload over
 * MQTTLINK_PRECIOUS_PAYLOAD_MAX, -ENOTCONN when the link is not open, -EIO
 * for another paho error (counted as dropped).
 */
int mqttlink_publish(struct mqttlink *m, const char *topic_suffix, const char *payload, int qos,
		     bool retained, bool precious);

/*
 * One pass of housekeeping; call it every loop iteration with the caller's
 * CLOCK_MONOTONIC time in ms. Checks MQTTAsync_isConnected(), logs the
 * transitions (connected; connection lost; reconnected after N s; connect
 * failures), logs command drops, and once connected hands queued precious
 * messages to paho in order. Returns 0 when connected, -ENOTCONN when not
 * (or not open).
 */
int mqttlink_poll(struct mqttlink *m, int64_t now_mono_ms);

/* Connects completed since open (first and automatic ones), counted by
 * paho's connected callback: a change tells the caller to republish its
 * retained state. 0 when not open. */
unsigned mqttlink_connect_count(const struct mqttlink *m);

/* Whether paho has a connection now. False when not open. */
bool mqttlink_connected(const struct mqttlink *m);

/*
 * Copies the oldest command received on PREFIX/cmd into buf, NUL-terminated.
 * Returns its length (> 0), 0 when there is none (or not open), or -ENOSPC
 * when it did not fit in buf_size bytes with the NUL: it is then discarded
 * and counted in stats.cmd_dropped_oversize, so a small buffer cannot jam
 * the ring.
 */
int mqttlink_take_command(struct mqttlink *m, char *buf, size_t buf_size);

/* A consistent copy of the counters. Zeroes when not open. */
void mqttlink_get_stats(struct mqttlink *m, struct mqttlink_stats *out);

/*
 * When connected, publishes PREFIX/status "offline" (retained, QoS 1) and
 * waits up to MQTTLINK_CLOSE_WAIT_MS for the broker to acknowledge it, then
 * disconnects (waiting as long again at most) and destroys the client.
 * Logs how many precious messages were still queued. NULL-safe, and safe
 * after a failed open or a close.
 */
void mqttlink_close(struct mqttlink *m);

#endif
