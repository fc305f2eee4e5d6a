/*
 * units.c - the static table of tag units and their conversion to SI.
 *
 * One entry per name; si = value * factor + offset. Every factor is exact by
 * definition or taken from NIST Special Publication 811 (2008 edition),
 * Appendix B.8/B.9 ("factors for units listed alphabetically / by kind of
 * quantity"), as named beside it. Where NIST prints a rounded factor and the
 * unit is defined exactly (psi from the pound-force and the inch, lb from the
 * international pound), the exact product is used; tests/unit/test_units.c
 * checks each against the printed NIST value.
 *
 * A name such as "mbar" is both an absolute pressure and a pressure
 * difference. It has one entry, of kind UNIT_KIND_PRESSURE with offset 0; a
 * DP tag may use it (see units_usable_as_dp). Names that only make sense as a
 * difference (mmH2O, inH2O) are UNIT_KIND_DP. Gauge names (barg, ...) carry
 * the standard-atmosphere offset and are refused for DP.
 */
#include "units.h"

#include <assert.h>
#include <math.h>
#include <stddef.h>
#include <string.h>

/* Exact definitions used below. */
#define LB_KG 0.45359237            /* international avoirdupois pound (NIST SP 811 B.8, exact) */
#define IN_M 0.0254                 /* inch (exact) */
#define FT_M 0.3048                 /* foot (exact) */
#define G_N_MS2 9.80665             /* standard acceleration of gravity (exact, CGPM 1901) */
#define LBF_N (LB_KG * G_N_MS2)     /* pound-force = 4.448 221 615 260 5 N (NIST B.8, exact) */
#define GAL_US_M3 3.785411784e-3    /* U.S. liquid gallon = 231 in3 (NIST B.8, exact) */
#define HG_CONV_KGM3 13595.1        /* conventional mercury density, mmHg definition */

static const struct unit unit_table[] = {
	/* Absolute pressure (also usable as DP where the offset is 0). */
	{"Pa", UNIT_KIND_PRESSURE, 1.0, 0.0},
	{"kPa", UNIT_KIND_PRESSURE, 1.0e3, 0.0},
	{"kPaa", UNIT_KIND_PRESSURE, 1.0e3, 0.0},
	{"MPa", UNIT_KIND_PRESSURE, 1.0e6, 0.0},
	{"bar", UNIT_KIND_PRESSURE, 1.0e5, 0.0},     /* NIST B.8: bar = 1.0 E+05 Pa */
	{"bara", UNIT_KIND_PRESSURE, 1.0e5, 0.0},
	{"mbar", UNIT_KIND_PRESSURE, 1.0e2, 0.0},    /* NIST B.8: millibar = 1.0 E+02 Pa */
	{"psi", UNIT_KIND_PRESSURE, LBF_N / (IN_M * IN_M), 0.0}, /* NIST B.8: 6.894 757 E+03 */
	{"psia", UNIT_KIND_PRESSURE, LBF_N / (IN_M * IN_M), 0.0},
	/* mmHg, conventional: 13.5951 g/cm3 x 1 mm x g_n; NIST B.8: 1.333 224 E+02 Pa. Kept a
	 * pressure so vacuum gauges reading absolute mmHg work too. */
	{"mmHg", UNIT_KIND_PRESSURE, HG_CONV_KGM3 * 1.0e-3 * G_N_MS2, 0.0},
	/* Gauge pressure: + one standard atmosphere (units.h). */
	{"barg", UNIT_KIND_PRESSURE, 1.0e5, UNITS_ATM_PA},
	{"mbarg", UNIT_KIND_PRESSURE, 1.0e2, UNITS_ATM_PA},
	{"kPag", UNIT_KIND_PRESSURE, 1.0e3, UNITS_ATM_PA},
	{"psig", UNIT_KIND_PRESSURE, LBF_N / (IN_M * IN_M), UNITS_ATM_PA},
	/* Difference only: conventional water columns, NIST B.8: mmH2O 9.806 65 E+00 Pa,
	 * inH2O (conventional) 2.490 889 E+02 Pa. */
	{"mmH2O", UNIT_KIND_DP, 1.0e-3 * 1000.0 * G_N_MS2, 0.0},
	{"inH2O", UNIT_KIND_DP, IN_M * 1000.0 * G_N_MS2, 0.0},
	/* Temperature: NIST B.9 (thermodynamic temperature). */
	{"K", UNIT_KIND_TEMPERATURE, 1.0, 0.0},
	{"degC", UNIT_KIND_TEMPERATURE, 1.0, 273.15},
	{"degF", UNIT_KIND_TEMPERATURE, 5.0 / 9.0, 459.67 * 5.0 / 9.0}, /* T/K = (t/F + 459.67)/1.8 */
	/* Mass flow. NIST B.8: pound per hour 1.259 979 E-04 kg/s. */
	{"kg/s", UNIT_KIND_MASS_FLOW, 1.0, 0.0},
	{"kg/h", UNIT_KIND_MASS_FLOW, 1.0 / 3600.0, 0.0},
	{"t/h", UNIT_KIND_MASS_FLOW, 1000.0 / 3600.0, 0.0},
	{"lb/h", UNIT_KIND_MASS_FLOW, LB_KG / 3600.0, 0.0},
	/* Actual volume flow. NIST B.8: gallon (U.S.) per minute 6.309 020 E-05 m3/s. */
	{"m3/s", UNIT_KIND_VOLUME_FLOW, 1.0, 0.0},
	{"m3/h", UNIT_KIND_VOLUME_FLOW, 1.0 / 3600.0, 0.0},
	{"L/s", UNIT_KIND_VOLUME_FLOW, 1.0e-3, 0.0},
	{"L/min", UNIT_KIND_VOLUME_FLOW, 1.0e-3 / 60.0, 0.0},
	{"gpm", UNIT_KIND_VOLUME_FLOW, GAL_US_M3 / 60.0, 0.0},
	/* Normal volume flow (0 degC, 101 325 Pa). */
	{"Nm3/s", UNIT_KIND_NORMAL_VOLUME_FLOW, 1.0, 0.0},
	{"Nm3/h", UNIT_KIND_NORMAL_VOLUME_FLOW, 1.0 / 3600.0, 0.0},
	/* Length. NIST B.8: inch 2.54 E-02 m, foot 3.048 E-01 m (exact). */
	{"m", UNIT_KIND_LENGTH, 1.0, 0.0},
	{"cm", UNIT_KIND_LENGTH, 1.0e-2, 0.0},
	{"mm", UNIT_KIND_LENGTH, 1.0e-3, 0.0},
	{"in", UNIT_KIND_LENGTH, IN_M, 0.0},
	{"ft", UNIT_KIND_LENGTH, FT_M, 0.0},
	/* Fraction and dimensionless. */
	{"%", UNIT_KIND_FRACTION, 1.0e-2, 0.0},
	{"-", UNIT_KIND_NONE, 1.0, 0.0},
	/* Density. NIST B.8: gram per cubic centimeter 1.0 E+03, pound per cubic foot
	 * 1.601 846 E+01 kg/m3. */
	{"kg/m3", UNIT_KIND_DENSITY, 1.0, 0.0},
	{"g/cm3", UNIT_KIND_DENSITY, 1.0e3, 0.0},
	{"lb/ft3", UNIT_KIND_DENSITY, LB_KG / (FT_M * FT_M * FT_M), 0.0},
	/* rotational speed: revolutions per second (an agitator's speed) */
	{"1/s", UNIT_KIND_ROTATION, 1.0, 0.0},
	{"rps", UNIT_KIND_ROTATION, 1.0, 0.0},
	{"rpm", UNIT_KIND_ROTATION, 1.0 / 60.0, 0.0},
	/* power */
	{"W", UNIT_KIND_POWER, 1.0, 0.0},
	{"kW", UNIT_KIND_POWER, 1.0e3, 0.0},
	{"MW", UNIT_KIND_POWER, 1.0e6, 0.0},
};

