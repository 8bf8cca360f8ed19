/* test_request.c: JSON check requests (src/request.c, schema
 * irrecon.request/1, docs/request-schema.md).
 * Sources of the checked values:
 * - JSON syntax per RFC 8259 (numbers, strings; NaN and Infinity are not
 *   JSON values): the parser must refuse them and name the line, counted by
 *   hand in the request texts below.
 * - The real spectrum ../shared/ir-reference/acetophenone.jdx (or
 *   $IRRECON_REFDIR): the SHA-256 that a run records in its provenance must
 *   equal the one published for that file in the folder's SHA256SUMS
 *   (FIPS 180-4 digest, computed outside this project).
 * - A request must check exactly what the same inputs given through the
 *   check API do (same JSON, byte for byte), and inline x/y arrays must give
 *   the same verdict and bands as the file they were read from. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <cmocka.h>

#include "unit/refdata.h"

#include <cjson/cJSON.h>

#include "irrecon.h"

static int parse(irr_request **r, const char *text, irr_error *err)
{
	irr_error_clear(err);
	return irr_request_parse(r, text, strlen(text), "req.json", NULL, err);
}

static void full_request_is_read(void **state)
{
	const char *text =
		"{\n"
		"  \"schema\": \"irrecon.request/1\",\n"
		"  \"sample\": \"LPC-2207-14\",\n"
		"  \"structure\": \"CC(=O)c1ccccc1\",\n"
		"  \"spectrum\": {\"file\": \"spectra/LPC-2207-14.jdx\", \"block\": 2},\n"
		"  \"starting_materials\": [\"CC(O)c1ccccc1\"],\n"
		"  \"reagents\": [\"O=[Mn](=O)(=O)[O-].[K+]\"],\n"
		"  \"solvents\": \"ethyl acetate; THF \",\n"
		"  \"phase\": \"solution\",\n"
		"  \"sampling\": \"transmission\",\n"
		"  \"options\": {\"decimal_comma\": true, \"peak_options\": {\"min_snr\": 7.5, \"shoulders\": false}}\n"
		"}\n";
	irr_request *r = NULL;
	irr_error err;
	(void)state;
	assert_int_equal(parse(&r, text, &err), IRR_OK);
	assert_string_equal(irr_request_sample(r), "LPC-2207-14");
	assert_string_equal(irr_request_structure(r), "CC(=O)c1ccccc1");
	assert_string_equal(irr_request_spectrum_file(r), "spectra/LPC-2207-14.jdx");
	assert_null(irr_request_peaks_file(r));
	assert_int_equal(irr_request_read_options(r)->block, 2);
	assert_true(irr_request_read_options(r)->decimal_comma);
	assert_int_equal(irr_request_starting_material_count(r), 1);
	assert_int_equal(irr_request_reagent_count(r), 1);
	/* A ';'-separated string is split and trimmed (the CSV manifest form). */
	assert_int_equal(irr_request_solvent_count(r), 2);
	assert_string_equal(irr_request_solvent(r, 0), "ethyl acetate");
	assert_string_equal(irr_request_solvent(r, 1), "THF");
	assert_int_equal(irr_request_phase(r), IRR_PHASE_SOLUTION);
	assert_int_equal(irr_request_sampling(r), IRR_SAMPLING_TRANSMISSION);
	assert_true(irr_request_peak_options(r)->min_snr == 7.5);
	assert_false(irr_request_peak_options(r)->shoulders);
	irr_request_free(r);
	irr_request_free(NULL);
}

static void inline_arrays_keep_their_numbers(void **state)
{
	/* RFC 8259 numbers, with exponent and fraction forms. */
	const char *text =
		"{\"structure\": \"C\", \"spectrum\": {\"x\": [4000, 3999.5, 3.999e3],\n"
		" \"y\": [0.95, 9.5E-1, 0.9], \"y_units\": \"transmittance\"}}";
	irr_request *r = NULL;
	irr_error err;
	const double *x, *y;
	irr_yunits u;
	(void)state;
	assert_int_equal(parse(&r, text, &err), IRR_OK);
	assert_int_equal(irr_request_spectrum_xy(r, &x, &y, &u), 3);
	assert_true(x[0] == 4000.0 && x[1] == 3999.5 && x[2] == 3999.0);
	assert_true(y[0] == 0.95 && y[1] == 0.95 && y[2] == 0.9);
	assert_int_equal(u, IRR_Y_TRANSMITTANCE);
	irr_request_free(r);
}

struct bad_case {
	const char *text;
	long line;          /* expected line, counted by hand */
	const char *fragment;
};

