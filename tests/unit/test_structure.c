/* test_structure.c: the "read structure" stage (src/structure.c) and the
 * Open Babel shim (src/obshim.cpp).
 * Sources: molecular formulas and average masses from the CRC Handbook of
 * Chemistry and Physics (physical constants of organic compounds; from
 * memory, to 0.01 g/mol); ring counts from the cyclomatic number
 * (bonds - atoms + components, Euler), which the SSSR must match; ring
 * sizes, hybridization and cis/trans from the structures the IUPAC names
 * describe; SMILES syntax from the OpenSMILES specification (Daylight
 * SMILES theory manual): balanced branches, paired ring bonds, bracketed
 * elements outside the organic subset. The Open Babel 3.1.1 behaviours
 * named in the comments were measured on this machine (issue 2). */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <math.h>
#include <string.h>
#include <unistd.h>
#include <fcntl.h>
#include <cmocka.h>

#include "irrecon/structure.h"

static irr_molecule *parse_ok(const char *smiles)
{
	irr_molecule *m = NULL;
	irr_error err;
	irr_error_clear(&err);
	int rc = irr_molecule_from_smiles(&m, smiles, "SMILES", &err);
	if (rc != IRR_OK)
		fail_msg("%s: %s", smiles, err.message);
	return m;
}

static void formula_and_mass(void **state)
{
	(void)state;
	static const struct {
		const char *smiles, *formula;
		double mass;
	} cases[] = {
		{"CCO", "C2H6O", 46.07},                         /* ethanol, CRC */
		{"Cn1cnc2c1c(=O)n(C)c(=O)n2C", "C8H10N4O2", 194.19}, /* caffeine, CRC */
		{"CC(=O)[O-].[Na+]", "C2H3NaO2", 82.03},         /* sodium acetate, CRC */
		{"O", "H2O", 18.02},                             /* water */
		{"ClC(Cl)Cl", "CHCl3", 119.38},                  /* chloroform, CRC */
		{"[H]OC([H])([H])[H]", "CH4O", 32.04},           /* methanol, explicit H */
		{"[2H]C(Cl)(Cl)Cl", "CDCl3", 120.38},             /* chloroform-d, CRC */
		{"[2H]O[2H]", "D2O", 20.03},                      /* heavy water, CRC */
	};
	for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
		irr_molecule *m = parse_ok(cases[i].smiles);
		assert_string_equal(irr_molecule_formula(m), cases[i].formula);
		assert_true(fabs(irr_molecule_mass(m) - cases[i].mass) < 0.02);
		irr_molecule_free(m);
	}
}

static void explicit_hydrogens_fold_into_counts(void **state)
{
	(void)state;
	/* Methanol written with and without hydrogen atoms: two heavy atoms,
	 * O with 1 H and C with 3 H either way. */
	irr_molecule *m = parse_ok("[H]OC([H])([H])[H]");
	assert_int_equal(irr_molecule_atom_count(m), 2);
	assert_int_equal(irr_molecule_atom(m, 0)->element, 8);
	assert_int_equal(irr_molecule_atom(m, 0)->h_count, 1);
	assert_int_equal(irr_molecule_atom(m, 1)->h_count, 3);
	irr_molecule_free(m);
	/* Chloroform-d: the deuterium is no H (C-D absorbs near 2250 cm-1). */
	m = parse_ok("[2H]C(Cl)(Cl)Cl");
	assert_int_equal(irr_molecule_atom(m, 0)->h_count, 0);
	assert_int_equal(irr_molecule_atom(m, 0)->d_count, 1);
	irr_molecule_free(m);
}

