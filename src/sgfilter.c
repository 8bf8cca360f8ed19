/* sgfilter.c: Savitzky-Golay smoothing and derivatives for the peak picker.
 *
 * Method: A. Savitzky, M. J. E. Golay, "Smoothing and Differentiation of
 * Data by Simplified Least Squares Procedures", Anal. Chem. 36 (1964) 1627.
 * The coefficients are computed here for any window and degree from the
 * normal equations of the local polynomial fit (rather than taken from the
 * paper's tables, which have known misprints and stop at 25 points), and
 * the ends are handled by evaluating the first and last full window's
 * polynomial off-centre, so no padding invents data. */
#include "peakpick.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>
/* IRR_NO_SIMD (a build for tests) keeps every vector path out, so that the
 * plain C the other processors run is tested too (tests/scripts/simd_fallback.sh). */
#if defined(__SSE2__) && !defined(IRR_NO_SIMD)
#include <emmintrin.h>
#define IRR_SSE2 1
#endif
#if defined(__x86_64__) && defined(__GNUC__) && !defined(IRR_NO_SIMD)
#include <immintrin.h>
#define SG_AVX 1
#endif

#define SG_MAX_ORDER 8

/* The normal equations G z = w of the local polynomial fit, G_ab = sum_j
 * u_j^(a+b), reduced once by Gaussian elimination with partial pivoting;
 * the row swaps and multipliers are kept so that each right-hand side
 * (one per derivative and evaluation point) is solved with exactly the
 * operations a full elimination would do on it. */
typedef struct sg_fit {
	int half, order, m;
	double g[(SG_MAX_ORDER + 1) * (SG_MAX_ORDER + 1)]; /* upper triangle after reduction */
	double f[(SG_MAX_ORDER + 1) * (SG_MAX_ORDER + 1)]; /* f[col*m+r]: multiplier */
	int piv[SG_MAX_ORDER + 1];
} sg_fit;

static int fit_prepare(sg_fit *F, int half, int order)
{
	int m = order + 1;
	double *g = F->g;
	/* The abscissa is scaled to u = j/half so the normal equations stay
	 * well conditioned for wide windows and high degrees. */
	double scale = (double)half;
	F->half = half;
	F->order = order;
	F->m = m;
	/* Power sums S_p = sum_j u_j^p, p = 0..2*order, by repeated products
	 * (pow() here was the picker's largest cost). */
	{
		double ps[2 * SG_MAX_ORDER + 1];
		for (int q = 0; q <= 2 * order; q++)
			ps[q] = 0.0;
		for (int j = -half; j <= half; j++) {
			double u = (double)j / scale, t = 1.0;
			for (int q = 0; q <= 2 * order; q++) {
				ps[q] += t;
				t *= u;
			}
		}
		for (int a = 0; a < m; a++)
			for (int b = 0; b < m; b++)
				g[a * m + b] = ps[a + b];
	}
	for (int col = 0; col < m; col++) {
		int piv = col;
		for (int r = col + 1; r < m; r++)
			if (fabs(g[r * m + col]) > fabs(g[piv * m + col]))
				piv = r;
		if (fabs(g[piv * m + col]) < 1e-300)
			return -1;
		F->piv[col] = piv;
		if (piv != col)
			for (int k = 0; k < m; k++) {
				double t = g[col * m + k];
				g[col * m + k] = g[piv * m + k];
				g[piv * m + k] = t;
			}
		for (int r = col + 1; r < m; r++) {
			double f = g[r * m + col] / g[col * m + col];
			F->f[col * m + r] = f;
			if (f == 0.0)
				continue;
			for (int k = col; k < m; k++)
				g[r * m + k] -= f * g[col * m + k];
		}
	}
	return 0;
}

/* Coefficients c[0..2*half] of the `deriv`-th derivative (per point index)
 * of the fit, evaluated at offset `at` from the window's centre. */
