/*
 * scenario.c - synthetic plant data with injected upsets (see scenario.h).
 *
 * One row is made in a fixed order, so that the same seed gives the same
 * bytes and so that every scenario draws exactly the same random numbers as
 * `steady`: each section advances one drift per signal, then each polled tag
 * draws one transmitter deviate. The upsets change loads (flood, weep) or
 * overwrite values after the draws (frozen, gap), so a frozen or gap run is
 * the steady run of the same seed with the upset laid over it.
 *
 * The plant DP of a tray or packed section is
 *
 *     dp = k_plant dp_model(point) (1 + K_EXC max(0, f - F_EXC)^2
 *                                   + K_FLOOD max(0, f - 1))
 *
 * with k_plant = 1.1, f = the plant's flood fraction (model flood_pct / 100
 * / capacity), F_EXC = 0.85, K_EXC = 10, K_FLOOD = 10: a gentle rise as the
 * plant approaches its flood point (1.225 at f = 1.0), then a break in the
 * slope once it floods (liquid builds up on the trays or in the bed; 2.6 at
 * f = 1.1). Its transmitter noise has a coefficient of variation 0.015 (1 +
 * 10 max(0, f - F_EXC) + 30 max(0, f - 1)): 2.5 times at the flood point,
 * 5.5 times at f = 1.1, as flooding makes DP erratic. These forms are our own
 * invented demo choices ("common practice" only in that DP is known to rise
 * steeply and get noisy at flood), not a published correlation.
 * When the model gives no DP, the tag's nominal DP scaled with the square of
 * the F-factor stands in (dry and irrigated DP grow roughly with the square
 * of the gas load below loading - common practice).
 *
 * A bubble column's tap DP is the hydrostatic head of the aerated liquid,
 * dp = (1 - eps) rho_l g dz, with eps the model's correlation holdup: the
 * inverse of the holdup-from-DP formula the engine uses. A packed bubble
 * column's is the same with the holdup per free volume, less the head of
 * its wet impulse lines when it has them.
 *
 * A stirred vessel's motor power is the drive loss plus the ungassed power
 * times the model's gassed power ratio (Cui et al.), over the drive
 * efficiency. A loop's DPs come from a small invented plant: the riser
 * holdup by drift flux, eps_r = u_gr / (1.1 (u_gr + U) + 0.25) (Zuber &
 * Findlay's form; C0 1.1 and 0.25 m/s are typical air-water values, from
 * memory), U from Chisti's balance, iterated; the downcomer holds a quarter
 * of the riser's holdup in steady operation, but never less than 0.5 % of
 * fine bubbles the downflow keeps, and follows with a first-order lag of two
 * hours (bubbles held in the downcomer leave slowly). So when the gas is cut,
 * the downcomer keeps its gas while the riser loses it, the driving density
 * difference vanishes and the loop stalls. Demo choices, not a published
 * plant model.
 */
#include "scenario.h"

#include <assert.h>
#include <errno.h>
#include <math.h>
#include <stddef.h>
#include <string.h>

#include "gas.h"
#include "loop.h"
#include "point.h"
#include "stirred.h"
#include "timefmt.h"
#include "units.h"

/* Standard gravity, m/s2 (CGPM 1901, exact). */
#define SCENARIO_G_MS2 9.80665

#define DP_PLANT_FACTOR 1.1
#define DP_EXC_FROM 0.85
#define DP_EXC_K 10.0
#define DP_FLOOD_K 10.0
#define DP_CV 0.015
#define DP_CV_EXC_K 10.0
#define DP_CV_FLOOD_K 30.0

/* Flood scenario with --capacity (the calibration profile): steady at 75 %
 * of the plant's real capacity, then +10 % of it per hour to 110 %. */
#define CAL_BASE_FRAC 0.75
#define CAL_RAMP_FRAC_PER_S (0.10 / 3600.0)
#define CAL_STOP_FRAC 1.10
#define CAL_HOURS 7.0

#define FLOOD_RAMP_START_S (2.0 * 3600.0)
#define FLOOD_RAMP_PER_S (0.25 / 3600.0)   /* +25 % of design load per hour */
#define FLOOD_STOP_PCT 110.0               /* ramp stops past flooding */
#define FLOOD_LOAD_MAX 2.0                 /* and at twice the design load at most */
#define FLOOD_HOLD_S (20.0 * 60.0)
#define FLOOD_BACK_PER_S (0.5 / 3600.0)    /* operators cut back at -50 %/h */

#define WEEP_FALL_FROM_S 3600.0
#define WEEP_FALL_TO_S (3.0 * 3600.0)
#define WEEP_RISE_FROM_S (3.5 * 3600.0)
#define WEEP_RISE_TO_S (5.0 * 3600.0)
#define WEEP_LOAD_MIN 0.35

#define GAP_ALL_AT 0.25                    /* of the span */
#define GAP_ALL_S 600.0
#define GAP_ONE_AT 0.625
#define GAP_ONE_S 120.0

/* Impeller flooding: the gas of every stirred section rises at a fixed speed. */
#define IMP_RAMP_START_S (1.5 * 3600.0)
#define IMP_RAMP_PER_S (1.5 / 3600.0)      /* +150 % of design gas per hour */
#define IMP_LOAD_MAX 5.0
#define IMP_BACK_PER_S (3.0 / 3600.0)

/* Packed bubble columns in the flood scenario: level swell needs more gas. */
#define PBUB_RAMP_PER_S (1.5 / 3600.0)
#define PBUB_LOAD_MAX 4.0
#define PBUB_BACK_PER_S (2.0 / 3600.0)

/* Loop stall: the gas of every loop section is cut. */
#define STALL_CUT_START_S (2.0 * 3600.0)
#define STALL_CUT_PER_S (0.5 / 3600.0)     /* -50 % of design gas per hour */
#define STALL_LOAD_MIN 0.05
#define STALL_RESTORE_PER_S (1.0 / 3600.0)
#define STALL_CIRC_FRAC 0.25               /* stall point: circulation below 1/4 of design */
#define LOOP_CARRY_UNDER 0.25              /* downcomer / riser holdup, steady */
#define LOOP_FINE_HOLDUP 0.005             /* fine bubbles the downcomer keeps */
#define LOOP_LAG_S 7200.0                  /* downcomer holdup lag */
#define LOOP_C0 1.1                        /* drift flux distribution parameter */
#define LOOP_DRIFT_MS 0.25                 /* drift velocity, m/s */

#define ROWS_MAX 100000000ULL              /* a run is bounded: 3 years of 1 s rows */

enum { PHASE_STEADY, PHASE_RAMP, PHASE_HOLD, PHASE_BACK, PHASE_DONE };

/* Process drift (stationary standard deviation, time constant) and
 * transmitter noise per signal: relative, except temperature in K. These are
 * invented but typical magnitudes (common practice: flow transmitters about
 * 0.5 % of reading, DP 1-2 %, temperature a tenth of a kelvin). */
struct signal_noise {
	double drift_sd, drift_tau_s, noise_sd;
	bool absolute;
};

static const struct signal_noise noise_of[SIGNAL_COUNT] = {
	[SIGNAL_GAS_FLOW] = {0.01, 1800.0, 0.005, false},
	[SIGNAL_LIQUID_FLOW] = {0.01, 1800.0, 0.005, false},
	[SIGNAL_LIQUID_OUT_FLOW] = {0.01, 1800.0, 0.005, false},
	[SIGNAL_DP] = {0.0, 1800.0, DP_CV, false},
	[SIGNAL_PRESSURE] = {0.002, 3600.0, 0.001, false},
	[SIGNAL_TEMPERATURE] = {0.3, 3600.0, 0.1, true},
	[SIGNAL_LEVEL] = {0.002, 900.0, 0.002, false},
	[SIGNAL_GAS_DENSITY] = {0.003, 3600.0, 0.003, false},
	[SIGNAL_AGITATOR_SPEED] = {0.001, 1800.0, 0.001, false},
	[SIGNAL_MOTOR_POWER] = {0.0, 1800.0, 0.01, false},
	[SIGNAL_DP_RISER] = {0.0, 1800.0, 0.0005, false},
	[SIGNAL_DP_DOWNCOMER] = {0.0, 1800.0, 0.0005, false},
};

