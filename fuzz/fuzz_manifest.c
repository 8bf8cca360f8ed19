/* fuzz_manifest.c: libFuzzer target for batch manifests (CSV and JSON
 * Lines): read the whole manifest, then build every row's request with
 * path confinement on, which resolves the rows' paths against a base
 * folder. Each input is read once as CSV, once as JSON Lines and once with
 * detection. Seeds: tests/fuzz-seeds/manifest/. */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "fuzz.h"
#include "irrecon/batch.h"
#include "irrecon/request.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static void one(const char *s, size_t len, irr_manifest_format fmt)
{
	irr_manifest *m = NULL;
	irr_error err;
	int rc;

	irr_error_clear(&err);
	rc = irr_manifest_read_memory(&m, s, len, "fuzz-manifest", "/nonexistent-fuzz-base", fmt, &err);
	fuzz_check_error(rc, &err);
	if (rc == IRR_OK) {
		size_t n;
		if (!m)
			abort();
		n = irr_manifest_count(m);
		for (size_t i = 0; i < n; i++) {
			const irr_manifest_sample *row = irr_manifest_get(m, i);
			irr_request *r = NULL;
			if (!row || row->index != i)
				abort();
			if (row->failed) {
				if (!row->error)
					abort();
				fuzz_check_error(row->error->code, row->error);
			} else if (row->error) {
				abort(); /* batch.h: NULL unless the row failed */
			}
			for (size_t k = 0; k < row->n_starting_materials; k++)
				if (!row->starting_materials[k])
					abort();
			for (size_t k = 0; k < row->n_solvents; k++)
				if (!row->solvents[k])
					abort();
			irr_error_clear(&err);
			rc = irr_manifest_sample_request(&r, m, i, NULL, 0, &err);
			fuzz_check_error(rc, &err);
			if (rc != IRR_OK && r)
				abort();
			irr_request_free(r);
		}
		if (irr_manifest_get(m, n) != NULL)
			abort();
	} else if (m) {
		abort();
	}
	irr_manifest_free(m);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	size_t len = size;
	char *s = fuzz_copy(data, &len);
	one(s, len, IRR_MANIFEST_CSV);
	one(s, len, IRR_MANIFEST_JSONL);
	one(s, len, IRR_MANIFEST_AUTO);
	free(s);
	return 0;
}
