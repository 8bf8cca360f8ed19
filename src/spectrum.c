/* spectrum.c: the spectrum object of the "read spectrum" stage: creation,
 * accessors, and normalisation to absorbance on an ascending cm-1 axis with
 * saturated regions and the measured range marked. Reading files is in
 * spectrum_read.c. */
#include "irrecon/spectrum.h"
#include "jcamp.h"
#include "spectrum_vec.h"
#include "vlog.h"

#include <locale.h>
#include <math.h>
#include <pthread.h>
#include <stdarg.h>
#include <stdio.h>
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
#define SP_AVX512 1
#endif

/* Transmittance (fraction) at or below which the detector is taken to see
 * no light: A >= 3. Photometric accuracy of FT-IR and dispersive
 * instruments is poor above A ~ 2-3 (common practice), and the shared set
 * shows instruments that floor there (a C=O band at T ~ 0). */
#define T_FLOOR 1e-3
/* Highest wavenumber accepted, cm-1 (see normalise_arrays). */
#define AXIS_MAX_CM 25000.0
/* A flat top (several equal points at the very maximum) below this
 * absorbance is taken as quantisation, not clipping. */
#define CLIP_MIN_ABSORBANCE 1.0
/* Points in flat runs at the extreme needed to call it clipping: two runs of
 * two (toluene-atr.csv: 694 and 728 cm-1 both at A = 5.000) or one of three. */
#define CLIP_MIN_POINTS 3
/* log10(x) = ln(x) * log10(e); ln is the faster of the two in libm. */
#define LOG10_E 0.43429448190325182765

const char *irr_yunits_name(irr_yunits u)
{
	static const char *const names[] = {
		"unknown", "transmittance", "percent_transmittance", "absorbance",
		"reflectance", "kubelka_munk", "arbitrary"};
	if ((int)u < 0 || (size_t)u >= sizeof names / sizeof names[0])
		return "unknown";
	return names[u];
}

void irr_read_options_init(irr_read_options *o)
{
	if (!o)
		return;
	memset(o, 0, sizeof *o);
	o->block = 0;
	o->y_units = IRR_Y_UNKNOWN;
	o->max_bytes = IRR_SPECTRUM__DEFAULT_MAX_BYTES;
	o->max_points = IRR_SPECTRUM__DEFAULT_MAX_POINTS;
}

size_t irr_spectrum__max_points(const irr_read_options *o)
{
	return (o && o->max_points) ? o->max_points : IRR_SPECTRUM__DEFAULT_MAX_POINTS;
}

size_t irr_spectrum__max_bytes(const irr_read_options *o)
{
	return (o && o->max_bytes) ? o->max_bytes : IRR_SPECTRUM__DEFAULT_MAX_BYTES;
}

static char *dup_str(const char *s)
{
	size_t n = strlen(s ? s : "");
	char *d = malloc(n + 1);
	if (d)
		memcpy(d, s ? s : "", n + 1);
	return d;
}

int irr_spectrum__create(irr_spectrum **out, size_t n, const char *name,
                         const char *format, irr_error *err)
{
	irr_spectrum *s;
	*out = NULL;
	s = calloc(1, sizeof *s);
	if (!s)
		return irr_spectrum__fail(err, IRR_ENOMEM, name, 0, "out of memory");
	s->name = dup_str(name);
	s->title = dup_str("");
	s->format = format;
	if (n) {
		s->x = malloc(n * sizeof *s->x);
		s->y = malloc(n * sizeof *s->y);
	}
	if (!s->name || !s->title || (n && (!s->x || !s->y))) {
		irr_spectrum_free(s);
		return irr_spectrum__fail(err, IRR_ENOMEM, name, 0,
		                     "out of memory for %zu points", n);
	}
	s->n = n;
	*out = s;
	return IRR_OK;
}

void irr_spectrum__adopt(irr_spectrum *s, double *x, double *y, size_t n)
{
	free(s->x);
	free(s->y);
	s->x = x;
	s->y = y;
	s->n = n;
}

int irr_spectrum__set_title(irr_spectrum *s, const char *title, size_t len)
{
	char *t = malloc(len + 1);
	if (!t)
		return IRR_ENOMEM;
	memcpy(t, title, len);
	t[len] = '\0';
	free(s->title);
	s->title = t;
	return IRR_OK;
}

/* The "C" locale for message formatting, made once per process. */
static locale_t c_numeric;
static void make_c_numeric(void)
{
	c_numeric = newlocale(LC_ALL_MASK, "C", (locale_t)0);
}

