/*
 * mbclient.c - the Modbus polling client (see mbclient.h) and its libmodbus
 * backend.
 *
 * Built in three parts: config checks and the read plan (init time, the only
 * place that sorts or allocates), the poll with its link state machine
 * (connected / waiting until next_attempt_mono_ms), and the libmodbus backend
 * at the end, which is the only code here that knows libmodbus.
 */
#include "mbclient.h"

#include <assert.h>
#include <errno.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include <modbus.h>

/* ---- config and plan ---------------------------------------------------- */

static bool str_terminated(const char *s, size_t size)
{
	return memchr(s, '\0', size) != NULL;
}

static bool baud_known(int baud)
{
	static const int rates[] = {MBCLIENT_BAUD_RATES};
	for (size_t i = 0; i < sizeof rates / sizeof rates[0]; i++)
		if (rates[i] == baud)
			return true;
	return false;
}

static int check_cfg(const struct mbclient_source_cfg *cfg)
{
	assert(cfg != NULL);
	if (!str_terminated(cfg->name, sizeof cfg->name) ||
	    !str_terminated(cfg->host, sizeof cfg->host) ||
	    !str_terminated(cfg->device, sizeof cfg->device))
		return -EINVAL;
	if (!(cfg->timeout_s >= MBCLIENT_TIMEOUT_MIN_S && cfg->timeout_s <= MBCLIENT_TIMEOUT_MAX_S))
		return -EINVAL; /* also refuses NaN */
	switch (cfg->protocol) {
	case MBCLIENT_PROTOCOL_TCP:
		if (cfg->host[0] == '\0' || cfg->port < 1 || cfg->port > 65535)
			return -EINVAL;
		if (cfg->unit_id < 0 || cfg->unit_id > 255)
			return -EINVAL;
		return 0;
	case MBCLIENT_PROTOCOL_RTU:
		if (cfg->device[0] == '\0' || !baud_known(cfg->baud))
			return -EINVAL;
		if (cfg->parity != 'N' && cfg->parity != 'E' && cfg->parity != 'O')
			return -EINVAL;
		if (cfg->data_bits != 8 || (cfg->stop_bits != 1 && cfg->stop_bits != 2))
			return -EINVAL;
		/* 0 is broadcast (no reply), 248..255 reserved: Modbus over serial
		 * line v1.02, section 2.2. libmodbus aborts on a read without one. */
		if (cfg->unit_id < 1 || cfg->unit_id > 247)
			return -EINVAL;
		return 0;
	}
	return -EINVAL;
}

static int check_point(const struct mbclient_point *p)
{
	if (p->table != MBCLIENT_TABLE_INPUT && p->table != MBCLIENT_TABLE_HOLDING)
		return -EINVAL;
	if ((unsigned)p->type >= REGCODEC_TYPE_COUNT || (unsigned)p->order >= REGCODEC_ORDER_COUNT)
		return -EINVAL;
	if ((unsigned)p->address + regcodec_width(p->type) > 65536u)
		return -EINVAL;
	return 0;
}

/* Sort key: table, then address, then point index (a stable, total order). */
static bool point_before(const struct mbclient *c, uint16_t a, uint16_t b)
{
	const struct mbclient_point *pa = &c->points[a];
	const struct mbclient_point *pb = &c->points[b];
	if (pa->table != pb->table)
		return pa->table < pb->table;
	if (pa->address != pb->address)
		return pa->address < pb->address;
	return a < b;
}

/* Insertion sort: at most FG_TAGS_MAX points, once, at init. */
static void sort_points(struct mbclient *c)
{
	for (unsigned i = 0; i < c->point_count; i++)
		c->sorted[i] = (uint16_t)i;
	for (unsigned i = 1; i < c->point_count; i++) {
		uint16_t key = c->sorted[i];
		unsigned j = i;
		while (j > 0 && point_before(c, key, c->sorted[j - 1])) {
			c->sorted[j] = c->sorted[j - 1];
			j--;
		}
		c->sorted[j] = key;
	}
}