/* Signals of the first four section types: the random draws of their rows
 * stay as they were before the other types came (same seed, same bytes). */
#define SIGNALS_CLASSIC SIGNAL_AGITATOR_SPEED

static int drawn_signals(enum section_type t)
{
	return t == SECTION_STIRRED || t == SECTION_LOOP || t == SECTION_PACKED_BUBBLE
		       ? SIGNAL_COUNT
		       : SIGNALS_CLASSIC;
}

/* --------------------------------------------------------------- random */

/* splitmix64 (Steele, Lea & Flood, "Fast splittable pseudorandom number
 * generators", OOPSLA 2014): small, full period 2^64, good enough for noise. */
static uint64_t rng_next(struct scenario *sc)
{
	uint64_t z = (sc->rng += 0x9E3779B97F4A7C15ULL);
	z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
	z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
	return z ^ (z >> 31);
}

/* Uniform on (0, 1], never 0 so the logarithm below is finite. */
static double rng_uniform(struct scenario *sc)
{
	return (double)((rng_next(sc) >> 11) + 1) * 0x1.0p-53;
}

/* Standard normal deviate by the Box-Muller transform, keeping the spare. */
static double rng_gauss(struct scenario *sc)
{
	if (sc->have_spare) {
		sc->have_spare = false;
		return sc->spare;
	}
	double r = sqrt(-2.0 * log(rng_uniform(sc)));
	double th = 2.0 * 3.14159265358979323846 * rng_uniform(sc);
	sc->spare = r * sin(th);
	sc->have_spare = true;
	return r * cos(th);
}

/* ----------------------------------------------------------------- names */

static const char *const kind_names[SCENARIO_KIND_COUNT] = {
	[SCENARIO_STEADY] = "steady", [SCENARIO_FLOOD] = "flood", [SCENARIO_WEEP] = "weep",
	[SCENARIO_FROZEN] = "frozen", [SCENARIO_GAP] = "gap",
	[SCENARIO_IMPELLER_FLOOD] = "impeller-flood", [SCENARIO_LOOP_STALL] = "loop-stall",
};

static const double kind_hours[SCENARIO_KIND_COUNT] = {
	[SCENARIO_STEADY] = 4.0, [SCENARIO_FLOOD] = 6.0, [SCENARIO_WEEP] = 6.0,
	[SCENARIO_FROZEN] = 4.0, [SCENARIO_GAP] = 4.0,
	[SCENARIO_IMPELLER_FLOOD] = 6.0, [SCENARIO_LOOP_STALL] = 6.0,
};

int scenario_lookup(const char *name)
{
	assert(name != NULL);
	for (int k = 0; k < SCENARIO_KIND_COUNT; k++)
		if (strcmp(name, kind_names[k]) == 0)
			return k;
	return -1;
}

const char *scenario_name(enum scenario_kind k)
{
	assert(k >= 0);
	assert(k < SCENARIO_KIND_COUNT);
	return kind_names[k];
}

double scenario_capacity(const struct scenario_opts *opt)
{
	assert(opt != NULL);
	return isfinite(opt->capacity) && opt->capacity > 0.0 ? opt->capacity : 1.0;
}

static bool capacity_given(const struct scenario_opts *opt)
{
	return isfinite(opt->capacity) && opt->capacity > 0.0;
}

double scenario_default_hours(enum scenario_kind k)
{
	assert(k >= 0);
	assert(k < SCENARIO_KIND_COUNT);
	return kind_hours[k];
}

const char *scenario_help(void)
{
	return
	"scenarios (times from the start of the run):\n"
	"  steady  4 h. Every section at its design point (the tags' nominal values)\n"
	"          with transmitter noise (flows 0.5 %, DP 1.5 % of reading) and slow\n"
	"          process drifts (flows 1 %, 30 min). Nothing should alarm.\n"
	"  flood   6 h. Steady for 2 h; then the gas load of every tray and packed\n"
	"          section rises +25 % of design per hour until the model flood_pct\n"
	"          reaches 110 % (or twice the design load, or the flow tag's range);\n"
	"          held 20 min; cut back at -50 %/h to design; steady to the end.\n"
	"          The DP is the model DP x 1.1 x (1 + 10 max(0, f - 0.85)^2\n"
	"          + 10 max(0, f - 1)), f = flood_pct/100, with noise of CV\n"
	"          1.5 % x (1 + 10 max(0, f - 0.85) + 30 max(0, f - 1)).\n"
	"          The flood point is when the model flood_pct reaches 100 %.\n"
	"          With --capacity K (the plant floods at K x the model's capacity:\n"
	"          fouling, foaming) the profile is in the plant's real capacity: 7 h,\n"
	"          steady 2 h at 75 % of it, then +10 % of it per hour to 110 %, held\n"
	"          20 min, cut back at -50 %/h of design to 75 %; the DP and its noise\n"
	"          follow the plant's flood fraction f = flood_pct / (100 K), so the\n"
	"          plant floods (f = 1) at model flood_pct 100 K, 4.5 h into the run.\n"
	"  weep    6 h. Steady 1 h; the gas load of every tray section falls to 35 %\n"
	"          of design by 3 h, stays until 3.5 h, is back at design by 5 h.\n"
	"          The model weep_pct falls below 100 % on the way down.\n"
	"  frozen  4 h. Steady, but the DP transmitter of the first packed section\n"
	"          (else the first section with a DP) repeats its last value exactly\n"
	"          for 1 h centred on the middle of the run (1:30 to 2:30).\n"
	"  gap     4 h. Steady, with every field empty for 10 min from 25 % of the\n"
	"          span (1:00) and the first section's gas flow empty for 2 min from\n"
	"          62.5 % of the span (2:30).\n"
	"  impeller-flood  6 h. Steady 1.5 h; then the gas of every stirred section\n"
	"          rises +150 % of design per hour at a fixed agitator speed until the\n"
	"          model flood_pct (impeller flooding) reaches 110 % (or 5 x design, or\n"
	"          the flow tag's range); held 20 min; back to design at -300 %/h.\n"
	"          The motor power follows the model's gassed power ratio.\n"
	"  loop-stall  6 h. Steady 2 h; then the gas of every loop section is cut\n"
	"          -50 % of design per hour until the loop stalls (the model\n"
	"          circulation velocity below 25 % of design) or the gas is down to\n"
	"          5 %; held 20 min; restored at +100 %/h. The downcomer keeps its fine\n"
	"          bubbles (lag 2 h, at least 0.5 % holdup), so the driving density\n"
	"          difference vanishes.\n"
	"Packed bubble columns take part in 'flood': gas +150 % of design per hour\n"
	"from 2 h, up to 4 x, held 20 min, back at -200 %/h (level swell is slow to\n"
	"reach the overflow).\n"
	"R404-like bubble columns and spray sections follow their design point with\n"
	"noise in every scenario; a bubble column's tap DP is (1 - eps) rho_l g dz with\n"
	"eps from the model's holdup correlation. Values saturate at each tag's\n"
	"min/max, as a transmitter does at the end of its span.\n";
}

/* ------------------------------------------------------ unit conversions */

static double liquid_density(const struct section_cfg *s, const struct section_point *p)
{
	return prop_table_at(&s->props.liquid_density_kgm3, p->temperature_k, NULL);
}

