/*
 * section.h - a column section: its geometry, its fluids and one evaluation.
 *
 * section_eval() is the single entry point the engine and `floodgauge rate`
 * use. It resolves properties at the current temperature, computes the
 * fields common to every type (gas density, superficial velocity, flow
 * parameter, capacity factor, F-factor), then hands over to the evaluator of
 * the section's type (tray_eval, packed_eval, spray_eval, bubble_eval,
 * packed_bubble_eval, stirred_eval, loop_eval), each
 * in its own file. Everything is SI. No I/O, no allocation, no clock.
 *
 * A NAN in struct section_point means "no such signal". Type evaluators must
 * tolerate NAN for optional signals (dp, level) and leave the fields that
 * depend on them at NAN.
 */
#ifndef SECTION_H
#define SECTION_H

#include <stdbool.h>

#include "fg_limits.h"
#include "fg_result.h"
#include "solve.h"

enum section_type {
	SECTION_TRAY,
	SECTION_PACKED,
	SECTION_SPRAY,
	SECTION_BUBBLE,
	SECTION_PACKED_BUBBLE,
	SECTION_STIRRED,
	SECTION_LOOP,
	SECTION_TYPE_COUNT
};

enum tray_kind { TRAY_SIEVE, TRAY_VALVE, TRAY_BUBBLE_CAP };
enum tray_flood_method { TRAY_FLOOD_FAIR, TRAY_FLOOD_KISTER_HAAS };
enum packed_flood_method { PACKED_FLOOD_STICHLMAIR, PACKED_FLOOD_BILLET_SCHULTES };
enum bubble_holdup_method { BUBBLE_HOLDUP_AKITA_YOSHIDA, BUBBLE_HOLDUP_HUGHMARK };
enum impeller_type { IMPELLER_DISC_TURBINE, IMPELLER_HOLLOW_BLADE, IMPELLER_TYPE_COUNT };

/* A property constant, or a short table against temperature (linear
 * interpolation; outside the table the end value is held and flagged). */
struct prop_table {
	unsigned point_count;              /* 1 = constant */
	double t_k[FG_PROP_POINTS_MAX];    /* temperatures, K, strictly rising */
	double value[FG_PROP_POINTS_MAX];  /* property in SI */
};

struct section_props {
	double gas_molar_mass_kgkmol;      /* kg/kmol */
	double gas_compressibility;        /* Z, - (default 1) */
	struct prop_table gas_viscosity_pas;
	struct prop_table liquid_density_kgm3;
	struct prop_table liquid_viscosity_pas;
	struct prop_table surface_tension_nm;
};

/* Fluid properties at the current conditions, SI. */
struct fluid_state {
	double rho_g_kgm3;   /* gas density */
	double rho_l_kgm3;   /* liquid density */
	double mu_g_pas;     /* gas viscosity */
	double mu_l_pas;     /* liquid viscosity */
	double sigma_nm;     /* surface tension, N/m */
};

struct tray_geom {
	unsigned trays;                 /* number of trays in the section */
	enum tray_kind kind;
	double spacing_m;               /* tray spacing */
	double weir_height_m;           /* outlet weir height */
	double weir_length_m;           /* outlet weir length */
	double active_area_frac;        /* active (bubbling) area / tower cross-section */
	double downcomer_area_frac;     /* one downcomer's top area / tower cross-section */
	double hole_area_frac;          /* hole (or valve/slot) area / active area */
	double hole_diameter_m;
	double deck_thickness_m;
	double downcomer_clearance_m;   /* gap under the downcomer apron */
	enum tray_flood_method flood_method;
};

/* Packing constants. NAN means "not known" (taken from the built-in table
 * when a generic packing name is given; an evaluation that needs a missing
 * constant leaves its field NAN and says so in the extrapolation note). */
struct packing_constants {
	double area_m2m3;           /* specific surface a, m2/m3 */
	double void_frac;           /* void fraction epsilon, - */
	double packing_factor_1pm;  /* wet packing factor Fp, 1/m (Kister-Gill) */
	double dry_factor_1pm;      /* dry packing factor Fpd, 1/m (Robbins) */
	double stichlmair_c1, stichlmair_c2, stichlmair_c3;
	double billet_ch;           /* Billet-Schultes holdup constant */
	double billet_cp;           /* Billet-Schultes pressure-drop constant */
	double billet_cs;           /* Billet-Schultes loading constant */
	double billet_cfl;          /* Billet-Schultes flooding constant */
};

struct packed_geom {
	double height_m;            /* packed height of the section */
	char packing[FG_NAME_MAX];  /* generic table name, or "" when constants given */
	bool structured;            /* structured packing (affects Kister-Gill exponent) */
	struct packing_constants c;
	enum packed_flood_method flood_method;
};

