/*
 * fg_result.h - what every section evaluation returns.
 *
 * A result is a fixed array of numeric fields (SI units, NAN meaning "does not
 * apply here", never a made-up number), two small enumerations (the flood basis
 * and the bubble-column regime), an overall quality and a record of whether any
 * correlation was used outside its published range. The field table in
 * fg_result.c gives each field its external name: the JSON key, the CSV column
 * suffix (SECTION.FIELD), the MQTT payload key and the export field name.
 */
#ifndef FG_RESULT_H
#define FG_RESULT_H

#include <stdbool.h>
#include <stddef.h>

enum fg_quality {
	FG_QUALITY_GOOD = 0,
	FG_QUALITY_UNCERTAIN = 1,
	FG_QUALITY_BAD = 2,
};

/* Numeric result fields. Order is the CSV column order. */
enum result_field {
	RF_FLOOD_PCT,          /* model-based % approach to flooding, % */
	RF_FLOOD_INDEX,        /* fused indicator the primary alarm watches, % */
	RF_DP_FLOOD_PCT,       /* measured DP against the flood DP, % */
	RF_GAS_DENSITY,        /* gas density, kg/m3 */
	RF_GAS_VELOCITY,       /* superficial gas velocity on the tower cross-section, m/s */
	RF_FLOW_PARAM,         /* (L/G) sqrt(rho_g/rho_l), - */
	RF_CAP_FACTOR,         /* u sqrt(rho_g/(rho_l-rho_g)), m/s (tower cross-section) */
	RF_F_FACTOR,           /* u sqrt(rho_g), Pa^0.5 */
	RF_DP_PA,              /* measured (filtered) DP over the section, Pa */
	RF_DP_MODEL_PA,        /* predicted DP over the section, Pa (plant-corrected in the engine) */
	RF_DP_SLOPE,           /* d ln DP / d ln gas load, - */
	RF_DP_NOISE_RATIO,     /* DP coefficient of variation over its own baseline, - */
	RF_DP_CORRECTION,      /* online correction factor applied to the model DP, - */
	RF_LIQUID_HOLDUP_FRAC, /* liquid volume / section volume, - */
	RF_LIQUID_HOLDUP_M3,   /* liquid held in the section, m3 */
	RF_INVENTORY_M3,       /* change of liquid held since start, from level and flows, m3 */
	RF_JET_FLOOD_PCT,      /* tray: jet flood, % */
	RF_DC_BACKUP_PCT,      /* tray: downcomer backup as % of its limit, % */
	RF_WEEP_PCT,           /* tray: hole velocity as % of the weep-point velocity, % */
	RF_CLEAR_LIQUID_M,     /* tray: clear liquid height on the tray, m */
	RF_LOADING_PCT,        /* packed: gas velocity as % of the loading-point velocity, % */
	RF_CARRYOVER_FRAC,     /* spray: mass fraction of droplets carried over, - */
	RF_GAS_HOLDUP_FRAC,    /* bubble: gas holdup from the correlation, - */
	RF_GAS_HOLDUP_DP_FRAC, /* bubble: gas holdup from the tap DP, - */
	RF_EXPANDED_LEVEL_M,   /* bubble: expanded (aerated) level, m */
	RF_FLOW_NUMBER,        /* stirred: gas flow number Q_G/(N D^3) at the sparger, - */
	RF_FROUDE_NUMBER,      /* stirred: N^2 D / g, - */
	RF_DISPERSION_PCT,     /* stirred: Fl_G as % of the complete-dispersion flow number, % */
	RF_POWER_RATIO_MODEL,  /* stirred: gassed/ungassed power, correlation, - */
	RF_POWER_RATIO_MEASURED, /* stirred: gassed/ungassed power from the motor power, - */
	RF_RISER_HOLDUP_FRAC,  /* loop: riser gas holdup from its DP, - */
	RF_DOWNCOMER_HOLDUP_FRAC, /* loop: downcomer gas holdup from its DP, - */
	RF_CIRCULATION_VELOCITY, /* loop: superficial riser liquid velocity (Chisti), m/s */
	RF_CIRCULATION_PCT,    /* loop: circulation velocity as % of its normal value, % */
	RF_CARRY_UNDER_M3S,    /* loop: gas volume flow carried down the downcomer, m3/s */
	RF_GAS_HOLDUP_COLUMN_FRAC, /* packed-bubble: gas volume / column (bed) volume, - */
	RF_CARRYOVER_MARGIN_M, /* bubble, packed-bubble: overflow height - expanded level, m */
	RF_DP_LOAD_PCT,        /* engine: gas load implied by the measured DP through its
				* learned relation, % of the flood gas load (flood_index's
				* DP branch), bounded to 150 % */
	RF_COUNT
};

