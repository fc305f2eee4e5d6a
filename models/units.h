/*
 * units.h - the engineering units a tag may be configured in, and their
 * conversion to SI: si = value * factor + offset.
 *
 * Gauge pressures (barg, psig, kPag) are converted to absolute with the
 * standard atmosphere, 101 325 Pa, by their offset: a site at altitude should
 * configure absolute units or its own offset. Volume flows stay volume flows
 * in SI (m3/s); the caller turns them into mass flows with the right density
 * (actual for UNIT_KIND_VOLUME_FLOW, the molar volume at 0 degC and 1 atm for
 * UNIT_KIND_NORMAL_VOLUME_FLOW).
 */
#ifndef UNITS_H
#define UNITS_H

#include <stdbool.h>

enum unit_kind {
	UNIT_KIND_NONE,               /* dimensionless, SI "-" */
	UNIT_KIND_FRACTION,           /* %, SI fraction 0..1 */
	UNIT_KIND_PRESSURE,           /* absolute pressure, SI Pa */
	UNIT_KIND_DP,                 /* pressure difference, SI Pa (no gauge offset) */
	UNIT_KIND_TEMPERATURE,        /* SI K */
	UNIT_KIND_MASS_FLOW,          /* SI kg/s */
	UNIT_KIND_VOLUME_FLOW,        /* actual volume flow, SI m3/s */
	UNIT_KIND_NORMAL_VOLUME_FLOW, /* at 0 degC, 101325 Pa; SI Nm3/s */
	UNIT_KIND_LENGTH,             /* SI m */
	UNIT_KIND_DENSITY,            /* SI kg/m3 */
	UNIT_KIND_ROTATION,           /* rotational speed, SI rev/s */
	UNIT_KIND_POWER,              /* SI W */
	UNIT_KIND_COUNT
};

struct unit {
	const char *name;     /* as written in the config, e.g. "mbar" */
	enum unit_kind kind;
	double factor;        /* SI per unit */
	double offset;        /* SI added after scaling (gauge pressure, degC) */
};

/* Molar volume of an ideal gas at 0 degC and 101 325 Pa, m3/kmol
 * (CODATA 2018: 22.413 969 54). */
#define UNITS_NORMAL_MOLAR_VOLUME_M3KMOL 22.41396954

/* Standard atmosphere, Pa (ISO 2533). */
#define UNITS_ATM_PA 101325.0

/* Returns the static table entry for name (case-sensitive, e.g. "kg/h",
 * "degC", "mbar"), or NULL when the unit is not known. */
const struct unit *units_lookup(const char *name);

/* Converts v in unit u to SI. NAN and inf pass through. */
double units_to_si(const struct unit *u, double v);

/* Converts an SI value back to unit u (the inverse of units_to_si). */
double units_from_si(const struct unit *u, double si);

/* True when a tag of section signal "dp" may be configured in u: every
 * UNIT_KIND_DP entry (mmH2O, inH2O) and every absolute UNIT_KIND_PRESSURE
 * entry, whose offset is 0 (Pa, kPa, mbar, bar, psi, mmHg ...). A name such
 * as "mbar" has one table entry, kind PRESSURE; used for a DP it converts with
 * units_to_si unchanged, as its offset is 0. Gauge entries (barg, mbarg, kPag,
 * psig) are refused: their atmosphere offset would turn a difference into an
 * absolute pressure. */
bool units_usable_as_dp(const struct unit *u);

/* Name of a kind, for error messages ("pressure", "mass flow", ...). Static. */
const char *units_kind_name(enum unit_kind k);

/* The list of known unit names, comma separated, for error messages. Static. */
const char *units_known_list(void);

#endif