struct spray_geom {
	double height_m;            /* spray (contact) height */
	double design_droplet_m;    /* design droplet diameter (Rosin-Rammler size parameter) */
	double droplet_spread;      /* Rosin-Rammler exponent n */
};

struct bubble_geom {
	double tap_spacing_m;       /* vertical distance between the two submerged DP taps */
	double clear_liquid_height_m; /* ungassed liquid height when no level signal */
	double overflow_height_m;   /* overflow / disengagement height above the sparger */
	bool electrolyte;           /* Akita-Yoshida electrolyte coefficient */
	enum bubble_holdup_method holdup_method;
};

/* Packed bubble column: the bubble_geom keys (taps, clear height, overflow,
 * holdup method) plus the bed. */
struct packed_bubble_geom {
	double void_frac;           /* packing voidage phi, free volume / bed volume, - */
	double bed_height_m;        /* packed bed height above the sparger (NAN: whole column) */
	double impulse_density_kgm3;/* density of the fill of wet impulse lines, or NAN when
				       the dp signal is already tap-to-tap (dry or compensated) */
};

/* Gassed stirred vessel. The vessel diameter T is section_geom.diameter_m. */
struct stirred_geom {
	double impeller_diameter_m; /* D */
	enum impeller_type impeller;
	double power_number;        /* ungassed turbulent power number Po (NAN: type default) */
	double impeller_clearance_m;/* impeller above the vessel bottom (sparger just below) */
	double drive_loss_w;        /* motor power not reaching the liquid: fixed losses, W */
	double drive_efficiency;    /* further proportional losses (gearbox, motor), 0..1 */
	double clear_liquid_height_m; /* ungassed liquid height when no level signal */
};

/* Natural-circulation loop (airlift or deep shaft): a gassed riser and a less
 * gassed downcomer joined at the top and the bottom. */
struct loop_geom {
	double riser_area_m2;
	double downcomer_area_m2;
	double height_m;            /* dispersion height of riser and downcomer */
	double bottom_clearance_m;  /* gap under the riser (draft tube) at the bottom */
	double tap_spacing_m;       /* vertical span of each DP cell (NAN: height_m) */
	double top_loss;            /* K_T, top (gas separator) loss coefficient, - */
	double circulation_normal_ms; /* normal circulation velocity (NAN: learned) */
};

struct section_geom {
	enum section_type type;
	double diameter_m;          /* tower inside diameter */
	/* The plant's real gas capacity over the model's (`capacity_factor`,
	 * fitted by `floodgauge calibrate`): multiplies the gas-capacity limits
	 * only (tray jet-flood capacity, packed flood and loading velocity, spray
	 * terminal velocity), never downcomer backup, weeping or level swell.
	 * 0 or NAN means 1 (a zeroed struct is uncalibrated). */
	double capacity_factor;
	struct tray_geom tray;
	struct packed_geom packed;
	struct spray_geom spray;
	struct bubble_geom bubble;
	struct packed_bubble_geom pbub;
	struct stirred_geom stirred;
	struct loop_geom loop;
};

/* One operating point, SI. NAN = signal not available. */
struct section_point {
	double gas_kgs;             /* gas mass flow */
	double liquid_kgs;          /* liquid mass flow */
	double dp_pa;               /* measured DP over the section (bubble: between the taps) */
	double pressure_pa;         /* absolute pressure */
	double temperature_k;
	double level_m;             /* bubble: clear liquid height; others: sump level (engine) */
	double gas_density_kgm3;    /* measured density; overrides P,T when finite */
	double agitator_speed_rps;  /* stirred: impeller speed, rev/s */
	double motor_power_w;       /* stirred: agitator motor power, W */
	double dp_riser_pa;         /* loop: DP over the riser taps (lower - upper) */
	double dp_downcomer_pa;     /* loop: DP over the downcomer taps (lower - upper) */
};

/* Types whose liquid may be batch (no liquid flow signal means zero). */
bool section_liquid_batch(enum section_type t);

/* A section_point with every signal NAN. */
void section_point_clear(struct section_point *p);

/* Does result field f ever apply to a section of type t? (The per-type field
 * list: `check`, results.csv and the report use it.) */
bool section_type_has_field(enum section_type t, int field);

/* Evaluates one operating point. Always fills r (result_clear first); never
 * fails: missing or impossible inputs come back as quality BAD with the
 * affected fields NAN. */
void section_eval(const struct section_geom *g, const struct section_props *props,
		  const struct section_point *p, struct section_result *r);