static void format_c(char *buf, size_t size, const char *fmt, va_list ap)
{
	static pthread_once_t once = PTHREAD_ONCE_INIT;
	locale_t old = (locale_t)0;
	pthread_once(&once, make_c_numeric);
	if (c_numeric)
		old = uselocale(c_numeric);
	vsnprintf(buf, size, fmt, ap);
	if (c_numeric)
		uselocale(old);
}

int irr_spectrum__fail(irr_error *err, int code, const char *file, long line,
                       const char *fmt, ...)
{
	char buf[1024];
	va_list ap;
	va_start(ap, fmt);
	format_c(buf, sizeof buf, fmt, ap);
	va_end(ap);
	return irr_error_set(err, code, file, line, "%s", buf);
}

int irr_spectrum__warn(irr_spectrum *s, const char *fmt, ...)
{
	char buf[512];
	va_list ap;
	va_start(ap, fmt);
	format_c(buf, sizeof buf, fmt, ap);
	va_end(ap);
	for (char *p = buf; *p; p++)
		if (*p == '\n' || *p == '\r')
			*p = ' ';
	/* The same warning twice (e.g. once per block line) says nothing new. */
	for (size_t i = 0; i < s->nwarn; i++)
		if (!strcmp(s->warnings[i], buf))
			return IRR_OK;
	if (s->nwarn == s->capwarn) {
		size_t cap = s->capwarn ? 2 * s->capwarn : 4;
		char **w = realloc(s->warnings, cap * sizeof *w);
		if (!w)
			return IRR_ENOMEM;
		s->warnings = w;
		s->capwarn = cap;
	}
	if (!(s->warnings[s->nwarn] = dup_str(buf)))
		return IRR_ENOMEM;
	s->nwarn++;
	return IRR_OK;
}

int irr_spectrum__check_xy(const irr_spectrum *s, const long *lines, irr_error *err)
{
	size_t n = s->n;
	const double *x = s->x, *y = s->y;
	if (n < 2)
		return irr_spectrum__fail(err, IRR_EINPUT, s->name, lines && n ? lines[0] : 0,
		                     "%zu data point%s: a spectrum needs at least 2",
		                     n, n == 1 ? "" : "s");
	for (size_t i = 0; i < n; i++)
		if (!isfinite(x[i]) || !isfinite(y[i]))
			return irr_spectrum__fail(err, IRR_EINPUT, s->name, lines ? lines[i] : 0,
			                     "point %zu is not a finite number (NaN or infinity)",
			                     i + 1);
	{
		int up = x[1] > x[0];
		for (size_t i = 1; i < n; i++) {
			double d = x[i] - x[i - 1];
			if (up ? !(d > 0) : !(d < 0))
				return irr_spectrum__fail(err, IRR_EINPUT, s->name, lines ? lines[i] : 0,
				                     "X is not monotonic: %.10g is followed by %.10g (X must strictly %s)",
				                     x[i - 1], x[i], up ? "increase" : "decrease");
		}
	}
	/* Wavenumbers and wavelengths are both positive. */
	for (size_t i = 0; i < n; i++)
		if (!(x[i] > 0))
			return irr_spectrum__fail(err, IRR_EINPUT, s->name, lines ? lines[i] : 0,
			                     "X value %.10g is %s: wavenumbers (and wavelengths) are positive",
			                     x[i], x[i] < 0 ? "negative" : "zero");
	return IRR_OK;
}

int irr_spectrum_from_xy(irr_spectrum **out, const double *x, const double *y,
                         size_t n, irr_yunits units, const char *name,
                         irr_error *err)
{
	irr_spectrum *s;
	int rc;
	if (!out)
		return irr_spectrum__fail(err, IRR_EINPUT, name, 0, "no output pointer");
	*out = NULL;
	if (!name)
		name = "arrays";
	if (n && (!x || !y))
		return irr_spectrum__fail(err, IRR_EINPUT, name, 0, "no data arrays");
	if ((rc = irr_spectrum__create(&s, n, name, "arrays", err)) < 0)
		return rc;
	if (n) {
		memcpy(s->x, x, n * sizeof *x);
		memcpy(s->y, y, n * sizeof *y);
	}
	if ((rc = irr_spectrum__check_xy(s, NULL, err)) < 0) {
		irr_spectrum_free(s);
		return rc;
	}
	s->units = s->source_units = units;
	s->first_x = s->x[0];
	s->last_x = s->x[n - 1];
	*out = s;
	return IRR_OK;
}