static double point_gas_density(const struct section_cfg *s, const struct section_point *p)
{
	if (isfinite(p->gas_density_kgm3) && p->gas_density_kgm3 > 0.0)
		return p->gas_density_kgm3;
	return gas_density_kgm3(p->pressure_pa, p->temperature_k, s->props.gas_molar_mass_kgkmol,
				s->props.gas_compressibility, NULL);
}

double scenario_signal_to_tag(const struct fg_config *cfg, const struct section_cfg *s,
			      enum section_signal k, const struct section_point *p, double si)
{
	assert(cfg != NULL);
	assert(s != NULL);
	assert(k >= 0);
	assert(k < SIGNAL_COUNT);
	int ti = s->signal[k];
	assert(ti >= 0);
	const struct unit *u = cfg->tags[ti].unit;
	if (u == NULL || !isfinite(si))
		return si;
	bool gas = k == SIGNAL_GAS_FLOW;
	bool flow = gas || k == SIGNAL_LIQUID_FLOW || k == SIGNAL_LIQUID_OUT_FLOW;
	if (flow && u->kind == UNIT_KIND_VOLUME_FLOW)
		si /= gas ? point_gas_density(s, p) : liquid_density(s, p);
	else if (flow && u->kind == UNIT_KIND_NORMAL_VOLUME_FLOW)
		si = si / s->props.gas_molar_mass_kgkmol * UNITS_NORMAL_MOLAR_VOLUME_M3KMOL;
	return units_from_si(u, si);
}

/* The liquid-out flow as mass flow, kg/s: point_from_si leaves it alone. */
static double liquid_out_kgs(const struct fg_config *cfg, const struct section_cfg *s,
			     double v, const struct section_point *p)
{
	int ti = s->signal[SIGNAL_LIQUID_OUT_FLOW];
	assert(ti >= 0);
	double si = config_tag_to_si(&cfg->tags[ti], v);
	const struct unit *u = cfg->tags[ti].unit;
	if (u != NULL && u->kind == UNIT_KIND_VOLUME_FLOW)
		si *= liquid_density(s, p);
	return si;
}

/* ---------------------------------------------------------- design point */

static double tag_design_value(const struct tag_cfg *t)
{
	return isfinite(t->fixed_value) ? t->fixed_value : t->nominal;
}

/* Is signal k needed to evaluate section s at all? */
static bool signal_needed(const struct section_cfg *s, int k)
{
	bool dens = s->signal[SIGNAL_GAS_DENSITY] >= 0;
	switch (k) {
	case SIGNAL_GAS_FLOW: return true;
	case SIGNAL_LIQUID_FLOW: return !section_liquid_batch(s->geom.type);
	case SIGNAL_AGITATOR_SPEED: return s->geom.type == SECTION_STIRRED;
	case SIGNAL_PRESSURE:
	case SIGNAL_TEMPERATURE: return !dens;
	case SIGNAL_GAS_DENSITY: return dens;
	default: return false;
	}
}

/* Fills sec->nominal_si from the tags' nominal (or fixed) values. Returns
 * the number of problems written to errf. */
static int design_point(struct scenario *sc, unsigned si, FILE *errf)
{
	const struct fg_config *cfg = sc->cfg;
	const struct section_cfg *s = &cfg->sections[si];
	struct scenario_section *sec = &sc->sec[si];
	double vals[FG_TAGS_MAX];
	int problems = 0;
	for (unsigned i = 0; i < cfg->tag_count; i++)
		vals[i] = tag_design_value(&cfg->tags[i]);
	for (int k = 0; k < SIGNAL_COUNT; k++) {
		int ti = s->signal[k];
		if (signal_needed(s, k) && (ti < 0 || !isfinite(vals[ti]))) {
			fprintf(errf, "%s: section %s: signal %s needs a tag with 'nominal =' "
				      "(the design point simulate starts from)\n", cfg->path, s->name,
				config_signal_name((enum section_signal)k));
			problems++;
		}
	}
	if (problems)
		return problems;
	struct section_point p;
	point_from_tags(cfg, si, vals, &p);
	double *n = sec->nominal_si;
	n[SIGNAL_GAS_FLOW] = p.gas_kgs;
	n[SIGNAL_LIQUID_FLOW] = p.liquid_kgs;
	int lo = s->signal[SIGNAL_LIQUID_OUT_FLOW];
	n[SIGNAL_LIQUID_OUT_FLOW] = lo < 0 ? NAN
				  : liquid_out_kgs(cfg, s, isfinite(vals[lo]) ? vals[lo] : NAN, &p);
	if (lo >= 0 && !isfinite(n[SIGNAL_LIQUID_OUT_FLOW]))
		n[SIGNAL_LIQUID_OUT_FLOW] = p.liquid_kgs; /* steady: out = in */
	n[SIGNAL_DP] = p.dp_pa;
	n[SIGNAL_PRESSURE] = p.pressure_pa;
	n[SIGNAL_TEMPERATURE] = p.temperature_k;
	n[SIGNAL_LEVEL] = p.level_m;
	if (!isfinite(p.level_m) &&
	    (s->geom.type == SECTION_BUBBLE || s->geom.type == SECTION_PACKED_BUBBLE))
		n[SIGNAL_LEVEL] = s->geom.bubble.clear_liquid_height_m;
	n[SIGNAL_GAS_DENSITY] = p.gas_density_kgm3;
	n[SIGNAL_AGITATOR_SPEED] = p.agitator_speed_rps;
	n[SIGNAL_MOTOR_POWER] = NAN;  /* the plant's: from the model power ratio */
	n[SIGNAL_DP_RISER] = NAN;     /* the plant's: from the loop's holdups */
	n[SIGNAL_DP_DOWNCOMER] = NAN;
	sec->simulated = true;
	return 0;
}

/* --------------------------------------------------------------- process */

static void true_point(const struct scenario_section *sec, struct section_point *p)
{
	const double *n = sec->nominal_si;
	const double *d = sec->drift;
	p->gas_kgs = n[SIGNAL_GAS_FLOW] * sec->load * (1.0 + d[SIGNAL_GAS_FLOW]);
	p->liquid_kgs = n[SIGNAL_LIQUID_FLOW] * (1.0 + d[SIGNAL_LIQUID_FLOW]);
	p->dp_pa = NAN;
	p->pressure_pa = n[SIGNAL_PRESSURE] * (1.0 + d[SIGNAL_PRESSURE]);
	p->temperature_k = n[SIGNAL_TEMPERATURE] + d[SIGNAL_TEMPERATURE];
	p->level_m = n[SIGNAL_LEVEL] * (1.0 + d[SIGNAL_LEVEL]);
	p->gas_density_kgm3 = n[SIGNAL_GAS_DENSITY] * (1.0 + d[SIGNAL_GAS_DENSITY]);
	p->agitator_speed_rps = n[SIGNAL_AGITATOR_SPEED] * (1.0 + d[SIGNAL_AGITATOR_SPEED]);
	p->motor_power_w = NAN;
	p->dp_riser_pa = sec->dp_riser_true_pa;
	p->dp_downcomer_pa = sec->dp_downcomer_true_pa;
}

/* The plant DP of section si at point p (model already in sec->res), and its
 * transmitter noise in sec->dp_cv. NAN when there is nothing to base it on. */
