/*
 * tray.h - hydraulics of cross-flow trays (sieve, valve, bubble-cap).
 *
 * Pure functions, SI in and out, no I/O and no allocation. Each function
 * names its source, its units, its validity range and what it does outside
 * that range: it returns a finite value and notes the extrapolation in x
 * (x may be NULL), or returns NAN only where no value can exist (for
 * example a density ratio that is not physical). Heads ("_m") are metres
 * of clear liquid of the tray's own liquid.
 *
 * tray_eval() (declared in section.h) strings these together for one
 * operating point of a tray section.
 */
#ifndef TRAY_H
#define TRAY_H

#include "fg_result.h"
#include "section.h"

/* Standard acceleration of gravity, m/s2 (CGPM 1901, exact). */
#define TRAY_G_MS2 9.80665

/* Fair (1961) jet-flood capacity factor C_SB, m/s (net-area basis, surface
 * tension 0.020 N/m, Ah/Aa >= 0.10), from the Lygeros & Magoulas (1986) fit
 * of Fair's chart. flow_param = (L/G) sqrt(rho_g/rho_l), spacing_m = tray
 * spacing. Valid for flow_param 0.01..1.0 and spacing 0.15..0.91 m; outside,
 * the fit is evaluated anyway (it stays finite and positive, tending to
 * 0.0105 m/s at large flow_param) and x is noted. Returns NAN for a negative
 * or non-finite flow_param or a non-positive spacing. */
double tray_fair_csb_ms(double flow_param, double spacing_m, struct fg_extrap *x);

/* Fair's surface-tension correction (sigma/0.020)^0.2, sigma in N/m. NAN for
 * sigma <= 0. */
double tray_sigma_factor(double sigma_nm);

/* Fair's hole-area correction to C_SB: 1.0 for Ah/Aa >= 0.10, 0.9 at 0.08,
 * 0.8 at 0.06 (linear between). Below 0.06 the line is continued (floored
 * at 0.1) and x is noted. NAN for a non-positive or non-finite fraction. */
double tray_hole_area_factor(double hole_area_frac, struct fg_extrap *x);

/* Souders-Brown flooding velocity on the net area, m/s:
 * u_f = c_ms sqrt((rho_l - rho_g)/rho_g). NAN unless rho_l > rho_g > 0. */
double tray_flood_velocity_ms(double c_ms, double rho_l_kgm3, double rho_g_kgm3);

/* Jet flood %: gas velocity on the net area over the flooding velocity,
 * x 100. NAN when the flooding velocity is not positive. */
double tray_jet_flood_pct(double net_velocity_ms, double flood_velocity_ms);

/* Kister & Haas (1990) clear liquid height at the froth-spray transition,
 * m. hole_area_frac = Ah/Aa, hole_diameter_m, weir_load_m2s = liquid volume
 * flow per metre of outlet weir (m3/s per m), rho_l in kg/m3. The equation
 * tends to 0 as the liquid load goes to 0, and 0 is returned there. NAN for
 * non-positive hole area, hole diameter or density, or a negative load. */
double tray_kh_transition_height_m(double hole_area_frac, double hole_diameter_m,
				   double weir_load_m2s, double rho_l_kgm3);

/* Kister & Haas (1990) flood capacity factor C_SB, m/s, net-area basis
 * (already includes surface tension and hole geometry: no Fair corrections).
 * Validity (noted in x when outside): spacing 0.36..0.91 m, hole diameter
 * 3..25 mm, Ah/Aa 0.06..0.20, sigma 5..80 mN/m, weir load 3..100 m3/(h m).
 * Below 3 m3/(h m) (including zero liquid, where the equation diverges) the
 * load is held at 3 m3/(h m) and x noted. NAN for non-physical inputs. */
double tray_kh_csb_ms(const struct tray_geom *t, const struct fluid_state *f,
		      double weir_load_m2s, struct fg_extrap *x);

/* Francis weir crest over a segmental weir, m of clear liquid, as given by
 * Sinnott (Coulson & Richardson Vol. 6, eq. 11.85): how = 0.750 (Q/lw)^(2/3)
 * with Q in m3/s and lw in m. Zero liquid gives 0. NAN for negative flow or
 * non-positive weir length. */
double tray_weir_crest_m(double liquid_m3s, double weir_length_m);

/* Orifice (discharge) coefficient of a sieve deck for the dry-tray pressure
 * drop: Cd = 0.74 (Ah/Aa) + exp(0.29 t/d - 0.56), a fit of the Liebson,
 * Kelley & Bullington (1957) chart. Valid for Ah/Aa 0.05..0.20 and t/d
 * 0.2..1.2; outside, the fit is evaluated and x noted (t/d = 0, a knife-edge
 * deck, is allowed). NAN for a non-positive Ah/Aa or a negative t/d. */
double tray_orifice_coefficient(double hole_area_frac, double thickness_over_diameter,
				struct fg_extrap *x);

