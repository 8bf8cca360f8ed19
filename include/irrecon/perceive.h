/* irrecon/perceive.h: the "perceive groups" stage. From a molecule to an
 * inventory of functional groups, each with the context that moves its bands
 * (conjugation, ring size, N-H count, substitution pattern, H-bonding), plus
 * bond counts and safety cautions.
 *
 * Perception keys (the `id` of a group; group tables refer to them with
 * "key"; the list with trade names is keys.h / src/keys.c). Attributes
 * that apply are listed after each; all others are 0/"".
 *
 *   O-H:      alcohol_primary, alcohol_secondary, alcohol_tertiary  [hbond_intra]
 *             phenol [hbond_intra], carboxylic_acid [conjugated], carboxylate
 *   C=O:      ketone [conjugated, ring_size], diketone_1_2, diketone_1_3 (enol form
 *             included; hbond_intra = 1 for the chelated enol form), quinone,
 *             aldehyde [conjugated, aryl], ester [conjugated,
 *             aryl = vinyl/aryl on the O side], lactone [ring_size, conjugated],
 *             formate, anhydride [ring_size, conjugated], acid_halide [conjugated],
 *             amide [n_h = 2 primary, 1 secondary, 0 tertiary; conjugated],
 *             lactam [ring_size, n_h], imide [ring_size, n_h], urea [n_h],
 *             carbamate [n_h], carbonate [ring_size], carbonate_ion (CO3 2-,
 *             both O anionic or on a metal; HCO3- has no key), thioester (R-C(=O)-S-R',
 *             thiolactones too) [conjugated, aryl = vinyl/aryl on the S side,
 *             ring_size], thioacid (R-C(=O)-SH) [conjugated], thiocarbamate
 *             (R2N-C(=O)-S-R') [n_h], thiocarbonate (R-O-C(=O)-S-R') [ring_size]
 *   N:        amine [n_h = 2/1/0; aryl = N on an aromatic ring], ammonium [n_h =
 *             H on N+: 3/2/1/0; also an amine (aliphatic first, then aryl,
 *             then pyridine-type N) written with a separate HCl, HBr or HI
 *             component, e.g. "CCN.Cl"], imine, oxime, hydrazone, nitro [aryl], nitroso,
 *             nitrate_ester (R-O-NO2), nitrite_ester (R-O-N=O), nitramine
 *             (N-NO2), nitrate_ion, n_oxide (R3N+-O-, aromatic N-oxides)
 *             [aryl], azo (C-N=N-C, neither N aromatic) [aryl =
 *             aromatic C on the N: 0/1/2], azide, diazo, isocyanate,
 *             isothiocyanate, carbodiimide, nitrile [conjugated], isonitrile,
 *             cyanide (HCN, CN-), thiocyanate (R-S-C#N), thiocyanate_ion,
 *             cyanate_ester (R-O-C#N)
 *   C-C:      alkyne_terminal, alkyne_internal,
 *             alkene [pattern = vinyl | vinylidene | cis | trans | trisubstituted |
 *             tetrasubstituted | unknown (1,2-disubstituted, stereo not given) |
 *             unsubstituted (ethylene); conjugated (with C=C, aromatic ring, and
 *             for C=C also C=O, C=N or C#N); ring_size when the C=C is in a ring;
 *             a ring C=C in a ring of <= 7 atoms is cis], allene
 *   aromatic: benzene_ring [pattern = mono | ortho | meta | para | 1,2,3 | 1,2,4 |
 *             1,3,5 | penta_hexa | other (tetrasubstituted) | unsubstituted;
 *             one per six-membered all-carbon
 *             aromatic ring; fused rings count their fusion atoms as
 *             substituted], pyridine_ring (one ring N), azine_ring (two or
 *             more ring N) [pattern = pyridazine | pyrimidine | pyrazine |
 *             1,3,5-triazine | triazine | tetrazine | azine; n_h = ring C-H
 *             count], pyrrole_nh
 *             (pyrrole/indole N-H), azole_nh (N-H in a ring that also has an
 *             N without H: imidazole, pyrazole, triazole, tetrazole), furan_ring,
 *             thiophene_ring,
 *             pyrrole_ring [n_h = ring C-H count], azole_ring (five-membered
 *             aromatic ring with N and one more heteroatom) [pattern = imidazole
 *             | pyrazole | triazole | tetrazole | oxazole | isoxazole |
 *             oxadiazole | thiazole | isothiazole | thiadiazole | azole;
 *             n_h = ring C-H count]
 *   alkyl:    methyl, methylene, methine (counts in `count`), gem_dimethyl,
 *             tert_butyl, isopropyl, long_chain (>= 4 contiguous CH2)
 *   ethers:   ether [aryl = 0 dialkyl, 1 aryl alkyl, 2 diaryl; vinyl counts as
 *             aryl], epoxide, peroxide
 *   S:        thiol, sulfide, disulfide, sulfoxide, sulfone, sulfonamide [n_h],
 *             sulfonate_ester, sulfonic_acid, sulfonate (the anion),
 *             sulfonyl_chloride, sulfonyl_fluoride, sulfate_ion, thiocarbonyl,
 *             sulfate_ester ((RO)2SO2, with a caution), alkyl_sulfate (ROSO3- or
 *             ROSO3H)
 *   P:        phosphine, phosphine_oxide, phosphate (ester), phosphate_ion
 *             (PO4 3-, HPO4 2-, H2PO4-; phosphoric acid has no key), phosphonate, p_h,
 *             p_aryl (a P carrying aromatic rings: PPh3, Ph3PO, Wittig salts)
 *             [aryl = how many]
 *   Si, B:    si_h, si_methyl, si_aryl [aryl = how many], siloxane (Si-O-Si or
 *             Si-O-C), b_h (borohydrides, boranes), boronic_acid,
 *             boronic_ester
 *   halogen:  c_f, c_cl, c_br, c_i [aryl]
 *   other:    water (a water molecule as a component, e.g. a hydrate)
 *   isotopes: c_d, o_d, n_d (one instance per bond to [2H] or [3H]; such
 *             hydrogens are not counted as H anywhere else: CDCl3 has no
 *             methine and no C-H in the counts, D2O is no water)
 *
 * A group entry merges the instances with the same id and attributes;
 * `count` says how many there were and `atoms` lists all their atoms.
 * Counts (irr_counts) follow the SMILES as written (no salt inference).
 * Cautions: azide, acyl/sulfonyl azide, diazo, diazonium, peroxide, two or
 * more nitro groups, nitrate ester, nitramine, alkyl nitrite, aliphatic azo,
 * isocyanate, isonitrile, N-nitroso, cyanide (HCN, CN-), perchlorate,
 * hydrazine, phosgene, dialkyl sulfate. acid_halide also
 * covers chloroformates, carbamoyl chlorides and phosgene. */
