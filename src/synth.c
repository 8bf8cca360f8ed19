/* synth.c: the spectrum synthesizer. Predicted bands become Lorentzian
 * lines; mixtures are sums weighted by share; then a linear baseline,
 * atmospheric CO2 and seeded Gaussian noise are added. */
#include "irrecon/synth.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "irrecon/perceive.h"
#include "irrecon/structure.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

/* Relative heights per intensity class and widths per shape class: a
 * rendering of the usual handbook classes (s, m, w; sharp, broad), chosen
 * by common practice, not measured. */
#define H_STRONG 1.0
#define H_MEDIUM 0.55
#define H_WEAK 0.2
#define H_VARIABLE 0.4

/* Carbon dioxide: the antisymmetric stretch (nu3, 2349 cm-1) shows at
 * ordinary resolution as its P and R branch envelopes near 2340 and 2360;
 * the bend (nu2) as a sharp band at 667 cm-1 (Herzberg, Infrared and Raman
 * Spectra of Polyatomic Molecules, 1945; from memory). */
#define CO2_R_BRANCH 2360.0
#define CO2_P_BRANCH 2340.0
#define CO2_BEND 667.0
#define CO2_BRANCH_FWHM 14.0
#define CO2_BEND_FWHM 4.0
#define CO2_BEND_REL 0.6

/* ATR: the penetration depth of the evanescent wave is proportional to the
 * wavelength (Harrick, Internal Reflection Spectroscopy, 1967), so band
 * absorbance scales as 1/wavenumber against a transmission spectrum. The
 * reference point only fixes the scale, which is renormalised anyway. */
#define ATR_REFERENCE_CM 1000.0

void irr_synth_options_init(irr_synth_options *o)
{
	memset(o, 0, sizeof *o);
	o->low = 400.0;
	o->high = 4000.0;
	o->spacing = 1.0;
	o->phase = IRR_PHASE_CONDENSED;
	o->sampling = IRR_SAMPLING_ATR;
	o->max_absorbance = 0.8;
	o->fwhm_sharp = 12.0;
	o->fwhm_broad = 150.0;
	o->fwhm_very_broad = 500.0;
	o->seed = 1;
	o->y_units = IRR_Y_ABSORBANCE;
}

double irr_synth_lorentzian(double x, double x0, double fwhm, double height)
{
	double g = 0.5 * fwhm, d = x - x0;
	return height * g * g / (d * d + g * g);
}

double irr_synth_class_height(irr_intensity v)
{
	switch (v) {
	case IRR_INT_STRONG: return H_STRONG;
	case IRR_INT_MEDIUM: return H_MEDIUM;
	case IRR_INT_WEAK: return H_WEAK;
	case IRR_INT_VARIABLE: return H_VARIABLE;
	default: return 0.0;
	}
}

double irr_synth_class_fwhm(irr_shape s, const irr_synth_options *o)
{
	irr_synth_options def;
	if (!o) {
		irr_synth_options_init(&def);
		o = &def;
	}
	switch (s) {
	case IRR_SHAPE_BROAD: return o->fwhm_broad;
	case IRR_SHAPE_VERY_BROAD: return o->fwhm_very_broad;
	default: return o->fwhm_sharp;
	}
}

/* A Lorentzian only matters within a few hundred widths of its centre;
 * beyond that its tail is below 1e-5 of its height, so the loop is cut there
 * to keep a 4000-point spectrum with 40 bands cheap. */
static void add_line(double *y, const double *x, size_t n, double x0,
                     double fwhm, double h)
{
	double reach = fwhm * 300.0;
	if (h == 0.0 || fwhm <= 0.0)
		return;
	for (size_t i = 0; i < n; i++)
		if (fabs(x[i] - x0) <= reach)
			y[i] += irr_synth_lorentzian(x[i], x0, fwhm, h);
}

static double atr_factor(double wn, const irr_synth_options *o)
{
	if (o->sampling != IRR_SAMPLING_ATR || wn <= 0.0)
		return 1.0;
	return ATR_REFERENCE_CM / wn;
}

