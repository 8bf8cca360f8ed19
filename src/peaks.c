/* peaks.c: the "pick peaks" stage: from a normalised absorbance spectrum to
 * a list of observed bands (position, height, area, width, class, flags).
 *
 * Pipeline, each step O(n) so a 7,000-point spectrum takes well under a
 * millisecond:
 *  1. work on the point index when the spacing is uniform within 2 %,
 *     otherwise resample linearly onto a uniform grid at the median spacing;
 *  2. Savitzky-Golay smoothing and second derivative (Savitzky & Golay,
 *     Anal. Chem. 36 (1964) 1627; see sgfilter.c);
 *  3. baseline: the lower convex hull of the smoothed trace ("rubber band",
 *     common practice in IR software; reviewed with other methods by H. G.
 *     Schulze et al., Appl. Spectrosc. 59 (2005) 545, from memory), O(n) by
 *     Andrew's monotone chain (A. M. Andrew, Inf. Process. Lett. 9 (1979)
 *     216, from memory) because x is already sorted; then lifted to the
 *     centre of the noise it rests on;
 *  4. noise: the median absolute second difference of the raw trace, scaled
 *     to a standard deviation (MAD x 1.4826 / sqrt 6 for white noise; the
 *     MAD as a robust scale, F. R. Hampel, J. Am. Stat. Assoc. 69 (1974)
 *     383, from memory), per block so that noisier stretches (low
 *     transmittance) get their own level, with the filtered second
 *     derivative's spread as a check on correlated noise;
 *  5. maxima of the smoothed, baseline-corrected trace kept by topographic
 *     prominence (height above the higher of the two lowest points that
 *     separate it from higher ground), computed for all points at once with
 *     a monotonic stack;
 *  6. position by three-point interpolation (Gaussian, i.e. a parabola
 *     through the logarithms, when the three values are positive; else a
 *     parabola), or for wide or faint bands the vertex of a least-squares
 *     parabola over the top; FWHM by linear interpolation at half height
 *     (on the unsmoothed trace for bands the filter could widen); area by
 *     the trapezoidal rule between the valleys that separate neighbours;
 *  7. shoulders: separate lobes (minima) of the second derivative that do
 *     not belong to a kept maximum;
 *  8. saturated ranges from the spectrum become saturated peaks. */
#include "peakpick.h"

#include <float.h>
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
#define PK_AVX512 1
#endif

#include "irrecon/spectrum.h"

#ifdef PK_AVX512
/* Compress stores go through a register: the memory form of VPCOMPRESS is
 * microcoded on AMD Zen 4 and made the picker three times slower there;
 * the register form and a masked store of the first popcount lanes write
 * the same values to the same places on every processor. */
__attribute__((target("avx512f,popcnt"), always_inline))
static inline void cstore_pd(double *p, __mmask8 k, __m512d v)
{
	_mm512_mask_storeu_pd(p, (__mmask8)((1u << __builtin_popcount(k)) - 1u),
	                      _mm512_maskz_compress_pd(k, v));
}

__attribute__((target("avx512f,popcnt"), always_inline))
static inline void cstore_epi64(void *p, __mmask8 k, __m512i v)
{
	_mm512_mask_storeu_epi64(p, (__mmask8)((1u << __builtin_popcount(k)) - 1u),
	                         _mm512_maskz_compress_epi64(k, v));
}
#endif

/* Defaults, chosen on the shared measured spectra (ATR, film, solution,
 * digitised scans) and the synthetic tests in tests/unit/test_peaks.c. */
#define DEF_MIN_SNR 5.0
#define DEF_MIN_REL 0.01
#define DEF_STRONG 0.33
#define DEF_MEDIUM 0.10
#define DEF_BROAD 75.0
/* Auto smoothing window (cm-1): narrow enough for condensed-phase bands of
 * 6-8 cm-1 FWHM (polystyrene's aromatic C-H and ring bands). */
#define AUTO_SMOOTH_CM 7.0
/* Shoulders need a deeper second-derivative lobe than maxima need
 * prominence: the second derivative amplifies noise and ripple. */
#define DEF_SHOULDER_FACTOR 1.6
#define DEF_SHOULDER_DEPTH 0.10
#define NOISE_BLOCK 96

void irr_peak_options_init(irr_peak_options *o)
{
	if (!o)
		return;
	o->smooth_cm = 0.0;
	o->min_snr = DEF_MIN_SNR;
	o->min_rel_height = DEF_MIN_REL;
	o->strong_frac = DEF_STRONG;
	o->medium_frac = DEF_MEDIUM;
	o->broad_cm = DEF_BROAD;
	o->shoulders = 1;
	o->baseline = 1;
	o->shoulder_factor = DEF_SHOULDER_FACTOR;
	o->shoulder_depth = DEF_SHOULDER_DEPTH;
}

/* ---- the list object ---------------------------------------------------- */

irr_peaklist *irr_peaks__new(void)
{
	irr_peaklist *pl = calloc(1, sizeof *pl);
	if (!pl)
		return NULL;
	pl->range_low = 400.0;
	pl->range_high = 4000.0;
	return pl;
}

int irr_peaks__push(irr_peaklist *pl, const irr_peak *p)
{
	if (pl->count == pl->cap) {
		size_t nc = pl->cap ? 2 * pl->cap : 32;
		irr_peak *np = realloc(pl->peaks, nc * sizeof *np);
		if (!np)
			return IRR_ENOMEM;
		pl->peaks = np;
		pl->cap = nc;
	}
	pl->peaks[pl->count++] = *p;
	return IRR_OK;
}

static int cmp_desc(const void *a, const void *b)
{
	double pa = ((const irr_peak *)a)->position, pb = ((const irr_peak *)b)->position;
	return (pa < pb) - (pa > pb);
}

void irr_peaks__sort(irr_peaklist *pl)
{
	if (pl && pl->count > 1)
		qsort(pl->peaks, pl->count, sizeof *pl->peaks, cmp_desc);
}

/* The height the relative floor (min_rel_height) is taken against: the
 * strongest band that is not saturated. A clipped band's height is only the
 * instrument's ceiling (A = 5 in one shared ATR file, where the next band
 * reaches 0.76), so a floor taken against it would drop real bands by an
 * arbitrary factor. Only when every band is saturated do their heights
 * serve. (Relative heights and classes still count a saturated band as the
 * strongest: it is.) */
double irr_peaks__reference_height(const irr_peak *p, size_t n)
{
	double hmax = 0.0, hsat = 0.0;
	for (size_t i = 0; i < n; i++) {
		if (p[i].saturated) {
			if (p[i].height > hsat)
				hsat = p[i].height;
		} else if (p[i].height > hmax) {
			hmax = p[i].height;
		}
	}
	return hmax > 0.0 ? hmax : hsat;
}

void irr_peaks__classify(irr_peaklist *pl, const irr_peak_options *o)
{
	double hmax = 0.0;
	for (size_t i = 0; i < pl->count; i++)
		if (pl->peaks[i].height > hmax)
			hmax = pl->peaks[i].height;
	for (size_t i = 0; i < pl->count; i++) {
		irr_peak *p = &pl->peaks[i];
		if (p->height > 0.0 && hmax > 0.0) {
			p->rel_height = p->height / hmax;
			p->intensity = p->rel_height >= o->strong_frac ? IRR_INT_STRONG
			             : p->rel_height >= o->medium_frac ? IRR_INT_MEDIUM
			             : IRR_INT_WEAK;
		}
		if (p->saturated) {
			/* The true height is above the clip, so it is at least as
			 * strong as anything measured. */
			p->rel_height = 1.0;
			p->intensity = IRR_INT_STRONG;
			p->broad = (p->high - p->low) >= o->broad_cm;
		} else if (p->fwhm > 0.0) {
			p->broad = p->fwhm >= o->broad_cm;
		}
	}
}

void irr_peaklist_free(irr_peaklist *pl)
{
	if (!pl)
		return;
	free(pl->peaks);
	free(pl->sat);
	free(pl);
}

size_t irr_peaklist_count(const irr_peaklist *pl)
{
	return pl ? pl->count : 0;
}

const irr_peak *irr_peaklist_get(const irr_peaklist *pl, size_t i)
{
	return (pl && i < pl->count) ? &pl->peaks[i] : NULL;
}

double irr_peaklist_noise(const irr_peaklist *pl)
{
	return pl ? pl->noise : 0.0;
}

void irr_peaklist_range(const irr_peaklist *pl, double *low, double *high)
{
	if (low)
		*low = pl ? pl->range_low : 0.0;
	if (high)
		*high = pl ? pl->range_high : 0.0;
}

double irr_peaklist_smoothing(const irr_peaklist *pl)
{
	return pl ? pl->smooth_cm : 0.0;
}

size_t irr_peaklist_saturated_count(const irr_peaklist *pl)
{
	return pl ? pl->nsat : 0;
}

void irr_peaklist_saturated_range(const irr_peaklist *pl, size_t i,
                                  double *low, double *high)
{
	int ok = pl && i < pl->nsat;
	if (low)
		*low = ok ? pl->sat[2 * i] : 0.0;
	if (high)
		*high = ok ? pl->sat[2 * i + 1] : 0.0;
}

/* ---- numerical helpers --------------------------------------------------- */

/* k-th smallest of a[0..n-1] (reorders a): Hoare's FIND (C. A. R. Hoare,
 * Commun. ACM 4 (1961) 321), expected O(n), the pivot the median of the
 * first, middle and last values. Each step splits the range three ways
 * (below, equal to, above the pivot; repeated values cannot make it
 * quadratic) in two passes without data-dependent branches: on noise the
 * comparisons are coin tosses, which a processor mispredicts half the
 * time. Every value moved trades places with another, so a stays a
 * permutation. */
static double select_small(double *a, size_t n, size_t k)
{
	size_t lo = 0, hi = n; /* the k-th is in a[lo..hi-1] */
	while (hi - lo > 1) {
		double p0 = a[lo], p1 = a[lo + (hi - lo) / 2], p2 = a[hi - 1], pivot;
		size_t lt = lo, le;
		if (p0 > p1) {
			double t = p0;
			p0 = p1;
			p1 = t;
		}
		pivot = p2 < p0 ? p0 : p2 > p1 ? p1 : p2;
		/* Nothing is below or equal to a NaN (values near overflow):
		 * the range would never shrink. */
		if (pivot != pivot)
			return pivot;
		for (size_t j = lo; j < hi; j++) {
			double v = a[j];
			a[j] = a[lt];
			a[lt] = v;
			lt += v < pivot;
		}
		if (k < lt) {
			hi = lt;
			continue;
		}
		le = lt;
		for (size_t j = lt; j < hi; j++) {
			double v = a[j];
			a[j] = a[le];
			a[le] = v;
			le += v <= pivot;
		}
		if (k < le)
			return pivot;
		lo = le;
	}
	return a[k];
}

/* k-th smallest, exactly, in about one pass for long arrays: the idea of
 * Floyd & Rivest's SELECT (R. W. Floyd, R. L. Rivest, Commun. ACM 18 (1975)
 * 165): two order statistics of an evenly spaced sample bracket the k-th
 * value with high probability; one pass counts what lies below the
 * bracket and gathers what lies inside it, and only those few are
 * searched. When the bracket misses (rare), a is still a permutation of
 * the input and the plain search runs on all of it. */
#define SELECT_SAMPLE 511
#define SELECT_GAP 36 /* about 3 sd of the sample rank of the k-th value */
/* select_kth's bracket for the k-th of a[0..n-1] (n >= 2 * SELECT_SAMPLE):
 * two order statistics of an evenly spaced sample. */
static void kth_bracket(const double *a, size_t n, size_t k, double *lo, double *hi,
                        double *mid)
{
	double smp[SELECT_SAMPLE];
	size_t step = n / SELECT_SAMPLE, r = (size_t)((double)k * SELECT_SAMPLE / (double)n);
	size_t rlo = r > SELECT_GAP ? r - SELECT_GAP : 0;
	size_t rhi = r + SELECT_GAP < SELECT_SAMPLE - 1 ? r + SELECT_GAP : SELECT_SAMPLE - 1;
	*lo = -HUGE_VAL;
	*hi = HUGE_VAL;
	for (size_t j = 0; j < SELECT_SAMPLE; j++)
		smp[j] = a[j * step];
	if (rlo > 0)
		*lo = select_small(smp, SELECT_SAMPLE, rlo);
	if (rhi < SELECT_SAMPLE - 1)
		*hi = rlo > 0 ? select_small(smp + rlo, SELECT_SAMPLE - rlo, rhi - rlo)
		              : select_small(smp, SELECT_SAMPLE, rhi);
	/* The sample's own k-th (between the two, which left smp split
	 * around them), where a caller may split the bracket in two. */
	if (mid) {
		size_t a0 = rlo > 0 ? rlo : 0, e0 = rhi < SELECT_SAMPLE - 1 ? rhi : SELECT_SAMPLE;
		*mid = select_small(smp + a0, e0 - a0, r - a0);
	}
}

static double select_kth(double *a, size_t n, size_t k)
{
	if (n >= 2 * SELECT_SAMPLE) {
		double lo, hi;
		size_t below = 0, m = 0;
		kth_bracket(a, n, k, &lo, &hi, NULL);
		/* Without branches (their outcome is a coin toss here): a[i]
		 * and a[m] always trade places, and m moves on only past a value
		 * inside, so a[0..m-1] are those and a stays a permutation. */
		for (size_t i = 0; i < n; i++) {
			double v = a[i], t = a[m];
			below += v < lo;
			a[m] = v;
			a[i] = t;
			m += (v >= lo) & (v <= hi);
		}
		if (below <= k && k < below + m)
			return select_small(a, m, k - below);
	}
	return select_small(a, n, k);
}

/* select_kth's pass for a long array seen in consecutive pieces (by
 * median_near, which reads them anyway): what lies below the bracket is
 * counted, what lies inside gathered in order into buf. */
typedef struct kth_gather {
	double lo, mid, hi, *buf, *buf2; /* [lo, mid) to buf, [mid, hi] to buf2 */
	size_t below, m, m2;
} kth_gather;

static double median_inplace(double *a, size_t n)
{
	if (n == 0)
		return 0.0;
	return select_kth(a, n, n / 2);
}

#ifdef PK_AVX512
/* median_near's pass eight values at a time from i (AVX-512F compress
 * stores, order kept): the values in [lo, mid) are appended to out, those
 * in [mid, hi] to out2, those below lo counted; likewise for g when given.
 * Returns the first index not done. */
