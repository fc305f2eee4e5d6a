/*
 * check_run.c - what `floodgauge check` looks at beyond the config's own
 * consistency: the things `run` would trip over at start (see check_run.h).
 *
 * Each check mirrors what run does with the value: where run stops (paho
 * refuses the URI or the client id, the password or CA file cannot be read),
 * check reports an error; where run keeps going and retries (a host name that
 * does not resolve yet, a serial device not plugged in), check warns. The
 * state and events files are not looked at: run reports a failed write once
 * and keeps the events until it can write them. Nothing here connects anywhere: host names are only
 * resolved.
 */
#include "check_run.h"

#include <errno.h>
#include <fcntl.h>
#include <netdb.h>
#include <stdarg.h>
#include <stdlib.h>
#include <stdbool.h>
#include <string.h>
#include <sys/socket.h>
#include <sys/stat.h>
#include <unistd.h>

#include <netinet/in.h>

struct tally {
	const struct fg_config *cfg;
	FILE *out;
	unsigned errors, warnings;
};

static void say(struct tally *t, bool error, int line, const char *fmt, ...)
	__attribute__((format(printf, 4, 5)));

static void say(struct tally *t, bool error, int line, const char *fmt, ...)
{
	va_list ap;
	if (line > 0)
		fprintf(t->out, "%s:%d: %s", t->cfg->path, line, error ? "" : "warning: ");
	else
		fprintf(t->out, "%s: %s", t->cfg->path, error ? "" : "warning: ");
	va_start(ap, fmt);
	vfprintf(t->out, fmt, ap);
	va_end(ap);
	fputc('\n', t->out);
	if (error)
		t->errors++;
	else
		t->warnings++;
}

bool check_run_utf8_ok(const char *s)
{
	const unsigned char *p = (const unsigned char *)s;
	while (*p != 0) {
		unsigned n, cp;
		if (*p < 0x80) {
			p++;
			continue;
		}
		if ((*p & 0xe0) == 0xc0) {
			n = 1;
			cp = *p & 0x1fu;
		} else if ((*p & 0xf0) == 0xe0) {
			n = 2;
			cp = *p & 0x0fu;
		} else if ((*p & 0xf8) == 0xf0) {
			n = 3;
			cp = *p & 0x07u;
		} else {
			return false;
		}
		for (unsigned k = 1; k <= n; k++) {
			if ((p[k] & 0xc0) != 0x80)
				return false;
			cp = (cp << 6) | (p[k] & 0x3fu);
		}
		/* overlong forms, surrogates and beyond U+10FFFF (RFC 3629) */
		if ((n == 1 && cp < 0x80) || (n == 2 && cp < 0x800) || (n == 3 && cp < 0x10000) ||
		    (cp >= 0xd800 && cp <= 0xdfff) || cp > 0x10ffff)
			return false;
		p += n + 1;
	}
	return true;
}

/* 0 when name resolves; else getaddrinfo's code. */
static int resolve(const char *host, int port, struct addrinfo **list)
{
	struct addrinfo hints;
	char service[8];
	memset(&hints, 0, sizeof hints);
	hints.ai_family = AF_UNSPEC;
	hints.ai_socktype = SOCK_STREAM;
	hints.ai_flags = AI_NUMERICSERV;
	snprintf(service, sizeof service, "%d", port);
	return getaddrinfo(host, service, &hints, list);
}

static bool is_loopback(const struct sockaddr *sa)
{
	if (sa->sa_family == AF_INET) {
		const struct sockaddr_in *a = (const struct sockaddr_in *)sa;
		return (ntohl(a->sin_addr.s_addr) >> 24) == 127;
	}
	if (sa->sa_family == AF_INET6) {
		const struct sockaddr_in6 *a = (const struct sockaddr_in6 *)sa;
		return IN6_IS_ADDR_LOOPBACK(&a->sin6_addr);
	}
	return false;
}

static void check_host(struct tally *t, int line, const char *what, const char *host, int port)
{
	struct addrinfo *list = NULL;
	int rc = resolve(host, port, &list);
	if (rc != 0) {
		say(t, false, line, "%s host '%s' does not resolve now (%s); run starts anyway and "
				    "keeps retrying (DNS may come up after us at boot)",
		    what, host, gai_strerror(rc));
		return;
	}
	freeaddrinfo(list);
}

static void check_export(struct tally *t)
{
	const struct export_cfg *e = &t->cfg->exp;
	if (!e->enabled)
		return;
	struct addrinfo *list = NULL;
	/* Listening: the passive form, so "" and "0.0.0.0" mean every address. */
	struct addrinfo hints;
	char service[8];
	memset(&hints, 0, sizeof hints);
	hints.ai_family = AF_UNSPEC;
	hints.ai_socktype = SOCK_STREAM;
	hints.ai_flags = AI_PASSIVE | AI_NUMERICSERV;
	snprintf(service, sizeof service, "%d", e->port);
	int rc = getaddrinfo(e->host, service, &hints, &list);
	if (rc != 0) {
		say(t, false, e->line, "export listen host '%s' does not resolve now (%s); run "
				       "starts anyway and tries again every 5 s", e->host,
		    gai_strerror(rc));
		return;
	}
	bool beyond = false;
	for (struct addrinfo *ai = list; ai != NULL; ai = ai->ai_next)
		beyond = beyond || !is_loopback(ai->ai_addr);
	freeaddrinfo(list);
	if (beyond)
		say(t, false, e->line, "the Modbus export listens beyond loopback (%s:%d): anyone "
				       "who reaches that port can read it and hold connections; "
				       "allow only the control system (firewall) or listen on "
				       "127.0.0.1", e->host, e->port);
}