void irr_synth_add_prediction(double *y, const double *x, size_t n,
                              const irr_prediction *p, double scale,
                              const irr_synth_options *o)
{
	irr_synth_options def;
	size_t nb = irr_prediction_count(p);
	if (!o) {
		irr_synth_options_init(&def);
		o = &def;
	}
	for (size_t b = 0; b < nb; b++) {
		const irr_band *bd = irr_prediction_band(p, b);
		double pos = bd->typical, h, w;
		if (!(pos > 0.0) || pos < bd->low || pos > bd->high)
			pos = 0.5 * (bd->low + bd->high);
		h = irr_synth_class_height(bd->intensity) * scale * atr_factor(pos, o);
		w = irr_synth_class_fwhm(bd->shape, o);
		if (bd->shape == IRR_SHAPE_DOUBLET) {
			/* Two sharp components a quarter of the window either side of
			 * the typical position (e.g. the gem-dimethyl 1385/1365 pair). */
			double half = 0.25 * (bd->high - bd->low);
			if (half < 5.0)
				half = 5.0;
			if (half > 50.0)
				half = 50.0;
			add_line(y, x, n, pos + half, w, 0.8 * h);
			add_line(y, x, n, pos - half, w, 0.8 * h);
		} else {
			add_line(y, x, n, pos, w, h);
		}
	}
}

/* splitmix64 (Steele, Lea & Flood, OOPSLA 2014): a small generator whose
 * output is the same on every platform, so a seed names one spectrum. */
static uint64_t splitmix64(uint64_t *state)
{
	uint64_t z = (*state += 0x9E3779B97F4A7C15ull);
	z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ull;
	z = (z ^ (z >> 27)) * 0x94D049BB133111EBull;
	return z ^ (z >> 31);
}

static double uniform01(uint64_t *state)
{
	/* 53 random bits in (0, 1]: never 0, so log() below is finite. */
	return ((double)(splitmix64(state) >> 11) + 1.0) * (1.0 / 9007199254740992.0);
}

/* Box-Muller transform (Box & Muller, Ann. Math. Stat. 29 (1958) 610). */
static double gaussian(uint64_t *state)
{
	double u1 = uniform01(state), u2 = uniform01(state);
	return sqrt(-2.0 * log(u1)) * cos(2.0 * M_PI * u2);
}

static int check_options(const irr_synth_options *o, irr_error *err)
{
	if (!(o->low > 0.0) || !(o->high > o->low) || o->high > 100000.0)
		return irr_error_set(err, IRR_EINPUT, "", 0,
		                     "the range must be 0 < low < high <= 100000 cm-1");
	if (!(o->spacing > 0.0) || (o->high - o->low) / o->spacing > 4.0e6)
		return irr_error_set(err, IRR_EINPUT, "", 0,
		                     "the spacing must be > 0 and give at most 4000000 points");
	if (!(o->max_absorbance > 0.0) || o->max_absorbance > 10.0)
		return irr_error_set(err, IRR_EINPUT, "", 0,
		                     "the peak absorbance must be in (0, 10]");
	if (!(o->fwhm_sharp > 0.0) || !(o->fwhm_broad > 0.0) || !(o->fwhm_very_broad > 0.0))
		return irr_error_set(err, IRR_EINPUT, "", 0, "band widths must be > 0");
	if (!(o->noise >= 0.0) || !(o->co2 >= 0.0) || !isfinite(o->noise) || !isfinite(o->co2) ||
	    !isfinite(o->baseline_low) || !isfinite(o->baseline_high))
		return irr_error_set(err, IRR_EINPUT, "", 0,
		                     "noise and CO2 must be >= 0, the baseline finite");
	if (o->y_units != IRR_Y_ABSORBANCE && o->y_units != IRR_Y_TRANSMITTANCE)
		return irr_error_set(err, IRR_EINPUT, "", 0,
		                     "the synthesizer writes absorbance or transmittance");
	return IRR_OK;
}

