/* test_normalise.c: normalisation (src/spectrum.c) to absorbance on an
 * ascending cm-1 axis, unit detection, saturated regions, measured range.
 *
 * Sources:
 * - Definitions (IUPAC Gold Book, from memory): absorbance A = -log10(T),
 *   T the transmittance as a fraction (%T / 100); wavenumber in cm-1 =
 *   1e4 / wavelength in micrometres.
 * - Real spectra in ../shared/ir-reference/ (README.md and MANIFEST.tsv
 *   there; override with IRRECON_REFDIR): toluene-atr.csv has 4 points at
 *   exactly A = 5.000 (693-729 cm-1); indene-fix.jdx is clipped at
 *   A = 3.000; acetophenone.jdx (transmittance) reaches T < 1e-3 in its
 *   C=O band, which for an aryl ketone lies near 1700-1680 cm-1
 *   (Silverstein, Webster & Kiemle, 7th ed., ch. 2, conjugated ketones;
 *   from memory); polystyrene-film.jdx never goes below T = 0.34 (its
 *   ##MINY) and has no saturated region.
 * - The saturation floor T <= 1e-3 (A >= 3) is common practice: FT-IR
 *   photometry is not trusted above A ~ 2-3.
 */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <cmocka.h>

#include "unit/refdata.h"

#include "irrecon/spectrum.h"

static irr_spectrum *make(const double *x, const double *y, size_t n, irr_yunits u)
{
	irr_spectrum *s = NULL;
	irr_error err;
	irr_error_clear(&err);
	if (irr_spectrum_from_xy(&s, x, y, n, u, "arrays", &err) != IRR_OK)
		fail_msg("%s", err.message);
	return s;
}

static void normalise_ok(irr_spectrum *s)
{
	irr_error err;
	irr_error_clear(&err);
	if (irr_spectrum_normalise(s, &err) != IRR_OK)
		fail_msg("%s", err.message);
	assert_true(irr_spectrum_is_normalised(s));
	assert_int_equal(irr_spectrum_y_units(s), IRR_Y_ABSORBANCE);
	for (size_t i = 1; i < irr_spectrum_points(s); i++)
		assert_true(irr_spectrum_x(s)[i] > irr_spectrum_x(s)[i - 1]);
}

static irr_spectrum *read_ref(const char *file)
{
	char path[1200];
	irr_spectrum *s = NULL;
	irr_error err;
	snprintf(path, sizeof path, "%s/%s", refdir(), file);
	irr_error_clear(&err);
	if (irr_spectrum_read_file(&s, path, NULL, &err) != IRR_OK)
		fail_msg("%s: %s", file, err.message);
	return s;
}

static int has_warning(const irr_spectrum *s, const char *needle)
{
	for (size_t i = 0; i < irr_spectrum_warning_count(s); i++)
		if (strstr(irr_spectrum_warning(s, i), needle))
			return 1;
	return 0;
}

static int in_saturated(const irr_spectrum *s, double x)
{
	for (size_t i = 0; i < irr_spectrum_saturated_count(s); i++) {
		double lo, hi;
		irr_spectrum_saturated_range(s, i, &lo, &hi);
		if (x >= lo && x <= hi)
			return 1;
	}
	return 0;
}

/* ---- synthetic --------------------------------------------------------------- */