static void bad_requests_name_key_and_line(void **state)
{
	static const struct bad_case cases[] = {
		{"{\n  \"structure\": \"CCO\",\n  \"structur\": \"CCO\"\n}", 3, "unknown key \"structur\""},
		{"{\n  \"structure\": \"CCO\",\n  \"phase\": 5\n}", 3, "\"phase\" must be a string"},
		{"{\n  \"phase\": \"plasma\"\n}", 2, "unknown phase 'plasma'"},
		{"{\"schema\": \"irrecon.request/2\"}", 1, "this version reads"},
		{"{\n \"structure\": \"C\",\n \"spectrum\": {\"x\": [1, 2, 3],\n \"y\": [1, 2]}}", 4, "\"x\" has 3 values but \"y\" has 2"},
		/* NaN is not a JSON value (RFC 8259 section 6). */
		{"{\n \"structure\": \"C\",\n \"spectrum\": {\"x\": [1, 2],\n  \"y\": [NaN, 1]}}", 4, "not valid JSON"},
		{"{\n \"spectrum\": \"a.jdx\",\n \"peaks\": \"a.csv\"\n}", 3, "not both"},
		{"{\"structure\": \"C\",\n \"solvents\": [\"ethanol\", 3]}", 2, "non-empty strings"},
		{"  \n\n", 1, "empty"},
		{"[\"structure\"]", 1, "must be a JSON object"},
		{"{\"structure\": \"C\",\n \"options\": {\"peak_options\": {\"min_snr\": -1}}}", 2, "must not be negative"},
		{"{\"structure\": \"C\",\n \"options\": {\"frobnicate\": 1}}", 2, "unknown key \"frobnicate\""},
	};
	(void)state;
	for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
		irr_request *r = (irr_request *)1;
		irr_error err;
		int rc = parse(&r, cases[i].text, &err);
		if (rc != IRR_EINPUT || err.line != cases[i].line || !strstr(err.message, cases[i].fragment))
			print_error("case %zu: rc %d line %ld message '%s'\n", i, rc, err.line, err.message);
		assert_int_equal(rc, IRR_EINPUT);
		assert_null(r);
		assert_string_equal(err.file, "req.json");
		assert_int_equal(err.line, cases[i].line);
		assert_non_null(strstr(err.message, cases[i].fragment));
	}
}

static void clone_is_deep(void **state)
{
	irr_request *a = NULL, *b = NULL;
	irr_error err;
	(void)state;
	assert_int_equal(parse(&a, "{\"structure\": \"CCO\", \"solvents\": [\"water\"]}", &err), IRR_OK);
	assert_int_equal(irr_request_clone(&b, a, &err), IRR_OK);
	assert_int_equal(irr_request_set_structure(b, "CC=O"), IRR_OK);
	assert_int_equal(irr_request_add_solvent(b, "ethanol"), IRR_OK);
	irr_request_free(b);
	assert_string_equal(irr_request_structure(a), "CCO");
	assert_int_equal(irr_request_solvent_count(a), 1);
	irr_request_free(a);
}

static void run_without_structure_fails(void **state)
{
	irr_request *r = NULL;
	irr_check *c = (irr_check *)1;
	irr_error err;
	(void)state;
	assert_int_equal(parse(&r, "{\"spectrum\": \"x.jdx\"}", &err), IRR_OK);
	assert_int_equal(irr_request_run(&c, r, NULL, &err), IRR_EINPUT);
	assert_null(c);
	assert_non_null(strstr(err.message, "no structure"));
	irr_request_free(r);
}

static char *json_of(const irr_check *c)
{
	char *s = NULL;
	assert_int_equal(irr_report_json(&s, c), IRR_OK);
	return s;
}

