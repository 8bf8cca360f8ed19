/* fuzz_request.c: libFuzzer target for JSON check requests (the notebook
 * step, `check --request`): parse, read back every field, and deep-copy.
 * Running the check itself is left to the other targets (its inputs are
 * files). Seeds: tests/fuzz-seeds/request/. */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "fuzz.h"
#include "irrecon/request.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

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
	} else if (r) {
		abort();
	}
	irr_request_free(copy);
	irr_request_free(r);
	free(s);
	return 0;
}