static void transmittance_to_absorbance(void **state)
{
	const double x[4] = {1000, 2000, 3000, 4000};
	const double pt[4] = {100, 50, 10, 1};
	const double frac[4] = {1.0, 0.5, 0.1, 0.01};
	/* A = -log10(T): 0, 0.30103, 1, 2. */
	const double a[4] = {0.0, 0.30102999566398120, 1.0, 2.0};
	irr_spectrum *s;
	(void)state;
	s = make(x, pt, 4, IRR_Y_PERCENT_T);
	normalise_ok(s);
	assert_int_equal(irr_spectrum_source_y_units(s), IRR_Y_PERCENT_T);
	for (int i = 0; i < 4; i++)
		assert_true(fabs(irr_spectrum_y(s)[i] - a[i]) < 1e-12);
	irr_spectrum_free(s);
	s = make(x, frac, 4, IRR_Y_TRANSMITTANCE);
	normalise_ok(s);
	for (int i = 0; i < 4; i++)
		assert_true(fabs(irr_spectrum_y(s)[i] - a[i]) < 1e-12);
	assert_int_equal(irr_spectrum_warning_count(s), 0);
	irr_spectrum_free(s);
	/* TRANSMITTANCE holding percent values: read as percent, with a warning. */
	s = make(x, pt, 4, IRR_Y_TRANSMITTANCE);
	normalise_ok(s);
	assert_true(fabs(irr_spectrum_y(s)[2] - 1.0) < 1e-12);
	assert_true(has_warning(s, "percent"));
	irr_spectrum_free(s);
}

/* The conversion's logarithm against the C library's log10 over the whole
 * range transmittance takes (1e-6 .. 2, random, and powers of ten). */
static void absorbance_matches_log10(void **state)
{
	enum { N = 20001 };
	static double x[N], t[N];
	uint32_t r = 12345u;
	irr_spectrum *s;
	double worst = 0;
	(void)state;
	for (int i = 0; i < N; i++) {
		x[i] = 400 + i;
		r ^= r << 13;
		r ^= r >> 17;
		r ^= r << 5;
		t[i] = pow(10.0, -6.0 + 6.30103 * (r / 4294967296.0));
	}
	t[0] = 1.0;
	t[1] = 0.1;
	t[2] = 0.001;
	t[3] = 2.0;
	t[4] = nextafter(1.0, 0.0);
	t[5] = nextafter(1.0, 2.0);
	s = make(x, t, N, IRR_Y_TRANSMITTANCE);
	normalise_ok(s);
	for (int i = 0; i < N; i++) {
		double d = fabs(irr_spectrum_y(s)[i] + log10(t[i]));
		if (d > worst)
			worst = d;
	}
	assert_true(irr_spectrum_y(s)[0] == 0.0);
	assert_true(fabs(irr_spectrum_y(s)[2] - 3.0) < 1e-15);
	/* A few units in the last place of values up to 6. */
	if (!(worst < 4e-15))
		fail_msg("largest difference from -log10(T): %g", worst);
	irr_spectrum_free(s);
}

static void reflectance_kubelka_munk_arbitrary(void **state)
{
	const double x[4] = {1000, 2000, 3000, 4000};
	const double r[4] = {100, 50, 10, 80};
	const double km[4] = {0.1, 0.5, 2.0, 0.2};
	irr_spectrum *s;
	(void)state;
	/* log10(1/R): 50 %R -> 0.30103, 10 %R -> 1 (definition of the
	 * reflectance analogue of absorbance; from memory). */
	s = make(x, r, 4, IRR_Y_REFLECTANCE);
	normalise_ok(s);
	assert_true(fabs(irr_spectrum_y(s)[1] - 0.30102999566398120) < 1e-12);
	assert_true(fabs(irr_spectrum_y(s)[2] - 1.0) < 1e-12);
	assert_true(has_warning(s, "percent"));
	assert_true(has_warning(s, "log10(1/R)"));
	irr_spectrum_free(s);
	/* Kubelka-Munk values grow with concentration like absorbance: kept. */
	s = make(x, km, 4, IRR_Y_KUBELKA_MUNK);
	normalise_ok(s);
	assert_memory_equal(irr_spectrum_y(s), km, sizeof km);
	assert_true(has_warning(s, "Kubelka-Munk"));
	irr_spectrum_free(s);
	/* Arbitrary units: detected like unknown ones, with a warning. */
	s = make(x, km, 4, IRR_Y_ARBITRARY);
	normalise_ok(s);
	assert_true(has_warning(s, "arbitrary"));
	irr_spectrum_free(s);
}