void irr_spectrum_free(irr_spectrum *s)
{
	if (!s)
		return;
	free(s->x);
	free(s->y);
	free(s->name);
	free(s->title);
	for (size_t i = 0; i < s->nwarn; i++)
		free(s->warnings[i]);
	free(s->warnings);
	free(s->sat);
	free(s);
}

/* ---- accessors -------------------------------------------------------- */

size_t irr_spectrum_points(const irr_spectrum *s) { return s ? s->n : 0; }
const double *irr_spectrum_x(const irr_spectrum *s) { return s ? s->x : NULL; }
const double *irr_spectrum_y(const irr_spectrum *s) { return s ? s->y : NULL; }
irr_yunits irr_spectrum_y_units(const irr_spectrum *s) { return s ? s->units : IRR_Y_UNKNOWN; }
irr_yunits irr_spectrum_source_y_units(const irr_spectrum *s)
{
	return s ? s->source_units : IRR_Y_UNKNOWN;
}
int irr_spectrum_is_normalised(const irr_spectrum *s) { return s ? s->normalised : 0; }
const char *irr_spectrum_name(const irr_spectrum *s) { return s && s->name ? s->name : ""; }
const char *irr_spectrum_source_format(const irr_spectrum *s)
{
	return s && s->format ? s->format : "";
}
const char *irr_spectrum_title(const irr_spectrum *s) { return s && s->title ? s->title : ""; }
double irr_spectrum_first_x(const irr_spectrum *s) { return s ? s->first_x : 0.0; }
double irr_spectrum_last_x(const irr_spectrum *s) { return s ? s->last_x : 0.0; }
size_t irr_spectrum_warning_count(const irr_spectrum *s) { return s ? s->nwarn : 0; }
const char *irr_spectrum_warning(const irr_spectrum *s, size_t i)
{
	return s && i < s->nwarn ? s->warnings[i] : NULL;
}
size_t irr_spectrum_saturated_count(const irr_spectrum *s) { return s ? s->nsat : 0; }

void irr_spectrum_saturated_range(const irr_spectrum *s, size_t i, double *low,
                                  double *high)
{
	double lo = 0.0, hi = 0.0;
	if (s && i < s->nsat) {
		lo = s->sat[2 * i];
		hi = s->sat[2 * i + 1];
	}
	if (low)
		*low = lo;
	if (high)
		*high = hi;
}

void irr_spectrum_range(const irr_spectrum *s, double *low, double *high)
{
	double lo = 0.0, hi = 0.0;
	if (s && s->normalised) {
		lo = s->range_lo;
		hi = s->range_hi;
	} else if (s && s->n) {
		/* Before normalisation: the range as read, in cm-1. */
		double a = s->x[0], b = s->x[s->n - 1];
		if (s->x_micrometers && a > 0 && b > 0) {
			a = 1e4 / a;
			b = 1e4 / b;
		}
		lo = a < b ? a : b;
		hi = a < b ? b : a;
	}
	if (low)
		*low = lo;
	if (high)
		*high = hi;
}

/* ---- normalisation ---------------------------------------------------- */

static void swap_d(double *a, double *b)
{
	double t = *a;
	*a = *b;
	*b = t;
}

/* k-th smallest of v[0..n-1] (reorders v): Hoare's selection, O(n)
 * expected, so unit detection costs no sort. */
static double select_kth(double *v, size_t n, size_t k)
{
	size_t lo = 0, hi = n - 1;
	while (lo < hi) {
		double pivot = v[lo + (hi - lo) / 2];
		size_t i = lo, j = hi;
		while (i <= j) {
			while (v[i] < pivot)
				i++;
			while (v[j] > pivot)
				j--;
			if (i <= j) {
				swap_d(&v[i], &v[j]);
				i++;
				if (j == 0)
					break;
				j--;
			}
		}
		if (k <= j)
			hi = j;
		else if (k >= i)
			lo = i;
		else
			break;
	}
	return v[k];
}

/* Where the median sits between the minimum and the maximum, 0..1: a
 * transmittance spectrum has its baseline (most points) near the top, an
 * absorbance spectrum near the bottom. */