static void rings_and_ring_sizes(void **state)
{
	(void)state;
	/* Cubane C8H8: 12 bonds - 8 atoms + 1 = 5 SSSR rings, all 4-membered. */
	irr_molecule *m = parse_ok("C12C3C4C1C5C2C3C45");
	assert_int_equal(irr_molecule_ring_count(m), 5);
	for (size_t i = 0; i < irr_molecule_atom_count(m); i++)
		assert_int_equal(irr_molecule_atom(m, i)->ring_size, 4);
	irr_molecule_free(m);

	/* Norbornane (bicyclo[2.2.1]heptane): two 5-rings; every atom's
	 * smallest ring is 5 (Open Babel's [r6] would also match: it means
	 * "in some ring of 6", which is why ring_size is computed here). */
	m = parse_ok("C1CC2CCC1C2");
	assert_int_equal(irr_molecule_ring_count(m), 2);
	for (size_t i = 0; i < irr_molecule_atom_count(m); i++)
		assert_int_equal(irr_molecule_atom(m, i)->ring_size, 5);
	irr_molecule_free(m);

	/* Spiro[4.5]decane: the spiro atom's smallest ring is the 5-ring. */
	m = parse_ok("C1CCC2(CC1)CCCC2");
	assert_int_equal(irr_molecule_ring_count(m), 2);
	assert_int_equal(irr_molecule_atom(m, 3)->ring_size, 5);
	assert_int_equal(irr_molecule_atom(m, 0)->ring_size, 6);
	irr_molecule_free(m);

	/* Ethyl benzene: chain atoms are not in a ring. */
	m = parse_ok("CCc1ccccc1");
	assert_int_equal(irr_molecule_atom(m, 0)->in_ring, 0);
	assert_int_equal(irr_molecule_atom(m, 0)->ring_size, 0);
	assert_int_equal(irr_molecule_atom(m, 2)->aromatic, 1);
	irr_molecule_free(m);
}

static void hybridization_of_carbon(void **state)
{
	(void)state;
	/* Acrylonitrile CH2=CH-C#N: sp2, sp2, sp. Ethane: sp3. */
	irr_molecule *m = parse_ok("C=CC#N");
	assert_int_equal(irr_molecule_atom(m, 0)->hybridization, 2);
	assert_int_equal(irr_molecule_atom(m, 1)->hybridization, 2);
	assert_int_equal(irr_molecule_atom(m, 2)->hybridization, 1);
	irr_molecule_free(m);
	m = parse_ok("CC");
	assert_int_equal(irr_molecule_atom(m, 0)->hybridization, 3);
	irr_molecule_free(m);
	/* Allene's central carbon is sp; benzene carbons sp2. */
	m = parse_ok("C=C=C");
	assert_int_equal(irr_molecule_atom(m, 1)->hybridization, 1);
	irr_molecule_free(m);
	m = parse_ok("c1ccccc1");
	assert_int_equal(irr_molecule_atom(m, 0)->hybridization, 2);
	irr_molecule_free(m);
}

static void components_and_charges(void **state)
{
	(void)state;
	irr_molecule *m = parse_ok("[Na+].[O-]C(=O)C");
	assert_int_equal(irr_molecule_components(m), 2);
	assert_int_equal(irr_molecule_atom(m, 0)->charge, 1);
	assert_int_equal(irr_molecule_atom(m, 0)->component, 0);
	assert_int_equal(irr_molecule_atom(m, 1)->charge, -1);
	assert_int_equal(irr_molecule_atom(m, 1)->component, 1);
	irr_molecule_free(m);
}

static int double_bond_stereo(const irr_molecule *m)
{
	for (size_t k = 0; k < irr_molecule_bond_count(m); k++)
		if (irr_molecule_bond(m, k)->order == 2)
			return irr_molecule_bond(m, k)->stereo;
	return -1;
}

