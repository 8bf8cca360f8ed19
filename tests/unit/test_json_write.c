/* test_json_write.c: the direct JSON writer (src/json_write.c) against the
 * reference it must reproduce byte for byte.
 * Sources of the checked values:
 * - The cJSON library (Debian libcjson-dev, 1.7.x), linked here: every
 *   number and every document is printed by cJSON_PrintUnformatted too, and
 *   the two texts must be equal.
 * - Number edge cases from IEEE 754-2008 binary64 (signed zero, subnormals,
 *   DBL_MAX, the 2^53 integer limit) and C11 7.21.6.1 ("%g" switches to the
 *   exponent form below 1e-4 and at 10^precision); the 15/17 significant
 *   digits are DBL_DIG and the round-trip width of binary64.
 * - JSON string escapes per RFC 8259 section 7.
 * - The real spectrum ../shared/ir-reference/acetophenone.jdx (or
 *   $IRRECON_REFDIR) with its structure from that folder's MANIFEST.tsv:
 *   a whole check result written both ways must be the same text. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <float.h>
#include <limits.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <cmocka.h>

#include <cjson/cJSON.h>

#include "irrecon.h"
#include "json_write.h"

/* cJSON's text for cJSON_CreateNumber(d). */
static void cjson_number(double d, char *out, size_t n)
{
	cJSON *a = cJSON_CreateArray();
	char *t;
	assert_non_null(a);
	cJSON_AddItemToArray(a, cJSON_CreateNumber(d));
	t = cJSON_PrintUnformatted(a);
	assert_non_null(t);
	/* "[...]" */
	assert_true(strlen(t) >= 3 && strlen(t) - 2 < n);
	snprintf(out, n, "%.*s", (int)strlen(t) - 2, t + 1);
	cJSON_free(t);
	cJSON_Delete(a);
}

static unsigned long long rng_state = 0x9E3779B97F4A7C15ull;
static unsigned long long rng(void)
{
	/* xorshift64* (Vigna 2016) */
	rng_state ^= rng_state >> 12;
	rng_state ^= rng_state << 25;
	rng_state ^= rng_state >> 27;
	return rng_state * 2685821657736338717ull;
}

static int mismatches;
static void same_number(double d)
{
	char want[64], got[64];
	size_t n;
	cjson_number(d, want, sizeof want);
	n = irr_json__format_number(got, d);
	assert_int_equal(n, strlen(got));
	if (strcmp(want, got)) {
		if (mismatches++ < 10)
			print_message("%.17g: cJSON \"%s\", writer \"%s\"\n", d, want, got);
	}
}

static void numbers_match_cjson_edge_cases(void **state)
{
	static const double v[] = {
		0.0, -0.0, 1.0, -1.0, 0.5, -0.5, 0.1, 0.2, 0.3, 1.0 / 3.0, 2.0 / 3.0,
		1e-7, -1e-7, 1e-5, 1e-4, 0.0001, 0.00011, 0.001, 1e21, -1e21, 1e15, 1e15 - 1,
		999999999999999.0, 99999999999999.9, 1e16, 1e17, 1e22, 1e300, DBL_MAX, -DBL_MAX,
		DBL_MIN, 4.9406564584124654e-324, DBL_EPSILON, 9007199254740992.0, 9007199254740993.0,
		2147483647.0, 2147483648.0, -2147483648.0, -2147483649.0, 2147483647.5, -2147483648.5,
		4294967296.0, 1.7976931348623157e308, 123456789012345.6, 0.123456789012345,
		0.1234567890123456, 0.12345678901234567, 3.141592653589793, 2.718281828459045,
		1234.5, 1715.3, 0.993, 0.0042, 3059.9, 1e-4 * (1 - DBL_EPSILON), 9.99999999999999e14,
		0.30000000000000004, 100.0 / 3.0, 1e9 + 0.5, 1e-9, 5e-5, 0.00015, 0.00095, 1.5e-4,
		NAN, INFINITY, -INFINITY};
	(void)state;
	mismatches = 0;
	for (size_t i = 0; i < sizeof v / sizeof v[0]; i++) {
		same_number(v[i]);
		same_number(nextafter(v[i], INFINITY));
		same_number(nextafter(v[i], -INFINITY));
	}
	assert_int_equal(mismatches, 0);
}

