/* irrecon/spectrum_write.h: writing a spectrum out as JCAMP-DX 4.24
 * (McDonald & Wilks, Appl. Spectrosc. 42 (1988) 151) or as two-column CSV.
 * The counterpart of spectrum.h, which reads both forms back. */
#ifndef IRRECON_SPECTRUM_WRITE_H
#define IRRECON_SPECTRUM_WRITE_H

#include <stddef.h>
#include "irrecon/common.h"
#include "irrecon/spectrum.h"

#ifdef __cplusplus
extern "C" {
#endif

/* How the ordinates of ##XYDATA are written. */
typedef enum irr_jcamp_form {
	IRR_JCAMP_AFFN = 0,  /* plain integers separated by blanks */
	IRR_JCAMP_DIFDUP     /* compressed: SQZ first value, DIF differences,
	                        DUP repeat counts, Y-check value on every line */
} irr_jcamp_form;

typedef struct irr_write_options {
	/* Y units to write: IRR_Y_ABSORBANCE, IRR_Y_TRANSMITTANCE (fraction),
	 * IRR_Y_PERCENT_T (CSV only) or IRR_Y_UNKNOWN = as the spectrum holds
	 * them. Absorbance and transmittance convert into each other
	 * (T = 10^-A); other conversions are an error. */
	irr_yunits y_units;
	irr_jcamp_form form;  /* JCAMP-DX only */
	int descending;       /* X from high to low wavenumber (the custom of IR files) */
	int y_decimals;       /* decimals kept of Y (1..9; default 6) */
	const char *title;    /* ##TITLE (NULL: the spectrum's title, else its name) */
	const char *origin;   /* ##ORIGIN (NULL: "irrecon") */
	const char *owner;    /* ##OWNER (NULL: "unknown") */
	const char *comment;  /* one "$$" comment line after the header, or NULL */
} irr_write_options;

/* Defaults: units as held, DIF/DUP, descending, 6 decimals. */
void irr_write_options_init(irr_write_options *o);

/* Writes `s` as one JCAMP-DX 4.24 block (##TITLE ... ##END=), lines of at
 * most 80 characters. Its X must be in cm-1, strictly monotonic: evenly
 * spaced X is written as ##XYDATA=(X++(Y..Y)) with the chosen form; uneven
 * X as ##XYPOINTS=(XY..XY) in AFFN. On success *out is a NUL-terminated
 * malloc'd text owned by the caller (free()), *len its length (may be
 * NULL). On failure *out is NULL and err says why (IRR_EINPUT: units that
 * cannot be converted, transmittance <= 0 asked as absorbance, a spectrum
 * with fewer than 2 points). */
int irr_spectrum_write_jcamp(char **out, size_t *len, const irr_spectrum *s,
                             const irr_write_options *o, irr_error *err);

/* Writes `s` as CSV: a header "wavenumber_cm-1,<units>" (units
 * "absorbance", "transmittance" or "percent_transmittance") and one
 * "x,y" line per point, '.' as the decimal point. Ownership as above. */
int irr_spectrum_write_csv(char **out, size_t *len, const irr_spectrum *s,
                           const irr_write_options *o, irr_error *err);

#ifdef __cplusplus
}
#endif
#endif