/* The same, with the iterative solves warm-started from w and w updated
 * (solve.h): what the engine calls once per sample. w NULL is
 * section_eval. Agrees with section_eval to 1e-9 relative. */
void section_eval_warm(const struct section_geom *g, const struct section_props *props,
		       const struct section_point *p, struct section_result *r,
		       struct solve_warm *w);

/* The model pressure drop alone, Pa: the dp_model_pa that section_eval_warm
 * gives at p (before the engine's learned correction), without the flood,
 * weep or holdup solves, for the engine's local d ln DP / d ln G. NAN for a
 * type without a DP model or a point that cannot be evaluated. w as for
 * section_eval_warm (its DP solve starts from it and updates it). */
double section_dp_model_pa(const struct section_geom *g, const struct section_props *props,
			   const struct section_point *p, struct solve_warm *w);

/* Resolves the property tables at temperature t_k (NAN: first point used).
 * Notes a table extrapolation in x. */
void section_fluids(const struct section_props *props, double t_k, double rho_g_kgm3,
		    struct fluid_state *f, struct fg_extrap *x);

/* Linear interpolation of a property table; holds the end values outside the
 * table and notes that in x. A NAN t_k returns the first value. */
double prop_table_at(const struct prop_table *t, double t_k, struct fg_extrap *x);

/* Sets RF_FLOOD_INDEX to the largest of flood_pct, dp_load_pct (the
 * engine's DP branch, NAN in a model-only evaluation) and
 * trend_pct (the engine's DP-trend indicator, NAN when none) and r->basis to
 * what drove it. The type evaluators set r->basis for flood_pct; this keeps
 * that basis when flood_pct is the largest. */
void section_fuse(struct section_result *r, double trend_pct);

/* Does the bubble-column regime apply to type t? */
bool section_regime_applies(enum section_type t);

/* Tower cross-section, m2. */
double section_area_m2(const struct section_geom *g);

/* g->capacity_factor, or 1 when it is not a positive finite number. */
double section_capacity_factor(const struct section_geom *g);

/* Type evaluators, called by section_eval with the common fields of r already
 * filled (RF_GAS_DENSITY, RF_GAS_VELOCITY, RF_FLOW_PARAM, RF_CAP_FACTOR,
 * RF_F_FACTOR, RF_DP_PA) and r->quality set from the inputs. Each fills its
 * own fields, RF_FLOOD_PCT with r->basis, RF_DP_MODEL_PA, RF_DP_FLOOD_PCT
 * where it has a flood DP, the holdups, and notes extrapolation. */
void tray_eval(const struct section_geom *g, const struct fluid_state *f,
	       const struct section_point *p, struct section_result *r);
void packed_eval(const struct section_geom *g, const struct fluid_state *f,
		 const struct section_point *p, struct section_result *r);
void spray_eval(const struct section_geom *g, const struct fluid_state *f,
		const struct section_point *p, struct section_result *r);
void bubble_eval(const struct section_geom *g, const struct fluid_state *f,
		 const struct section_point *p, struct section_result *r);
void packed_bubble_eval(const struct section_geom *g, const struct fluid_state *f,
			const struct section_point *p, struct section_result *r);
void stirred_eval(const struct section_geom *g, const struct fluid_state *f,
		  const struct section_point *p, struct section_result *r);
void loop_eval(const struct section_geom *g, const struct fluid_state *f,
	       const struct section_point *p, struct section_result *r);

/* The same with the section's warm-start memory w (solve.h; NULL: cold). */
void tray_eval_warm(const struct section_geom *g, const struct fluid_state *f,
		    const struct section_point *p, struct section_result *r,
		    struct solve_warm *w);
void packed_eval_warm(const struct section_geom *g, const struct fluid_state *f,
		      const struct section_point *p, struct section_result *r,
		      struct solve_warm *w);
void spray_eval_warm(const struct section_geom *g, const struct fluid_state *f,
		     const struct section_point *p, struct section_result *r,
		     struct solve_warm *w);
void bubble_eval_warm(const struct section_geom *g, const struct fluid_state *f,
		      const struct section_point *p, struct section_result *r,
		      struct solve_warm *w);
void packed_bubble_eval_warm(const struct section_geom *g, const struct fluid_state *f,
			     const struct section_point *p, struct section_result *r,
			     struct solve_warm *w);

/* The model DP alone of a tray or a packed section (section_dp_model_pa). */
double tray_dp_model_pa(const struct section_geom *g, const struct fluid_state *f,
			const struct section_point *p, struct solve_warm *w);
double packed_dp_model_pa(const struct section_geom *g, const struct fluid_state *f,
			  const struct section_point *p, struct solve_warm *w);

#endif
