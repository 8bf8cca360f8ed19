/* test_tables.c: the group-table loader (src/tables.c) and SHA-256
 * (src/sha256.c).
 * Sources: SHA-256 test vectors from FIPS 180-2, Appendix B ("abc", the
 * 448-bit two-block message, one million 'a'); the empty-message digest is
 * the well-known e3b0c442... value (also printed by coreutils sha256sum).
 * Table contents are checked against the perception keys listed in
 * include/irrecon/perceive.h and against handbook windows: Silverstein,
 * Webster & Kiemle, 7th ed., ch. 2 (from memory). Broken tables live in
 * tests/data/tables/; the expected line is the line of the fault in that
 * file. Run from the repository root (tests/run-all does). */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <cmocka.h>

#include "irrecon/sha256.h"
#include "irrecon/keys.h"
#include "irrecon/tables.h"

static void sha256_fips_vectors(void **state)
{
	char hex[65];
	(void)state;
	/* FIPS 180-2, Appendix B.1 */
	irr_sha256_data_hex("abc", 3, hex);
	assert_string_equal(hex, "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad");
	/* FIPS 180-2, Appendix B.2 (two blocks: padding spills over) */
	{
		const char *m = "abcdbcdecdefdefgefghfghighijhijkijkljklmklmnlmnomnopnopq";
		irr_sha256_data_hex(m, strlen(m), hex);
		assert_string_equal(hex, "248d6a61d20638b8e5c026930c3e6039a33ce45964ff2167f6ecedd419db06c1");
	}
	/* FIPS 180-2, Appendix B.3, fed in uneven pieces to exercise buffering */
	{
		irr_sha256 s;
		unsigned char dg[32];
		char a[997];
		size_t left = 1000000;
		memset(a, 'a', sizeof a);
		irr_sha256_init(&s);
		while (left) {
			size_t n = left < sizeof a ? left : sizeof a;
			irr_sha256_update(&s, a, n);
			left -= n;
		}
		irr_sha256_final(&s, dg);
		irr_sha256_hex(dg, hex);
		assert_string_equal(hex, "cdc76e5c9914fb9281a1c7e284d73e67f1809a48a497200e046d39ccc7112cd0");
	}
	irr_sha256_data_hex("", 0, hex);
	assert_string_equal(hex, "e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855");
}

static irr_tables *load_builtin(void)
{
	irr_tables *t = NULL;
	irr_error err;
	irr_error_clear(&err);
	int rc = irr_tables_load(&t, "group-tables", NULL, 0, &err);
	if (rc)
		fprintf(stderr, "load failed: %s:%ld: %s\n", err.file, err.line, err.message);
	assert_int_equal(rc, IRR_OK);
	assert_non_null(t);
	return t;
}

/* Every perception key (include/irrecon/keys.h) has a table group,
 * and every band is well-formed. */
static void builtin_tables_cover_every_key(void **state)
{
	irr_tables *t = load_builtin();
	(void)state;
	assert_true(irr_key_count() >= 80);
	for (size_t i = 0; i < irr_key_count(); i++) {
		const irr_table_group *g[4];
		const char *key = irr_key_at(i);
		size_t n = irr_tables_find_key(t, key, g, 4);
		if (n == 0)
			fprintf(stderr, "no table group for key %s\n", key);
		assert_true(n >= 1);
		assert_string_equal(g[0]->key, key);
	}
	for (size_t i = 0; i < irr_tables_group_count(t); i++) {
		const irr_table_group *g = irr_tables_group(t, i);
		assert_ptr_equal(irr_tables_find_id(t, g->id), g);
		assert_true(g->nbands > 0);
		for (size_t b = 0; b < g->nbands; b++) {
			const irr_table_band *bd = &g->bands[b];
			assert_true(bd->low < bd->high);
			assert_true(bd->low <= bd->typical && bd->typical <= bd->high);
			assert_true(bd->weight >= 0.0 && bd->weight <= 1.0);
			assert_non_null(bd->source);
			/* Every value names its handbook (or says it is common practice). */
			assert_true(strstr(bd->source, "ed.") || strstr(bd->source, "common practice"));
			if (bd->overtone)
				assert_true(bd->weight <= 0.1);
		}
	}
	assert_null(irr_tables_find_id(t, "no_such_group"));
	assert_int_equal(irr_tables_find_key(t, "no_such_key", NULL, 0), 0);
	irr_tables_free(t);
}