static int median_position(const double *y, size_t n, double *pos, double *lo, double *hi)
{
	double *tmp = malloc(n * sizeof *tmp);
	double mn = y[0], mx = y[0], med;
	if (!tmp)
		return IRR_ENOMEM;
	for (size_t i = 0; i < n; i++) {
		tmp[i] = y[i];
		if (y[i] < mn)
			mn = y[i];
		if (y[i] > mx)
			mx = y[i];
	}
	med = select_kth(tmp, n, n / 2);
	free(tmp);
	*lo = mn;
	*hi = mx;
	*pos = mx > mn ? (med - mn) / (mx - mn) : 0.0;
	return IRR_OK;
}

static int add_sat(irr_spectrum *s, double lo, double hi)
{
	if (s->nsat == s->capsat) {
		size_t cap = s->capsat ? 2 * s->capsat : 4;
		double *p = realloc(s->sat, 2 * cap * sizeof *p);
		if (!p)
			return IRR_ENOMEM;
		s->sat = p;
		s->capsat = cap;
	}
	s->sat[2 * s->nsat] = lo;
	s->sat[2 * s->nsat + 1] = hi;
	s->nsat++;
	return IRR_OK;
}

/* Marks points that sit in flat runs (>= 2 equal neighbours) at the extreme
 * value `e` of y; returns how many were marked. An instrument that clips
 * writes one constant for every point beyond its limit. */
static size_t mark_flat_extreme(const double *y, size_t n, double e, unsigned char *mark)
{
	double tol = 1e-9 * (fabs(e) > 1.0 ? fabs(e) : 1.0), lo = e - tol, hi = e + tol;
	size_t count = 0, run = 0;
	for (size_t i = 0; i <= n; i++) {
		if (i < n && y[i] >= lo && y[i] <= hi) {
			run++;
			continue;
		}
		if (run >= 2) {
			memset(mark + i - run, 1, run);
			count += run;
		}
		run = 0;
	}
	return count;
}

#ifdef SP_AVX512
static int have_avx512(void)
{
	return __builtin_cpu_supports("avx512f") && __builtin_cpu_supports("popcnt");
}

/* highest() 32 values a time from y[1], in four independent chains (one
 * chain waits on max's latency). Returns the first index not done; *hi is
 * the highest so far. */
__attribute__((target("avx512f"))) static size_t highest_avx512(const double *y, size_t n,
                                                                double *hi)
{
	__m512d h0 = _mm512_set1_pd(y[0]), h1 = h0, h2 = h0, h3 = h0;
	double t[8];
	size_t i = 1;
	/* max(v, h) keeps h when v is NaN, as the plain scan skips it. */
	for (; i + 32 <= n; i += 32) {
		h0 = _mm512_max_pd(_mm512_loadu_pd(y + i), h0);
		h1 = _mm512_max_pd(_mm512_loadu_pd(y + i + 8), h1);
		h2 = _mm512_max_pd(_mm512_loadu_pd(y + i + 16), h2);
		h3 = _mm512_max_pd(_mm512_loadu_pd(y + i + 24), h3);
	}
	for (; i + 8 <= n; i += 8)
		h0 = _mm512_max_pd(_mm512_loadu_pd(y + i), h0);
	h0 = _mm512_max_pd(_mm512_max_pd(h1, h0), _mm512_max_pd(h3, h2));
	_mm512_storeu_pd(t, h0);
	*hi = y[0];
	for (int k = 0; k < 8; k++)
		*hi = t[k] > *hi ? t[k] : *hi;
	return i;
}

/* The transmittance scan of normalise_arrays eight points at a time from
 * y[0]: lowest value, lowest positive value, saturation flags (one byte
 * each) and their count. Returns the first index not done. */
__attribute__((target("avx512f,popcnt"))) static size_t
tscan_avx512(const double *y, size_t n, unsigned char *sat, double *tmin, double *tminpos,
             size_t *nsat)
{
	__m512d lo = _mm512_set1_pd(*tmin), lp = _mm512_set1_pd(*tminpos);
	const __m512d zero = _mm512_setzero_pd(), fl = _mm512_set1_pd(T_FLOOR);
	const __m512i one = _mm512_set1_epi64(1);
	double t[8];
	size_t i = 0, count = 0;
	for (; i + 8 <= n; i += 8) {
		__m512d v = _mm512_loadu_pd(y + i);
		__mmask8 pos = _mm512_cmp_pd_mask(v, zero, _CMP_GT_OQ);
		__mmask8 f = _mm512_cmp_pd_mask(v, fl, _CMP_LE_OQ);
		lo = _mm512_min_pd(v, lo);
		lp = _mm512_mask_min_pd(lp, pos, v, lp);
		/* Flags as bytes 0/1: the mask's lanes narrowed to 8 bits. */
		_mm_storel_epi64((__m128i *)(void *)(sat + i),
		                 _mm512_cvtepi64_epi8(_mm512_maskz_mov_epi64(f, one)));
		count += (size_t)__builtin_popcount(f);
	}
	_mm512_storeu_pd(t, lo);
	for (int k = 0; k < 8; k++)
		*tmin = t[k] < *tmin ? t[k] : *tmin;
	_mm512_storeu_pd(t, lp);
	for (int k = 0; k < 8; k++)
		*tminpos = t[k] < *tminpos ? t[k] : *tminpos;
	*nsat += count;
	return i;
}

