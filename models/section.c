/*
 * section.c - the common part of a section evaluation and the dispatch to
 * the type evaluators (tray.c, packed.c, spray.c, bubble.c, packed_bubble.c,
 * stirred.c, loop.c), and the table of which result fields each type has.
 *
 * Common fields use the tower cross-section as the area basis for every type,
 * so the numbers of different sections compare directly; the tray evaluator
 * works on its net and active areas internally.
 */
#include "section.h"

#include <assert.h>
#include <math.h>

#include "gas.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

double prop_table_at(const struct prop_table *t, double t_k, struct fg_extrap *x)
{
	assert(t != NULL);
	assert(t->point_count >= 1);
	assert(t->point_count <= FG_PROP_POINTS_MAX);
	unsigned n = t->point_count;
	if (n == 1 || !isfinite(t_k))
		return t->value[0];
	if (t_k <= t->t_k[0]) {
		if (t_k < t->t_k[0])
			fg_extrap_note(x, "property table: temperature below the first point");
		return t->value[0];
	}
	if (t_k >= t->t_k[n - 1]) {
		if (t_k > t->t_k[n - 1])
			fg_extrap_note(x, "property table: temperature above the last point");
		return t->value[n - 1];
	}
	unsigned i = 1;
	while (i < n - 1 && t_k > t->t_k[i])
		i++;
	double w = (t_k - t->t_k[i - 1]) / (t->t_k[i] - t->t_k[i - 1]);
	return t->value[i - 1] + w * (t->value[i] - t->value[i - 1]);
}

void section_fluids(const struct section_props *props, double t_k, double rho_g_kgm3,
		    struct fluid_state *f, struct fg_extrap *x)
{
	assert(props != NULL);
	assert(f != NULL);
	f->rho_g_kgm3 = rho_g_kgm3;
	f->rho_l_kgm3 = prop_table_at(&props->liquid_density_kgm3, t_k, x);
	f->mu_g_pas = prop_table_at(&props->gas_viscosity_pas, t_k, x);
	f->mu_l_pas = prop_table_at(&props->liquid_viscosity_pas, t_k, x);
	f->sigma_nm = prop_table_at(&props->surface_tension_nm, t_k, x);
}

double section_area_m2(const struct section_geom *g)
{
	assert(g != NULL);
	return M_PI * g->diameter_m * g->diameter_m / 4.0;
}

double section_capacity_factor(const struct section_geom *g)
{
	assert(g != NULL);
	double k = g->capacity_factor;
	return isfinite(k) && k > 0.0 ? k : 1.0;
}

static bool fluids_usable(const struct fluid_state *f)
{
	return isfinite(f->rho_g_kgm3) && f->rho_g_kgm3 > 0.0 && isfinite(f->rho_l_kgm3) &&
	       f->rho_l_kgm3 > f->rho_g_kgm3 && isfinite(f->mu_g_pas) && f->mu_g_pas > 0.0 &&
	       isfinite(f->mu_l_pas) && f->mu_l_pas > 0.0 && isfinite(f->sigma_nm) &&
	       f->sigma_nm > 0.0;
}

/* Fills the fields every section type shares. Returns false when the point
 * cannot be evaluated at all (no gas flow, no usable fluids). */
static bool common_fields(const struct section_geom *g, const struct fluid_state *f,
			  const struct section_point *p, struct section_result *r)
{
	double area_m2 = section_area_m2(g);
	r->v[RF_DP_PA] = p->dp_pa;
	if (!isfinite(f->rho_g_kgm3) || f->rho_g_kgm3 <= 0.0)
		return false;
	r->v[RF_GAS_DENSITY] = f->rho_g_kgm3;
	if (!isfinite(p->gas_kgs) || p->gas_kgs < 0.0 || !(area_m2 > 0.0))
		return false;
	double u_ms = p->gas_kgs / (f->rho_g_kgm3 * area_m2);
	r->v[RF_GAS_VELOCITY] = u_ms;
	r->v[RF_F_FACTOR] = u_ms * sqrt(f->rho_g_kgm3);
	if (!fluids_usable(f))
		return false;
	r->v[RF_CAP_FACTOR] = u_ms * sqrt(f->rho_g_kgm3 / (f->rho_l_kgm3 - f->rho_g_kgm3));
	if (isfinite(p->liquid_kgs) && p->liquid_kgs >= 0.0 && p->gas_kgs > 0.0)
		r->v[RF_FLOW_PARAM] =
			p->liquid_kgs / p->gas_kgs * sqrt(f->rho_g_kgm3 / f->rho_l_kgm3);
	return true;
}

bool section_liquid_batch(enum section_type t)
{
	assert(t < SECTION_TYPE_COUNT);
	return t == SECTION_BUBBLE || t == SECTION_PACKED_BUBBLE || t == SECTION_STIRRED ||
	       t == SECTION_LOOP;
}