/* Dry-tray head, m of clear liquid: hd = u_h^2/(2 g Cd^2) rho_g/rho_l
 * (orifice equation; Sinnott eq. 11.88 writes it as 51 (u_h/C0)^2 rho_v/rho_l
 * in mm). NAN for non-positive Cd or densities. */
double tray_dry_head_m(double hole_velocity_ms, double cd, double rho_g_kgm3,
		       double rho_l_kgm3);

/* Bennett, Agrawal & Cook (1983) effective relative froth density alpha_e =
 * exp(-12.55 Ks^0.91), Ks = u_a sqrt(rho_g/(rho_l - rho_g)) with u_a the gas
 * velocity on the active (bubbling) area, m/s. Zero gas gives 1. NAN for
 * negative velocity or unphysical densities. */
double tray_froth_density(double active_velocity_ms, double rho_l_kgm3, double rho_g_kgm3);

/* Bennett, Agrawal & Cook (1983) clear liquid height, m:
 * hL = alpha_e [hw + C (Q/(lw alpha_e))^(2/3)], C = 0.501 + 0.438 exp(-137.8 hw),
 * hw in m, Q in m3/s, lw in m. NAN for alpha_e outside (0, 1], negative
 * weir height or flow, or non-positive weir length. */
double tray_clear_liquid_m(double alpha_e, double weir_height_m, double liquid_m3s,
			   double weir_length_m);

/* Bennett, Agrawal & Cook (1983) residual (surface-tension) head, m:
 * hR = 6 sigma / (g rho_l d_Bmax), d_Bmax = (6 sigma d_h / (g (rho_l - rho_g)))^(1/3).
 * NAN for non-physical inputs. */
double tray_residual_head_m(double sigma_nm, double rho_l_kgm3, double rho_g_kgm3,
			    double hole_diameter_m);

/* Total tray pressure drop, Pa: rho_l g (hd + hL + hR). NAN if any head is
 * negative or non-finite or rho_l <= 0. */
double tray_total_dp_pa(double dry_m, double clear_liquid_m, double residual_m,
			double rho_l_kgm3);

/* d ln DP / d ln G of that total at fixed fluids and liquid rate, for the
 * heads of one operating point (hd the orifice head, hL Bennett et al.'s
 * clear liquid at froth density alpha_e, hR the residual head): the local
 * exponent the DP branch of flood_index divides by. NAN when the heads or
 * alpha_e (0 < alpha_e <= 1) are not usable. */
double tray_dp_exponent(double dry_m, double clear_liquid_m, double residual_m,
			double alpha_e, double weir_height_m);

/* Head lost by the liquid under the downcomer apron, m (Sinnott eq. 11.92,
 * hdc = 166 (Lwd/(rho_l Am))^2 mm): 0.166 (Q/Am)^2 with Q in m3/s and Am the
 * clearance area in m2. NAN for negative flow or non-positive area. */
double tray_apron_head_m(double liquid_m3s, double apron_area_m2);

/* Downcomer backup, m of clear liquid: hw + how + ht + hdc (Sinnott eq. 11.91),
 * ht = total tray pressure drop as head. NAN if any term is negative. */
double tray_dc_backup_m(double weir_height_m, double crest_m, double tray_head_m,
			double apron_head_m);

/* Common practice limit for the downcomer backup of clear liquid in normal
 * (non-foaming) systems: half of (tray spacing + weir height), m, as stated
 * by Sinnott (ch. 11). NAN for non-positive spacing. */
double tray_dc_backup_limit_m(double spacing_m, double weir_height_m);

/* Eduljee (1959) K2 of the weep-point correlation (Sinnott Fig. 11.30), -,
 * as a function of clear liquid depth hw + how in m. Valid 0..0.12 m; above
 * it the curve is held flat (and x noted). NAN for negative or non-finite
 * depth. The fit is ours, see tray.c. */
double tray_weep_k2(double clear_depth_m, struct fg_extrap *x);

/* Eduljee minimum (weep-point) hole velocity, m/s (Sinnott eq. 11.84):
 * u_h,min = [K2 - 0.90 (25.4 - d_h)] / rho_g^0.5 with d_h in mm. Hole
 * diameters outside 2..25 mm are noted in x. NAN for rho_g <= 0. */
double tray_weep_velocity_ms(double k2, double hole_diameter_m, double rho_g_kgm3,
			     struct fg_extrap *x);

/* Weep %: hole velocity as % of the weep-point velocity (below 100 means
 * weeping). NAN when the weep-point velocity is not positive. */
double tray_weep_pct(double hole_velocity_ms, double weep_velocity_ms);

/* Liquid held by one tray, m3: clear liquid on the active area plus the
 * clear-liquid equivalent in its downcomer (backup height x downcomer area).
 * NAN if any argument is negative. */
double tray_liquid_per_tray_m3(double clear_liquid_m, double active_area_m2,
			       double dc_backup_m, double dc_area_m2);

#endif