static void axis_becomes_ascending_cm1(void **state)
{
	const double xd[5] = {4000, 3000, 2000, 1500, 1000};
	const double y[5] = {0.1, 0.2, 0.3, 0.4, 0.5};
	const double um[3] = {2.5, 5.0, 10.0};
	irr_spectrum *s;
	double lo, hi;
	(void)state;
	s = make(xd, y, 5, IRR_Y_ABSORBANCE);
	normalise_ok(s);
	assert_true(irr_spectrum_x(s)[0] == 1000 && irr_spectrum_y(s)[0] == 0.5);
	assert_true(irr_spectrum_x(s)[4] == 4000 && irr_spectrum_y(s)[4] == 0.1);
	irr_spectrum_range(s, &lo, &hi);
	assert_true(lo == 1000 && hi == 4000);
	/* as read */
	assert_true(irr_spectrum_first_x(s) == 4000 && irr_spectrum_last_x(s) == 1000);
	irr_spectrum_free(s);

	/* Micrometres (from a JCAMP-DX ##XUNITS=MICROMETERS file). */
	{
		static const char text[] =
		    "##TITLE= um\n##DATA TYPE= INFRARED SPECTRUM\n##XUNITS= MICROMETERS\n"
		    "##YUNITS= ABSORBANCE\n##NPOINTS= 3\n##XYPOINTS= (XY..XY)\n"
		    "2.5, 0.1\n5.0, 0.2\n10.0, 0.3\n##END=\n";
		irr_error err;
		assert_int_equal(irr_spectrum_read_memory(&s, text, sizeof text - 1, "um.jdx", NULL, &err),
		                 IRR_OK);
		assert_true(irr_spectrum_x(s)[0] == um[0]);
		normalise_ok(s);
		assert_true(fabs(irr_spectrum_x(s)[0] - 1000) < 1e-9 && irr_spectrum_y(s)[0] == 0.3);
		assert_true(fabs(irr_spectrum_x(s)[2] - 4000) < 1e-9 && irr_spectrum_y(s)[2] == 0.1);
		irr_spectrum_free(s);
	}
}

/* A band on a flat baseline, sampled every 2 cm-1 from 600 to 4000. */
static void band(double *x, double *y, size_t n, double base, double depth, int dip)
{
	for (size_t i = 0; i < n; i++) {
		x[i] = 600 + 2.0 * (double)i;
		double g = exp(-0.5 * pow((x[i] - 1715) / 8.0, 2)) + 0.5 * exp(-0.5 * pow((x[i] - 2950) / 15.0, 2));
		y[i] = dip ? base - depth * g : base + depth * g;
	}
}

static void units_detected_when_unknown(void **state)
{
	enum { N = 1701 };
	double x[N], y[N];
	irr_spectrum *s;
	(void)state;
	band(x, y, N, 0.95, 0.6, 1);
	s = make(x, y, N, IRR_Y_UNKNOWN);
	normalise_ok(s);
	assert_true(has_warning(s, "transmittance"));
	assert_true(fabs(irr_spectrum_y(s)[0] + log10(0.95)) < 1e-12);
	irr_spectrum_free(s);

	band(x, y, N, 95.0, 60.0, 1);
	s = make(x, y, N, IRR_Y_UNKNOWN);
	normalise_ok(s);
	assert_true(has_warning(s, "percent"));
	assert_true(fabs(irr_spectrum_y(s)[0] + log10(0.95)) < 1e-12);
	irr_spectrum_free(s);

	band(x, y, N, 0.02, 0.8, 0);
	s = make(x, y, N, IRR_Y_UNKNOWN);
	normalise_ok(s);
	assert_true(has_warning(s, "absorbance"));
	assert_true(irr_spectrum_y(s)[0] == y[0]);
	irr_spectrum_free(s);
}