__attribute__((target("avx512f,popcnt")))
static size_t bracket_avx512(const double *src, size_t n, size_t i, int absval, double lo,
                             double mid, double hi, double *out, size_t *pm, double *out2,
                             size_t *pm2, size_t *pbelow, size_t *pabove, kth_gather *g)
{
	__m512d vlo = _mm512_set1_pd(lo), vhi = _mm512_set1_pd(hi), vmid = _mm512_set1_pd(mid);
	__m512d glo = _mm512_set1_pd(g ? g->lo : 0.0), ghi = _mm512_set1_pd(g ? g->hi : 0.0);
	__m512d gmid = _mm512_set1_pd(g ? g->mid : 0.0);
	__m512i sign = _mm512_set1_epi64(absval ? 0x7fffffffffffffffLL : -1LL);
	size_t m = *pm, m2 = *pm2, below = *pbelow, above = *pabove;
	for (; i + 8 <= n; i += 8) {
		__m512d v = _mm512_castsi512_pd(_mm512_and_si512(
		                _mm512_castpd_si512(_mm512_loadu_pd(src + i)), sign));
		__mmask8 in = _mm512_cmp_pd_mask(v, vlo, _CMP_GE_OQ) & _mm512_cmp_pd_mask(v, vhi, _CMP_LE_OQ);
		__mmask8 up = in & _mm512_cmp_pd_mask(v, vmid, _CMP_GE_OQ);
		below += (size_t)__builtin_popcount(_mm512_cmp_pd_mask(v, vlo, _CMP_LT_OQ));
		above += (size_t)__builtin_popcount(_mm512_cmp_pd_mask(v, vhi, _CMP_GT_OQ));
		cstore_pd(out + m, in & (__mmask8)~up, v);
		cstore_pd(out2 + m2, up, v);
		m += (size_t)__builtin_popcount(in & (__mmask8)~up);
		m2 += (size_t)__builtin_popcount(up);
		if (g) {
			__mmask8 gin = _mm512_cmp_pd_mask(v, glo, _CMP_GE_OQ) &
			               _mm512_cmp_pd_mask(v, ghi, _CMP_LE_OQ);
			__mmask8 gup = gin & _mm512_cmp_pd_mask(v, gmid, _CMP_GE_OQ);
			g->below += (size_t)__builtin_popcount(_mm512_cmp_pd_mask(v, glo, _CMP_LT_OQ));
			cstore_pd(g->buf + g->m, gin & (__mmask8)~gup, v);
			cstore_pd(g->buf2 + g->m2, gup, v);
			g->m += (size_t)__builtin_popcount(gin & (__mmask8)~gup);
			g->m2 += (size_t)__builtin_popcount(gup);
		}
	}
	*pm = m;
	*pm2 = m2;
	*pbelow = below;
	*pabove = above;
	return i;
}

/* The values of src[i..n-1] below t1 appended to out1, and (out2 given)
 * those below t2 to out2, eight at a time (AVX-512F compress stores, order
 * kept). Returns the first index not done. */
__attribute__((target("avx512f,popcnt")))
static size_t below_avx512(const double *src, size_t n, size_t i, double t1, double *out1,
                           size_t *pm1, double t2, double *out2, size_t *pm2)
{
	__m512d v1 = _mm512_set1_pd(t1), v2 = _mm512_set1_pd(t2);
	size_t m1 = *pm1, m2 = out2 ? *pm2 : 0;
	for (; i + 8 <= n; i += 8) {
		__m512d v = _mm512_loadu_pd(src + i);
		__mmask8 k1 = _mm512_cmp_pd_mask(v, v1, _CMP_LT_OQ);
		cstore_pd(out1 + m1, k1, v);
		m1 += (size_t)__builtin_popcount(k1);
		if (out2) {
			__mmask8 k2 = _mm512_cmp_pd_mask(v, v2, _CMP_LT_OQ);
			cstore_pd(out2 + m2, k2, v);
			m2 += (size_t)__builtin_popcount(k2);
		}
	}
	*pm1 = m1;
	if (out2)
		*pm2 = m2;
	return i;
}
#endif

#ifdef PK_AVX512
/* The noise pass eight points at a time from i (AVX-512F; each lane the
 * scalar operations; the extremes and the least nonzero step are the same
 * values in any order): dd[j] = |y[j-1] - 2 y[j] + y[j+1]|, and the
 * running lowest, highest and least nonzero |y[j+1] - y[j]| carried in
 * lo, hi, q. Returns the first index not done. */
__attribute__((target("avx512f")))
static size_t noise_pass_avx512(const double *y, size_t n, size_t i, double *dd, double *lo,
                                double *hi, double *q)
{
	__m512d vlo = _mm512_set1_pd(*lo), vhi = _mm512_set1_pd(*hi), vq = _mm512_set1_pd(*q);
	__m512d two = _mm512_set1_pd(2.0), zero = _mm512_setzero_pd();
	__m512i abs = _mm512_set1_epi64(0x7fffffffffffffffLL);
	for (; i + 8 < n; i += 8) {
		__m512d a = _mm512_loadu_pd(y + i - 1), v = _mm512_loadu_pd(y + i);
		__m512d b = _mm512_loadu_pd(y + i + 1);
		__m512d d = _mm512_castsi512_pd(_mm512_and_si512(_mm512_castpd_si512(_mm512_sub_pd(b, v)), abs));
		__mmask8 pos = _mm512_cmp_pd_mask(d, zero, _CMP_GT_OQ);
		vlo = _mm512_min_pd(v, vlo);
		vhi = _mm512_max_pd(v, vhi);
		vq = _mm512_mask_min_pd(vq, pos, d, vq);
		_mm512_storeu_pd(dd + i, _mm512_castsi512_pd(_mm512_and_si512(_mm512_castpd_si512(
		                     _mm512_add_pd(_mm512_sub_pd(a, _mm512_mul_pd(two, v)), b)), abs)));
	}
	/* Reduced in registers; the values are finite here. */
	*lo = _mm512_reduce_min_pd(vlo);
	*hi = _mm512_reduce_max_pd(vhi);
	*q = _mm512_reduce_min_pd(vq);
	return i;
}
#endif

#ifdef PK_AVX512
/* One step of Batcher's bitonic sorting network (K. E. Batcher, AFIPS
 * Spring Joint Computer Conference 32 (1968) 307) over the nr * 8 values
 * of v, for block size k and distance j: every pair i, i ^ j ordered
 * ascending where i & k is 0, else descending. Constant arguments unroll
 * it to a few shuffles, minima and maxima. */
__attribute__((target("avx512f"), always_inline))
static inline void bitonic_step(__m512d *v, int nr, int k, int j)
{
	if (j >= 8) {
		int jr = j >> 3;
#pragma GCC unroll 8
		for (int r = 0; r < nr; r++) {
			int p = r ^ jr;
			if (p <= r || p >= nr)
				continue;
			__m512d mn = _mm512_min_pd(v[r], v[p]), mx = _mm512_max_pd(v[r], v[p]);
			int desc = ((r * 8) & k) != 0;
			v[r] = desc ? mx : mn;
			v[p] = desc ? mn : mx;
		}
	} else {
		__m512i perm = _mm512_xor_si512(_mm512_set_epi64(7, 6, 5, 4, 3, 2, 1, 0),
		                                _mm512_set1_epi64(j));
#pragma GCC unroll 8
		for (int r = 0; r < nr; r++) {
			unsigned upper = 0;
#pragma GCC unroll 8
			for (int l = 0; l < 8; l++)
				upper |= (unsigned)((((r * 8 + l) & k) != 0) ^ ((l & j) != 0)) << l;
			__m512d q = _mm512_permutexvar_pd(perm, v[r]);
			v[r] = _mm512_mask_blend_pd((__mmask8)upper, _mm512_min_pd(v[r], q),
			                            _mm512_max_pd(v[r], q));
		}
	}
}

__attribute__((target("avx512f"), always_inline))
static inline void bitonic_sort(__m512d *v, int nr)
{
#pragma GCC unroll 8
	for (int k = 2; k <= nr * 8; k <<= 1)
#pragma GCC unroll 8
		for (int j = k >> 1; j > 0; j >>= 1)
			bitonic_step(v, nr, k, j);
}

/* The k-th smallest of a[0..m-1] (k < m <= 64) by sorting them, padded
 * with +infinity, in registers: no branch depends on the values, where a
 * partition of a few dozen noise values mispredicts at every level. For
 * values without NaN, among which equal values are equal bit for bit (no
 * -0 beside +0), it is the value select_small finds. */
__attribute__((target("avx512f"), no_sanitize_address))
static double select_net_avx512(const double *a, size_t m, size_t k)
{
	/* (Not instrumented by AddressSanitizer, which would move v to a
	 * stack of its own without the alignment its vectors need; every
	 * load is masked to a[0..m-1].) */
	__m512d v[8], inf = _mm512_set1_pd(HUGE_VAL);
	int nr = m <= 16 ? 2 : m <= 32 ? 4 : 8;
	for (int r = 0; r < nr; r++) {
		size_t o = (size_t)r * 8, rem = m > o ? m - o : 0;
		v[r] = _mm512_mask_loadu_pd(inf, rem >= 8 ? (__mmask8)0xff : (__mmask8)((1u << rem) - 1),
		                            a + o);
	}
	if (nr == 2)
		bitonic_sort(v, 2);
	else if (nr == 4)
		bitonic_sort(v, 4);
	else
		bitonic_sort(v, 8);
	return _mm512_cvtsd_f64(_mm512_permutexvar_pd(_mm512_set1_epi64((long long)(k & 7)), v[k >> 3]));
}
#endif

#ifdef PK_AVX512
/* a[i] -= off and b[i] -= off from i, eight at a time (AVX-512F; the
 * same subtractions). Returns the first index not done. */
__attribute__((target("avx512f")))
static size_t sub2_avx512(double *a, double *b, size_t n, size_t i, double off)
{
	__m512d vo = _mm512_set1_pd(off);
	for (; i + 8 <= n; i += 8) {
		_mm512_storeu_pd(a + i, _mm512_sub_pd(_mm512_loadu_pd(a + i), vo));
		_mm512_storeu_pd(b + i, _mm512_sub_pd(_mm512_loadu_pd(b + i), vo));
	}
	return i;
}

/* dst[i] = -src[i] from i, eight at a time (AVX-512F; negation flips the
 * sign bit). Returns the first index not done. */
__attribute__((target("avx512f")))
static size_t neg_avx512(double *dst, const double *src, size_t n, size_t i)
{
	__m512i sign = _mm512_set1_epi64((long long)0x8000000000000000ULL);
	for (; i + 8 <= n; i += 8)
		_mm512_storeu_pd(dst + i, _mm512_castsi512_pd(_mm512_xor_si512(
		                              _mm512_castpd_si512(_mm512_loadu_pd(src + i)), sign)));
	return i;
}

/* The input check's pass from i, eight points at a time (AVX-512F; the
 * same comparisons): clears *ok when x does not strictly ascend, *fin
 * when a y is not finite, *uniform when a step leaves med by more than
 * tol. Returns the first index not done. */
__attribute__((target("avx512f")))
static size_t check_avx512(const double *x, const double *y, size_t n, size_t i, double med,
                           double tol, int *ok, int *fin, int *uniform)
{
	__m512d vmed = _mm512_set1_pd(med), vtol = _mm512_set1_pd(tol), big = _mm512_set1_pd(DBL_MAX);
	__m512i abs = _mm512_set1_epi64(0x7fffffffffffffffLL);
	__mmask8 vok = 0xff, vfin = 0xff, vnu = 0;
	for (; i + 8 <= n; i += 8) {
		__m512d a = _mm512_loadu_pd(x + i - 1), b = _mm512_loadu_pd(x + i);
		__m512d st = _mm512_sub_pd(_mm512_sub_pd(b, a), vmed);
		vok &= _mm512_cmp_pd_mask(b, a, _CMP_GT_OQ);
		vnu |= _mm512_cmp_pd_mask(_mm512_castsi512_pd(_mm512_and_si512(_mm512_castpd_si512(st), abs)),
		                          vtol, _CMP_GT_OQ);
		vfin &= _mm512_cmp_pd_mask(_mm512_castsi512_pd(_mm512_and_si512(
		                               _mm512_castpd_si512(_mm512_loadu_pd(y + i)), abs)),
		                           big, _CMP_LE_OQ);
	}
	*ok &= vok == 0xff;
	*fin &= vfin == 0xff;
	if (vnu)
		*uniform = 0;
	return i;
}
#endif

/* The median of src[0..n-1] (of |src| with absval; src is not changed,
 * scratch holds n) when a neighbouring block's median `near` is known:
 * noise levels change little from block to block, so [near/1.5,
 * near*1.5] likely holds the median. One pass counts what lies below and
 * above and copies what lies inside to scratch (branch-free: the outcome
 * of each comparison is a coin toss), and only those are searched. When
 * the guess misses, only the side the median fell on is gathered and
 * searched; without a guess, or with a NaN among the values, all of src
 * is. The value is the same every way. With g, the same pass does g's
 * share of a selection over a longer array. */
static double median_near(const double *src, size_t n, int absval, double near,
                          double *scratch, kth_gather *g)
{
	if (n == 0)
		return 0.0;
	size_t k = n / 2, below = 0, above = 0, m = 0, m2 = 0, i = 0;
	double lo = near > 0.0 ? near / 1.5 : HUGE_VAL, hi = near > 0.0 ? near * 1.5 : -HUGE_VAL;
	/* What lies inside is split at the guess itself, [lo, mid) to
	 * scratch and [mid, hi] to upper: the median is in one half, which
	 * is searched alone (half as many values, and a smaller sorting
	 * network). NaN as mid (a long array) puts everything in scratch. */
	double upper[NOISE_BLOCK], mid = n <= NOISE_BLOCK ? near : NAN;
	if (!g && !(near > 0.0))
		goto all;
#ifdef PK_AVX512
	if (__builtin_cpu_supports("avx512f") && __builtin_cpu_supports("popcnt"))
		i = bracket_avx512(src, n, i, absval, lo, mid, hi, scratch, &m, upper, &m2, &below,
		                   &above, g);
#endif
#ifdef IRR_SSE2
	{
		/* Two values at a time, kept in their order; the counts add up
		 * the comparisons' all-ones lanes (-1 each). */
		__m128d vlo = _mm_set1_pd(lo), vhi = _mm_set1_pd(hi), vmid = _mm_set1_pd(mid);
		__m128d glo = _mm_set1_pd(g ? g->lo : 0.0), ghi = _mm_set1_pd(g ? g->hi : 0.0);
		__m128d gmid = _mm_set1_pd(g ? g->mid : 0.0);
		__m128d sign = absval ? _mm_set1_pd(-0.0) : _mm_setzero_pd();
		__m128i nb = _mm_setzero_si128(), ngb = nb, na = nb;
		long long t[2];
		if (g) {
			double *gb = g->buf, *gb2 = g->buf2;
			size_t gm = g->m, gm2 = g->m2;
			for (; i + 2 <= n; i += 2) {
				__m128d v = _mm_andnot_pd(sign, _mm_loadu_pd(src + i));
				__m128d vin = _mm_and_pd(_mm_cmpge_pd(v, vlo), _mm_cmple_pd(v, vhi));
				int up = _mm_movemask_pd(_mm_and_pd(vin, _mm_cmpge_pd(v, vmid)));
				int in = _mm_movemask_pd(vin) & ~up;
				__m128d vgin = _mm_and_pd(_mm_cmpge_pd(v, glo), _mm_cmple_pd(v, ghi));
				int gup = _mm_movemask_pd(_mm_and_pd(vgin, _mm_cmpge_pd(v, gmid)));
				int gin = _mm_movemask_pd(vgin) & ~gup;
				nb = _mm_sub_epi64(nb, _mm_castpd_si128(_mm_cmplt_pd(v, vlo)));
				na = _mm_sub_epi64(na, _mm_castpd_si128(_mm_cmpgt_pd(v, vhi)));
				ngb = _mm_sub_epi64(ngb, _mm_castpd_si128(_mm_cmplt_pd(v, glo)));
				_mm_storel_pd(scratch + m, v);
				m += (size_t)(in & 1);
				_mm_storeh_pd(scratch + m, v);
				m += (size_t)(in >> 1);
				_mm_storel_pd(upper + m2, v);
				m2 += (size_t)(up & 1);
				_mm_storeh_pd(upper + m2, v);
				m2 += (size_t)(up >> 1);
				_mm_storel_pd(gb + gm, v);
				gm += (size_t)(gin & 1);
				_mm_storeh_pd(gb + gm, v);
				gm += (size_t)(gin >> 1);
				_mm_storel_pd(gb2 + gm2, v);
				gm2 += (size_t)(gup & 1);
				_mm_storeh_pd(gb2 + gm2, v);
				gm2 += (size_t)(gup >> 1);
			}
			g->m = gm;
			g->m2 = gm2;
			_mm_storeu_si128((__m128i *)t, ngb);
			g->below += (size_t)(t[0] + t[1]);
		} else {
			for (; i + 2 <= n; i += 2) {
				__m128d v = _mm_andnot_pd(sign, _mm_loadu_pd(src + i));
				__m128d vin = _mm_and_pd(_mm_cmpge_pd(v, vlo), _mm_cmple_pd(v, vhi));
				int up = _mm_movemask_pd(_mm_and_pd(vin, _mm_cmpge_pd(v, vmid)));
				int in = _mm_movemask_pd(vin) & ~up;
				nb = _mm_sub_epi64(nb, _mm_castpd_si128(_mm_cmplt_pd(v, vlo)));
				na = _mm_sub_epi64(na, _mm_castpd_si128(_mm_cmpgt_pd(v, vhi)));
				_mm_storel_pd(scratch + m, v);
				m += (size_t)(in & 1);
				_mm_storeh_pd(scratch + m, v);
				m += (size_t)(in >> 1);
				_mm_storel_pd(upper + m2, v);
				m2 += (size_t)(up & 1);
				_mm_storeh_pd(upper + m2, v);
				m2 += (size_t)(up >> 1);
			}
		}
		_mm_storeu_si128((__m128i *)t, nb);
		below += (size_t)(t[0] + t[1]);
		_mm_storeu_si128((__m128i *)t, na);
		above += (size_t)(t[0] + t[1]);
	}
#endif
	for (; i < n; i++) {
		double v = absval ? fabs(src[i]) : src[i];
		int in = (v >= lo) & (v <= hi), up = in & (v >= mid);
		scratch[m] = v;
		upper[m2] = v;
		below += v < lo;
		above += v > hi;
		m += (size_t)(in & !up);
		m2 += (size_t)up;
		if (g) {
			int gin = (v >= g->lo) & (v <= g->hi), gup = gin & (v >= g->mid);
			g->buf[g->m] = v;
			g->buf2[g->m2] = v;
			g->below += v < g->lo;
			g->m += (size_t)(gin & !gup);
			g->m2 += (size_t)gup;
		}
	}
	if (near > 0.0 && below <= k && k < below + m + m2) {
		double *a = scratch;
		size_t r = k - below;
		if (r >= m) {
			a = upper;
			r -= m;
			m = m2;
		}
#ifdef PK_AVX512
		/* What lies inside is no NaN, and |v| or a second difference's
		 * absolute value is never -0. */
		if (m <= 64 && __builtin_cpu_supports("avx512f"))
			return select_net_avx512(a, m, r);
#endif
		return select_small(a, m, r);
	}
	if (near > 0.0 && below + m + m2 + above == n) {
		/* Missed, and no NaN (the three counts add up): the median is
		 * the right order statistic of the side it fell on. */
		size_t j = 0, kk = k < below ? k : k - below - m - m2;
		for (i = 0; i < n; i++) {
			double v = absval ? fabs(src[i]) : src[i];
			scratch[j] = v;
			j += k < below ? v < lo : v > hi;
		}
#ifdef PK_AVX512
		if (j <= 64 && __builtin_cpu_supports("avx512f"))
			return select_net_avx512(scratch, j, kk);
#endif
		return select_small(scratch, j, kk);
	}
all:
	for (i = 0; i < n; i++)
		scratch[i] = absval ? fabs(src[i]) : src[i];
	return select_small(scratch, n, k);
}

