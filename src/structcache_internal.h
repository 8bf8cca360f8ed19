/* structcache_internal.h: how checks borrow structures from an
 * irr_structure_cache (src/structcache.c). */
#ifndef IRRECON_STRUCTCACHE_INTERNAL_H
#define IRRECON_STRUCTCACHE_INTERNAL_H

#include "irrecon/perceive.h"
#include "irrecon/predict.h"
#include "irrecon/structcache.h"
#include "irrecon/structure.h"

/* One perceived structure, reference-counted: the cache holds one
 * reference while the entry is in it, each borrower one more. */
typedef struct irr_sc_entry {
	char *smiles;
	irr_molecule *mol;
	irr_inventory *inv;
	/* The bands predicted for it, made by the first check that needed
	 * them, with the options they were made for (a check with other
	 * options predicts its own). NULL until then. */
	irr_prediction *pred;
	irr_predict_options pred_opt;
	int refs;
} irr_sc_entry;

/* The entry for `smiles`, read and perceived now if it is not held yet
 * (`name` names the input in an error). On success *out carries a new
 * reference, which the caller gives back with irr_sc_entry__release. A
 * structure that fails is not kept: err says why, as
 * irr_molecule_from_smiles or irr_perceive would, and *perceive_failed
 * says which (1: it read but could not be perceived). */
int irr_structure_cache__get(irr_structure_cache *sc, const char *smiles,
                             const char *name, irr_sc_entry **out,
                             int *perceive_failed, irr_error *err);

/* The tables the cache perceives with (a check with other tables must not
 * take its structures from it). */
const irr_tables *irr_structure_cache__tables(const irr_structure_cache *sc);

/* Gives back one reference (NULL: no-op); the last frees the entry. */
void irr_sc_entry__release(irr_sc_entry *e);

#endif
