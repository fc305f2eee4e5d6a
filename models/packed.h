/*
 * packed.h - hydraulics of packed beds (random and structured packings).
 *
 * Pure functions, SI units, no I/O, no allocation. Velocities are
 * superficial (on the empty tower cross-section). Each function names its
 * source, validity range and behaviour outside it in packed.c. Common rules:
 *   - non-finite or impossible inputs (negative rates, rho_l <= rho_g,
 *     non-positive viscosity) return NAN without a note: the caller has
 *     already made the result BAD;
 *   - a needed packing constant that is NAN returns NAN and notes it;
 *   - use outside the published range returns a finite value and notes it
 *     in x (x may be NULL), or NAN where no value can exist (an irrigated
 *     DP above the flood point, for instance), also noted.
 *
 * packed_eval (declared in section.h) combines them for one section.
 */
#ifndef PACKED_H
#define PACKED_H

#include <stdbool.h>

#include "fg_result.h"
#include "section.h"

/* Standard gravity, m/s2 (CGPM 1901). */
#define PACKED_G_MS2 9.80665

/* One inch of water (4 degC) per foot of bed, in Pa/m: 249.0889 Pa / 0.3048 m. */
#define PACKED_INH2O_PER_FT_PAM 817.22083

/* Stichlmair, Bravo & Fair (1989): dry-bed pressure drop per metre, Pa/m,
 * at gas velocity u_g_ms. Needs a, epsilon, C1..C3. 0 at zero gas. */
double packed_stichlmair_dry_pam(const struct packing_constants *c, double u_g_ms,
				 double rho_g_kgm3, double mu_g_pas, struct fg_extrap *x);

/* Stichlmair et al. (1989): liquid holdup without gas effect (below the
 * loading point), h0 = 0.555 Fr_L^(1/3), -. Needs a, epsilon. */
double packed_stichlmair_h0(const struct packing_constants *c, double u_l_ms);

/* Stichlmair et al. (1989): irrigated pressure drop per metre, Pa/m, on the
 * lower (operating) branch, and the irrigated holdup h_T (-) in *holdup
 * (may be NULL). Above the flood point there is no steady solution: NAN,
 * noted (and *holdup NAN). Zero liquid gives the dry DP and h_T = 0. */
double packed_stichlmair_wet_pam(const struct packing_constants *c, double u_g_ms,
				 double u_l_ms, const struct fluid_state *f, double *holdup,
				 struct fg_extrap *x);

/* The same, warm-started from w (see solve.h); w NULL is the cold solve.
 * Agrees with packed_stichlmair_wet_pam to 1e-9 relative. */
double packed_stichlmair_wet_pam_warm(const struct packing_constants *c, double u_g_ms,
				      double u_l_ms, const struct fluid_state *f, double *holdup,
				      struct fg_extrap *x, struct solve_warm *w);

/* The same with the local exponent d ln DP / d ln u_g (fixed liquid rate and
 * fluids) in *exponent (may be NULL): implicit differentiation of the
 * residual at the root, no second solve. NAN with the DP, at no gas, or at
 * the flood point itself. */
double packed_stichlmair_wet_pam_n(const struct packing_constants *c, double u_g_ms,
				   double u_l_ms, const struct fluid_state *f, double *holdup,
				   double *exponent, struct fg_extrap *x, struct solve_warm *w);

/* Stichlmair et al. (1989): gas velocity at flooding, m/s, at liquid
 * velocity u_l_ms. INFINITY for zero liquid (a dry bed does not flood in
 * this model). NAN, noted, when no flood point lies in 1e-6..1e3 m/s. */
double packed_stichlmair_flood_ms(const struct packing_constants *c, double u_l_ms,
				  const struct fluid_state *f, struct fg_extrap *x);

/* The same, warm-started from w (see solve.h); w NULL is the cold solve.
 * Agrees with packed_stichlmair_flood_ms to 1e-9 relative. */
double packed_stichlmair_flood_ms_warm(const struct packing_constants *c, double u_l_ms,
				       const struct fluid_state *f, struct fg_extrap *x,
				       struct solve_warm *w);

/* Billet & Schultes (1999): liquid holdup below the loading point, -.
 * Needs a, epsilon, C_h. 0 for zero liquid. */
double packed_bs_holdup_preload(const struct packing_constants *c, double u_l_ms,
				const struct fluid_state *f, struct fg_extrap *x);

/* Billet & Schultes (1999): gas velocity at the loading point, m/s, at
 * liquid velocity u_l_ms. Needs a, epsilon, C_S. INFINITY for zero liquid. */
double packed_bs_loading_ms(const struct packing_constants *c, double u_l_ms,
			    const struct fluid_state *f, struct fg_extrap *x);

/* Billet & Schultes (1999): liquid holdup at the flood point, -, from the
 * flooding-point holdup equation. Needs a, epsilon. epsilon/3 at zero liquid. */
double packed_bs_flood_holdup(const struct packing_constants *c, double u_l_ms,
			      const struct fluid_state *f, struct fg_extrap *x);

/* Billet & Schultes (1999): gas velocity at the flood point, m/s, at liquid
 * velocity u_l_ms. Needs a, epsilon, C_Fl. INFINITY for zero liquid. */
double packed_bs_flood_ms(const struct packing_constants *c, double u_l_ms,
			  const struct fluid_state *f, struct fg_extrap *x);

/* Billet & Schultes (1999): liquid holdup at gas velocity u_g_ms, -: the
 * pre-loading holdup up to the loading point, rising as (u_g/u_g,Fl)^13
 * towards the flood holdup above it. Needs a, epsilon, C_h, C_S, C_Fl.
 * Above the flood point the flood holdup is returned, noted. */
double packed_bs_holdup(const struct packing_constants *c, double u_g_ms, double u_l_ms,
			const struct fluid_state *f, struct fg_extrap *x);

/* Kister & Gill (1991): pressure drop per metre at the flood point, Pa/m,
 * from the packing factor fp_1pm (1/m): 0.12 Fp^0.7 inH2O/ft with Fp in
 * 1/ft. The same equation for structured packings (see packed.c). */
double packed_kister_gill_flood_pam(double fp_1pm, bool structured, struct fg_extrap *x);

/* Robbins (1991): irrigated pressure drop per metre, Pa/m, from the dry
 * packing factor fpd_1pm (1/m), gas and liquid mass fluxes (kg/(s m2)) on
 * the tower cross-section, densities and liquid viscosity. */
double packed_robbins_pam(double fpd_1pm, double gas_kgsm2, double liquid_kgsm2,
			  double rho_g_kgm3, double rho_l_kgm3, double mu_l_pas,
			  struct fg_extrap *x);

/* The same with d ln DP / d ln G (fixed liquid rate and fluids) in *exponent
 * (may be NULL): the equation's first term goes as G^2, the second as G^8. */
double packed_robbins_pam_n(double fpd_1pm, double gas_kgsm2, double liquid_kgsm2,
			    double rho_g_kgm3, double rho_l_kgm3, double mu_l_pas,
			    double *exponent, struct fg_extrap *x);

#endif
