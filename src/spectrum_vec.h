/* spectrum_vec.h: point-wise passes over spectrum arrays that have vector
 * paths (in spectrum.c, whose IRR_NO_SIMD build is checked against them by
 * tests/scripts/simd_fallback.sh), for the readers. */
#ifndef IRR_SPECTRUM_VEC_H
#define IRR_SPECTRUM_VEC_H

#include <stddef.h>

/* For i < n (n >= 1): x[i] = x0 + i * dx, y[i] *= yf; *rmin and *rmax the
 * lowest and highest y before scaling (a NaN counts only as y[0]; among
 * equal values the first, so a zero extreme has the first zero's sign);
 * *z = 0 if every scaled y is finite, NaN otherwise. Bit for bit the
 * result of the plain loop in spectrum.c on every path. */
void irr_spectrum__scale_points(double *x, double *y, size_t n, double x0, double dx, double yf,
                                double *rmin, double *rmax, double *z);

#endif
