/* irrecon/peaks.h: the "pick peaks" stage. From a normalised spectrum
 * (absorbance, ascending cm-1) to a list of observed bands; also reads
 * peak lists that users already have (CSV or JSON). */
#ifndef IRRECON_PEAKS_H
#define IRRECON_PEAKS_H

#include <stddef.h>
#include "irrecon/common.h"
#include "irrecon/spectrum.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct irr_peak {
	double position;     /* cm-1; for a saturated peak the centre of its range */
	double height;       /* absorbance above the baseline */
	double area;         /* absorbance x cm-1 above the baseline */
	double fwhm;         /* full width at half height, cm-1 (0 = unknown) */
	double rel_height;   /* height / height of the strongest peak, 0..1 */
	double low, high;    /* extent in cm-1 (half-height span, or saturated range) */
	irr_intensity intensity; /* strong / medium / weak, relative to the strongest */
	int broad;           /* width beyond the broad threshold */
	int shoulder;        /* found from the second derivative, not a maximum */
	int saturated;       /* position/height/shape not measurable */
	/* Added after the first contract: */
	double prominence;   /* height above the higher of the two valleys that
	                      * part it from higher bands (= height for a band
	                      * standing alone); 0 for shoulders and saturated */
} irr_peak;

typedef struct irr_peak_options {
	double smooth_cm;      /* Savitzky-Golay window width in cm-1 (0 = auto) */
	double min_snr;        /* prominence must exceed min_snr x noise */
	double min_rel_height; /* ignore peaks below this fraction of the strongest */
	double strong_frac;    /* rel_height >= strong_frac -> strong */
	double medium_frac;    /* rel_height >= medium_frac -> medium, else weak */
	double broad_cm;       /* fwhm >= broad_cm -> broad */
	int shoulders;         /* look for shoulders (second derivative) */
	int baseline;          /* remove the baseline first */
} irr_peak_options;

void irr_peak_options_init(irr_peak_options *o);

/* Overlapping bands. Measured with the defaults at 1 cm-1 spacing, FWHM w
 * = 12 cm-1, SNR 500 (tests/unit/test_peaks.c): a pair counts as resolved
 * when each band is reported (maximum or shoulder) within 0.3 x their
 * separation of its true position; the maxima of a close pair are pulled
 * toward each other, by up to 25 % of the separation.
 *   equal Lorentzians: resolved down to 0.70 w, as two maxima (from 0.45
 *     to 0.65 w they show as one maximum at the pair's centre plus a
 *     shoulder; below 0.45 w as one band);
 *   equal Gaussians: down to 1.00 w;
 *   Lorentzians 2:1 in height: down to 0.55 w (two maxima from 1.1 w;
 *     below, the weaker as a shoulder, within 0.3 cm-1 of its position);
 *   Gaussians 2:1: down to 0.85 w (two maxima from 1.25 w).
 * The separations (units of w) are these constants. */
#define IRR_PEAKS_RESOLVE_LORENTZ 0.70
#define IRR_PEAKS_RESOLVE_GAUSS 1.00
#define IRR_PEAKS_RESOLVE_LORENTZ_2TO1 0.55
#define IRR_PEAKS_RESOLVE_GAUSS_2TO1 0.85

typedef struct irr_peaklist irr_peaklist;

/* Picks peaks from a normalised spectrum (irr_spectrum_normalise first;
 * a spectrum that is not normalised is an error). Caller owns *out. */
int irr_peaks_pick(irr_peaklist **out, const irr_spectrum *s,
                   const irr_peak_options *o, irr_error *err);
/* Reads a peak list: CSV (position[,intensity[,width]], header optional;
 * intensity may be a number or a class name) or JSON (an array of numbers
 * or of objects with "position", "intensity", "width"). Caller owns *out. */
int irr_peaklist_read_file(irr_peaklist **out, const char *path, irr_error *err);
int irr_peaklist_read_memory(irr_peaklist **out, const char *data, size_t len,
                             const char *name, irr_error *err);
void irr_peaklist_free(irr_peaklist *pl);

/* Peaks sorted by position, highest wavenumber first. Borrowed pointers. */
size_t irr_peaklist_count(const irr_peaklist *pl);
const irr_peak *irr_peaklist_get(const irr_peaklist *pl, size_t i);
double irr_peaklist_noise(const irr_peaklist *pl);   /* absorbance; 0 for lists */
/* Measured range (cm-1). For a read peak list it is 400-4000 unless the
 * list says otherwise. */
void irr_peaklist_range(const irr_peaklist *pl, double *low, double *high);
/* Saturated ranges copied from the spectrum (none for peak lists). */
size_t irr_peaklist_saturated_count(const irr_peaklist *pl);
void irr_peaklist_saturated_range(const irr_peaklist *pl, size_t i,
                                  double *low, double *high);

#ifdef __cplusplus
}
#endif
#endif
