/*
 * packing.c - the table of built-in packing constants (see packing.h).
 *
 * Units in the table are SI: a in m2/m3, Fp and Fpd in 1/m. Packing factors
 * are published in 1/ft; PER_FT() converts them (1 ft = 0.3048 m exactly).
 *
 * Where each number comes from is written on its row. "from memory" means
 * the value was recalled, not read from the table in front of us while this
 * file was written; such values should be checked against the cited table
 * before they are trusted for design, and a config may override any of them.
 * Constants we could not recall with confidence are NAN rather than guessed:
 * the evaluations then fall back (Robbins for the DP model, the other flood
 * method) or leave the field NAN with a note.
 *
 * Sources:
 *   [SBF]  Stichlmair, Bravo & Fair (1989), Gas Sep. Purif. 3(1) 19-28,
 *          Table 1 (a, epsilon, C1, C2, C3).
 *   [BS]   Billet & Schultes (1999), Trans IChemE 77A 498-504, tables of
 *          packing constants (a, epsilon, C_h, C_P, C_S, C_Fl), random and
 *          structured packings.
 *   [K]    Kister (1992), Distillation Design, packing-factor tables (Fp),
 *          with Kister & Gill (1991) for the flood-DP use of Fp.
 */
#include "packing.h"

#include <assert.h>
#include <math.h>
#include <stddef.h>
#include <string.h>

#define PER_FT(x) ((x) / 0.3048)

struct packing_row {
	const char *name;
	bool structured;
	struct packing_constants c;
};

static const struct packing_row rows[] = {
	/* Ceramic saddle (Berl type), 25 mm. a, epsilon, C1..C3: [SBF] Table 1.
	 * These are also the inputs of the paper's worked example as quoted in
	 * the python3-fluids 1.0.22 docstring of Stichlmair_wet (read), which
	 * our reference test reproduces. Fp = 110 1/ft: [K], from memory. */
	{"ceramic-saddle-25mm", false, {
		.area_m2m3 = 260.0, .void_frac = 0.68,
		.packing_factor_1pm = PER_FT(110.0), .dry_factor_1pm = NAN,
		.stichlmair_c1 = 32.0, .stichlmair_c2 = 7.0, .stichlmair_c3 = 1.0,
		.billet_ch = NAN, .billet_cp = NAN, .billet_cs = NAN, .billet_cfl = NAN}},
	/* Ceramic Raschig ring, 25 mm. a = 190, epsilon = 0.68 and
	 * C1..C3 = 48, 8, 2: [SBF] Table 1, from memory. Fp = 179 1/ft: [K],
	 * from memory. */
	{"ceramic-raschig-ring-25mm", false, {
		.area_m2m3 = 190.0, .void_frac = 0.68,
		.packing_factor_1pm = PER_FT(179.0), .dry_factor_1pm = NAN,
		.stichlmair_c1 = 48.0, .stichlmair_c2 = 8.0, .stichlmair_c3 = 2.0,
		.billet_ch = NAN, .billet_cp = NAN, .billet_cs = NAN, .billet_cfl = NAN}},
	/* Metal Pall ring, 25 mm. a, epsilon, C_S, C_Fl, C_h, C_P: [BS], from
	 * memory. Fp = 56 1/ft: [K], from memory. Stichlmair constants: not
	 * recalled with confidence, so NAN. */
	{"metal-pall-ring-25mm", false, {
		.area_m2m3 = 223.5, .void_frac = 0.954,
		.packing_factor_1pm = PER_FT(56.0), .dry_factor_1pm = NAN,
		.stichlmair_c1 = NAN, .stichlmair_c2 = NAN, .stichlmair_c3 = NAN,
		.billet_ch = 0.719, .billet_cp = 0.957, .billet_cs = 2.627, .billet_cfl = 2.083}},
	/* Metal Pall ring, 50 mm. [BS], from memory. Fp = 27 1/ft: [K], from
	 * memory. */
	{"metal-pall-ring-50mm", false, {
		.area_m2m3 = 112.6, .void_frac = 0.951,
		.packing_factor_1pm = PER_FT(27.0), .dry_factor_1pm = NAN,
		.stichlmair_c1 = NAN, .stichlmair_c2 = NAN, .stichlmair_c3 = NAN,
		.billet_ch = 0.784, .billet_cp = 0.763, .billet_cs = 2.725, .billet_cfl = 1.580}},
	/* Plastic Pall ring, 50 mm. [BS], from memory. Fp = 26 1/ft: [K], from
	 * memory. */
	{"plastic-pall-ring-50mm", false, {
		.area_m2m3 = 111.1, .void_frac = 0.919,
		.packing_factor_1pm = PER_FT(26.0), .dry_factor_1pm = NAN,
		.stichlmair_c1 = NAN, .stichlmair_c2 = NAN, .stichlmair_c3 = NAN,
		.billet_ch = 0.593, .billet_cp = 0.698, .billet_cs = 2.816, .billet_cfl = 1.757}},
	/* Corrugated metal sheet, 250 m2/m3, 45 degree channels. [BS]
	 * structured-packing table, the 250 m2/m3 corrugated-sheet entry, from
	 * memory. Fp = 20 1/ft: Kister & Gill structured-packing factor, from
	 * memory. */
	{"metal-sheet-250", true, {
		.area_m2m3 = 250.0, .void_frac = 0.970,
		.packing_factor_1pm = PER_FT(20.0), .dry_factor_1pm = NAN,
		.stichlmair_c1 = NAN, .stichlmair_c2 = NAN, .stichlmair_c3 = NAN,
		.billet_ch = 0.554, .billet_cp = 0.292, .billet_cs = 3.157, .billet_cfl = 2.464}},
	/* Corrugated metal sheet, 500 m2/m3. a by definition; epsilon = 0.975
	 * typical of such sheets, from memory. No correlation constant is
	 * recalled with confidence: give them in the config. */
	{"metal-sheet-500", true, {
		.area_m2m3 = 500.0, .void_frac = 0.975,
		.packing_factor_1pm = NAN, .dry_factor_1pm = NAN,
		.stichlmair_c1 = NAN, .stichlmair_c2 = NAN, .stichlmair_c3 = NAN,
		.billet_ch = NAN, .billet_cp = NAN, .billet_cs = NAN, .billet_cfl = NAN}},
};

#define ROW_COUNT (sizeof rows / sizeof rows[0])

static const char names_list[] =
	"ceramic-saddle-25mm, ceramic-raschig-ring-25mm, metal-pall-ring-25mm, "
	"metal-pall-ring-50mm, plastic-pall-ring-50mm, metal-sheet-250, metal-sheet-500";

const struct packing_constants *packing_lookup(const char *name, bool *structured)
{
	assert(name != NULL);
	for (size_t i = 0; i < ROW_COUNT; i++) {
		if (strcmp(rows[i].name, name) == 0) {
			if (structured != NULL)
				*structured = rows[i].structured;
			return &rows[i].c;
		}
	}
	return NULL;
}

const char *packing_names(void)
{
	return names_list;
}

unsigned packing_count(void)
{
	return (unsigned)ROW_COUNT;
}

const char *packing_name_at(unsigned i)
{
	assert(i < ROW_COUNT);
	return rows[i].name;
}
