/* obshim.h: the C face of the Open Babel shim (src/obshim.cpp), internal to
 * the library. Only structure.c includes it; no other file sees Open Babel.
 *
 * Not thread-safe: Open Babel keeps global state (plugin registry, option
 * registry, the obErrorLog message log, temporary locale switches while
 * reading). Callers that want parallelism use processes, not threads. */
#ifndef IRRECON_OBSHIM_H
#define IRRECON_OBSHIM_H

#include <stddef.h>
#include "irrecon/structure.h"

#ifdef __cplusplus
extern "C" {
#endif

/* A parsed molecule as Open Babel holds it (explicit hydrogens removed,
 * so that SMARTS H-count primitives see the same thing whether the SMILES
 * wrote [H] atoms or not). */
typedef struct irr_obshim_mol irr_obshim_mol;

/* The graph extracted from a parsed molecule: heavy atoms only, every
 * array malloc'd and owned by the struct (free with
 * irr_obshim__graph_release). Ring r holds ring_atoms[ring_start[r] ..
 * ring_start[r+1]-1] (Open Babel's SSSR, in ring order). `hybridization`
 * and `ring_size` of the atoms are left 0: structure.c derives them. */
typedef struct irr_obshim_graph {
	size_t natoms, nbonds, nrings;
	irr_atom *atoms;
	irr_bond *bonds;
	size_t *ring_start;
	int *ring_atoms;
	int stray_h;         /* hydrogens bonded to no heavy atom (H2, [H+]) */
	double mass;         /* average molecular mass, g/mol */
} irr_obshim_graph;

/* Parses `smiles` (one SMILES, possibly with '.'-separated components).
 * Every error or warning Open Babel logs while reading makes the input
 * rejected: IRR_EINPUT with Open Babel's reason copied into why. IRR_ELIMIT
 * when the molecule has more than `max_heavy` heavy atoms. Caller owns
 * *mol_out (free with irr_obshim__mol_free) and *graph (release). */
int irr_obshim__read_smiles(const char *smiles, size_t max_heavy,
                            irr_obshim_mol **mol_out, irr_obshim_graph *graph,
                            char *why, size_t why_size);
void irr_obshim__mol_free(irr_obshim_mol *mol);
void irr_obshim__graph_release(irr_obshim_graph *graph);

/* A compiled SMARTS pattern (Open Babel's OBSmartsPattern). */
typedef struct irr_obshim_smarts irr_obshim_smarts;
/* IRR_EINPUT with Open Babel's reason in why when the SMARTS is bad.
 * Caller owns *out (free with irr_obshim__smarts_free). */
int irr_obshim__smarts_compile(const char *smarts, irr_obshim_smarts **out,
                               char *why, size_t why_size);
void irr_obshim__smarts_free(irr_obshim_smarts *p);
/* Unique matches (Open Babel's unique map list). When atoms is not NULL,
 * *atoms receives a malloc'd count x width array of 0-based heavy-atom
 * indices (caller frees; NULL when there is no match). Returns the count,
 * or IRR_ENOMEM. */
int irr_obshim__smarts_match(const irr_obshim_smarts *p,
                             const irr_obshim_mol *mol, int **atoms,
                             int *width);

#ifdef __cplusplus
}
#endif
#endif