static void saturated_regions(void **state)
{
	enum { N = 1701 };
	double x[N], y[N];
	irr_spectrum *s;
	(void)state;
	/* Transmittance at (and below) zero in the middle of a band. */
	band(x, y, N, 0.9, 0.95, 1);
	s = make(x, y, N, IRR_Y_TRANSMITTANCE);
	normalise_ok(s);
	assert_int_equal(irr_spectrum_saturated_count(s), 1);
	assert_true(in_saturated(s, 1715));
	assert_false(in_saturated(s, 1700));
	for (size_t i = 0; i < N; i++)
		assert_true(isfinite(irr_spectrum_y(s)[i]));
	/* The clamped points are at least as strong as the floor (A = 3). */
	assert_true(irr_spectrum_y(s)[(1715 - 600) / 2] >= 3.0);
	irr_spectrum_free(s);

	/* Absorbance clipped flat at an instrument ceiling of 2.5. */
	band(x, y, N, 0.05, 4.0, 0);
	for (size_t i = 0; i < N; i++)
		if (y[i] > 2.5)
			y[i] = 2.5;
	s = make(x, y, N, IRR_Y_ABSORBANCE);
	normalise_ok(s);
	assert_int_equal(irr_spectrum_saturated_count(s), 1);
	assert_true(in_saturated(s, 1715));
	irr_spectrum_free(s);

	/* Not clipped: a single highest point, and a low flat top (quantised). */
	band(x, y, N, 0.05, 2.0, 0);
	s = make(x, y, N, IRR_Y_ABSORBANCE);
	normalise_ok(s);
	assert_int_equal(irr_spectrum_saturated_count(s), 0);
	irr_spectrum_free(s);
	band(x, y, N, 0.01, 0.05, 0);
	for (size_t i = 0; i < N; i++)
		y[i] = round(y[i] * 100) / 100;
	s = make(x, y, N, IRR_Y_ABSORBANCE);
	normalise_ok(s);
	assert_int_equal(irr_spectrum_saturated_count(s), 0);
	irr_spectrum_free(s);
}

static void idempotent_and_unchanged_on_failure(void **state)
{
	const double x[4] = {1000, 2000, 3000, 4000};
	const double t[4] = {0.5, 0.4, 0.3, 0.2};
	const double bad[4] = {0.0, -0.1, 0.0, -0.2};
	double copy[4];
	irr_spectrum *s;
	irr_error err;
	(void)state;
	s = make(x, t, 4, IRR_Y_TRANSMITTANCE);
	normalise_ok(s);
	memcpy(copy, irr_spectrum_y(s), sizeof copy);
	normalise_ok(s);
	assert_memory_equal(copy, irr_spectrum_y(s), sizeof copy);
	irr_spectrum_free(s);

	s = make(x, bad, 4, IRR_Y_TRANSMITTANCE);
	assert_int_equal(irr_spectrum_normalise(s, &err), IRR_EINPUT);
	assert_false(irr_spectrum_is_normalised(s));
	assert_int_equal(irr_spectrum_y_units(s), IRR_Y_TRANSMITTANCE);
	assert_memory_equal(bad, irr_spectrum_y(s), sizeof bad);
	assert_int_equal(irr_spectrum_warning_count(s), 0);
	irr_spectrum_free(s);

	/* from_xy refuses what no spectrum can be. */
	{
		const double nx[3] = {1000, 1000, 2000}, ny[3] = {0, 0, 0};
		const double nan_y[3] = {0, NAN, 0}, nx2[3] = {1000, 1500, 2000};
		assert_int_equal(irr_spectrum_from_xy(&s, nx, ny, 3, IRR_Y_ABSORBANCE, "a", &err), IRR_EINPUT);
		assert_null(s);
		assert_int_equal(irr_spectrum_from_xy(&s, nx2, nan_y, 3, IRR_Y_ABSORBANCE, "a", &err), IRR_EINPUT);
		assert_int_equal(irr_spectrum_from_xy(&s, nx2, ny, 1, IRR_Y_ABSORBANCE, "a", &err), IRR_EINPUT);
	}
}

/* ---- real spectra ------------------------------------------------------------ */

