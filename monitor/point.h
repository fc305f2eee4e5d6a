/*
 * point.h - from tag values to a section's operating point in SI.
 *
 * Tag values arrive in each tag's own unit. Mass flows convert directly;
 * volume flows need a density: the actual gas density (from the density tag
 * or from P, T, M and Z), the molar volume at normal conditions for Nm3, the
 * liquid density at the current temperature for liquid volume flows.
 */
#ifndef POINT_H
#define POINT_H

#include "config.h"

/* Fills p for section si from tag_values (indexed by tag, in tag units; NAN
 * = no value). Never fails: an unusable signal comes back NAN. */
void point_from_tags(const struct fg_config *cfg, unsigned si, const double *tag_values,
		     struct section_point *p);

/* The same for one section given its signal values already in SI (volume
 * flows as m3/s) - the engine's path after validation and filtering. */
void point_from_si(const struct section_cfg *s, const struct fg_config *cfg,
		   const double *signal_si /* [SIGNAL_COUNT] */, struct section_point *p);

/* Is signal k needed to evaluate section s at all? Gas flow always; liquid
 * flow except where the liquid may be batch (bubble, packed-bubble, stirred,
 * loop); the agitator speed of a stirred vessel; the riser and downcomer DPs
 * of a loop; pressure and temperature unless a gas
 * density is available. Used by the engine (bad input -> bad result) and by
 * `rate` (a missing value is a usage error). */
bool point_signal_required(const struct section_cfg *s, enum section_signal k,
			   bool have_density);

/* Mass flow, kg/s, of a flow tag's SI value (kg/s, m3/s or Nm3/s by the
 * tag's unit): actual volume flows with rho_actual_kgm3, normal volume flows
 * with the molar volume at 0 degC and 1 atm and molar_mass_kgkmol. */
double point_mass_flow_kgs(const struct tag_cfg *t, double si, double rho_actual_kgm3,
			   double molar_mass_kgkmol);

#endif