static void cis_trans_from_smiles(void **state)
{
	(void)state;
	/* OpenSMILES: F/C=C/F is trans (E), F/C=C\F cis (Z). Open Babel's SMARTS
	 * ignores / and \, so this comes from its stereo data. */
	irr_molecule *m = parse_ok("F/C=C/F");
	assert_int_equal(double_bond_stereo(m), 2);
	irr_molecule_free(m);
	m = parse_ok("F/C=C\\F");
	assert_int_equal(double_bond_stereo(m), 1);
	irr_molecule_free(m);
	/* Accepted: nitromethane in the old pentavalent spelling, perchloric
	 * acid, (diacetoxyiodo)benzene (hypervalent I bonded to O), a ring bond
	 * across a dot, ring-bond numbers with a bond symbol. */
	irr_molecule_free(parse_ok("CN(=O)=O"));
	irr_molecule_free(parse_ok("OCl(=O)(=O)=O"));
	irr_molecule_free(parse_ok("CC(=O)OI(OC(C)=O)c1ccccc1"));
	irr_molecule_free(parse_ok("C1.C1"));
	irr_molecule_free(parse_ok("C=1CCCCC1"));
	irr_molecule_free(parse_ok("C%10CCCCC%10"));
	m = parse_ok("FC=CF");
	assert_int_equal(double_bond_stereo(m), 0);
	irr_molecule_free(m);
	/* Diethyl maleate (Z) and fumarate (E). */
	m = parse_ok("CCOC(=O)/C=C\\C(=O)OCC");
	for (size_t k = 0; k < irr_molecule_bond_count(m); k++) {
		const irr_bond *b = irr_molecule_bond(m, k);
		if (b->order == 2 && irr_molecule_atom(m, b->a)->element == 6 &&
		    irr_molecule_atom(m, b->b)->element == 6)
			assert_int_equal(b->stereo, 1);
	}
	irr_molecule_free(m);
}

/* Runs the parser with stdout and stderr redirected to a file and returns
 * how many bytes were written there: the library must never print. */
static long bytes_printed_while(const char *smiles, int *rc, irr_error *err)
{
	char path[] = "/tmp/irrecon-structure-XXXXXX";
	int fd = mkstemp(path);
	assert_true(fd >= 0);
	fflush(stdout);
	fflush(stderr);
	int save_out = dup(1), save_err = dup(2);
	dup2(fd, 1);
	dup2(fd, 2);
	irr_molecule *m = NULL;
	*rc = irr_molecule_from_smiles(&m, smiles, "SMILES", err);
	irr_molecule_free(m);
	fflush(stdout);
	fflush(stderr);
	dup2(save_out, 1);
	dup2(save_err, 2);
	close(save_out);
	close(save_err);
	long size = lseek(fd, 0, SEEK_END);
	close(fd);
	unlink(path);
	return size;
}

static void bad_smiles_are_input_errors(void **state)
{
	(void)state;
	static const struct {
		const char *smiles, *reason;
	} cases[] = {
		{"", "empty"},
		{"   ", "empty"},
		{"CC(C", "unbalanced '('"},   /* Open Babel 3.1.1 accepts this silently */
		{"CC)C", "unbalanced ')'"},
		{"C1CC", "unmatched ring"},   /* Open Babel's own reason */
		{"[Xx]", "unknown element 'Xx'"},
		{"CCXy", "'X'"},
		{"C[CH2", "unclosed '['"},
		{"CC]", "unbalanced ']'"},
		{"CC O", "blank"},
		{"c1cccc1", "kekulize"},      /* Open Babel only warns about this one */
		{"c1ccccc1c", "kekulize"},
		/* Open Babel 3.1.1 reads all of these without a word. */
		{"C=", "ends with '='"},
		{"OC(=)O", "'=' at position 4 has no atom after it"},
		{"CN()C", "empty branch"},
		{"CC.", "ends with '.'"},
		{"C..C", "'.' at position 3"},
		{"=CC", "does not follow an atom"},
		{"C(C)1CC1", "ring bond '1' at position 5"},
		{"CoC", "aromatic (lower case) but is not in a ring"},
		{"[C+-+-]", "charge given more than once"},
		{"[C@@@@H](F)(Cl)Br", "stereo"},
		{"FCCFC", "valence 2, more than 1"},       /* divalent fluorine */
		{"C(C)(C)(C)(C)C", "valence 5, more than 4"}, /* pentavalent carbon */
		{"CN(C)=O", "valence 5 (with 1 implied H)"},
		{"CClC", "a halogen takes one bond"},
		{"CC[Cl-]", "halide ion with a bond"},
		{"O=C1C1", "joins two atoms already bonded"},
		{"C11", "joins an atom to itself"},
		{"C1CC(=1)C", "ring bond '1' at position 7"},
		/* A hydrogen in a ring or chain (found by fuzzing): valence error. */
		{"c1c[2H]cc2[nH]ccc2c1", "hydrogen atom 3 has 2 bonds"},
		{"C[H]C", "has 2 bonds"},
	};
	for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
		irr_error err;
		int rc;
		irr_error_clear(&err);
		long printed = bytes_printed_while(cases[i].smiles, &rc, &err);
		if (rc != IRR_EINPUT || !strstr(err.message, cases[i].reason))
			fail_msg("\"%s\": rc %d, message \"%s\", wanted \"%s\"", cases[i].smiles, rc,
			         err.message, cases[i].reason);
		assert_string_equal(err.file, "SMILES");
		assert_null(strchr(err.message, '\n'));
		assert_int_equal(printed, 0);
	}
}