static double plant_dp(const struct scenario *sc, unsigned si, const struct section_point *p,
		       double *cv)
{
	const struct section_cfg *s = &sc->cfg->sections[si];
	const struct scenario_section *sec = &sc->sec[si];
	const double *v = sec->res.v;
	*cv = DP_CV;
	if (s->geom.type == SECTION_BUBBLE) {
		double eps = v[RF_GAS_HOLDUP_FRAC];
		return (1.0 - eps) * liquid_density(s, p) * SCENARIO_G_MS2 *
		       s->geom.bubble.tap_spacing_m;
	}
	if (s->geom.type == SECTION_PACKED_BUBBLE) {
		double eps = v[RF_GAS_HOLDUP_FRAC]; /* per free volume */
		double dz = s->geom.bubble.tap_spacing_m;
		double dp = (1.0 - eps) * liquid_density(s, p) * SCENARIO_G_MS2 * dz;
		double fill = s->geom.pbub.impulse_density_kgm3;
		return isfinite(fill) ? dp - fill * SCENARIO_G_MS2 * dz : dp;
	}
	double base;
	if (isfinite(v[RF_DP_MODEL_PA]) && s->geom.type != SECTION_SPRAY) {
		base = sec->dp_factor * v[RF_DP_MODEL_PA];
	} else {
		double r = v[RF_F_FACTOR] / sec->f_factor_nominal_pa05;
		base = sec->nominal_si[SIGNAL_DP] * r * r;
	}
	double f = v[RF_FLOOD_PCT] / 100.0 / scenario_capacity(&sc->opt);
	double ex = isfinite(f) && f > DP_EXC_FROM ? f - DP_EXC_FROM : 0.0;
	double fl = isfinite(f) && f > 1.0 ? f - 1.0 : 0.0;
	*cv = DP_CV * (1.0 + DP_CV_EXC_K * ex + DP_CV_FLOOD_K * fl);
	return base * (1.0 + DP_EXC_K * ex * ex + DP_FLOOD_K * fl);
}

static double gas_load_cap(const struct scenario *sc, unsigned si, double load_max)
{
	const struct section_cfg *s = &sc->cfg->sections[si];
	const struct tag_cfg *t = &sc->cfg->tags[s->signal[SIGNAL_GAS_FLOW]];
	double cap = load_max;
	double nom = tag_design_value(t);
	if (isfinite(t->max) && nom > 0.0 && 0.97 * t->max / nom < cap)
		cap = 0.97 * t->max / nom; /* stay inside the flow transmitter's span */
	return cap;
}

static int64_t t_ms_at(const struct scenario *sc, double t_s)
{
	return sc->opt.start_t_ms + (int64_t)llround(t_s * 1000.0);
}

/* A gas ramp: up from start_s at up_per_s (load per second) until the model
 * flood_pct reaches FLOOD_STOP_PCT or the load reaches load_max, held, then
 * back to design at back_per_s. */
struct ramp {
	double start_s, up_per_s, load_max, back_per_s;
};

static const struct ramp flood_ramp = {FLOOD_RAMP_START_S, FLOOD_RAMP_PER_S, FLOOD_LOAD_MAX,
				       FLOOD_BACK_PER_S};
static const struct ramp pbub_ramp = {FLOOD_RAMP_START_S, PBUB_RAMP_PER_S, PBUB_LOAD_MAX,
				      PBUB_BACK_PER_S};
static const struct ramp impeller_ramp = {IMP_RAMP_START_S, IMP_RAMP_PER_S, IMP_LOAD_MAX,
					  IMP_BACK_PER_S};

/* Flood scenarios: the gas-load phase machine of one section. */
static void flood_load(struct scenario *sc, unsigned si, double t_s, double dt_s,
		       const struct ramp *rp)
{
	struct scenario_section *sec = &sc->sec[si];
	double cap = scenario_capacity(&sc->opt);
	double fp = sec->res.v[RF_FLOOD_PCT] / cap;
	/* --capacity: the calibration profile's ramp, in the plant's capacity */
	double up = sec->ramp_per_s > 0.0 ? sec->ramp_per_s : rp->up_per_s;
	switch (sec->phase) {
	case PHASE_STEADY:
		if (t_s >= rp->start_s) {
			sec->phase = PHASE_RAMP;
			sec->load = sec->load_base + up * (t_s - rp->start_s);
		}
		break;
	case PHASE_RAMP:
		if ((isfinite(fp) && fp >= FLOOD_STOP_PCT) ||
		    sec->load >= gas_load_cap(sc, si, rp->load_max)) {
			sec->phase = PHASE_HOLD;
			sec->phase_start_s = t_s;
			sec->peak_t_ms = t_ms_at(sc, t_s);
		} else {
			sec->load += up * dt_s;
		}
		break;
	case PHASE_HOLD:
		if (t_s - sec->phase_start_s >= FLOOD_HOLD_S)
			sec->phase = PHASE_BACK;
		break;
	case PHASE_BACK:
		sec->load -= rp->back_per_s * dt_s;
		if (sec->load <= sec->load_base) {
			sec->load = sec->load_base;
			sec->phase = PHASE_DONE;
			sec->recovered_t_ms = t_ms_at(sc, t_s);
		}
		break;
	default: break;
	}
}

/* Weep scenario: the gas load of a tray section against run time. */
static double weep_load(double t_s)
{
	if (t_s < WEEP_FALL_FROM_S || t_s >= WEEP_RISE_TO_S)
		return 1.0;
	if (t_s < WEEP_FALL_TO_S)
		return 1.0 - (1.0 - WEEP_LOAD_MIN) * (t_s - WEEP_FALL_FROM_S) /
				     (WEEP_FALL_TO_S - WEEP_FALL_FROM_S);
	if (t_s < WEEP_RISE_FROM_S)
		return WEEP_LOAD_MIN;
	return WEEP_LOAD_MIN + (1.0 - WEEP_LOAD_MIN) * (t_s - WEEP_RISE_FROM_S) /
				       (WEEP_RISE_TO_S - WEEP_RISE_FROM_S);
}

/* Loop stall: the gas cut of one loop section, the flood ramp upside down:
 * down until the loop stalls (the model circulation velocity below
 * STALL_CIRC_FRAC of its design value; note_events) or the load reaches
 * STALL_LOAD_MIN, held, then restored. */
static void stall_load(struct scenario *sc, unsigned si, double t_s, double dt_s)
{
	struct scenario_section *sec = &sc->sec[si];
	switch (sec->phase) {
	case PHASE_STEADY:
		if (t_s >= STALL_CUT_START_S)
			sec->phase = PHASE_RAMP;
		break;
	case PHASE_RAMP:
		if (sec->flood_t_ms != SCENARIO_T_NONE || sec->load <= STALL_LOAD_MIN) {
			sec->phase = PHASE_HOLD;
			sec->phase_start_s = t_s;
			sec->peak_t_ms = t_ms_at(sc, t_s);
		} else {
			sec->load = fmax(STALL_LOAD_MIN, sec->load - STALL_CUT_PER_S * dt_s);
		}
		break;
	case PHASE_HOLD:
		if (t_s - sec->phase_start_s >= FLOOD_HOLD_S)
			sec->phase = PHASE_BACK;
		break;
	case PHASE_BACK:
		sec->load += STALL_RESTORE_PER_S * dt_s;
		if (sec->load >= 1.0) {
			sec->load = 1.0;
			sec->phase = PHASE_DONE;
			sec->recovered_t_ms = t_ms_at(sc, t_s);
		}
		break;
	default: break;
	}
}

static void set_load(struct scenario *sc, unsigned si, double t_s, double dt_s)
{
	struct scenario_section *sec = &sc->sec[si];
	enum section_type type = sc->cfg->sections[si].geom.type;
	if (sc->opt.kind == SCENARIO_FLOOD && (type == SECTION_TRAY || type == SECTION_PACKED)) {
		flood_load(sc, si, t_s, dt_s, &flood_ramp);
	} else if (sc->opt.kind == SCENARIO_FLOOD && type == SECTION_PACKED_BUBBLE) {
		flood_load(sc, si, t_s, dt_s, &pbub_ramp);
	} else if (sc->opt.kind == SCENARIO_IMPELLER_FLOOD && type == SECTION_STIRRED) {
		flood_load(sc, si, t_s, dt_s, &impeller_ramp);
	} else if (sc->opt.kind == SCENARIO_LOOP_STALL && type == SECTION_LOOP) {
		stall_load(sc, si, t_s, dt_s);
	} else if (sc->opt.kind == SCENARIO_WEEP && type == SECTION_TRAY) {
		sec->load = weep_load(t_s);
		if (t_s >= WEEP_RISE_TO_S && sec->recovered_t_ms == SCENARIO_T_NONE)
			sec->recovered_t_ms = t_ms_at(sc, t_s);
	}
	if (sec->load > sec->peak_load)
		sec->peak_load = sec->load;
	if (sec->load < sec->load_min)
		sec->load_min = sec->load;
}