/* Spot checks of table windows against the handbook. */
static const irr_table_band *band_of(const irr_tables *t, const char *id, const char *label)
{
	const irr_table_group *g = irr_tables_find_id(t, id);
	assert_non_null(g);
	for (size_t i = 0; i < g->nbands; i++)
		if (strstr(g->bands[i].label, label))
			return &g->bands[i];
	fail_msg("no band '%s' in group %s", label, id);
	return NULL;
}

static void builtin_windows_hold_handbook_values(void **state)
{
	irr_tables *t = load_builtin();
	const irr_table_band *b;
	(void)state;
	/* Silverstein, Webster & Kiemle 7th ed., ch. 2; from memory:
	 * saturated aliphatic ester C=O 1750-1735 */
	b = band_of(t, "ester", "C=O stretch");
	assert_true(b->low <= 1735 && b->high >= 1750);
	/* same source: aldehyde C-H Fermi doublet near 2720 and 2820 */
	b = band_of(t, "aldehyde", "Fermi pair, lower");
	assert_true(b->low <= 2720 && b->high >= 2720);
	b = band_of(t, "aldehyde", "Fermi pair, upper");
	assert_true(b->low <= 2820 && b->high >= 2820);
	/* same source: terminal alkyne C-H stretch near 3300 */
	b = band_of(t, "alkyne_terminal", "C#C-H stretch");
	assert_true(b->low <= 3300 && b->high >= 3300 && b->shape == IRR_SHAPE_SHARP);
	/* same source: isocyanate N=C=O 2275-2250 */
	b = band_of(t, "isocyanate", "N=C=O");
	assert_true(b->low <= 2250 && b->high >= 2275);
	/* same source: carboxylic acid dimer O-H 3300-2500, very broad */
	b = band_of(t, "carboxylic_acid", "O-H stretch");
	assert_true(b->low <= 2500 && b->high >= 3300 && b->shape == IRR_SHAPE_VERY_BROAD);
	irr_tables_free(t);
}

static void digest_is_sha256_of_the_loaded_bytes(void **state)
{
	irr_tables *t = NULL;
	irr_error err;
	const char *path = "tests/data/tables/user-ok.json";
	const char *extra[] = {path};
	char hex[65];
	FILE *f;
	static char buf[65536];
	size_t n;
	(void)state;
	assert_int_equal(irr_tables_load(&t, "", extra, 1, &err), IRR_OK);
	f = fopen(path, "rb");
	assert_non_null(f);
	n = fread(buf, 1, sizeof buf, f);
	fclose(f);
	irr_sha256_data_hex(buf, n, hex);
	assert_string_equal(irr_tables_digest(t), hex);
	assert_int_equal(irr_tables_group_count(t), 2);
	/* The abbreviation is expanded. */
	assert_non_null(strstr(irr_tables_find_id(t, "nitrile")->bands[0].source, "LPC-IR-7"));
	assert_string_equal(irr_tables_find_id(t, "larkspur_tbs_ether")->smarts,
	                    "[Si](C)(C)(C(C)(C)C)O");
	irr_tables_free(t);
}

static void user_table_replaces_a_group_by_id(void **state)
{
	irr_tables *t = NULL;
	irr_error err;
	const char *extra[] = {"tests/data/tables/user-ok.json"};
	const irr_table_group *g[4];
	size_t base;
	(void)state;
	t = load_builtin();
	base = irr_tables_group_count(t);
	irr_tables_free(t);
	assert_int_equal(irr_tables_load(&t, "group-tables", extra, 1, &err), IRR_OK);
	/* nitrile replaced in place, TBS ether added */
	assert_int_equal(irr_tables_group_count(t), base + 1);
	assert_int_equal(irr_tables_find_key(t, "nitrile", g, 4), 1);
	assert_string_equal(g[0]->name, "nitrile (Larkspur window)");
	assert_non_null(strstr(g[0]->file, "user-ok.json"));
	irr_tables_free(t);
}