static void fit_coefficients(const sg_fit *F, int deriv, int at, double *c)
{
	int m = F->m, half = F->half;
	const double *g = F->g;
	double w[SG_MAX_ORDER + 1], scale = (double)half;
	/* w_k = d^deriv/du^deriv u^k at u = at/half. */
	{
		double u = (double)at / scale;
		for (int k = 0; k < m; k++) {
			if (k < deriv) {
				w[k] = 0.0;
				continue;
			}
			double f = 1.0, t = 1.0;
			for (int q = 0; q < deriv; q++)
				f *= (double)(k - q);
			for (int q = 0; q < k - deriv; q++)
				t *= u;
			w[k] = f * t;
		}
	}
	for (int col = 0; col < m; col++) {
		int piv = F->piv[col];
		if (piv != col) {
			double t = w[col];
			w[col] = w[piv];
			w[piv] = t;
		}
		for (int r = col + 1; r < m; r++) {
			double f = F->f[col * m + r];
			if (f == 0.0)
				continue;
			w[r] -= f * w[col];
		}
	}
	for (int r = m - 1; r >= 0; r--) {
		double s = w[r];
		for (int k = r + 1; k < m; k++)
			s -= g[r * m + k] * w[k];
		w[r] = s / g[r * m + r];
	}
	for (int j = -half; j <= half; j++) {
		double u = (double)j / scale, s = 0.0, p = 1.0;
		for (int k = 0; k < m; k++) {
			s += w[k] * p;
			p *= u;
		}
		/* Back from d/du to d/d(index). */
		double sd = 1.0;
		for (int q = 0; q < deriv; q++)
			sd *= scale;
		c[j + half] = s / sd;
	}
}

int irr_sg__coefficients(int half, int order, int deriv, int at, double *c)
{
	sg_fit F;
	if (half < 1 || order < 0 || order > SG_MAX_ORDER || order > 2 * half ||
	    deriv < 0 || deriv > order || at < -half || at > half)
		return IRR_EINPUT;
	if (fit_prepare(&F, half, order) != 0)
		return IRR_EINPUT;
	fit_coefficients(&F, deriv, at, c);
	return IRR_OK;
}

/* The coefficients of the window and degree last used in this thread,
 * exactly as fit_coefficients gives them: the picker uses one pair for a
 * whole batch of spectra, and working out the end windows' sets again for
 * each was a tenth of the filter's time. Centre sets and the end windows'
 * sets (left end offsets -half..-1, right end half..1), of the smoothing
 * and of the second derivative; windows up to SG_CACHE_HALF. */
#define SG_CACHE_HALF 16
typedef struct sg_cache {
	int half, order; /* half 0: empty */
	double c[2][2 * SG_CACHE_HALF + 1];                   /* [deriv / 2][j] */
	double e[2][2][SG_CACHE_HALF][2 * SG_CACHE_HALF + 1]; /* [deriv / 2][end][k][j] */
} sg_cache;
static _Thread_local sg_cache sg_last;

/* The sets for (half, order), 2 <= order <= min(2 * half, SG_MAX_ORDER),
 * or NULL when half is beyond the cache or the fit is singular. */
static const sg_cache *cache_get(int half, int order)
{
	sg_cache *C = &sg_last;
	sg_fit F;
	if (half > SG_CACHE_HALF)
		return NULL;
	if (C->half == half && C->order == order)
		return C;
	C->half = 0;
	if (fit_prepare(&F, half, order) != 0)
		return NULL;
	for (int d = 0; d < 2; d++) {
		fit_coefficients(&F, 2 * d, 0, C->c[d]);
		for (int k = 0; k < half; k++) {
			fit_coefficients(&F, 2 * d, k - half, C->e[d][0][k]);
			fit_coefficients(&F, 2 * d, half - k, C->e[d][1][k]);
		}
	}
	C->half = half;
	C->order = order;
	return C;
}

double irr_sg__noise_gain(int half, int order, int deriv)
{
	double c[2 * 64 + 1], s = 0.0;
	const double *cc = c;
	const sg_cache *C = NULL;
	if (half >= 1 && order >= 2 && order <= SG_MAX_ORDER && order <= 2 * half &&
	    (deriv == 0 || deriv == 2))
		C = cache_get(half, order);
	if (C)
		cc = C->c[deriv / 2];
	else if (half > 64 || irr_sg__coefficients(half, order, deriv, 0, c) != IRR_OK)
		return 1.0;
	for (int j = 0; j <= 2 * half; j++)
		s += cc[j] * cc[j];
	return sqrt(s);
}

