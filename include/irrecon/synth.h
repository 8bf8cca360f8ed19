/* irrecon/synth.h: the spectrum synthesizer. Builds the infrared spectrum a
 * structure (or a weighted mixture of structures) should give, from the
 * predicted bands drawn as Lorentzian lines, with optional noise, a sloping
 * baseline and atmospheric CO2. It shows a chemist what to expect, and it
 * makes the demo and example data. */
#ifndef IRRECON_SYNTH_H
#define IRRECON_SYNTH_H

#include <stddef.h>
#include <stdint.h>
#include "irrecon/common.h"
#include "irrecon/spectrum.h"
#include "irrecon/tables.h"
#include "irrecon/predict.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef struct irr_synth_options {
	double low, high;          /* range, cm-1 (default 400-4000) */
	double spacing;            /* point spacing, cm-1 (default 1) */
	irr_phase phase;           /* passed to the predictor (default condensed) */
	irr_sampling sampling;     /* ATR (default) scales bands by the penetration
	                              depth, proportional to wavelength */
	double max_absorbance;     /* height of the highest point of the bands,
	                              before baseline, CO2 and noise (default 0.8) */
	double fwhm_sharp;         /* full widths at half height per shape class, */
	double fwhm_broad;         /* cm-1 (defaults 12, 150, 500) */
	double fwhm_very_broad;
	double noise;              /* RMS of white Gaussian noise, absorbance (0) */
	uint64_t seed;             /* noise seed; same seed, same spectrum */
	double baseline_low;       /* baseline absorbance at the low-wavenumber */
	double baseline_high;      /* and high-wavenumber ends (0, 0) */
	double co2;                /* absorbance of the 2360/2340 CO2 pair (0 = none) */
	irr_yunits y_units;        /* IRR_Y_ABSORBANCE (default) or IRR_Y_TRANSMITTANCE */
} irr_synth_options;

void irr_synth_options_init(irr_synth_options *o);

/* One structure of a mixture. */
typedef struct irr_synth_component {
	const char *smiles;
	double fraction;           /* share of the mixture, > 0; the shares are
	                              rescaled to sum to 1 */
	const char *name;          /* used in error messages; NULL: "component N" */
} irr_synth_component;

/* The Lorentzian (Cauchy) line shape with its maximum `height` at x0 and
 * full width at half maximum `fwhm`:
 *     L(x) = height * (fwhm/2)^2 / ((x - x0)^2 + (fwhm/2)^2). */
double irr_synth_lorentzian(double x, double x0, double fwhm, double height);

/* Relative peak height used for an intensity class (strong 1, medium 0.55,
 * weak 0.2, variable 0.4, none 0) and the FWHM used for a shape class
 * (doublets are two sharp lines). */
double irr_synth_class_height(irr_intensity v);
double irr_synth_class_fwhm(irr_shape s, const irr_synth_options *o);

/* Adds the bands of prediction `p`, each scaled by `scale`, to y[0..n-1]
 * sampled at x[0..n-1] (cm-1). Widths and the ATR factor come from `o`
 * (NULL: defaults); make `p` with sampling TRANSMISSION so that ATR is not
 * counted twice. */
void irr_synth_add_prediction(double *y, const double *x, size_t n,
                              const irr_prediction *p, double scale,
                              const irr_synth_options *o);

/* The spectrum of a mixture: each component is parsed, perceived and
 * predicted with tables `t` (phase from `o`; intensity classes as tabulated
 * for transmission, ATR applied as a wavelength factor), its bands summed
 * with its share, the sum scaled to o->max_absorbance, then baseline, CO2
 * and noise added. The result is an ascending cm-1 spectrum in o->y_units,
 * named `name` (NULL: "synthetic"). A bad SMILES is IRR_EINPUT naming the
 * component (its `name`, else "component N"). Caller owns *out (irr_spectrum_free). */
int irr_synth_mixture(irr_spectrum **out, const irr_synth_component *c,
                      size_t n, const irr_tables *t,
                      const irr_synth_options *o, const char *name,
                      irr_error *err);

#ifdef __cplusplus
}
#endif
#endif
