/*
 * packing.c - the table of built-in packing constants (see packing.h).
 *
 * Units in the table are SI: a in m2/m3, Fp and Fpd in 1/m. Packing factors
 * are published in 1/ft; PER_FT() converts them (1 ft = 0.3048 m exactly).
 *
 * Where each number comes from is written on its row, in the row's source
 * string (which `check` prints for a section using a row recalled from
 * memory). "from memory" means the value was recalled, not read from the
 * table in front of us while this file was written; such values should be
 * checked against the cited table before they are trusted, and a config may
 * override any of them.
 * python3-fluids 1.0.22 (Debian's) ships no packing table, only the
 * constants of Stichlmair's worked example in its docstrings, so it cannot
 * confirm these rows beyond that one.
 * Constants we could not recall with confidence are NAN rather than guessed:
 * the evaluations then fall back (Robbins for the DP model, the other flood
 * method) or leave the field NAN with a note.
 *
 * Sources:
 *   [SBF]  Stichlmair, Bravo & Fair (1989), Gas Sep. Purif. 3(1) 19-28,
 *          Table 1 (a, epsilon, C1, C2, C3).
 *   [BS]   Billet & Schultes (1999), Trans IChemE 77A 498-504, table of
 *          packing constants (a, epsilon, C_h, C_P, C_S, C_Fl); its number
 *          in the paper is not recalled.
 *   [K]    Kister (1992), Distillation Design, McGraw-Hill, ch. 8, the
 *          packing-factor table of random packings (Fp, 1/ft); its number
 *          is not recalled. Kister & Gill (1991) for the flood-DP use of Fp.
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
	/* True when any constant of the row was recalled rather than read from
	 * the cited table: `check` says so for a section that uses the row. */
	bool from_memory;
	/* One published source per group of constants, with its table. */
	const char *source;
	struct packing_constants c;
};

/* Random packings here are generic designs made by many makers (plain ring,
 * slotted ring, saddle); their published constants are kept. Structured
 * packings are given by material and specific area only: the correlation
 * constants published for corrugated sheets belong to single makers'
 * products, so those rows carry geometry only and a section using them gives
 * its constants in the config (from the data of the sheet actually
 * installed). No row gives Robbins' Fpd: we could not recall Robbins' table
 * with confidence, so the DP model of a Billet-Schultes row needs
 * packing_dry_factor_1pm in the config. */