/* Robust sd of white noise from second differences: d = y[i-1]-2y[i]+y[i+1]
 * has sd sigma*sqrt(6); MAD*1.4826 estimates the sd of a normal sample.
 * dd[i] holds |d| centred on i (computed once for the global level and all
 * blocks); the median of dd[a..e-1] is taken in scratch. With `near`, a
 * neighbouring block's median guides the search, and this one's is left
 * there for the next; g, if given, gets its share of a longer selection. */
static double noise_of(const double *dd, size_t a, size_t e, double *scratch, double *near,
                       kth_gather *g)
{
	double med;
	if (e <= a)
		return 0.0;
	if (near) {
		med = *near = median_near(dd + a, e - a, 0, *near, scratch, g);
	} else {
		memcpy(scratch, dd + a, (e - a) * sizeof *scratch);
		med = median_inplace(scratch, e - a);
	}
	return 1.4826 * med / sqrt(6.0);
}

/* Andrew's monotone chain (Andrew 1979) over the points pts[0..m-1] (all
 * points 0..m-1 when pts is NULL), x ascending: the lower hull's vertex
 * indices go to idx and their coordinates to hx, hy (so the turn test
 * reads them without indirection); their count is returned. Collinear
 * points are popped (cross <= 0), so only strict vertices remain. */
static size_t chain(const double *x, const double *y, const size_t *pts, size_t m,
                    size_t *idx, double *hx, double *hy)
{
	size_t k = 0;
	for (size_t j = 0; j < m; j++) {
		size_t i = pts ? pts[j] : j;
		double xi = x[i], yi = y[i];
		while (k >= 2) {
			/* Pop b while it lies on or above the chord a-i. */
			double xa = hx[k - 2], ya = hy[k - 2];
			double cross = (hx[k - 1] - xa) * (yi - ya) - (hy[k - 1] - ya) * (xi - xa);
			if (cross <= 0.0)
				k--;
			else
				break;
		}
		idx[k] = i;
		hx[k] = xi;
		hy[k] = yi;
		k++;
	}
	return k;
}

/* Index of the lowest of y[a..e-1] (e > a; any of equal lowest ones);
 * *finite is cleared when a value is not finite. Four running minima
 * side by side, each with its index, without branches: on noise, whether
 * a point is the lowest so far is a coin toss. */
static size_t argmin_block(const double *y, size_t a, size_t e, int *finite)
{
	size_t i = a, mi = a;
	double mv = y[a];
	int fin = 1;
#ifdef IRR_SSE2
	if (e - a >= 8) {
		__m128d v0 = _mm_loadu_pd(y + a), v1 = _mm_loadu_pd(y + a + 2);
		__m128d i0 = _mm_set_pd((double)(a + 1), (double)a);
		__m128d i1 = _mm_set_pd((double)(a + 3), (double)(a + 2));
		__m128d j0 = i0, j1 = i1, four = _mm_set1_pd(4.0);
		__m128d sign = _mm_set1_pd(-0.0), big = _mm_set1_pd(DBL_MAX);
		__m128d ok = _mm_and_pd(_mm_cmple_pd(_mm_andnot_pd(sign, v0), big),
		                        _mm_cmple_pd(_mm_andnot_pd(sign, v1), big));
		double lv[4], li[4];
		for (i = a + 4; i + 4 <= e; i += 4) {
			__m128d y0 = _mm_loadu_pd(y + i), y1 = _mm_loadu_pd(y + i + 2);
			__m128d l0 = _mm_cmplt_pd(y0, v0), l1 = _mm_cmplt_pd(y1, v1);
			ok = _mm_and_pd(ok, _mm_and_pd(_mm_cmple_pd(_mm_andnot_pd(sign, y0), big),
			                               _mm_cmple_pd(_mm_andnot_pd(sign, y1), big)));
			j0 = _mm_add_pd(j0, four);
			j1 = _mm_add_pd(j1, four);
			v0 = _mm_or_pd(_mm_and_pd(l0, y0), _mm_andnot_pd(l0, v0));
			v1 = _mm_or_pd(_mm_and_pd(l1, y1), _mm_andnot_pd(l1, v1));
			i0 = _mm_or_pd(_mm_and_pd(l0, j0), _mm_andnot_pd(l0, i0));
			i1 = _mm_or_pd(_mm_and_pd(l1, j1), _mm_andnot_pd(l1, i1));
		}
		fin = _mm_movemask_pd(ok) == 3;
		_mm_storeu_pd(lv, v0);
		_mm_storeu_pd(lv + 2, v1);
		_mm_storeu_pd(li, i0);
		_mm_storeu_pd(li + 2, i1);
		mv = lv[0];
		mi = (size_t)li[0];
		for (int l = 1; l < 4; l++)
			if (lv[l] < mv) {
				mv = lv[l];
				mi = (size_t)li[l];
			}
	}
#endif
	for (; i < e; i++) {
		fin &= fabs(y[i]) <= DBL_MAX;
		if (y[i] < mv) {
			mv = y[i];
			mi = i;
		}
	}
	*finite &= fin;
	return mi;
}

#ifdef PK_AVX512
/* The same for 2 * 8k values (e - a a multiple of 16), two running minima
 * of eight lanes (AVX-512F). */
__attribute__((target("avx512f")))
static size_t argmin_block_avx512(const double *y, size_t a, size_t e, int *finite)
{
	__m512d v0 = _mm512_loadu_pd(y + a), v1 = _mm512_loadu_pd(y + a + 8);
	__m512i i0 = _mm512_add_epi64(_mm512_set1_epi64((long long)a),
	                              _mm512_set_epi64(7, 6, 5, 4, 3, 2, 1, 0));
	__m512i i1 = _mm512_add_epi64(i0, _mm512_set1_epi64(8)), j0 = i0, j1 = i1;
	__m512i sixteen = _mm512_set1_epi64(16), abs = _mm512_set1_epi64(0x7fffffffffffffffLL);
	__m512d big = _mm512_set1_pd(DBL_MAX);
	__mmask8 ok = _mm512_cmp_pd_mask(_mm512_castsi512_pd(_mm512_and_si512(_mm512_castpd_si512(v0), abs)),
	                                 big, _CMP_LE_OQ) &
	              _mm512_cmp_pd_mask(_mm512_castsi512_pd(_mm512_and_si512(_mm512_castpd_si512(v1), abs)),
	                                 big, _CMP_LE_OQ);
	for (size_t i = a + 16; i + 16 <= e; i += 16) {
		__m512d y0 = _mm512_loadu_pd(y + i), y1 = _mm512_loadu_pd(y + i + 8);
		__mmask8 l0 = _mm512_cmp_pd_mask(y0, v0, _CMP_LT_OQ), l1 = _mm512_cmp_pd_mask(y1, v1, _CMP_LT_OQ);
		ok &= _mm512_cmp_pd_mask(_mm512_castsi512_pd(_mm512_and_si512(_mm512_castpd_si512(y0), abs)),
		                         big, _CMP_LE_OQ) &
		      _mm512_cmp_pd_mask(_mm512_castsi512_pd(_mm512_and_si512(_mm512_castpd_si512(y1), abs)),
		                         big, _CMP_LE_OQ);
		j0 = _mm512_add_epi64(j0, sixteen);
		j1 = _mm512_add_epi64(j1, sixteen);
		v0 = _mm512_mask_mov_pd(v0, l0, y0);
		v1 = _mm512_mask_mov_pd(v1, l1, y1);
		i0 = _mm512_mask_mov_epi64(i0, l0, j0);
		i1 = _mm512_mask_mov_epi64(i1, l1, j1);
	}
	{
		/* Reduced in registers (a stack array of vectors need not be
		 * aligned as they are under a sanitizer): the lowest index
		 * among the lanes holding the lowest value. */
		__mmask8 l = _mm512_cmp_pd_mask(v1, v0, _CMP_LT_OQ);
		v0 = _mm512_mask_mov_pd(v0, l, v1);
		i0 = _mm512_mask_mov_epi64(i0, l, i1);
		l = _mm512_cmp_pd_mask(v0, _mm512_set1_pd(_mm512_reduce_min_pd(v0)), _CMP_EQ_OQ);
		*finite &= ok == 0xff;
		/* Without a lane equal to the lowest (a NaN), the first. */
		return l ? (size_t)_mm512_mask_reduce_min_epi64(l, i0) : a;
	}
}

/* hull_subtract's candidate pass over one segment, eight points at a time
 * (AVX-512F compress stores): the indices i in [i, e) with y[i] <=
 * ya + slope * (x[i] - xa) + margin appended to pts. Returns the first
 * index not done. */
__attribute__((target("avx512f,popcnt")))
static size_t hull_cand_avx512(const double *x, const double *y, size_t i, size_t e, double xa,
                               double ya, double slope, double margin, size_t *pts, size_t *pm)
{
	__m512d vxa = _mm512_set1_pd(xa), vya = _mm512_set1_pd(ya);
	__m512d vsl = _mm512_set1_pd(slope), vmg = _mm512_set1_pd(margin);
	__m512i idx = _mm512_add_epi64(_mm512_set1_epi64((long long)i),
	                               _mm512_set_epi64(7, 6, 5, 4, 3, 2, 1, 0));
	__m512i eight = _mm512_set1_epi64(8);
	size_t m = *pm;
	for (; i + 8 <= e; i += 8) {
		__m512d lim = _mm512_add_pd(_mm512_add_pd(vya, _mm512_mul_pd(vsl,
		                  _mm512_sub_pd(_mm512_loadu_pd(x + i), vxa))), vmg);
		__mmask8 in = _mm512_cmp_pd_mask(_mm512_loadu_pd(y + i), lim, _CMP_LE_OQ);
		cstore_epi64(pts + m, in, idx);
		m += (size_t)__builtin_popcount(in);
		idx = _mm512_add_epi64(idx, eight);
	}
	*pm = m;
	return i;
}

/* hull_subtract's last step over one segment, eight points at a time
 * (AVX-512F; each lane the scalar operations). Returns the first index
 * not done. */
__attribute__((target("avx512f")))
static size_t hull_take_avx512(const double *x, const double *y, const double *raw, size_t i,
                               size_t end, double xa, double ya, double slope, double *c,
                               double *r)
{
	__m512d vxa = _mm512_set1_pd(xa), vya = _mm512_set1_pd(ya), vsl = _mm512_set1_pd(slope);
	for (; i + 8 <= end; i += 8) {
		__m512d base = _mm512_add_pd(vya, _mm512_mul_pd(vsl, _mm512_sub_pd(_mm512_loadu_pd(x + i), vxa)));
		__m512d vy = _mm512_loadu_pd(y + i), vr = _mm512_loadu_pd(raw + i);
		_mm512_storeu_pd(c + i, _mm512_sub_pd(vy, base));
		_mm512_storeu_pd(r + i, _mm512_sub_pd(vr, base));
	}
	return i;
}
#endif

/* Lower convex hull of (x, y) (x ascending), linearly interpolated onto
 * every point and taken off: c = y - hull, r = raw - hull (r may be y's
 * own storage: each point is read before it is written). idx and pts are
 * scratch of n entries, hx and hy of n values.
 *
 * On noise most points cannot be vertices, yet each costs the chain a pop
 * loop of unpredictable length. So the chain runs on candidates only. The
 * lower hull H_S of a subset S of the points (both ends and the lowest of
 * every HULL_BLOCK points) lies on or above the full hull H, and a point
 * above H_S lies above a chord between two points of S, so it is no vertex
 * of H and the chain pops it. Every other point stays a candidate: the
 * lower hull of the candidates is H, with the same vertices, found by the
 * same chain; a margin far above the rounding of H_S (1e-9 of its largest
 * value) and far below any noise keeps points that rounding could place on
 * either side. The points above it never reach a turn test near zero. With
 * values so large that the margin could overflow, or any not finite, all
 * points are candidates. */