/* dst[i] = src[n-1-i] for x and y, eight at a time; returns the first i
 * not done. */
__attribute__((target("avx512f"))) static size_t reverse_avx512(const double *sx, const double *sy,
                                                                double *x, double *y, size_t n)
{
	const __m512i rev = _mm512_set_epi64(0, 1, 2, 3, 4, 5, 6, 7);
	size_t i = 0;
	for (; i + 8 <= n; i += 8) {
		size_t j = n - 8 - i;
		_mm512_storeu_pd(x + i, _mm512_permutexvar_pd(rev, _mm512_loadu_pd(sx + j)));
		_mm512_storeu_pd(y + i, _mm512_permutexvar_pd(rev, _mm512_loadu_pd(sy + j)));
	}
	return i;
}
#endif

#ifdef SP_AVX512
/* irr_spectrum__scale_points eight points at a time from 0; returns the
 * first index not done, with *rmin, *rmax and *z as the plain loop leaves
 * them there. min/max keep their second operand on equality and NaN, as
 * v < rmin ? v : rmin does; the one value two orders could tell apart is
 * a zero's sign, so a zero extreme is the first zero met, as in the loop.
 * z is 0 or NaN in any order. */
__attribute__((target("avx512f"))) static size_t scale_avx512(double *x, double *y, size_t n,
                                                              double x0, double dx, double yf,
                                                              double *rmin, double *rmax,
                                                              double *z)
{
	__m512d lo = _mm512_set1_pd(y[0]), hi = lo, zs = _mm512_setzero_pd();
	__m512d di = _mm512_set_pd(7, 6, 5, 4, 3, 2, 1, 0);
	const __m512d vx0 = _mm512_set1_pd(x0), vdx = _mm512_set1_pd(dx), vyf = _mm512_set1_pd(yf);
	const __m512d zero = _mm512_setzero_pd(), eight = _mm512_set1_pd(8.0);
	double t[8], first_zero = 0.0, r;
	int have_zero = 0;
	size_t i = 0;
	for (; i + 8 <= n; i += 8) {
		__m512d v = _mm512_loadu_pd(y + i), w;
		if (!have_zero) {
			__mmask8 zm = _mm512_cmp_pd_mask(v, zero, _CMP_EQ_OQ);
			if (zm) {
				first_zero = y[i + (size_t)__builtin_ctz(zm)];
				have_zero = 1;
			}
		}
		lo = _mm512_min_pd(v, lo);
		hi = _mm512_max_pd(v, hi);
		_mm512_storeu_pd(x + i, _mm512_add_pd(vx0, _mm512_mul_pd(di, vdx)));
		w = _mm512_mul_pd(v, vyf);
		_mm512_storeu_pd(y + i, w);
		zs = _mm512_add_pd(zs, _mm512_mul_pd(w, zero));
		di = _mm512_add_pd(di, eight);
	}
	_mm512_storeu_pd(t, lo);
	r = *rmin;
	for (int k = 0; k < 8; k++)
		r = t[k] < r ? t[k] : r;
	*rmin = r == 0.0 && have_zero ? first_zero : r;
	_mm512_storeu_pd(t, hi);
	r = *rmax;
	for (int k = 0; k < 8; k++)
		r = t[k] > r ? t[k] : r;
	*rmax = r == 0.0 && have_zero ? first_zero : r;
	_mm512_storeu_pd(t, zs);
	for (int k = 0; k < 8; k++)
		*z += t[k];
	return i;
}
#endif