#define UNIT_COUNT (sizeof(unit_table) / sizeof(unit_table[0]))

/* Kept by hand in table order; test_units checks that every listed name is
 * found and every table name is listed. */
static const char known_list[] =
	"Pa, kPa, kPaa, MPa, bar, bara, mbar, psi, psia, mmHg, barg, mbarg, kPag, psig, "
	"mmH2O, inH2O, K, degC, degF, kg/s, kg/h, t/h, lb/h, m3/s, m3/h, L/s, L/min, gpm, "
	"Nm3/s, Nm3/h, m, cm, mm, in, ft, %, -, kg/m3, g/cm3, lb/ft3, 1/s, rps, rpm, W, kW, MW";

static const char *const kind_names[UNIT_KIND_COUNT] = {
	[UNIT_KIND_NONE] = "dimensionless",
	[UNIT_KIND_FRACTION] = "fraction",
	[UNIT_KIND_PRESSURE] = "pressure",
	[UNIT_KIND_DP] = "pressure difference",
	[UNIT_KIND_TEMPERATURE] = "temperature",
	[UNIT_KIND_MASS_FLOW] = "mass flow",
	[UNIT_KIND_VOLUME_FLOW] = "volume flow",
	[UNIT_KIND_NORMAL_VOLUME_FLOW] = "normal volume flow",
	[UNIT_KIND_LENGTH] = "length",
	[UNIT_KIND_DENSITY] = "density",
	[UNIT_KIND_ROTATION] = "rotational speed",
	[UNIT_KIND_POWER] = "power",
};

const struct unit *units_lookup(const char *name)
{
	assert(name != NULL);
	for (size_t i = 0; i < UNIT_COUNT; i++)
		if (strcmp(unit_table[i].name, name) == 0)
			return &unit_table[i];
	return NULL;
}

double units_to_si(const struct unit *u, double v)
{
	assert(u != NULL);
	assert(u->factor > 0.0);
	return v * u->factor + u->offset;
}

double units_from_si(const struct unit *u, double si)
{
	assert(u != NULL);
	assert(u->factor > 0.0);
	return (si - u->offset) / u->factor;
}

bool units_usable_as_dp(const struct unit *u)
{
	assert(u != NULL);
	if (u->kind == UNIT_KIND_DP)
		return true;
	return u->kind == UNIT_KIND_PRESSURE && u->offset == 0.0;
}

const char *units_kind_name(enum unit_kind k)
{
	assert(k >= 0);
	assert(k < UNIT_KIND_COUNT);
	return kind_names[k];
}

const char *units_known_list(void)
{
	return known_list;
}