#define HULL_BLOCK 128
static void hull_subtract(const double *x, const double *y, const double *raw, size_t n,
                          double *c, double *r, size_t *idx, size_t *pts, double *hx, double *hy)
{
	size_t k = 0, m = 0;
#ifdef PK_AVX512
	int avx512 = __builtin_cpu_supports("avx512f") && __builtin_cpu_supports("popcnt");
#endif
	if (n >= 4 * HULL_BLOCK) {
		double top = 0.0;
		int finite = 1;
		pts[m++] = 0;
		for (size_t a = 0; a < n; a += HULL_BLOCK) {
			size_t e = a + HULL_BLOCK < n ? a + HULL_BLOCK : n, i;
#ifdef PK_AVX512
			if (avx512 && e - a == HULL_BLOCK)
				i = argmin_block_avx512(y, a, e, &finite);
			else
#endif
				i = argmin_block(y, a, e, &finite);
			if (i != pts[m - 1])
				pts[m++] = i;
		}
		if (pts[m - 1] != n - 1)
			pts[m++] = n - 1;
		k = chain(x, y, pts, m, idx, hx, hy);
		for (size_t h = 0; h < k; h++)
			if (fabs(hy[h]) > top)
				top = fabs(hy[h]);
		m = 0;
		if (finite && top < 1e100 && x[n - 1] - x[0] < 1e100) {
			double margin = 1e-9 * top + 1e-300;
			for (size_t h = 0; h + 1 < k; h++) {
				size_t a = idx[h], e = h + 2 == k ? idx[h + 1] + 1 : idx[h + 1], i = a;
				double xa = hx[h], ya = hy[h], slope = (hy[h + 1] - ya) / (hx[h + 1] - xa);
#ifdef PK_AVX512
				if (avx512)
					i = hull_cand_avx512(x, y, i, e, xa, ya, slope, margin, pts, &m);
#endif
#ifdef IRR_SSE2
				__m128d vxa = _mm_set1_pd(xa), vya = _mm_set1_pd(ya);
				__m128d vsl = _mm_set1_pd(slope), vmg = _mm_set1_pd(margin);
				for (; i + 2 <= e; i += 2) {
					__m128d lim = _mm_add_pd(_mm_add_pd(vya, _mm_mul_pd(vsl,
					                  _mm_sub_pd(_mm_loadu_pd(x + i), vxa))), vmg);
					int bits = _mm_movemask_pd(_mm_cmple_pd(_mm_loadu_pd(y + i), lim));
					pts[m] = i;
					m += (size_t)(bits & 1);
					pts[m] = i + 1;
					m += (size_t)(bits >> 1);
				}
#endif
				for (; i < e; i++) {
					pts[m] = i;
					m += y[i] <= ya + slope * (x[i] - xa) + margin;
				}
			}
			/* The ends are vertices whatever the rounding. */
			if (m == 0 || pts[0] != 0) {
				memmove(pts + 1, pts, m * sizeof *pts);
				pts[0] = 0;
				m++;
			}
			if (pts[m - 1] != n - 1)
				pts[m++] = n - 1;
			k = chain(x, y, pts, m, idx, hx, hy);
		}
	}
	if (m == 0)
		k = chain(x, y, NULL, n, idx, hx, hy);
	for (size_t h = 0; h + 1 < k; h++) {
		size_t a = idx[h], b = idx[h + 1], i = a;
		double slope = (y[b] - y[a]) / (x[b] - x[a]), ya = y[a], xa = x[a];
		/* The vertex b is done by the next segment, as a is by this one:
		 * each point once; the last segment also does its end. Two
		 * points at a time where SSE2 is there: the same operations in
		 * each lane, so the same values. */
		size_t end = h + 2 == k ? b + 1 : b;
#ifdef PK_AVX512
		if (avx512)
			i = hull_take_avx512(x, y, raw, i, end, xa, ya, slope, c, r);
#endif
#ifdef IRR_SSE2
		__m128d vxa = _mm_set1_pd(xa), vya = _mm_set1_pd(ya), vsl = _mm_set1_pd(slope);
		for (; i + 2 <= end; i += 2) {
			__m128d base = _mm_add_pd(vya, _mm_mul_pd(vsl, _mm_sub_pd(_mm_loadu_pd(x + i), vxa)));
			__m128d vy = _mm_loadu_pd(y + i), vr = _mm_loadu_pd(raw + i);
			_mm_storeu_pd(c + i, _mm_sub_pd(vy, base));
			_mm_storeu_pd(r + i, _mm_sub_pd(vr, base));
		}
#endif
		for (; i < end; i++) {
			double base = ya + slope * (x[i] - xa);
			c[i] = y[i] - base;
			r[i] = raw[i] - base;
		}
	}
}

#ifdef PK_AVX512
/* prominence_bases' gathering pass eight points at a time from i (AVX-512F
 * compress stores; the same tests, lane by lane). Returns the first index
 * not done; *pm, *pnmx and *nan carry on. */
__attribute__((target("avx512f,popcnt")))
static size_t gather_avx512(const double *c, size_t n, size_t i, double floor, double *tv,
                            size_t *ti, size_t *mx, size_t *pm, size_t *pnmx, int *nan)
{
	size_t m = *pm, nmx = *pnmx;
	__m512d zero = _mm512_setzero_pd(), fl = _mm512_set1_pd(floor);
	__m512i idx = _mm512_add_epi64(_mm512_set1_epi64((long long)i),
	                               _mm512_set_epi64(7, 6, 5, 4, 3, 2, 1, 0));
	__m512i eight = _mm512_set1_epi64(8);
	__mmask8 bad = 0;
	for (; i + 8 < n; i += 8) {
		__m512d v = _mm512_loadu_pd(c + i);
		__m512d up = _mm512_sub_pd(v, _mm512_loadu_pd(c + i - 1));
		__m512d next = _mm512_sub_pd(_mm512_loadu_pd(c + i + 1), v);
		__mmask8 peak = _mm512_cmp_pd_mask(up, zero, _CMP_GT_OQ) &
		                _mm512_cmp_pd_mask(next, zero, _CMP_NGT_UQ);
		__mmask8 high = _mm512_cmp_pd_mask(v, fl, _CMP_NLT_UQ);
		__mmask8 keep = _mm512_cmp_pd_mask(_mm512_mul_pd(up, next), zero, _CMP_NGT_UQ) &
		                (high | (__mmask8)~peak);
		__mmask8 top = peak & high;
		bad |= _mm512_cmp_pd_mask(v, v, _CMP_UNORD_Q);
		cstore_pd(tv + m, keep, v);
		cstore_epi64(ti + m, keep, idx);
		cstore_epi64(mx + nmx, top, idx);
		m += (size_t)__builtin_popcount(keep);
		nmx += (size_t)__builtin_popcount(top);
		idx = _mm512_add_epi64(idx, eight);
	}
	*pm = m;
	*pnmx = nmx;
	*nan |= bad != 0;
	return i;
}
#endif

/* Bases for topographic prominence. For every maximum i, lb[i] = the
 * lowest value between i and the nearest point to its left that is
 * strictly higher (or the start), rb[i] likewise to the right (nearest
 * point higher or equal, so a flat top counts once). Monotonic stack of
 * values, decreasing; each entry carries the minimum of its own segment:
 * O(n). Points inside a strictly monotone stretch (a lower neighbour on
 * one side, a higher on the other) are skipped: they are no maximum, the
 * lowest point of a stretch is at one of its ends, and the first point
 * higher than a maximum, if skipped, lies on a slope whose far end is
 * higher still, with nothing lower in between.
 *
 * Only maxima at or above `floor` are wanted (the caller drops the others
 * by height). A point below it can never be the higher ground of such a
 * maximum, only part of a valley, so a run of consecutive points below it
 * is one stack entry holding the run's minimum (its maxima are not even
 * listed: each has a lower neighbour in the run): on a flat, noisy
 * baseline the stack then does little. The lowest values, and so
 * the bases of the wanted maxima, are exactly what they would be
 * otherwise. lb and rb are written only where they are defined that way:
 * at the points not skipped, which include every wanted maximum. tv, ti,
 * sval, smin and sidx are scratch of n. The interior maxima at or above floor,
 * ascending, go to mx; their count is returned.
 *
 * With bthr (per NOISE_BLOCK block of points: the caller drops every
 * maximum whose prominence, computed as c[i] - max(lb, rb), is below its
 * block's bthr), mx lists only the maxima that can reach it, and the
 * stack pass is spared most of a stretch of noise. The points that
 * matter are cut into chunks; in a chunk whose values span less than the
 * least threshold of its blocks (hi - lo < t, rounded), a maximum that
 * has a point at or above it later in the chunk has its right base, and
 * so its base, at or above lo: its prominence is below t (rounding is
 * monotone), and it is dropped. What other points need of the chunk is
 * kept: the strict prefix maxima (the first point at or above a point
 * before the chunk is one), the strict suffix maxima (the nearest point
 * strictly above a point after it is one), and between two kept points
 * the lowest of the ones left out, as one entry. The kept points' own
 * higher ground is kept too, and every interval between a point and its
 * higher ground holds whole runs of left-out points, so the bases of
 * every maximum listed are exactly those of the full pass (the idea of
 * discarding features below a persistence threshold: H. Edelsbrunner,
 * D. Letscher, A. Zomorodian, Discrete Comput. Geom. 28 (2002) 511). */
#define PB_CHUNK 64
/* prominence_bases' chunk tv[s0..e-1] (e - s0 <= PB_CHUNK), see there:
 * when its values span less than t, the points kept (strict prefix or
 * suffix maxima) and the lowest of each run left out between them go to
 * tv, ti from *po on, fb[i] says for each point whether it was kept, and
 * 1 is returned; else 0 and nothing is changed. The run's entry takes the
 * index of its last point (it is written to, never read). No NaN. */
static int chunk_plain(double *tv, size_t *ti, size_t s0, size_t e, double t, size_t *po,
                       unsigned char *fb)
{
	unsigned char kf[PB_CHUNK];
	double lo = tv[s0], pm = -HUGE_VAL, pend = HUGE_VAL;
	size_t o = *po, last = 0;
	int has = 0;
	for (size_t r = s0; r < e; r++) {
		double v = tv[r];
		kf[r - s0] = v > pm;
		pm = v > pm ? v : pm;
		lo = v < lo ? v : lo;
	}
	if (!(pm - lo < t))
		return 0;
	pm = -HUGE_VAL;
	for (size_t r = e; r-- > s0;) {
		double v = tv[r];
		kf[r - s0] |= v > pm;
		pm = v > pm ? v : pm;
		fb[ti[r]] = kf[r - s0];
	}
	/* Without branches: which points are kept is noise. */
	for (size_t r = s0; r < e; r++) {
		double v = tv[r];
		size_t ix = ti[r];
		int k = kf[r - s0];
		tv[o] = pend;
		ti[o] = last;
		o += (size_t)(k & has);
		tv[o] = v;
		ti[o] = ix;
		o += (size_t)k;
		last = ix;
		pend = k ? HUGE_VAL : v < pend ? v : pend;
		has = !k;
	}
	tv[o] = pend;
	ti[o] = last;
	o += (size_t)has;
	*po = o;
	return 1;
}

#ifdef PK_AVX512
/* Lanes moved up (d > 0: lane i takes lane i - d) or down (d < 0) by |d|,
 * the lanes left empty taken from f. */
#define PB_UP(v, f, d) _mm512_castsi512_pd(_mm512_alignr_epi64(_mm512_castpd_si512(v), \
                                           _mm512_castpd_si512(f), 8 - (d)))
#define PB_DOWN(v, f, d) _mm512_castsi512_pd(_mm512_alignr_epi64(_mm512_castpd_si512(f), \
                                             _mm512_castpd_si512(v), (d)))
/* chunk_plain eight points at a time (AVX-512F): the running maxima both
 * ways and the lowest value of each run (a segmented scan: W. D. Hillis,
 * G. L. Steele, Commun. ACM 29 (1986) 1170) by shifts within a register,
 * carried from register to register; the same points kept. */
