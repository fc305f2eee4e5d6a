/*
 * stirred.h - gassed stirred vessels: the gas flow number and Froude number
 * of the impeller, its approach to flooding and to complete dispersion, the
 * gassed to ungassed power ratio (predicted, and measured from the motor
 * power) and the gas holdup.
 *
 * Symbols: N impeller speed (rev/s), D impeller diameter, T vessel diameter,
 * Q_G gas volume flow at the sparger's pressure and temperature (m3/s),
 * Fl_G = Q_G / (N D^3) the gas flow number, Fr = N^2 D / g the Froude number.
 *
 * Impeller flooding is the state where the gas flow overwhelms the impeller:
 * the gas rises in a plume round the shaft and the impeller no longer
 * disperses it. Going up in gas flow at a fixed speed a disc turbine passes
 * from complete dispersion (gas recirculates below the impeller too) through
 * loading to flooding. Its power draw falls as gas cavities grow behind the
 * blades, so a falling measured power ratio is the classic sign of flooding.
 *
 * All functions are pure SI. Validity ranges quoted here are recalled from
 * the papers and the handbooks that report them ("from memory"); outside them
 * the functions still answer, finite, and note it in x.
 */
#ifndef STIRRED_H
#define STIRRED_H

#include "fg_result.h"
#include "section.h"

/* Ungassed turbulent power number Po of an impeller type, the value used when
 * the config gives no power_number:
 *  - disc-turbine (six flat blades on a disc, D/T about 1/3, "Rushton"):
 *    5.0 (from memory: 4.8..5.5 in baffled vessels, Rushton, Costich &
 *    Everett 1950; Bates, Fondy & Corpstein 1963);
 *  - hollow-blade (six concave or half-pipe blades on a disc): 3.2 (from
 *    memory: 2.3..4.0 depending on the blade shape).
 * NAN for an unknown type. */
double stirred_power_number_default(enum impeller_type t);

/* Gas flow number Fl_G = q_m3s / (n_rps d_m^3). Returns 0 for q == 0 at a
 * positive speed; NAN for a speed <= 0 (no impeller action: the number does
 * not exist), a negative flow or non-finite inputs. */
double stirred_flow_number(double q_m3s, double n_rps, double d_m);

/* Froude number Fr = n^2 d / g. NAN for n < 0, d <= 0 or non-finite input;
 * 0 at n == 0. */
double stirred_froude_number(double n_rps, double d_m);

/* Gas flow number at the flooding-loading transition.
 * disc-turbine: Fl_G,F = 30 Fr (D/T)^3.5, Warmoeskerken & Smith (1985), as
 * used by Nienow, Warmoeskerken & Smith (1985, Proc. 5th Eur. Conf. Mixing,
 * Wuerzburg, 143-154) (from memory). Range (from memory): single disc turbine,
 * D/T 0.2..0.5, clearance about T/4..T/2, low-viscosity coalescing liquids.
 * hollow-blade: no correlation of that form is known to us; we take 2.5
 * times the disc-turbine value (from memory: hollow-blade turbines handle
 * about 2.5 to 3 times the gas of a disc turbine at the same speed and
 * diameter before flooding; Nienow's reviews). Outside D/T 0.2..0.5 the value
 * is still returned and noted. NAN for Fr <= 0, d_over_t <= 0, non-finite
 * input or an unknown type. */
double stirred_flood_flow_number(enum impeller_type t, double froude, double d_over_t,
				 struct fg_extrap *x);

/* Gas flow number at complete dispersion (gas recirculating below the
 * impeller): Fl_G,CD = 0.2 Fr^0.5 (D/T)^0.5, Nienow, Warmoeskerken & Smith
 * (1985) (from memory), disc turbines, same range as above. For hollow-blade
 * turbines the same expression is used (an assumption of ours: we know no
 * published complete-dispersion constants for them).
 * NAN as above. */
double stirred_dispersion_flow_number(enum impeller_type t, double froude, double d_over_t,
				      struct fg_extrap *x);

/* Gassed to ungassed power ratio Pg/P0 predicted from the gas flow number.
 * disc-turbine: Cui, van der Lans & Luyben (1996), Chem. Eng. Sci. 51(11)
 * 2631: Pg/P0 = 1 - 12.6 Fl_G for Fl_G < 0.035, 0.62 - 1.85 Fl_G above
 * (from memory). Range (from memory): Fl_G 0..0.15; above it the value at
 * Fl_G = 0.15 is held (0.3425: a flooded disc turbine settles near a third
 * of its ungassed power) and noted.
 * hollow-blade: NAN (no published correlation we can cite; the measured
 * ratio still works). NAN for a negative or non-finite flow number. */
double stirred_power_ratio_model(enum impeller_type t, double flow_number,
				 struct fg_extrap *x);

/* Ungassed impeller power P0 = Po rho_l n^3 d^5, W (the definition of the
 * power number). NAN for negative or non-finite inputs. */
double stirred_ungassed_power_w(double power_number, double rho_l_kgm3, double n_rps,
				double d_m);

/* Measured power ratio: the shaft power that reaches the liquid,
 * (motor_w - loss_w) * efficiency, over p0_w. A shaft power below zero (the
 * loss estimate too high, an idling motor) gives 0, noted. NAN when the motor
 * power is not finite, or p0_w is not positive. */
double stirred_power_ratio_measured(double motor_w, double loss_w, double efficiency,
				    double p0_w, struct fg_extrap *x);

/* Gas holdup of a gassed stirred vessel, coalescing (air-water-like) liquid:
 * eps = 0.13 (Pg/V)^0.33 u_s^0.67 with Pg/V in W/m3 and u_s the superficial
 * gas velocity in m/s on the vessel cross-section; van't Riet & Tramper
 * (1991, Basic Bioreactor Design, ch. 16) after Smith, van't Riet & Middleton
 * (1977) (form and constants from memory). Range (from memory): Pg/V
 * 100..5000 W/m3, u_s 0.002..0.05 m/s; noted outside. A result above 0.6 is
 * held at 0.6 and noted (no dispersion holds more gas than that). Returns 0
 * for u_s == 0; NAN for negative or non-finite inputs. */
double stirred_holdup_frac(double power_per_volume_wm3, double us_ms, struct fg_extrap *x);

/* Sparger pressure: the head-space pressure plus the liquid head above the
 * impeller, p + rho_l g (h - clearance), h the ungassed liquid height
 * (clamped at 0). NAN for non-finite inputs. */
double stirred_sparger_pressure_pa(double p_top_pa, double rho_l_kgm3, double level_m,
				   double clearance_m);

#endif
