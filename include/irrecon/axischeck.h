/* irrecon/axischeck.h: checks an instrument's wavenumber axis against a
 * polystyrene film, as quality-control labs do before trusting band
 * positions: finds the reference bands in a measured polystyrene spectrum
 * and reports each one's deviation and whether it lies within tolerance.
 *
 * Reference positions and tolerances: European Pharmacopoeia 2.2.24
 * (Absorption spectrophotometry, infrared) / Japanese Pharmacopoeia
 * (Infrared spectrophotometry): 3060.0, 2849.5, 1942.9 cm-1 within
 * +-1.5 cm-1; 1601.2, 1583.0, 1154.5, 1028.3 cm-1 within +-1.0 cm-1.
 * They apply to a transmission film (about 35-50 um); an ATR spectrum of
 * polystyrene shows strong bands shifted to lower wavenumber (anomalous
 * dispersion of the refractive index), so an ATR file can fail although
 * the axis is right. */
#ifndef IRRECON_AXISCHECK_H
#define IRRECON_AXISCHECK_H

#include <stddef.h>
#include "irrecon/common.h"
#include "irrecon/spectrum.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum irr_axis_status {
	IRR_AXIS_WITHIN = 0,   /* resolved, deviation within tolerance */
	IRR_AXIS_OUTSIDE,      /* resolved, deviation beyond tolerance */
	IRR_AXIS_NOT_FOUND     /* not resolved in this file: neither pass nor fail */
} irr_axis_status;

/* Static names: "within", "outside", "not_found". */
const char *irr_axis_status_name(irr_axis_status s);

typedef struct irr_axis_band {
	double reference;      /* cm-1 */
	double tolerance;      /* +- cm-1 */
	double found;          /* cm-1 rounded to 0.1 as the references are (0 when not found) */
	double deviation;      /* found - reference, judged inclusive (0 when not found) */
	irr_axis_status status;
	const char *reason;    /* static; why not found: "outside measured range",
	                        * "saturated band", "only a shoulder", "no band
	                        * above noise" ("" when found) */
} irr_axis_band;

typedef struct irr_axis_options {
	double search_cm;      /* a band is looked for within +- this (default 6) */
	double min_snr;        /* its prominence must exceed min_snr x noise (default 5) */
} irr_axis_options;

void irr_axis_options_init(irr_axis_options *o);

typedef struct irr_axis_report irr_axis_report;

/* Checks a normalised spectrum (irr_spectrum_normalise first). `o` may be
 * NULL for defaults. Caller owns *out (free with irr_axis_report_free). */
int irr_axis_check(irr_axis_report **out, const irr_spectrum *s,
                   const irr_axis_options *o, irr_error *err);
void irr_axis_report_free(irr_axis_report *r);

/* Bands in reference order (highest wavenumber first). Borrowed pointer. */
size_t irr_axis_report_count(const irr_axis_report *r);
const irr_axis_band *irr_axis_report_band(const irr_axis_report *r, size_t i);
size_t irr_axis_report_resolved(const irr_axis_report *r);
size_t irr_axis_report_outside(const irr_axis_report *r);
/* 1 when at least one band is resolved and every resolved band is within
 * its tolerance; 0 otherwise. Bands not found never count as passed. */
int irr_axis_report_passed(const irr_axis_report *r);

#ifdef __cplusplus
}
#endif
#endif
