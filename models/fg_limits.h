/*
 * fg_limits.h - every fixed capacity of floodgauge in one place.
 *
 * Nothing on the per-sample path allocates, so each table is sized here. The
 * config loader refuses a config that needs more than these limits (with the
 * file and line), rather than truncating it. Each limit has a one-line reason.
 */
#ifndef FG_LIMITS_H
#define FG_LIMITS_H

/* Names of tags, sections, sources, alarms, including the NUL. Historian tag
 * names such as "C101_PDT_1234.PV" fit with room to spare. */
#define FG_NAME_MAX 48

/* Paths (state file, devices, CA file) including the NUL. */
#define FG_PATH_MAX 256

/* Host names, URIs, topic prefixes, including the NUL. */
#define FG_TEXT_MAX 256

/* One edge PC watches one unit: a handful of columns of a few sections each. */
#define FG_SECTIONS_MAX 32

/* Each section uses at most ~8 signals; 32 sections x 8 = 256, plus spares. */
#define FG_TAGS_MAX 320

/* Modbus sources: one per PLC or gateway. */
#define FG_SOURCES_MAX 16

/* Alarms: about five per section (high, high-high, low, rate, diagnostic). */
#define FG_ALARMS_MAX 192

/* Points of a property table against temperature (value = T:v, T:v, ...). */
#define FG_PROP_POINTS_MAX 8

/* Longest median filter window, samples (odd). */
#define FG_MEDIAN_MAX 15

/* Samples kept for the DP noise estimate (rolling coefficient of variation). */
#define FG_NOISE_WINDOW_MAX 120

/* Exported fields on the Modbus export server. */
#define FG_EXPORT_FIELDS_MAX 256

/* A historian CSV row: columns and bytes. */
#define FG_CSV_COLUMNS_MAX (FG_TAGS_MAX + 1)
#define FG_CSV_LINE_MAX 65536

/* Modbus: at most 125 holding/input registers per read request (Modbus
 * Application Protocol v1.1b3, section 6.3/6.4). */
#define FG_MODBUS_READ_MAX 125

_Static_assert(FG_MEDIAN_MAX % 2 == 1, "median window must be odd");
_Static_assert(FG_TAGS_MAX >= FG_SECTIONS_MAX, "each section needs at least one tag");
_Static_assert(FG_CSV_COLUMNS_MAX > FG_TAGS_MAX, "a CSV row holds time and every tag");
_Static_assert(FG_NAME_MAX >= 16, "names must fit typical historian tags");

#endif
