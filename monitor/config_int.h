/*
 * config_int.h - state shared by the three files of the config loader:
 * config.c reads the INI text, config_keys.c takes each section's keys, and
 * config_resolve.c resolves references and checks the whole. Not for use
 * outside them.
 */
#ifndef CONFIG_INT_H
#define CONFIG_INT_H

#include <stdint.h>

#include "config.h"

#define CONFIG_ERRORS_MAX 25 /* report this many problems, then only count */
/* Every object has one header, plus [monitor], [mqtt], [export.modbus]. */
#define CONFIG_HEADERS_MAX (FG_SOURCES_MAX + FG_TAGS_MAX + FG_SECTIONS_MAX + FG_ALARMS_MAX + 3)

/* Entries of the [section.NAME] key table (config_keys.c), with room to grow. */
#define CONFIG_SECTION_KEYS_MAX 96

struct pending_name {
	char name[FG_TEXT_MAX];
	int line;                   /* 0 = not given */
};

struct section_pending {
	struct pending_name signal[SIGNAL_COUNT];
	struct pending_name flood_method;
	struct pending_name tray_kind;
	struct pending_name holdup_method;
	struct pending_name packing;
	struct pending_name impeller_type;
	bool type_given;
	int key_line[CONFIG_SECTION_KEYS_MAX]; /* line of section key i, 0 = not given */
};

struct alarm_pending {
	struct pending_name section;
	struct pending_name signal;
	struct pending_name reference;
	struct pending_name kind;
	struct pending_name priority;
	uint32_t keys_set;
};

struct config_ctx {
	struct fg_config *cfg;
	const char *path;
	FILE *errf;
	FILE *in;
	int line;                   /* line the reader last returned */
	int error_count;
	bool line_too_long;
	/* the section being filled */
	char cur_section[FG_TEXT_MAX];
	int cur_kind;
	int cur_index;
	/* header lines, for "missing key" errors and duplicate headers */
	struct section_pending sec[FG_SECTIONS_MAX];
	struct alarm_pending alm[FG_ALARMS_MAX];
	struct pending_name tag_source[FG_TAGS_MAX];
	uint32_t tag_keys_set[FG_TAGS_MAX];
	uint32_t source_keys_set[FG_SOURCES_MAX];
	char export_fields[4096];
	int export_fields_line;
	uint32_t monitor_keys_set, mqtt_keys_set, export_keys_set, replay_keys_set;
	bool lone_cr_said;          /* the lone-CR line ends were reported */
	unsigned seen_count;
	struct pending_name seen[CONFIG_HEADERS_MAX]; /* headers seen, for duplicates */
};

void config_error(struct config_ctx *c, int line, const char *fmt, ...)
	__attribute__((format(printf, 3, 4)));
int config_resolve(struct config_ctx *c);
/* Warnings (config_warn.c): kept in cfg->warnings for `check`. */
void config_warn(struct config_ctx *c, int line, const char *fmt, ...)
	__attribute__((format(printf, 3, 4)));
void config_collect_warnings(struct config_ctx *c);
/* The line of the [alarm.NAME] header, 0 when unknown. */
int config_alarm_header_line(struct config_ctx *c, const char *name);

/* Largest config file read, bytes (the demo is about 12 KiB). */
#define CONFIG_FILE_MAX (1024 * 1024)
/* Defaults of the daemon's robustness keys (events rotation, command age,
 * export timeouts), set before the file is read. */
void config_runtime_defaults(struct fg_config *cfg);

/* Value parsers: 0 on success, -EINVAL with an error already reported. */
int config_parse_double(struct config_ctx *c, const char *key, const char *v, double lo,
			double hi, double *out);
int config_parse_prop(struct config_ctx *c, const char *key, const char *v,
		      struct prop_table *out);
int config_parse_uint(struct config_ctx *c, const char *key, const char *v, unsigned lo,
		      unsigned hi, unsigned *out);
int config_parse_bool(struct config_ctx *c, const char *key, const char *v, bool *out);
/* Copies v into dst of cap bytes; a value that does not fit is refused, not cut. */
int config_copy_text(struct config_ctx *c, const char *key, const char *v, char *dst,
		     size_t cap);
/* Looks v up in a NULL-terminated list of names; *out is its index. */
int config_parse_choice(struct config_ctx *c, const char *key, const char *v,
			const char *const *names, int *out);

/*
 * Key handlers, one per section kind (config_keys.c). Each takes one
 * "key = v" line of the current section (object index ti/si/ai where there
 * are many), at line c->line. 0 on success, -EINVAL with an error reported.
 */
int config_monitor_key(struct config_ctx *c, const char *key, const char *v);
int config_source_key(struct config_ctx *c, unsigned si, const char *key, const char *v);
int config_tag_key(struct config_ctx *c, unsigned ti, const char *key, const char *v);
int config_section_key(struct config_ctx *c, struct section_cfg *s, struct section_pending *sp,
		       const char *key, const char *v);
int config_alarm_key(struct config_ctx *c, unsigned ai, const char *key, const char *v);
int config_mqtt_key(struct config_ctx *c, const char *key, const char *v);
int config_export_key(struct config_ctx *c, const char *key, const char *v);
int config_replay_key(struct config_ctx *c, const char *key, const char *v);
/* The line of section key `key` in sp, 0 when it was not given. */
int config_section_key_line(const struct section_pending *sp, const char *key);
/* Applicability and required keys of section si, once its type is known. */
int config_section_keys_check(struct config_ctx *c, unsigned si);

#endif