void irr_spectrum__scale_points(double *x, double *y, size_t n, double x0, double dx, double yf,
                                double *rmin, double *rmax, double *z)
{
	/* The index runs as a double too (exact below 2^53); a sum of
	 * v * 0 is NaN exactly when some v is not finite. */
	double di = 0.0, lo = y[0], hi = y[0], zs = 0.0;
	size_t i = 0;
#ifdef SP_AVX512
	if (n >= 16 && __builtin_cpu_supports("avx512f")) {
		i = scale_avx512(x, y, n, x0, dx, yf, &lo, &hi, &zs);
		di = (double)i;
	}
#endif
	for (; i < n; i++, di += 1.0) {
		double v = y[i];
		lo = v < lo ? v : lo;
		hi = v > hi ? v : hi;
		x[i] = x0 + di * dx;
		y[i] = v * yf;
		zs += y[i] * 0.0;
	}
	*rmin = lo;
	*rmax = hi;
	*z = zs;
}

/* The highest of y[0..n-1] (n >= 1; a NaN counts only as y[0], as in a
 * plain scan), several at a time where SSE2 or AVX-512 is there: the same
 * value in any order. */
static double highest(const double *y, size_t n)
{
	double hi = y[0];
	size_t i = 1;
#ifdef SP_AVX512
	if (n >= 33 && have_avx512())
		i = highest_avx512(y, n, &hi);
#endif
#ifdef IRR_SSE2
	if (n >= i + 2) {
		__m128d h = _mm_set1_pd(hi);
		double t[2];
		for (; i + 2 <= n; i += 2)
			h = _mm_max_pd(_mm_loadu_pd(y + i), h);
		_mm_storeu_pd(t, h);
		hi = t[0] > hi ? t[0] : hi;
		hi = t[1] > hi ? t[1] : hi;
	}
#endif
	for (; i < n; i++)
		if (y[i] > hi)
			hi = y[i];
	return hi;
}

/* The conversion proper, on copies x, y of the data: the caller keeps the
 * originals until this succeeds. */
