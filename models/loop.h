/*
 * loop.h - natural-circulation loops (airlift reactors, deep shafts): gas
 * holdup in the riser and the downcomer from their DPs, the liquid
 * circulation velocity from Chisti's energy balance, the gas carried under
 * into the downcomer, and the approach to a stall.
 *
 * The loop is driven by the difference in mean density between the gassed
 * riser and the less gassed downcomer, g h (eps_r - eps_d) rho_l per unit
 * area, and brakes on the friction of the turns at the bottom and the top.
 * When the downcomer holds nearly as much gas as the riser (bubbles carried
 * under by a fast downflow, or a riser starved of gas) the driving force goes
 * and the loop stalls: flood_pct = 100 eps_d / eps_r is this type's approach.
 *
 * Depth: each holdup is the mean over its DP cell's span, because a DP
 * between two taps is exactly the integral of the mixture density between
 * them. That mean is also exactly what the driving head needs, however the
 * holdup varies with depth. In a deep shaft it varies a great deal: the gas
 * is compressed by the liquid head, so at constant slip and low holdup the
 * local holdup falls with depth z roughly as p_top / (p_top + rho_l g z)
 * (Boyle's law; loop_holdup_depth_ratio). The friction terms use the span
 * means too, as Chisti wrote them for loops of a few metres; for a shaft of
 * tens of metres that is an approximation, stated here.
 *
 * Pure SI. Ranges "from memory" as in the other model files.
 */
#ifndef LOOP_H
#define LOOP_H

#include "fg_result.h"

/* Bottom loss coefficient of Chisti, Halard & Moo-Young (1988), Chem. Eng.
 * Sci. 43(3) 451: K_B = 11.402 (A_d / A_b)^0.789, A_b the free area for the
 * liquid turning under the riser (from memory). Range (from memory): A_d/A_b
 * about 0.2..5 (their internal and external loops); noted outside. NAN for
 * non-positive or non-finite input. */
double loop_bottom_loss(double ad_over_ab, struct fg_extrap *x);

/* Free area at the bottom of a concentric draft-tube loop: the side of a
 * cylinder of the riser's equivalent diameter and the bottom clearance,
 * pi d_r c with d_r = sqrt(4 A_r / pi). NAN for non-positive input. */
double loop_bottom_area_m2(double riser_area_m2, double clearance_m);

/* Chisti, Halard & Moo-Young (1988) energy balance for the superficial
 * liquid velocity in the riser, m/s:
 *   U_Lr = sqrt( 2 g h (eps_r - eps_d) /
 *                ( K_T / (1 - eps_r)^2 + K_B (A_r/A_d)^2 / (1 - eps_d)^2 ) )
 * h the dispersion height, K_T and K_B the top and bottom loss
 * coefficients. No driving force (eps_r <= eps_d) gives 0, a stalled loop.
 * Holdups outside 0..0.9 are noted (and clamped); NAN for non-finite input,
 * non-positive h or areas, or K_T + K_B <= 0. */
double loop_circulation_ms(double h_m, double eps_r, double eps_d, double riser_area_m2,
			   double downcomer_area_m2, double k_top, double k_bottom,
			   struct fg_extrap *x);

/* Gas volume flow carried down the downcomer, m3/s: the downcomer gas moves
 * down at the interstitial liquid velocity less the bubble rise velocity
 * slip_ms, (U_Ld / (1 - eps_d) - slip), times eps_d A_d, and 0 when the
 * liquid is too slow to hold the bubbles down. U_Ld = U_Lr A_r / A_d. NAN for
 * non-finite input. */
double loop_carry_under_m3s(double u_lr_ms, double eps_d, double riser_area_m2,
			    double downcomer_area_m2, double slip_ms);

/* Bubble swarm rise velocity used for the carry-under, m/s: 0.25 (from
 * memory: air bubbles of 3..6 mm in water rise at 0.2..0.3 m/s; Clift, Grace
 * & Weber 1978, fig. 7.3). */
#define LOOP_BUBBLE_SLIP_MS 0.25

/* Downcomer holdup as % of the riser holdup, the stall approach. NAN when the
 * riser holds less than LOOP_RISER_HOLDUP_MIN gas (no gas, no loop: the
 * ratio of two near-zero numbers means nothing) or input is not finite. */
double loop_stall_pct(double eps_r, double eps_d);
#define LOOP_RISER_HOLDUP_MIN 0.002

/* Ratio of the local gas holdup at depth z_m below the top of a deep shaft
 * to that at the top, for low holdup and constant slip (Boyle's law at
 * constant temperature): p_top / (p_top + rho_l g z). NAN for non-positive
 * p_top or rho_l, negative or non-finite z. */
double loop_holdup_depth_ratio(double p_top_pa, double rho_l_kgm3, double z_m);

#endif
