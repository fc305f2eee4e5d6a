/*
 * cmd_feed.c - `floodgauge feed`: recorded or simulated data served as
 * Modbus registers exactly as the config's tag map lays them out (inverse
 * scale and offset, the tag's type and word order), paced by the data's own
 * time stamps. A stand-in for the plant, for demos and tests.
 */
#include <errno.h>
#include <getopt.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <time.h>

#include "commands.h"
#include "config.h"
#include "histread.h"
#include "log.h"
#include "mbserver.h"
#include "plant.h"
#include "sig.h"

struct feed {
	const struct fg_config *cfg;
	int source;                    /* served source index */
	unsigned tag_count;
	int tags[FG_TAGS_MAX];         /* tag indices served, CSV bind order */
	struct mbserver srv;
	double speed;
	bool loop;
	const char *data;
	uint64_t rows;
	struct histread_opts hopts;
	unsigned passes;
};

static void feed_usage(FILE *f)
{
	fprintf(f, "usage: floodgauge feed -c FILE DATA.csv [--listen HOST:PORT] [--speed X] "
		   "[--loop] [--source NAME]\n\n"
		   "Serves the rows of DATA.csv as Modbus TCP registers laid out by the config's\n"
		   "tags (the inverse of scale/offset, each tag's type and word order), one row at\n"
		   "a time, paced by the rows' time stamps divided by X (default 1). The listen\n"
		   "address defaults to the source's host:port. With --loop the data repeats.\n"
		   "Prints 'listening on HOST:PORT' once ready. The data is read as replay reads\n"
		   "it (wide or long, [tag.NAME] column =, [replay] keys).\n"
		   HISTREAD_USAGE);
}

static int64_t mono_ms(void)
{
	struct timespec ts;
	clock_gettime(CLOCK_MONOTONIC, &ts);
	return (int64_t)ts.tv_sec * 1000 + ts.tv_nsec / 1000000;
}

static void sleep_until_mono_ms(int64_t t_ms)
{
	struct timespec ts = {.tv_sec = (time_t)(t_ms / 1000), .tv_nsec = (long)(t_ms % 1000) * 1000000L};
	while (!sig_stop && clock_nanosleep(CLOCK_MONOTONIC, TIMER_ABSTIME, &ts, NULL) == EINTR)
		;
}

/* The register map covering every served tag of each table. */
static void map_of(const struct feed *fd, struct mbserver_map_cfg *map)
{
	unsigned lo[2] = {65535, 65535}, hi[2] = {0, 0};
	for (unsigned k = 0; k < fd->tag_count; k++) {
		const struct tag_cfg *t = &fd->cfg->tags[fd->tags[k]];
		unsigned w = regcodec_width((enum regcodec_type)t->type);
		unsigned tb = t->table == TAG_TABLE_INPUT ? 0 : 1;
		if (t->address < lo[tb])
			lo[tb] = t->address;
		if (t->address + w > hi[tb])
			hi[tb] = t->address + w;
	}
	memset(map, 0, sizeof(*map));
	if (hi[0] > 0) {
		map->input_start = (uint16_t)lo[0];
		map->input_count = (uint16_t)(hi[0] - lo[0]);
	}
	if (hi[1] > 0) {
		map->holding_start = (uint16_t)lo[1];
		map->holding_count = (uint16_t)(hi[1] - lo[1]);
	}
}

/* Writes one row (values by tag index) into the map; a missing or bad value
 * keeps the register as it was. */
static void serve_row(struct feed *fd, const double *values)
{
	for (unsigned k = 0; k < fd->tag_count; k++) {
		const struct tag_cfg *t = &fd->cfg->tags[fd->tags[k]];
		double v = values[fd->tags[k]];
		if (isnan(v))
			continue;
		double raw = (v - t->offset) / t->scale;
		uint16_t regs[2];
		if (regcodec_encode((enum regcodec_type)t->type, (enum regcodec_order)t->order, raw,
				    regs) != 0)
			continue; /* out of the type's range: the plant would not send it either */
		unsigned w = regcodec_width((enum regcodec_type)t->type);
		if (t->table == TAG_TABLE_INPUT)
			mbserver_set_input(&fd->srv, (uint16_t)t->address, regs, w);
		else
			mbserver_set_holding(&fd->srv, (uint16_t)t->address, regs, w);
	}
}