static int normalise_arrays(irr_spectrum *s, double *x, double *y, irr_error *err)
{
	size_t n = s->n;
	unsigned char *sat = NULL;
	irr_yunits u;
	int rc = IRR_OK, transmittance = 0;
	size_t nsat_pts = 0;

	/* Axis: cm-1 = 1e4 / um, then ascending. */
	if (s->x_micrometers) {
		for (size_t i = 0; i < n; i++) {
			if (!(x[i] > 0))
				return irr_spectrum__fail(err, IRR_EINPUT, s->name, 0,
				                     "wavelength %g micrometres is not positive", x[i]);
			x[i] = 1e4 / x[i];
		}
	}
	if (x[0] > x[n - 1])
		for (size_t i = 0, j = n - 1; i < j; i++, j--) {
			swap_d(&x[i], &x[j]);
			swap_d(&y[i], &y[j]);
		}
	/* The near infrared ends near 15000 cm-1 (0.67 um), visible light
	 * spans 14000-25000 cm-1 (400 nm at 25000). An axis beyond that is
	 * another unit, a typo or corrupt data, and would have later stages
	 * (the plot's axis) work across an absurd span. The bound is wider
	 * than the peak lists' 15000 (peaklist.c): a spectrum may run on past
	 * the bands it shows. */
	if (!(x[n - 1] <= AXIS_MAX_CM))
		return irr_spectrum__fail(err, IRR_EINPUT, s->name, 0,
		                     "X reaches %g cm-1: not a wavenumber range of an infrared spectrum (at most %g cm-1; is X in another unit?)",
		                     x[n - 1], AXIS_MAX_CM);

	/* Units. */
	u = s->units;
	if (u == IRR_Y_UNKNOWN || u == IRR_Y_ARBITRARY) {
		double pos, lo, hi;
		const char *what = u == IRR_Y_UNKNOWN ? "Y units not stated" : "Y in arbitrary units";
		if ((rc = median_position(y, n, &pos, &lo, &hi)) < 0)
			goto nomem;
		if (hi > 10.0 && hi <= 200.0 && lo >= -10.0 && pos > 0.5) {
			u = IRR_Y_PERCENT_T;
			rc = irr_spectrum__warn(s, "%s: read as percent transmittance (values up to %.4g, baseline near the top)", what, hi);
		} else if (hi <= 2.0 && pos > 0.5) {
			u = IRR_Y_TRANSMITTANCE;
			rc = irr_spectrum__warn(s, "%s: read as transmittance (values 0-1, baseline near the top)", what);
		} else {
			u = IRR_Y_ABSORBANCE;
			rc = irr_spectrum__warn(s, "%s: read as absorbance (baseline near the bottom)", what);
		}
		if (rc < 0)
			goto nomem;
	} else if (u == IRR_Y_TRANSMITTANCE || u == IRR_Y_REFLECTANCE) {
		/* Files label percent values TRANSMITTANCE too (indene-difdup,
		 * fixinc1 up to 112 %T): a fraction never reaches 2. */
		double hi = highest(y, n);
		if (hi > 2.0) {
			if (u == IRR_Y_TRANSMITTANCE) {
				u = IRR_Y_PERCENT_T;
				rc = irr_spectrum__warn(s, "transmittance values reach %.4g: read as percent", hi);
			} else {
				for (size_t i = 0; i < n; i++)
					y[i] /= 100.0;
				rc = irr_spectrum__warn(s, "reflectance values reach %.4g: read as percent", hi);
			}
			if (rc < 0)
				goto nomem;
		}
	}
	if (u == IRR_Y_PERCENT_T) {
		for (size_t i = 0; i < n; i++)
			y[i] /= 100.0;
		u = IRR_Y_TRANSMITTANCE;
	}
	if (u == IRR_Y_REFLECTANCE) {
		/* log10(1/R), the usual absorbance-like form of reflectance. */
		if ((rc = irr_spectrum__warn(s, "reflectance converted to log10(1/R)")) < 0)
			goto nomem;
		transmittance = 1;
	} else if (u == IRR_Y_TRANSMITTANCE) {
		transmittance = 1;
	} else if (u == IRR_Y_KUBELKA_MUNK) {
		if ((rc = irr_spectrum__warn(s, "Kubelka-Munk values used as absorbance (both grow with concentration)")) < 0)
			goto nomem;
	}

	if (!(sat = calloc(n, 1)))
		goto nomem;
	if (transmittance) {
		/* Saturated: no light reaches the detector (T at or below the
		 * floor), or the minimum is clipped flat. */
		double tmin = y[0], tminpos = HUGE_VAL, ceiling;
		size_t i0 = 0;
#ifdef SP_AVX512
		if (have_avx512())
			i0 = tscan_avx512(y, n, sat, &tmin, &tminpos, &nsat_pts);
#endif
#ifdef IRR_SSE2
		/* Two at a time: the lowest values are the same in any order. */
		{
			__m128d lo = _mm_set1_pd(tmin), lp = _mm_set1_pd(HUGE_VAL);
			__m128d zero = _mm_setzero_pd(), fl = _mm_set1_pd(T_FLOOR);
			double t[2];
			for (; i0 + 2 <= n; i0 += 2) {
				__m128d v = _mm_loadu_pd(y + i0), pos = _mm_cmpgt_pd(v, zero);
				int f = _mm_movemask_pd(_mm_cmple_pd(v, fl));
				lo = _mm_min_pd(v, lo);
				lp = _mm_min_pd(_mm_or_pd(_mm_and_pd(pos, v), _mm_andnot_pd(pos, lp)), lp);
				sat[i0] = (unsigned char)(f & 1);
				sat[i0 + 1] = (unsigned char)(f >> 1);
				nsat_pts += (size_t)((f & 1) + (f >> 1));
			}
			_mm_storeu_pd(t, lo);
			tmin = t[0] < tmin ? t[0] : tmin;
			tmin = t[1] < tmin ? t[1] : tmin;
			_mm_storeu_pd(t, lp);
			tminpos = t[0] < tminpos ? t[0] : tminpos;
			tminpos = t[1] < tminpos ? t[1] : tminpos;
		}
#endif
		for (size_t i = i0; i < n; i++) {
			double v = y[i];
			tmin = v < tmin ? v : tmin;
			tminpos = ((v > 0) & (v < tminpos)) ? v : tminpos;
			sat[i] = v <= T_FLOOR;
			nsat_pts += v <= T_FLOOR;
		}
		if (tminpos == HUGE_VAL) {
			free(sat);
			return irr_spectrum__fail(err, IRR_EINPUT, s->name, 0,
			                     "no transmittance value is above zero: the spectrum is all saturated or not transmittance");
		}
		if (tmin > 0 && -log10(tmin) >= CLIP_MIN_ABSORBANCE) {
			unsigned char *m = calloc(n, 1);
			if (!m)
				goto nomem;
			if (mark_flat_extreme(y, n, tmin, m) >= CLIP_MIN_POINTS) {
				for (size_t i = 0; i < n; i++)
					sat[i] |= m[i];
				nsat_pts = 1;
			}
			free(m);
		}
		/* T <= 0 has no absorbance; such points get the highest measured
		 * one (at least the floor's) and are flagged saturated. */
		ceiling = fmax(-log10(tminpos), -log10(T_FLOOR));
#ifndef IRR_NO_SIMD
		/* Several points at a time, the same bits as the loop below
		 * (vlog.c); log() took about 5 % of a batch check. */
		irr_vlog__neglog_scaled(y, n, LOG10_E, ceiling);
#else
		for (size_t i = 0; i < n; i++)
			y[i] = y[i] > 0 ? -log(y[i]) * LOG10_E : ceiling;
#endif
	} else {
		double amax = y[0];
		for (size_t i = 1; i < n; i++)
			if (y[i] > amax)
				amax = y[i];
		if (amax >= CLIP_MIN_ABSORBANCE) {
			unsigned char *m = calloc(n, 1);
			if (!m)
				goto nomem;
			if (mark_flat_extreme(y, n, amax, m) >= CLIP_MIN_POINTS) {
				memcpy(sat, m, n);
				nsat_pts = 1;
			}
			free(m);
		}
	}
	s->nsat = 0;
	/* nsat_pts: whether any point was marked (the scan finds nothing else). */
	for (size_t i = 0; nsat_pts && i < n;) {
		size_t j = i;
		double lo, hi;
		if (!sat[i]) {
			i++;
			continue;
		}
		while (j < n && sat[j])
			j++;
		/* The range reaches half-way to the unsaturated neighbours: the
		 * band's true top lies somewhere in there. */
		lo = i > 0 ? 0.5 * (x[i - 1] + x[i]) : x[i];
		hi = j < n ? 0.5 * (x[j - 1] + x[j]) : x[j - 1];
		if ((rc = add_sat(s, lo, hi)) < 0)
			goto nomem;
		i = j;
	}
	free(sat);
	return IRR_OK;
nomem:
	free(sat);
	return irr_spectrum__fail(err, IRR_ENOMEM, s->name, 0, "out of memory");
}