static void large_molecules_and_the_limit(void **state)
{
	(void)state;
	size_t n = 2000;
	char *s = malloc(4 * n + 8);
	assert_non_null(s);
	/* n-C2000H4002: 2,000 atoms in a chain. */
	memset(s, 'C', n);
	s[n] = '\0';
	irr_molecule *m = parse_ok(s);
	assert_int_equal(irr_molecule_atom_count(m), 2000);
	assert_string_equal(irr_molecule_formula(m), "C2000H4002");
	irr_molecule_free(m);
	/* The same with 1,999 nested branches C(C(C(...))): depth grows with
	 * the input, which must not grow the stack of our own code. */
	size_t k = 0;
	for (size_t i = 0; i < n - 1; i++) {
		s[k++] = 'C';
		s[k++] = '(';
	}
	s[k++] = 'C';
	for (size_t i = 0; i < n - 1; i++)
		s[k++] = ')';
	s[k] = '\0';
	m = parse_ok(s);
	assert_int_equal(irr_molecule_atom_count(m), 2000);
	irr_molecule_free(m);
	free(s);

	/* One atom over the limit: IRR_ELIMIT naming the limit. */
	n = IRR_MAX_HEAVY_ATOMS + 1;
	s = malloc(n + 1);
	assert_non_null(s);
	memset(s, 'C', n);
	s[n] = '\0';
	irr_error err;
	irr_error_clear(&err);
	m = NULL;
	assert_int_equal(irr_molecule_from_smiles(&m, s, "big.smi", &err), IRR_ELIMIT);
	assert_null(m);
	assert_non_null(strstr(err.message, "5000"));
	assert_string_equal(err.file, "big.smi");
	free(s);
}

/* A ladder of n carbons, each bonded to the next two (ring-bond digits
 * reused 1-3): n - 2 fused three-membered rings in one ring system. */
static char *ring_ladder(int n)
{
	char *s = malloc((size_t)n * 3 + 1), *p = s;
	assert_non_null(s);
	for (int i = 0; i < n; i++) {
		*p++ = 'C';
		if (i >= 2)
			*p++ = (char)('1' + (i - 2) % 3);
		if (i + 2 < n)
			*p++ = (char)('1' + i % 3);
	}
	*p = '\0';
	return s;
}

static void ring_system_limit(void **state)
{
	(void)state;
	/* 98 fused rings: accepted, and the SSSR has all of them. */
	char *s = ring_ladder(100);
	irr_molecule *m = parse_ok(s);
	assert_int_equal(irr_molecule_ring_count(m), 98);
	irr_molecule_free(m);
	free(s);
	/* 122 fused rings: over IRR_MAX_RING_SYSTEM, a clear limit error. */
	s = ring_ladder(124);
	irr_error err;
	irr_error_clear(&err);
	m = NULL;
	assert_int_equal(irr_molecule_from_smiles(&m, s, "SMILES", &err), IRR_ELIMIT);
	assert_null(m);
	assert_non_null(strstr(err.message, "122 fused or bridged rings"));
	free(s);
	/* 400 separate benzene rings (polyphenylene) are not one system. */
	size_t n = 400;
	s = malloc(n * 10 + 2);
	assert_non_null(s);
	s[0] = '\0';
	for (size_t i = 0; i < n; i++)
		strcat(s, "c1ccc(cc1)");
	strcat(s, "C");
	m = parse_ok(s);
	assert_int_equal(irr_molecule_ring_count(m), 400);
	irr_molecule_free(m);
	free(s);
}

