/* test_perceive.c: the "perceive groups" stage (src/perceive.c) on named
 * compounds.
 * Sources: the functional-group classes and the structural facts checked
 * here (ring size of a cyclic ketone, N-H count of an amide, substitution
 * pattern of a benzene ring, cis/trans of an alkene) follow from each
 * compound's structure as its IUPAC name gives it; class names as in
 * Silverstein, Webster & Kiemle, Spectrometric Identification of Organic
 * Compounds, 7th ed., ch. 2 (from memory). Intramolecular hydrogen bonds:
 * methyl salicylate, salicylaldehyde, 2-hydroxyacetophenone and
 * 2-nitrophenol chelate, 4-nitrophenol cannot (same chapter, the O-H
 * stretching section; from memory); acetylacetone's enol is a chelate
 * (Pretsch, Buhlmann & Badertscher, Structure Determination of Organic
 * Compounds, IR of 1,3-diketones; from memory). Bond counts: the values
 * agree with RDKit 2022.09 (tests/scripts/rdkit_counts.sh does that on
 * many more molecules). Hazard classes: Bretherick's Handbook of Reactive
 * Chemical Hazards (azides, diazo, polynitro, peroxides; from memory).
 * The SMARTS tables in tests/data/molecules/ are fictional demo tables of
 * the Larkspur Process Chemistry lab; what they match follows from the
 * group names. Run from the repository root (tests/run-all does). */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <cmocka.h>

#include "irrecon/keys.h"
#include "irrecon/perceive.h"
#include "irrecon/structure.h"
#include "irrecon/tables.h"

#define ANY (-1)

typedef struct want {
	const char *id;
	int conjugated, ring_size, n_h, aryl, hbond_intra;
	const char *pattern; /* NULL: any */
	int count;           /* instances expected in matching entries */
} want;

static irr_inventory *perceive(const char *smiles, irr_molecule **mol)
{
	irr_molecule *m = NULL;
	irr_inventory *inv = NULL;
	irr_error err;
	irr_error_clear(&err);
	if (irr_molecule_from_smiles(&m, smiles, "SMILES", &err) != IRR_OK)
		fail_msg("%s: %s", smiles, err.message);
	if (irr_perceive(&inv, m, NULL, &err) != IRR_OK)
		fail_msg("%s: %s", smiles, err.message);
	if (mol)
		*mol = m;
	else
		irr_molecule_free(m);
	return inv;
}

static int matches(const irr_group *g, const want *w)
{
	const irr_group_attrs *a = &g->attrs;
	return strcmp(g->id, w->id) == 0 &&
	       (w->conjugated == ANY || a->conjugated == w->conjugated) &&
	       (w->ring_size == ANY || a->ring_size == w->ring_size) &&
	       (w->n_h == ANY || a->n_h == w->n_h) && (w->aryl == ANY || a->aryl == w->aryl) &&
	       (w->hbond_intra == ANY || a->hbond_intra == w->hbond_intra) &&
	       (!w->pattern || strcmp(a->pattern, w->pattern) == 0);
}

static void describe(const irr_inventory *inv, char *buf, size_t size)
{
	size_t len = 0;
	buf[0] = '\0';
	for (size_t i = 0; i < irr_inventory_group_count(inv) && len < size; i++) {
		const irr_group *g = irr_inventory_group(inv, i);
		len += (size_t)snprintf(buf + len, size - len, " %s{c%d r%d nh%d ar%d hb%d %s}x%d",
		                        g->id, g->attrs.conjugated, g->attrs.ring_size, g->attrs.n_h,
		                        g->attrs.aryl, g->attrs.hbond_intra, g->attrs.pattern,
		                        g->count);
	}
}

/* Every wanted group is there with exactly its count; `exclusive` ids
 * listed must not appear at all. */
static void expect(const char *name, const char *smiles, const want *w, size_t nw,
                   const char *const *absent)
{
	irr_inventory *inv = perceive(smiles, NULL);
	char buf[4096];
	for (size_t k = 0; k < nw; k++) {
		int total = 0;
		for (size_t i = 0; i < irr_inventory_group_count(inv); i++)
			if (matches(irr_inventory_group(inv, i), &w[k]))
				total += irr_inventory_group(inv, i)->count;
		if (total != w[k].count) {
			describe(inv, buf, sizeof buf);
			fail_msg("%s (%s): %s x%d wanted, %d found; have:%s", name, smiles, w[k].id,
			         w[k].count, total, buf);
		}
	}
	for (size_t k = 0; absent && absent[k]; k++)
		if (irr_inventory_find(inv, absent[k])) {
			describe(inv, buf, sizeof buf);
			fail_msg("%s (%s): %s must not be perceived; have:%s", name, smiles, absent[k], buf);
		}
	irr_inventory_free(inv);
}

#define W(...) ((want){__VA_ARGS__})
#define EXPECT(name, smiles, absent, ...)                                                   \
	do {                                                                                \
		const want w_[] = {__VA_ARGS__};                                            \
		expect(name, smiles, w_, sizeof w_ / sizeof w_[0], absent);                 \
	} while (0)