__attribute__((target("avx512f,popcnt")))
static int chunk_avx512(double *tv, size_t *ti, size_t s0, size_t e, double t, size_t *po,
                        unsigned char *fb)
{
	size_t len = e - s0, nv = (len + 7) / 8, o = *po;
	__m512d ninf = _mm512_set1_pd(-HUGE_VAL), pinf = _mm512_set1_pd(HUGE_VAL);
	__m512d v[PB_CHUNK / 8], vlo = pinf, vhi = ninf, carry = ninf;
	__m512i last = _mm512_set1_epi64(7), first = _mm512_setzero_si512();
	unsigned long long pre = 0, suf = 0, keep, ends, valid;
	__mmask8 ld[PB_CHUNK / 8];
	for (size_t k = 0; k < nv; k++) {
		size_t rem = len - 8 * k;
		ld[k] = rem >= 8 ? (__mmask8)0xff : (__mmask8)((1u << rem) - 1);
		v[k] = _mm512_mask_loadu_pd(ninf, ld[k], tv + s0 + 8 * k);
		vlo = _mm512_mask_min_pd(vlo, ld[k], vlo, v[k]);
		vhi = _mm512_max_pd(vhi, v[k]);
		__m512d p = v[k];
		p = _mm512_max_pd(p, PB_UP(p, ninf, 1));
		p = _mm512_max_pd(p, PB_UP(p, ninf, 2));
		p = _mm512_max_pd(p, PB_UP(p, ninf, 4));
		__m512d ex = _mm512_max_pd(PB_UP(p, ninf, 1), carry);
		pre |= (unsigned long long)(_mm512_cmp_pd_mask(v[k], ex, _CMP_GT_OQ) & ld[k]) << (8 * k);
		carry = _mm512_permutexvar_pd(last, _mm512_max_pd(p, carry));
	}
	if (!(_mm512_reduce_max_pd(vhi) - _mm512_reduce_min_pd(vlo) < t))
		return 0;
	carry = ninf;
	for (size_t k = nv; k-- > 0;) {
		__m512d p = v[k];
		p = _mm512_max_pd(p, PB_DOWN(p, ninf, 1));
		p = _mm512_max_pd(p, PB_DOWN(p, ninf, 2));
		p = _mm512_max_pd(p, PB_DOWN(p, ninf, 4));
		__m512d ex = _mm512_max_pd(PB_DOWN(p, ninf, 1), carry);
		suf |= (unsigned long long)(_mm512_cmp_pd_mask(v[k], ex, _CMP_GT_OQ) & ld[k]) << (8 * k);
		carry = _mm512_permutexvar_pd(first, _mm512_max_pd(p, carry));
	}
	keep = pre | suf;
	valid = len == 64 ? ~0ULL : (1ULL << len) - 1;
	/* A run's entry goes where its last point was: the order stays. */
	ends = ~keep & ((keep >> 1) | (1ULL << (len - 1))) & valid;
	for (size_t r = s0; r < e; r++)
		fb[ti[r]] = (unsigned char)((keep >> (r - s0)) & 1);
	carry = pinf;
	for (size_t k = 0; k < nv; k++) {
		__mmask8 kk = (__mmask8)(keep >> (8 * k)), b = kk;
		__mmask8 em = (__mmask8)((keep | ends) >> (8 * k));
		__m512d mn = _mm512_mask_blend_pd(kk, v[k], pinf);
		__m512i ix = _mm512_maskz_loadu_epi64(ld[k], ti + s0 + 8 * k);
		mn = _mm512_mask_min_pd(mn, (__mmask8)~b, mn, PB_UP(mn, pinf, 1));
		b = (__mmask8)(b | (b << 1));
		mn = _mm512_mask_min_pd(mn, (__mmask8)~b, mn, PB_UP(mn, pinf, 2));
		b = (__mmask8)(b | (b << 2));
		mn = _mm512_mask_min_pd(mn, (__mmask8)~b, mn, PB_UP(mn, pinf, 4));
		b = (__mmask8)(b | (b << 4));
		mn = _mm512_mask_min_pd(mn, (__mmask8)~b, mn, carry);
		carry = _mm512_permutexvar_pd(last, mn);
		__m512d sel = _mm512_mask_blend_pd(kk, mn, v[k]);
		cstore_pd(tv + o, em, sel);
		cstore_epi64(ti + o, em, ix);
		o += (size_t)__builtin_popcount(em);
	}
	*po = o;
	return 1;
}
#endif
static size_t prominence_bases(const double *c, size_t n, double floor, const double *bthr,
                               double *lb, double *rb, double *tv, size_t *ti, double *sval,
                               double *smin, size_t *sidx, size_t *mx)
{
	size_t m = 0, top = 0, nmx = 0, i = 1;
	int nan = (c[0] != c[0]) | (c[n - 1] != c[n - 1]);
	/* The points that matter, once for both directions: tv their values,
	 * ti their indices (n >= 2); and on the way the wanted maxima (c[i-1]
	 * < c[i] >= c[i+1]) for the caller. Bitwise, not short-circuit: no
	 * branch to mispredict. For finite values v - a > 0 exactly when v >
	 * a; a product that underflows to 0 (or overflows to NaN) only keeps
	 * a point that could have been skipped, which changes nothing. */
	tv[m] = c[0];
	ti[m++] = 0;
#ifdef PK_AVX512
	__builtin_cpu_init();
	int avx512 = __builtin_cpu_supports("avx512f") && __builtin_cpu_supports("popcnt");
	if (avx512)
		i = gather_avx512(c, n, i, floor, tv, ti, mx, &m, &nmx, &nan);
#endif
#ifdef IRR_SSE2
	{
		/* Two points at a time: the same tests, lane by lane. */
		__m128d zero = _mm_setzero_pd(), fl = _mm_set1_pd(floor);
		__m128d ones = _mm_cmpeq_pd(zero, zero), bad = zero;
		for (; i + 2 < n; i += 2) {
			__m128d v = _mm_loadu_pd(c + i);
			bad = _mm_or_pd(bad, _mm_cmpunord_pd(v, v));
			__m128d up = _mm_sub_pd(v, _mm_loadu_pd(c + i - 1));
			__m128d next = _mm_sub_pd(_mm_loadu_pd(c + i + 1), v);
			__m128d peak = _mm_and_pd(_mm_cmpgt_pd(up, zero), _mm_cmpngt_pd(next, zero));
			__m128d high = _mm_cmpnlt_pd(v, fl);
			int keep = _mm_movemask_pd(_mm_and_pd(_mm_cmpngt_pd(_mm_mul_pd(up, next), zero),
			                                      _mm_or_pd(high, _mm_xor_pd(peak, ones))));
			int top_ = _mm_movemask_pd(_mm_and_pd(peak, high));
			tv[m] = c[i];
			ti[m] = i;
			mx[nmx] = i;
			m += (size_t)(keep & 1);
			nmx += (size_t)(top_ & 1);
			tv[m] = c[i + 1];
			ti[m] = i + 1;
			mx[nmx] = i + 1;
			m += (size_t)(keep >> 1);
			nmx += (size_t)(top_ >> 1);
		}
		nan |= _mm_movemask_pd(bad) != 0;
	}
#endif
	for (; i + 1 < n; i++) {
		/* Strictly monotone through v: both steps of one strict sign. */
		double v = c[i], up = v - c[i - 1], next = c[i + 1] - v;
		int peak = (up > 0.0) & !(next > 0.0), high = !(v < floor);
		tv[m] = v;
		ti[m] = i;
		mx[nmx] = i;
		m += (!(up * next > 0.0)) & (high | !peak);
		nmx += peak & high;
		nan |= v != v;
	}
	tv[m] = c[n - 1];
	ti[m++] = n - 1;
	if (bthr && !nan) {
		/* In place: o (written) never passes the point read. fb (sval's
		 * storage, free until the stack pass): per point, whether it
		 * stays; read back for the maxima. */
		unsigned char *fb = (unsigned char *)sval;
		size_t o = 0, q = 0;
		for (size_t s0 = 0; s0 < m; s0 += PB_CHUNK) {
			size_t e = s0 + PB_CHUNK < m ? s0 + PB_CHUNK : m;
			double t = bthr[ti[s0] / NOISE_BLOCK];
			int done;
			for (size_t b = ti[s0] / NOISE_BLOCK + 1; b <= ti[e - 1] / NOISE_BLOCK; b++)
				t = bthr[b] < t ? bthr[b] : t;
#ifdef PK_AVX512
			if (avx512)
				done = chunk_avx512(tv, ti, s0, e, t, &o, fb);
			else
#endif
				done = chunk_plain(tv, ti, s0, e, t, &o, fb);
			for (size_t r = s0; !done && r < e; r++) {
				fb[ti[r]] = 1;
				tv[o] = tv[r];
				ti[o++] = ti[r];
			}
		}
		m = o;
		for (size_t p = 0; p < nmx; p++) {
			size_t x = mx[p];
			mx[q] = x;
			q += fb[x];
		}
		nmx = q;
	}
	/* One pass for both sides. The stack holds values strictly
	 * decreasing, each with the lowest value of its own segment (from
	 * the entry below it, exclusive, to itself). A point v takes off
	 * every entry t <= v: v is the first point at or above t to its
	 * right, so the lowest value from t up to v is t's right base, the
	 * lowest of t and of the segments of the entries taken off before it
	 * (those lie between t and v). What is left below v is strictly
	 * higher: v's left base is the lowest of v and of all the segments
	 * taken off. The entries left at the end have no higher ground to
	 * the right: their right bases reach the end. A NaN (only from
	 * values near overflow) is never taken off and would leave the
	 * entries below it without a right base: then a pass each way. */
	for (size_t j = 0; j <= m && !nan; j++) {
		double v = j < m ? tv[j] : HUGE_VAL, mn = v, run = HUGE_VAL;
		if (v < floor) {
			/* A run below floor: one entry with its minimum. Nothing
			 * on the stack is that low (a point above floor took the
			 * last run off), so it takes nothing off. */
			while (j + 1 < m && tv[j + 1] < floor) {
				double u = tv[++j];
				mn = u < mn ? u : mn;
			}
			sval[top] = smin[top] = mn;
			sidx[top] = ti[j];
			top++;
			continue;
		}
		while (top > 0 && sval[top - 1] <= v) {
			double t = sval[top - 1];
			top--;
			rb[sidx[top]] = run < t ? run : t;
			if (smin[top] < run)
				run = smin[top];
		}
		if (j == m)
			break;
		lb[ti[j]] = run < mn ? run : mn;
		sval[top] = v;
		smin[top] = lb[ti[j]];
		sidx[top] = ti[j];
		top++;
	}
	for (size_t j = 0; j < m && nan; j++) {
		double v = tv[j], mn = v;
		if (v < floor) {
			while (j + 1 < m && tv[j + 1] < floor) {
				double u = tv[++j];
				mn = u < mn ? u : mn;
			}
			sval[top] = smin[top] = mn;
			top++;
			continue;
		}
		while (top > 0 && sval[top - 1] <= v) {
			if (smin[top - 1] < mn)
				mn = smin[top - 1];
			top--;
		}
		lb[ti[j]] = mn;
		sval[top] = v;
		smin[top] = mn;
		top++;
	}
	top = 0;
	for (size_t j = m; nan && j-- > 0;) {
		double v = tv[j], mn = v;
		if (v < floor) {
			while (j > 0 && tv[j - 1] < floor) {
				double u = tv[--j];
				mn = u < mn ? u : mn;
			}
			sval[top] = smin[top] = mn;
			top++;
			continue;
		}
		while (top > 0 && sval[top - 1] < v) {
			if (smin[top - 1] < mn)
				mn = smin[top - 1];
			top--;
		}
		rb[ti[j]] = mn;
		sval[top] = v;
		smin[top] = mn;
		top++;
	}
	return nmx;
}

/* Three-point interpolation of an extremum at i: offset (-0.5..0.5 points)
 * and value. Gaussian (parabola through logs) when all three are positive
 * and a maximum is sought, which is exact for a Gaussian band; a parabola
 * otherwise. */
static void interp3(const double *c, size_t i, int use_log, double *off, double *val)
{
	double a = c[i - 1], b = c[i], d = c[i + 1];
	double den, o;
	if (use_log && a > 0.0 && b > 0.0 && d > 0.0) {
		double la = log(a), lb = log(b), ld = log(d);
		den = la - 2.0 * lb + ld;
		if (den < 0.0) {
			o = 0.5 * (la - ld) / den;
			if (o > 0.5)
				o = 0.5;
			if (o < -0.5)
				o = -0.5;
			*off = o;
			*val = exp(lb - 0.25 * (la - ld) * o);
			return;
		}
	}
	den = a - 2.0 * b + d;
	if (den == 0.0) {
		*off = 0.0;
		*val = b;
		return;
	}
	o = 0.5 * (a - d) / den;
	if (o > 0.5)
		o = 0.5;
	if (o < -0.5)
		o = -0.5;
	*off = o;
	*val = b - 0.25 * (a - d) * o;
}

/* x at fractional index t on the working grid. */
static double x_at(const double *x, size_t n, double t)
{
	size_t i;
	double f;
	if (t <= 0.0)
		return x[0] + t * (x[1] - x[0]);
	if (t >= (double)(n - 1))
		return x[n - 1] + (t - (double)(n - 1)) * (x[n - 1] - x[n - 2]);
	i = (size_t)t;
	f = t - (double)i;
	return x[i] + f * (x[i + 1] - x[i]);
}

/* Index of the first x >= v (n when none); x ascending. */
static size_t first_at_or_above(const double *x, size_t n, double v)
{
	size_t lo = 0, hi = n;
	while (lo < hi) {
		size_t mid = lo + (hi - lo) / 2;
		if (x[mid] < v)
			lo = mid + 1;
		else
			hi = mid;
	}
	return lo;
}

/* Working arrays, one allocation. */
struct work {
	const double *x, *y; /* working grid: the caller's, or resampled */
	double *s, *base, *c, *r, *d2, *lb, *rb, *smin, *scratch, *tv;
	double *blk;         /* per block: raw, d2 levels, then their medians */
	double *bsn, *bsd;   /* per block noise sd (raw) and of the 2nd derivative */
	size_t *stk, *stk2, *stk3, *mx;
	unsigned char *keep;
	unsigned char *satm; /* 1: in a saturated range; 2: within guard of one */
	void *block;
};
typedef struct work work;
#define NOISE_AT(w, i) ((w).bsn[(i) / NOISE_BLOCK])
#define D2NOISE_AT(w, i) ((w).bsd[(i) / NOISE_BLOCK])

/* Crossings of `level` left and right of maximum i, walked no further
 * than the valleys lv and rv; a missing side is mirrored about pos.
 * Returns how many sides reach the level (0, 1 or 2). */
static int width_at(const struct work *w, const double *c, size_t n, size_t i, size_t lv,
                    size_t rv, double pos, double level, double *lo, double *hi)
{
	double tl = -1.0, tr = -1.0;
	for (size_t j = i; j > lv; j--)
		if (c[j - 1] <= level) {
			tl = (double)j - (c[j] - level) / (c[j] - c[j - 1]);
			break;
		}
	for (size_t j = i; j < rv; j++)
		if (c[j + 1] <= level) {
			tr = (double)j + (c[j] - level) / (c[j] - c[j + 1]);
			break;
		}
	if (tl < 0.0 && tr < 0.0)
		return 0;
	*lo = tl >= 0.0 ? x_at(w->x, n, tl) : 2.0 * pos - x_at(w->x, n, tr);
	*hi = tr >= 0.0 ? x_at(w->x, n, tr) : 2.0 * pos - *lo;
	return (tl >= 0.0) + (tr >= 0.0);
}

/* Least-squares parabola through c[i-m..i+m] (clipped to lo..hi); its
 * vertex offset from i in points, or NAN when it has no maximum there.
 * Used on bands many points wide, whose flat noisy top three points
 * cannot locate: the fit over the top averages the noise away. */
static double vertex_fit(const double *c, size_t i, size_t m, size_t lo, size_t hi)
{
	double s0 = 0, s1 = 0, s2 = 0, s3 = 0, s4 = 0, t0 = 0, t1 = 0, t2 = 0;
	size_t a = i > lo + m ? i - m : lo, e = i + m < hi ? i + m : hi;
	for (size_t j = a; j <= e; j++) {
		double t = (double)j - (double)i, t2v = t * t;
		s0 += 1;
		s1 += t;
		s2 += t2v;
		s3 += t2v * t;
		s4 += t2v * t2v;
		t0 += c[j];
		t1 += c[j] * t;
		t2 += c[j] * t2v;
	}
	if (s0 < 5)
		return NAN;
	/* Normal equations [s0 s1 s2; s1 s2 s3; s2 s3 s4] [p0 p1 p2] = [t0 t1 t2],
	 * by Cramer's rule (3x3, well conditioned for |t| <= m). */
	double det = s0 * (s2 * s4 - s3 * s3) - s1 * (s1 * s4 - s3 * s2) + s2 * (s1 * s3 - s2 * s2);
	if (det == 0.0)
		return NAN;
	double p1 = (s0 * (t1 * s4 - s3 * t2) - t0 * (s1 * s4 - s3 * s2) + s2 * (s1 * t2 - t1 * s2)) / det;
	double p2 = (s0 * (s2 * t2 - t1 * s3) - s1 * (s1 * t2 - t1 * s2) + t0 * (s1 * s3 - s2 * s2)) / det;
	if (!(p2 < 0.0))
		return NAN;
	double v = -p1 / (2.0 * p2);
	return fabs(v) <= (double)m ? v : NAN;
}

/* Median of v[b-1], v[b], v[b+1] (the two at an end: the smaller). */
static double med3(const double *v, size_t nb, size_t b)
{
	double a = b > 0 ? v[b - 1] : v[b], c = b + 1 < nb ? v[b + 1] : v[b], m = v[b];
	if (b == 0 || b + 1 == nb) {
		double o = b == 0 ? c : a;
		return o < m ? o : m;
	}
	if ((a <= m && m <= c) || (c <= m && m <= a))
		return m;
	if ((m <= a && a <= c) || (c <= a && a <= m))
		return a;
	return c;
}

/* One term of a band's area above the line joining its valleys
 * (trapezoidal rule from point j to j+1); u carries the height at j. */
static inline double area_term(const double *x, const double *c, size_t j, double x1, double y1,
                               double sl, double *u)
{
	double v = c[j + 1] - (y1 + sl * (x[j + 1] - x1)), t;
#ifdef IRR_SSE2
	/* v < 0 ? 0 : v without a branch (on the baseline between bands v
	 * is noise about 0): MAXSD returns its second operand unless the
	 * first is greater, so -0 and NaN stay as they are. */
	v = _mm_cvtsd_f64(_mm_max_sd(_mm_set_sd(0.0), _mm_set_sd(v)));
#else
	if (v < 0.0)
		v = 0.0;
#endif
	t = 0.5 * (*u + v) * (x[j + 1] - x[j]);
	*u = v;
	return t;
}

/* Areas of the bands whose valleys are lv[q], rv[q], q < nk: above the
 * line joining the valleys (a band on a broad neighbour does not get the
 * neighbour's area), each summed in order. Two bands side by side, so
 * that the two chains of additions overlap instead of waiting on each
 * other; each sum is what it would be alone. */