/* Greedy merge over the sorted points: extend the open request while the
 * next point touches or overlaps it and the result fits FG_MODBUS_READ_MAX. */
static void build_plan(struct mbclient *c)
{
	struct mbclient_request *r = NULL;
	unsigned r_end = 0; /* one past the last register of r */

	c->request_count = 0;
	for (unsigned k = 0; k < c->point_count; k++) {
		const struct mbclient_point *p = &c->points[c->sorted[k]];
		unsigned p_end = (unsigned)p->address + regcodec_width(p->type);
		unsigned new_end = p_end > r_end ? p_end : r_end;

		if (r == NULL || r->table != p->table || p->address > r_end ||
		    new_end - r->address > FG_MODBUS_READ_MAX) {
			assert(c->request_count < FG_TAGS_MAX);
			r = &c->requests[c->request_count++];
			r->table = p->table;
			r->address = p->address;
			r->first = k;
			r->point_count = 0;
			r_end = p_end;
			new_end = p_end;
		}
		r_end = new_end;
		r->count = (uint16_t)(r_end - r->address);
		r->point_count++;
		c->offset[c->sorted[k]] = (uint16_t)(p->address - r->address);
		assert(r->count >= 1);
		assert(r->count <= FG_MODBUS_READ_MAX);
	}
}

int mbclient_init(struct mbclient *c, const struct mbclient_source_cfg *cfg,
		  const struct mbclient_point *points, unsigned point_count,
		  const struct mbclient_backend *be)
{
	int rc;

	assert(c != NULL);
	assert(cfg != NULL);
	assert(be != NULL);
	assert(points != NULL || point_count == 0);
	memset(c, 0, sizeof *c);
	if (point_count > FG_TAGS_MAX)
		return -E2BIG;
	rc = check_cfg(cfg);
	if (rc != 0)
		return rc;
	for (unsigned i = 0; i < point_count; i++) {
		rc = check_point(&points[i]);
		if (rc != 0)
			return rc;
	}
	c->cfg = *cfg;
	c->point_count = point_count;
	if (point_count > 0)
		memcpy(c->points, points, point_count * sizeof points[0]);
	sort_points(c);
	build_plan(c);

	rc = be->open(be->user, &c->cfg, &c->link);
	if (rc != 0) {
		c->link = NULL;
		return rc;
	}
	c->be = be;
	c->backoff_ms = MBCLIENT_BACKOFF_FIRST_MS;
	c->next_attempt_mono_ms = INT64_MIN; /* the first poll connects */
	return 0;
}

void mbclient_fini(struct mbclient *c)
{
	if (c == NULL || c->be == NULL || c->link == NULL)
		return;
	if (c->connected)
		c->be->close(c->link);
	c->be->free(c->link);
	c->connected = false;
	c->link = NULL;
	c->be = NULL;
}

/* ---- poll --------------------------------------------------------------- */

static void say(const struct mbclient *c, enum mbclient_log_level level, const char *fmt, ...)
	__attribute__((format(printf, 3, 4)));

static void say(const struct mbclient *c, enum mbclient_log_level level, const char *fmt, ...)
{
	char line[256];
	int n = snprintf(line, sizeof line, "source %s: ", c->cfg.name);
	va_list ap;

	if (c->cfg.log == NULL || n < 0)
		return;
	va_start(ap, fmt);
	int m = vsnprintf(line + n, sizeof line - (size_t)n, fmt, ap);
	va_end(ap);
	if (m < 0)
		return;
	if ((size_t)n + (size_t)m >= sizeof line) /* truncated: mark it, never overflow */
		memcpy(line + sizeof line - 4, "...", 4);
	c->cfg.log(c->cfg.log_user, level, line);
}

static const char *table_name(enum mbclient_table t)
{
	return t == MBCLIENT_TABLE_HOLDING ? "holding" : "input";
}

/* Modbus exception responses (codes 1..11): the device answered, the link is
 * in step, so it stays up. */