static void carbonyl_families(void **state)
{
	(void)state;
	static const char *const no_ketone[] = {"ketone", NULL};
	/* Ring size of cyclic ketones. */
	EXPECT("cyclopentanone", "O=C1CCCC1", NULL, W("ketone", 0, 5, ANY, ANY, ANY, NULL, 1));
	EXPECT("cyclobutanone", "O=C1CCC1", NULL, W("ketone", 0, 4, ANY, ANY, ANY, NULL, 1));
	EXPECT("cyclohexanone", "O=C1CCCCC1", NULL, W("ketone", 0, 6, ANY, ANY, ANY, NULL, 1));
	EXPECT("acetone", "CC(C)=O", NULL, W("ketone", 0, 0, ANY, ANY, ANY, NULL, 1),
	       W("methyl", ANY, ANY, ANY, ANY, ANY, NULL, 2));
	/* Conjugation with an aromatic ring or C=C. */
	EXPECT("acetophenone", "CC(=O)c1ccccc1", NULL, W("ketone", 1, 0, ANY, ANY, ANY, NULL, 1),
	       W("benzene_ring", ANY, ANY, ANY, ANY, ANY, "mono", 1));
	EXPECT("cyclohex-2-enone", "O=C1C=CCCC1", NULL, W("ketone", 1, 6, ANY, ANY, ANY, NULL, 1),
	       W("alkene", 1, 6, ANY, ANY, ANY, "cis", 1));
	EXPECT("benzil", "O=C(C(=O)c1ccccc1)c1ccccc1", no_ketone,
	       W("diketone_1_2", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("acetylacetone (keto)", "CC(=O)CC(C)=O", no_ketone,
	       W("diketone_1_3", ANY, ANY, ANY, ANY, 0, NULL, 1));
	EXPECT("acetylacetone (enol)", "CC(=O)/C=C(/C)O", no_ketone,
	       W("diketone_1_3", ANY, ANY, ANY, ANY, 1, NULL, 1));
	EXPECT("1,4-benzoquinone", "O=C1C=CC(=O)C=C1", no_ketone,
	       W("quinone", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("anthraquinone", "O=C1c2ccccc2C(=O)c2ccccc12", no_ketone,
	       W("quinone", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	/* 1,3-cyclohexanedione is no quinone (meta, sp3 ring atoms). */
	EXPECT("cyclohexane-1,3-dione", "O=C1CCCC(=O)C1", NULL,
	       W("diketone_1_3", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("quinone", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("benzaldehyde", "O=Cc1ccccc1", NULL, W("aldehyde", 1, 0, ANY, 1, ANY, NULL, 1));
	EXPECT("butanal", "CCCC=O", NULL, W("aldehyde", 0, 0, ANY, 0, ANY, NULL, 1));
	/* Esters, lactones, formates, anhydrides. */
	EXPECT("ethyl acetate", "CCOC(C)=O", NULL, W("ester", 0, 0, ANY, 0, ANY, NULL, 1),
	       W("ether", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("methyl benzoate", "COC(=O)c1ccccc1", NULL, W("ester", 1, 0, ANY, 0, ANY, NULL, 1));
	EXPECT("phenyl acetate", "CC(=O)Oc1ccccc1", NULL, W("ester", 0, 0, ANY, 1, ANY, NULL, 1));
	EXPECT("vinyl acetate", "C=COC(C)=O", NULL, W("ester", 0, 0, ANY, 1, ANY, NULL, 1));
	EXPECT("gamma-butyrolactone", "O=C1CCCO1", NULL, W("lactone", 0, 5, ANY, ANY, ANY, NULL, 1));
	EXPECT("delta-valerolactone", "O=C1CCCCO1", NULL, W("lactone", 0, 6, ANY, ANY, ANY, NULL, 1));
	EXPECT("coumarin", "O=c1ccc2ccccc2o1", NULL, W("lactone", 1, 6, ANY, ANY, ANY, NULL, 1));
	EXPECT("ethyl formate", "O=COCC", NULL, W("formate", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("ester", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("acetic anhydride", "CC(=O)OC(C)=O", NULL,
	       W("anhydride", 0, 0, ANY, ANY, ANY, NULL, 1), W("ester", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("di-tert-butyl dicarbonate (an anhydride of two carbonic half-esters)",
	       "CC(C)(C)OC(=O)OC(=O)OC(C)(C)C", NULL, W("anhydride", 0, 0, ANY, ANY, ANY, NULL, 1),
	       W("carbonate", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("ether", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("succinic anhydride", "O=C1CCC(=O)O1", NULL,
	       W("anhydride", 0, 5, ANY, ANY, ANY, NULL, 1));
	EXPECT("phthalic anhydride", "O=C1OC(=O)c2ccccc21", NULL,
	       W("anhydride", 1, 5, ANY, ANY, ANY, NULL, 1));
	EXPECT("benzoyl chloride", "O=C(Cl)c1ccccc1", NULL,
	       W("acid_halide", 1, ANY, ANY, ANY, ANY, NULL, 1), W("c_cl", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("ethyl chloroformate", "ClC(=O)OCC", NULL,
	       W("acid_halide", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("c_cl", ANY, ANY, ANY, ANY, ANY, NULL, 0),
	       W("ether", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("ethylene carbonate", "O=C1OCCO1", NULL, W("carbonate", ANY, 5, ANY, ANY, ANY, NULL, 1));
	EXPECT("dimethyl carbonate", "COC(=O)OC", NULL, W("carbonate", ANY, 0, ANY, ANY, ANY, NULL, 1));
	/* Acids and their salts. */
	EXPECT("acetic acid", "CC(=O)O", NULL, W("carboxylic_acid", 0, ANY, ANY, ANY, ANY, NULL, 1),
	       W("alcohol_primary", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("benzoic acid", "OC(=O)c1ccccc1", NULL,
	       W("carboxylic_acid", 1, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("sodium acetate", "CC(=O)[O-].[Na+]", NULL,
	       W("carboxylate", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("carboxylic_acid", ANY, ANY, ANY, ANY, ANY, NULL, 0));
}

static void nitrogen_carbonyls_and_amines(void **state)
{
	(void)state;
	EXPECT("acetamide (primary)", "CC(N)=O", NULL, W("amide", 0, ANY, 2, ANY, ANY, NULL, 1),
	       W("amine", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("N-methylacetamide (secondary)", "CNC(C)=O", NULL,
	       W("amide", ANY, ANY, 1, ANY, ANY, NULL, 1));
	EXPECT("N,N-dimethylformamide (tertiary)", "CN(C)C=O", NULL,
	       W("amide", ANY, ANY, 0, ANY, ANY, NULL, 1));
	EXPECT("benzamide", "NC(=O)c1ccccc1", NULL, W("amide", 1, ANY, 2, ANY, ANY, NULL, 1));
	EXPECT("2-pyrrolidone", "O=C1CCCN1", NULL, W("lactam", ANY, 5, 1, ANY, ANY, NULL, 1));
	EXPECT("caprolactam", "O=C1CCCCCN1", NULL, W("lactam", ANY, 7, 1, ANY, ANY, NULL, 1));
	EXPECT("N-methyl-2-pyrrolidone", "CN1CCCC1=O", NULL, W("lactam", ANY, 5, 0, ANY, ANY, NULL, 1));
	EXPECT("2-pyridone", "O=c1cccc[nH]1", NULL, W("lactam", ANY, 6, 1, ANY, ANY, NULL, 1));
	EXPECT("penicillin G (beta-lactam)",
	       "CC1(C)S[C@@H]2[C@H](NC(=O)Cc3ccccc3)C(=O)N2[C@H]1C(=O)O", NULL,
	       W("lactam", ANY, 4, 0, ANY, ANY, NULL, 1), W("amide", ANY, ANY, 1, ANY, ANY, NULL, 1),
	       W("carboxylic_acid", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("gem_dimethyl", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("succinimide", "O=C1CCC(=O)N1", NULL, W("imide", ANY, 5, 1, ANY, ANY, NULL, 1),
	       W("lactam", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("urea", "NC(N)=O", NULL, W("urea", ANY, ANY, 4, ANY, ANY, NULL, 1));
	EXPECT("caffeine", "Cn1cnc2c1c(=O)n(C)c(=O)n2C", NULL,
	       W("urea", ANY, ANY, 0, ANY, ANY, NULL, 1), W("lactam", ANY, 6, 0, ANY, ANY, NULL, 1),
	       W("methyl", ANY, ANY, ANY, ANY, ANY, NULL, 3));
	EXPECT("ethyl carbamate", "CCOC(N)=O", NULL, W("carbamate", ANY, ANY, 2, ANY, ANY, NULL, 1));
	/* Amines by N-H count, aryl amines, ammonium salts. */
	EXPECT("butylamine", "CCCCN", NULL, W("amine", ANY, ANY, 2, 0, ANY, NULL, 1));
	EXPECT("diethylamine", "CCNCC", NULL, W("amine", ANY, ANY, 1, 0, ANY, NULL, 1));
	EXPECT("triethylamine", "CCN(CC)CC", NULL, W("amine", ANY, ANY, 0, 0, ANY, NULL, 1));
	EXPECT("aniline", "Nc1ccccc1", NULL, W("amine", ANY, ANY, 2, 1, ANY, NULL, 1));
	EXPECT("ethylammonium chloride", "CC[NH3+].[Cl-]", NULL,
	       W("ammonium", ANY, ANY, 3, ANY, ANY, NULL, 1), W("amine", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("ethylamine hydrochloride written neutral", "CCN.Cl", NULL,
	       W("ammonium", ANY, ANY, 3, ANY, ANY, NULL, 1), W("amine", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("pyridine hydrochloride written neutral", "c1ccncc1.Cl", NULL,
	       W("ammonium", ANY, ANY, 1, ANY, ANY, NULL, 1));
	EXPECT("lidocaine hydrochloride: the amine, not the amide N, takes the proton",
	       "CCN(CC)CC(=O)Nc1c(C)cccc1C.Cl", NULL, W("ammonium", ANY, ANY, 1, ANY, ANY, NULL, 1),
	       W("amide", ANY, ANY, 1, ANY, ANY, NULL, 1), W("amine", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("tetramethylammonium bromide", "C[N+](C)(C)C.[Br-]", NULL,
	       W("ammonium", ANY, ANY, 0, ANY, ANY, NULL, 1));
	EXPECT("alanine zwitterion", "C[C@H]([NH3+])C([O-])=O", NULL,
	       W("ammonium", ANY, ANY, 3, ANY, ANY, NULL, 1),
	       W("carboxylate", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("acetone oxime", "CC(C)=NO", NULL, W("oxime", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("acetone phenylhydrazone", "CC(=NNc1ccccc1)C", NULL,
	       W("hydrazone", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("N-benzylideneaniline", "C(=Nc1ccccc1)c1ccccc1", NULL,
	       W("imine", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("nitrobenzene", "O=[N+]([O-])c1ccccc1", NULL, W("nitro", ANY, ANY, ANY, 1, ANY, NULL, 1));
	EXPECT("nitromethane (pentavalent N spelling)", "CN(=O)=O", NULL,
	       W("nitro", ANY, ANY, ANY, 0, ANY, NULL, 1));
	EXPECT("benzonitrile", "N#Cc1ccccc1", NULL, W("nitrile", 1, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("acetonitrile", "CC#N", NULL, W("nitrile", 0, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("benzyl isocyanide", "[C-]#[N+]Cc1ccccc1", NULL,
	       W("isonitrile", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("nitrile", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("phenyl isocyanate", "O=C=Nc1ccccc1", NULL,
	       W("isocyanate", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("phenyl isothiocyanate", "S=C=Nc1ccccc1", NULL,
	       W("isothiocyanate", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("DCC", "C(=NC1CCCCC1)=NC1CCCCC1", NULL,
	       W("carbodiimide", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("imine", ANY, ANY, ANY, ANY, ANY, NULL, 0));
}

static void hydroxyl_groups(void **state)
{
	(void)state;
	EXPECT("ethanol", "CCO", NULL, W("alcohol_primary", ANY, ANY, ANY, ANY, 0, NULL, 1));
	EXPECT("propan-2-ol", "CC(C)O", NULL, W("alcohol_secondary", ANY, ANY, ANY, ANY, 0, NULL, 1),
	       W("isopropyl", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("tert-butanol", "CC(C)(C)O", NULL, W("alcohol_tertiary", ANY, ANY, ANY, ANY, 0, NULL, 1),
	       W("tert_butyl", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("glycerol", "OCC(O)CO", NULL, W("alcohol_primary", ANY, ANY, ANY, ANY, ANY, NULL, 2),
	       W("alcohol_secondary", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("phenol", "Oc1ccccc1", NULL, W("phenol", ANY, ANY, ANY, ANY, 0, NULL, 1));
	EXPECT("methyl salicylate", "COC(=O)c1ccccc1O", NULL,
	       W("phenol", ANY, ANY, ANY, ANY, 1, NULL, 1), W("ester", 1, ANY, ANY, 0, ANY, NULL, 1));
	EXPECT("salicylaldehyde", "O=Cc1ccccc1O", NULL, W("phenol", ANY, ANY, ANY, ANY, 1, NULL, 1));
	EXPECT("2-hydroxyacetophenone", "CC(=O)c1ccccc1O", NULL,
	       W("phenol", ANY, ANY, ANY, ANY, 1, NULL, 1));
	EXPECT("2-nitrophenol", "Oc1ccccc1[N+](=O)[O-]", NULL,
	       W("phenol", ANY, ANY, ANY, ANY, 1, NULL, 1));
	EXPECT("4-nitrophenol", "Oc1ccc([N+](=O)[O-])cc1", NULL,
	       W("phenol", ANY, ANY, ANY, ANY, 0, NULL, 1));
	EXPECT("4-hydroxybenzaldehyde", "O=Cc1ccc(O)cc1", NULL,
	       W("phenol", ANY, ANY, ANY, ANY, 0, NULL, 1));
	EXPECT("diacetone alcohol (beta-hydroxy ketone)", "CC(=O)CC(C)(C)O", NULL,
	       W("alcohol_tertiary", ANY, ANY, ANY, ANY, 1, NULL, 1));
	EXPECT("chloroform-d", "[2H]C(Cl)(Cl)Cl", NULL, W("c_d", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("methine", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("c_cl", ANY, ANY, ANY, ANY, ANY, NULL, 3));
	EXPECT("methanol-d4", "[2H]OC([2H])([2H])[2H]", NULL,
	       W("c_d", ANY, ANY, ANY, ANY, ANY, NULL, 3), W("o_d", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("alcohol_primary", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("heavy water is no water band source", "[2H]O[2H]", NULL,
	       W("o_d", ANY, ANY, ANY, ANY, ANY, NULL, 2), W("water", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("copper(II) acetate monohydrate", "CC(=O)[O-].CC(=O)[O-].O.[Cu+2]", NULL,
	       W("water", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("carboxylate", ANY, ANY, ANY, ANY, ANY, NULL, 2));
}

static void carbon_skeleton(void **state)
{
	(void)state;
	EXPECT("hex-1-ene", "CCCCC=C", NULL, W("alkene", 0, 0, ANY, ANY, ANY, "vinyl", 1));
	EXPECT("2-methylpropene", "C=C(C)C", NULL, W("alkene", 0, 0, ANY, ANY, ANY, "vinylidene", 1));
	EXPECT("cis-but-2-ene", "C/C=C\\C", NULL, W("alkene", 0, 0, ANY, ANY, ANY, "cis", 1));
	EXPECT("trans-but-2-ene", "C/C=C/C", NULL, W("alkene", 0, 0, ANY, ANY, ANY, "trans", 1));
	EXPECT("but-2-ene, no stereo", "CC=CC", NULL, W("alkene", 0, 0, ANY, ANY, ANY, "unknown", 1));
	EXPECT("2-methylbut-2-ene", "CC=C(C)C", NULL,
	       W("alkene", 0, 0, ANY, ANY, ANY, "trisubstituted", 1));
	EXPECT("tetramethylethylene", "CC(C)=C(C)C", NULL,
	       W("alkene", 0, 0, ANY, ANY, ANY, "tetrasubstituted", 1));
	EXPECT("cyclohexene", "C1=CCCCC1", NULL, W("alkene", 0, 6, ANY, ANY, ANY, "cis", 1));
	EXPECT("styrene", "C=Cc1ccccc1", NULL, W("alkene", 1, 0, ANY, ANY, ANY, "vinyl", 1));
	EXPECT("diethyl fumarate", "CCOC(=O)/C=C/C(=O)OCC", NULL,
	       W("alkene", 1, 0, ANY, ANY, ANY, "trans", 1), W("ester", 1, ANY, ANY, ANY, ANY, NULL, 2));
	EXPECT("allene", "C=C=C", NULL, W("allene", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("alkene", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("ketene is no alkene", "C=C=O", NULL, W("alkene", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("hex-1-yne", "CCCCC#C", NULL, W("alkyne_terminal", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("diphenylacetylene", "c1ccc(C#Cc2ccccc2)cc1", NULL,
	       W("alkyne_internal", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	/* Benzene substitution patterns. */
	EXPECT("toluene", "Cc1ccccc1", NULL, W("benzene_ring", ANY, ANY, ANY, ANY, ANY, "mono", 1));
	EXPECT("o-xylene", "Cc1ccccc1C", NULL, W("benzene_ring", ANY, ANY, ANY, ANY, ANY, "ortho", 1));
	EXPECT("m-xylene", "Cc1cccc(C)c1", NULL, W("benzene_ring", ANY, ANY, ANY, ANY, ANY, "meta", 1));
	EXPECT("p-xylene", "Cc1ccc(C)cc1", NULL, W("benzene_ring", ANY, ANY, ANY, ANY, ANY, "para", 1));
	EXPECT("hemimellitene", "Cc1cccc(C)c1C", NULL,
	       W("benzene_ring", ANY, ANY, ANY, ANY, ANY, "1,2,3", 1));
	EXPECT("pseudocumene", "Cc1ccc(C)c(C)c1", NULL,
	       W("benzene_ring", ANY, ANY, ANY, ANY, ANY, "1,2,4", 1));
	EXPECT("mesitylene", "Cc1cc(C)cc(C)c1", NULL,
	       W("benzene_ring", ANY, ANY, ANY, ANY, ANY, "1,3,5", 1));
	EXPECT("durene", "Cc1cc(C)c(C)cc1C", NULL, W("benzene_ring", ANY, ANY, ANY, ANY, ANY, "other", 1));
	EXPECT("pentamethylbenzene", "Cc1cc(C)c(C)c(C)c1C", NULL,
	       W("benzene_ring", ANY, ANY, ANY, ANY, ANY, "penta_hexa", 1));
	EXPECT("naphthalene (fusion atoms substituted)", "c1ccc2ccccc2c1", NULL,
	       W("benzene_ring", ANY, ANY, ANY, ANY, ANY, "ortho", 2));
	EXPECT("pyridine", "c1ccncc1", NULL, W("pyridine_ring", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("benzene_ring", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	/* Rings with two or more N: the parent named from the N positions. */
	EXPECT("pyrimidine", "c1cncnc1", NULL, W("azine_ring", ANY, ANY, 4, ANY, ANY, "pyrimidine", 1),
	       W("pyridine_ring", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("pyrazine", "c1cnccn1", NULL, W("azine_ring", ANY, ANY, 4, ANY, ANY, "pyrazine", 1));
	EXPECT("pyridazine", "c1ccnnc1", NULL, W("azine_ring", ANY, ANY, 4, ANY, ANY, "pyridazine", 1));
	EXPECT("melamine", "Nc1nc(N)nc(N)n1", NULL,
	       W("azine_ring", ANY, ANY, 0, ANY, ANY, "1,3,5-triazine", 1), W("amine", ANY, ANY, 2, 1, ANY, NULL, 3));
	EXPECT("1,2,4-triazine", "n1ncncc1", NULL, W("azine_ring", ANY, ANY, 3, ANY, ANY, "triazine", 1));
	EXPECT("pyridine (one N)", "c1ccncc1", NULL, W("azine_ring", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("indole", "c1ccc2[nH]ccc2c1", NULL, W("pyrrole_nh", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("furan", "c1ccoc1", NULL, W("furan_ring", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("ether", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("thiophene", "c1ccsc1", NULL, W("thiophene_ring", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("sulfide", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	/* N-O and N=N groups: the O of a nitrate or nitrite ester is not an
	 * ether, a nitrite is not a nitroso compound. */
	EXPECT("ethyl nitrate", "CCO[N+](=O)[O-]", NULL, W("nitrate_ester", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("nitro", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("ether", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("isoamyl nitrite", "CC(C)CCON=O", NULL, W("nitrite_ester", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("nitroso", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("ether", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("RDX", "C1N([N+](=O)[O-])CN([N+](=O)[O-])CN1[N+](=O)[O-]", NULL,
	       W("nitramine", ANY, ANY, ANY, ANY, ANY, NULL, 3), W("amine", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("potassium nitrate", "[K+].[O-][N+](=O)[O-]", NULL, W("nitrate_ion", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("nitrate_ester", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("azobenzene", "c1ccc(N=Nc2ccccc2)cc1", NULL, W("azo", ANY, ANY, ANY, 2, ANY, NULL, 1),
	       W("imine", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("benzene_ring", ANY, ANY, ANY, ANY, ANY, "mono", 2));
	EXPECT("AIBN", "CC(C)(C#N)N=NC(C)(C)C#N", NULL, W("azo", ANY, ANY, ANY, 0, ANY, NULL, 1),
	       W("nitrile", ANY, ANY, ANY, ANY, ANY, NULL, 2));
	/* Five-membered N-heteroaromatics: the parent ring named from the
	 * structure; n_h counts ring C-H (a pyrrole's four, 5-methyltetrazole's
	 * none). Ring classes as in Joule & Mills, Heterocyclic Chemistry (from
	 * memory). */
	EXPECT("pyrrole", "c1cc[nH]c1", NULL, W("pyrrole_ring", ANY, ANY, 4, ANY, ANY, NULL, 1),
	       W("pyrrole_nh", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("azole_ring", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("1-methylpyrrole", "Cn1cccc1", NULL, W("pyrrole_ring", ANY, ANY, 4, ANY, ANY, NULL, 1),
	       W("pyrrole_nh", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("amine", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("1-methylimidazole", "Cn1ccnc1", NULL,
	       W("azole_ring", ANY, ANY, 3, ANY, ANY, "imidazole", 1), W("amine", ANY, ANY, ANY, ANY, ANY, NULL, 0),
	       W("imine", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("imidazole", "c1c[nH]cn1", NULL, W("azole_ring", ANY, ANY, 3, ANY, ANY, "imidazole", 1),
	       W("azole_nh", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("pyrrole_nh", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("pyrazole", "c1cn[nH]c1", NULL, W("azole_ring", ANY, ANY, 3, ANY, ANY, "pyrazole", 1),
	       W("azole_nh", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("pyrrole_nh", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("1,2,4-triazole", "c1nc[nH]n1", NULL, W("azole_ring", ANY, ANY, 2, ANY, ANY, "triazole", 1),
	       W("azole_nh", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("benzimidazole", "c1ccc2[nH]cnc2c1", NULL, W("azole_ring", ANY, ANY, 1, ANY, ANY, "imidazole", 1),
	       W("azole_nh", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("benzene_ring", ANY, ANY, ANY, ANY, ANY, "ortho", 1));
	EXPECT("carbazole", "c1ccc2c(c1)[nH]c1ccccc12", NULL, W("pyrrole_ring", ANY, ANY, 0, ANY, ANY, NULL, 1),
	       W("pyrrole_nh", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("azole_nh", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("5-methyltetrazole", "Cc1nnn[nH]1", NULL, W("azole_ring", ANY, ANY, 0, ANY, ANY, "tetrazole", 1),
	       W("azide", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("diazo", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("oxazole", "c1cocn1", NULL, W("azole_ring", ANY, ANY, 3, ANY, ANY, "oxazole", 1),
	       W("furan_ring", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("ether", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("isoxazole", "c1ccon1", NULL, W("azole_ring", ANY, ANY, 3, ANY, ANY, "isoxazole", 1));
	EXPECT("thiazole", "c1cscn1", NULL, W("azole_ring", ANY, ANY, 3, ANY, ANY, "thiazole", 1),
	       W("thiophene_ring", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("sulfide", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("benzothiazole", "c1ccc2ncsc2c1", NULL, W("azole_ring", ANY, ANY, 1, ANY, ANY, "thiazole", 1),
	       W("benzene_ring", ANY, ANY, ANY, ANY, ANY, "ortho", 1));
	EXPECT("2,5-diphenyl-1,3,4-oxadiazole", "c1ccc(-c2nnc(-c3ccccc3)o2)cc1", NULL,
	       W("azole_ring", ANY, ANY, 0, ANY, ANY, "oxadiazole", 1), W("benzene_ring", ANY, ANY, ANY, ANY, ANY, "mono", 2));
	EXPECT("caffeine", "Cn1cnc2c1c(=O)n(C)c(=O)n2C", NULL, W("azole_ring", ANY, ANY, 1, ANY, ANY, "imidazole", 1));
	/* Alkyl fragments. */
	EXPECT("2,2,4-trimethylpentane", "CC(C)CC(C)(C)C", NULL,
	       W("tert_butyl", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("isopropyl", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("methyl", ANY, ANY, ANY, ANY, ANY, NULL, 5), W("methylene", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("methine", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("3,3-dimethylpentane", "CCC(C)(C)CC", NULL,
	       W("gem_dimethyl", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("dodecane", "CCCCCCCCCCCC", NULL, W("long_chain", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("methylene", ANY, ANY, ANY, ANY, ANY, NULL, 10));
	EXPECT("pentane (3 CH2: no long chain)", "CCCCC", NULL,
	       W("long_chain", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("cyclohexane (ring CH2: no long chain)", "C1CCCCC1", NULL,
	       W("long_chain", ANY, ANY, ANY, ANY, ANY, NULL, 0));
}

static void heteroatom_groups(void **state)
{
	(void)state;
	EXPECT("diethyl ether", "CCOCC", NULL, W("ether", ANY, ANY, ANY, 0, ANY, NULL, 1));
	EXPECT("anisole", "COc1ccccc1", NULL, W("ether", ANY, ANY, ANY, 1, ANY, NULL, 1));
	EXPECT("diphenyl ether", "c1ccc(Oc2ccccc2)cc1", NULL, W("ether", ANY, ANY, ANY, 2, ANY, NULL, 1));
	EXPECT("propylene oxide", "CC1CO1", NULL, W("epoxide", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("ether", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("tert-butyl hydroperoxide", "CC(C)(C)OO", NULL,
	       W("peroxide", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("alcohol_tertiary", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("ethanethiol", "CCS", NULL, W("thiol", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	/* Carbonyls on S: the S belongs to the carbonyl group (no thiol or sulfide
	 * beside it); the N-H count of a thiocarbamate as for a carbamate. */
	EXPECT("S-methyl thioacetate", "CC(=O)SC", NULL, W("thioester", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("sulfide", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("ester", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("thioacetic acid", "CC(=O)S", NULL, W("thioacid", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("thiol", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("thioester", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("thiobenzoic acid", "SC(=O)c1ccccc1", NULL, W("thioacid", 1, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("S-methyl N-methylthiocarbamate", "CSC(=O)NC", NULL,
	       W("thiocarbamate", ANY, ANY, 1, ANY, ANY, NULL, 1), W("amide", ANY, ANY, ANY, ANY, ANY, NULL, 0),
	       W("sulfide", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("amine", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("thiobencarb", "CCN(CC)C(=O)SCc1ccc(Cl)cc1", NULL,
	       W("thiocarbamate", ANY, ANY, 0, ANY, ANY, NULL, 1), W("carbamate", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("O,S-dimethyl thiocarbonate", "COC(=O)SC", NULL,
	       W("thiocarbonate", ANY, 0, ANY, ANY, ANY, NULL, 1), W("ether", ANY, ANY, ANY, ANY, ANY, NULL, 0),
	       W("sulfide", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("carbonate", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("1,3-oxathiolan-2-one", "O=C1OCCS1", NULL, W("thiocarbonate", ANY, 5, ANY, ANY, ANY, NULL, 1));
	EXPECT("potassium thioacetate (no key)", "CC(=O)[S-].[K+]", NULL,
	       W("thioacid", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("thioester", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("dimethyl sulfide", "CSC", NULL, W("sulfide", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("dimethyl disulfide", "CSSC", NULL, W("disulfide", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("sulfide", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("DMSO", "CS(C)=O", NULL, W("sulfoxide", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("DMSO, charge-separated", "C[S+]([O-])C", NULL,
	       W("sulfoxide", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("sulfolane", "O=S1(=O)CCCC1", NULL, W("sulfone", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("benzenesulfonamide", "NS(=O)(=O)c1ccccc1", NULL,
	       W("sulfonamide", ANY, ANY, 2, ANY, ANY, NULL, 1), W("amine", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("methyl tosylate", "Cc1ccc(S(=O)(=O)OC)cc1", NULL,
	       W("sulfonate_ester", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("ether", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("methanesulfonic acid", "CS(=O)(=O)O", NULL,
	       W("sulfonic_acid", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("sodium tosylate", "Cc1ccc(S(=O)(=O)[O-])cc1.[Na+]", NULL,
	       W("sulfonate", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("tosyl chloride", "Cc1ccc(S(=O)(=O)Cl)cc1", NULL,
	       W("sulfonyl_chloride", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("c_cl", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("thiourea", "NC(N)=S", NULL, W("thiocarbonyl", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("triphenylphosphine", "c1ccc(P(c2ccccc2)c2ccccc2)cc1", NULL,
	       W("phosphine", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("triphenylphosphine oxide", "O=P(c1ccccc1)(c1ccccc1)c1ccccc1", NULL,
	       W("phosphine_oxide", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("p_aryl", ANY, ANY, ANY, 3, ANY, NULL, 1));
	EXPECT("methyltriphenylphosphonium bromide", "c1ccc([P+](c2ccccc2)(c2ccccc2)C)cc1.[Br-]", NULL,
	       W("p_aryl", ANY, ANY, ANY, 3, ANY, NULL, 1), W("phosphine", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("TBDPS methyl ether", "CC(C)(C)[Si](OC)(c1ccccc1)c1ccccc1", NULL,
	       W("si_aryl", ANY, ANY, ANY, 2, ANY, NULL, 1), W("siloxane", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	/* C#N on S or O, and cyanide: their own groups, the S or O theirs. */
	EXPECT("ethyl thiocyanate", "CCSC#N", NULL, W("thiocyanate", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("nitrile", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("sulfide", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("potassium thiocyanate", "N#C[S-].[K+]", NULL,
	       W("thiocyanate_ion", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("nitrile", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("phenyl cyanate", "N#COc1ccccc1", NULL, W("cyanate_ester", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("ether", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("nitrile", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("potassium cyanide", "[C-]#N.[K+]", NULL, W("cyanide", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("nitrile", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("malononitrile (nitriles)", "N#CCC#N", NULL, W("nitrile", ANY, ANY, ANY, ANY, ANY, NULL, 2),
	       W("cyanide", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	/* Salts from work-ups and drying agents; a hydrogencarbonate has no key. */
	EXPECT("sodium sulfate", "O=S(=O)([O-])[O-].[Na+].[Na+]", NULL,
	       W("sulfate_ion", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("sulfonate", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("potassium carbonate", "O=C([O-])[O-].[K+].[K+]", NULL,
	       W("carbonate_ion", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("carbonate", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("sodium hydrogencarbonate", "OC(=O)[O-].[Na+]", NULL,
	       W("carbonate_ion", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("carbonate", ANY, ANY, ANY, ANY, ANY, NULL, 0),
	       W("carboxylic_acid", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("dimethyl carbonate (still an ester)", "COC(=O)OC", NULL,
	       W("carbonate", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("carbonate_ion", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("potassium phosphate", "[O-]P(=O)([O-])[O-].[K+].[K+].[K+]", NULL,
	       W("phosphate_ion", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("phosphate", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("potassium dihydrogenphosphate", "OP(=O)(O)[O-].[K+]", NULL,
	       W("phosphate_ion", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("phosphate", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("phosphoric acid (no key)", "OP(O)(O)=O", NULL,
	       W("phosphate_ion", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("phosphate", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("sodium borohydride", "[BH4-].[Na+]", NULL, W("b_h", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("PMSF", "O=S(=O)(F)Cc1ccccc1", NULL, W("sulfonyl_fluoride", ANY, ANY, ANY, ANY, ANY, NULL, 1),
	       W("c_f", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	/* N-oxides: the O- is the N-oxide's, the N is no ammonium. */
	EXPECT("N-methylmorpholine N-oxide", "C[N+]1([O-])CCOCC1", NULL,
	       W("n_oxide", ANY, ANY, ANY, 0, ANY, NULL, 1), W("ammonium", ANY, ANY, ANY, ANY, ANY, NULL, 0),
	       W("ether", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("pyridine N-oxide", "[O-][n+]1ccccc1", NULL, W("n_oxide", ANY, ANY, ANY, 1, ANY, NULL, 1),
	       W("pyridine_ring", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("nitromethane (not an N-oxide)", "C[N+](=O)[O-]", NULL,
	       W("n_oxide", ANY, ANY, ANY, ANY, ANY, NULL, 0), W("nitro", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("trimethyl phosphate", "COP(=O)(OC)OC", NULL,
	       W("phosphate", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("ether", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("dimethyl methylphosphonate", "COP(=O)(C)OC", NULL,
	       W("phosphonate", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("diethyl phosphite (H-phosphonate)", "CCO[PH](=O)OCC", NULL,
	       W("p_h", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("triethylsilane", "CC[SiH](CC)CC", NULL, W("si_h", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("hexamethyldisiloxane", "C[Si](C)(C)O[Si](C)(C)C", NULL,
	       W("siloxane", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("si_methyl", ANY, ANY, ANY, ANY, ANY, NULL, 2),
	       W("ether", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("phenylboronic acid", "OB(O)c1ccccc1", NULL,
	       W("boronic_acid", ANY, ANY, ANY, ANY, ANY, NULL, 1));
	EXPECT("phenylboronic acid pinacol ester", "CC1(C)OB(c2ccccc2)OC1(C)C", NULL,
	       W("boronic_ester", ANY, ANY, ANY, ANY, ANY, NULL, 1), W("ether", ANY, ANY, ANY, ANY, ANY, NULL, 0));
	EXPECT("benzotrifluoride", "FC(F)(F)c1ccccc1", NULL, W("c_f", ANY, ANY, ANY, 0, ANY, NULL, 3));
	EXPECT("chlorobenzene", "Clc1ccccc1", NULL, W("c_cl", ANY, ANY, ANY, 1, ANY, NULL, 1));
	EXPECT("1,2-dibromoethane", "BrCCBr", NULL, W("c_br", ANY, ANY, ANY, 0, ANY, NULL, 2));
	EXPECT("iodobenzene", "Ic1ccccc1", NULL, W("c_i", ANY, ANY, ANY, 1, ANY, NULL, 1));
}

static int has_caution(const irr_inventory *inv, const char *word)
{
	for (size_t i = 0; i < irr_inventory_caution_count(inv); i++)
		if (strstr(irr_inventory_caution(inv, i), word))
			return 1;
	return 0;
}

static void cautions(void **state)
{
	(void)state;
	static const struct {
		const char *name, *smiles, *word;
	} cases[] = {
		{"benzyl azide", "[N-]=[N+]=NCc1ccccc1", "azide"},
		{"sodium azide", "[N-]=[N+]=[N-].[Na+]", "azide"},
		{"benzoyl azide", "[N-]=[N+]=NC(=O)c1ccccc1", "acyl or sulfonyl azide"},
		{"ethyl diazoacetate", "[N-]=[N+]=CC(=O)OCC", "diazo"},
		{"benzenediazonium", "N#[N+]c1ccccc1", "diazonium"},
		{"di-tert-butyl peroxide", "CC(C)(C)OOC(C)(C)C", "peroxide"},
		{"2,4,6-trinitrotoluene", "Cc1c([N+](=O)[O-])cc([N+](=O)[O-])cc1[N+](=O)[O-]",
		 "nitro groups"},
		{"ethyl nitrate", "CCO[N+](=O)[O-]", "nitrate ester"},
		{"methyl isocyanate", "CN=C=O", "isocyanate"},
		{"tert-butyl isocyanide", "[C-]#[N+]C(C)(C)C", "isonitrile"},
		{"N-nitrosodimethylamine", "CN(C)N=O", "N-nitroso"},
		{"potassium cyanide", "[C-]#N.[K+]", "cyanide"},
		{"hydrazine", "NN", "hydrazine"},
		{"phosgene", "ClC(Cl)=O", "phosgene"},
		/* IARC group 2A (probable human carcinogen); from memory */
		{"dimethyl sulfate", "COS(=O)(=O)OC", "dialkyl sulfate"},
		/* RDX and the nitramines: high explosives (Urbanski, Chemistry and
		 * Technology of Explosives; from memory) */
		{"N-nitrodimethylamine", "CN(C)[N+](=O)[O-]", "nitramine"},
		/* amyl nitrite: an inhaled vasodilator, highly flammable (from memory) */
		{"isoamyl nitrite", "CC(C)CCON=O", "alkyl nitrite"},
		/* AIBN: a self-reactive substance in transport classes (from memory) */
		{"azobisisobutyronitrile", "CC(C)(C#N)N=NC(C)(C)C#N", "aliphatic azo"},
	};
	for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
		irr_inventory *inv = perceive(cases[i].smiles, NULL);
		if (!has_caution(inv, cases[i].word))
			fail_msg("%s: no caution mentioning \"%s\"", cases[i].name, cases[i].word);
		for (size_t k = 0; k < irr_inventory_caution_count(inv); k++) {
			assert_non_null(strstr(irr_inventory_caution(inv, k), "local safety rules"));
			assert_null(strchr(irr_inventory_caution(inv, k), '\n'));
		}
		irr_inventory_free(inv);
	}
	/* One nitro group, an ester, an amine, a detergent (sodium dodecyl
	 * sulfate, not an alkylating agent), an aromatic azo dye parent
	 * (azobenzene): no caution. */
	static const char *const quiet[] = {"O=[N+]([O-])c1ccccc1", "CCOC(C)=O", "CCN",
	                                    "CC(=O)Nc1ccc(O)cc1",
	                                    "CCCCCCCCCCCCOS(=O)(=O)[O-].[Na+]",
	                                    "c1ccc(N=Nc2ccccc2)cc1"};
	for (size_t i = 0; i < sizeof quiet / sizeof quiet[0]; i++) {
		irr_inventory *inv = perceive(quiet[i], NULL);
		assert_int_equal(irr_inventory_caution_count(inv), 0);
		irr_inventory_free(inv);
	}
}

static void bond_counts(void **state)
{
	(void)state;
	/* Paracetamol C8H9NO2 (RDKit 2022.09 gives the same): 1 O-H, 1 N-H,
	 * 1 C=O, 1 aromatic ring, 4 aromatic C-H, 3 sp3 C-H. */
	irr_inventory *inv = perceive("CC(=O)Nc1ccc(O)cc1", NULL);
	const irr_counts *k = irr_inventory_counts(inv);
	assert_int_equal(k->o_h, 1);
	assert_int_equal(k->n_h, 1);
	assert_int_equal(k->c_o_double, 1);
	assert_int_equal(k->c_n_triple, 0);
	assert_int_equal(k->aromatic_rings, 1);
	assert_int_equal(k->c_h_sp, 0);
	assert_int_equal(k->c_h_sp2, 4);
	assert_int_equal(k->c_h_sp3, 3);
	assert_int_equal(k->ch3, 1);
	assert_int_equal(k->heavy_atoms, 11);
	assert_int_equal(k->components, 1);
	irr_inventory_free(inv);
	/* Oxalic acid dihydrate: components are summed (2 + 2 + 2 O-H). */
	inv = perceive("OC(=O)C(=O)O.O.O", NULL);
	k = irr_inventory_counts(inv);
	assert_int_equal(k->o_h, 6);
	assert_int_equal(k->c_o_double, 2);
	assert_int_equal(k->components, 3);
	irr_inventory_free(inv);
	/* Phenylacetylene: one sp C-H, five aromatic C-H. */
	inv = perceive("C#Cc1ccccc1", NULL);
	k = irr_inventory_counts(inv);
	assert_int_equal(k->c_h_sp, 1);
	assert_int_equal(k->c_h_sp2, 5);
	irr_inventory_free(inv);
	/* Malononitrile: two C#N. */
	inv = perceive("N#CCC#N", NULL);
	assert_int_equal(irr_inventory_counts(inv)->c_n_triple, 2);
	irr_inventory_free(inv);
}

static void merged_entries_carry_all_atoms(void **state)
{
	(void)state;
	irr_molecule *m = NULL;
	irr_inventory *inv = perceive("CCOC(=O)CC(=O)OCC", &m); /* diethyl malonate */
	const irr_group *g = irr_inventory_find(inv, "ester");
	assert_non_null(g);
	assert_int_equal(g->count, 2);
	int carbonyl_o = 0;
	for (size_t i = 0; i < g->natoms; i++) {
		assert_true(g->atoms[i] >= 0 && (size_t)g->atoms[i] < irr_molecule_atom_count(m));
		const irr_atom *a = irr_molecule_atom(m, (size_t)g->atoms[i]);
		if (a->element == 8 && a->degree == 1)
			carbonyl_o++;
	}
	assert_int_equal(carbonyl_o, 2);
	assert_null(irr_inventory_find(inv, "no_such_key"));
	irr_inventory_free(inv);
	irr_molecule_free(m);
	irr_inventory_free(NULL);
}

static void smarts_groups_from_a_user_table(void **state)
{
	(void)state;
	irr_tables *t = NULL;
	irr_error err;
	irr_error_clear(&err);
	const char *files[] = {"tests/data/molecules/smarts-groups.json"};
	if (irr_tables_load(&t, "", files, 1, &err) != IRR_OK)
		fail_msg("%s: %s", err.file, err.message);
	/* N,N'-di-Boc-ethylenediamine: two Boc groups (tert-butoxycarbonyl,
	 * by the name), each matched by the table's SMARTS with its 8 atoms. */
	irr_molecule *m = NULL;
	irr_inventory *inv = NULL;
	assert_int_equal(irr_molecule_from_smiles(&m, "CC(C)(C)OC(=O)NCCNC(=O)OC(C)(C)C", "SMILES",
	                                          &err), IRR_OK);
	assert_int_equal(irr_perceive(&inv, m, t, &err), IRR_OK);
	const irr_group *g = irr_inventory_find(inv, "larkspur_boc");
	assert_non_null(g);
	assert_int_equal(g->count, 2);
	assert_int_equal(g->natoms, 16);
	assert_null(irr_inventory_find(inv, "larkspur_tms_ether"));
	/* The perception keys are still there beside the table group. */
	assert_non_null(irr_inventory_find(inv, "carbamate"));
	irr_inventory_free(inv);
	irr_molecule_free(m);
	/* Methoxytrimethylsilane: one TMS ether, no Boc; matching twice with the
	 * same tables reuses the compiled patterns. */
	assert_int_equal(irr_molecule_from_smiles(&m, "C[Si](C)(C)OC", "SMILES", &err), IRR_OK);
	for (int pass = 0; pass < 2; pass++) {
		assert_int_equal(irr_perceive(&inv, m, t, &err), IRR_OK);
		g = irr_inventory_find(inv, "larkspur_tms_ether");
		assert_non_null(g);
		assert_int_equal(g->count, 1);
		assert_null(irr_inventory_find(inv, "larkspur_boc"));
		irr_inventory_free(inv);
	}
	irr_tables_free(t);

	/* A table whose SMARTS does not compile: an input error naming the
	 * file, the group and the position. */
	files[0] = "tests/data/molecules/smarts-broken.json";
	t = NULL;
	if (irr_tables_load(&t, "", files, 1, &err) == IRR_OK) {
		assert_int_equal(irr_perceive(&inv, m, t, &err), IRR_EINPUT);
		assert_null(inv);
		assert_non_null(strstr(err.file, "smarts-broken.json"));
		assert_non_null(strstr(err.message, "larkspur_broken"));
		assert_non_null(strstr(err.message, "unclosed '[' at position 1"));
		irr_tables_free(t);
	} else {
		/* The loader may check SMARTS itself; then it must name the file. */
		assert_non_null(strstr(err.file, "smarts-broken.json"));
	}
	irr_molecule_free(m);
}

/* Perception and the tables share one key vocabulary (keys.h): every id
 * perception gives for the coverage set (tests/data/molecules/coverage.smi,
 * the RDKit cross-check molecules) must be a key, and every key must occur in
 * that set, so a new key cannot slip past the tables' coverage test. */
static void perceived_ids_are_the_key_vocabulary(void **state)
{
	FILE *f = fopen("tests/data/molecules/coverage.smi", "r");
	char line[4096];
	size_t nkeys = irr_key_count();
	int *seen = calloc(nkeys, sizeof *seen);
	(void)state;
	assert_non_null(f);
	assert_non_null(seen);
	while (fgets(line, sizeof line, f)) {
		irr_inventory *inv;
		char *tab = strchr(line, '\t');
		if (line[0] == '#' || line[0] == '\n')
			continue;
		if (tab)
			*tab = '\0';
		line[strcspn(line, "\r\n")] = '\0';
		inv = perceive(line, NULL);
		for (size_t i = 0; i < irr_inventory_group_count(inv); i++) {
			const char *id = irr_inventory_group(inv, i)->id;
			if (!irr_key_name(id))
				fail_msg("%s: perceived id '%s' is not in keys.h", line, id);
			for (size_t k = 0; k < nkeys; k++)
				if (!strcmp(irr_key_at(k), id))
					seen[k] = 1;
		}
		irr_inventory_free(inv);
	}
	fclose(f);
	for (size_t k = 0; k < nkeys; k++)
		if (!seen[k])
			fail_msg("key '%s' occurs in no molecule of coverage.smi", irr_key_at(k));
	free(seen);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(carbonyl_families),
		cmocka_unit_test(nitrogen_carbonyls_and_amines),
		cmocka_unit_test(hydroxyl_groups),
		cmocka_unit_test(carbon_skeleton),
		cmocka_unit_test(heteroatom_groups),
		cmocka_unit_test(cautions),
		cmocka_unit_test(bond_counts),
		cmocka_unit_test(merged_entries_carry_all_atoms),
		cmocka_unit_test(smarts_groups_from_a_user_table),
		cmocka_unit_test(perceived_ids_are_the_key_vocabulary),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
