/*
 * scenario.h - synthetic plant data with injected upsets, from floodgauge's
 * own models plus noise (`floodgauge simulate`).
 *
 * How it is built: each row, every section of the config has a "true"
 * process point: its design point (the tags' `nominal =` values, in SI),
 * times a scenario load on the gas flow (tray and packed sections), times
 * slow process drifts (first-order Gauss-Markov, i.e. AR(1), per signal).
 * section_eval() at that true point gives the model's flood %, weep % and
 * DP; the "plant" DP is the model DP times a plant factor plus a flooding
 * excursion (see scenario.c). Each polled tag then reads its signal through
 * a transmitter: white noise, converted back to the tag's own unit
 * (volume and Nm3 flows included), saturated at the tag's min/max like a
 * real transmitter at the end of its span. Frozen and missing values are
 * applied last.
 *
 * Deterministic: one splitmix64 stream seeded from the seed, drawn in a fixed
 * order. No rand(), no clock, no allocation: the caller allocates struct
 * scenario once (about 32 kB) and streams rows with
 * scenario_next().
 *
 * The data are invented demo data for testing the monitor; they are not a
 * plant model to design or operate anything with.
 */
#ifndef SCENARIO_H
#define SCENARIO_H

#include <stdbool.h>
#include <stdint.h>
#include <stdio.h>

#include "config.h"
#include "fg_limits.h"
#include "fg_result.h"

enum scenario_kind {
	SCENARIO_STEADY,
	SCENARIO_FLOOD,
	SCENARIO_WEEP,
	SCENARIO_FROZEN,
	SCENARIO_GAP,
	SCENARIO_IMPELLER_FLOOD,
	SCENARIO_LOOP_STALL,
	SCENARIO_KIND_COUNT
};

/* "No such event" for the event times below. */
#define SCENARIO_T_NONE INT64_MIN

/* Default start of a run: 2026-03-02T06:00:00Z, ms since the Unix epoch. */
#define SCENARIO_START_DEFAULT_MS 1772431200000LL

struct scenario_opts {
	enum scenario_kind kind;
	uint64_t seed;
	double hours;        /* span, h; <= 0 or NAN: the scenario's default */
	double period_s;     /* row period, s; <= 0 or NAN: the config's period_s */
	int64_t start_t_ms;  /* time of the first row, ms since the Unix epoch */
	/* The plant's real gas capacity over the model's (`--capacity`): the
	 * plant floods where the model's flood_pct reaches 100 x capacity, and
	 * its DP behaves accordingly. 0 or NAN: not given (1, and the flood
	 * scenario keeps its design-load profile); given, the flood scenario runs
	 * the calibration profile (scenario_help). */
	double capacity;
};

/* Per-section state and what happened (the event fields are read-only for
 * the caller; times are ms since the Unix epoch or SCENARIO_T_NONE). */
struct scenario_section {
	bool simulated;               /* the section has a design point */
	double nominal_si[SIGNAL_COUNT]; /* design point per signal, SI; flows as kg/s */
	double drift[SIGNAL_COUNT];   /* process drift: relative, temperature in K */
	double load;                  /* scenario gas-load multiplier, - */
	int phase;                    /* scenario phase (scenario.c) */
	double phase_start_s;         /* run time the phase began, s */
	double dp_factor;             /* plant factor on the model DP, - */
	double flood_pct_design;      /* model flood_pct at the design point, % */
	double load_base;             /* flood scenario: the load of the steady phases */
	double ramp_per_s;            /* flood scenario: load ramp, design loads per s */
	bool dp_model_missing;        /* model gave no DP: scaled nominal used */
	double f_factor_nominal_pa05; /* F-factor at the design point (fallback DP) */
	double dp_design_pa;          /* plant DP at the design point, Pa */
	double dp_true_pa;            /* plant DP this row, before transmitter noise */
	double dp_cv;                 /* DP transmitter noise this row, coefficient of variation */
	double motor_true_w;          /* stirred: agitator motor power this row, W */
	double dp_riser_true_pa;      /* loop: riser DP this row, Pa */
	double dp_downcomer_true_pa;  /* loop: downcomer DP this row, Pa */
	double loop_u_ms;             /* loop: circulation velocity of the last row, m/s */
	double loop_eps_d;            /* loop: downcomer holdup (lags the riser), NAN before */
	double circ_design_ms;        /* loop: model circulation at the first row, m/s */
	double load_min;              /* lowest gas load multiplier, - */
	struct section_result res;    /* model at the true point this row */
	/* events */
	int64_t flood_t_ms;           /* the plant flooded: model flood_pct first reached
				       * 100 % x capacity (a loop: its stall) */
	enum flood_basis flood_basis; /* what drove flood_pct then (jet, downcomer ...) */
	int64_t peak_t_ms;            /* flood ramp stopped (flood_pct 110 % or load cap) */
	int64_t recovered_t_ms;       /* load back at nominal after the upset */
	double peak_flood_pct;        /* highest model flood_pct of the run, % */
	double peak_load;             /* highest gas load multiplier, - */
	int64_t weep_below_t_ms;      /* model weep_pct first fell below 100 % */
	int64_t weep_last_below_t_ms; /* and last was below 100 % */
	double min_weep_pct;          /* lowest model weep_pct, % */
};