static bool is_exception(int err)
{
	return err <= -EMBXILFUN && err >= -EMBXGTAR;
}

static void link_failed(struct mbclient *c, int64_t now_mono_ms, int err, const char *what)
{
	assert(err < 0);
	if (c->connected)
		c->be->close(c->link);
	c->connected = false;
	c->last_err = err;
	c->next_attempt_mono_ms = now_mono_ms + c->backoff_ms;
	c->backoff_ms *= 2;
	if (c->backoff_ms > MBCLIENT_BACKOFF_MAX_MS)
		c->backoff_ms = MBCLIENT_BACKOFF_MAX_MS;
	if (!c->down) {
		c->down = true;
		c->down_since_mono_ms = now_mono_ms;
		say(c, MBCLIENT_LOG_WARNING, "down: %s: %s", what, mbclient_strerror(err));
	}
}

static void link_good(struct mbclient *c, int64_t now_mono_ms)
{
	c->backoff_ms = MBCLIENT_BACKOFF_FIRST_MS;
	if (c->down) {
		double s = (double)(now_mono_ms - c->down_since_mono_ms) / 1000.0;
		say(c, MBCLIENT_LOG_INFO, "recovered after %.1f s", s);
	} else if (!c->ever_up) {
		say(c, MBCLIENT_LOG_INFO, "connected");
	}
	c->down = false;
	c->ever_up = true;
}

static void decode_request(struct mbclient *c, const struct mbclient_request *r, double *values,
			   bool *ok)
{
	for (unsigned k = r->first; k < r->first + r->point_count; k++) {
		unsigned i = c->sorted[k];
		const struct mbclient_point *p = &c->points[i];
		assert(c->offset[i] + regcodec_width(p->type) <= r->count);
		values[i] = regcodec_decode(p->type, p->order, &c->regs[c->offset[i]]);
		ok[i] = true;
	}
}

/* Note a refused request once, and its recovery once. */
static void note_refusal(struct mbclient *c, unsigned req_index, int err)
{
	const struct mbclient_request *r = &c->requests[req_index];
	bool refused = err != 0;

	if (refused == c->request_refused[req_index])
		return;
	c->request_refused[req_index] = refused;
	if (refused)
		say(c, MBCLIENT_LOG_WARNING, "%s %u+%u refused: %s", table_name(r->table),
		      (unsigned)r->address, (unsigned)r->count, mbclient_strerror(err));
	else
		say(c, MBCLIENT_LOG_INFO, "%s %u+%u answered again", table_name(r->table),
		      (unsigned)r->address, (unsigned)r->count);
}

/* Runs the plan. Returns 0, the first exception (link still up), or the
 * first link failure (stops there; *failed_req says which). */
static int run_plan(struct mbclient *c, double *values, bool *ok, unsigned *failed_req)
{
	int first_exception = 0;

	for (unsigned q = 0; q < c->request_count; q++) {
		const struct mbclient_request *r = &c->requests[q];
		int rc = c->be->read_registers(c->link, r->table, r->address, r->count, c->regs);
		if (rc == 0) {
			decode_request(c, r, values, ok);
			note_refusal(c, q, 0);
		} else if (is_exception(rc)) {
			note_refusal(c, q, rc);
			if (first_exception == 0)
				first_exception = rc;
		} else {
			*failed_req = q;
			return rc;
		}
	}
	return first_exception;
}