/* One component's bands, unscaled, added to y with weight `share`. */
static int add_component(double *y, const double *x, size_t n,
                         const irr_synth_component *c, size_t idx,
                         const irr_tables *t, const irr_synth_options *o,
                         irr_error *err)
{
	irr_molecule *m = NULL;
	irr_inventory *inv = NULL;
	irr_prediction *p = NULL;
	irr_predict_options po;
	char what[64];
	int rc;

	if (c->name)
		snprintf(what, sizeof what, "%s", c->name);
	else
		snprintf(what, sizeof what, "component %zu", idx + 1);
	irr_predict_options_init(&po);
	po.phase = o->phase;
	/* Tabulated classes describe transmission spectra; ATR is applied here
	 * as the wavelength factor, so it is not counted twice. */
	po.sampling = IRR_SAMPLING_TRANSMISSION;
	if ((rc = irr_molecule_from_smiles(&m, c->smiles, what, err)) < 0)
		goto done;
	if ((rc = irr_perceive(&inv, m, t, err)) < 0)
		goto done;
	if ((rc = irr_predict(&p, inv, t, &po, err)) < 0)
		goto done;
	irr_synth_add_prediction(y, x, n, p, c->fraction, o);
	rc = IRR_OK;
done:
	irr_prediction_free(p);
	irr_inventory_free(inv);
	irr_molecule_free(m);
	return rc;
}

int irr_synth_mixture(irr_spectrum **out, const irr_synth_component *c,
                      size_t n, const irr_tables *t,
                      const irr_synth_options *o, const char *name,
                      irr_error *err)
{
	irr_synth_options def;
	irr_synth_component *norm = NULL;
	double *x = NULL, *y = NULL, total = 0.0, peak = 0.0;
	size_t np;
	uint64_t state;
	int rc;

	*out = NULL;
	if (!o) {
		irr_synth_options_init(&def);
		o = &def;
	}
	if ((rc = check_options(o, err)) < 0)
		return rc;
	if (n == 0)
		return irr_error_set(err, IRR_EINPUT, "", 0, "no structure to synthesize");
	for (size_t i = 0; i < n; i++) {
		if (!c[i].smiles || !c[i].smiles[0])
			return irr_error_set(err, IRR_EINPUT, "", 0, "component %zu has no SMILES", i + 1);
		if (!(c[i].fraction > 0.0) || !isfinite(c[i].fraction))
			return irr_error_set(err, IRR_EINPUT, "", 0,
			                     "component %zu: the share must be a number > 0", i + 1);
		total += c[i].fraction;
	}
	/* Points land on multiples of the spacing from `low`; the last one is
	 * the highest such point not above `high` (plus rounding slack). */
	np = (size_t)floor((o->high - o->low) / o->spacing + 1e-9) + 1;
	norm = malloc(n * sizeof *norm);
	x = malloc(np * sizeof *x);
	y = calloc(np, sizeof *y);
	if (!norm || !x || !y) {
		rc = irr_error_set(err, IRR_ENOMEM, "", 0, "out of memory");
		goto done;
	}
	for (size_t i = 0; i < np; i++)
		x[i] = o->low + o->spacing * (double)i;
	for (size_t i = 0; i < n; i++) {
		norm[i] = c[i];
		norm[i].fraction = c[i].fraction / total;
		if ((rc = add_component(y, x, np, &norm[i], i, t, o, err)) < 0)
			goto done;
	}
	for (size_t i = 0; i < np; i++)
		if (y[i] > peak)
			peak = y[i];
	if (peak > 0.0)
		for (size_t i = 0; i < np; i++)
			y[i] *= o->max_absorbance / peak;
	if (o->co2 > 0.0) {
		add_line(y, x, np, CO2_R_BRANCH, CO2_BRANCH_FWHM, o->co2);
		add_line(y, x, np, CO2_P_BRANCH, CO2_BRANCH_FWHM, o->co2);
		add_line(y, x, np, CO2_BEND, CO2_BEND_FWHM, CO2_BEND_REL * o->co2);
	}
	state = o->seed;
	for (size_t i = 0; i < np; i++) {
		double f = np > 1 ? (x[i] - x[0]) / (x[np - 1] - x[0]) : 0.0;
		y[i] += o->baseline_low + f * (o->baseline_high - o->baseline_low);
		if (o->noise > 0.0)
			y[i] += o->noise * gaussian(&state);
		if (o->y_units == IRR_Y_TRANSMITTANCE)
			y[i] = pow(10.0, -y[i]);
	}
	rc = irr_spectrum_from_xy(out, x, y, np, o->y_units, name ? name : "synthetic", err);
done:
	free(norm);
	free(x);
	free(y);
	return rc < 0 ? rc : IRR_OK;
}