static void numbers_match_cjson_random(void **state)
{
	(void)state;
	mismatches = 0;
	for (int i = 0; i < 20000; i++) {
		unsigned long long r = rng();
		double d;
		/* Any bit pattern: every exponent, subnormals, NaNs. */
		memcpy(&d, &r, sizeof d);
		same_number(d);
		/* Rounded to 0..9 decimals, as the result's numbers are, over
		 * magnitudes 1e-6 .. 1e16. */
		{
			int dec = (int)(rng() % 10), e = (int)(rng() % 23) - 6;
			double x = ((double)(rng() >> 11) / 9007199254740992.0) * pow(10.0, e);
			double f = pow(10.0, dec);
			if (rng() & 1)
				x = -x;
			same_number(floor(x * f + 0.5) / f);
			/* 15, 16 and 17 significant digits */
			same_number(x);
			same_number(strtod("0", NULL) + (double)(long long)(x * 1e3) / 1e3);
		}
		/* Integers inside and outside the int range. */
		same_number((double)(long long)(rng() % 20000000000ull) - 1e10);
		same_number((double)(int)(rng() % 100000));
	}
	assert_int_equal(mismatches, 0);
}

static void documents_match_cjson(void **state)
{
	char s[40];
	irr_jw w;
	cJSON *root = cJSON_CreateObject(), *a, *o;
	char *want;
	(void)state;
	/* Every control character, quotes, backslash, DEL and UTF-8. */
	for (int i = 1; i < 32; i++)
		s[i - 1] = (char)i;
	s[31] = '\0';
	memset(&w, 0, sizeof w);
	irr_jw__begin_object(&w, NULL);
	irr_jw__string(&w, "ctl", s);
	cJSON_AddStringToObject(root, "ctl", s);
	irr_jw__string(&w, "q\"k\\", "a\"b\\c/d\x7f \xc3\xa9\xe2\x80\x94");
	cJSON_AddStringToObject(root, "q\"k\\", "a\"b\\c/d\x7f \xc3\xa9\xe2\x80\x94");
	irr_jw__string(&w, "", "");
	cJSON_AddStringToObject(root, "", "");
	irr_jw__string(&w, "none", NULL);
	cJSON_AddNullToObject(root, "none");
	irr_jw__begin_array(&w, "empty");
	irr_jw__end(&w);
	cJSON_AddArrayToObject(root, "empty");
	irr_jw__begin_object(&w, "nothing");
	irr_jw__end(&w);
	cJSON_AddObjectToObject(root, "nothing");
	irr_jw__begin_array(&w, "mixed");
	a = cJSON_AddArrayToObject(root, "mixed");
	irr_jw__number(&w, NULL, 1715.3);
	cJSON_AddItemToArray(a, cJSON_CreateNumber(1715.3));
	irr_jw__bool(&w, NULL, 1);
	cJSON_AddItemToArray(a, cJSON_CreateTrue());
	irr_jw__bool(&w, NULL, 0);
	cJSON_AddItemToArray(a, cJSON_CreateFalse());
	irr_jw__null(&w, NULL);
	cJSON_AddItemToArray(a, cJSON_CreateNull());
	irr_jw__begin_object(&w, NULL);
	o = cJSON_CreateObject();
	cJSON_AddItemToArray(a, o);
	irr_jw__number(&w, "n", -0.0042);
	cJSON_AddNumberToObject(o, "n", -0.0042);
	irr_jw__begin_array(&w, "deep");
	irr_jw__begin_array(&w, NULL);
	irr_jw__end(&w);
	irr_jw__end(&w);
	cJSON_AddItemToArray(cJSON_AddArrayToObject(o, "deep"), cJSON_CreateArray());
	irr_jw__end(&w);
	irr_jw__string(&w, NULL, "last");
	cJSON_AddItemToArray(a, cJSON_CreateString("last"));
	irr_jw__end(&w);
	irr_jw__end(&w);
	want = cJSON_PrintUnformatted(root);
	assert_int_equal(w.bad, 0);
	assert_int_equal(w.out.oom, 0);
	assert_int_equal(w.depth, 0);
	assert_string_equal(w.out.p, want);
	/* An unbalanced end is a fault, not a stray bracket. */
	irr_jw__end(&w);
	assert_int_equal(w.bad, 1);
	cJSON_free(want);
	cJSON_Delete(root);
	free(w.out.p);
}