int mbclient_poll(struct mbclient *c, int64_t now_mono_ms, double *values, bool *ok,
		  unsigned count)
{
	char what[48];
	unsigned failed_req = 0;
	int rc;

	assert(c != NULL);
	assert(c->be != NULL);
	assert(count >= c->point_count);
	assert(values != NULL || count == 0);
	assert(ok != NULL || count == 0);
	for (unsigned i = 0; i < c->point_count; i++) {
		values[i] = NAN;
		ok[i] = false;
	}
	if (!c->connected) {
		if (now_mono_ms < c->next_attempt_mono_ms)
			return -ENOTCONN;
		rc = c->be->connect(c->link);
		if (rc != 0) {
			c->be->close(c->link); /* a failed connect may leave state behind */
			link_failed(c, now_mono_ms, rc, "connect");
			return rc;
		}
		c->connected = true;
	}
	rc = run_plan(c, values, ok, &failed_req);
	if (rc != 0 && !is_exception(rc)) {
		const struct mbclient_request *r = &c->requests[failed_req];
		for (unsigned i = 0; i < c->point_count; i++) {
			values[i] = NAN; /* the whole poll is bad: the link is gone */
			ok[i] = false;
		}
		snprintf(what, sizeof what, "read %s %u+%u", table_name(r->table),
			 (unsigned)r->address, (unsigned)r->count);
		link_failed(c, now_mono_ms, rc, what);
		return rc;
	}
	link_good(c, now_mono_ms);
	c->last_err = rc;
	return rc;
}

const struct mbclient_request *mbclient_plan(const struct mbclient *c, unsigned *request_count)
{
	assert(c != NULL);
	assert(request_count != NULL);
	*request_count = c->request_count;
	return c->requests;
}

bool mbclient_connected(const struct mbclient *c)
{
	assert(c != NULL);
	return c->connected;
}

int64_t mbclient_next_attempt_mono_ms(const struct mbclient *c)
{
	assert(c != NULL);
	return c->next_attempt_mono_ms;
}

int mbclient_last_error(const struct mbclient *c)
{
	assert(c != NULL);
	return c->last_err;
}

/* Own texts rather than strerror()/modbus_strerror(), which are not
 * thread-safe (libmodbus #468). */
const char *mbclient_strerror(int err)
{
	int e = err < 0 ? -err : err;

	switch (e) {
	case 0: return "success";
	case EMBXILFUN: return "Modbus exception 1: illegal function";
	case EMBXILADD: return "Modbus exception 2: illegal data address";
	case EMBXILVAL: return "Modbus exception 3: illegal data value";
	case EMBXSFAIL: return "Modbus exception 4: server device failure";
	case EMBXACK: return "Modbus exception 5: acknowledge";
	case EMBXSBUSY: return "Modbus exception 6: server device busy";
	case EMBXNACK: return "Modbus exception 7: negative acknowledge";
	case EMBXMEMPAR: return "Modbus exception 8: memory parity error";
	case EMBXGPATH: return "Modbus exception 10: gateway path unavailable";
	case EMBXGTAR: return "Modbus exception 11: gateway target device failed to respond";
	case EMBBADCRC: return "invalid CRC in reply";
	case EMBBADDATA: return "invalid or stale reply";
	case EMBBADEXC: return "invalid exception code in reply";
	case EMBUNKEXC: return "unknown exception code in reply";
	case EMBMDATA: return "too many registers requested";
	case EMBBADSLAVE: return "reply from the wrong unit";
	case ETIMEDOUT: return "timed out";
	case ECONNREFUSED: return "connection refused";
	case ECONNRESET: return "connection reset by peer";
	case EPIPE: return "broken pipe (peer closed)";
	case ENOTCONN: return "not connected (waiting to reconnect)";
	case EHOSTUNREACH: return "host unreachable";
	case ENETUNREACH: return "network unreachable";
	case EBADF: return "link not open";
	case ENOENT: return "no such device or host";
	case EACCES: return "permission denied";
	case EIO: return "input/output error";
	case EINVAL: return "invalid argument";
	case ENOMEM: return "out of memory";
	case E2BIG: return "too many points";
	case ERANGE: return "value out of range";
	case EDOM: return "not a number";
	default: return "unknown error";
	}
}

/* ---- libmodbus backend -------------------------------------------------- */

struct lm_link {
	modbus_t *ctx;
	bool rtu;
	uint32_t timeout_s_part;  /* response timeout, whole seconds */
	uint32_t timeout_us_part; /* and microseconds, < 1 000 000 */
};