static const struct packing_row rows[] = {
	/* Ceramic saddle (Berl type), 25 mm. */
	{"ceramic-saddle-25mm", false, true,
	 "a, epsilon, C1..C3: Stichlmair, Bravo & Fair (1989) Table 1, 25 mm "
	 "ceramic saddle (the numbers of the paper's worked example as quoted in "
	 "the python3-fluids 1.0.22 Stichlmair docstrings, read; that the example "
	 "is this packing is from memory); Fp 110 1/ft: Kister (1992) "
	 "packing-factor table, from memory", {
		.area_m2m3 = 260.0, .void_frac = 0.68,
		.packing_factor_1pm = PER_FT(110.0), .dry_factor_1pm = NAN,
		.stichlmair_c1 = 32.0, .stichlmair_c2 = 7.0, .stichlmair_c3 = 1.0,
		.billet_ch = NAN, .billet_cp = NAN, .billet_cs = NAN, .billet_cfl = NAN}},
	/* Ceramic plain (Raschig type) ring, 25 mm. */
	{"ceramic-ring-25mm", false, true,
	 "a 190, epsilon 0.68, C1..C3 48, 8, 2: Stichlmair, Bravo & Fair (1989) "
	 "Table 1, 25 mm ceramic ring, from memory; Fp 179 1/ft: Kister (1992) "
	 "packing-factor table, from memory", {
		.area_m2m3 = 190.0, .void_frac = 0.68,
		.packing_factor_1pm = PER_FT(179.0), .dry_factor_1pm = NAN,
		.stichlmair_c1 = 48.0, .stichlmair_c2 = 8.0, .stichlmair_c3 = 2.0,
		.billet_ch = NAN, .billet_cp = NAN, .billet_cs = NAN, .billet_cfl = NAN}},
	/* Metal slotted (Pall type) ring, 25 mm. Stichlmair constants not
	 * recalled with confidence: NAN. */
	{"metal-slotted-ring-25mm", false, true,
	 "a, epsilon, C_h, C_P, C_S, C_Fl: Billet & Schultes (1999) table of "
	 "packing constants, 25 mm metal slotted ring, from memory; Fp 56 1/ft: "
	 "Kister (1992) packing-factor table, from memory", {
		.area_m2m3 = 223.5, .void_frac = 0.954,
		.packing_factor_1pm = PER_FT(56.0), .dry_factor_1pm = NAN,
		.stichlmair_c1 = NAN, .stichlmair_c2 = NAN, .stichlmair_c3 = NAN,
		.billet_ch = 0.719, .billet_cp = 0.957, .billet_cs = 2.627, .billet_cfl = 2.083}},
	/* Metal slotted (Pall type) ring, 50 mm. */
	{"metal-slotted-ring-50mm", false, true,
	 "a, epsilon, C_h, C_P, C_S, C_Fl: Billet & Schultes (1999) table of "
	 "packing constants, 50 mm metal slotted ring, from memory; Fp 27 1/ft: "
	 "Kister (1992) packing-factor table, from memory", {
		.area_m2m3 = 112.6, .void_frac = 0.951,
		.packing_factor_1pm = PER_FT(27.0), .dry_factor_1pm = NAN,
		.stichlmair_c1 = NAN, .stichlmair_c2 = NAN, .stichlmair_c3 = NAN,
		.billet_ch = 0.784, .billet_cp = 0.763, .billet_cs = 2.725, .billet_cfl = 1.580}},
	/* Plastic slotted (Pall type) ring, 50 mm. */
	{"plastic-slotted-ring-50mm", false, true,
	 "a, epsilon, C_h, C_P, C_S, C_Fl: Billet & Schultes (1999) table of "
	 "packing constants, 50 mm plastic slotted ring, from memory; Fp 26 1/ft: "
	 "Kister (1992) packing-factor table, from memory", {
		.area_m2m3 = 111.1, .void_frac = 0.919,
		.packing_factor_1pm = PER_FT(26.0), .dry_factor_1pm = NAN,
		.stichlmair_c1 = NAN, .stichlmair_c2 = NAN, .stichlmair_c3 = NAN,
		.billet_ch = 0.593, .billet_cp = 0.698, .billet_cs = 2.816, .billet_cfl = 1.757}},
	/* Corrugated metal sheet, 250 m2/m3: geometry only (see above). */
	{"metal-corrugated-sheet-250", true, true,
	 "a 250 m2/m3 by definition; epsilon 0.97 typical of thin corrugated metal "
	 "sheet, from memory; no correlation constants (those published belong to "
	 "single makers' products): give them in the config", {
		.area_m2m3 = 250.0, .void_frac = 0.970,
		.packing_factor_1pm = NAN, .dry_factor_1pm = NAN,
		.stichlmair_c1 = NAN, .stichlmair_c2 = NAN, .stichlmair_c3 = NAN,
		.billet_ch = NAN, .billet_cp = NAN, .billet_cs = NAN, .billet_cfl = NAN}},
	/* Corrugated metal sheet, 500 m2/m3: geometry only (see above). */
	{"metal-corrugated-sheet-500", true, true,
	 "a 500 m2/m3 by definition; epsilon 0.975 typical of thin corrugated "
	 "metal sheet, from memory; no correlation constants (those published "
	 "belong to single makers' products): give them in the config", {
		.area_m2m3 = 500.0, .void_frac = 0.975,
		.packing_factor_1pm = NAN, .dry_factor_1pm = NAN,
		.stichlmair_c1 = NAN, .stichlmair_c2 = NAN, .stichlmair_c3 = NAN,
		.billet_ch = NAN, .billet_cp = NAN, .billet_cs = NAN, .billet_cfl = NAN}},
};

/* Names the table had before it used shape names only; configs written with
 * them keep working. The sheet rows lost their constants with the rename. */
static const struct {
	const char *old_name;
	const char *name;
} aliases[] = {
	{"ceramic-raschig-ring-25mm", "ceramic-ring-25mm"},
	{"metal-pall-ring-25mm", "metal-slotted-ring-25mm"},
	{"metal-pall-ring-50mm", "metal-slotted-ring-50mm"},
	{"plastic-pall-ring-50mm", "plastic-slotted-ring-50mm"},
	{"metal-sheet-250", "metal-corrugated-sheet-250"},
	{"metal-sheet-500", "metal-corrugated-sheet-500"},
};

#define ROW_COUNT (sizeof rows / sizeof rows[0])

#define ALIAS_COUNT (sizeof aliases / sizeof aliases[0])

static const char names_list[] =
	"ceramic-saddle-25mm, ceramic-ring-25mm, metal-slotted-ring-25mm, "
	"metal-slotted-ring-50mm, plastic-slotted-ring-50mm, metal-corrugated-sheet-250, "
	"metal-corrugated-sheet-500";

static const struct packing_row *row_of(const char *name)
{
	assert(name != NULL);
	for (size_t i = 0; i < ALIAS_COUNT; i++)
		if (strcmp(aliases[i].old_name, name) == 0)
			name = aliases[i].name;
	for (size_t i = 0; i < ROW_COUNT; i++)
		if (strcmp(rows[i].name, name) == 0)
			return &rows[i];
	return NULL;
}

const struct packing_constants *packing_lookup(const char *name, bool *structured)
{
	const struct packing_row *r = row_of(name);
	if (r == NULL)
		return NULL;
	if (structured != NULL)
		*structured = r->structured;
	return &r->c;
}

const char *packing_source(const char *name, bool *from_memory)
{
	const struct packing_row *r = row_of(name);
	if (r == NULL)
		return NULL;
	if (from_memory != NULL)
		*from_memory = r->from_memory;
	return r->source;
}

const char *packing_canonical_name(const char *name)
{
	const struct packing_row *r = row_of(name);
	return r == NULL ? NULL : r->name;
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
