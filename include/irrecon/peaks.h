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

/* Every threshold of the picker. Defaults (irr_peak_options_init), chosen
 * so that ATR, film, solution and digitised spectra work untuned (checked
 * on ../shared/ir-reference/ and the synthetic tests):
 *   smooth_cm 0 (auto: a 7 cm-1 window of at least 7 points, degree 4;
 *     narrow bands are measured on the unsmoothed trace, so the window
 *     never widens them); min_snr 5; min_rel_height 0.01;
 *   intensity classes by height relative to the strongest band (a
 *     saturated band counts as at least as strong as anything measured):
 *     strong >= 0.33, medium >= 0.10, weak below (our choice, in line with
 *     the usual s/m/w reading of a spectrum; common practice);
 *   broad_cm 75 (condensed-phase C-H, C=O and ring bands are 5-30 cm-1
 *     wide, more where neighbours overlap and widths come out high;
 *     hydrogen-bonded O-H and N-H, carboxylic O-H, ammonium 100 and more;
 *     common practice); shoulders on; baseline on (rubber band).
 * Noise is the robust sd of the raw trace (irr_peaklist_noise), measured
 * per block of 96 points so that noisier stretches get their own level. */
typedef struct irr_peak_options {
	double smooth_cm;      /* Savitzky-Golay window width in cm-1 (0 = auto) */
	double min_snr;        /* a maximum's prominence must exceed min_snr x
	                        * noise (raw sd); a shoulder's second-derivative
	                        * lobe 1.6 x min_snr x its own noise, and its
	                        * height 1.6 x min_snr x noise */
	double min_rel_height; /* ignore maxima whose prominence (shoulders: whose
	                        * height) is below this fraction of the strongest
	                        * band's height; saturated bands are never dropped */
	double strong_frac;    /* rel_height >= strong_frac -> strong */
	double medium_frac;    /* rel_height >= medium_frac -> medium, else weak */
	double broad_cm;       /* fwhm >= broad_cm -> broad (saturated: the
	                        * clipped range's width) */
	int shoulders;         /* look for shoulders (second derivative) */
	int baseline;          /* remove the baseline first (0: absorbance 0 is
	                        * the baseline) */
	/* Added after the first contract: */
	double shoulder_factor; /* a shoulder needs shoulder_factor times the
	                         * maxima's signal-to-noise (default 1.6: the
	                         * second derivative amplifies noise) */
	double shoulder_depth;  /* and a second-derivative lobe at least this
	                         * fraction as deep as the nearest maximum's
	                         * (default 0.10; keeps ripple of low-noise,
	                         * digitised data out) */
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
 * a spectrum that is not normalised is an error). `o` may be NULL for the
 * defaults. Saturated ranges of the spectrum become saturated peaks
 * (position the range's centre, low/high the range, height the clipped
 * level above the baseline as a lower bound, fwhm and area 0 = unknown,
 * intensity strong); they are never dropped. Shoulders have fwhm and area
 * 0 (unknown) and low = high = position. Caller owns *out. */
int irr_peaks_pick(irr_peaklist **out, const irr_spectrum *s,
                   const irr_peak_options *o, irr_error *err);
/* Reads a peak list: CSV/TSV (position[,intensity[,width]], ',' ';' tab
 * or blanks between fields, '#' comments, header optional; the measured
 * range from a line "range,LO,HI" or a comment "# range: LO HI") or JSON
 * (an array of numbers or of objects with "position", "intensity",
 * "width" or "fwhm", "height"; or an object {"range": [lo, hi], "peaks":
 * [...]}; irrecon's own irrecon.peaks/1 output reads back).
 * Intensity: a number is a band height, bigger = stronger (absorbance or
 * any relative scale), classed like picked peaks; in a CSV whose header
 * names the column transmittance or %T, numbers are transmittance (a
 * fraction, or percent when any exceeds 1.5) and become A = -log10 T; a
 * class name
 * (s, m, w, vs, vw, strong, medium, weak, variable) sets the class, with
 * height 0 and rel_height 1.0 / 0.2 / 0.05 (strong / medium / weak); no
 * intensity at all leaves IRR_INT_NONE (unknown). Width is the FWHM in
 * cm-1 (0 = unknown). At most 10,000 peaks (IRR_ELIMIT beyond). Errors
 * name the file and line. Caller owns *out. */
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
/* Savitzky-Golay window the picker used, cm-1 (0 for lists read from
 * files); with the auto setting it depends on the point spacing. */
double irr_peaklist_smoothing(const irr_peaklist *pl);
/* Saturated ranges copied from the spectrum (none for peak lists). */
size_t irr_peaklist_saturated_count(const irr_peaklist *pl);
void irr_peaklist_saturated_range(const irr_peaklist *pl, size_t i,
                                  double *low, double *high);

#ifdef __cplusplus
}
#endif
#endif
