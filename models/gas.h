/*
 * gas.h - gas density from pressure, temperature, molar mass and
 * compressibility: rho = p M / (Z R T).
 */
#ifndef GAS_H
#define GAS_H

#include "fg_result.h"

/* Molar gas constant, J/(kmol K) (CODATA 2018: 8.314 462 618 J/(mol K)). */
#define GAS_R_JKMOLK 8314.462618

/* Gas density, kg/m3, from absolute pressure p_pa (Pa), temperature t_k (K),
 * molar mass m_kgkmol (kg/kmol) and compressibility z (-). Returns NAN for
 * non-finite or non-positive p, T, M or Z. Notes in x (may be NULL) when Z is
 * outside 0.3..1.2, where an ideal-gas-with-Z estimate is rarely trusted. */
double gas_density_kgm3(double p_pa, double t_k, double m_kgkmol, double z, struct fg_extrap *x);

#endif