static void note_events(struct scenario *sc, unsigned si, double t_s)
{
	struct scenario_section *sec = &sc->sec[si];
	double fp = sec->res.v[RF_FLOOD_PCT];
	double wp = sec->res.v[RF_WEEP_PCT];
	if (sc->cfg->sections[si].geom.type == SECTION_LOOP) {
		/* A loop's event is its stall, not its flood_pct reaching 100. */
		double u = sec->res.v[RF_CIRCULATION_VELOCITY];
		if (!isfinite(sec->circ_design_ms))
			sec->circ_design_ms = u;
		if (isfinite(fp) && fp > sec->peak_flood_pct)
			sec->peak_flood_pct = fp;
		if (isfinite(u) && u < STALL_CIRC_FRAC * sec->circ_design_ms &&
		    sec->flood_t_ms == SCENARIO_T_NONE) {
			sec->flood_t_ms = t_ms_at(sc, t_s);
			sec->flood_basis = sec->res.basis;
		}
		return;
	}
	if (isfinite(fp) && fp > sec->peak_flood_pct)
		sec->peak_flood_pct = fp;
	if (isfinite(fp) && fp >= 100.0 * scenario_capacity(&sc->opt) &&
	    sec->flood_t_ms == SCENARIO_T_NONE) {
		sec->flood_t_ms = t_ms_at(sc, t_s);
		sec->flood_basis = sec->res.basis;
	}
	if (!isfinite(wp))
		return;
	if (wp < sec->min_weep_pct)
		sec->min_weep_pct = wp;
	if (wp < 100.0 && sec->weep_below_t_ms == SCENARIO_T_NONE)
		sec->weep_below_t_ms = t_ms_at(sc, t_s);
	if (wp < 100.0)
		sec->weep_last_below_t_ms = t_ms_at(sc, t_s);
}

/* The motor power of a stirred section at point p with the model's gassed
 * power ratio (1 where the impeller type has no correlation). */
static double stirred_motor_w(const struct section_cfg *s, const struct section_point *p,
			      double ratio)
{
	const struct stirred_geom *st = &s->geom.stirred;
	double po = isfinite(st->power_number) ? st->power_number
					       : stirred_power_number_default(st->impeller);
	double p0 = stirred_ungassed_power_w(po, liquid_density(s, p), p->agitator_speed_rps,
					     st->impeller_diameter_m);
	double eff = st->drive_efficiency > 0.0 ? st->drive_efficiency : 1.0;
	return st->drive_loss_w + p0 * (isfinite(ratio) ? ratio : 1.0) / eff;
}

/* The loop plant of section si this row (see the head of this file): riser
 * and downcomer holdups, circulation, and the DPs they give. */
static void loop_plant(struct scenario *sc, unsigned si, double dt_s)
{
	struct scenario_section *sec = &sc->sec[si];
	const struct section_cfg *s = &sc->cfg->sections[si];
	const struct loop_geom *l = &s->geom.loop;
	struct section_point p;
	sec->dp_riser_true_pa = sec->dp_downcomer_true_pa = NAN;
	true_point(sec, &p);
	double rho_g = point_gas_density(s, &p), rho_l = liquid_density(s, &p);
	if (!(rho_g > 0.0) || !(rho_l > rho_g) || !isfinite(p.gas_kgs))
		return;
	double ugr = p.gas_kgs / rho_g / l->riser_area_m2;
	double ab = loop_bottom_area_m2(l->riser_area_m2, l->bottom_clearance_m);
	double kb = loop_bottom_loss(l->downcomer_area_m2 / ab, NULL);
	double kt = isfinite(l->top_loss) ? l->top_loss : 0.0;
	double u = sec->loop_u_ms, er = 0.0;
	double ed = sec->loop_eps_d;
	/* Damped fixed point: U and eps_r pull against each other. */
	for (int i = 0; i < 20; i++) {
		er = ugr / (LOOP_C0 * (ugr + u) + LOOP_DRIFT_MS);
		double ed_now = isfinite(ed) ? ed : fmax(LOOP_CARRY_UNDER * er, LOOP_FINE_HOLDUP);
		double u_new = loop_circulation_ms(l->height_m, er, ed_now, l->riser_area_m2,
						   l->downcomer_area_m2, kt, kb, NULL);
		if (!isfinite(u_new))
			return;
		u = 0.5 * (u + u_new);
	}
	double target = fmax(LOOP_CARRY_UNDER * er, LOOP_FINE_HOLDUP);
	ed = isfinite(ed) ? ed + (target - ed) * (1.0 - exp(-dt_s / LOOP_LAG_S)) : target;
	sec->loop_eps_d = ed;
	sec->loop_u_ms = u;
	double dz = isfinite(l->tap_spacing_m) ? l->tap_spacing_m : l->height_m;
	double g_dz = SCENARIO_G_MS2 * dz;
	sec->dp_riser_true_pa = (rho_l * (1.0 - er) + rho_g * er) * g_dz;
	sec->dp_downcomer_true_pa = (rho_l * (1.0 - ed) + rho_g * ed) * g_dz;
}

/* Advances section si by one row: load, drifts, model, plant DP. */
static void step_section(struct scenario *sc, unsigned si, double t_s, double dt_s,
			 struct section_point *p)
{
	struct scenario_section *sec = &sc->sec[si];
	const struct section_cfg *s = &sc->cfg->sections[si];
	int drawn = drawn_signals(s->geom.type);
	for (int k = 0; k < drawn; k++) {
		const struct signal_noise *nz = &noise_of[k];
		double a = exp(-dt_s / nz->drift_tau_s);
		double g = rng_gauss(sc);
		sec->drift[k] = a * sec->drift[k] + nz->drift_sd * sqrt(1.0 - a * a) * g;
	}
	if (!sec->simulated)
		return;
	set_load(sc, si, t_s, dt_s);
	if (s->geom.type == SECTION_LOOP)
		loop_plant(sc, si, dt_s);
	true_point(sec, p);
	section_eval(&s->geom, &s->props, p, &sec->res);
	sec->dp_true_pa = plant_dp(sc, si, p, &sec->dp_cv);
	if (s->geom.type == SECTION_STIRRED)
		sec->motor_true_w = stirred_motor_w(s, p, sec->res.v[RF_POWER_RATIO_MODEL]);
	note_events(sc, si, t_s);
}

/* ------------------------------------------------------------------ init */

static void init_section_state(struct scenario_section *sec)
{
	memset(sec, 0, sizeof(*sec));
	for (int k = 0; k < SIGNAL_COUNT; k++)
		sec->nominal_si[k] = NAN;
	sec->load = 1.0;
	sec->phase = PHASE_STEADY;
	sec->dp_factor = DP_PLANT_FACTOR;
	sec->flood_pct_design = NAN;
	sec->load_base = 1.0;
	sec->ramp_per_s = 0.0; /* 0: the scenario's own ramp */
	sec->dp_true_pa = NAN;
	sec->dp_cv = DP_CV;
	sec->motor_true_w = NAN;
	sec->dp_riser_true_pa = sec->dp_downcomer_true_pa = NAN;
	sec->loop_u_ms = 0.3;
	sec->loop_eps_d = NAN;
	sec->circ_design_ms = NAN;
	sec->load_min = 1.0;
	result_clear(&sec->res);
	sec->flood_t_ms = sec->peak_t_ms = sec->recovered_t_ms = SCENARIO_T_NONE;
	sec->weep_below_t_ms = sec->weep_last_below_t_ms = SCENARIO_T_NONE;
	sec->peak_flood_pct = -INFINITY;
	sec->min_weep_pct = INFINITY;
	sec->peak_load = 1.0;
}

