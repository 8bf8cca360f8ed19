/* test_predict.c: the "predict bands" stage (src/predict.c) with the
 * built-in tables.
 * Sources: handbook band positions of 88 compounds in
 * tests/data/predict/handbook-bands.tsv, each row naming its source
 * (Silverstein, Webster & Kiemle, 7th ed., ch. 2; Socrates, 3rd ed.; from
 * memory); the context shifts checked below (ring strain raises a ketone
 * C=O, conjugation lowers it by about 20-30 cm-1, free O-H near 3600-3650 in
 * dilute solution, one N-H band for secondary and two for primary amines)
 * are from Silverstein, Webster & Kiemle, 7th ed., ch. 2 (from memory).
 * Run from the repository root (tests/run-all does). */
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
#include "irrecon/predict.h"
#include "irrecon/structure.h"
#include "irrecon/tables.h"

static irr_tables *tables;

static int setup(void **state)
{
	irr_error err;
	(void)state;
	if (irr_tables_load(&tables, "group-tables", NULL, 0, &err) != IRR_OK) {
		fprintf(stderr, "%s:%ld: %s\n", err.file, err.line, err.message);
		return -1;
	}
	return 0;
}

static int teardown(void **state)
{
	(void)state;
	irr_tables_free(tables);
	return 0;
}

static irr_group group(const char *id, int conj, int ring, int n_h, int aryl, const char *pattern)
{
	irr_group g;
	memset(&g, 0, sizeof g);
	snprintf(g.id, sizeof g.id, "%s", id);
	g.attrs.conjugated = conj;
	g.attrs.ring_size = ring;
	g.attrs.n_h = n_h;
	g.attrs.aryl = aryl;
	snprintf(g.attrs.pattern, sizeof g.attrs.pattern, "%s", pattern ? pattern : "");
	g.count = 1;
	return g;
}

static irr_prediction *predict1(const irr_group *g, size_t n, irr_phase phase, irr_sampling sampling)
{
	irr_prediction *p = NULL;
	irr_predict_options o;
	irr_error err;
	irr_predict_options_init(&o);
	o.phase = phase;
	o.sampling = sampling;
	assert_int_equal(irr_predict_groups(&p, g, n, tables, &o, &err), IRR_OK);
	assert_non_null(p);
	return p;
}

/* The band of `group_id` whose label contains `label`, or NULL. */
static const irr_band *find(const irr_prediction *p, const char *group_id, const char *label)
{
	for (size_t i = 0; i < irr_prediction_count(p); i++) {
		const irr_band *b = irr_prediction_band(p, i);
		if (!strcmp(b->group_id, group_id) && strstr(b->label, label))
			return b;
	}
	return NULL;
}

static size_t count_label(const irr_prediction *p, const char *label)
{
	size_t n = 0;
	for (size_t i = 0; i < irr_prediction_count(p); i++)
		if (strstr(irr_prediction_band(p, i)->label, label))
			n++;
	return n;
}

/* Ketone C=O by ring size: Silverstein 7th ed. ch. 2 (from memory):
 * cyclobutanone 1780, cyclopentanone 1745, cyclohexanone 1715; each
 * typical lies outside the windows of the neighbouring ring sizes, so ring
 * size is really told apart. */
static void ketone_ring_strain_and_conjugation(void **state)
{
	static const struct { int ring; double value; } ks[] = {
		{4, 1780}, {5, 1745}, {6, 1715}
	};
	(void)state;
	for (size_t i = 0; i < 3; i++) {
		irr_group g = group("ketone", 0, ks[i].ring, 0, 0, NULL);
		irr_prediction *p = predict1(&g, 1, IRR_PHASE_CONDENSED, IRR_SAMPLING_ATR);
		const irr_band *b = find(p, "ketone_ring", "C=O stretch");
		assert_non_null(b);
		assert_null(find(p, "ketone_open", "C=O stretch")); /* only one C=O band */
		assert_true(b->low <= ks[i].value && ks[i].value <= b->high);
		for (size_t j = 0; j < 3; j++)
			if (j != i)
				assert_false(b->low <= ks[j].value && ks[j].value <= b->high);
		if (ks[i].ring != 6) /* the strain rule's note is carried */
			assert_non_null(b->note && strstr(b->note, "ring strain") ? b->note : NULL);
		irr_prediction_free(p);
	}
	/* Open-chain: conjugation moves acetone's 1715 out, acetophenone's
	 * 1686 in (Silverstein 7th ed., from memory). */
	{
		irr_group g = group("ketone", 1, 0, 0, 0, NULL);
		irr_prediction *p = predict1(&g, 1, IRR_PHASE_CONDENSED, IRR_SAMPLING_ATR);
		const irr_band *b = find(p, "ketone_open", "C=O stretch");
		assert_non_null(b);
		assert_false(b->low <= 1715 && 1715 <= b->high);
		assert_true(b->low <= 1686 && 1686 <= b->high);
		/* overtone follows the C=O: about twice its position, marked */
		b = find(p, "ketone_open", "C=O overtone");
		assert_non_null(b);
		assert_true(b->overtone);
		assert_true(b->low <= 2 * 1686 - 20 && 2 * 1686 - 20 <= b->high);
		irr_prediction_free(p);
	}
}