static void band_areas(const double *x, const double *c, const size_t *lv, const size_t *rv,
                       size_t nk, double *area)
{
	double x1[2], y1[2], sl[2], u[2];
	size_t j[2], e[2];
	for (size_t q = 0; q < nk; q += 2) {
		int two = q + 1 < nk;
		for (int s = 0; s < 1 + two; s++) {
			size_t l = lv[q + (size_t)s], r = rv[q + (size_t)s];
			double x2 = x[r], y2 = c[r] > 0.0 ? c[r] : 0.0;
			x1[s] = x[l];
			y1[s] = c[l] > 0.0 ? c[l] : 0.0;
			sl[s] = x2 > x1[s] ? (y2 - y1[s]) / (x2 - x1[s]) : 0.0;
			u[s] = c[l] - (y1[s] + sl[s] * (x[l] - x1[s]));
			if (u[s] < 0.0)
				u[s] = 0.0;
			j[s] = l;
			e[s] = r;
		}
		if (two) {
			double a0 = 0.0, a1 = 0.0, u0 = u[0], u1 = u[1];
			size_t j0 = j[0], j1 = j[1];
#ifdef IRR_SSE2
			/* The two bands in the two lanes of one register, each
			 * lane with area_term's operations in its order (MAXPD
			 * as MAXSD there): the same sums, half the instructions. */
			if (j0 < e[0] && j1 < e[1]) {
				__m128d vx1 = _mm_set_pd(x1[1], x1[0]), vy1 = _mm_set_pd(y1[1], y1[0]);
				__m128d vsl = _mm_set_pd(sl[1], sl[0]), vu = _mm_set_pd(u1, u0);
				__m128d va = _mm_setzero_pd(), zero = _mm_setzero_pd(), half = _mm_set1_pd(0.5);
				__m128d xj = _mm_loadh_pd(_mm_load_sd(x + j0), x + j1);
				for (; j0 < e[0] && j1 < e[1]; j0++, j1++) {
					__m128d xn = _mm_loadh_pd(_mm_load_sd(x + j0 + 1), x + j1 + 1);
					__m128d cn = _mm_loadh_pd(_mm_load_sd(c + j0 + 1), c + j1 + 1);
					__m128d v = _mm_sub_pd(cn, _mm_add_pd(vy1, _mm_mul_pd(vsl,
					                                      _mm_sub_pd(xn, vx1))));
					v = _mm_max_pd(zero, v);
					va = _mm_add_pd(va, _mm_mul_pd(_mm_mul_pd(half, _mm_add_pd(vu, v)),
					                               _mm_sub_pd(xn, xj)));
					vu = v;
					xj = xn;
				}
				a0 = _mm_cvtsd_f64(va);
				a1 = _mm_cvtsd_f64(_mm_unpackhi_pd(va, va));
				u0 = _mm_cvtsd_f64(vu);
				u1 = _mm_cvtsd_f64(_mm_unpackhi_pd(vu, vu));
			}
#endif
			for (; j0 < e[0] && j1 < e[1]; j0++, j1++) {
				a0 += area_term(x, c, j0, x1[0], y1[0], sl[0], &u0);
				a1 += area_term(x, c, j1, x1[1], y1[1], sl[1], &u1);
			}
			for (; j0 < e[0]; j0++)
				a0 += area_term(x, c, j0, x1[0], y1[0], sl[0], &u0);
			for (; j1 < e[1]; j1++)
				a1 += area_term(x, c, j1, x1[1], y1[1], sl[1], &u1);
			area[q] = a0;
			area[q + 1] = a1;
		} else {
			double a0 = 0.0, u0 = u[0];
			for (size_t j0 = j[0]; j0 < e[0]; j0++)
				a0 += area_term(x, c, j0, x1[0], y1[0], sl[0], &u0);
			area[q] = a0;
		}
	}
}

#ifdef PK_AVX512
/* The lowest value of c[a..e] (NaNs passed over; v, one of the values,
 * is not NaN) and the first and last index holding it, eight points at a
 * time (AVX-512F). */
__attribute__((target("avx512f")))
static void lowest_avx512(const double *c, size_t a, size_t e, double v, size_t *first,
                          size_t *last)
{
	__m512d acc = _mm512_set1_pd(v);
	size_t j = a;
	double mn;
	for (; j + 8 <= e + 1; j += 8)
		acc = _mm512_min_pd(_mm512_loadu_pd(c + j), acc);
	mn = _mm512_reduce_min_pd(acc);
	for (; j <= e; j++)
		mn = c[j] < mn ? c[j] : mn;
	/* The first and the last place: each scan stops at one. */
	__m512d vm = _mm512_set1_pd(mn);
	for (j = a;; j += 8) {
		if (j + 8 > e + 1) {
			while (!(c[j] == mn))
				j++;
			*first = j;
			break;
		}
		__mmask8 k = _mm512_cmp_pd_mask(_mm512_loadu_pd(c + j), vm, _CMP_EQ_OQ);
		if (k) {
			*first = j + (size_t)__builtin_ctz(k);
			break;
		}
	}
	for (j = e + 1;; j -= 8) {
		if (j < a + 8) {
			while (!(c[j - 1] == mn))
				j--;
			*last = j - 1;
			break;
		}
		__mmask8 k = _mm512_cmp_pd_mask(_mm512_loadu_pd(c + j - 8), vm, _CMP_EQ_OQ);
		if (k) {
			*last = j - 8 + (size_t)(31 - __builtin_clz(k));
			break;
		}
	}
}
#endif

/* ---- the picker ---------------------------------------------------------- */


static int check_options(const irr_peak_options *o, const char *name, irr_error *err)
{
	if (!(o->smooth_cm >= 0.0) || !isfinite(o->smooth_cm))
		return irr_error_set(err, IRR_EINPUT, name, 0, "smoothing window must be >= 0 cm-1");
	if (!(o->min_snr >= 0.0) || !isfinite(o->min_snr))
		return irr_error_set(err, IRR_EINPUT, name, 0, "minimum signal-to-noise must be >= 0");
	if (!(o->min_rel_height >= 0.0 && o->min_rel_height <= 1.0))
		return irr_error_set(err, IRR_EINPUT, name, 0, "minimum relative height must be within 0..1");
	if (!(o->strong_frac >= 0.0 && o->strong_frac <= 1.0 &&
	      o->medium_frac >= 0.0 && o->medium_frac <= o->strong_frac))
		return irr_error_set(err, IRR_EINPUT, name, 0,
		                     "intensity thresholds must satisfy 0 <= medium <= strong <= 1");
	if (!(o->broad_cm > 0.0) || !isfinite(o->broad_cm))
		return irr_error_set(err, IRR_EINPUT, name, 0, "broad threshold must be > 0 cm-1");
	if (!(o->shoulder_factor >= 0.0) || !isfinite(o->shoulder_factor) ||
	    !(o->shoulder_depth >= 0.0 && o->shoulder_depth <= 1.0))
		return irr_error_set(err, IRR_EINPUT, name, 0,
		                     "shoulder factor must be >= 0 and shoulder depth within 0..1");
	return IRR_OK;
}

