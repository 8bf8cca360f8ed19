/* fuzz_request.c: libFuzzer target for JSON check requests (the notebook
 * step, `check --request`): parse, read back every field, deep-copy, and
 * run the request with the bundled tables, then write its text, JSON and
 * SVG reports. A request with an inline spectrum or peak list thereby takes
 * fuzzed data through the whole check (peaks, reconciliation, verdict,
 * reports); one naming files fails on them (its base folder does not
 * exist). Seeds: tests/fuzz-seeds/request/. */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "fuzz.h"
#include "irrecon/reconcile.h"
#include "irrecon/report.h"
#include "irrecon/request.h"
#include "irrecon/tables.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static irr_tables *tables;

static void load_tables(void)
{
	irr_error err;
	const char *dir = getenv("IRRECON_TABLES");
	if (tables)
		return;
	irr_error_clear(&err);
	if (irr_tables_load(&tables, dir ? dir : IRR_SOURCE_TABLES_DIR, NULL, 0, &err) != IRR_OK)
		abort(); /* the bundled tables must load: nothing to fuzz without them */
}

static void run(const irr_request *r)
{
	irr_check *c = NULL;
	irr_error err;
	int rc;
	char *text = NULL;
	irr_svg_options so;

	irr_error_clear(&err);
	rc = irr_request_run(&c, r, tables, &err);
	fuzz_check_error(rc, &err);
	if (rc != IRR_OK) {
		if (c)
			abort(); /* request.h: *out is NULL on failure */
		return;
	}
	if (irr_report_text(&text, c) == IRR_OK)
		free(text);
	text = NULL;
	if (irr_report_json(&text, c) == IRR_OK)
		free(text);
	text = NULL;
	irr_svg_options_init(&so);
	if (irr_report_svg(&text, c, &so) == IRR_OK)
		free(text);
	irr_check_free(c);
}

static void walk(const irr_request *r)
{
	const double *x, *y;
	irr_yunits u;
	size_t n;
	const char *s;
	volatile size_t sink = 0;

	s = irr_request_structure(r);
	sink += s ? strlen(s) : 0;
	s = irr_request_sample(r);
	sink += s ? strlen(s) : 0;
	s = irr_request_spectrum_file(r);
	sink += s ? strlen(s) : 0;
	s = irr_request_peaks_file(r);
	sink += s ? strlen(s) : 0;
	n = irr_request_spectrum_xy(r, &x, &y, &u);
	for (size_t i = 0; i < n; i++) /* ASan checks the arrays are n long */
		sink += (size_t)(x[i] != y[i]);
	for (size_t i = 0; i < irr_request_starting_material_count(r); i++)
		sink += strlen(irr_request_starting_material(r, i));
	for (size_t i = 0; i < irr_request_reagent_count(r); i++)
		sink += strlen(irr_request_reagent(r, i));
	for (size_t i = 0; i < irr_request_solvent_count(r); i++)
		sink += strlen(irr_request_solvent(r, i));
	for (size_t i = 0; i < irr_request_extra_table_count(r); i++)
		sink += strlen(irr_request_extra_table(r, i));
	(void)sink;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	size_t len = size;
	char *s = fuzz_copy(data, &len);
	irr_request *r = NULL, *copy = NULL;
	irr_error err;
	int rc;

	load_tables();
	irr_error_clear(&err);
	rc = irr_request_parse(&r, s, len, "fuzz-request.json", "/nonexistent-fuzz-base", &err);
	fuzz_check_error(rc, &err);
	if (rc == IRR_OK) {
		if (!r)
			abort();
		walk(r);
		irr_error_clear(&err);
		rc = irr_request_clone(&copy, r, &err);
		fuzz_check_error(rc, &err);
		if (rc == IRR_OK)
			walk(copy);
		if (irr_request_spectrum_file(r)) {
			char *abs = NULL;
			irr_error_clear(&err);
			rc = irr_request_resolve(&abs, r, irr_request_spectrum_file(r), &err);
			fuzz_check_error(rc, &err);
			free(abs);
		}
		run(r);
	} else if (r) {
		abort();
	}
	irr_request_free(copy);
	irr_request_free(r);
	free(s);
	return 0;
}