int irr_spectrum_normalise(irr_spectrum *s, irr_error *err)
{
	double *x, *y;
	size_t nwarn;
	int rc;
	if (!s)
		return irr_spectrum__fail(err, IRR_EINPUT, "", 0, "no spectrum");
	if (s->normalised)
		return IRR_OK;
	if (s->n < 2)
		return irr_spectrum__fail(err, IRR_EINPUT, s->name, 0,
		                     "%zu data point(s): a spectrum needs at least 2", s->n);
	x = malloc(s->n * sizeof *x);
	y = malloc(s->n * sizeof *y);
	if (!x || !y) {
		free(x);
		free(y);
		return irr_spectrum__fail(err, IRR_ENOMEM, s->name, 0, "out of memory");
	}
	/* Copied in ascending order straight away (IR files usually run from
	 * high to low wavenumber); micrometres are reversed after conversion. */
	if (!s->x_micrometers && s->x[0] > s->x[s->n - 1]) {
		size_t i = 0;
#ifdef SP_AVX512
		if (have_avx512())
			i = reverse_avx512(s->x, s->y, x, y, s->n);
#endif
#ifdef IRR_SSE2
		/* Two at a time, their order swapped. */
		for (; i + 2 <= s->n; i += 2) {
			size_t j = s->n - 2 - i;
			__m128d vx = _mm_loadu_pd(s->x + j), vy = _mm_loadu_pd(s->y + j);
			_mm_storeu_pd(x + i, _mm_shuffle_pd(vx, vx, 1));
			_mm_storeu_pd(y + i, _mm_shuffle_pd(vy, vy, 1));
		}
#endif
		for (; i < s->n; i++) {
			x[i] = s->x[s->n - 1 - i];
			y[i] = s->y[s->n - 1 - i];
		}
	} else {
		memcpy(x, s->x, s->n * sizeof *x);
		memcpy(y, s->y, s->n * sizeof *y);
	}
	nwarn = s->nwarn;
	s->nsat = 0;
	if ((rc = normalise_arrays(s, x, y, err)) < 0) {
		/* A failure leaves the spectrum as it was, warnings included. */
		while (s->nwarn > nwarn)
			free(s->warnings[--s->nwarn]);
		s->nsat = 0;
		free(x);
		free(y);
		return rc;
	}
	free(s->x);
	free(s->y);
	s->x = x;
	s->y = y;
	s->x_micrometers = 0;
	s->units = IRR_Y_ABSORBANCE;
	s->range_lo = x[0];
	s->range_hi = x[s->n - 1];
	s->normalised = 1;
	return IRR_OK;
}