/* Evaluates the design point once: the DP reference values. */
static void design_dp(struct scenario *sc, unsigned si)
{
	struct scenario_section *sec = &sc->sec[si];
	const struct section_cfg *s = &sc->cfg->sections[si];
	struct section_point p;
	true_point(sec, &p);
	section_eval(&s->geom, &s->props, &p, &sec->res);
	sec->f_factor_nominal_pa05 = sec->res.v[RF_F_FACTOR];
	sec->flood_pct_design = sec->res.v[RF_FLOOD_PCT];
	enum section_type type = s->geom.type;
	double fd = sec->flood_pct_design / 100.0 / scenario_capacity(&sc->opt);
	if (sc->opt.kind == SCENARIO_FLOOD && capacity_given(&sc->opt) && fd > 0.0 &&
	    (type == SECTION_TRAY || type == SECTION_PACKED)) {
		/* Flood % is close to proportional to the gas load: the load
		 * multiples that give 75 % of the plant's capacity and +10 %/h. */
		sec->load_base = CAL_BASE_FRAC / fd;
		sec->load = sec->load_base;
		sec->ramp_per_s = CAL_RAMP_FRAC_PER_S / fd;
	}
	sec->dp_model_missing = s->geom.type != SECTION_BUBBLE &&
				s->geom.type != SECTION_PACKED_BUBBLE &&
				(s->geom.type == SECTION_SPRAY ||
				 !isfinite(sec->res.v[RF_DP_MODEL_PA]));
	double cv;
	sec->dp_design_pa = plant_dp(sc, si, &p, &cv);
	result_clear(&sec->res);
}

/* Which tag each polled column reads: the first section wiring it. */
static void map_tags(struct scenario *sc)
{
	const struct fg_config *cfg = sc->cfg;
	for (unsigned i = 0; i < cfg->tag_count; i++) {
		struct scenario_tag *t = &sc->tag[i];
		memset(t, 0, sizeof(*t));
		t->polled = cfg->tags[i].source_index >= 0;
		t->section_index = -1;
		t->signal = -1;
		t->last_value = NAN;
		t->first_clip_t_ms = SCENARIO_T_NONE;
	}
	for (unsigned si = cfg->section_count; si-- > 0;)
		for (int k = 0; k < SIGNAL_COUNT; k++) {
			int ti = cfg->sections[si].signal[k];
			if (ti >= 0 && sc->sec[si].simulated) {
				sc->tag[ti].section_index = (int)si;
				sc->tag[ti].signal = k;
			}
		}
}

/* Picks the section and tag the frozen and gap upsets act on. */
static int pick_upset(struct scenario *sc, FILE *errf)
{
	const struct fg_config *cfg = sc->cfg;
	sc->upset_section = sc->upset_tag = -1;
	if (sc->opt.kind == SCENARIO_FROZEN) {
		for (int pass = 0; pass < 2 && sc->upset_tag < 0; pass++)
			for (unsigned si = 0; si < cfg->section_count && sc->upset_tag < 0; si++) {
				const struct section_cfg *s = &cfg->sections[si];
				int ti = s->signal[SIGNAL_DP];
				if (ti >= 0 && sc->tag[ti].polled && sc->sec[si].simulated &&
				    (pass == 1 || s->geom.type == SECTION_PACKED)) {
					sc->upset_section = (int)si;
					sc->upset_tag = ti;
				}
			}
		double mid = sc->span_s / 2.0, half = fmin(1800.0, sc->span_s / 6.0);
		sc->window_from_s = mid - half;
		sc->window_to_s = mid + half;
	} else if (sc->opt.kind == SCENARIO_GAP) {
		for (unsigned si = 0; si < cfg->section_count && sc->upset_tag < 0; si++) {
			int ti = cfg->sections[si].signal[SIGNAL_GAS_FLOW];
			if (ti >= 0 && sc->tag[ti].polled && sc->sec[si].simulated) {
				sc->upset_section = (int)si;
				sc->upset_tag = ti;
			}
		}
		sc->window_from_s = GAP_ALL_AT * sc->span_s;
		sc->window_to_s = sc->window_from_s + GAP_ALL_S;
		sc->window2_from_s = GAP_ONE_AT * sc->span_s;
		sc->window2_to_s = sc->window2_from_s + GAP_ONE_S;
	} else {
		return 0;
	}
	if (sc->upset_tag < 0) {
		fprintf(errf, "%s: scenario %s: no simulated section has a polled %s tag\n",
			cfg->path, scenario_name(sc->opt.kind),
			sc->opt.kind == SCENARIO_FROZEN ? "dp" : "gas_flow");
		return -EINVAL;
	}
	return 0;
}

static int check_span(struct scenario *sc, FILE *errf)
{
	const struct scenario_opts *o = &sc->opt;
	double hours = o->kind == SCENARIO_FLOOD && capacity_given(o) ? CAL_HOURS
								      : scenario_default_hours(o->kind);
	sc->span_s = (isfinite(o->hours) && o->hours > 0.0 ? o->hours : hours) * 3600.0;
	sc->period_s = isfinite(o->period_s) && o->period_s > 0.0 ? o->period_s
								 : sc->cfg->monitor.period_s;
	double period_ms = round(sc->period_s * 1000.0);
	if (!(period_ms >= 1.0)) {
		fprintf(errf, "simulate: period %g s is below 1 ms\n", sc->period_s);
		return -EINVAL;
	}
	sc->period_s = period_ms / 1000.0;
	double rows = round(sc->span_s / sc->period_s);
	if (!(rows >= 1.0) || rows > (double)ROWS_MAX) {
		fprintf(errf, "simulate: %g h at %g s gives %.0f rows (1..%llu allowed)\n",
			sc->span_s / 3600.0, sc->period_s, rows, ROWS_MAX);
		return -EINVAL;
	}
	if ((o->kind == SCENARIO_GAP || o->kind == SCENARIO_FROZEN) && sc->span_s < 3600.0) {
		fprintf(errf, "simulate: scenario %s needs a span of at least 1 h\n",
			scenario_name(o->kind));
		return -EINVAL;
	}
	sc->row_count = (uint64_t)rows;
	return 0;
}

int scenario_init(struct scenario *sc, const struct fg_config *cfg,
		  const struct scenario_opts *opt, FILE *errf)
{
	assert(sc != NULL);
	assert(cfg != NULL);
	assert(opt != NULL);
	assert(errf != NULL);
	assert(opt->kind >= 0);
	assert(opt->kind < SCENARIO_KIND_COUNT);
	memset(sc, 0, offsetof(struct scenario, sec));
	sc->cfg = cfg;
	sc->opt = *opt;
	/* Seed through one splitmix64 step so that seeds 1, 2, 3 start far apart. */
	sc->rng = opt->seed;
	sc->rng = rng_next(sc);
	if (check_span(sc, errf) != 0)
		return -EINVAL;
	int problems = 0;
	for (unsigned si = 0; si < cfg->section_count; si++) {
		init_section_state(&sc->sec[si]);
		problems += design_point(sc, si, errf);
	}
	if (problems)
		return -EINVAL;
	for (unsigned si = 0; si < cfg->section_count; si++)
		design_dp(sc, si);
	map_tags(sc);
	return pick_upset(sc, errf);
}

/* ------------------------------------------------------------------ rows */

/* One transmitter reading of tag ti: SI value with noise, in the tag's unit,
 * saturated at its range. Draws exactly one deviate. */
