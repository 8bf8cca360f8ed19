/* test_vlog.c: the vector paths of src/vlog.c (AVX-512, AVX2+FMA) give the
 * same bits as the C library's log() in the absorbance conversion
 * y > 0 ? -log(y) * log10(e) : ceiling.
 * Sources: log() of the GNU C library (Debian package libc6) as the
 * reference implementation, compared bit for bit; log10 2 =
 * 0.30102999566398120 (Abramowitz & Stegun, Handbook of Mathematical
 * Functions, table of mathematical constants; from memory) for one value
 * on an absolute scale; the measured spectra of ../shared/ir-reference
 * (MANIFEST.tsv) for values as instruments write them. Inputs: xorshift64
 * (G. Marsaglia, J. Stat. Softw. 8 (2003) 14) over (0, 1.5], log-uniform
 * over 2^-40..1.5, and around 1, where the method takes another formula. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <math.h>
#include <dirent.h>
#include <cmocka.h>

#include "irrecon.h"
#include "vlog.h"
#include "unit/refdata.h"

#define LOG10_E 0.43429448190325182765
#define CEILING 3.25

static uint64_t xs_state = 0x2545f4914f6cdd1dULL;
static uint64_t xs(void)
{
	xs_state ^= xs_state << 13;
	xs_state ^= xs_state >> 7;
	xs_state ^= xs_state << 17;
	return xs_state;
}

/* How many of in[0..n-1] differ, bit for bit, between the path of `lanes`
 * and the plain expression; prints the first few. */
static size_t differences(int lanes, const double *in, size_t n, double scale)
{
	double *a = malloc(n * sizeof *a), *b = malloc(n * sizeof *b);
	size_t bad = 0;
	assert_non_null(a);
	assert_non_null(b);
	memcpy(a, in, n * sizeof *a);
	irr_vlog__neglog_scaled_with(lanes, a, n, scale, CEILING);
	for (size_t i = 0; i < n; i++) {
		b[i] = in[i] > 0 ? -log(in[i]) * scale : CEILING;
		if (memcmp(&a[i], &b[i], sizeof a[i]) != 0 && bad++ < 5)
			print_message("lanes %d: y = %a gives %a, log() %a\n", lanes, in[i], a[i], b[i]);
	}
	free(a);
	free(b);
	return bad;
}

/* The paths this processor and C library run: the chosen one and the
 * narrower vector one (the choice falls back from 8 to 4 to plain C). */
static int paths(int out[2])
{
	int chosen = irr_vlog__lanes(), k = 0;
	if (chosen >= 8)
		out[k++] = 8;
	if (chosen >= 4)
		out[k++] = 4;
	return k;
}

static void random_inputs_match_libm(void **state)
{
	(void)state;
	int lanes[2], np = paths(lanes);
	size_t n = 1u << 20;
	double *x = malloc(n * sizeof *x);
	if (np == 0) {
		print_message("skipped: no vector path here (processor or C library); plain log() only\n");
		free(x);
		skip();
	}
	assert_non_null(x);
	for (int kind = 0; kind < 4; kind++) {
		for (size_t i = 0; i < n; i++) {
			uint64_t r = xs(), b;
			switch (kind) {
			case 0:
				x[i] = (double)((r >> 11) + 1) * 0x1p-53 * 1.5;
				break;
			case 1:
				b = ((uint64_t)(1023 - 40 + (r >> 58) % 41) << 52) | (r & 0xfffffffffffffULL);
				memcpy(&x[i], &b, sizeof b);
				if (x[i] > 1.5)
					x[i] = 0.75 * x[i] - 0.375 * 1.5;
				break;
			case 2:
				/* the near-1 formula's range [1 - 2^-4, 1 + 0x1.09p-4) and beyond */
				x[i] = 0.93 + (double)(r >> 11) * 0x1p-53 * 0.14;
				break;
			default:
				x[i] = 1.0 + (double)(int64_t)r * 0x1p-83;
				break;
			}
		}
		for (int p = 0; p < np; p++) {
			assert_int_equal(differences(lanes[p], x, n, 1.0), 0);
			assert_int_equal(differences(lanes[p], x, n, LOG10_E), 0);
		}
	}
	free(x);
}

