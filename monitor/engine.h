/*
 * engine.h - the deterministic heart of floodgauge, shared by the daemon
 * and replay.
 *
 *   tag samples -> validate + filter (validate.c) -> section operating point
 *   (point.c) -> models (section_eval) -> soft sensors (softsense.c) ->
 *   flood_index (section_fuse) -> alarms (alarm.c) -> events
 *
 * The caller owns struct engine (it is large: allocate it) and the config,
 * which must outlive it. engine_init does all the set-up; engine_step and the
 * command calls never allocate, never read a clock and never do I/O, so the
 * same samples at the same times give the same results and events, live or
 * replayed.
 */
#ifndef ENGINE_H
#define ENGINE_H

#include <stddef.h>
#include <stdint.h>

#include "alarm.h"
#include "config.h"
#include "softsense.h"
#include "validate.h"

/* One transition per alarm per step, plus commands between steps. */
#define ENGINE_EVENTS_MAX (2 * FG_ALARMS_MAX)

/* The most result fields a section of one type fills (section.c's masks:
 * a tray has 21); engine_init checks every section against it. */
#define ENGINE_PREMODEL_FIELDS 24

struct engine_section {
	struct softsense ss;
	struct section_result r;     /* the latest result */
	struct section_point point;  /* the operating point it was computed from, SI */
	bool in_service;             /* gas load at or above in_service_gas_kgs */
	const char *diag_reason;     /* first bad/frozen input reason, NULL when healthy */
	int diag_tag;                /* the tag behind diag_reason, -1 when none */
	struct solve_warm warm;      /* last answers of the section's solves (warm starts) */
	/* the result fields its type fills, in order (engine_premodel.v) */
	unsigned char field[ENGINE_PREMODEL_FIELDS];
	unsigned field_count;
	/* loop sections without circulation_normal_ms: the learned normal */
	double circ_normal_ms;       /* learned normal circulation velocity, m/s (NAN: none yet) */
	double circ_learned_s;       /* time spent learning it, s */
};

/* Learning the normal circulation of a loop (engine.c): a slow exponential
 * average of circulation_velocity_ms over ENGINE_CIRC_TAU_S in good, in-service
 * operation with the downcomer holding under half the riser's gas, and only
 * while the velocity stays within ENGINE_CIRC_BAND of the normal learned so
 * far (a loop slowing down must not teach itself that slow is normal).
 * circulation_pct is reported once ENGINE_CIRC_WARMUP_S of learning are in.
 * The learned value lives in memory only: a restart learns again. */
#define ENGINE_CIRC_TAU_S 7200.0
#define ENGINE_CIRC_BAND 0.1
#define ENGINE_CIRC_WARMUP_S 900.0
#define ENGINE_CIRC_NORMAL_FLOOD_PCT 50.0

struct engine {
	const struct fg_config *cfg;
	struct tag_state tags[FG_TAGS_MAX];
	struct engine_section sec[FG_SECTIONS_MAX];
	struct alarm alarms[FG_ALARMS_MAX];
	unsigned event_count;
	struct alarm_event events[ENGINE_EVENTS_MAX];
	int64_t t_ms;                /* time of the last step, ALARM_T_NONE before */
	uint64_t step_count;
	/* engine_premodel: the tags its sections read, for the mask they were
	 * worked out for (0 before the first call: no tags) */
	uint64_t premodel_mask;
	bool premodel_tag[FG_TAGS_MAX];
};

/* Sets e up for cfg. Returns 0 (it cannot fail on a config that loaded). */
int engine_init(struct engine *e, const struct fg_config *cfg);

/* One evaluation at t_ms. values[i] is tag i in its own unit, status[i] its
 * read status; fixed tags ('value =') are supplied by the engine itself.
 * Events from the previous step and commands must have been taken (they are
 * cleared here). */
void engine_step(struct engine *e, int64_t t_ms, const double *values,
		 const enum tag_status *status);

/* One section at one row, evaluated ahead (engine_premodel) by another
 * thread on an engine of its own that sees the same rows: what the alarms
 * and the writers read of it afterwards, and no more, since every byte of
 * it crosses from one core to the other (its operating point, soft-sensor
 * state and warm starts stay with the engine that evaluated it). */
struct engine_premodel {
	double v[ENGINE_PREMODEL_FIELDS]; /* section_result.v of the type's fields, in order */
	/* the rest of section_result, from `basis` on, as it is */
	unsigned char rest[sizeof(struct section_result) - offsetof(struct section_result, basis)];
	bool in_service;
	const char *diag_reason;     /* as engine_section's */
	int diag_tag;
};

/* The replay's second core. `ahead` is an engine of its own (engine_init on
 * the same config) given exactly the rows e will be given, in order: for
 * the sections whose bit is set in mask (bit si) it checks their tags as
 * engine_step does and evaluates them whole (models, soft sensors, the
 * loop's learned circulation), out[k] for the k-th set bit.
 * engine_step_ahead then steps e with those sections taken from out (their
 * state stays with `ahead`), the rest and the alarms as engine_step: the
 * same results and events bit for bit, because a section depends only on
 * its own tags and its own state, which sees the same rows in the same
 * order whichever engine holds it. */
void engine_premodel(struct engine *ahead, int64_t t_ms, const double *values,
		     const enum tag_status *status, uint64_t mask, struct engine_premodel *out);
void engine_step_ahead(struct engine *e, int64_t t_ms, const double *values,
		       const enum tag_status *status, uint64_t mask,
		       const struct engine_premodel *pre);

/* The historian's status text for tag ti, kept with its next TAG_STATUS_BAD
 * sample and copied into the events that sample causes (cut to fit). NULL or
 * "" clears it. Call before engine_step. */
void engine_tag_status_text(struct engine *e, unsigned ti, const char *text);

/* Operator commands on alarm index ai at t_ms; see alarm.h for the return
 * values. A carried-out command appends its event. */
int engine_ack(struct engine *e, unsigned ai, int64_t t_ms);
int engine_shelve(struct engine *e, unsigned ai, double duration_s, int64_t t_ms);
int engine_unshelve(struct engine *e, unsigned ai, int64_t t_ms);

/* What alarm ai was (or would be) given at the last engine_step: the value it
 * watches, its reference, the section's quality and service state, the
 * diagnostic reason. `floodgauge tune` stores these once and replays only the
 * alarm's state machine over them, which equals a full replay by construction
 * as long as the engine builds its own inputs here. */
void engine_alarm_input(const struct engine *e, unsigned ai, struct alarm_input *in);

/* Events since the last engine_step or engine_events_clear. */
static inline unsigned engine_event_count(const struct engine *e) { return e->event_count; }
static inline void engine_events_clear(struct engine *e) { e->event_count = 0; }

/* Alarm lifecycle persistence ([monitor] state_file). */
int engine_state_save(const struct engine *e, const char *path, int64_t now_t_ms);
int engine_state_load(struct engine *e, const char *path, char *err, size_t err_size);

#endif
