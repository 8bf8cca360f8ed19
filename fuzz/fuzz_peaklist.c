/* fuzz_peaklist.c: libFuzzer target for the peak-list reader (CSV and
 * JSON lists of position[, intensity[, width]]). Seeds:
 * tests/fuzz-seeds/peaklist/. */
#include <math.h>
#include <stdint.h>
#include <stdlib.h>

#include "fuzz.h"
#include "irrecon/peaks.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	size_t len = size;
	char *s = fuzz_copy(data, &len);
	irr_peaklist *pl = NULL;
	irr_error err;
	int rc;

	irr_error_clear(&err);
	rc = irr_peaklist_read_memory(&pl, s, len, "fuzz.peaks", &err);
	fuzz_check_error(rc, &err);
	if (rc == IRR_OK) {
		double lo, hi;
		size_t n;
		if (!pl)
			abort();
		n = irr_peaklist_count(pl);
		for (size_t i = 0; i < n; i++) {
			const irr_peak *p = irr_peaklist_get(pl, i);
			/* An accepted list holds only finite positions, sorted
			 * highest first (peaks.h). */
			if (!p || !isfinite(p->position))
				abort();
			if (i && p->position > irr_peaklist_get(pl, i - 1)->position)
				abort();
		}
		irr_peaklist_range(pl, &lo, &hi);
		if (!(lo < hi))
			abort();
	} else if (pl) {
		abort();
	}
	irr_peaklist_free(pl);
	free(s);
	return 0;
}
