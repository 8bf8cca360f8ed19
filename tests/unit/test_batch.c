/* test_batch.c: batch manifests (src/batch.c).
 * Sources of the checked values:
 * - CSV per RFC 4180 section 2: fields in double quotes may hold commas,
 *   line breaks and doubled quotes ("b""bb" is b"bb); records end in CRLF
 *   or LF. The expected fields and line numbers are worked by hand from the
 *   texts below.
 * - JSON Lines (jsonlines.org: one UTF-8 JSON value per line) and RFC 8259.
 * - Path confinement as README.md ("Many samples") states it: absolute
 *   paths, '..' and symbolic links leaving the manifest's folder are refused
 *   unless allowed.
 * - The real spectrum ../shared/ir-reference/acetophenone.jdx (or
 *   $IRRECON_REFDIR): the digest in a batch result's provenance must be the
 *   one published in that folder's SHA256SUMS. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>
#include <unistd.h>
#include <cmocka.h>

#include "unit/refdata.h"

#include <cjson/cJSON.h>

#include "irrecon.h"

static irr_manifest *read_text(const char *text, const char *name, irr_manifest_format f)
{
	irr_manifest *m = NULL;
	irr_error err;
	irr_error_clear(&err);
	if (irr_manifest_read_memory(&m, text, strlen(text), name, "/nonexistent/plate", f, &err) != IRR_OK)
		print_error("unexpected error: %s:%ld: %s\n", err.file, err.line, err.message);
	assert_non_null(m);
	return m;
}

static void csv_quoting_follows_rfc4180(void **state)
{
	const char *text =
		"# Larkspur Process Chemistry, plate 22-07\r\n"
		"Sample,Structure,Spectrum,Starting Materials,solvents\r\n"
		"\"LPC-7, rerun\",CCO,a.jdx,CC=O;CC(=O)O,\r\n"
		"\"LPC \"\"A\"\"\",CCO,\"b,1.jdx\",,ethyl acetate ; THF\r\n"
		"\"LPC-9\r\nsecond line\",CCO,c.jdx,,\r\n"
		"\r\n"
		"LPC-10,CCO,d.jdx,,\r\n";
	irr_manifest *m = read_text(text, "plate.csv", IRR_MANIFEST_AUTO);
	const irr_manifest_sample *s;
	(void)state;
	assert_int_equal(irr_manifest_detected_format(m), IRR_MANIFEST_CSV);
	assert_int_equal(irr_manifest_count(m), 4);
	s = irr_manifest_get(m, 0);
	assert_string_equal(s->sample, "LPC-7, rerun");
	assert_int_equal(s->line, 3);
	assert_string_equal(s->structure, "CCO");
	assert_string_equal(s->spectrum, "a.jdx");
	assert_null(s->peaks);
	assert_int_equal(s->n_starting_materials, 2);
	assert_string_equal(s->starting_materials[1], "CC(=O)O");
	assert_int_equal(s->n_solvents, 0);
	s = irr_manifest_get(m, 1);
	assert_string_equal(s->sample, "LPC \"A\"");
	assert_string_equal(s->spectrum, "b,1.jdx");
	assert_int_equal(s->n_solvents, 2);
	assert_string_equal(s->solvents[0], "ethyl acetate");
	assert_string_equal(s->solvents[1], "THF");
	s = irr_manifest_get(m, 2);
	/* A quoted line break is data (RFC 4180 2.6) and moves the line count. */
	assert_string_equal(s->sample, "LPC-9\r\nsecond line");
	assert_int_equal(s->line, 5);
	s = irr_manifest_get(m, 3);
	assert_string_equal(s->sample, "LPC-10");
	assert_int_equal(s->line, 8);
	assert_int_equal(s->index, 3);
	assert_null(irr_manifest_get(m, 4));
	irr_manifest_free(m);
	irr_manifest_free(NULL);
}

static void bad_csv_rows_fail_alone(void **state)
{
	const char *text =
		"sample,structure,spectrum\n"
		"LPC-1,CCO\n"
		"LPC-2,CCO,a\"b.jdx\n"
		"LPC-3,CCO,c.jdx\n";
	irr_manifest *m = read_text(text, "plate.csv", IRR_MANIFEST_AUTO);
	const irr_manifest_sample *s;
	(void)state;
	assert_int_equal(irr_manifest_count(m), 3);
	s = irr_manifest_get(m, 0);
	assert_true(s->failed);
	assert_string_equal(s->sample, "LPC-1");
	assert_int_equal(s->error->line, 2);
	assert_non_null(strstr(s->error->message, "2 fields, but the header has 3"));
	s = irr_manifest_get(m, 1);
	assert_true(s->failed);
	assert_int_equal(s->error->line, 3);
	assert_non_null(strstr(s->error->message, "quote"));
	s = irr_manifest_get(m, 2);
	assert_false(s->failed);
	assert_int_equal(s->line, 4);
	assert_string_equal(s->spectrum, "c.jdx");
	irr_manifest_free(m);
}