/* Primary amines show two N-H stretches, secondary one, tertiary none
 * (Silverstein 7th ed., ch. 2; from memory). */
static void amine_nh_bands_follow_n_h(void **state)
{
	(void)state;
	for (int nh = 0; nh <= 2; nh++) {
		irr_group g = group("amine", 0, 0, nh, 0, NULL);
		irr_prediction *p = predict1(&g, 1, IRR_PHASE_CONDENSED, IRR_SAMPLING_TRANSMISSION);
		assert_int_equal(count_label(p, "N-H stretch"), (size_t)nh);
		assert_int_equal(count_label(p, "NH2 scissor"), nh == 2 ? 1 : 0);
		irr_prediction_free(p);
	}
	/* Aryl amines absorb higher: aniline 3433 (Silverstein, from memory)
	 * falls in the aryl window only. */
	{
		irr_group ga = group("amine", 0, 0, 2, 1, NULL), gl = group("amine", 0, 0, 2, 0, NULL);
		irr_prediction *pa = predict1(&ga, 1, IRR_PHASE_CONDENSED, IRR_SAMPLING_ATR);
		irr_prediction *pl = predict1(&gl, 1, IRR_PHASE_CONDENSED, IRR_SAMPLING_ATR);
		const irr_band *a = find(pa, "amine", "asymmetric"), *l = find(pl, "amine", "asymmetric");
		assert_true(a->low <= 3433 && 3433 <= a->high);
		assert_false(l->low <= 3433 && 3433 <= l->high);
		/* ATR weakens bands above 3000 (common practice) */
		assert_int_equal(a->intensity, IRR_INT_WEAK);
		irr_prediction_free(pa);
		irr_prediction_free(pl);
	}
}

/* Free O-H only in dilute solution or gas; H-bonded O-H not in the gas
 * (Silverstein: free O-H 3650-3584, bonded 3550-3200; from memory). */
static void alcohol_oh_by_phase(void **state)
{
	irr_group g = group("alcohol_primary", 0, 0, 0, 0, NULL);
	irr_prediction *p;
	(void)state;
	p = predict1(&g, 1, IRR_PHASE_CONDENSED, IRR_SAMPLING_ATR);
	assert_non_null(find(p, "alcohol_primary", "H-bonded"));
	assert_null(find(p, "alcohol_primary", "(free)"));
	irr_prediction_free(p);
	p = predict1(&g, 1, IRR_PHASE_SOLUTION, IRR_SAMPLING_TRANSMISSION);
	assert_non_null(find(p, "alcohol_primary", "H-bonded"));
	assert_non_null(find(p, "alcohol_primary", "(free)"));
	irr_prediction_free(p);
	p = predict1(&g, 1, IRR_PHASE_GAS, IRR_SAMPLING_TRANSMISSION);
	assert_null(find(p, "alcohol_primary", "H-bonded"));
	{
		const irr_band *b = find(p, "alcohol_primary", "(free)");
		assert_non_null(b);
		assert_true(b->low <= 3640 && 3640 <= b->high);
	}
	irr_prediction_free(p);
}

/* Out-of-plane bands by substitution pattern (Silverstein 7th ed.; from
 * memory): para 860-800, one band; mono two bands 770-730 and 710-690. */
static void benzene_oop_by_pattern(void **state)
{
	irr_group para = group("benzene_ring", 0, 0, 0, 0, "para");
	irr_group mono = group("benzene_ring", 0, 0, 0, 0, "mono");
	irr_prediction *p;
	(void)state;
	p = predict1(&para, 1, IRR_PHASE_CONDENSED, IRR_SAMPLING_ATR);
	assert_int_equal(count_label(p, "out-of-plane"), 1);
	assert_non_null(find(p, "benzene_ring", "(para)"));
	assert_null(find(p, "benzene_ring", "ring pucker"));
	irr_prediction_free(p);
	p = predict1(&mono, 1, IRR_PHASE_CONDENSED, IRR_SAMPLING_ATR);
	assert_int_equal(count_label(p, "out-of-plane"), 1);
	assert_non_null(find(p, "benzene_ring", "ring pucker"));
	irr_prediction_free(p);
}

