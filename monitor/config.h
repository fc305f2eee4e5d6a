/*
 * config.h - the floodgauge configuration: what the INI file says, checked.
 *
 * config_load() reads the INI file (libinih, through a line-counting reader so
 * every error carries FILE:LINE), checks every key, resolves the references
 * between sections (tags named by sections, sections named by alarms) and
 * the geometry, and fills a struct fg_config of fixed size. Nothing in it
 * points into the file; strings are copied into fixed fields and a string
 * that does not fit is refused, not truncated.
 */
#ifndef CONFIG_H
#define CONFIG_H

#include <stdbool.h>
#include <stddef.h>
#include <stdio.h>

#include "alarm.h"
#include "fg_limits.h"
#include "section.h"
#include "units.h"

enum source_protocol { SOURCE_MODBUS_TCP, SOURCE_MODBUS_RTU };

struct source_cfg {
	char name[FG_NAME_MAX];
	enum source_protocol protocol;
	char host[FG_TEXT_MAX];      /* tcp: host name or address */
	int port;                    /* tcp: port (default 502) */
	int unit_id;                 /* unit identifier / slave id (tcp default 255, rtu 1) */
	double timeout_s;            /* response timeout per request */
	char device[FG_PATH_MAX];    /* rtu: serial device */
	int baud;                    /* rtu */
	char parity;                 /* rtu: 'N', 'E' or 'O' */
	int data_bits;               /* rtu: 7 or 8 */
	int stop_bits;               /* rtu: 1 or 2 */
	int line;                    /* line of the [source.NAME] header */
};

enum tag_table { TAG_TABLE_INPUT, TAG_TABLE_HOLDING };
enum tag_type {
	TAG_TYPE_INT16,
	TAG_TYPE_UINT16,
	TAG_TYPE_INT32,
	TAG_TYPE_UINT32,
	TAG_TYPE_FLOAT32
};
enum tag_word_order { TAG_ORDER_ABCD, TAG_ORDER_BADC, TAG_ORDER_CDAB, TAG_ORDER_DCBA };

/* A historian's column name, with the NUL ("\\\\PLANT\\U40\\FI401.PV" and the
 * like are longer than tag names). */
#define TAG_COLUMN_MAX 128

struct tag_cfg {
	char name[FG_NAME_MAX];
	char column[TAG_COLUMN_MAX]; /* data file column (wide header or long tag name);
	                              * "" = the tag's name */
	double hold_s;               /* recorded on change: the last value stays fresh this
	                              * long (0 = by stale_periods only) */
	double span_m, zero_m;       /* a level in % of span: metres at 100 % minus at 0 %
	                              * (NAN: no span known), and metres at 0 % */
	int source_index;            /* -1 for a fixed value */
	double fixed_value;          /* value = N, in the tag's unit (NAN when polled) */
	double nominal;              /* nominal = N: the design value `rate` uses when not set */
	enum tag_table table;
	unsigned address;            /* 0-based register address */
	enum tag_type type;
	enum tag_word_order order;
	double scale;                /* engineering = raw * scale + offset, in the tag's unit */
	double offset;
	const struct unit *unit;     /* static table entry */
	double min, max;             /* valid range in the tag's unit (NAN = open) */
	/* Validation and filtering (engine). 0 switches a check off. */
	double stale_periods;        /* bad when no fresh read for this many periods (default 3) */
	double frozen_s;             /* uncertain when unchanged this long (0 = off; default
	                              * VALIDATE_FROZEN_DEFAULT_S for polled tags) */
	double frozen_tolerance;     /* change below this, in the tag's unit, is "unchanged" */
	double spike_limit;          /* a step larger than this (tag unit) is rejected once */
	double filter_tau_s;         /* first-order lag time constant (0 = none) */
	unsigned median;             /* median window, samples (1 = none, odd, <= FG_MEDIAN_MAX) */
	int line;
};

enum section_signal {
	SIGNAL_GAS_FLOW,
	SIGNAL_LIQUID_FLOW,
	SIGNAL_LIQUID_OUT_FLOW,
	SIGNAL_DP,
	SIGNAL_PRESSURE,
	SIGNAL_TEMPERATURE,
	SIGNAL_LEVEL,
	SIGNAL_GAS_DENSITY,
	SIGNAL_AGITATOR_SPEED,       /* stirred */
	SIGNAL_MOTOR_POWER,          /* stirred, optional */
	SIGNAL_DP_RISER,             /* loop */
	SIGNAL_DP_DOWNCOMER,         /* loop */
	SIGNAL_COUNT
};

struct section_cfg {
	char name[FG_NAME_MAX];
	struct section_geom geom;
	struct section_props props;
	int signal[SIGNAL_COUNT];    /* tag index, -1 when not wired */
	double in_service_gas_kgs;   /* below: out of service, process alarms suppressed */
	double sump_area_m2;         /* liquid inventory: sump cross-section (default tower) */
	/* Tray areas per tray as a datasheet gives them, m2 (NAN unless given);
	 * the loader turns them into geom.tray's fractions. */
	double active_area_m2, downcomer_area_m2, hole_area_m2;
	double dp_factor;            /* measured / model DP, the DP correction's start (default 1) */
	/* The soft sensors' learning gate (softsense.h): */
	double steady_window_s;      /* window over which the gas load must be steady, s */
	double steady_load_band;     /* its allowed relative standard deviation, - */
	double normal_dp_sigmas;     /* DP within this many standard deviations of its relation */
	int line;
};

