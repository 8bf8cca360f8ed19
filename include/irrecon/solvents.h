/* irrecon/solvents.h: the library of common lab solvents and reagents
 * (group-tables/solvents/solvents.json) that a check looks names up in, with
 * their tabulated strong bands, and the atmospheric and moisture bands every
 * check considers. */
#ifndef IRRECON_SOLVENTS_H
#define IRRECON_SOLVENTS_H

#include <stddef.h>
#include "irrecon/common.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct irr_solvent_band {
	const char *label;
	double low, high, typical;
	irr_intensity intensity;
	irr_shape shape;
	const char *source;
} irr_solvent_band;

typedef struct irr_solvent {
	const char *name;          /* common name, e.g. "ethyl acetate" */
	const char *smiles;
	size_t naliases;
	const char *const *aliases;/* "EtOAc", "AcOEt" */
	size_t nbands;
	const irr_solvent_band *bands;
} irr_solvent;

typedef struct irr_solvent_library irr_solvent_library;

/* Loads a solvent library (NULL: solvents/solvents.json in
 * irr_tables_default_dir()).
 * Caller owns *out. */
int irr_solvents_load(irr_solvent_library **out, const char *path, irr_error *err);
void irr_solvents_free(irr_solvent_library *lib);
size_t irr_solvents_count(const irr_solvent_library *lib);
const irr_solvent *irr_solvents_get(const irr_solvent_library *lib, size_t i);
/* By name or alias, case-insensitive, ignoring spaces, '-' and '_'.
 * Borrowed, or NULL. */
const irr_solvent *irr_solvents_find(const irr_solvent_library *lib, const char *name);

#ifdef __cplusplus
}
#endif
#endif