struct scenario_tag {
	bool polled;                  /* source tag: a CSV column */
	int section_index;            /* section whose signal it reads, -1: none */
	int signal;                   /* enum section_signal, -1: none */
	double drift;                 /* unwired tags: relative drift */
	double last_value;            /* last written value, tag unit (NAN: none) */
	unsigned long clip_count;     /* rows saturated at min or max */
	int64_t first_clip_t_ms;
};

struct scenario {
	const struct fg_config *cfg;
	struct scenario_opts opt;
	double span_s;
	double period_s;
	uint64_t row_count;
	uint64_t row_index;           /* next row */
	uint64_t rng;                 /* splitmix64 state */
	bool have_spare;              /* Box-Muller keeps its second deviate */
	double spare;
	int upset_section;            /* frozen: the section whose DP freezes; gap: whose gas tag */
	int upset_tag;                /* frozen: the DP tag; gap: the one-tag gap */
	double window_from_s, window_to_s;   /* frozen window, or the all-tag gap */
	double window2_from_s, window2_to_s; /* gap: the one-tag gap */
	struct scenario_section sec[FG_SECTIONS_MAX];
	struct scenario_tag tag[FG_TAGS_MAX];
};

/* Scenario by name ("steady", "flood", ...): the kind, or -1. */
int scenario_lookup(const char *name);

/* Static name of a kind. */
const char *scenario_name(enum scenario_kind k);

/* Default span of a scenario, h. */
double scenario_default_hours(enum scenario_kind k);

/* The plant capacity of opt (1 when not given). */
double scenario_capacity(const struct scenario_opts *opt);

/* Static multi-line description of every scenario and its timeline, for --help. */
const char *scenario_help(void);

/*
 * Prepares a run of opt over cfg (which must outlive sc). Each problem
 * (a section signal tag without `nominal =`, no section the scenario can
 * act on, a bad span or period) is written to errf as one line. Returns 0,
 * or -EINVAL with sc unusable.
 */
int scenario_init(struct scenario *sc, const struct fg_config *cfg,
		  const struct scenario_opts *opt, FILE *errf);

/*
 * Makes the next row: *t_ms and values[0..cfg->tag_count) in each tag's own
 * unit (NAN = missing, and for tags that are not polled). Returns false when
 * the run is over (values untouched).
 */
bool scenario_next(struct scenario *sc, int64_t *t_ms, double *values);

/* Writes the header line "time,TAG,..." (polled tags in config order).
 * Returns 0 or -EIO. */
int scenario_write_header(const struct scenario *sc, FILE *out);

/* Writes one row: ISO 8601 UTC time, then %.6g values, empty when NAN.
 * Returns 0, -EIO, or -ERANGE for a time timefmt cannot format. */
int scenario_write_row(const struct scenario *sc, FILE *out, int64_t t_ms,
		       const double *values);

/* Writes the header and every remaining row. Returns 0 or the first error. */
int scenario_run(struct scenario *sc, FILE *out);

/* One line (with newline) on what happened when: flood points, weep times,
 * windows; then one line per saturated tag. Call after the run. */
void scenario_summary(const struct scenario *sc, FILE *f);

/*
 * The inverse of point_from_tags for one signal: an SI value (flows as mass
 * flow, kg/s) to the unit of tag ti of section s, using the gas density of
 * point p (its gas_density_kgm3, else from P, T, M, Z) for actual gas volume
 * flows, the molar volume at 0 degC and 1 atm for Nm3, and the liquid density
 * at p's temperature for liquid volume flows. NAN in, NAN out.
 */
double scenario_signal_to_tag(const struct fg_config *cfg, const struct section_cfg *s,
			      enum section_signal k, const struct section_point *p, double si);

#endif