#ifndef IRRECON_PERCEIVE_H
#define IRRECON_PERCEIVE_H

#include <stddef.h>
#include "irrecon/common.h"
#include "irrecon/structure.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct irr_group_attrs {
	int conjugated;     /* C=O, C=C or C#N conjugated with C=C or an aromatic ring */
	int ring_size;      /* ring holding the group (lactone, cyclic ketone); 0 acyclic */
	int n_h;            /* hydrogens on the group's nitrogen */
	int aryl;           /* attached to an aromatic ring (meaning per key above) */
	int hbond_intra;    /* intramolecular H-bond (salicylate-type) */
	char pattern[24];   /* substitution pattern (benzene_ring, alkene) */
} irr_group_attrs;

typedef struct irr_group {
	char id[40];        /* perception key, or the table id of a SMARTS group */
	irr_group_attrs attrs;
	int count;          /* instances merged into this entry */
	size_t natoms;
	const int *atoms;   /* 0-based atom indices, borrowed from the inventory */
} irr_group;

typedef struct irr_counts {
	int o_h, n_h, c_n_triple, c_o_double, aromatic_rings;
	int c_h_sp, c_h_sp2, c_h_sp3;
	int ch3, ch2, ch;   /* sp3 carbons carrying 3, 2, 1 hydrogens */
	int heavy_atoms, components;
} irr_counts;

typedef struct irr_inventory irr_inventory;
struct irr_tables; /* from tables.h; SMARTS groups of user tables */

/* Perceives the groups of m. When `tables` is not NULL, groups defined there
 * by SMARTS (not by a perception key) are matched too; their compiled
 * patterns are kept for the next call with the same tables (not
 * thread-safe, like the structure stage). A SMARTS that does not compile is
 * IRR_EINPUT naming the table file and group. Caller owns *out. */
int irr_perceive(irr_inventory **out, const irr_molecule *m,
                 const struct irr_tables *tables, irr_error *err);
void irr_inventory_free(irr_inventory *inv);

size_t irr_inventory_group_count(const irr_inventory *inv);
const irr_group *irr_inventory_group(const irr_inventory *inv, size_t i);
/* First entry with this id, or NULL. */
const irr_group *irr_inventory_find(const irr_inventory *inv, const char *id);
const irr_counts *irr_inventory_counts(const irr_inventory *inv);

/* Safety cautions for energetic or very toxic groups (azide, diazo,
 * peroxide, polynitro, isocyanate, ...): static one-line texts. */
size_t irr_inventory_caution_count(const irr_inventory *inv);
const char *irr_inventory_caution(const irr_inventory *inv, size_t i);

#ifdef __cplusplus
}
#endif
#endif