/* The first and last `half` points: the end windows' polynomials
 * evaluated off-centre. c is scratch of 2*half+1; with C, the sets come
 * from the cache (deriv 0 or 2) and only F->half is read. */
static void ends(const double *y, size_t n, const sg_fit *F, const sg_cache *C, int deriv,
                 double *c, double *out)
{
	int half = F->half;
	size_t w = (size_t)(2 * half + 1);
	for (int k = 0; k < half; k++) {
		double s = 0.0;
		const double *cl = c, *cr = c;
		if (C)
			cl = C->e[deriv / 2][0][k];
		else
			fit_coefficients(F, deriv, k - half, c);
		for (size_t j = 0; j < w; j++)
			s += cl[j] * y[j];
		out[k] = s;
		if (C)
			cr = C->e[deriv / 2][1][k];
		else
			fit_coefficients(F, deriv, half - k, c);
		s = 0.0;
		for (size_t j = 0; j < w; j++)
			s += cr[j] * y[n - w + j];
		out[n - 1 - (size_t)k] = s;
	}
}

int irr_sg__apply(const double *y, size_t n, int half, int order, int deriv,
                  double *out)
{
	size_t w;
	double *c;
	sg_fit F;
	if (!y || !out || n == 0 || half < 1 || order < 0 || order > 2 * half ||
	    order > SG_MAX_ORDER || deriv < 0 || deriv > order)
		return IRR_EINPUT;
	/* A window longer than the data shrinks to fit; if even that cannot
	 * carry the polynomial, the data are too short to filter. */
	if ((size_t)(2 * half + 1) > n)
		half = (int)((n - 1) / 2);
	if (half < 1 || order > 2 * half) {
		if (deriv == 0) {
			memcpy(out, y, n * sizeof *out);
			return IRR_OK;
		}
		return IRR_EINPUT;
	}
	w = (size_t)(2 * half + 1);
	if (fit_prepare(&F, half, order) != 0)
		return IRR_EINPUT;
	c = malloc(w * sizeof *c);
	if (!c)
		return IRR_ENOMEM;
	fit_coefficients(&F, deriv, 0, c);
	for (size_t i = (size_t)half; i + (size_t)half < n; i++) {
		const double *p = y + i - (size_t)half;
		double s = 0.0;
		for (size_t j = 0; j < w; j++)
			s += c[j] * p[j];
		out[i] = s;
	}
	ends(y, n, &F, NULL, deriv, c, out);
	free(c);
	return IRR_OK;
}

#ifdef SG_AVX
/* The centre loop of irr_sg__smooth_d2 four outputs at a time from i0
 * (AVX; no fused multiply-add, so each lane does the scalar operations in
 * their order). Returns the first index it did not do. */
__attribute__((target("avx")))
static size_t centre_avx(const double *y, size_t n, size_t h, size_t i0, const double *c0,
                         const double *c2, double *s0, double *s2)
{
	__m256d k0[51], k2[51];
	for (size_t k = 0; k <= h; k++) {
		k0[k] = _mm256_set1_pd(c0[h + k]);
		k2[k] = _mm256_set1_pd(c2[h + k]);
	}
	for (; i0 + 3 + h < n; i0 += 4) {
		__m256d yi = _mm256_loadu_pd(y + i0);
		__m256d a0 = _mm256_mul_pd(k0[0], yi), a2 = _mm256_mul_pd(k2[0], yi);
		for (size_t k = 1; k <= h; k++) {
			__m256d f = _mm256_add_pd(_mm256_loadu_pd(y + i0 - k), _mm256_loadu_pd(y + i0 + k));
			a0 = _mm256_add_pd(a0, _mm256_mul_pd(k0[k], f));
			a2 = _mm256_add_pd(a2, _mm256_mul_pd(k2[k], f));
		}
		_mm256_storeu_pd(s0 + i0, a0);
		_mm256_storeu_pd(s2 + i0, a2);
	}
	return i0;
}