static void bad_headers_fail_the_manifest(void **state)
{
	static const struct { const char *text; long line; const char *fragment; } cases[] = {
		{"# comment\nsample,smiles,spectrum\nA,C,a.jdx\n", 2, "unknown column 'smiles'"},
		{"sample,structure,structure,spectrum\n", 1, "appears twice"},
		{"sample,spectrum\nA,a.jdx\n", 1, "needs a 'structure' column"},
		{"\n# only comments\n", 1, "no header row"},
		{"sample,structure,spectrum\n", 0, "no samples"},
		{"\xFF\xFEs\0a\0", 1, "NUL"},
	};
	(void)state;
	for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
		irr_manifest *m = (irr_manifest *)1;
		irr_error err;
		size_t len = i == 5 ? 6 : strlen(cases[i].text);
		int rc = irr_manifest_read_memory(&m, cases[i].text, len, "plate.csv", NULL, IRR_MANIFEST_CSV, &err);
		if (rc != IRR_EINPUT || !strstr(err.message, cases[i].fragment))
			print_error("case %zu: rc %d %ld '%s'\n", i, rc, err.line, err.message);
		assert_int_equal(rc, IRR_EINPUT);
		assert_null(m);
		assert_string_equal(err.file, "plate.csv");
		assert_int_equal(err.line, cases[i].line);
		assert_non_null(strstr(err.message, cases[i].fragment));
	}
}

static void json_lines_rows(void **state)
{
	const char *text =
		"# Larkspur Process Chemistry, QC week 31\n"
		"{\"sample\": \"QC-1\", \"structure\": \"CC(=O)OCC\", \"peaks\": \"p1.csv\", "
		"\"solvents\": [\"ethanol\", \"water\"], \"phase\": \"condensed\"}\n"
		"\n"
		"{\"sample\": \"QC-2\", \"structure\": \"CCO\", \"spectrum\": \"s2.jdx\", \"colour\": \"red\"}\n"
		"{\"sample\": \"QC-3\", \"structure\": \"CCO\", \"spectrum\": \"s3.jdx\",\n"
		"{\"sample\": \"QC-4\", \"structure\": \"CCO\", \"spectrum\": \"s4.jdx\", \"reagents\": [\"O\", 5]}\n"
		"{\"sample\": \"QC-5\", \"structure\": \"CCO\", \"spectrum\": \"s5.jdx\", \"starting_materials\": \"CC=O; CC(=O)O\"}\n";
	irr_manifest *m = read_text(text, "week31.data", IRR_MANIFEST_AUTO);
	const irr_manifest_sample *s;
	(void)state;
	assert_int_equal(irr_manifest_detected_format(m), IRR_MANIFEST_JSONL);
	assert_int_equal(irr_manifest_count(m), 5);
	s = irr_manifest_get(m, 0);
	assert_false(s->failed);
	assert_int_equal(s->line, 2);
	assert_string_equal(s->peaks, "p1.csv");
	assert_int_equal(s->n_solvents, 2);
	assert_string_equal(s->solvents[1], "water");
	assert_string_equal(s->phase, "condensed");
	s = irr_manifest_get(m, 1);
	assert_true(s->failed);
	assert_string_equal(s->sample, "QC-2");
	assert_int_equal(s->error->line, 4);
	assert_non_null(strstr(s->error->message, "unknown key \"colour\""));
	s = irr_manifest_get(m, 2);
	assert_true(s->failed);
	assert_int_equal(s->error->line, 5);
	assert_non_null(strstr(s->error->message, "not valid JSON"));
	s = irr_manifest_get(m, 3);
	assert_true(s->failed);
	assert_non_null(strstr(s->error->message, "non-empty strings"));
	s = irr_manifest_get(m, 4);
	assert_false(s->failed);
	assert_int_equal(s->n_starting_materials, 2);
	assert_string_equal(s->starting_materials[0], "CC=O");
	irr_manifest_free(m);
}

static char tmpdir[256];

/* An empty file at tmpdir/rel. */
static void touch(const char *rel)
{
	char p[512];
	FILE *f;
	snprintf(p, sizeof p, "%s/%s", tmpdir, rel);
	f = fopen(p, "w");
	assert_non_null(f);
	fclose(f);
}