static void smarts_matching(void **state)
{
	(void)state;
	irr_smarts *p = NULL;
	irr_error err;
	irr_error_clear(&err);
	/* Caffeine has two C=O; its carbonyl carbons are aromatic in Open
	 * Babel's model, so only the element-number form finds them. */
	assert_int_equal(irr_smarts_compile(&p, "[#6X3]=[OX1]", &err), IRR_OK);
	irr_molecule *m = parse_ok("Cn1cnc2c1c(=O)n(C)c(=O)n2C");
	int *atoms = NULL, width = 0;
	assert_int_equal(irr_smarts_match(p, m, &atoms, &width), 2);
	assert_int_equal(width, 2);
	assert_int_equal(irr_molecule_atom(m, atoms[0])->element, 6);
	assert_int_equal(irr_molecule_atom(m, atoms[1])->element, 8);
	free(atoms);
	irr_molecule_free(m);
	/* 2-pyridone: one C=O. */
	m = parse_ok("O=c1cccc[nH]1");
	assert_int_equal(irr_smarts_match(p, m, NULL, NULL), 1);
	irr_molecule_free(m);
	irr_smarts_free(p);

	/* H-count primitives see the same molecule however H is written. */
	assert_int_equal(irr_smarts_compile(&p, "[OX2H1][CX4]", &err), IRR_OK);
	m = parse_ok("[H]OCC");
	assert_int_equal(irr_smarts_match(p, m, NULL, NULL), 1);
	irr_molecule_free(m);
	m = parse_ok("OCC");
	assert_int_equal(irr_smarts_match(p, m, NULL, NULL), 1);
	irr_molecule_free(m);
	/* Glycerol: three alcohol O-H. */
	m = parse_ok("OCC(O)CO");
	assert_int_equal(irr_smarts_match(p, m, NULL, NULL), 3);
	irr_molecule_free(m);
	irr_smarts_free(p);

	/* A broken SMARTS is an input error with a reason, printed nowhere. */
	p = NULL;
	assert_int_equal(irr_smarts_compile(&p, "[C", &err), IRR_EINPUT);
	assert_null(p);
	assert_non_null(strstr(err.message, "unclosed '[' at position 1"));
	assert_int_equal(irr_smarts_compile(&p, "CC)", &err), IRR_EINPUT);
	assert_non_null(strstr(err.message, "unbalanced ')' at position 3"));
	/* Open Babel's own verdict, with the position of its caret; printed
	 * nowhere (stdout and stderr go to a file that must stay empty). */
	{
		char path[] = "/tmp/irrecon-smarts-XXXXXX";
		int fd = mkstemp(path);
		assert_true(fd >= 0);
		fflush(stdout);
		fflush(stderr);
		int so = dup(1), se = dup(2);
		dup2(fd, 1);
		dup2(fd, 2);
		int rc = irr_smarts_compile(&p, "[C;Q]", &err);
		fflush(stdout);
		fflush(stderr);
		dup2(so, 1);
		dup2(se, 2);
		close(so);
		close(se);
		long size = lseek(fd, 0, SEEK_END);
		close(fd);
		unlink(path);
		assert_int_equal(rc, IRR_EINPUT);
		assert_int_equal(size, 0);
	}
	assert_null(p);
	assert_non_null(strstr(err.message, "position 4"));
	irr_smarts_free(NULL);
	irr_molecule_free(NULL);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(formula_and_mass),
		cmocka_unit_test(explicit_hydrogens_fold_into_counts),
		cmocka_unit_test(rings_and_ring_sizes),
		cmocka_unit_test(hybridization_of_carbon),
		cmocka_unit_test(components_and_charges),
		cmocka_unit_test(cis_trans_from_smiles),
		cmocka_unit_test(bad_smiles_are_input_errors),
		cmocka_unit_test(large_molecules_and_the_limit),
		cmocka_unit_test(ring_system_limit),
		cmocka_unit_test(smarts_matching),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