int irr_peaks__pick_xy(irr_peaklist **out, const double *x0, const double *y0,
                       size_t n0, const double *sat, size_t nsat,
                       const irr_peak_options *opt, const char *name,
                       irr_error *err)
{
	irr_peak_options defo;
	const irr_peak_options *o = opt;
	irr_peaklist *pl = NULL;
	work w;
	double *xr = NULL, *yr = NULL; /* resampled grid, inside w.block */
	size_t n, nb;
	double dx, med;
	int half, order, rc = IRR_OK, uniform = 1;
	double gain2, sigma;

	memset(&w, 0, sizeof w);
	if (out)
		*out = NULL;
	if (!name)
		name = "";
	if (!o) {
		irr_peak_options_init(&defo);
		o = &defo;
	}
	if (!out || !x0 || !y0)
		return irr_error_set(err, IRR_EINPUT, name, 0, "no spectrum");
	if ((rc = check_options(o, name, err)) != IRR_OK)
		return rc;
	if (n0 < 5)
		return irr_error_set(err, IRR_EINPUT, name, 0,
		                     "%zu points are too few to pick peaks (need 5)", n0);
	/* In one pass: every value finite, x strictly ascending, and the
	 * spacing uniform (every step within 2 % of the mean step; else the
	 * median step for resampling). The mean step is only meaningful once
	 * the whole axis has passed the checks, which it must to go on. */
	med = (x0[n0 - 1] - x0[0]) / (double)(n0 - 1);
	{
		/* Fast check first: a strictly ascending axis with finite ends is
		 * finite throughout, and |y| <= DBL_MAX holds for every finite y
		 * (not for NaN or infinity). Only when it fails does the loop
		 * below find the point to name. */
		int ok = isfinite(x0[0]) && isfinite(x0[n0 - 1]), fin = fabs(y0[0]) <= DBL_MAX;
		size_t i = 1;
#ifdef PK_AVX512
		if (__builtin_cpu_supports("avx512f"))
			i = check_avx512(x0, y0, n0, i, med, 0.02 * med, &ok, &fin, &uniform);
#endif
#ifdef IRR_SSE2
		/* Two points at a time, the same comparisons; no chain of
		 * additions to wait on. */
		{
			__m128d vok = _mm_cmpeq_pd(_mm_setzero_pd(), _mm_setzero_pd()), vfin = vok;
			__m128d vnu = _mm_setzero_pd(), vmed = _mm_set1_pd(med);
			__m128d vtol = _mm_set1_pd(0.02 * med), sign = _mm_set1_pd(-0.0);
			__m128d big = _mm_set1_pd(DBL_MAX);
			for (; i + 2 <= n0; i += 2) {
				__m128d a = _mm_loadu_pd(x0 + i - 1), b = _mm_loadu_pd(x0 + i);
				vok = _mm_and_pd(vok, _mm_cmpgt_pd(b, a));
				vnu = _mm_or_pd(vnu, _mm_cmpgt_pd(_mm_andnot_pd(sign, _mm_sub_pd(_mm_sub_pd(b, a),
				                                                          vmed)), vtol));
				vfin = _mm_and_pd(vfin, _mm_cmple_pd(_mm_andnot_pd(sign, _mm_loadu_pd(y0 + i)), big));
			}
			ok &= _mm_movemask_pd(vok) == 3;
			fin &= _mm_movemask_pd(vfin) == 3;
			if (_mm_movemask_pd(vnu))
				uniform = 0;
		}
#endif
		for (; i < n0; i++) {
			ok &= x0[i] > x0[i - 1];
			if (fabs((x0[i] - x0[i - 1]) - med) > 0.02 * med)
				uniform = 0;
			fin &= fabs(y0[i]) <= DBL_MAX;
		}
		if (ok && fin)
			goto checked;
		uniform = 1;
	}
	for (size_t i = 0; i < n0; i++) {
		if (!isfinite(x0[i]) || !isfinite(y0[i]))
			return irr_error_set(err, IRR_EINPUT, name, 0,
			                     "point %zu is not a finite number", i + 1);
		if (i > 0) {
			double step = x0[i] - x0[i - 1];
			if (!(x0[i] > x0[i - 1]))
				return irr_error_set(err, IRR_EINPUT, name, 0,
				                     "wavenumbers must be strictly ascending (point %zu)", i + 1);
			if (fabs(step - med) > 0.02 * med)
				uniform = 0;
		}
	}
checked:
	if (!uniform) {
		double *tmp = malloc((n0 - 1) * sizeof *tmp);
		if (!tmp)
			return irr_error_set(err, IRR_ENOMEM, name, 0, "out of memory");
		for (size_t i = 0; i + 1 < n0; i++)
			tmp[i] = x0[i + 1] - x0[i];
		med = median_inplace(tmp, n0 - 1);
		free(tmp);
	}
	if (uniform) {
		n = n0;
		dx = (x0[n0 - 1] - x0[0]) / (double)(n0 - 1);
	} else {
		/* Resample at the median spacing; a file with large gaps could ask
		 * for a huge grid, so the grid is capped at 2x the points given. */
		double span = x0[n0 - 1] - x0[0];
		double mf = floor(span / med) + 1.0;
		size_t m = mf < (double)(2 * n0 + 16) ? (size_t)mf : 2 * n0 + 16;
		n = m;
		dx = span / (double)(n - 1);
	}

	/* One block for every working array. */
	{
		size_t nd = uniform ? 10 : 12, bytes;
		nb = (n + NOISE_BLOCK - 1) / NOISE_BLOCK;
		bytes = (nd * n + 4 * nb) * sizeof(double) + 4 * n * sizeof(size_t) + 2 * n;
		w.block = malloc(bytes);
		if (!w.block)
			return irr_error_set(err, IRR_ENOMEM, name, 0, "out of memory");
		double *d = w.block;
		if (!uniform) {
			xr = d; d += n;
			yr = d; d += n;
		}
		w.s = d; d += n;     /* smoothed; then the unsmoothed trace above the baseline */
		w.base = d; d += n;
		w.c = d; d += n;
		w.d2 = d; d += n;
		w.lb = d; d += n;
		w.rb = d; d += n;
		w.smin = d; d += n;
		w.scratch = d; d += n;
		w.tv = d; d += n;
		w.r = w.s;
		w.blk = d; d += 2 * nb;
		w.bsn = d; d += nb;
		w.bsd = d; d += nb;
		w.stk = (size_t *)d;
		w.stk2 = w.stk + n;
		w.stk3 = w.stk2 + n;
		w.mx = w.stk3 + n;
		w.keep = (unsigned char *)(w.mx + n);
		w.satm = w.keep + n;
	}
	if (uniform) {
		w.x = x0;
		w.y = y0;
	} else {
		w.x = xr;
		w.y = yr;
		size_t j = 0;
		for (size_t k = 0; k < n; k++) {
			double xk = x0[0] + dx * (double)k;
			if (k == n - 1)
				xk = x0[n0 - 1];
			while (j + 2 < n0 && x0[j + 1] < xk)
				j++;
			double f = (xk - x0[j]) / (x0[j + 1] - x0[j]);
			if (f < 0.0)
				f = 0.0;
			if (f > 1.0)
				f = 1.0;
			xr[k] = xk;
			yr[k] = y0[j] + f * (y0[j + 1] - y0[j]);
		}
	}

	/* Saturated ranges as a mask, so that the loops below ask in O(1);
	 * bit 2 widens each range by the guard (2*half+2 points, set once
	 * half is known). Marked by binary search on the ascending axis. */
	memset(w.satm, 0, n);

	/* Savitzky-Golay parameters. Degree 4 (quartic) keeps band heights and
	 * widths where a quadratic of the same window would flatten narrow
	 * bands (Savitzky & Golay 1964; the usual advice, e.g. Press et al.,
	 * Numerical Recipes, 3rd ed., 14.9). Auto: a 7 cm-1 window of at
	 * least 7 points. On coarse grids that still widens narrow bands (8
	 * cm-1 bands by 7 % at 1.93 cm-1 spacing), so narrow bands are
	 * measured on the unsmoothed trace (below). An explicit window of 3-5
	 * points uses degree 2. */
	{
		if (o->smooth_cm > 0.0) {
			half = (int)floor(o->smooth_cm / (2.0 * dx) + 0.5);
			if (half < 1)
				half = 1;
			order = half >= 3 ? 4 : 2;
		} else {
			half = (int)floor(AUTO_SMOOTH_CM / (2.0 * dx) + 0.5);
			if (half < 3)
				half = 3;
			order = 4;
		}
		if (half > 50)
			half = 50;
		if ((size_t)(2 * half + 1) > n)
			half = (int)((n - 1) / 2);
		if (order > 2 * half)
			order = 2 * half;
		if (order < 2)
			order = 2;
	}
	if ((rc = irr_sg__smooth_d2(w.y, n, half, order, w.s, w.d2)) != IRR_OK) {
		irr_error_set(err, rc, name, 0, "smoothing failed");
		goto done;
	}
	gain2 = irr_sg__noise_gain(half, order, 2);
	for (size_t k = 0; k < nsat; k++) {
		size_t g = (size_t)(2 * half + 2), a = first_at_or_above(w.x, n, sat[2 * k]);
		for (size_t i = a > g ? a - g : 0; i < n && (i < a || w.x[i] <= sat[2 * k + 1]); i++)
			w.satm[i] |= (unsigned char)(2 | (i >= a ? 1 : 0));
		/* The guard beyond the high end. */
		size_t e = first_at_or_above(w.x, n, sat[2 * k + 1]);
		for (size_t i = e; i < n && i < e + g + 1; i++)
			w.satm[i] |= 2;
	}

	/* c: the smoothed trace above the baseline; r (s's storage, read
	 * point by point before it is overwritten): the unsmoothed one. */
	if (o->baseline) {
		hull_subtract(w.x, w.s, w.y, n, w.c, w.r, w.stk, w.stk2, w.lb, w.rb);
	} else {
		for (size_t i = 0; i < n; i++) {
			w.c[i] = w.s[i] - 0.0;
			w.r[i] = w.y[i] - 0.0;
		}
	}

	/* Noise. sigma: the global robust level of the raw trace (white-noise
	 * model); it is what min_snr counts in (a band needs a prominence of
	 * min_snr raw-noise sd; the smoothed trace it is measured on is
	 * quieter by the filter's gain, which is the margin that keeps noise
	 * out). Per block two levels: the raw trace's, and the second
	 * derivative's, the latter measured directly as the robust spread of
	 * the filtered derivative, so correlated noise and ripple (which
	 * second differences of the raw trace under-rate) are judged at the
	 * scale the filter passes; the raw level is never below what the
	 * derivative's spread implies. A block
	 * takes the median of its own and its two neighbours' levels, so one
	 * sharp band does not pass for noise; nothing goes below the global
	 * white level. A floor keeps noise-free (synthetic or heavily
	 * quantised) data from giving 0. */
	{
		double range = 0.0, lo = w.y[0], hi = w.y[0], q = HUGE_VAL, near = 0.0, near2 = 0.0;
		double *bn = w.blk, *bd = w.blk + nb;
		double *dd = w.lb; /* free until the prominences */
		/* One pass: the range, the second differences (for the block and
		 * global levels) and the smallest nonzero step (for the
		 * quantisation floor below). */
		size_t i = 0;
#ifdef IRR_SSE2
		/* Two points at a time, each lane with the scalar operations;
		 * the extremes and the least step are the same values in any
		 * order. */
		{
			double d0 = fabs(w.y[1] - w.y[0]);
			if (d0 > 0.0)
				q = d0;
			i = 1;
#ifdef PK_AVX512
			if (__builtin_cpu_supports("avx512f"))
				i = noise_pass_avx512(w.y, n, i, dd, &lo, &hi, &q);
#endif
			__m128d vlo = _mm_set1_pd(lo), vhi = _mm_set1_pd(hi), vq = _mm_set1_pd(q);
			__m128d two = _mm_set1_pd(2.0), sign = _mm_set1_pd(-0.0), zero = _mm_setzero_pd();
			double t[2];
			for (; i + 2 < n; i += 2) {
				__m128d a = _mm_loadu_pd(w.y + i - 1), v = _mm_loadu_pd(w.y + i);
				__m128d b = _mm_loadu_pd(w.y + i + 1);
				__m128d d = _mm_andnot_pd(sign, _mm_sub_pd(b, v)), pos = _mm_cmpgt_pd(d, zero);
				vlo = _mm_min_pd(v, vlo);
				vhi = _mm_max_pd(v, vhi);
				vq = _mm_min_pd(_mm_or_pd(_mm_and_pd(pos, d), _mm_andnot_pd(pos, vq)), vq);
				_mm_storeu_pd(dd + i, _mm_andnot_pd(sign, _mm_add_pd(_mm_sub_pd(a,
				                      _mm_mul_pd(two, v)), b)));
			}
			_mm_storeu_pd(t, vlo);
			lo = t[0] < t[1] ? t[0] : t[1];
			_mm_storeu_pd(t, vhi);
			hi = t[0] > t[1] ? t[0] : t[1];
			_mm_storeu_pd(t, vq);
			q = t[0] < t[1] ? t[0] : t[1];
		}
#endif
		for (; i + 1 < n; i++) {
			double v = w.y[i], d = fabs(w.y[i + 1] - v);
			if (v < lo)
				lo = v;
			if (v > hi)
				hi = v;
			if (d > 0.0 && d < q)
				q = d;
			if (i > 0)
				dd[i] = fabs(w.y[i - 1] - 2.0 * v + w.y[i + 1]);
		}
		if (w.y[n - 1] < lo)
			lo = w.y[n - 1];
		if (w.y[n - 1] > hi)
			hi = w.y[n - 1];
		range = hi - lo;
		/* Block raw levels (second differences centred in the block),
		 * then the global level. */
		{
			/* The blocks cover dd[1..n-2], whose median is the global
			 * level: its selection (select_kth) gathers its candidates
			 * in the blocks' passes, in the same order; it falls back
			 * to its own pass when its bracket misses. */
			size_t nd = n - 2, kd = nd / 2;
			kth_gather g, *gp = NULL;
			if (nd >= 2 * SELECT_SAMPLE) {
				kth_bracket(dd + 1, nd, kd, &g.lo, &g.hi, &g.mid);
				g.buf = w.rb;
				g.buf2 = w.smin; /* free until the prominences */
				g.below = g.m = g.m2 = 0;
				gp = &g;
			}
			for (size_t b = 0; b < nb; b++) {
				size_t a = b * NOISE_BLOCK, e = a + NOISE_BLOCK;
				if (e > n - 1)
					e = n - 1;
				bn[b] = noise_of(dd, a > 0 ? a : 1, e, w.scratch, &near, gp);
			}
			/* The bracket split at the sample's own median: only the
			 * half holding the median is searched. */
			if (gp && g.below <= kd && kd < g.below + g.m)
				sigma = 1.4826 * select_small(g.buf, g.m, kd - g.below) / sqrt(6.0);
			else if (gp && g.below + g.m <= kd && kd < g.below + g.m + g.m2)
				sigma = 1.4826 * select_small(g.buf2, g.m2, kd - g.below - g.m) / sqrt(6.0);
			else
				sigma = noise_of(dd, 1, n - 1, w.scratch, NULL, NULL);
		}
		if (sigma < 1e-5 * range)
			sigma = 1e-5 * range;
		/* Quantised data without visible noise (a flat run of one stored
		 * integer): the rounding error, sd q/sqrt(12) for a step q
		 * (uniform quantisation noise; B. Widrow, IRE Trans. Circuit
		 * Theory 3 (1956) 266), is the least noise there is. */
		if (q < HUGE_VAL && sigma < q / sqrt(12.0))
			sigma = q / sqrt(12.0);
		if (sigma <= 0.0)
			sigma = 1e-12;
		for (size_t b = 0; b < nb; b++) {
			size_t a = b * NOISE_BLOCK, e = a + NOISE_BLOCK;
			if (e > n)
				e = n;
			double sb = bn[b];
			bn[b] = sb > sigma ? sb : sigma;
			near2 = median_near(w.d2 + a, e - a, 1, near2, w.scratch, NULL);
			sb = 1.4826 * near2;
			bd[b] = sb > sigma * gain2 ? sb : sigma * gain2;
			if (bn[b] < bd[b] / gain2)
				bn[b] = bd[b] / gain2;
		}
		for (size_t b = 0; b < nb; b++) {
			w.bsn[b] = med3(bn, nb, b);
			w.bsd[b] = med3(bd, nb, b);
		}
	}

	/* The rubber band rests on the lowest dips of the noise, a few noise
	 * sd below the baseline's true level, which would add that much to
	 * every height (and widen weak bands, whose half height it lowers).
	 * Re-centre: the mean of the points that lie within 2.5 sd of the
	 * band (iterated, starting from the band itself) is the noise's own
	 * centre; it is taken off the trace. Without noise it is 0. */
	if (o->baseline) {
		double off = 0.0, gain0 = irr_sg__noise_gain(half, order, 0), kmax = 0.0;
		/* The points taken are gathered in order without branches
		 * (whether a point lies below the threshold is a coin toss on
		 * noise), then summed in that order: the same sum. A threshold
		 * exceeds the first one by at most the mean found before it, so
		 * after the first pass only the points below twice the largest
		 * step above their own (cand, with their block starts in cstart)
		 * can be taken; a block whose threshold came out above that
		 * bound after all is scanned whole. */
		double *sel = w.scratch, *cand = w.tv, *bound = w.base;
		size_t *cstart = w.stk, nc = 0;
#ifdef PK_AVX512
		int avx512 = __builtin_cpu_supports("avx512f") && __builtin_cpu_supports("popcnt");
#endif
		for (size_t b = 0; b < nb; b++)
			if (2.5 * gain0 * w.bsn[b] > kmax)
				kmax = 2.5 * gain0 * w.bsn[b];
		for (int it = 0; it < 3; it++) {
			double sum = 0.0;
			size_t cnt = 0;
			for (size_t b = 0; b < nb; b++) {
				double thr = off + 2.5 * gain0 * w.bsn[b];
				size_t a = b * NOISE_BLOCK, e = (b + 1) * NOISE_BLOCK < n ? (b + 1) * NOISE_BLOCK : n;
				if (it == 0) {
					double u = 2.5 * gain0 * w.bsn[b] + 2.0 * kmax;
					size_t i = a;
					bound[b] = u;
					cstart[b] = nc;
#ifdef PK_AVX512
					if (!nsat && avx512)
						i = below_avx512(w.c, e, i, thr, sel, &cnt, u, cand, &nc);
#endif
#ifdef IRR_SSE2
					/* Two at a time where nothing is saturated. */
					__m128d vt = _mm_set1_pd(thr), vu = _mm_set1_pd(u);
					for (; !nsat && i + 2 <= e; i += 2) {
						__m128d v = _mm_loadu_pd(w.c + i);
						int lt = _mm_movemask_pd(_mm_cmplt_pd(v, vt));
						int lu = _mm_movemask_pd(_mm_cmplt_pd(v, vu));
						_mm_storel_pd(sel + cnt, v);
						cnt += (size_t)(lt & 1);
						_mm_storeh_pd(sel + cnt, v);
						cnt += (size_t)(lt >> 1);
						_mm_storel_pd(cand + nc, v);
						nc += (size_t)(lu & 1);
						_mm_storeh_pd(cand + nc, v);
						nc += (size_t)(lu >> 1);
					}
#endif
					for (; i < e; i++) {
						double v = w.c[i];
						int ok = !(w.satm[i] & 1);
						sel[cnt] = v;
						cnt += (size_t)((v < thr) & ok);
						cand[nc] = v;
						nc += (size_t)((v < u) & ok);
					}
				} else if (thr <= bound[b]) {
					size_t ce = b + 1 < nb ? cstart[b + 1] : nc, j = cstart[b];
#ifdef PK_AVX512
					if (avx512)
						j = below_avx512(cand, ce, j, thr, sel, &cnt, 0.0, NULL, NULL);
#endif
#ifdef IRR_SSE2
					__m128d vt = _mm_set1_pd(thr);
					for (; j + 2 <= ce; j += 2) {
						__m128d v = _mm_loadu_pd(cand + j);
						int lt = _mm_movemask_pd(_mm_cmplt_pd(v, vt));
						_mm_storel_pd(sel + cnt, v);
						cnt += (size_t)(lt & 1);
						_mm_storeh_pd(sel + cnt, v);
						cnt += (size_t)(lt >> 1);
					}
#endif
					for (; j < ce; j++) {
						double v = cand[j];
						sel[cnt] = v;
						cnt += v < thr;
					}
				} else {
					for (size_t i = a; i < e; i++) {
						double v = w.c[i];
						sel[cnt] = v;
						cnt += (size_t)((v < thr) & !(w.satm[i] & 1));
					}
				}
			}
			for (size_t j = 0; j < cnt; j++)
				sum += sel[j];
			off = cnt ? sum / (double)cnt : 0.0;
		}
		if (off > 0.0) {
			size_t i = 0;
#ifdef PK_AVX512
			if (avx512)
				i = sub2_avx512(w.c, w.r, n, i, off);
#endif
#ifdef IRR_SSE2
			__m128d vo = _mm_set1_pd(off);
			for (; i + 2 <= n; i += 2) {
				_mm_storeu_pd(w.c + i, _mm_sub_pd(_mm_loadu_pd(w.c + i), vo));
				_mm_storeu_pd(w.r + i, _mm_sub_pd(_mm_loadu_pd(w.r + i), vo));
			}
#endif
			for (; i < n; i++) {
				w.c[i] -= off;
				w.r[i] -= off;
			}
		}
	}

	pl = irr_peaks__new();
	if (!pl) {
		rc = irr_error_set(err, IRR_ENOMEM, name, 0, "out of memory");
		goto done;
	}
	pl->noise = sigma;
	pl->range_low = x0[0];
	pl->range_high = x0[n0 - 1];
	pl->spacing = dx;
	pl->smooth_cm = (2 * half) * dx;
	if (nsat) {
		pl->sat = malloc(2 * nsat * sizeof(double));
		if (!pl->sat) {
			rc = irr_error_set(err, IRR_ENOMEM, name, 0, "out of memory");
			goto done;
		}
		memcpy(pl->sat, sat, 2 * nsat * sizeof(double));
		pl->nsat = nsat;
	}

	/* Maxima by prominence. */
	size_t nmx;
	{
		/* Maxima lower than the lowest height threshold are dropped
		 * below whatever their prominence. */
		double nmin = w.bsn[0];
		for (size_t b = 1; b < nb; b++)
			if (w.bsn[b] < nmin)
				nmin = w.bsn[b];
		/* (No thresholds here: few maxima, and a noise stretch's
		 * chunks would cost about what they spare.) */
		nmx = prominence_bases(w.c, n, o->min_snr * nmin, NULL, w.lb, w.rb, w.tv, w.stk2,
		                       w.base, w.smin, w.stk3, w.mx);
	}
	/* (base: free now) */
	{
		double hmax = 0.0;
		memset(w.keep, 0, n);
		/* Not within a half window of either end: there the end
		 * polynomial extrapolates, and a band cut off by the end of the
		 * measured range cannot be measured anyway. */
		size_t edge = half > 1 ? (size_t)half : 1;
		for (size_t k = 0; k < nmx; k++) {
			size_t i = w.mx[k];
			if (i < edge || i + edge >= n)
				continue;
			double base = w.lb[i] > w.rb[i] ? w.lb[i] : w.rb[i];
			double prom = w.c[i] - base;
			if (prom < o->min_snr * NOISE_AT(w, i))
				continue;
			if (w.c[i] < o->min_snr * NOISE_AT(w, i))
				continue;
			if (w.satm[i] & 2)
				continue;
			w.keep[i] = 1;
			if (w.c[i] > hmax)
				hmax = w.c[i];
		}
		/* Saturated ranges do not set the floor (see
		 * irr_peaks__reference_height), unless nothing else is there. */
		if (hmax == 0.0)
			for (size_t i = 0; nsat && i < n; i++)
				if ((w.satm[i] & 1) && w.c[i] > hmax)
					hmax = w.c[i];
		/* The relative floor is applied now, before widths and valleys
		 * are measured, so that ripple on a broad band (dropped here)
		 * does not cut the broad band's width short. A maximum is judged
		 * by its own size (prominence), so a wiggle on a strong band's
		 * flank does not pass for a band. */
		/* Only maxima were kept: the list of them is enough to visit. */
		for (size_t q = 0; q < nmx; q++) {
			size_t i = w.mx[q];
			if (w.keep[i] && w.c[i] - (w.lb[i] > w.rb[i] ? w.lb[i] : w.rb[i]) <
			                     o->min_rel_height * hmax)
				w.keep[i] = 4; /* real but below the floor: vetoes a shoulder */
		}
	}

	/* Measure each kept maximum. Valleys between neighbouring kept maxima
	 * bound the width walk and the area. */
	{
		size_t *kidx = w.stk; /* reuse: indices of kept maxima */
		size_t nk = 0, next_lv = 0;
		size_t *lvs = w.stk2, *rvs = w.stk3; /* valleys of each */
		double *area = w.base;
#ifdef PK_AVX512
		int avx512 = __builtin_cpu_supports("avx512f");
#endif
		for (size_t q = 0; q < nmx; q++)
			if (w.keep[w.mx[q]] & 1)
				kidx[nk++] = w.mx[q];
		for (size_t q = 0; q < nk; q++) {
			size_t i = kidx[q];
			size_t lv, rv; /* valley indices */
			/* Left valley: argmin of c between the previous kept maximum
			 * (or the start) and i; likewise right. */
#ifdef PK_AVX512
			/* The same lowest points found eight at a time: the
			 * lowest value, then its first and last place (the
			 * scans below take the first and keep the last one). */
			if (nsat == 0 && avx512 && !(w.c[i] != w.c[i])) {
				size_t b = q + 1 < nk ? kidx[q + 1] : n - 1, first;
				if (q == 0)
					lowest_avx512(w.c, 0, i, w.c[i], &first, &lv);
				else
					lv = next_lv;
				lowest_avx512(w.c, i, b, w.c[i], &rv, &next_lv);
			} else
#endif
			if (nsat == 0) {
				/* No walls: the stretch between two neighbours is
				 * scanned once for both valleys, the right one of this
				 * maximum (the first lowest point) and the left one of
				 * the next (the last lowest point). */
				size_t b = q + 1 < nk ? kidx[q + 1] : n - 1, last;
				double mn = w.c[i];
				if (q == 0) {
					lv = i;
					for (size_t j = i; j > 0; j--)
						if (w.c[j - 1] < w.c[lv])
							lv = j - 1;
				} else {
					lv = next_lv;
				}
				rv = last = i;
				for (size_t j = i + 1; j <= b; j++) {
					double v = w.c[j];
					if (v < mn) {
						mn = v;
						rv = last = j;
					} else if (v == mn) {
						last = j;
					}
				}
				next_lv = last;
			} else {
				size_t a = q > 0 ? kidx[q - 1] : 0, j;
				/* A saturated range is a wall: its band is not ours. */
				lv = i;
				for (j = i; j > a && !(w.satm[j - 1] & 1); j--)
					if (w.c[j - 1] < w.c[lv])
						lv = j - 1;
				size_t b = q + 1 < nk ? kidx[q + 1] : n - 1;
				rv = i;
				for (j = i; j < b && !(w.satm[j + 1] & 1); j++)
					if (w.c[j + 1] < w.c[rv])
						rv = j + 1;
			}
			lvs[q] = lv;
			rvs[q] = rv;
		}
		band_areas(w.x, w.c, lvs, rvs, nk, area);
		for (size_t q = 0; q < nk; q++) {
			size_t i = kidx[q], lv = lvs[q], rv = rvs[q];
			irr_peak p;
			double off, h;
			interp3(w.c, i, 1, &off, &h);
			memset(&p, 0, sizeof p);
			p.position = x_at(w.x, n, (double)i + off);
			p.height = h;
			p.prominence = h - (w.lb[i] > w.rb[i] ? w.lb[i] : w.rb[i]);
			/* Width at half height above the baseline, each side walked
			 * only down to the valley that parts it from the next band; a
			 * side that does not get there is mirrored from the other. */
			/* Width: at half height above the baseline (each side walked
			 * only down to the valley that parts it from the next band; a
			 * side that does not get there is mirrored from the other),
			 * unless the band stands on a pedestal (a sharp C-H band on a
			 * broad O-H band), seen as a half-height width, reached on
			 * both sides, much larger than the width at half prominence:
			 * then the latter, which is the sharp band's own. */
			for (int pass = 0; pass < 2; pass++) {
				/* Pass 0 on the smoothed trace; a band narrower than
				 * twice the window is measured again (pass 1) on the
				 * unsmoothed one, which the filter has not widened;
				 * its noise moves the crossings by only noise/slope. */
				const double *tr = pass == 0 ? w.c : w.r;
				double lo1, hi1, lo2, hi2;
				int ok1 = width_at(&w, tr, n, i, lv, rv, p.position, 0.5 * h, &lo1, &hi1);
				int ok2 = width_at(&w, tr, n, i, lv, rv, p.position, h - 0.5 * p.prominence, &lo2, &hi2);
				/* The pedestal case needs both half-height crossings: a
				 * band of a close pair reaches half height on its free
				 * side only, and its mirrored width is the better one. */
				if (ok1 && (ok1 == 1 || !ok2 || hi1 - lo1 <= 1.5 * (hi2 - lo2))) {
					p.low = lo1;
					p.high = hi1;
				} else if (ok1) {
					p.low = lo2;
					p.high = hi2;
				} else {
					/* Half height is not reached on either side (a band
					 * between stronger neighbours): estimate from the
					 * curvature at the top, between the Lorentzian
					 * (8h/|y''|) and Gaussian (8 ln2 h/|y''|) relations,
					 * but never below the width at half prominence. */
					double curv = -w.d2[i] / (dx * dx);
					double fw = curv > 0.0 ? sqrt(6.8 * h / curv) : 0.0;
					if (ok2 && fw < hi2 - lo2)
						fw = hi2 - lo2;
					p.low = p.position - 0.5 * fw;
					p.high = p.position + 0.5 * fw;
				}
				p.fwhm = p.high - p.low;
				/* Degenerate shapes (a step, a ramp) can give no sensible
				 * width: then it is unknown. */
				if (!(p.fwhm > 0.0) || !isfinite(p.fwhm)) {
					p.fwhm = 0.0;
					p.low = p.high = p.position;
				}
				/* A faint band (prominence under 50 noise sd) keeps the
				 * smoothed width: on the raw trace noise would move its
				 * crossings by more than the filter widens it. */
				if (p.fwhm >= 2.0 * (2 * half) * dx || p.prominence < 50.0 * NOISE_AT(w, i))
					break;
			}
			/* Bands much wider than the smoothing window (or 8 points), or
			 * faint ones
			 * (prominence under 50 noise sd), have a top whose noise moves
			 * the three-point maximum by more than a fit's bias: there the
			 * vertex of a parabola fitted over the top +-0.4 FWHM,
			 * re-centred once (at least 9 points). Clear, narrower bands
			 * keep the three-point maximum, which for an asymmetric band
			 * is the observed one. */
			{
				double mf = floor(0.4 * p.fwhm / dx);
				size_t m = mf >= 4.0 && mf < (double)n ? (size_t)mf : 0;
				int wide = p.fwhm >= 4.0 * (half > 4 ? 2 * half : 8) * dx;
				int faint = p.prominence < 50.0 * NOISE_AT(w, i);
				if (m >= 4 && !p.shoulder && (wide || faint)) {
					double v = vertex_fit(w.c, i, m, lv, rv);
					if (!isnan(v)) {
						double t = (double)i + v, tc = floor(t + 0.5);
						double v2 = NAN;
						if (tc > (double)lv && tc < (double)rv)
							v2 = vertex_fit(w.c, (size_t)tc, m, lv, rv);
						if (!isnan(v2))
							t = tc + v2;
						if (t > (double)lv && t < (double)rv)
							p.position = x_at(w.x, n, t);
					}
				}
			}
			p.area = area[q];
			if ((rc = irr_peaks__push(pl, &p)) != IRR_OK) {
				irr_error_set(err, rc, name, 0, "out of memory");
				goto done;
			}
		}

		/* Shoulders: minima of the second derivative that form their own
		 * lobe (prominence of -d2 above its noise) and are not the lobe of
		 * a kept maximum (each maximum owns the significant lobe nearest to
		 * it). */
		if (o->shoulders && nk > 0) {
			double *nd2 = w.scratch;
			size_t *sig = w.stk + nk, ns = 0; /* significant lobes, after kidx */
			size_t i0 = 0;
#ifdef PK_AVX512
			if (__builtin_cpu_supports("avx512f"))
				i0 = neg_avx512(nd2, w.d2, n, i0);
#endif
#ifdef IRR_SSE2
			/* Negation flips the sign bit: two at a time. */
			for (__m128d sign = _mm_set1_pd(-0.0); i0 + 2 <= n; i0 += 2)
				_mm_storeu_pd(nd2 + i0, _mm_xor_pd(_mm_loadu_pd(w.d2 + i0), sign));
#endif
			for (size_t i = i0; i < n; i++)
				nd2[i] = -w.d2[i];
			/* Only lobes above zero count: the floor is the least
			 * positive value. */
			double *thr = w.blk; /* (the block levels' scratch: free) */
			for (size_t b = 0; b < nb; b++)
				thr[b] = o->shoulder_factor * o->min_snr * w.bsd[b];
			size_t nmx2 = prominence_bases(nd2, n, DBL_TRUE_MIN, thr, w.lb, w.rb, w.tv, w.stk2,
			                               w.base, w.smin, w.stk3, w.mx);
			for (size_t k = 0; k < nmx2; k++) {
				size_t i = w.mx[k];
				if (!(nd2[i] > 0.0))
					continue;
				double base = w.lb[i] > w.rb[i] ? w.lb[i] : w.rb[i];
				if (nd2[i] - base < o->shoulder_factor * o->min_snr * D2NOISE_AT(w, i))
					continue;
				sig[ns++] = i;
			}
			/* Each kept maximum claims the nearest significant lobe. */
			for (size_t q = 0, j = 0; q < nk; q++) {
				size_t k = kidx[q];
				while (j + 1 < ns && sig[j + 1] <= k)
					j++;
				if (ns == 0)
					break;
				size_t best = j;
				if (j + 1 < ns && (sig[j] > k ? sig[j] - k : k - sig[j]) > sig[j + 1] - k)
					best = j + 1;
				w.keep[sig[best]] |= 2;
			}
			for (size_t q = 0; q < ns; q++) {
				size_t i = sig[q];
				if (w.keep[i] & 3)
					continue;
				/* A shoulder must stand higher above the baseline than a
				 * maximum (the rubber band lies on the noise's lowest
				 * dips, which lifts every height by a few noise sd). */
				if (w.c[i] < o->shoulder_factor * o->min_snr * NOISE_AT(w, i))
					continue;
				/* Next to a kept maximum it is part of that maximum's
				 * top (a flat top has two lobes), not a separate band;
				 * next to a maximum dropped by the relative floor it is
				 * that small band, which stays dropped. A maximum too
				 * faint for the noise threshold does not veto: its own
				 * significant lobe makes it a band, reported as a
				 * shoulder. */
				{
					int near = 0;
					for (size_t j = i > 2 ? i - 2 : 1; j <= i + 2 && j + 1 < n; j++)
						if (w.keep[j] & 5)
							near = 1;
					if (near)
						continue;
				}
				if (w.satm[i] & 2)
					continue;
				/* Against ripple where the noise is very low (digitised
				 * or interpolated data): the lobe must be a tenth as deep
				 * as that of the nearest kept maximum at least. */
				{
					size_t lo = 0, hi = nk, k;
					double ref = 0.0;
					while (lo < hi) {
						size_t mid = (lo + hi) / 2;
						if (kidx[mid] < i)
							lo = mid + 1;
						else
							hi = mid;
					}
					k = lo < nk ? kidx[lo] : kidx[nk - 1];
					if (lo > 0 && (lo == nk || i - kidx[lo - 1] < kidx[lo] - i))
						k = kidx[lo - 1];
					for (size_t j = k > 2 ? k - 2 : 0; j <= k + 2 && j < n; j++)
						if (nd2[j] > ref)
							ref = nd2[j];
					double base = w.lb[i] > w.rb[i] ? w.lb[i] : w.rb[i];
					if (nd2[i] - base < o->shoulder_depth * ref)
						continue;
				}
				{
					irr_peak p;
					double off, v;
					interp3(nd2, i, 0, &off, &v);
					memset(&p, 0, sizeof p);
					p.position = x_at(w.x, n, (double)i + off);
					p.height = w.c[i];
					p.low = p.high = p.position;
					p.shoulder = 1;
					if ((rc = irr_peaks__push(pl, &p)) != IRR_OK) {
						irr_error_set(err, rc, name, 0, "out of memory");
						goto done;
					}
				}
			}
		}
	}

	/* Saturated ranges: the band is there and strong; its centre is the best
	 * position; height is the clipped level above the baseline (a lower
	 * bound); width and area are unknown (0). */
	for (size_t k = 0; k < nsat; k++) {
		irr_peak p;
		double lo = sat[2 * k], hi = sat[2 * k + 1];
		double t = (0.5 * (lo + hi) - w.x[0]) / dx;
		size_t i;
		memset(&p, 0, sizeof p);
		p.position = 0.5 * (lo + hi);
		p.low = lo;
		p.high = hi;
		p.saturated = 1;
		if (t < 0.0)
			t = 0.0;
		if (t > (double)(n - 1))
			t = (double)(n - 1);
		i = (size_t)(t + 0.5);
		if (i >= n)
			i = n - 1;
		p.height = w.c[i] > 0.0 ? w.c[i] : 0.0;
		if ((rc = irr_peaks__push(pl, &p)) != IRR_OK) {
			irr_error_set(err, rc, name, 0, "out of memory");
			goto done;
		}
	}

	irr_peaks__classify(pl, o);
	/* Drop what is below the relative floor (never a saturated band). */
	{
		size_t m = 0;
		double hmax = irr_peaks__reference_height(pl->peaks, pl->count);
		/* Shoulders have no prominence; they are judged by height. */
		for (size_t i = 0; i < pl->count; i++) {
			const irr_peak *p = &pl->peaks[i];
			if (!p->shoulder || p->height >= o->min_rel_height * hmax)
				pl->peaks[m++] = *p;
		}
		pl->count = m;
	}
	irr_peaks__sort(pl);
	rc = IRR_OK;
done:
	free(w.block);
	if (rc != IRR_OK) {
		irr_peaklist_free(pl);
		return rc;
	}
	*out = pl;
	return IRR_OK;
}