static void make_dir(const char *rel)
{
	char p[512];
	snprintf(p, sizeof p, "%s/%s", tmpdir, rel);
	assert_int_equal(mkdir(p, 0777), 0);
}

static void make_tree(void)
{
	char p[512], target[512];
	snprintf(tmpdir, sizeof tmpdir, "/tmp/irrecon-test-batch-XXXXXX");
	assert_non_null(mkdtemp(tmpdir));
	make_dir("plate");
	touch("plate/in.jdx");
	touch("secret.jdx");
	snprintf(target, sizeof target, "%s/secret.jdx", tmpdir);
	snprintf(p, sizeof p, "%s/plate/link.jdx", tmpdir);
	assert_int_equal(symlink(target, p), 0);
	snprintf(p, sizeof p, "%s/plate/inner.jdx", tmpdir);
	assert_int_equal(symlink("in.jdx", p), 0);
	/* A folder inside, and a folder link that leads out of the plate. */
	make_dir("plate/sub");
	touch("plate/sub/a.jdx");
	snprintf(p, sizeof p, "%s/plate/away", tmpdir);
	assert_int_equal(symlink(tmpdir, p), 0);
}

static void remove_tree(void)
{
	char cmd[600];
	snprintf(cmd, sizeof cmd, "rm -rf '%s'", tmpdir);
	assert_int_equal(system(cmd), 0);
}

static void paths_stay_inside_the_folder(void **state)
{
	char manifest[512], *path = NULL;
	irr_manifest *m = NULL;
	irr_error err;
	static const struct { const char *path; int ok; const char *fragment; } cases[] = {
		{"in.jdx", 1, NULL},
		{"./in.jdx", 1, NULL},
		{"inner.jdx", 1, NULL},           /* a link that stays inside */
		{"missing.jdx", 1, NULL},         /* left to the reader to name */
		{"/etc/passwd", 0, "absolute path"},
		{"../secret.jdx", 0, "'..'"},
		{"sub/../../secret.jdx", 0, "'..'"},
		{"link.jdx", 0, "symbolic link"},
		/* Rows alternate between folders: each answer is the folder's own. */
		{"sub/a.jdx", 1, NULL},
		{"away/secret.jdx", 0, "symbolic link"},
		{"sub/a.jdx", 1, NULL},
		{"away/plate/in.jdx", 1, NULL}, /* out through the link and back in */
		{"away/secret.jdx", 0, "symbolic link"},
		{"", 0, "empty"},
	};
	(void)state;
	make_tree();
	snprintf(manifest, sizeof manifest, "%s/plate/m.csv", tmpdir);
	{
		FILE *f = fopen(manifest, "w");
		assert_non_null(f);
		fputs("sample,structure,spectrum\nA,C,in.jdx\n", f);
		fclose(f);
	}
	assert_int_equal(irr_manifest_read_file(&m, manifest, IRR_MANIFEST_AUTO, 0, &err), IRR_OK);
	for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
		int rc = irr_manifest_resolve_path(&path, m, 7, cases[i].path, 0, &err);
		if ((rc == IRR_OK) != cases[i].ok)
			print_error("case %zu (%s): rc %d '%s'\n", i, cases[i].path, rc, err.message);
		assert_int_equal(rc == IRR_OK, cases[i].ok);
		if (rc == IRR_OK) {
			assert_non_null(strstr(path, cases[i].path + (cases[i].path[0] == '.' ? 2 : 0)));
			free(path);
		} else {
			assert_null(path);
			assert_string_equal(err.file, manifest);
			assert_int_equal(err.line, 7);
			assert_non_null(strstr(err.message, cases[i].fragment));
		}
		/* --allow-outside lets every non-empty path through, unchanged. */
		if (cases[i].path[0]) {
			assert_int_equal(irr_manifest_resolve_path(&path, m, 7, cases[i].path, 1, &err), IRR_OK);
			free(path);
		}
	}
	irr_manifest_free(m);
	remove_tree();
}

