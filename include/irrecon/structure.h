/* irrecon/structure.h: the "read structure" stage. Parses SMILES (through
 * the Open Babel shim) into a molecule object with per-atom and per-bond
 * facts that perception works on, and matches SMARTS for user tables.
 *
 * Not thread-safe: Open Babel keeps process-global state (plugin and option
 * registries, its message log, locale switching). Run parallel work in
 * separate processes. Aromaticity is Open Babel's model; hybridization is
 * derived from the bonds (RDKit's convention for carbon); ring facts come
 * from Open Babel's SSSR. */
#ifndef IRRECON_STRUCTURE_H
#define IRRECON_STRUCTURE_H

#include <stddef.h>
#include "irrecon/common.h"

#ifdef __cplusplus
extern "C" {
#endif

/* Largest molecule accepted (heavy atoms); larger input is IRR_ELIMIT. */
#define IRR_MAX_HEAVY_ATOMS 5000
/* Largest ring system accepted: independent rings (cyclomatic number) in
 * one fused or bridged system; C60 has 31, a steroid 4. Open Babel's
 * aromaticity perception slows with about the cube of this number (about
 * 1 s for 190 rings), so larger systems are IRR_ELIMIT. Separate rings
 * (a polyphenylene chain) are not limited by this. */
#define IRR_MAX_RING_SYSTEM 120

typedef struct irr_atom {
	int element;        /* atomic number; 0 for '*' (attachment point) */
	int charge;
	int isotope;
	int aromatic;
	int hybridization;  /* 1 = sp, 2 = sp2, 3 = sp3, 0 = other/unknown */
	int h_count;        /* total (implicit + explicit) hydrogens, [2H]/[3H] excepted */
	int in_ring;
	int ring_size;      /* smallest SSSR ring containing the atom, 0 if none */
	int degree;         /* heavy-atom neighbours */
	int component;      /* 0-based index of the '.'-separated component
	                       (connected component, numbered by first atom) */
	int d_count;        /* heavy hydrogens ([2H], [3H]) on the atom; these
	                       are not in h_count (C-D absorbs near 2200, not 2900) */
} irr_atom;

typedef struct irr_bond {
	int a, b;           /* 0-based atom indices */
	int order;          /* 1, 2, 3; aromatic bonds 5 */
	int in_ring;
	int stereo;         /* for double bonds: 1 = cis (Z), 2 = trans (E), 0 = unknown;
	                       relative to the lowest-numbered heavy neighbour on
	                       each end (Z/E for 1,2-disubstituted C=C) */
} irr_bond;

typedef struct irr_molecule irr_molecule;

/* Parses SMILES. Multi-component input ("[Na+].[O-]C(=O)C") works. Anything
 * Open Babel rejects or only warns about (unkekulizable rings, unbalanced
 * parentheses, unknown elements) is IRR_EINPUT with the reason; `name` is the
 * file (or "SMILES") used in the error. Caller owns *out. */
int irr_molecule_from_smiles(irr_molecule **out, const char *smiles,
                             const char *name, irr_error *err);
void irr_molecule_free(irr_molecule *m);

/* Borrowed views, valid while m lives. Atoms are heavy atoms only
 * (hydrogens are counted in h_count), in SMILES order. */
size_t irr_molecule_atom_count(const irr_molecule *m);
const irr_atom *irr_molecule_atom(const irr_molecule *m, size_t i);
size_t irr_molecule_bond_count(const irr_molecule *m);
const irr_bond *irr_molecule_bond(const irr_molecule *m, size_t i);
/* Neighbour list of atom i: count and bond indices (borrowed). */
size_t irr_molecule_neighbours(const irr_molecule *m, size_t i, const int **bonds);
/* Smallest set of smallest rings: count, and atoms of ring r (borrowed). */
size_t irr_molecule_ring_count(const irr_molecule *m);
size_t irr_molecule_ring(const irr_molecule *m, size_t r, const int **atoms);
int irr_molecule_components(const irr_molecule *m);
const char *irr_molecule_smiles(const irr_molecule *m);   /* as given */
const char *irr_molecule_formula(const irr_molecule *m);  /* Hill order, e.g. "C8H8O" */
double irr_molecule_mass(const irr_molecule *m);          /* average, g/mol */

/* A compiled SMARTS pattern (compile once, match many). */
typedef struct irr_smarts irr_smarts;
int irr_smarts_compile(irr_smarts **out, const char *smarts, irr_error *err);
void irr_smarts_free(irr_smarts *p);
/* Unique matches of p in m. When atoms is not NULL, *atoms receives a
 * malloc'd array of count x pattern-size atom indices (caller frees);
 * *width receives the pattern size. Returns the count (>= 0) or an error. */
int irr_smarts_match(const irr_smarts *p, const irr_molecule *m,
                     int **atoms, int *width);

#ifdef __cplusplus
}
#endif
#endif