static int feed_pass(struct feed *fd, int64_t *start_mono_ms)
{
	static double values[FG_TAGS_MAX];
	static enum tag_status status[FG_TAGS_MAX];
	static struct histread hist;
	char err[512];
	if (histread_init(&hist, fd->cfg, &fd->hopts, err, sizeof(err)) != 0 ||
	    histread_open(&hist, fd->data, fd->passes == 0 ? stderr : NULL, err, sizeof(err)) != 0) {
		fprintf(stderr, "floodgauge feed: %s\n", err);
		histread_fini(&hist);
		return EXIT_USAGE;
	}
	fd->passes++;
	int64_t t0 = 0, t_ms = 0;
	bool first = true;
	int rc;
	while (!sig_stop && (rc = histread_next(&hist, &t_ms, values, status)) == 1) {
		if (first) {
			t0 = t_ms;
			first = false;
		}
		sleep_until_mono_ms(*start_mono_ms + (int64_t)((double)(t_ms - t0) / fd->speed));
		serve_row(fd, values);
		fd->rows++;
	}
	/* The next pass starts one period after this one ended. */
	*start_mono_ms += (int64_t)((double)(t_ms - t0) / fd->speed) +
			  (int64_t)(fd->cfg->monitor.period_s * 1000.0 / fd->speed);
	histread_fini(&hist);
	return 0;
}

static int feed_run(struct feed *fd, const char *listen)
{
	const struct fg_config *cfg = fd->cfg;
	for (unsigned i = 0; i < cfg->tag_count; i++)
		if (cfg->tags[i].source_index == fd->source)
			fd->tags[fd->tag_count++] = (int)i;
	char host[FG_TEXT_MAX];
	int port = cfg->sources[fd->source].port;
	snprintf(host, sizeof(host), "%s", cfg->sources[fd->source].host);
	if (listen != NULL) {
		const char *colon = strrchr(listen, ':');
		if (colon == NULL || colon == listen || (size_t)(colon - listen) >= sizeof(host)) {
			fprintf(stderr, "floodgauge feed: --listen '%s' is not HOST:PORT\n", listen);
			return EXIT_USAGE;
		}
		snprintf(host, sizeof(host), "%.*s", (int)(colon - listen), listen);
		port = atoi(colon + 1);
	}
	struct mbserver_map_cfg map;
	map_of(fd, &map);
	int rc = mbserver_open(&fd->srv, host, port, &map, true);
	if (rc != 0) {
		fprintf(stderr, "floodgauge feed: cannot listen on %s:%d: %s\n", host, port,
			strerror(-rc));
		return EXIT_RUNTIME;
	}
	printf("listening on %s:%d\n", host, mbserver_port(&fd->srv));
	fflush(stdout);
	int64_t start = mono_ms();
	do {
		rc = feed_pass(fd, &start);
	} while (rc == 0 && fd->loop && !sig_stop);
	log_msg(LOG_INFO, "feed: %llu rows served", (unsigned long long)fd->rows);
	mbserver_close(&fd->srv);
	return rc;
}

int cmd_feed(int argc, char **argv)
{
	static const struct option opts[] = {
		{"config", required_argument, NULL, 'c'}, {"listen", required_argument, NULL, 'l'},
		{"speed", required_argument, NULL, 's'},  {"loop", no_argument, NULL, 'L'},
		{"source", required_argument, NULL, 'S'}, {"help", no_argument, NULL, 'h'},
		HISTREAD_LONG_OPTIONS, {0}};
	const char *path = NULL, *listen = NULL, *source = NULL;
	static struct feed fd;
	memset(&fd, 0, sizeof(fd));
	fd.speed = 1.0;
	int ch;
	optind = 1;
	while ((ch = getopt_long(argc, argv, "c:h", opts, NULL)) != -1) {
		switch (ch) {
		case 'c': path = optarg; break;
		case 'l': listen = optarg; break;
		case 's':
			fd.speed = strtod(optarg, NULL);
			if (!(fd.speed > 0.0 && fd.speed <= 1e6)) {
				fprintf(stderr, "floodgauge feed: --speed must be above 0\n");
				return EXIT_USAGE;
			}
			break;
		case 'L': fd.loop = true; break;
		case 'S': source = optarg; break;
		case 'h': feed_usage(stdout); return 0;
		default:
			if (histread_opts_take(&fd.hopts, ch, optarg))
				break;
			feed_usage(stderr);
			return EXIT_USAGE;
		}
	}
	if (path == NULL || optind != argc - 1) {
		feed_usage(stderr);
		return EXIT_USAGE;
	}
	fd.data = argv[optind];
	struct fg_config *cfg = malloc(sizeof(*cfg));
	if (cfg == NULL)
		return EXIT_RUNTIME;
	int rc = EXIT_USAGE;
	if (config_load(cfg, path, stderr) != 0)
		goto out_free;
	fd.cfg = cfg;
	for (unsigned i = 0; i < cfg->source_count; i++)
		if (source == NULL || !strcmp(cfg->sources[i].name, source))
			fd.source = (int)i, source = cfg->sources[i].name;
	if (cfg->source_count == 0 || (source != NULL && fd.source < 0)) {
		fprintf(stderr, "floodgauge feed: no such source in %s\n", path);
		goto out_free;
	}
	sig_install();
	rc = feed_run(&fd, listen);
out_free:
	free(cfg);
	return rc;
}
