/*
 * fg_result.c - the result field table and small helpers shared by all models.
 */
#include "fg_result.h"

#include <assert.h>
#include <math.h>
#include <string.h>

const struct result_field_desc result_fields[RF_COUNT] = {
	[RF_FLOOD_PCT] = {"flood_pct", "%"},
	[RF_FLOOD_INDEX] = {"flood_index", "%"},
	[RF_DP_FLOOD_PCT] = {"dp_flood_pct", "%"},
	[RF_GAS_DENSITY] = {"gas_density_kgm3", "kg/m3"},
	[RF_GAS_VELOCITY] = {"gas_velocity_ms", "m/s"},
	[RF_FLOW_PARAM] = {"flow_param", "-"},
	[RF_CAP_FACTOR] = {"cap_factor_ms", "m/s"},
	[RF_F_FACTOR] = {"f_factor_pa05", "Pa^0.5"},
	[RF_DP_PA] = {"dp_pa", "Pa"},
	[RF_DP_MODEL_PA] = {"dp_model_pa", "Pa"},
	[RF_DP_SLOPE] = {"dp_slope", "-"},
	[RF_DP_NOISE_RATIO] = {"dp_noise_ratio", "-"},
	[RF_DP_CORRECTION] = {"dp_correction", "-"},
	[RF_LIQUID_HOLDUP_FRAC] = {"liquid_holdup_frac", "-"},
	[RF_LIQUID_HOLDUP_M3] = {"liquid_holdup_m3", "m3"},
	[RF_INVENTORY_M3] = {"inventory_change_m3", "m3"},
	[RF_JET_FLOOD_PCT] = {"jet_flood_pct", "%"},
	[RF_DC_BACKUP_PCT] = {"dc_backup_pct", "%"},
	[RF_WEEP_PCT] = {"weep_pct", "%"},
	[RF_CLEAR_LIQUID_M] = {"clear_liquid_m", "m"},
	[RF_LOADING_PCT] = {"loading_pct", "%"},
	[RF_CARRYOVER_FRAC] = {"carryover_frac", "-"},
	[RF_GAS_HOLDUP_FRAC] = {"gas_holdup_frac", "-"},
	[RF_GAS_HOLDUP_DP_FRAC] = {"gas_holdup_dp_frac", "-"},
	[RF_EXPANDED_LEVEL_M] = {"expanded_level_m", "m"},
	[RF_FLOW_NUMBER] = {"flow_number", "-"},
	[RF_FROUDE_NUMBER] = {"froude_number", "-"},
	[RF_DISPERSION_PCT] = {"dispersion_pct", "%"},
	[RF_POWER_RATIO_MODEL] = {"power_ratio_model", "-"},
	[RF_POWER_RATIO_MEASURED] = {"power_ratio_measured", "-"},
	[RF_RISER_HOLDUP_FRAC] = {"riser_holdup_frac", "-"},
	[RF_DOWNCOMER_HOLDUP_FRAC] = {"downcomer_holdup_frac", "-"},
	[RF_CIRCULATION_VELOCITY] = {"circulation_velocity_ms", "m/s"},
	[RF_CIRCULATION_PCT] = {"circulation_pct", "%"},
	[RF_CARRY_UNDER_M3S] = {"carry_under_m3s", "m3/s"},
	[RF_GAS_HOLDUP_COLUMN_FRAC] = {"gas_holdup_column_frac", "-"},
	[RF_CARRYOVER_MARGIN_M] = {"carryover_margin_m", "m"},
	[RF_DP_LOAD_PCT] = {"dp_load_pct", "%"},
};

static const char *const basis_names[FLOOD_BASIS_COUNT] = {
	[FLOOD_BASIS_NONE] = "",
	[FLOOD_BASIS_JET] = "jet",
	[FLOOD_BASIS_DOWNCOMER] = "downcomer",
	[FLOOD_BASIS_GAS_VELOCITY] = "gas_velocity",
	[FLOOD_BASIS_DROPLET] = "droplet",
	[FLOOD_BASIS_LEVEL_SWELL] = "level_swell",
	[FLOOD_BASIS_DP] = "dp",
	[FLOOD_BASIS_DP_TREND] = "dp_trend",
	[FLOOD_BASIS_IMPELLER] = "impeller",
	[FLOOD_BASIS_DOWNCOMER_GAS] = "downcomer_gas",
};

static const char *const regime_names[BUBBLE_REGIME_COUNT] = {
	[BUBBLE_REGIME_NONE] = "",
	[BUBBLE_REGIME_HOMOGENEOUS] = "homogeneous",
	[BUBBLE_REGIME_CHURN_TURBULENT] = "churn_turbulent",
};

void result_clear(struct section_result *r)
{
	assert(r != NULL);
	for (size_t i = 0; i < RF_COUNT; i++)
		r->v[i] = NAN;
	r->basis = FLOOD_BASIS_NONE;
	r->model_basis = FLOOD_BASIS_NONE;
	r->dp_model_exponent = NAN;
	r->regime = BUBBLE_REGIME_NONE;
	r->quality = FG_QUALITY_GOOD;
	r->extrap.count = 0;
	r->extrap.first = NULL;
	r->missing.count = 0;
	r->missing.first = NULL;
}

void fg_extrap_note(struct fg_extrap *x, const char *why)
{
	assert(why != NULL);
	if (x == NULL)
		return;
	if (x->count == 0)
		x->first = why;
	x->count++;
}

void fg_quality_raise(enum fg_quality *q, enum fg_quality level)
{
	assert(q != NULL);
	if (level > *q)
		*q = level;
}

int result_field_lookup(const char *name)
{
	assert(name != NULL);
	for (int i = 0; i < RF_COUNT; i++)
		if (strcmp(result_fields[i].name, name) == 0)
			return i;
	return -1;
}

const char *flood_basis_name(enum flood_basis b)
{
	assert(b >= 0 && b < FLOOD_BASIS_COUNT);
	return basis_names[b];
}

const char *bubble_regime_name(enum bubble_regime r)
{
	assert(r >= 0 && r < BUBBLE_REGIME_COUNT);
	return regime_names[r];
}

const char *fg_quality_name(enum fg_quality q)
{
	switch (q) {
	case FG_QUALITY_GOOD: return "good";
	case FG_QUALITY_UNCERTAIN: return "uncertain";
	case FG_QUALITY_BAD: return "bad";
	}
	return "bad";
}