static double read_tag(struct scenario *sc, unsigned ti, const struct section_point *pts,
		       double t_s)
{
	const struct fg_config *cfg = sc->cfg;
	const struct tag_cfg *tc = &cfg->tags[ti];
	struct scenario_tag *t = &sc->tag[ti];
	double g = rng_gauss(sc);
	double v;
	if (t->section_index >= 0) {
		unsigned si = (unsigned)t->section_index;
		const struct scenario_section *sec = &sc->sec[si];
		const struct section_point *p = &pts[si];
		int k = t->signal;
		double x;
		switch (k) {
		case SIGNAL_GAS_FLOW: x = p->gas_kgs; break;
		case SIGNAL_LIQUID_FLOW: x = p->liquid_kgs; break;
		case SIGNAL_LIQUID_OUT_FLOW:
			x = sec->nominal_si[k] * (1.0 + sec->drift[k]);
			break;
		case SIGNAL_DP: x = sec->dp_true_pa; break;
		case SIGNAL_PRESSURE: x = p->pressure_pa; break;
		case SIGNAL_TEMPERATURE: x = p->temperature_k; break;
		case SIGNAL_LEVEL: x = p->level_m; break;
		case SIGNAL_AGITATOR_SPEED: x = p->agitator_speed_rps; break;
		case SIGNAL_MOTOR_POWER: x = sec->motor_true_w; break;
		case SIGNAL_DP_RISER: x = sec->dp_riser_true_pa; break;
		case SIGNAL_DP_DOWNCOMER: x = sec->dp_downcomer_true_pa; break;
		default: x = point_gas_density(&cfg->sections[si], p); break;
		}
		double sd = k == SIGNAL_DP ? sec->dp_cv : noise_of[k].noise_sd;
		x = noise_of[k].absolute ? x + sd * g : x * (1.0 + sd * g);
		v = scenario_signal_to_tag(cfg, &cfg->sections[si], (enum section_signal)k, p, x);
	} else {
		/* Not read by any section: its own design value, drifting a little. */
		double x = config_tag_to_si(tc, tag_design_value(tc));
		t->drift = 0.999 * t->drift + 0.003 * sqrt(1.0 - 0.999 * 0.999) * g;
		v = tc->unit != NULL ? units_from_si(tc->unit, x * (1.0 + t->drift)) : x;
	}
	if (isfinite(v) && isfinite(tc->min) && v < tc->min)
		v = tc->min;
	else if (isfinite(v) && isfinite(tc->max) && v > tc->max)
		v = tc->max;
	else
		return v;
	if (t->clip_count++ == 0)
		t->first_clip_t_ms = t_ms_at(sc, t_s);
	return v;
}

/* Frozen and gap upsets, laid over the values after all draws. */
static void apply_upsets(struct scenario *sc, double t_s, double *values)
{
	const struct fg_config *cfg = sc->cfg;
	bool in1 = t_s >= sc->window_from_s && t_s < sc->window_to_s;
	bool in2 = t_s >= sc->window2_from_s && t_s < sc->window2_to_s;
	if (sc->opt.kind == SCENARIO_FROZEN && in1) {
		assert(sc->upset_tag >= 0);
		double last = sc->tag[sc->upset_tag].last_value;
		if (isfinite(last))
			values[sc->upset_tag] = last;
	} else if (sc->opt.kind == SCENARIO_GAP && in1) {
		for (unsigned i = 0; i < cfg->tag_count; i++)
			values[i] = NAN;
	} else if (sc->opt.kind == SCENARIO_GAP && in2) {
		assert(sc->upset_tag >= 0);
		values[sc->upset_tag] = NAN;
	}
}

bool scenario_next(struct scenario *sc, int64_t *t_ms, double *values)
{
	assert(sc != NULL);
	assert(t_ms != NULL);
	assert(values != NULL);
	if (sc->row_index >= sc->row_count)
		return false;
	const struct fg_config *cfg = sc->cfg;
	double t_s = (double)sc->row_index * sc->period_s;
	double dt_s = sc->row_index == 0 ? 0.0 : sc->period_s;
	struct section_point pts[FG_SECTIONS_MAX];
	for (unsigned si = 0; si < cfg->section_count; si++)
		step_section(sc, si, t_s, dt_s, &pts[si]);
	for (unsigned i = 0; i < cfg->tag_count; i++)
		values[i] = sc->tag[i].polled ? read_tag(sc, i, pts, t_s) : NAN;
	apply_upsets(sc, t_s, values);
	for (unsigned i = 0; i < cfg->tag_count; i++)
		if (isfinite(values[i]))
			sc->tag[i].last_value = values[i];
	*t_ms = t_ms_at(sc, t_s);
	sc->row_index++;
	return true;
}

/* ---------------------------------------------------------------- output */

int scenario_write_header(const struct scenario *sc, FILE *out)
{
	assert(sc != NULL);
	assert(out != NULL);
	fputs("time", out);
	for (unsigned i = 0; i < sc->cfg->tag_count; i++)
		if (sc->tag[i].polled)
			fprintf(out, ",%s", sc->cfg->tags[i].name);
	fputc('\n', out);
	return ferror(out) ? -EIO : 0;
}

int scenario_write_row(const struct scenario *sc, FILE *out, int64_t t_ms, const double *values)
{
	assert(sc != NULL);
	assert(out != NULL);
	assert(values != NULL);
	char ts[TIMEFMT_BUF_SIZE];
	int n = timefmt_format(t_ms, ts, sizeof(ts));
	if (n < 0)
		return -ERANGE;
	fputs(ts, out);
	for (unsigned i = 0; i < sc->cfg->tag_count; i++) {
		if (!sc->tag[i].polled)
			continue;
		if (isfinite(values[i]))
			fprintf(out, ",%.6g", values[i]);
		else
			fputc(',', out);
	}
	fputc('\n', out);
	return ferror(out) ? -EIO : 0;
}

int scenario_run(struct scenario *sc, FILE *out)
{
	assert(sc != NULL);
	assert(out != NULL);
	double values[FG_TAGS_MAX];
	int64_t t_ms;
	int rc = scenario_write_header(sc, out);
	while (rc == 0 && scenario_next(sc, &t_ms, values))
		rc = scenario_write_row(sc, out, t_ms, values);
	if (rc == 0 && fflush(out) != 0)
		rc = -EIO;
	return rc;
}

/* Formats t_ms, or "never" for SCENARIO_T_NONE. Returns buf. */
static const char *when(int64_t t_ms, char *buf, size_t buf_size)
{
	if (t_ms == SCENARIO_T_NONE || timefmt_format(t_ms, buf, buf_size) < 0)
		snprintf(buf, buf_size, "never");
	return buf;
}

static void summary_flood(const struct scenario *sc, FILE *f)
{
	char a[TIMEFMT_BUF_SIZE], b[TIMEFMT_BUF_SIZE], c[TIMEFMT_BUF_SIZE];
	double cap = scenario_capacity(&sc->opt);
	if (capacity_given(&sc->opt))
		fprintf(f, "; plant capacity %g x model; gas load +10 %% of it per hour from %s",
			cap, when(t_ms_at(sc, FLOOD_RAMP_START_S), a, sizeof(a)));
	else
		fprintf(f, "; gas load +25 %%/h from %s",
			when(t_ms_at(sc, FLOOD_RAMP_START_S), a, sizeof(a)));
	for (unsigned si = 0; si < sc->cfg->section_count; si++) {
		const struct scenario_section *sec = &sc->sec[si];
		enum section_type type = sc->cfg->sections[si].geom.type;
		if (type != SECTION_TRAY && type != SECTION_PACKED && type != SECTION_PACKED_BUBBLE)
			continue;
		const char *basis = flood_basis_name(sec->flood_basis);
		fprintf(f, "; %s flood point (model flood_pct %.4g %%%s%s) at %s, ramp stopped at %s "
			   "(load %.0f %%, flood_pct %.0f %%), back at design at %s",
			sc->cfg->sections[si].name, 100.0 * cap, basis[0] ? ", " : "", basis,
			when(sec->flood_t_ms, a, sizeof(a)),
			when(sec->peak_t_ms, b, sizeof(b)), 100.0 * sec->peak_load,
			sec->peak_flood_pct, when(sec->recovered_t_ms, c, sizeof(c)));
	}
}

