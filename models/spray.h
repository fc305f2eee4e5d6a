/*
 * spray.h - spray towers: droplet terminal velocity, percent approach to
 * droplet carryover ("flooding" of a spray section), carried-over fraction of
 * a Rosin-Rammler spray, and the liquid in flight.
 *
 * All functions are pure SI: m, m/s, kg/m3, Pa s, N/m. A droplet here is a
 * rigid sphere falling through the rising gas; the drag curve is the one
 * recommended by Clift, Grace & Weber (1978), "Bubbles, Drops, and
 * Particles", Table 5.2 (the same piecewise fit python3-fluids implements as
 * fluids.drag.Clift). Large drops flatten and fall slower than a rigid
 * sphere; the functions note that (see SPRAY_EOTVOS_MAX) rather than correct
 * for it.
 */
#ifndef SPRAY_H
#define SPRAY_H

#include "fg_result.h"

/* Standard acceleration of gravity, m/s2 (exact, CGPM 1901). */
#define SPRAY_G_MS2 9.80665

/* Upper end of the Clift, Grace & Weber subcritical curve: beyond Re = 3.38e5
 * the drag crisis begins. Above it the last subcritical piece is extended and
 * the use is noted. */
#define SPRAY_RE_MAX 3.38e5

/* Eotvos number g (rho_l - rho_g) d^2 / sigma above which a falling drop is
 * flattened enough that the rigid-sphere fall speed is noted as extrapolated.
 * Chosen from the comparison with Gunn & Kinzer (1949) for water in air in
 * tests/ref/test_ref_spray_bubble.c: at Eo 0.5 (about 1.9 mm) the rigid
 * sphere falls about 3 % faster than the measured drop, at 2.4 mm 5 %, at
 * 4 mm 17 %; below Eo 0.3 the two agree within the measurement scatter. */
#define SPRAY_EOTVOS_MAX 0.5

/* Largest liquid volume fraction in flight for which the droplets are taken
 * to fall independently at their terminal velocity (a dilute spray, common
 * practice). Above it the holdup is not published. */
#define SPRAY_DILUTE_MAX 0.1

/* Drag coefficient of a rigid sphere at particle Reynolds number re (-),
 * Clift, Grace & Weber (1978) Table 5.2, re > 0. Valid to re = 3.38e5; above
 * it the 4.4e4..3.38e5 piece is extended (no note here: the callers note).
 * Returns NAN for re <= 0 or NAN. */
double spray_drag_coefficient(double re);

/* Terminal velocity, m/s, of a droplet of diameter d_m (m) and density
 * rho_l_kgm3 falling through still gas of density rho_g_kgm3 and viscosity
 * mu_g_pas, from the force balance Cd(Re) Re^2 = 4/3 Ar, solved for Re by a
 * fixed 64-step bisection on ln Re (no iteration limit to hit, no
 * allocation). Returns NAN for non-finite or non-positive inputs or
 * rho_l <= rho_g. Notes in x (may be NULL) when Re > SPRAY_RE_MAX. */
double spray_terminal_velocity_ms(double d_m, double rho_l_kgm3, double rho_g_kgm3,
				  double mu_g_pas, struct fg_extrap *x);

/* Diameter, m, of the droplet whose terminal velocity equals the gas
 * velocity ug_ms: smaller droplets are carried up. Solves
 * Re / Cd(Re) = 3 rho_g^2 u^3 / (4 mu g (rho_l - rho_g)) by the same
 * bisection. Returns 0 for ug_ms == 0, NAN for negative or non-finite
 * inputs or rho_l <= rho_g. Notes Re > SPRAY_RE_MAX in x. */
double spray_critical_droplet_m(double ug_ms, double rho_l_kgm3, double rho_g_kgm3,
				double mu_g_pas, struct fg_extrap *x);

/* The two above, warm-started from ln_re[0] (ln of the last Reynolds
 * number, NAN for none; updated; ln_re[1] keeps the slope for the next
 * secant step, NAN at first) by solve.h's bracketed Brent solve to 1e-12
 * relative in Re, cold when ln_re is NULL. Agree with the cold functions to
 * 1e-9 relative. */
double spray_terminal_velocity_ms_warm(double d_m, double rho_l_kgm3, double rho_g_kgm3,
				       double mu_g_pas, struct fg_extrap *x, double *ln_re);
double spray_critical_droplet_m_warm(double ug_ms, double rho_l_kgm3, double rho_g_kgm3,
				     double mu_g_pas, struct fg_extrap *x, double *ln_re);

/* Percent approach: superficial gas velocity over the terminal velocity of
 * the design droplet, x 100. 100 % means the design droplet hovers. Returns
 * NAN when vt_ms is not positive or either input is not finite. */
double spray_approach_pct(double ug_ms, double vt_ms);

/* Mass fraction of a Rosin-Rammler spray finer than d_m:
 * F = 1 - exp(-(d / d_size)^n), with size parameter d_size_m (the 63.2 %
 * diameter) and spread exponent n (Rosin & Rammler 1933). Returns NAN for
 * non-positive d_size or n, or negative d. */
double spray_rosin_rammler_finer(double d_m, double d_size_m, double n);

/* Fraction of the liquid above the spray height, as a fraction of the
 * section volume: superficial liquid velocity ul_ms over the droplets'
 * downward velocity (vt - ug), from the residence time H / (vt - ug) of the
 * design droplet; the height cancels. Returns NAN when vt_ms <= ug_ms (the
 * design droplet does not fall: carried over) or inputs are not finite or
 * negative. Dilute spray: the droplets do not interact. Above
 * SPRAY_DILUTE_MAX the premise fails (near the terminal velocity the
 * expression runs away, to values above 1 that no volume fraction can
 * take), so it returns NAN and notes why in x. */
double spray_holdup_frac(double ul_ms, double vt_ms, double ug_ms, struct fg_extrap *x);

#endif