/* The scheme paho accepts, and whether it is TLS. -1: not accepted. */
static int uri_scheme(const char *uri, const char **host_start)
{
	static const char *const plain[] = {"tcp://", "ws://"};
	static const char *const tls[] = {"ssl://", "mqtts://", "wss://"};
	for (size_t i = 0; i < sizeof plain / sizeof plain[0]; i++)
		if (strncmp(uri, plain[i], strlen(plain[i])) == 0) {
			*host_start = uri + strlen(plain[i]);
			return 0;
		}
	for (size_t i = 0; i < sizeof tls / sizeof tls[0]; i++)
		if (strncmp(uri, tls[i], strlen(tls[i])) == 0) {
			*host_start = uri + strlen(tls[i]);
			return 1;
		}
	if (strstr(uri, "://") != NULL)
		return -1;
	*host_start = uri; /* no scheme: paho takes tcp */
	return 0;
}

/* Splits HOST[:PORT][/path] (or [v6]:PORT) out of the URI's host part. */
static void uri_host(const char *p, char *host, size_t host_size, int *port)
{
	size_t n;
	*port = 1883;
	if (*p == '[') {
		const char *end = strchr(p, ']');
		n = end != NULL ? (size_t)(end - p - 1) : strlen(p + 1);
		snprintf(host, host_size, "%.*s", (int)n, p + 1);
		p = end != NULL ? end + 1 : p + strlen(p);
	} else {
		n = strcspn(p, ":/");
		snprintf(host, host_size, "%.*s", (int)n, p);
		p += n;
	}
	if (*p == ':')
		*port = atoi(p + 1);
}

static void check_readable(struct tally *t, int line, const char *key, const char *path)
{
	int fd = open(path, O_RDONLY | O_NONBLOCK | O_CLOEXEC);
	if (fd < 0) {
		say(t, true, line, "%s %s cannot be read: %s (run would stop)", key, path,
		    strerror(errno));
		return;
	}
	struct stat st;
	if (fstat(fd, &st) == 0 && !S_ISREG(st.st_mode))
		say(t, true, line, "%s %s is not a regular file", key, path);
	else if (fstat(fd, &st) == 0 && (st.st_mode & S_IROTH) != 0 &&
		 strcmp(key, "password_file") == 0)
		say(t, false, line, "password_file %s is readable by everyone (chmod 600)", path);
	close(fd);
}

static void check_mqtt(struct tally *t)
{
	const struct mqtt_cfg *m = &t->cfg->mqtt;
	if (!m->enabled)
		return;
	const char *hp = NULL;
	int tls = uri_scheme(m->uri, &hp);
	if (tls < 0) {
		say(t, true, m->line, "uri '%s': scheme not supported (use tcp://, ssl:// or "
				      "mqtts://; ws:// and wss:// also work)", m->uri);
	} else {
		char host[FG_TEXT_MAX];
		int port;
		uri_host(hp, host, sizeof host, &port);
		if (host[0] == '\0')
			say(t, true, m->line, "uri '%s' has no host", m->uri);
		else
			check_host(t, m->line, "mqtt", host, port);
		if (m->ca_file[0] != '\0' && tls == 0)
			say(t, true, m->line, "ca_file is given but the uri is not ssl:// or mqtts:// "
					      "(run would refuse it)");
	}
	/* MQTT strings are UTF-8 (MQTT 3.1.1, 1.5.3); paho refuses the client
	 * id otherwise, and a broker drops a topic that is not. */
	if (!check_run_utf8_ok(m->client_id))
		say(t, true, m->line, "client_id is not valid UTF-8 (taken from [monitor] name "
				      "when not given)");
	if (!check_run_utf8_ok(m->topic_prefix))
		say(t, true, m->line, "topic_prefix is not valid UTF-8 (taken from [monitor] name "
				      "when not given)");
	if (!check_run_utf8_ok(m->username))
		say(t, true, m->line, "username is not valid UTF-8");
	if (m->password_file[0] != '\0')
		check_readable(t, m->line, "password_file", m->password_file);
	if (m->ca_file[0] != '\0')
		check_readable(t, m->line, "ca_file", m->ca_file);
}

static void check_sources(struct tally *t)
{
	for (unsigned i = 0; i < t->cfg->source_count; i++) {
		const struct source_cfg *s = &t->cfg->sources[i];
		if (s->protocol == SOURCE_MODBUS_RTU) {
			struct stat st;
			if (stat(s->device, &st) != 0)
				say(t, false, s->line, "source %s: device %s: %s; run starts and "
						       "retries it", s->name, s->device,
				    strerror(errno));
		} else if (s->host[0] != '\0') {
			char what[FG_NAME_MAX + 16];
			snprintf(what, sizeof what, "source %s", s->name);
			check_host(t, s->line, what, s->host, s->port);
		}
	}
}

int check_run(const struct fg_config *cfg, FILE *out, unsigned *warnings)
{
	struct tally t = {.cfg = cfg, .out = out};
	if (!check_run_utf8_ok(cfg->monitor.name))
		say(&t, true, 0, "[monitor] name is not valid UTF-8 (it names MQTT topics and the "
				 "client id)");
	check_sources(&t);
	check_mqtt(&t);
	check_export(&t);
	if (warnings != NULL)
		*warnings = t.warnings;
	return (int)t.errors;
}
