/* vlog.h: absorbance from transmittance for many points at once, with a
 * vector natural logarithm that gives the same bits as the C library's log(). */
#ifndef IRR_VLOG_H
#define IRR_VLOG_H

#include <stddef.h>

/* For i < n: y[i] = y[i] > 0 ? -log(y[i]) * scale : nonpos, bit for bit
 * the same as that plain C expression (log() from libm). Eight or four
 * points at a time where the processor and the C library allow it (see
 * vlog.c), otherwise exactly that loop. */
void irr_vlog__neglog_scaled(double *y, size_t n, double scale, double nonpos);

/* Which path irr_vlog__neglog_scaled takes: 8 (AVX-512), 4 (AVX2+FMA) or
 * 1 (plain C). For tests and tools. */
int irr_vlog__lanes(void);

/* The same with the path forced (8, 4 or 1; a path the processor lacks
 * runs as 1), for tests that compare each path against log(). */
void irr_vlog__neglog_scaled_with(int lanes, double *y, size_t n, double scale, double nonpos);

#endif
