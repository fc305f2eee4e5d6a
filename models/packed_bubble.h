/*
 * packed_bubble.h - packed bubble columns: gas bubbling up through a packed
 * bed that is flooded with liquid (batch liquid, or liquid in cocurrent
 * upflow). The packing breaks and holds the bubbles apart.
 *
 * Two bases for the holdup, and they must not be mixed:
 *  - per free volume: of the fluid in the packing's pores (what the gas and
 *    liquid share), eps_free;
 *  - per column volume: of the whole bed, solid included, eps_col = phi
 *    eps_free with phi the packing voidage.
 * A DP between two submerged taps reads the fluid in the pores: the packing
 * rests on its support and carries none of the fluid's weight, so
 * dp = (rho_l (1 - eps_free) + rho_g eps_free) g dz gives the holdup per FREE
 * volume. The liquid the bed holds per column volume is phi (1 - eps_free).
 *
 * Impulse lines: the section's dp signal is taken as tap to tap, p(lower) -
 * p(upper), when impulse_line_density_kgm3 is not given (dry or gas-purged
 * legs, or remote seals with equal capillaries zeroed at installation). With
 * impulse_line_density_kgm3 = rho_f both legs are taken filled with that
 * fluid up to a transmitter below the lower tap, so the cell reads
 * p(lower) - p(upper) - rho_f g dz, and the tap DP is the reading plus
 * rho_f g dz (packed_bubble_tap_dp_pa).
 */
#ifndef PACKED_BUBBLE_H
#define PACKED_BUBBLE_H

#include "fg_result.h"

/* Tap-to-tap DP from a wet-leg reading: dp_read + rho_fill g dz. A NAN
 * rho_fill means dry or compensated legs: dp_read is returned unchanged. NAN
 * for a non-finite reading or dz. */
double packed_bubble_tap_dp_pa(double dp_read_pa, double rho_fill_kgm3, double dz_m);

/* Gas holdup per free volume by a bubble-column correlation applied to the
 * interstitial gas velocity u_g / phi in the pores. We know no published
 * correlation for packed bubble columns whose constants and range we could
 * check, so this is the bubble-column correlation (Akita & Yoshida or
 * Hughmark, bubble.h, with their ranges) on the free cross-section: it
 * ignores the packing's effect on the bubble size, which in coalescing
 * liquids usually raises the holdup somewhat (from memory). The tap holdup is
 * preferred wherever it exists. hughmark selects the correlation. NAN for
 * phi outside (0, 1] or bad input; 0 for u_g == 0. */
double packed_bubble_holdup_free_frac(double ug_ms, double phi, double d_m, double rho_l_kgm3,
				      double mu_l_pas, double sigma_nm, bool electrolyte,
				      bool hughmark, struct fg_extrap *x);

/* Expanded (aerated) level, m, of a column whose ungassed liquid level is
 * h0_m, with a bed of voidage phi up to bed_m above the sparger (NAN or
 * larger than any level: bed everywhere) and the same holdup eps_free in the
 * pores of the bed and in the open column above it. The liquid volume per
 * column area, phi min(h0, bed) + max(0, h0 - bed), is spread at (1 - eps)
 * per free volume. NAN for negative or non-finite h0, eps outside [0, 1) or
 * phi outside (0, 1]. */
double packed_bubble_expanded_level_m(double h0_m, double eps_free, double phi, double bed_m);

/* Liquid volume per column area, m (= m3/m2), for an ungassed level h0_m. */
double packed_bubble_liquid_m(double h0_m, double phi, double bed_m);

#endif
