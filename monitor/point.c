/*
 * point.c - see point.h.
 */
#include "point.h"

#include <assert.h>
#include <math.h>

#include "gas.h"

bool point_signal_required(const struct section_cfg *s, enum section_signal k,
			   bool have_density)
{
	assert(s != NULL);
	switch (k) {
	case SIGNAL_GAS_FLOW: return true;
	case SIGNAL_LIQUID_FLOW: return !section_liquid_batch(s->geom.type);
	case SIGNAL_AGITATOR_SPEED: return s->geom.type == SECTION_STIRRED;
	case SIGNAL_DP_RISER:
	case SIGNAL_DP_DOWNCOMER: return s->geom.type == SECTION_LOOP;
	case SIGNAL_PRESSURE:
	case SIGNAL_TEMPERATURE: return !have_density;
	default: return false;
	}
}

double point_mass_flow_kgs(const struct tag_cfg *t, double si, double rho_actual_kgm3,
			   double molar_mass_kgkmol)
{
	const struct unit *u = t != NULL ? t->unit : NULL;
	if (u == NULL || !isfinite(si))
		return si;
	switch (u->kind) {
	case UNIT_KIND_VOLUME_FLOW: return si * rho_actual_kgm3;
	case UNIT_KIND_NORMAL_VOLUME_FLOW:
		return si / UNITS_NORMAL_MOLAR_VOLUME_M3KMOL * molar_mass_kgkmol;
	default: return si;
	}
}

void point_from_si(const struct section_cfg *s, const struct fg_config *cfg,
		   const double *signal_si, struct section_point *p)
{
	assert(s != NULL);
	assert(signal_si != NULL);
	assert(p != NULL);
	p->dp_pa = signal_si[SIGNAL_DP];
	p->pressure_pa = signal_si[SIGNAL_PRESSURE];
	p->temperature_k = signal_si[SIGNAL_TEMPERATURE];
	p->level_m = signal_si[SIGNAL_LEVEL];
	int tv = s->signal[SIGNAL_LEVEL];
	if (tv >= 0 && !config_tag_is_length(&cfg->tags[tv]))
		p->level_m = NAN; /* % of span without span_m: no metres (check says so) */
	p->gas_density_kgm3 = signal_si[SIGNAL_GAS_DENSITY];
	p->agitator_speed_rps = signal_si[SIGNAL_AGITATOR_SPEED];
	p->motor_power_w = signal_si[SIGNAL_MOTOR_POWER];
	p->dp_riser_pa = signal_si[SIGNAL_DP_RISER];
	p->dp_downcomer_pa = signal_si[SIGNAL_DP_DOWNCOMER];
	double rho_g = p->gas_density_kgm3;
	if (!(isfinite(rho_g) && rho_g > 0.0))
		rho_g = gas_density_kgm3(p->pressure_pa, p->temperature_k,
					 s->props.gas_molar_mass_kgkmol,
					 s->props.gas_compressibility, NULL);
	double rho_l = prop_table_at(&s->props.liquid_density_kgm3, p->temperature_k, NULL);
	double M = s->props.gas_molar_mass_kgkmol;
	int tg = s->signal[SIGNAL_GAS_FLOW], tl = s->signal[SIGNAL_LIQUID_FLOW];
	p->gas_kgs = point_mass_flow_kgs(tg >= 0 ? &cfg->tags[tg] : NULL,
					 signal_si[SIGNAL_GAS_FLOW], rho_g, M);
	p->liquid_kgs = point_mass_flow_kgs(tl >= 0 ? &cfg->tags[tl] : NULL,
					    signal_si[SIGNAL_LIQUID_FLOW], rho_l, M);
}

void point_from_tags(const struct fg_config *cfg, unsigned si, const double *tag_values,
		     struct section_point *p)
{
	assert(cfg != NULL);
	assert(si < cfg->section_count);
	const struct section_cfg *s = &cfg->sections[si];
	double sig[SIGNAL_COUNT];
	for (int k = 0; k < SIGNAL_COUNT; k++) {
		int ti = s->signal[k];
		sig[k] = ti >= 0 ? config_tag_to_si(&cfg->tags[ti], tag_values[ti]) : NAN;
	}
	point_from_si(s, cfg, sig, p);
}