static void summary_impeller(const struct scenario *sc, FILE *f)
{
	char a[TIMEFMT_BUF_SIZE], b[TIMEFMT_BUF_SIZE], c[TIMEFMT_BUF_SIZE];
	fprintf(f, "; stirred gas +150 %%/h at fixed speed from %s",
		when(t_ms_at(sc, IMP_RAMP_START_S), a, sizeof(a)));
	for (unsigned si = 0; si < sc->cfg->section_count; si++) {
		const struct scenario_section *sec = &sc->sec[si];
		if (sc->cfg->sections[si].geom.type != SECTION_STIRRED)
			continue;
		fprintf(f, "; %s impeller flood point (model flood_pct 100 %%) at %s, ramp stopped "
			   "at %s (gas %.0f %% of design, flood_pct %.0f %%), back at design at %s",
			sc->cfg->sections[si].name, when(sec->flood_t_ms, a, sizeof(a)),
			when(sec->peak_t_ms, b, sizeof(b)), 100.0 * sec->peak_load,
			sec->peak_flood_pct, when(sec->recovered_t_ms, c, sizeof(c)));
	}
}

static void summary_stall(const struct scenario *sc, FILE *f)
{
	char a[TIMEFMT_BUF_SIZE], b[TIMEFMT_BUF_SIZE], c[TIMEFMT_BUF_SIZE];
	fprintf(f, "; loop gas cut -50 %%/h from %s",
		when(t_ms_at(sc, STALL_CUT_START_S), a, sizeof(a)));
	for (unsigned si = 0; si < sc->cfg->section_count; si++) {
		const struct scenario_section *sec = &sc->sec[si];
		if (sc->cfg->sections[si].geom.type != SECTION_LOOP)
			continue;
		fprintf(f, "; %s stall point (model circulation below 25 %% of design) at %s, cut "
			   "stopped at %s (gas %.0f %% of design, flood_pct %.0f %%), gas back at "
			   "design at %s",
			sc->cfg->sections[si].name, when(sec->flood_t_ms, a, sizeof(a)),
			when(sec->peak_t_ms, b, sizeof(b)), 100.0 * sec->load_min,
			sec->peak_flood_pct, when(sec->recovered_t_ms, c, sizeof(c)));
	}
}

static void summary_weep(const struct scenario *sc, FILE *f)
{
	char a[TIMEFMT_BUF_SIZE], b[TIMEFMT_BUF_SIZE];
	fprintf(f, "; tray gas load falls from %s to 35 %% at %s",
		when(t_ms_at(sc, WEEP_FALL_FROM_S), a, sizeof(a)),
		when(t_ms_at(sc, WEEP_FALL_TO_S), b, sizeof(b)));
	fprintf(f, ", rises from %s to design at %s",
		when(t_ms_at(sc, WEEP_RISE_FROM_S), a, sizeof(a)),
		when(t_ms_at(sc, WEEP_RISE_TO_S), b, sizeof(b)));
	for (unsigned si = 0; si < sc->cfg->section_count; si++) {
		const struct scenario_section *sec = &sc->sec[si];
		if (sc->cfg->sections[si].geom.type != SECTION_TRAY)
			continue;
		fprintf(f, "; %s model weep_pct below 100 %% from %s to %s (lowest %.0f %%)",
			sc->cfg->sections[si].name, when(sec->weep_below_t_ms, a, sizeof(a)),
			when(sec->weep_last_below_t_ms, b, sizeof(b)), sec->min_weep_pct);
	}
}

/* Lines that explain where the data differ from what the config suggests. */
static void scenario_notes(const struct scenario *sc, FILE *f)
{
	const struct fg_config *cfg = sc->cfg;
	char a[TIMEFMT_BUF_SIZE];
	for (unsigned si = 0; si < cfg->section_count; si++) {
		const struct section_cfg *s = &cfg->sections[si];
		const struct scenario_section *sec = &sc->sec[si];
		int ti = s->signal[SIGNAL_DP];
		if (ti < 0 || !sc->tag[ti].polled)
			continue;
		const struct tag_cfg *t = &cfg->tags[ti];
		const char *unit = t->unit != NULL ? t->unit->name : "";
		if (sec->dp_model_missing)
			fprintf(f, "simulate: note: %s: no model DP; %s is its nominal x "
				   "(F-factor / design F-factor)^2\n", s->name, t->name);
		struct section_point p;
		true_point(sec, &p);
		double design = scenario_signal_to_tag(cfg, s, SIGNAL_DP, &p, sec->dp_design_pa);
		if (isfinite(t->nominal) && t->nominal > 0.0 && isfinite(design) &&
		    fabs(design / t->nominal - 1.0) > 0.3)
			fprintf(f, "simulate: note: %s: the design-point DP (model x %.2g) is %.4g %s; "
				   "the tag's nominal says %.4g %s\n", t->name, sec->dp_factor, design,
				unit, t->nominal, unit);
	}
	for (unsigned i = 0; i < cfg->tag_count; i++) {
		const struct scenario_tag *t = &sc->tag[i];
		if (t->clip_count == 0)
			continue;
		fprintf(f, "simulate: note: %s saturated at its range (%g..%g %s) in %lu rows, "
			   "first at %s\n", cfg->tags[i].name, cfg->tags[i].min, cfg->tags[i].max,
			cfg->tags[i].unit != NULL ? cfg->tags[i].unit->name : "", t->clip_count,
			when(t->first_clip_t_ms, a, sizeof(a)));
	}
}

void scenario_summary(const struct scenario *sc, FILE *f)
{
	assert(sc != NULL);
	assert(f != NULL);
	char a[TIMEFMT_BUF_SIZE], b[TIMEFMT_BUF_SIZE];
	fprintf(f, "simulate %s: seed %llu, %llu rows every %g s from %s", scenario_name(sc->opt.kind),
		(unsigned long long)sc->opt.seed, (unsigned long long)sc->row_count, sc->period_s,
		when(sc->opt.start_t_ms, a, sizeof(a)));
	const char *upset_tag = sc->upset_tag >= 0 ? sc->cfg->tags[sc->upset_tag].name : "";
	switch (sc->opt.kind) {
	case SCENARIO_FLOOD: summary_flood(sc, f); break;
	case SCENARIO_WEEP: summary_weep(sc, f); break;
	case SCENARIO_IMPELLER_FLOOD: summary_impeller(sc, f); break;
	case SCENARIO_LOOP_STALL: summary_stall(sc, f); break;
	case SCENARIO_FROZEN:
		fprintf(f, "; %s frozen from %s to %s", upset_tag,
			when(t_ms_at(sc, sc->window_from_s), a, sizeof(a)),
			when(t_ms_at(sc, sc->window_to_s), b, sizeof(b)));
		break;
	case SCENARIO_GAP:
		fprintf(f, "; every tag missing from %s to %s",
			when(t_ms_at(sc, sc->window_from_s), a, sizeof(a)),
			when(t_ms_at(sc, sc->window_to_s), b, sizeof(b)));
		fprintf(f, "; %s missing from %s to %s", upset_tag,
			when(t_ms_at(sc, sc->window2_from_s), a, sizeof(a)),
			when(t_ms_at(sc, sc->window2_to_s), b, sizeof(b)));
		break;
	default: fprintf(f, "; design point with noise, no upset"); break;
	}
	fputc('\n', f);
	scenario_notes(sc, f);
}