static void check_result_matches_tree(void **state)
{
	const char *env = getenv("IRRECON_REFDIR");
	char dir[1024], path[1200], line[4096], smiles[512] = "";
	irr_tables *t = NULL;
	irr_check *c = NULL;
	irr_spectrum *s = NULL;
	irr_check_options o;
	irr_error err;
	FILE *f;
	char *direct = NULL, *tree;
	void *obj;
	(void)state;
	snprintf(dir, sizeof dir, "%s", env && *env ? env : "../shared/ir-reference");
	snprintf(path, sizeof path, "%s/MANIFEST.tsv", dir);
	if (!(f = fopen(path, "r"))) {
		print_message("reference spectra not found in %s\n", dir);
		skip();
	}
	while (fgets(line, sizeof line, f)) {
		char *tab1 = strchr(line, '\t'), *tab2, *end;
		if (!tab1 || strncmp(line, "acetophenone.jdx\t", 17))
			continue;
		tab2 = strchr(tab1 + 1, '\t');
		if (!tab2)
			continue;
		end = strpbrk(tab2 + 1, "\t\r\n");
		snprintf(smiles, sizeof smiles, "%.*s", (int)(end ? end - tab2 - 1 : (long)strlen(tab2 + 1)), tab2 + 1);
	}
	fclose(f);
	assert_true(smiles[0] != '\0');
	snprintf(path, sizeof path, "%s/acetophenone.jdx", dir);
	assert_int_equal(irr_tables_load(&t, NULL, NULL, 0, &err), IRR_OK);
	assert_int_equal(irr_spectrum_read_file(&s, path, NULL, &err), IRR_OK);
	assert_int_equal(irr_check_create(&c, t, &err), IRR_OK);
	irr_check_options_init(&o);
	o.sample_id = "LPC-0001 \"tab\there\"";
	irr_check_set_options(c, &o);
	assert_int_equal(irr_check_set_structure(c, smiles, &err), IRR_OK);
	/* A starting material and a solvent fill those sections too. */
	assert_int_equal(irr_check_add_other(c, IRR_OTHER_STARTING_MATERIAL, "CC(O)c1ccccc1", &err), IRR_OK);
	assert_int_equal(irr_check_add_other(c, IRR_OTHER_SOLVENT, "ethyl acetate", &err), IRR_OK);
	assert_int_equal(irr_check_set_spectrum(c, s, &err), IRR_OK);
	assert_int_equal(irr_check_run(c, &err), IRR_OK);
	obj = irr_report_json_object(c);
	assert_non_null(obj);
	tree = cJSON_PrintUnformatted(obj);
	assert_int_equal(irr_report__json_line(&direct, c), IRR_OK);
	assert_non_null(direct);
	assert_non_null(strstr(direct, "\"schema\":\"irrecon.check/1\""));
	assert_string_equal(direct, tree);
	free(direct);
	cJSON_free(tree);
	cJSON_Delete(obj);
	irr_check_free(c); /* owns the spectrum */
	irr_tables_free(t);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(numbers_match_cjson_edge_cases),
		cmocka_unit_test(numbers_match_cjson_random),
		cmocka_unit_test(documents_match_cjson),
		cmocka_unit_test(check_result_matches_tree),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