static void request_runs_like_the_api(void **state)
{
	const char *text =
		"{\"sample\": \"LPC-0311-02\", \"structure\": \"CC(=O)c1ccccc1\",\n"
		" \"spectrum\": \"acetophenone.jdx\",\n"
		" \"starting_materials\": [\"CC(O)c1ccccc1\"]}\n";
	irr_tables *t = NULL;
	irr_request *r = NULL;
	irr_check *c1 = NULL, *c2 = NULL;
	irr_spectrum *s = NULL;
	irr_check_options o;
	irr_error err;
	cJSON *root, *sha;
	char path[1100], want[65], digest[65], *j1, *j2;
	(void)state;
	NEED_REFDIR();
	assert_int_equal(irr_tables_load(&t, NULL, NULL, 0, &err), IRR_OK);
	irr_error_clear(&err);
	assert_int_equal(irr_request_parse(&r, text, strlen(text), "req.json", refdir(), &err), IRR_OK);
	assert_int_equal(irr_request_run(&c1, r, t, &err), IRR_OK);

	/* Provenance: the digest published beside the file. */
	assert_int_equal(published_sha256("acetophenone.jdx", want), 0);
	root = (cJSON *)irr_report_json_object(c1);
	assert_non_null(root);
	sha = cJSON_GetObjectItemCaseSensitive(
		cJSON_GetObjectItemCaseSensitive(cJSON_GetObjectItemCaseSensitive(root, "provenance"), "input"),
		"sha256");
	assert_true(cJSON_IsString(sha));
	assert_string_equal(sha->valuestring, want);
	cJSON_Delete(root);

	/* The same inputs through the check API give the same JSON. */
	snprintf(path, sizeof path, "%s/acetophenone.jdx", refdir());
	{
		FILE *f = fopen(path, "rb");
		static char buf[1 << 20];
		size_t n;
		assert_non_null(f);
		n = fread(buf, 1, sizeof buf, f);
		fclose(f);
		irr_sha256_data_hex(buf, n, digest);
	}
	irr_check_options_init(&o);
	o.sample_id = "LPC-0311-02";
	o.input_name = path;
	o.input_sha256 = digest;
	assert_int_equal(irr_spectrum_read_file(&s, path, NULL, &err), IRR_OK);
	assert_int_equal(irr_check_create(&c2, t, &err), IRR_OK);
	irr_check_set_options(c2, &o);
	assert_int_equal(irr_check_set_structure_named(c2, "CC(=O)c1ccccc1", "req.json", &err), IRR_OK);
	assert_int_equal(irr_check_add_other(c2, IRR_OTHER_STARTING_MATERIAL, "CC(O)c1ccccc1", &err), IRR_OK);
	assert_int_equal(irr_check_set_spectrum(c2, s, &err), IRR_OK);
	assert_int_equal(irr_check_run(c2, &err), IRR_OK);
	j1 = json_of(c1);
	j2 = json_of(c2);
	assert_string_equal(j1, j2);
	free(j2);

	/* A shared, already loaded solvent library (as batch uses) changes
	 * nothing in the result. */
	{
		irr_solvent_library *lib = NULL;
		irr_check *c3 = NULL;
		assert_int_equal(irr_solvents_load(&lib, NULL, &err), IRR_OK);
		irr_request_use_solvents(r, lib);
		assert_int_equal(irr_request_run(&c3, r, t, &err), IRR_OK);
		j2 = json_of(c3);
		assert_string_equal(j1, j2);
		free(j2);
		irr_check_free(c3);
		irr_request_use_solvents(r, NULL);
		irr_solvents_free(lib);
	}
	free(j1);
	irr_check_free(c1);
	irr_check_free(c2);
	irr_request_free(r);
	irr_tables_free(t);
}

static void inline_arrays_check_like_the_file(void **state)
{
	irr_tables *t = NULL;
	irr_request *a = NULL, *b = NULL;
	irr_check *ca = NULL, *cb = NULL;
	irr_spectrum *s = NULL;
	irr_error err;
	char path[1100];
	(void)state;
	NEED_REFDIR();
	snprintf(path, sizeof path, "%s/acetophenone.jdx", refdir());
	assert_int_equal(irr_tables_load(&t, NULL, NULL, 0, &err), IRR_OK);
	assert_int_equal(irr_spectrum_read_file(&s, path, NULL, &err), IRR_OK);
	assert_int_equal(irr_request_create(&a, &err), IRR_OK);
	assert_int_equal(irr_request_create(&b, &err), IRR_OK);
	irr_request_set_structure(a, "CC(=O)c1ccccc1");
	irr_request_set_structure(b, "CC(=O)c1ccccc1");
	irr_request_set_spectrum_file(a, path);
	/* The file's own points and units, as an embedding program holds them. */
	assert_int_equal(irr_request_set_spectrum_xy(b, irr_spectrum_x(s), irr_spectrum_y(s),
	                                             irr_spectrum_points(s), irr_spectrum_y_units(s)), IRR_OK);
	assert_int_equal(irr_request_run(&ca, a, t, &err), IRR_OK);
	assert_int_equal(irr_request_run(&cb, b, t, &err), IRR_OK);
	assert_int_equal(irr_check_verdict(ca), irr_check_verdict(cb));
	assert_int_equal(irr_check_expected_count(ca), irr_check_expected_count(cb));
	for (size_t i = 0; i < irr_check_expected_count(ca); i++)
		assert_int_equal(irr_check_expected(ca, i)->status, irr_check_expected(cb, i)->status);
	assert_int_equal(irr_check_observed_count(ca), irr_check_observed_count(cb));
	irr_check_free(ca);
	irr_check_free(cb);
	irr_request_free(a);
	irr_request_free(b);
	irr_spectrum_free(s);
	irr_tables_free(t);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(full_request_is_read),
		cmocka_unit_test(inline_arrays_keep_their_numbers),
		cmocka_unit_test(bad_requests_name_key_and_line),
		cmocka_unit_test(clone_is_deep),
		cmocka_unit_test(run_without_structure_fails),
		cmocka_unit_test(request_runs_like_the_api),
		cmocka_unit_test(inline_arrays_check_like_the_file),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
