/*
 * bubble.h - bubble columns: gas holdup from the DP between two submerged
 * taps and from the correlations of Akita & Yoshida (1973) and Hughmark
 * (1967), the homogeneous / churn-turbulent transition of Wilkinson, Spek &
 * van Dierendonck (1992), and the level swell against the overflow height.
 *
 * All functions are pure SI: m, m/s, Pa, kg/m3, Pa s, N/m. Holdups are
 * volume fractions of the aerated liquid, 0..1. Validity ranges quoted here
 * are recalled from the papers and reviews, not read from them ("from
 * memory"); the functions still answer outside them and note it in x.
 */
#ifndef BUBBLE_H
#define BUBBLE_H

#include <stdbool.h>

#include "fg_result.h"

/* Standard acceleration of gravity, m/s2 (exact, CGPM 1901). */
#define BUBBLE_G_MS2 9.80665

/* Gas holdup from the pressure difference dp_pa = p(lower tap) - p(upper
 * tap) across a vertical distance dz_m inside the aerated liquid:
 * dp = (rho_l (1 - eps) + rho_g eps) g dz, so
 * eps = (rho_l - dp / (g dz)) / (rho_l - rho_g); with rho_g = 0 this is the
 * usual eps = 1 - dp / (rho_l g dz). Friction and acceleration are neglected
 * (low liquid velocity) and dp must already exclude the head of any filled
 * impulse lines or capillaries. A dp above the all-liquid head or below the
 * all-gas head gives a value clamped to 0 or 1, noted in x and reported in
 * *clamped (may be NULL), never NaN. Returns NAN only for non-finite inputs,
 * dz_m <= 0 or rho_l <= rho_g. */
double bubble_holdup_dp_frac(double dp_pa, double dz_m, double rho_l_kgm3, double rho_g_kgm3,
			     bool *clamped, struct fg_extrap *x);

/* Akita & Yoshida (1973), Ind. Eng. Chem. Process Des. Dev. 12(1) 76:
 * eps / (1 - eps)^4 = C (g D^2 rho_l / sigma)^(1/8) (g D^3 / nu_l^2)^(1/12)
 * ug / sqrt(g D), C = 0.20 for pure liquids and non-electrolyte solutions,
 * 0.25 for electrolyte solutions. Implicit in eps; solved by a fixed 60-step
 * bisection on 0..1. The diameter cancels exactly (D^(1/4+1/4-1/2)), so D
 * only matters for the range check. Range (from memory): D 0.152..0.6 m,
 * ug up to 0.4 m/s; outside it the value is still returned and noted.
 * Returns 0 for ug_ms == 0, NAN for negative or non-finite inputs. */
double bubble_akita_yoshida_frac(double ug_ms, double d_m, double rho_l_kgm3, double mu_l_pas,
				 double sigma_nm, bool electrolyte, struct fg_extrap *x);

/* The same, warm-started from *guess (the last holdup, NAN for none;
 * updated) by solve.h's bracketed Brent solve to 1e-15 absolute; cold when
 * guess is NULL. Agrees with the cold function to 1e-9 relative. */
double bubble_akita_yoshida_frac_warm(double ug_ms, double d_m, double rho_l_kgm3,
				      double mu_l_pas, double sigma_nm, bool electrolyte,
				      struct fg_extrap *x, double *guess);

/* Hughmark (1967), Ind. Eng. Chem. Process Des. Dev. 6(2) 218, his chart as
 * the usual fitted form eps = 1 / (2 + (0.35 / ug) (rho_l sigma / 72)^(1/3))
 * with ug in m/s, rho_l in g/cm3 and sigma in dyn/cm (converted here from
 * SI). Range (from memory): D >= 0.1 m, ug 0.004..0.45 m/s, rho_l
 * 780..1700 kg/m3, sigma 25..76 mN/m; noted outside. Returns 0 for
 * ug_ms == 0, NAN for negative or non-finite inputs. */
double bubble_hughmark_frac(double ug_ms, double d_m, double rho_l_kgm3, double sigma_nm,
			    struct fg_extrap *x);

/* Wilkinson, Spek & van Dierendonck (1992), AIChE J. 38(4) 544 (equations
 * from memory): the rise velocity of the small bubbles,
 * ub_small = (sigma / mu_l) 2.25 (sigma^3 rho_l / (g mu_l^4))^-0.273
 *            (rho_l / rho_g)^0.03, m/s. NAN for non-positive inputs. */
double bubble_wilkinson_small_bubble_ms(double rho_l_kgm3, double rho_g_kgm3, double mu_l_pas,
					double sigma_nm);

/* Same source: gas holdup at the regime transition,
 * eps_trans = 0.5 exp(-193 rho_g^-0.61 mu_l^0.5 sigma^0.11) (SI units). */
double bubble_wilkinson_transition_frac(double rho_g_kgm3, double mu_l_pas, double sigma_nm);

/* Same source: superficial gas velocity at the transition,
 * u_trans = eps_trans ub_small (homogeneous holdup eps = u / ub_small), m/s.
 * Range (from memory): water, n-heptane and mono-ethylene glycol, 0.1..2 MPa;
 * liquids with viscosity outside 0.3..25 mPa s are noted. */
double bubble_wilkinson_transition_ms(double rho_l_kgm3, double rho_g_kgm3, double mu_l_pas,
				      double sigma_nm, struct fg_extrap *x);

/* Regime at superficial gas velocity ug_ms against u_trans_ms: below it
 * homogeneous, at or above it churn-turbulent. NONE for non-finite input. */
enum bubble_regime bubble_regime_at(double ug_ms, double u_trans_ms);

/* Expanded (aerated) level, m: clear liquid height h0_m / (1 - eps). NAN for
 * non-finite or negative h0, eps outside 0..1 or eps == 1. */
double bubble_expanded_level_m(double h0_m, double eps);

#endif
