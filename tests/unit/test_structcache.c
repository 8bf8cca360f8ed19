/* test_structcache.c: the structure cache (src/structcache.c). What is
 * checked is the cache's contract (include/irrecon/structcache.h): a check
 * gives byte-identical JSON with and without it, each distinct SMILES is
 * read and perceived once, a SMILES that fails is never kept and fails the
 * same way each time, a full cache starts afresh, and structures borrowed
 * by a live check outlive the cache. The spectrum is the Larkspur demo file
 * examples/oxidation-leftover-alcohol/LPC-2231-04.jdx; no band value is
 * asserted here (those are in test_reconcile.c against the shared measured
 * spectra). Sources of what is asserted: the contract in structcache.h;
 * the OpenSMILES specification (an unclosed ring bond is an error); the
 * free O-H window of an alcohol in the gas phase, group-tables/oxygen.json
 * after Silverstein, Webster & Kiemle, 7th ed., ch. 2 (from memory). */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <cmocka.h>

#include "irrecon.h"

#define SPECTRUM "examples/oxidation-leftover-alcohol/LPC-2231-04.jdx"
#define PRODUCT "CC(C)(C)C1CCC(=O)CC1"
#define START "CC(C)(C)C1CCC(O)CC1"

static irr_tables *tables;

static int setup(void **state)
{
	irr_error err;
	(void)state;
	return irr_tables_load(&tables, NULL, NULL, 0, &err) == IRR_OK ? 0 : -1;
}

static int teardown(void **state)
{
	(void)state;
	irr_tables_free(tables);
	return 0;
}

/* The JSON of one check of the demo sample (caller frees), in a phase. */
static char *check_json_as(irr_structure_cache *sc, irr_phase phase)
{
	irr_check *c = NULL;
	irr_spectrum *s = NULL;
	irr_check_options o;
	irr_error err;
	char *json = NULL;
	assert_int_equal(irr_check_create(&c, tables, &err), IRR_OK);
	irr_check_options_init(&o);
	o.phase = phase;
	irr_check_set_options(c, &o);
	irr_check_use_structure_cache(c, sc);
	assert_int_equal(irr_check_set_structure(c, PRODUCT, &err), IRR_OK);
	assert_int_equal(irr_check_add_other(c, IRR_OTHER_STARTING_MATERIAL, START, &err), IRR_OK);
	assert_int_equal(irr_check_add_other(c, IRR_OTHER_SOLVENT, "ethyl acetate", &err), IRR_OK);
	assert_int_equal(irr_spectrum_read_file(&s, SPECTRUM, NULL, &err), IRR_OK);
	assert_int_equal(irr_check_set_spectrum(c, s, &err), IRR_OK);
	assert_int_equal(irr_check_run(c, &err), IRR_OK);
	assert_int_equal(irr_report_json(&json, c), IRR_OK);
	irr_check_free(c);
	return json;
}

static char *check_json(irr_structure_cache *sc)
{
	return check_json_as(sc, IRR_PHASE_CONDENSED);
}

static void same_result_with_and_without(void **state)
{
	irr_structure_cache *sc = NULL;
	irr_error err;
	char *plain, *first, *second;
	(void)state;
	assert_int_equal(irr_structure_cache_create(&sc, tables, 0, &err), IRR_OK);
	plain = check_json(NULL);
	first = check_json(sc);
	/* product, starting material, the library's ethyl acetate */
	assert_int_equal(irr_structure_cache_count(sc), 3);
	assert_int_equal(irr_structure_cache_hits(sc), 0);
	second = check_json(sc);
	assert_int_equal(irr_structure_cache_count(sc), 3);
	assert_int_equal(irr_structure_cache_hits(sc), 3);
	assert_string_equal(plain, first);
	assert_string_equal(plain, second);
	free(plain);
	free(first);
	free(second);
	/* The cached entries hold bands predicted for the condensed phase; a
	 * check in the gas phase must predict its own: the starting alcohol's
	 * O-H marker is then the free stretch at 3590-3650 cm-1, not the
	 * H-bonded one at 3200-3550 (group-tables/oxygen.json, after
	 * Silverstein, Webster & Kiemle, 7th ed., ch. 2). */
	plain = check_json_as(NULL, IRR_PHASE_GAS);
	first = check_json_as(sc, IRR_PHASE_GAS);
	assert_non_null(strstr(plain, "O-H stretch (free)"));
	assert_string_equal(plain, first);
	free(plain);
	free(first);
	irr_structure_cache_free(sc);
}

