/* fuzz_jcamp.c: libFuzzer target for the JCAMP-DX reader (all ASDF forms,
 * compound LINK files) through the public entry point the program uses
 * (format detection, binary and UTF-16 refusal, limits), followed by
 * normalisation and peak picking of whatever it accepts, so that odd but
 * valid spectra reach those stages too. The block lister is fuzzed on the
 * same bytes. Seeds: tests/fuzz-seeds/jcamp/. Run with tools/fuzz. */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "fuzz.h"
#include "irrecon/peaks.h"
#include "irrecon/spectrum.h"
#include "jcamp.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	size_t len = size;
	char *s = fuzz_copy(data, &len);
	irr_read_options o;
	irr_spectrum *sp = NULL;
	irr_block_info *blocks = NULL;
	size_t nblocks = 0;
	irr_error err;
	int rc;

	irr_read_options_init(&o);
	/* Small limits keep each run fast; DUP counts like "1V99999999" must
	 * hit them rather than allocate. */
	o.max_points = 200000;
	o.max_bytes = FUZZ_MAX_INPUT;

	/* The internal lister wants text without NULs (the public entry
	 * points refuse those first). */
	if (strlen(s) == len) {
		irr_error_clear(&err);
		rc = irr_jcamp__list_blocks(&blocks, &nblocks, s, len, "fuzz.jdx", &err);
		fuzz_check_error(rc, &err);
		free(blocks);
	}

	irr_error_clear(&err);
	rc = irr_spectrum_read_memory(&sp, s, len, "fuzz.jdx", &o, &err);
	fuzz_check_error(rc, &err);
	if (rc == IRR_OK) {
		irr_peaklist *pl = NULL;
		if (!sp)
			abort();
		if (irr_spectrum_points(sp) > o.max_points)
			abort();
		irr_error_clear(&err);
		rc = irr_spectrum_normalise(sp, &err);
		fuzz_check_error(rc, &err);
		if (rc == IRR_OK) {
			irr_peak_options po;
			irr_peak_options_init(&po);
			irr_error_clear(&err);
			rc = irr_peaks_pick(&pl, sp, &po, &err);
			fuzz_check_error(rc, &err);
			irr_peaklist_free(pl);
		}
	} else if (sp) {
		abort(); /* *out must be NULL on failure */
	}
	irr_spectrum_free(sp);
	free(s);
	return 0;
}