void section_point_clear(struct section_point *p)
{
	assert(p != NULL);
	p->gas_kgs = NAN;
	p->liquid_kgs = NAN;
	p->dp_pa = NAN;
	p->pressure_pa = NAN;
	p->temperature_k = NAN;
	p->level_m = NAN;
	p->gas_density_kgm3 = NAN;
	p->agitator_speed_rps = NAN;
	p->motor_power_w = NAN;
	p->dp_riser_pa = NAN;
	p->dp_downcomer_pa = NAN;
}

/* Which result fields each type can fill (the type evaluators, section.c's
 * common fields and the engine's soft sensors). One bit per result field. */
#define B(f) (1ull << (f))
_Static_assert(RF_COUNT <= 64, "the per-type field masks are 64-bit");
static const unsigned long long common_mask =
	B(RF_FLOOD_PCT) | B(RF_FLOOD_INDEX) | B(RF_GAS_DENSITY) | B(RF_GAS_VELOCITY) |
	B(RF_FLOW_PARAM) | B(RF_CAP_FACTOR) | B(RF_F_FACTOR) | B(RF_LIQUID_HOLDUP_FRAC) |
	B(RF_LIQUID_HOLDUP_M3) | B(RF_INVENTORY_M3);
/* Fields that follow the section's own `dp` signal (the soft sensors). */
static const unsigned long long dp_mask = B(RF_DP_PA) | B(RF_DP_SLOPE) | B(RF_DP_NOISE_RATIO);
static const unsigned long long type_mask[SECTION_TYPE_COUNT] = {
	[SECTION_TRAY] = B(RF_DP_FLOOD_PCT) | B(RF_DP_MODEL_PA) | B(RF_DP_CORRECTION) |
			 B(RF_JET_FLOOD_PCT) | B(RF_DC_BACKUP_PCT) | B(RF_WEEP_PCT) |
			 B(RF_CLEAR_LIQUID_M) | B(RF_DP_LOAD_PCT),
	[SECTION_PACKED] = B(RF_DP_FLOOD_PCT) | B(RF_DP_MODEL_PA) | B(RF_DP_CORRECTION) |
			   B(RF_LOADING_PCT) | B(RF_DP_LOAD_PCT),
	[SECTION_SPRAY] = B(RF_CARRYOVER_FRAC),
	[SECTION_BUBBLE] = B(RF_GAS_HOLDUP_FRAC) | B(RF_GAS_HOLDUP_DP_FRAC) |
			   B(RF_EXPANDED_LEVEL_M) | B(RF_CARRYOVER_MARGIN_M),
	[SECTION_PACKED_BUBBLE] = B(RF_GAS_HOLDUP_FRAC) | B(RF_GAS_HOLDUP_DP_FRAC) |
				  B(RF_GAS_HOLDUP_COLUMN_FRAC) | B(RF_EXPANDED_LEVEL_M) |
				  B(RF_CARRYOVER_MARGIN_M),
	[SECTION_STIRRED] = B(RF_FLOW_NUMBER) | B(RF_FROUDE_NUMBER) | B(RF_DISPERSION_PCT) |
			    B(RF_POWER_RATIO_MODEL) | B(RF_POWER_RATIO_MEASURED) |
			    B(RF_GAS_HOLDUP_FRAC),
	[SECTION_LOOP] = B(RF_RISER_HOLDUP_FRAC) | B(RF_DOWNCOMER_HOLDUP_FRAC) |
			 B(RF_CIRCULATION_VELOCITY) | B(RF_CIRCULATION_PCT) |
			 B(RF_CARRY_UNDER_M3S),
};

/* Common fields that do not apply to a type. The flow parameter, capacity
 * factor and F-factor are the vapour-load terms of a countercurrent column
 * (tray and packing capacity charts). A stirred vessel is loaded by its
 * impeller (flow number, Froude number) and a loop by its riser and downcomer
 * holdups; neither has a liquid through-flow, so a flow parameter would be a
 * made-up 0. */
static const unsigned long long type_drop[SECTION_TYPE_COUNT] = {
	[SECTION_STIRRED] = B(RF_FLOW_PARAM) | B(RF_CAP_FACTOR) | B(RF_F_FACTOR),
	[SECTION_LOOP] = B(RF_FLOW_PARAM) | B(RF_CAP_FACTOR) | B(RF_F_FACTOR),
};

bool section_type_has_field(enum section_type t, int field)
{
	assert(t < SECTION_TYPE_COUNT);
	if (field < 0 || field >= RF_COUNT)
		return false;
	/* A loop has no single `dp` signal: its DPs are riser and downcomer. */
	unsigned long long m = common_mask | type_mask[t] | (t == SECTION_LOOP ? 0 : dp_mask);
	return (m & ~type_drop[t] & B(field)) != 0;
}

/* Leaves the common fields that do not apply to the type absent (NAN). */
static void drop_foreign_fields(enum section_type t, struct section_result *r)
{
	if (type_drop[t] == 0)
		return; /* most types: nothing to drop, and this runs every sample */
	for (int i = 0; i < RF_COUNT; i++)
		if (type_drop[t] & B(i))
			r->v[i] = NAN;
}
#undef B

