/* fuzz_csv.c: libFuzzer target for the CSV/TSV spectrum reader, through the
 * public entry point the program uses (format detection, binary and UTF-16
 * refusal, limits). Each input is read twice, with the default options and
 * with decimal commas, percent transmittance and a micrometre X axis, since
 * those take different paths through the parser; what is accepted is
 * normalised too. Seeds: tests/fuzz-seeds/csv/. */
#include <stdint.h>
#include <stdlib.h>

#include "fuzz.h"
#include "irrecon/spectrum.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static void one(const char *s, size_t len, int variant)
{
	irr_read_options o;
	irr_spectrum *sp = NULL;
	irr_error err;
	int rc;

	irr_read_options_init(&o);
	o.max_points = 200000;
	o.max_bytes = FUZZ_MAX_INPUT;
	if (variant) {
		o.decimal_comma = 1;
		o.x_micrometers = 1;
		o.y_units = IRR_Y_PERCENT_T;
	}
	irr_error_clear(&err);
	rc = irr_spectrum_read_memory(&sp, s, len, "fuzz.csv", &o, &err);
	fuzz_check_error(rc, &err);
	if (rc == IRR_OK) {
		if (!sp || irr_spectrum_points(sp) > o.max_points)
			abort();
		irr_error_clear(&err);
		rc = irr_spectrum_normalise(sp, &err);
		fuzz_check_error(rc, &err);
	} else if (sp) {
		abort();
	}
	irr_spectrum_free(sp);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	size_t len = size;
	char *s = fuzz_copy(data, &len);
	one(s, len, 0);
	one(s, len, 1);
	free(s);
	return 0;
}