/* The same, eight outputs at a time (AVX-512F). */
__attribute__((target("avx512f")))
static size_t centre_avx512(const double *y, size_t n, size_t h, const double *c0,
                            const double *c2, double *s0, double *s2)
{
	size_t i0 = h;
	for (; i0 + 7 + h < n; i0 += 8) {
		__m512d yi = _mm512_loadu_pd(y + i0);
		__m512d a0 = _mm512_mul_pd(_mm512_set1_pd(c0[h]), yi);
		__m512d a2 = _mm512_mul_pd(_mm512_set1_pd(c2[h]), yi);
		for (size_t k = 1; k <= h; k++) {
			__m512d f = _mm512_add_pd(_mm512_loadu_pd(y + i0 - k), _mm512_loadu_pd(y + i0 + k));
			a0 = _mm512_add_pd(a0, _mm512_mul_pd(_mm512_set1_pd(c0[h + k]), f));
			a2 = _mm512_add_pd(a2, _mm512_mul_pd(_mm512_set1_pd(c2[h + k]), f));
		}
		_mm512_storeu_pd(s0 + i0, a0);
		_mm512_storeu_pd(s2 + i0, a2);
	}
	return i0;
}
#endif

int irr_sg__smooth_d2(const double *y, size_t n, int half, int order, double *s0,
                      double *s2)
{
	double c0[2 * 50 + 1], c2[2 * 50 + 1];
	size_t h;
	sg_fit F;
	const sg_cache *C;
	if (!y || !s0 || !s2 || half < 1 || half > 50 || order < 2 || order > 2 * half ||
	    order > SG_MAX_ORDER || (size_t)(2 * half + 1) > n)
		return IRR_EINPUT;
	if ((C = cache_get(half, order)) != NULL) {
		memcpy(c0, C->c[0], (size_t)(2 * half + 1) * sizeof *c0);
		memcpy(c2, C->c[1], (size_t)(2 * half + 1) * sizeof *c2);
		F.half = half;
	} else {
		if (fit_prepare(&F, half, order) != 0)
			return IRR_EINPUT;
		fit_coefficients(&F, 0, 0, c0);
		fit_coefficients(&F, 2, 0, c2);
	}
	h = (size_t)half;
	/* Both centre sets are symmetric (even derivatives): fold the window
	 * once, y[i-k] + y[i+k], and use it for both outputs. Eight (AVX-512),
	 * four (AVX, where the processor has them) or two (SSE2) neighbouring
	 * outputs at a time, each lane with the scalar loop's own operations
	 * in its order, so the sums are the same to the bit. */
	size_t i0 = h;
#ifdef SG_AVX
	__builtin_cpu_init();
	if (__builtin_cpu_supports("avx512f"))
		i0 = centre_avx512(y, n, h, c0, c2, s0, s2);
	if (__builtin_cpu_supports("avx"))
		i0 = centre_avx(y, n, h, i0, c0, c2, s0, s2);
#endif
#ifdef IRR_SSE2
	{
		__m128d k0[51], k2[51];
		for (size_t k = 0; k <= h; k++) {
			k0[k] = _mm_set1_pd(c0[h + k]);
			k2[k] = _mm_set1_pd(c2[h + k]);
		}
		for (; i0 + 1 + h < n; i0 += 2) {
			__m128d yi = _mm_loadu_pd(y + i0);
			__m128d a0 = _mm_mul_pd(k0[0], yi), a2 = _mm_mul_pd(k2[0], yi);
			for (size_t k = 1; k <= h; k++) {
				__m128d f = _mm_add_pd(_mm_loadu_pd(y + i0 - k), _mm_loadu_pd(y + i0 + k));
				a0 = _mm_add_pd(a0, _mm_mul_pd(k0[k], f));
				a2 = _mm_add_pd(a2, _mm_mul_pd(k2[k], f));
			}
			_mm_storeu_pd(s0 + i0, a0);
			_mm_storeu_pd(s2 + i0, a2);
		}
	}
#endif
	for (size_t i = i0; i + h < n; i++) {
		double a0 = c0[h] * y[i], a2 = c2[h] * y[i];
		for (size_t k = 1; k <= h; k++) {
			double f = y[i - k] + y[i + k];
			a0 += c0[h + k] * f;
			a2 += c2[h + k] * f;
		}
		s0[i] = a0;
		s2[i] = a2;
	}
	ends(y, n, &F, C, 0, c0, s0);
	ends(y, n, &F, C, 2, c2, s2);
	return IRR_OK;
}