void section_eval(const struct section_geom *g, const struct section_props *props,
		  const struct section_point *p, struct section_result *r)
{
	section_eval_warm(g, props, p, r, NULL);
}

void section_eval_warm(const struct section_geom *g, const struct section_props *props,
		       const struct section_point *p, struct section_result *r,
		       struct solve_warm *w)
{
	assert(g != NULL);
	assert(props != NULL);
	assert(p != NULL);
	assert(r != NULL);
	assert(g->type < SECTION_TYPE_COUNT);
	result_clear(r);

	double rho_g = p->gas_density_kgm3;
	if (!(isfinite(rho_g) && rho_g > 0.0))
		rho_g = gas_density_kgm3(p->pressure_pa, p->temperature_k,
					 props->gas_molar_mass_kgkmol, props->gas_compressibility,
					 &r->extrap);
	struct fluid_state f;
	section_fluids(props, p->temperature_k, rho_g, &f, &r->extrap);

	struct section_point q = *p;
	/* Bubble columns, stirred vessels and loops often have no liquid
	 * through-flow (batch liquid). */
	if (section_liquid_batch(g->type) && !isfinite(q.liquid_kgs))
		q.liquid_kgs = 0.0;
	bool usable = common_fields(g, &f, &q, r);
	drop_foreign_fields(g->type, r);
	if (!usable || !isfinite(q.liquid_kgs) || q.liquid_kgs < 0.0) {
		fg_quality_raise(&r->quality, FG_QUALITY_BAD);
		return;
	}
	switch (g->type) {
	case SECTION_TRAY: tray_eval_warm(g, &f, &q, r, w); break;
	case SECTION_PACKED: packed_eval_warm(g, &f, &q, r, w); break;
	case SECTION_SPRAY: spray_eval_warm(g, &f, &q, r, w); break;
	case SECTION_BUBBLE: bubble_eval_warm(g, &f, &q, r, w); break;
	case SECTION_PACKED_BUBBLE: packed_bubble_eval_warm(g, &f, &q, r, w); break;
	case SECTION_STIRRED: stirred_eval(g, &f, &q, r); break;
	case SECTION_LOOP: loop_eval(g, &f, &q, r); break;
	case SECTION_TYPE_COUNT: assert(0); break;
	}
	r->model_basis = r->basis;
	if (r->extrap.count > 0)
		fg_quality_raise(&r->quality, FG_QUALITY_UNCERTAIN);
	section_fuse(r, NAN);
}

double section_dp_model_pa(const struct section_geom *g, const struct section_props *props,
			   const struct section_point *p, struct solve_warm *w)
{
	assert(g != NULL);
	assert(props != NULL);
	assert(p != NULL);
	if (g->type != SECTION_TRAY && g->type != SECTION_PACKED)
		return NAN;
	struct fg_extrap notes = {0, NULL}; /* section_eval_warm notes the range */
	double rho_g = p->gas_density_kgm3;
	if (!(isfinite(rho_g) && rho_g > 0.0))
		rho_g = gas_density_kgm3(p->pressure_pa, p->temperature_k,
					 props->gas_molar_mass_kgkmol, props->gas_compressibility,
					 &notes);
	struct fluid_state f;
	section_fluids(props, p->temperature_k, rho_g, &f, &notes);
	if (!fluids_usable(&f) || !isfinite(p->gas_kgs) || !(p->gas_kgs > 0.0) ||
	    !isfinite(p->liquid_kgs) || p->liquid_kgs < 0.0 || !(section_area_m2(g) > 0.0))
		return NAN;
	return g->type == SECTION_TRAY ? tray_dp_model_pa(g, &f, p, w)
				       : packed_dp_model_pa(g, &f, p, w);
}

void section_fuse(struct section_result *r, double trend_pct)
{
	assert(r != NULL);
	double best = NAN;
	enum flood_basis basis = FLOOD_BASIS_NONE;
	if (isfinite(r->v[RF_FLOOD_PCT])) {
		best = r->v[RF_FLOOD_PCT];
		basis = r->model_basis;
	}
	/* Both branches are percent of the flood gas load: the DP branch is
	 * the engine's dp_load_pct (dp_flood_pct compares DPs, not loads, and
	 * is reported but not fused). */
	if (isfinite(r->v[RF_DP_LOAD_PCT]) && !(r->v[RF_DP_LOAD_PCT] <= best)) {
		best = r->v[RF_DP_LOAD_PCT];
		basis = FLOOD_BASIS_DP;
	}
	if (isfinite(trend_pct) && !(trend_pct <= best)) {
		best = trend_pct;
		basis = FLOOD_BASIS_DP_TREND;
	}
	r->v[RF_FLOOD_INDEX] = best;
	r->basis = isfinite(best) ? basis : FLOOD_BASIS_NONE;
}

bool section_regime_applies(enum section_type t)
{
	return t == SECTION_BUBBLE || t == SECTION_PACKED_BUBBLE;
}