/* ---- from a spectrum ------------------------------------------------------ */

int irr_peaks_pick(irr_peaklist **out, const irr_spectrum *s,
                   const irr_peak_options *o, irr_error *err)
{
	size_t nsat, n;
	double *sat = NULL;
	const char *name;
	int rc;
	if (out)
		*out = NULL;
	if (!out || !s)
		return irr_error_set(err, IRR_EINPUT, "", 0, "no spectrum");
	name = irr_spectrum_name(s);
	if (!irr_spectrum_is_normalised(s))
		return irr_error_set(err, IRR_EINPUT, name, 0,
		                     "spectrum is not normalised (call irr_spectrum_normalise first)");
	n = irr_spectrum_points(s);
	nsat = irr_spectrum_saturated_count(s);
	if (nsat) {
		sat = malloc(2 * nsat * sizeof *sat);
		if (!sat)
			return irr_error_set(err, IRR_ENOMEM, name, 0, "out of memory");
		for (size_t k = 0; k < nsat; k++)
			irr_spectrum_saturated_range(s, k, &sat[2 * k], &sat[2 * k + 1]);
	}
	rc = irr_peaks__pick_xy(out, irr_spectrum_x(s), irr_spectrum_y(s), n, sat, nsat,
	                        o, name, err);
	free(sat);
	if (rc == IRR_OK) {
		double lo, hi;
		irr_spectrum_range(s, &lo, &hi);
		if (hi > lo) {
			(*out)->range_low = lo;
			(*out)->range_high = hi;
		}
	}
	return rc;
}
