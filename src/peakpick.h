/* peakpick.h: internals of the peak stage shared by peaks.c (picking),
 * sgfilter.c (Savitzky-Golay smoothing and derivatives), peaklist.c
 * (reading peak lists) and axischeck.c. Not installed. */
#ifndef IRRECON_PEAKPICK_H
#define IRRECON_PEAKPICK_H

#include <stddef.h>
#include "irrecon/common.h"
#include "irrecon/peaks.h"

struct irr_peaklist {
	irr_peak *peaks;
	size_t count, cap;
	double noise;              /* absorbance; 0 for lists read from files */
	double range_low, range_high;
	double *sat;               /* saturated ranges as low,high pairs */
	size_t nsat;
	/* What the picker used (0 for lists): for reports and tests. */
	double smooth_cm;          /* Savitzky-Golay window actually used, cm-1 */
	double spacing;            /* point spacing the picker worked on, cm-1 */
};

/* A new empty list (range 400-4000), or NULL when out of memory. */
irr_peaklist *irr_peaks__new(void);
/* Appends a copy of *p; IRR_OK or IRR_ENOMEM. */
int irr_peaks__push(irr_peaklist *pl, const irr_peak *p);
/* Sorts by position, highest wavenumber first. */
void irr_peaks__sort(irr_peaklist *pl);
/* Sets rel_height, intensity and broad of every peak from heights/widths
 * already stored, with the class thresholds of `o`. Peaks whose height is 0
 * and whose intensity is already set keep their class. */
void irr_peaks__classify(irr_peaklist *pl, const irr_peak_options *o);
/* The strongest unsaturated height of p[0..n-1] (saturated ones only when
 * nothing else is there): what the relative floor is taken against. */
double irr_peaks__reference_height(const irr_peak *p, size_t n);

/* Savitzky & Golay, Anal. Chem. 36 (1964) 1627: least-squares polynomial
 * of degree `order` over 2*half+1 equally spaced points, evaluated (or its
 * `deriv`-th derivative, per point index) at every point. The ends use the
 * end windows' polynomials evaluated off-centre (no padding). out must not
 * alias y. Returns IRR_OK, IRR_EINPUT (bad parameters) or IRR_ENOMEM. */
int irr_sg__apply(const double *y, size_t n, int half, int order, int deriv,
                  double *out);
/* Smoothing (out s0) and second derivative (s2) of the same window and
 * degree in one pass (order >= 2, 2*half+1 <= n, half <= 50). */
int irr_sg__smooth_d2(const double *y, size_t n, int half, int order, double *s0,
                      double *s2);
/* Coefficients of the centre window into c[0..2*half] (c[half] is the
 * centre point). Returns IRR_OK or IRR_EINPUT. */
int irr_sg__coefficients(int half, int order, int deriv, int at, double *c);
/* sqrt(sum c^2) of the centre window: how white noise of unit sd comes
 * out of the filter. */
double irr_sg__noise_gain(int half, int order, int deriv);

/* Picks peaks from plain arrays: x strictly ascending (cm-1), y absorbance.
 * `sat` holds nsat low,high pairs (cm-1) of saturated ranges; they become
 * saturated peaks. `name` is used in messages. Caller owns *out. */
int irr_peaks__pick_xy(irr_peaklist **out, const double *x, const double *y,
                       size_t n, const double *sat, size_t nsat,
                       const irr_peak_options *o, const char *name,
                       irr_error *err);

#endif