static void toluene_clipped_at_five(void **state)
{
	irr_spectrum *s;
	int at5 = 0;
	(void)state;
	NEED_REFDIR();
	s = read_ref("toluene-atr.csv");
	normalise_ok(s);
	for (size_t i = 0; i < irr_spectrum_points(s); i++)
		if (irr_spectrum_y(s)[i] == 5.0) {
			at5++;
			assert_true(in_saturated(s, irr_spectrum_x(s)[i]));
		}
	assert_int_equal(at5, 4);
	assert_true(irr_spectrum_saturated_count(s) >= 1);
	for (size_t i = 0; i < irr_spectrum_saturated_count(s); i++) {
		double lo, hi;
		irr_spectrum_saturated_range(s, i, &lo, &hi);
		assert_true(lo < hi && lo > 690 && hi < 732);
	}
	irr_spectrum_free(s);
}

static void indene_clipped_at_three(void **state)
{
	irr_spectrum *a, *t;
	int at3 = 0;
	(void)state;
	NEED_REFDIR();
	a = read_ref("indene-fix.jdx");
	t = read_ref("indene-xy.jdx");
	normalise_ok(a);
	normalise_ok(t);
	for (size_t i = 0; i < irr_spectrum_points(a); i++)
		if (fabs(irr_spectrum_y(a)[i] - 3.0) < 1e-9) {
			double x = irr_spectrum_x(a)[i];
			at3++;
			assert_true(in_saturated(a, x));
			/* The same measurement in transmittance: T = 0.001. */
			assert_true(in_saturated(t, x));
		}
	assert_true(at3 >= 3);
	/* Each range holds clipped points and nothing else of the spectrum's
	 * strongest bands is called saturated. */
	for (size_t k = 0; k < irr_spectrum_saturated_count(a); k++) {
		double lo, hi;
		int clipped = 0;
		irr_spectrum_saturated_range(a, k, &lo, &hi);
		for (size_t i = 0; i < irr_spectrum_points(a); i++)
			if (irr_spectrum_x(a)[i] >= lo && irr_spectrum_x(a)[i] <= hi) {
				assert_true(fabs(irr_spectrum_y(a)[i] - 3.0) < 1e-9);
				clipped++;
			}
		assert_true(clipped >= 1);
	}
	irr_spectrum_free(a);
	irr_spectrum_free(t);
}

static void acetophenone_carbonyl_saturated(void **state)
{
	irr_spectrum *s;
	double lo, hi, xmin = 0, ymax = -1;
	int found = 0;
	(void)state;
	NEED_REFDIR();
	s = read_ref("acetophenone.jdx");
	normalise_ok(s);
	irr_spectrum_range(s, &lo, &hi);
	/* MANIFEST.tsv: 499.5 to 4000.878 cm-1. */
	assert_true(fabs(lo - 499.5) < 1e-9 && fabs(hi - 4000.878) < 1e-9);
	for (size_t i = 0; i < irr_spectrum_points(s); i++)
		if (irr_spectrum_y(s)[i] > ymax) {
			ymax = irr_spectrum_y(s)[i];
			xmin = irr_spectrum_x(s)[i];
		}
	assert_true(in_saturated(s, xmin));
	for (size_t i = 0; i < irr_spectrum_saturated_count(s); i++) {
		irr_spectrum_saturated_range(s, i, &lo, &hi);
		if (hi > 1665 && lo < 1700)
			found = 1;
	}
	assert_true(found);
	irr_spectrum_free(s);
}