/* What drove flood_index (and, in a model-only evaluation, flood_pct). */
enum flood_basis {
	FLOOD_BASIS_NONE = 0,
	FLOOD_BASIS_JET,         /* tray jet flood */
	FLOOD_BASIS_DOWNCOMER,   /* tray downcomer backup */
	FLOOD_BASIS_GAS_VELOCITY,/* packed: gas velocity against the flooding velocity */
	FLOOD_BASIS_DROPLET,     /* spray: gas velocity against the droplet terminal velocity */
	FLOOD_BASIS_LEVEL_SWELL, /* bubble: expanded level against the overflow height */
	FLOOD_BASIS_DP,          /* the DP branch (dp_load_pct) */
	FLOOD_BASIS_DP_TREND,    /* load-response slope or DP noise */
	FLOOD_BASIS_IMPELLER,    /* stirred: gas flow number against impeller flooding */
	FLOOD_BASIS_DOWNCOMER_GAS, /* loop: downcomer holdup against riser holdup */
	FLOOD_BASIS_COUNT
};

enum bubble_regime {
	BUBBLE_REGIME_NONE = 0,
	BUBBLE_REGIME_HOMOGENEOUS,
	BUBBLE_REGIME_CHURN_TURBULENT,
	BUBBLE_REGIME_COUNT
};

/* Record of correlations used outside their published range. The first reason
 * is kept as a static string (no allocation); count says how many were noted. */
struct fg_extrap {
	unsigned count;
	const char *first;
};

struct section_result {
	double v[RF_COUNT];       /* NAN where a field does not apply */
	enum flood_basis basis;   /* what drove flood_index (evaluators: of flood_pct) */
	enum flood_basis model_basis; /* what drove flood_pct (set by section_eval) */
	/* d ln DP / d ln G of the model DP (dp_model_pa) at this point, at
	 * fixed fluids and liquid rate; NAN where the type has no model DP.
	 * The engine's DP branch of flood_index divides by it. Not a column. */
	double dp_model_exponent;
	enum bubble_regime regime;/* bubble columns only */
	enum fg_quality quality;
	struct fg_extrap extrap;  /* extrapolated = extrap.count > 0 */
	/* Optional constants not given, so a field is absent or another method
	 * stood in (packed beds). Not an extrapolation: it does not touch
	 * quality or `extrapolated`; rate and check print the first reason. */
	struct fg_extrap missing;
};

/* Field descriptor: name is the external key; unit is for display. */
struct result_field_desc {
	const char *name;
	const char *unit;
};

/* The static descriptor table, RF_COUNT entries. */
extern const struct result_field_desc result_fields[RF_COUNT];

/* Fills every field with NAN, basis and regime NONE, quality GOOD, no extrapolation. */
void result_clear(struct section_result *r);

/* Notes that a correlation was used outside its range. x may be NULL (ignored).
 * why must be a string literal or other static string. */
void fg_extrap_note(struct fg_extrap *x, const char *why);

/* Raises q to at least level (bad beats uncertain beats good). */
void fg_quality_raise(enum fg_quality *q, enum fg_quality level);

/* Lookups. *_name returns a static string; *_lookup returns the index or -1. */
int result_field_lookup(const char *name);
const char *flood_basis_name(enum flood_basis b);
const char *bubble_regime_name(enum bubble_regime r);
const char *fg_quality_name(enum fg_quality q);

#endif