static void bands_sorted_and_indexed(void **state)
{
	irr_group g[3] = {group("methyl", 0, 0, 0, 0, NULL), group("nitrile", 1, 0, 0, 0, NULL),
	                  group("benzene_ring", 0, 0, 0, 0, "mono")};
	irr_prediction *p = predict1(g, 3, IRR_PHASE_CONDENSED, IRR_SAMPLING_ATR);
	const irr_band *cn;
	(void)state;
	assert_true(irr_prediction_count(p) > 8);
	for (size_t i = 1; i < irr_prediction_count(p); i++)
		assert_true(irr_prediction_band(p, i - 1)->typical >= irr_prediction_band(p, i)->typical);
	cn = find(p, "nitrile", "C#N");
	assert_non_null(cn);
	assert_int_equal(cn->group_index, 1);
	assert_string_equal(cn->group_name, "nitrile");
	/* benzonitrile 2229 (Silverstein, from memory) */
	assert_true(cn->low <= 2229 && 2229 <= cn->high);
	assert_null(irr_prediction_band(p, irr_prediction_count(p)));
	irr_prediction_free(p);
	irr_prediction_free(NULL);
	/* An unknown id predicts nothing rather than failing. */
	{
		irr_group u = group("no_such_group", 0, 0, 0, 0, NULL);
		p = predict1(&u, 1, IRR_PHASE_CONDENSED, IRR_SAMPLING_ATR);
		assert_int_equal(irr_prediction_count(p), 0);
		irr_prediction_free(p);
	}
}

static void regions_and_names(void **state)
{
	(void)state;
	assert_int_equal(irr_region_of(3300), 0);
	assert_int_equal(irr_region_of(2960), 1);
	assert_int_equal(irr_region_of(2250), 2);
	assert_int_equal(irr_region_of(1715), 3);
	assert_int_equal(irr_region_of(1500), 3);
	assert_int_equal(irr_region_of(1499), 4);
	assert_string_equal(irr_key_name("alcohol_primary"), "primary alcohol");
	assert_null(irr_key_name("nonsense"));
}

/* Each handbook row: SMILES -> perception -> prediction; the value lies in
 * the window of the named band. */
static void handbook_values_fall_in_predicted_windows(void **state)
{
	FILE *f = fopen("tests/data/predict/handbook-bands.tsv", "r");
	char line[1024];
	int lineno = 0, checked = 0, failed = 0;
	(void)state;
	assert_non_null(f);
	while (fgets(line, sizeof line, f)) {
		char *fld[8] = {0};
		int n = 0;
		lineno++;
		if (line[0] == '#' || line[0] == '\n')
			continue;
		line[strcspn(line, "\r\n")] = '\0';
		for (char *s = line, *tab; n < 8; s = tab + 1) {
			fld[n++] = s;
			if (!(tab = strchr(s, '\t')))
				break;
			*tab = '\0';
		}
		assert_true(n >= 6);
		const char *name = fld[0], *smiles = fld[1], *gid = fld[2], *label = fld[3];
		double value = atof(fld[4]);
		assert_true(strlen(fld[5]) > 10); /* a named source */
		irr_molecule *m = NULL;
		irr_inventory *inv = NULL;
		irr_prediction *p = NULL;
		irr_predict_options o;
		irr_error err;
		irr_predict_options_init(&o);
		if (n >= 7)
			assert_int_equal(irr_phase_parse(fld[6], &o.phase), IRR_OK);
		if (irr_molecule_from_smiles(&m, smiles, "SMILES", &err) != IRR_OK ||
		    irr_perceive(&inv, m, tables, &err) != IRR_OK ||
		    irr_predict(&p, inv, tables, &o, &err) != IRR_OK) {
			fprintf(stderr, "line %d %s: %s\n", lineno, name, err.message);
			failed++;
		} else {
			int ok = 0;
			for (size_t i = 0; i < irr_prediction_count(p); i++) {
				const irr_band *b = irr_prediction_band(p, i);
				if (!strcmp(b->group_id, gid) && strstr(b->label, label) &&
				    b->low <= value && value <= b->high)
					ok = 1;
			}
			if (!ok) {
				fprintf(stderr, "line %d %s: %g not in any '%s' window of %s\n",
				        lineno, name, value, label, gid);
				failed++;
			}
			checked++;
		}
		irr_prediction_free(p);
		irr_inventory_free(inv);
		irr_molecule_free(m);
	}
	fclose(f);
	assert_int_equal(failed, 0);
	assert_true(checked >= 100);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(ketone_ring_strain_and_conjugation),
		cmocka_unit_test(amine_nh_bands_follow_n_h),
		cmocka_unit_test(alcohol_oh_by_phase),
		cmocka_unit_test(benzene_oop_by_pattern),
		cmocka_unit_test(bands_sorted_and_indexed),
		cmocka_unit_test(regions_and_names),
		cmocka_unit_test(handbook_values_fall_in_predicted_windows),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
