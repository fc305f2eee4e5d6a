/*
 * packing.h - built-in constants of common packings under generic names.
 *
 * A section may name a packing ("metal-slotted-ring-50mm") instead of giving
 * its constants one by one; the config loader copies the row and lets any
 * constant given in the config override it. Trade names are not used: each
 * row is a generic shape, material and size (or, for corrugated-sheet
 * structured packings, the specific area in m2/m3). A constant that the
 * sources do not give, or that we could not check, is NAN; the evaluations
 * that need it leave their field NAN and say so.
 */
#ifndef PACKING_H
#define PACKING_H

#include <stdbool.h>

#include "section.h"

/* Returns the static row for a generic packing name (exact, case-sensitive
 * match), or NULL when the name is not in the table. When structured is not
 * NULL it is set to true for structured (arranged) packings, false for
 * random (dumped) ones; it is left alone when the name is unknown. The
 * returned pointer is to static storage: never free it. The names the table
 * used before (e.g. "metal-pall-ring-50mm") are accepted as aliases. */
const struct packing_constants *packing_lookup(const char *name, bool *structured);

/* Where the row's constants come from (one published source per group of
 * constants, with its table, and "from memory" where recalled), or NULL for
 * an unknown name. *from_memory (when not NULL) is set true when any value of
 * the row was recalled rather than read. Static string. Accepts the same
 * names as packing_lookup. */
const char *packing_source(const char *name, bool *from_memory);

/* The table's own name for name (an older alias maps to its row's current
 * name), or NULL when unknown. Static string. */
const char *packing_canonical_name(const char *name);

/* All generic names, comma separated, for error messages. Static string.
 * Older names still accepted by packing_lookup are not listed. */
const char *packing_names(void);

/* Number of rows in the table, and the name of row i (i < count), for
 * listing and for tests. Static strings. */
unsigned packing_count(void);
const char *packing_name_at(unsigned i);

#endif