struct broken_case {
	const char *file;
	int code;
	long line;           /* expected line; 0 = none expected */
	const char *message; /* substring of the message */
};

static void broken_tables_name_file_line_and_field(void **state)
{
	static const struct broken_case cases[] = {
		/* trailing comma: cJSON stops at the '}' after it on line 7 */
		{"bad-syntax.json", IRR_EINPUT, 7, "not valid JSON"},
		{"missing-field.json", IRR_EINPUT, 7, "group 'larkspur_no_typical': bands[0] 'C#N': missing field 'typical'"},
		{"wrong-type.json", IRR_EINPUT, 4, "group 'larkspur_window': bands[0] 'C#N': field 'window' must be [low, high]"},
		{"unknown-key.json", IRR_EINPUT, 4, "unknown perception key 'nitril'"},
		{"typical-outside.json", IRR_EINPUT, 4, "typical 2300 lies outside the window"},
		{"duplicate-id.json", IRR_EINPUT, 6, "group 'larkspur_twice': id already defined"},
		{"unknown-field.json", IRR_EINPUT, 4, "unknown field 'tipical'"},
		{"bad-rule.json", IRR_EINPUT, 4, "unknown attribute 'colour'"},
		{"bad-weight.json", IRR_EINPUT, 4, "weight 1.5 must lie in 0..1"},
		{"no-source.json", IRR_EINPUT, 4, "no 'source'"},
		{"bad-smarts.json", IRR_EINPUT, 4, "group 'larkspur_ester': bad SMARTS"},
		{"empty.json", IRR_EINPUT, 0, "empty table file"},
		{"wrong-format.json", IRR_EINPUT, 2, "format 'somebody-else/2'"},
		{"not-object.json", IRR_EINPUT, 1, "must be a JSON object"},
		{"does-not-exist.json", IRR_EIO, 0, "cannot open table"},
	};
	(void)state;
	for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
		char path[256];
		const char *extra[1] = {path};
		irr_tables *t = (irr_tables *)1;
		irr_error err;
		irr_error_clear(&err);
		snprintf(path, sizeof path, "tests/data/tables/%s", cases[i].file);
		int rc = irr_tables_load(&t, "", extra, 1, &err);
		if (rc != cases[i].code || err.line != cases[i].line ||
		    !strstr(err.message, cases[i].message) || strcmp(err.file, path))
			fail_msg("%s: got rc %d, %s:%ld: %s", cases[i].file, rc, err.file, err.line, err.message);
		assert_null(t);
		assert_null(strchr(err.message, '\n'));
	}
}

static void missing_folder_is_not_found(void **state)
{
	irr_tables *t = NULL;
	irr_error err;
	(void)state;
	assert_int_equal(irr_tables_load(&t, "tests/data/no-such-folder", NULL, 0, &err), IRR_ENOTFOUND);
	assert_null(t);
	assert_string_equal(err.file, "tests/data/no-such-folder");
	irr_tables_free(NULL); /* no-op */
}

static void environment_overrides_default_folder(void **state)
{
	(void)state;
	setenv("IRRECON_TABLES", "tests/data/tables", 1);
	assert_string_equal(irr_tables_default_dir(), "tests/data/tables");
	unsetenv("IRRECON_TABLES");
	assert_string_not_equal(irr_tables_default_dir(), "tests/data/tables");
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(sha256_fips_vectors),
		cmocka_unit_test(builtin_tables_cover_every_key),
		cmocka_unit_test(builtin_windows_hold_handbook_values),
		cmocka_unit_test(digest_is_sha256_of_the_loaded_bytes),
		cmocka_unit_test(user_table_replaces_a_group_by_id),
		cmocka_unit_test(broken_tables_name_file_line_and_field),
		cmocka_unit_test(missing_folder_is_not_found),
		cmocka_unit_test(environment_overrides_default_folder),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