static int lm_open(void *user, const struct mbclient_source_cfg *cfg, void **link)
{
	struct lm_link *l;
	char port[8];
	int e;

	(void)user;
	assert(cfg != NULL);
	assert(link != NULL);
	l = calloc(1, sizeof *l);
	if (l == NULL)
		return -ENOMEM;
	l->rtu = cfg->protocol == MBCLIENT_PROTOCOL_RTU;
	if (l->rtu) {
		l->ctx = modbus_new_rtu(cfg->device, cfg->baud, cfg->parity, cfg->data_bits,
					cfg->stop_bits);
	} else {
		snprintf(port, sizeof port, "%d", cfg->port);
		l->ctx = modbus_new_tcp_pi(cfg->host, port); /* takes names, not only IPv4 */
	}
	if (l->ctx == NULL) {
		e = errno;
		free(l);
		return e != 0 ? -e : -EINVAL;
	}
	long long us = llround(cfg->timeout_s * 1e6);
	l->timeout_s_part = (uint32_t)(us / 1000000);
	l->timeout_us_part = (uint32_t)(us % 1000000);
	if (modbus_set_slave(l->ctx, cfg->unit_id) != 0 ||
	    modbus_set_error_recovery(l->ctx, MODBUS_ERROR_RECOVERY_NONE) != 0 ||
	    modbus_set_response_timeout(l->ctx, l->timeout_s_part, l->timeout_us_part) != 0) {
		e = errno;
		modbus_free(l->ctx);
		free(l);
		return e != 0 ? -e : -EINVAL;
	}
	*link = l;
	return 0;
}

static int lm_connect(void *link)
{
	struct lm_link *l = link;
	assert(l != NULL);
	if (modbus_connect(l->ctx) != 0) {
		int e = errno;
		/* 3.1.6 leaves EINPROGRESS after a connect timeout (libmodbus #736). */
		return e == EINPROGRESS || e == 0 ? -ETIMEDOUT : -e;
	}
	if (l->rtu)
		modbus_flush(l->ctx); /* drop whatever arrived while the port was closed */
	return 0;
}

/* RTU has no transaction id: a reply that arrives after the timeout would be
 * taken as the answer to the next request of the same size. So after an RTU
 * timeout wait one more response time for it and throw it away. */
static void rtu_drain_late_reply(struct lm_link *l)
{
	struct timespec ts = {.tv_sec = (time_t)l->timeout_s_part,
			      .tv_nsec = (long)l->timeout_us_part * 1000L};
	while (nanosleep(&ts, &ts) != 0 && errno == EINTR)
		;
	modbus_flush(l->ctx);
}

static int lm_read(void *link, enum mbclient_table table, uint16_t address, uint16_t count,
		   uint16_t *dest)
{
	struct lm_link *l = link;
	int rc;

	assert(l != NULL);
	assert(count >= 1);
	assert(count <= FG_MODBUS_READ_MAX);
	if (table == MBCLIENT_TABLE_HOLDING)
		rc = modbus_read_registers(l->ctx, address, count, dest);
	else
		rc = modbus_read_input_registers(l->ctx, address, count, dest);
	if (rc == (int)count)
		return 0;
	if (rc >= 0)
		return -EMBBADDATA;
	int e = errno;
	if (l->rtu && e == ETIMEDOUT)
		rtu_drain_late_reply(l);
	return e != 0 ? -e : -EIO;
}

static void lm_close(void *link)
{
	struct lm_link *l = link;
	assert(l != NULL);
	modbus_close(l->ctx);
}

static void lm_free(void *link)
{
	struct lm_link *l = link;
	if (l == NULL)
		return;
	modbus_free(l->ctx);
	free(l);
}

const struct mbclient_backend mbclient_backend_libmodbus = {
	.open = lm_open,
	.connect = lm_connect,
	.read_registers = lm_read,
	.close = lm_close,
	.free = lm_free,
	.user = NULL,
};