static void edge_inputs_match_libm(void **state)
{
	(void)state;
	int lanes[2], np = paths(lanes);
	const double e[] = {
		0.0, -0.0, -1.0, 1.0, 0x1p-1074, 0x1p-1022, 0x1.fffffffffffffp-1023,
		1.7976931348623157e308, INFINITY, -INFINITY, NAN, 0.9375,
		nextafter(0.9375, 0), nextafter(0.9375, 2), 1 + 0x1.09p-4,
		nextafter(1 + 0x1.09p-4, 0), nextafter(1, 0), nextafter(1, 2), 0.5, 2.0,
		0x1.6p-1, nextafter(0x1.6p-1, 0), 0x1.6p+0, nextafter(0x1.6p+0, 0), 1e-300, 1.5};
	const size_t ne = sizeof e / sizeof e[0];
	double blk[67], one = 0.5;
	if (np == 0) {
		print_message("skipped: no vector path here (processor or C library); plain log() only\n");
		skip();
	}
	/* Each special value alone in a block of ordinary ones, at every
	 * position, and blocks of random mixtures; odd lengths leave a tail. */
	for (size_t v = 0; v < ne; v++)
		for (size_t at = 0; at < 67; at++) {
			for (size_t j = 0; j < 67; j++)
				blk[j] = 0.05 + (double)((at * 67 + j) % 97) / 80.0;
			blk[at] = e[v];
			for (int p = 0; p < np; p++)
				assert_int_equal(differences(lanes[p], blk, 67, LOG10_E), 0);
		}
	for (int rep = 0; rep < 500; rep++) {
		for (size_t j = 0; j < 67; j++)
			blk[j] = e[xs() % ne];
		for (int p = 0; p < np; p++)
			assert_int_equal(differences(lanes[p], blk, 67, 1.0), 0);
	}
	/* A = -log10(0.5) = log10 2 (Abramowitz & Stegun; from memory). */
	irr_vlog__neglog_scaled(&one, 1, LOG10_E, CEILING);
	assert_true(fabs(one - 0.30102999566398120) < 1e-16);
}

/* Every subinterval edge of the method's table, +-2 units in the last
 * place, at exponents 2^-20..2^19. */
static void table_edges_match_libm(void **state)
{
	(void)state;
	int lanes[2], np = paths(lanes);
	size_t m = 0;
	double *x = malloc(40 * 128 * 5 * sizeof *x);
	if (np == 0) {
		print_message("skipped: no vector path here (processor or C library); plain log() only\n");
		free(x);
		skip();
	}
	assert_non_null(x);
	for (int ex = -20; ex < 20; ex++)
		for (uint64_t i = 0; i < 128; i++)
			for (int d = -2; d <= 2; d++) {
				uint64_t b = 0x3fe6000000000000ULL + (i << 45) + ((uint64_t)(int64_t)ex << 52) + (uint64_t)(int64_t)d;
				memcpy(&x[m++], &b, sizeof b);
			}
	for (int p = 0; p < np; p++)
		assert_int_equal(differences(lanes[p], x, m, 1.0), 0);
	free(x);
}

/* The values measured spectra hold: each y as read, and as a fraction. */
static void measured_spectra_match_libm(void **state)
{
	(void)state;
	int lanes[2], np = paths(lanes);
	size_t nfiles = 0;
	NEED_REFDIR();
	if (np == 0) {
		print_message("skipped: no vector path here (processor or C library); plain log() only\n");
		skip();
	}
	DIR *d = opendir(refdir());
	struct dirent *de;
	assert_non_null(d);
	while ((de = readdir(d))) {
		size_t len = strlen(de->d_name);
		char path[1200];
		irr_spectrum *s;
		irr_error err;
		if (len < 5 || (strcmp(de->d_name + len - 4, ".jdx") && strcmp(de->d_name + len - 4, ".csv")))
			continue;
		snprintf(path, sizeof path, "%s/%s", refdir(), de->d_name);
		irr_error_clear(&err);
		if (irr_spectrum_read_file(&s, path, NULL, &err) != IRR_OK)
			continue;
		size_t n = irr_spectrum_points(s);
		double *y = malloc(n * sizeof *y);
		assert_non_null(y);
		for (size_t i = 0; i < n; i++)
			y[i] = irr_spectrum_y(s)[i] / 100.0;
		for (int p = 0; p < np; p++) {
			assert_int_equal(differences(lanes[p], irr_spectrum_y(s), n, LOG10_E), 0);
			assert_int_equal(differences(lanes[p], y, n, LOG10_E), 0);
		}
		free(y);
		irr_spectrum_free(s);
		nfiles++;
	}
	closedir(d);
	assert_true(nfiles >= 10);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(random_inputs_match_libm),
		cmocka_unit_test(edge_inputs_match_libm),
		cmocka_unit_test(table_edges_match_libm),
		cmocka_unit_test(measured_spectra_match_libm),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