struct mqtt_cfg {
	bool enabled;
	char uri[FG_TEXT_MAX];
	char client_id[FG_NAME_MAX];
	char topic_prefix[FG_TEXT_MAX];
	int qos;                     /* state messages; alarms always QoS 1 */
	char username[FG_NAME_MAX];
	char password_file[FG_PATH_MAX];
	char ca_file[FG_PATH_MAX];
	double keepalive_s;
	unsigned buffer_messages;    /* offline buffer */
	double state_interval_s;     /* state messages at most this often (0: every period) */
	double cmd_max_age_s;        /* commands with an older "t" are refused, s */
	int line;
};

struct export_field {
	unsigned section_index;
	int field;                   /* enum result_field */
};

struct export_cfg {
	bool enabled;
	char host[FG_TEXT_MAX];
	int port;
	unsigned base_address;
	double idle_timeout_s;       /* a client silent this long is dropped, s */
	double request_timeout_s;    /* a request must be complete this soon after its first byte */
	unsigned clients_per_address;/* connections one client address may hold */
	unsigned field_count;
	struct export_field fields[FG_EXPORT_FIELDS_MAX];
	int line;
};

struct monitor_cfg {
	char name[FG_NAME_MAX];
	double period_s;
	char state_file[FG_PATH_MAX];   /* "" = no persistence */
	char events_file[FG_PATH_MAX];  /* "" = none */
	double events_max_bytes;        /* rotate the events file at this size; 0 = never */
	unsigned events_keep;           /* rotated events files kept (PATH.1 .. PATH.N) */
};

/* Warnings kept for `check`: enough for a whole site's slips, each one line. */
#define CONFIG_WARNINGS_MAX 32
#define CONFIG_WARNING_SIZE 320

/* [replay]: how historian files are read (replay, calibrate, tune, feed). */
struct replay_cfg {
	char time_column[TAG_COLUMN_MAX]; /* "" = time, timestamp or date */
	char tz[64];                 /* IANA zone of offset-less times ("" = UTC) */
	int line;                    /* of the [replay] header */
	int tz_line;                 /* of the tz key */
};

struct fg_config {
	char path[FG_PATH_MAX];
	struct monitor_cfg monitor;
	unsigned source_count;
	struct source_cfg sources[FG_SOURCES_MAX];
	unsigned tag_count;
	struct tag_cfg tags[FG_TAGS_MAX];
	unsigned section_count;
	struct section_cfg sections[FG_SECTIONS_MAX];
	unsigned alarm_count;
	struct alarm_cfg alarms[FG_ALARMS_MAX];
	struct mqtt_cfg mqtt;
	struct export_cfg exp;
	struct replay_cfg replay;
	/* Things that load but probably are not what was meant ("FILE:LINE: what"),
	 * printed by `check`. */
	unsigned warning_count;
	char warnings[CONFIG_WARNINGS_MAX][CONFIG_WARNING_SIZE];
};

/* False when section type `type` never has result field `field` (an alarm
 * on it could never fire); true otherwise. */
bool config_type_has_field(enum section_type type, int field);

/* True when tag t gives a length in metres: a length unit, or % of span with
 * span_m. A level in % without span_m is a fraction, not metres. */
bool config_tag_is_length(const struct tag_cfg *t);

/* The data-file column of tag t: its `column =`, else its name. */
const char *config_tag_column(const struct tag_cfg *t);

/* Tray areas from a datasheet are rounded to the digits it prints: the
 * geometry checks allow this much (a fraction of the tower cross-section)
 * before they call the areas impossible. Each of three areas rounded to 4
 * significant digits is off by up to 0.05 %, and a diameter rounded to 4
 * digits puts up to 0.1 % on the tower area: 0.05 + 2 x 0.05 + 0.1 = 0.25 %
 * in the worst case, so 0.3 %. A sum 1 % over is still refused. */
#define CONFIG_AREA_ROUNDING 0.003

/* Loads and checks path into *cfg (the caller owns cfg; it is large, so
 * allocate it). Every problem found is written to errf as "FILE:LINE: what"
 * (up to a limit). Returns 0, -ENOENT when the file cannot be opened, or
 * -EINVAL when it is not valid; *cfg is then unspecified. */
int config_load(struct fg_config *cfg, const char *path, FILE *errf);

/* " (did you mean 'NAME'?)" for a mistyped name of the given kind, or "",
 * in buf; returns buf. */
enum config_name_kind {
	CONFIG_NAME_TAG,
	CONFIG_NAME_SOURCE,
	CONFIG_NAME_SECTION,
	CONFIG_NAME_ALARM,
	CONFIG_NAME_FIELD,
};
const char *config_suggest(const struct fg_config *cfg, enum config_name_kind kind,
			   const char *word, char *buf, size_t buf_size);

/* Index of a tag, section or alarm by name, or -1. */
int config_tag_index(const struct fg_config *cfg, const char *name);
int config_section_index(const struct fg_config *cfg, const char *name);
int config_alarm_index(const struct fg_config *cfg, const char *name);

/* Config names of enum values, static strings. */
const char *config_signal_name(enum section_signal s);
const char *config_section_type_name(enum section_type t);

/* Converts a tag value from its own unit to SI; flows stay volumetric for
 * volume units (the caller converts with the density it knows). */
double config_tag_to_si(const struct tag_cfg *t, double value);

#endif