static void rows_become_requests(void **state)
{
	const char *text =
		"sample,structure,spectrum,peaks,reagents,phase,sampling\n"
		"R-1,CCO,s1.jdx,,O;CO,gas,transmission\n"
		"R-2,CCO,s2.jdx,p2.csv,,,\n"
		"R-3,CCO,s3.jdx,,,plasma,\n";
	irr_manifest *m = read_text(text, "r.csv", IRR_MANIFEST_CSV);
	irr_request *base = NULL, *r = NULL;
	irr_error err;
	(void)state;
	assert_int_equal(irr_request_create(&base, &err), IRR_OK);
	irr_request_set_sampling(base, IRR_SAMPLING_ATR);
	assert_int_equal(irr_manifest_sample_request(&r, m, 0, base, 1, &err), IRR_OK);
	assert_string_equal(irr_request_sample(r), "R-1");
	assert_string_equal(irr_request_spectrum_file(r), "/nonexistent/plate/s1.jdx");
	assert_int_equal(irr_request_reagent_count(r), 2);
	assert_int_equal(irr_request_phase(r), IRR_PHASE_GAS);
	assert_int_equal(irr_request_sampling(r), IRR_SAMPLING_TRANSMISSION);
	irr_request_free(r);
	assert_int_equal(irr_manifest_sample_request(&r, m, 1, base, 1, &err), IRR_EINPUT);
	assert_int_equal(err.line, 3);
	assert_non_null(strstr(err.message, "not both"));
	assert_int_equal(irr_manifest_sample_request(&r, m, 2, base, 1, &err), IRR_EINPUT);
	assert_int_equal(err.line, 4);
	assert_non_null(strstr(err.message, "unknown phase 'plasma'"));
	irr_request_free(base);
	irr_manifest_free(m);
}

static void a_sample_runs_into_one_line(void **state)
{
	char text[2000], want[65], *line = NULL, *rec = NULL;
	irr_manifest *m = NULL;
	irr_tables *t = NULL;
	irr_verdict v;
	irr_error err;
	cJSON *o;
	(void)state;
	if (published_sha256("acetophenone.jdx", want) != 0) {
		print_message("skipped: reference spectra folder %s not found (set IRRECON_REFDIR)\n", refdir());
		skip();
	}
	snprintf(text, sizeof text,
	         "sample,structure,spectrum,starting_materials\n"
	         "LPC-0311-02,CC(=O)c1ccccc1,acetophenone.jdx,CC(O)c1ccccc1\n"
	         "LPC-0311-03,CC(=O)c1ccccc1,acetophenone.jdx,C1CC1C(\n");
	irr_error_clear(&err);
	assert_int_equal(irr_manifest_read_memory(&m, text, strlen(text), "plate.csv", refdir(),
	                                          IRR_MANIFEST_AUTO, &err), IRR_OK);
	assert_int_equal(irr_tables_load(&t, NULL, NULL, 0, &err), IRR_OK);
	assert_int_equal(irr_batch_run_sample(&line, &v, m, 0, NULL, t, 0, NULL, &err), IRR_OK);
	assert_null(strchr(line, '\n'));
	o = cJSON_Parse(line);
	assert_non_null(o);
	assert_string_equal(cJSON_GetObjectItemCaseSensitive(o, "schema")->valuestring, "irrecon.check/1");
	assert_string_equal(cJSON_GetObjectItemCaseSensitive(o, "sample")->valuestring, "LPC-0311-02");
	assert_string_equal(cJSON_GetObjectItemCaseSensitive(o, "verdict")->valuestring, irr_verdict_name(v));
	assert_string_equal(cJSON_GetObjectItemCaseSensitive(cJSON_GetObjectItemCaseSensitive(
		cJSON_GetObjectItemCaseSensitive(o, "provenance"), "input"), "sha256")->valuestring, want);
	cJSON_Delete(o);
	free(line);

	/* A bad starting material: an error naming the manifest row. */
	line = (char *)1;
	assert_int_not_equal(irr_batch_run_sample(&line, &v, m, 1, NULL, t, 0, NULL, &err), IRR_OK);
	assert_null(line);
	assert_string_equal(err.file, "plate.csv");
	assert_int_equal(err.line, 3);
	assert_int_equal(irr_batch_error_record(&rec, m, 1, &err), IRR_OK);
	o = cJSON_Parse(rec);
	assert_non_null(o);
	assert_string_equal(cJSON_GetObjectItemCaseSensitive(o, "schema")->valuestring, "irrecon.error/1");
	assert_string_equal(cJSON_GetObjectItemCaseSensitive(o, "sample")->valuestring, "LPC-0311-03");
	assert_int_equal(cJSON_GetObjectItemCaseSensitive(o, "manifest_line")->valueint, 3);
	assert_int_equal(cJSON_GetObjectItemCaseSensitive(cJSON_GetObjectItemCaseSensitive(o, "error"), "line")->valueint, 3);
	cJSON_Delete(o);
	free(rec);
	irr_tables_free(t);
	irr_manifest_free(m);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(csv_quoting_follows_rfc4180),
		cmocka_unit_test(bad_csv_rows_fail_alone),
		cmocka_unit_test(bad_headers_fail_the_manifest),
		cmocka_unit_test(json_lines_rows),
		cmocka_unit_test(paths_stay_inside_the_folder),
		cmocka_unit_test(rows_become_requests),
		cmocka_unit_test(a_sample_runs_into_one_line),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