static void unsaturated_and_detected_on_real_spectra(void **state)
{
	irr_spectrum *s, *u;
	(void)state;
	NEED_REFDIR();
	s = read_ref("polystyrene-film.jdx");
	/* Units detection on real data, as if the file had not said. */
	u = make(irr_spectrum_x(s), irr_spectrum_y(s), irr_spectrum_points(s), IRR_Y_UNKNOWN);
	normalise_ok(s);
	assert_int_equal(irr_spectrum_saturated_count(s), 0);
	normalise_ok(u);
	assert_true(has_warning(u, "read as transmittance"));
	assert_memory_equal(irr_spectrum_y(u), irr_spectrum_y(s), irr_spectrum_points(s) * sizeof(double));
	irr_spectrum_free(s);
	irr_spectrum_free(u);

	s = read_ref("toluene-atr.csv");
	u = make(irr_spectrum_x(s), irr_spectrum_y(s), irr_spectrum_points(s), IRR_Y_UNKNOWN);
	normalise_ok(u);
	assert_true(has_warning(u, "read as absorbance"));
	irr_spectrum_free(s);
	irr_spectrum_free(u);

	/* indene-difdup: ##YUNITS=TRANSMITTANCE holding percent (README.md). */
	s = read_ref("indene-difdup.jdx");
	u = make(irr_spectrum_x(s), irr_spectrum_y(s), irr_spectrum_points(s), IRR_Y_UNKNOWN);
	normalise_ok(s);
	assert_true(has_warning(s, "percent"));
	normalise_ok(u);
	assert_true(has_warning(u, "percent"));
	irr_spectrum_free(s);
	irr_spectrum_free(u);

	/* aniline.jdx runs from 3966 down to 450 cm-1 (MANIFEST.tsv). */
	s = read_ref("aniline.jdx");
	normalise_ok(s);
	{
		double lo, hi;
		irr_spectrum_range(s, &lo, &hi);
		assert_true(lo == 450 && hi == 3966);
	}
	irr_spectrum_free(s);
}

/* Every shared file with its units hidden: the detection must give what
 * MANIFEST.tsv records (column y_units: "TRANSMITTANCE (fraction 0-1)",
 * "TRANSMITTANCE (values in %, 0-100)" or "ABSORBANCE"). */
static void units_detected_on_every_shared_file(void **state)
{
	char path[1200], line[4096];
	FILE *f;
	int files = 0;
	(void)state;
	NEED_REFDIR();
	snprintf(path, sizeof path, "%s/MANIFEST.tsv", refdir());
	f = fopen(path, "r");
	assert_non_null(f);
	assert_non_null(fgets(line, sizeof line, f));
	while (fgets(line, sizeof line, f)) {
		char *col[6], *p = line;
		int nc = 0;
		irr_spectrum *s, *u;
		const char *want;
		while (nc < 6 && p) {
			col[nc++] = p;
			p = strchr(p, '\t');
			if (p)
				*p++ = '\0';
		}
		assert_int_equal(nc, 6);
		want = strstr(col[4], "ABSORBANCE") ? "read as absorbance"
		       : strstr(col[4], "%") ? "read as percent transmittance"
		                             : "read as transmittance";
		s = read_ref(col[0]);
		u = make(irr_spectrum_x(s), irr_spectrum_y(s), irr_spectrum_points(s), IRR_Y_UNKNOWN);
		normalise_ok(u);
		if (!has_warning(u, want))
			fail_msg("%s: expected '%s', got '%s'", col[0], want, irr_spectrum_warning(u, 0));
		irr_spectrum_free(s);
		irr_spectrum_free(u);
		files++;
	}
	fclose(f);
	assert_int_equal(files, 36);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(transmittance_to_absorbance),
		cmocka_unit_test(absorbance_matches_log10),
		cmocka_unit_test(reflectance_kubelka_munk_arbitrary),
		cmocka_unit_test(axis_becomes_ascending_cm1),
		cmocka_unit_test(units_detected_when_unknown),
		cmocka_unit_test(saturated_regions),
		cmocka_unit_test(idempotent_and_unchanged_on_failure),
		cmocka_unit_test(toluene_clipped_at_five),
		cmocka_unit_test(indene_clipped_at_three),
		cmocka_unit_test(acetophenone_carbonyl_saturated),
		cmocka_unit_test(unsaturated_and_detected_on_real_spectra),
		cmocka_unit_test(units_detected_on_every_shared_file),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