static void failures_are_not_kept(void **state)
{
	irr_structure_cache *sc = NULL;
	irr_check *c = NULL;
	irr_error e1, e2;
	(void)state;
	assert_int_equal(irr_structure_cache_create(&sc, tables, 0, &e1), IRR_OK);
	assert_int_equal(irr_check_create(&c, tables, &e1), IRR_OK);
	irr_check_use_structure_cache(c, sc);
	/* an unclosed ring bond: OpenSMILES specification 3.4 (ring closures
	 * come in pairs) */
	assert_int_not_equal(irr_check_set_structure(c, "CC1CC", &e1), IRR_OK);
	assert_int_not_equal(irr_check_set_structure(c, "CC1CC", &e2), IRR_OK);
	assert_string_equal(e1.message, e2.message);
	assert_int_equal(irr_structure_cache_count(sc), 0);
	assert_int_not_equal(irr_check_add_other(c, IRR_OTHER_REAGENT, "CC1CC", &e1), IRR_OK);
	assert_non_null(strstr(e1.message, "neither a name in the solvent library nor valid SMILES"));
	assert_int_equal(irr_structure_cache_count(sc), 0);
	irr_check_free(c);
	irr_structure_cache_free(sc);
}

static void full_cache_starts_afresh_and_borrowers_keep_theirs(void **state)
{
	static const char *const smiles[] = {"CCO", "CC(C)O", "CC(=O)C", "c1ccccc1", "CC#N"};
	irr_structure_cache *sc = NULL;
	irr_check *keep = NULL;
	irr_error err;
	(void)state;
	assert_int_equal(irr_structure_cache_create(&sc, tables, 2, &err), IRR_OK);
	assert_int_equal(irr_check_create(&keep, tables, &err), IRR_OK);
	irr_check_use_structure_cache(keep, sc);
	assert_int_equal(irr_check_set_structure(keep, smiles[0], &err), IRR_OK);
	for (size_t i = 1; i < 5; i++) {
		irr_check *c = NULL;
		assert_int_equal(irr_check_create(&c, tables, &err), IRR_OK);
		irr_check_use_structure_cache(c, sc);
		assert_int_equal(irr_check_set_structure(c, smiles[i], &err), IRR_OK);
		irr_check_free(c);
		assert_true(irr_structure_cache_count(sc) <= 2);
	}
	irr_structure_cache_free(sc);
	/* ethanol, the first, was dropped from the cache twice over and the
	 * cache is gone: the check still has its structure (C2H6O) */
	assert_string_equal(irr_molecule_formula(irr_check_molecule(keep)), "C2H6O");
	irr_check_free(keep);
}

/* A cache perceives with its own tables; a check with others (loaded
 * separately, perhaps with an extra table) must not take its structures. */
static void other_tables_do_not_use_it(void **state)
{
	irr_structure_cache *sc = NULL;
	irr_tables *other = NULL;
	irr_check *c = NULL;
	irr_error err;
	(void)state;
	assert_int_equal(irr_tables_load(&other, NULL, NULL, 0, &err), IRR_OK);
	assert_int_equal(irr_structure_cache_create(&sc, tables, 0, &err), IRR_OK);
	assert_int_equal(irr_check_create(&c, other, &err), IRR_OK);
	irr_check_use_structure_cache(c, sc);
	assert_int_equal(irr_check_set_structure(c, PRODUCT, &err), IRR_OK);
	assert_int_equal(irr_structure_cache_count(sc), 0);
	irr_check_free(c);
	irr_structure_cache_free(sc);
	irr_tables_free(other);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(same_result_with_and_without),
		cmocka_unit_test(failures_are_not_kept),
		cmocka_unit_test(full_cache_starts_afresh_and_borrowers_keep_theirs),
		cmocka_unit_test(other_tables_do_not_use_it),
	};
	return cmocka_run_group_tests(tests, setup, teardown);
}
