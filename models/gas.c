/*
 * gas.c - gas density by the ideal-gas law with a compressibility factor.
 *
 * rho = p M / (Z R T) is the definition of Z (e.g. Perry's Chemical
 * Engineers' Handbook, 8th ed., section 2, "PVT relations"); the project
 * takes Z as a configured constant, so the estimate is only as good as that
 * constant. Checked in tests/unit/test_gas.c against the U.S. Standard
 * Atmosphere 1976 sea-level density.
 */
#include "gas.h"

#include <assert.h>
#include <math.h>

/* Outside this band of Z an ideal-gas-with-Z density is rarely trusted: the
 * gas is close to its critical point or liquid-like (common practice). */
#define GAS_Z_LOW 0.3
#define GAS_Z_HIGH 1.2

static bool positive(double v)
{
	return isfinite(v) && v > 0.0;
}

double gas_density_kgm3(double p_pa, double t_k, double m_kgkmol, double z, struct fg_extrap *x)
{
	if (!positive(p_pa) || !positive(t_k) || !positive(m_kgkmol) || !positive(z))
		return NAN;
	if (z < GAS_Z_LOW || z > GAS_Z_HIGH)
		fg_extrap_note(x, "gas density: compressibility outside 0.3..1.2");
	double rho = p_pa * m_kgkmol / (z * GAS_R_JKMOLK * t_k);
	assert(rho > 0.0);
	return rho;
}
