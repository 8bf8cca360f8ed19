/* test_synth.c: the spectrum writer (src/spectrum_write.c) and the
 * synthesizer (src/synth.c).
 *
 * Sources of the checked values:
 *  - Lorentzian line shape L(x) = h g^2 / ((x - x0)^2 + g^2), g = FWHM/2:
 *    L(x0) = h, L(x0 +- g) = h/2, L(x0 +- 3g) = h/10, and its integral
 *    pi g h (definition of the Cauchy-Lorentz profile; e.g. Griffiths &
 *    de Haseth, Fourier Transform Infrared Spectrometry, 2nd ed., Wiley
 *    2007, ch. 1; the integral is the standard arctan antiderivative; from
 *    memory).
 *  - JCAMP-DX 4.24 (R. S. McDonald, P. A. Wilks, Appl. Spectrosc. 42 (1988)
 *    151): required labels (##TITLE first, ##JCAMP-DX, ##DATA TYPE,
 *    ##ORIGIN, ##OWNER, ##XUNITS, ##YUNITS, ##XFACTOR, ##YFACTOR, ##FIRSTX,
 *    ##LASTX, ##NPOINTS, ##FIRSTY, ##XYDATA, ##END last), lines of at most
 *    80 characters, and the ASDF character tables: SQZ @=0, A-I = 1..9,
 *    a-i = -1..-9; DIF %=0, J-R = 1..9, j-r = -1..-9; DUP S-Z = 1..8,
 *    s = 9, counting the value itself; in DIF form each line after the
 *    first starts with the last ordinate of the previous line (Y check).
 *    The expected encodings below are worked out by hand from those tables.
 *  - Absorbance and transmittance: A = -log10(T) (Beer-Lambert; IUPAC Gold
 *    Book, "absorbance"; from memory).
 *  - ATR: band absorbance proportional to the penetration depth, itself
 *    proportional to the wavelength (N. J. Harrick, Internal Reflection
 *    Spectroscopy, 1967; from memory), so ATR/transmission height ratios of
 *    two bands scale as the inverse ratio of their wavenumbers.
 *  - Carbon dioxide: antisymmetric stretch near 2349 cm-1, seen as the
 *    2360/2340 P/R branch pair at ordinary resolution, bend at 667 cm-1
 *    (G. Herzberg, Infrared and Raman Spectra of Polyatomic Molecules,
 *    1945; common practice for the pair; from memory).
 *  - Box-Muller normal deviates (Box & Muller, Ann. Math. Stat. 29 (1958)
 *    610): the sample RMS of n = 1000 deviates lies within 10 % of sigma
 *    with overwhelming probability (standard error sigma/sqrt(2n) = 2.2 %).
 * Round trips use the project's own reader (spectrum.h); an independent
 * reader (the npm package jcampconverter) decodes the same output in
 * tests/scripts/synth_jcamp_external.sh. */
#include <setjmp.h>
#include <stdarg.h>
#include <stddef.h>
#include <stdint.h>
#include <cmocka.h>

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include "irrecon/peaks.h"
#include "irrecon/spectrum.h"
#include "irrecon/spectrum_write.h"
#include "irrecon/synth.h"
#include "irrecon/tables.h"

#ifndef M_PI
#define M_PI 3.14159265358979323846
#endif

/* ---- helpers ------------------------------------------------------------ */

static irr_spectrum *make_xy(const double *x, const double *y, size_t n, irr_yunits u)
{
	irr_spectrum *s = NULL;
	irr_error err;
	assert_int_equal(irr_spectrum_from_xy(&s, x, y, n, u, "test", &err), IRR_OK);
	return s;
}

static irr_spectrum *read_back(const char *text, size_t len)
{
	irr_spectrum *s = NULL;
	irr_error err;
	int rc = irr_spectrum_read_memory(&s, text, len, "written", NULL, &err);
	if (rc != IRR_OK)
		print_error("read back failed: %s (line %ld)\n%s\n", err.message, err.line, text);
	assert_int_equal(rc, IRR_OK);
	return s;
}

/* Values as written: rounded to `dec` decimals. */
static double rounded(double v, int dec)
{
	double f = pow(10.0, dec);
	return (double)lround(v * f) / f;
}

/* Reads back and compares point by point, in whatever order the file
 * holds them, against (x, y) rounded to 6 decimals. */
static void assert_same_points(const irr_spectrum *r, const double *x, const double *y,
                               size_t n)
{
	const double *rx = irr_spectrum_x(r), *ry = irr_spectrum_y(r);
	int reversed;
	assert_int_equal(irr_spectrum_points(r), n);
	reversed = (rx[0] > rx[n - 1]) != (x[0] > x[n - 1]);
	for (size_t i = 0; i < n; i++) {
		size_t j = reversed ? n - 1 - i : i;
		if (fabs(rx[i] - x[j]) > 1e-6 || fabs(ry[i] - rounded(y[j], 6)) > 1e-9) {
			print_error("point %zu: read (%.9g, %.9g), wrote (%.9g, %.9g)\n", i, rx[i], ry[i],
			            x[j], rounded(y[j], 6));
			fail();
		}
	}
}

/* A test signal with what DIF/DUP must handle: runs of equal values and of
 * equal differences, zeros, negative values, and large jumps. */
static void test_signal(double *x, double *y, size_t n, double x0, double dx)
{
	for (size_t i = 0; i < n; i++) {
		x[i] = x0 + dx * (double)i;
		if (i < 20)
			y[i] = 0.0;
		else if (i < 40)
			y[i] = 0.25;
		else if (i < 60)
			y[i] = 0.001 * (double)(i - 40);
		else
			y[i] = irr_synth_lorentzian(x[i], x0 + dx * 150.0, 8.0, 1.9) - 0.013 +
			       0.0000017 * (double)((i * 7919) % 13);
	}
}

/* ---- Lorentzian --------------------------------------------------------- */

static void lorentzian_follows_its_definition(void **state)
{
	double sum = 0.0, h = 0.7, w = 12.0, x0 = 1712.3;
	(void)state;
	/* Definition: maximum h at x0, half at x0 +- FWHM/2, a tenth at +- 3 g. */
	assert_true(fabs(irr_synth_lorentzian(x0, x0, w, h) - h) < 1e-15);
	assert_true(fabs(irr_synth_lorentzian(x0 + w / 2, x0, w, h) - h / 2) < 1e-15);
	assert_true(fabs(irr_synth_lorentzian(x0 - w / 2, x0, w, h) - h / 2) < 1e-15);
	assert_true(fabs(irr_synth_lorentzian(x0 + 1.5 * w, x0, w, h) - h / 10) < 1e-15);
	/* Integral pi g h, by the midpoint rule over +-1e5 g, whose tails hold
	 * 2/pi * arctan(1e-5)... i.e. a fraction 6.4e-6 of the total. */
	for (double x = x0 - 6e5; x < x0 + 6e5; x += 0.05)
		sum += irr_synth_lorentzian(x + 0.025, x0, w, h) * 0.05;
	assert_true(fabs(sum / (M_PI * w / 2 * h) - 1.0) < 2e-5);
}

/* ---- JCAMP-DX writer ------------------------------------------------------ */

static void difdup_lines_match_hand_encoding(void **state)
{
	/* Ordinates 100 102 104 106 106 50 (x 1e-6): SQZ "A00", DIF +2 three
	 * times = "K" with DUP 3 = "U", 0 = "%", -56 = "n6"; then the Y-check
	 * line: the last X with SQZ 50 = "E0". */
	static const double x[] = {1000, 1001, 1002, 1003, 1004, 1005};
	static const double y[] = {100e-6, 102e-6, 104e-6, 106e-6, 106e-6, 50e-6};
	irr_spectrum *s = make_xy(x, y, 6, IRR_Y_ABSORBANCE);
	irr_write_options o;
	char *text = NULL;
	size_t len;
	irr_error err;
	(void)state;
	irr_write_options_init(&o);
	o.descending = 0;
	o.title = "hand encoded";
	assert_int_equal(irr_spectrum_write_jcamp(&text, &len, s, &o, &err), IRR_OK);
	assert_non_null(strstr(text, "##XYDATA=(X++(Y..Y))\n1000A00KU%n6\n1005E0\n##END=\n"));
	assert_non_null(strstr(text, "##YFACTOR=0.000001\n"));
	assert_non_null(strstr(text, "##NPOINTS=6\n"));
	assert_non_null(strstr(text, "##FIRSTY=0.0001\n"));
	free(text);
	o.form = IRR_JCAMP_AFFN;
	assert_int_equal(irr_spectrum_write_jcamp(&text, &len, s, &o, &err), IRR_OK);
	assert_non_null(strstr(text, "##XYDATA=(X++(Y..Y))\n1000 100 102 104 106 106 50\n##END=\n"));
	free(text);
	/* DUP of 9 and of 10: "s" and "S0" (nine and ten equal differences). */
	{
		double xx[12], yy[12];
		for (int i = 0; i < 12; i++) {
			xx[i] = 500 + i;
			yy[i] = i < 11 ? 1e-6 * (i < 10 ? 0 : 0) : 3e-6;
		}
		/* 0 x11, then 3: SQZ "@", DIF 0 ten times "%S0", then +3 "L". */
		irr_spectrum_free(s);
		s = make_xy(xx, yy, 12, IRR_Y_ABSORBANCE);
		o.form = IRR_JCAMP_DIFDUP;
		assert_int_equal(irr_spectrum_write_jcamp(&text, &len, s, &o, &err), IRR_OK);
		assert_non_null(strstr(text, "\n500@%S0L\n511C\n##END="));
		free(text);
		for (int i = 0; i < 12; i++)
			yy[i] = i < 10 ? 0 : 3e-6;
		irr_spectrum_free(s);
		s = make_xy(xx, yy, 12, IRR_Y_ABSORBANCE);
		assert_int_equal(irr_spectrum_write_jcamp(&text, &len, s, &o, &err), IRR_OK);
		/* 0 x10 (nine differences of 0 = "%s"), +3 "L", 0 "%". */
		assert_non_null(strstr(text, "\n500@%sL%\n511C\n##END="));
		free(text);
	}
	irr_spectrum_free(s);
}

static void check_header_and_lines(const char *text, size_t npoints)
{
	static const char *const required[] = {
		"##JCAMP-DX=4.24\n", "##DATA TYPE=INFRARED SPECTRUM\n", "##ORIGIN=",
		"##OWNER=", "##XUNITS=1/CM\n", "##YUNITS=", "##XFACTOR=", "##YFACTOR=",
		"##FIRSTX=", "##LASTX=", "##NPOINTS=", "##FIRSTY=", "##XYDATA=(X++(Y..Y))\n"};
	char want[64];
	const char *p = text;
	assert_memory_equal(text, "##TITLE=", 8);
	for (size_t i = 0; i < sizeof required / sizeof required[0]; i++)
		assert_non_null(strstr(text, required[i]));
	snprintf(want, sizeof want, "##NPOINTS=%zu\n", npoints);
	assert_non_null(strstr(text, want));
	assert_int_equal(strcmp(text + strlen(text) - 7, "##END=\n"), 0);
	while (*p) {
		const char *nl = strchr(p, '\n');
		assert_non_null(nl);
		assert_true(nl - p <= 80);
		p = nl + 1;
	}
}

static void jcamp_round_trips_every_form(void **state)
{
	enum { N = 1500 };
	static double x[N], y[N];
	(void)state;
	for (int asc = 0; asc < 2; asc++) {
		test_signal(x, y, N, asc ? 600.0 : 3999.5, asc ? 0.5 : -1.928);
		for (int form = 0; form < 2; form++)
			for (int desc = 0; desc < 2; desc++) {
				irr_spectrum *s = make_xy(x, y, N, IRR_Y_ABSORBANCE), *r;
				irr_write_options o;
				char *text = NULL;
				size_t len;
				irr_error err;
				irr_write_options_init(&o);
				o.form = form ? IRR_JCAMP_DIFDUP : IRR_JCAMP_AFFN;
				o.descending = desc;
				assert_int_equal(irr_spectrum_write_jcamp(&text, &len, s, &o, &err), IRR_OK);
				assert_int_equal(strlen(text), len);
				check_header_and_lines(text, N);
				r = read_back(text, len);
				assert_int_equal(irr_spectrum_y_units(r), IRR_Y_ABSORBANCE);
				assert_same_points(r, x, y, N);
				/* The stored order is the one asked for. */
				assert_true((irr_spectrum_x(r)[0] > irr_spectrum_x(r)[N - 1]) == (desc != 0));
				free(text);
				irr_spectrum_free(r);
				irr_spectrum_free(s);
			}
	}
}

static void uneven_axis_is_written_as_xypoints(void **state)
{
	static const double x[] = {400.0, 401.5, 405.25, 410.0, 600.125};
	static const double y[] = {0.1, -0.2, 0.333333, 1.5, 0.0};
	irr_spectrum *s = make_xy(x, y, 5, IRR_Y_ABSORBANCE), *r;
	char *text = NULL;
	size_t len;
	irr_error err;
	(void)state;
	assert_int_equal(irr_spectrum_write_jcamp(&text, &len, s, NULL, &err), IRR_OK);
	assert_non_null(strstr(text, "##XYPOINTS=(XY..XY)\n"));
	assert_null(strstr(text, "##XYDATA"));
	r = read_back(text, len);
	assert_same_points(r, x, y, 5);
	free(text);
	irr_spectrum_free(r);
	irr_spectrum_free(s);
}

static void transmittance_is_ten_to_minus_absorbance(void **state)
{
	enum { N = 400 };
	static double x[N], y[N];
	irr_spectrum *s, *r;
	irr_write_options o;
	char *text = NULL;
	size_t len;
	irr_error err;
	(void)state;
	for (int i = 0; i < N; i++) {
		x[i] = 1000.0 + i;
		y[i] = 0.02 + irr_synth_lorentzian(x[i], 1200.0, 20.0, 1.2);
	}
	s = make_xy(x, y, N, IRR_Y_ABSORBANCE);
	irr_write_options_init(&o);
	o.y_units = IRR_Y_TRANSMITTANCE;
	assert_int_equal(irr_spectrum_write_jcamp(&text, &len, s, &o, &err), IRR_OK);
	assert_non_null(strstr(text, "##YUNITS=TRANSMITTANCE\n"));
	r = read_back(text, len);
	for (int i = 0; i < N; i++) {
		/* File order is descending (the default). */
		double t = irr_spectrum_y(r)[N - 1 - i];
		assert_true(fabs(t - rounded(pow(10.0, -y[i]), 6)) < 1e-9);
	}
	free(text);
	irr_spectrum_free(r);
	/* Transmittance 0 has no absorbance. */
	{
		double tx[] = {1, 2, 3}, ty[] = {0.5, 0.0, 0.5};
		irr_spectrum *t0 = make_xy(tx, ty, 3, IRR_Y_TRANSMITTANCE);
		o.y_units = IRR_Y_ABSORBANCE;
		assert_int_equal(irr_spectrum_write_jcamp(&text, &len, t0, &o, &err), IRR_EINPUT);
		assert_null(text);
		assert_non_null(strstr(err.message, "transmittance <= 0"));
		irr_spectrum_free(t0);
	}
	/* JCAMP-DX is never written in percent. */
	o.y_units = IRR_Y_PERCENT_T;
	assert_int_equal(irr_spectrum_write_jcamp(&text, &len, s, &o, &err), IRR_EINPUT);
	irr_spectrum_free(s);
}

static void csv_round_trips(void **state)
{
	enum { N = 900 };
	static double x[N], y[N];
	irr_spectrum *s, *r;
	irr_write_options o;
	char *text = NULL;
	size_t len;
	irr_error err;
	(void)state;
	test_signal(x, y, N, 650.0, 1.0);
	s = make_xy(x, y, N, IRR_Y_ABSORBANCE);
	irr_write_options_init(&o);
	assert_int_equal(irr_spectrum_write_csv(&text, &len, s, &o, &err), IRR_OK);
	assert_memory_equal(text, "wavenumber_cm-1,absorbance\n", 27);
	r = read_back(text, len);
	assert_int_equal(irr_spectrum_y_units(r), IRR_Y_ABSORBANCE);
	assert_same_points(r, x, y, N);
	free(text);
	irr_spectrum_free(r);
	irr_spectrum_free(s);
}

static void too_few_points_are_refused(void **state)
{
	double x[] = {1000.0}, y[] = {0.5};
	irr_spectrum *s = NULL;
	irr_error err;
	char *text = (char *)"unchanged";
	size_t len;
	(void)state;
	if (irr_spectrum_from_xy(&s, x, y, 1, IRR_Y_ABSORBANCE, "one", &err) != IRR_OK)
		return; /* the spectrum stage refuses it already */
	assert_int_equal(irr_spectrum_write_jcamp(&text, &len, s, NULL, &err), IRR_EINPUT);
	assert_null(text);
	irr_spectrum_free(s);
}

/* ---- Peak picking finds what was drawn --------------------------------- */

static void lorentzian_comes_back_from_peak_picking(void **state)
{
	/* Off-grid centres on a 1 cm-1 grid; widths of the sharp and broad
	 * classes. Written as JCAMP-DX, read back, normalised, picked. */
	static const struct { double pos, fwhm, h; } bands[] = {
		{1712.3, 12.0, 0.6}, {2931.8, 14.0, 0.35}, {3350.7, 150.0, 0.3}, {1088.45, 10.0, 0.45}};
	enum { N = 3401 };
	static double x[N], y[N];
	irr_spectrum *s, *r;
	irr_peaklist *pl = NULL;
	irr_peak_options po;
	char *text = NULL;
	size_t len;
	irr_error err;
	(void)state;
	for (int i = 0; i < N; i++) {
		x[i] = 600.0 + i;
		y[i] = 0.01;
		for (size_t b = 0; b < sizeof bands / sizeof bands[0]; b++)
			y[i] += irr_synth_lorentzian(x[i], bands[b].pos, bands[b].fwhm, bands[b].h);
	}
	s = make_xy(x, y, N, IRR_Y_ABSORBANCE);
	assert_int_equal(irr_spectrum_write_jcamp(&text, &len, s, NULL, &err), IRR_OK);
	r = read_back(text, len);
	assert_int_equal(irr_spectrum_normalise(r, &err), IRR_OK);
	irr_peak_options_init(&po);
	assert_int_equal(irr_peaks_pick(&pl, r, &po, &err), IRR_OK);
	for (size_t b = 0; b < sizeof bands / sizeof bands[0]; b++) {
		const irr_peak *best = NULL;
		for (size_t k = 0; k < irr_peaklist_count(pl); k++) {
			const irr_peak *p = irr_peaklist_get(pl, k);
			if (!best || fabs(p->position - bands[b].pos) < fabs(best->position - bands[b].pos))
				best = p;
		}
		assert_non_null(best);
		if (fabs(best->position - bands[b].pos) > 0.5) {
			print_error("band at %.2f found at %.2f\n", bands[b].pos, best->position);
			fail();
		}
		/* The half-height width comes back too (within 10 %; the picker
		 * measures it on the sampled, smoothed curve). */
		if (best->fwhm > 0 && fabs(best->fwhm - bands[b].fwhm) > 0.1 * bands[b].fwhm) {
			print_error("band at %.2f: FWHM %.2f, drawn %.2f\n", bands[b].pos, best->fwhm, bands[b].fwhm);
			fail();
		}
	}
	irr_peaklist_free(pl);
	free(text);
	irr_spectrum_free(r);
	irr_spectrum_free(s);
}

/* ---- The synthesizer ------------------------------------------------------ */

static irr_tables *tables(void)
{
	irr_tables *t = NULL;
	irr_error err;
	if (irr_tables_load(&t, NULL, NULL, 0, &err) != IRR_OK) {
		print_error("tables: %s\n", err.message);
		fail();
	}
	return t;
}

static double value_at(const irr_spectrum *s, double wn)
{
	const double *x = irr_spectrum_x(s), *y = irr_spectrum_y(s);
	size_t n = irr_spectrum_points(s), best = 0;
	for (size_t i = 1; i < n; i++)
		if (fabs(x[i] - wn) < fabs(x[best] - wn))
			best = i;
	return y[best];
}

static double max_in(const irr_spectrum *s, double lo, double hi, double *where)
{
	const double *x = irr_spectrum_x(s), *y = irr_spectrum_y(s);
	double m = -1e300;
	for (size_t i = 0; i < irr_spectrum_points(s); i++)
		if (x[i] >= lo && x[i] <= hi && y[i] > m) {
			m = y[i];
			if (where)
				*where = x[i];
		}
	return m;
}

static void synthesized_spectrum_has_grid_scale_and_bands(void **state)
{
	irr_tables *t = tables();
	irr_synth_options o;
	irr_synth_component c = {"CCC(C)=O", 1.0, NULL}; /* 2-butanone */
	irr_spectrum *s = NULL;
	irr_error err;
	double where = 0;
	(void)state;
	irr_synth_options_init(&o);
	o.low = 600;
	o.high = 4000;
	o.spacing = 2;
	assert_int_equal(irr_synth_mixture(&s, &c, 1, t, &o, "butanone", &err), IRR_OK);
	assert_int_equal(irr_spectrum_points(s), 1701);
	assert_true(fabs(irr_spectrum_x(s)[0] - 600) < 1e-9);
	assert_true(fabs(irr_spectrum_x(s)[1700] - 4000) < 1e-9);
	assert_int_equal(irr_spectrum_y_units(s), IRR_Y_ABSORBANCE);
	/* Without baseline and noise the highest point is the asked height. */
	assert_true(fabs(max_in(s, 0, 1e9, NULL) - 0.8) < 1e-12);
	/* An aliphatic ketone's C=O stretch near 1715 cm-1 (Silverstein,
	 * Webster & Kiemle, 7th ed., ch. 2; from memory): a strong band in
	 * 1700-1730, and nothing above 3100 stronger than an overtone. */
	assert_true(max_in(s, 1700, 1730, &where) > 0.2);
	assert_true(where >= 1700 && where <= 1730);
	assert_true(max_in(s, 3500, 4000, NULL) < 0.05);
	irr_spectrum_free(s);
	irr_tables_free(t);
}

static void atr_scales_bands_by_inverse_wavenumber(void **state)
{
	irr_tables *t = tables();
	irr_synth_options o;
	irr_synth_component c = {"CC#N", 1.0, NULL}; /* acetonitrile */
	irr_spectrum *atr = NULL, *tr = NULL;
	irr_error err;
	double pn, pb, hn_a, hb_a, hn_t, hb_t, ratio;
	(void)state;
	irr_synth_options_init(&o);
	o.spacing = 0.5;
	assert_int_equal(irr_synth_mixture(&atr, &c, 1, t, &o, NULL, &err), IRR_OK);
	o.sampling = IRR_SAMPLING_TRANSMISSION;
	assert_int_equal(irr_synth_mixture(&tr, &c, 1, t, &o, NULL, &err), IRR_OK);
	/* The isolated C#N stretch (2200-2300) against the CH3 umbrella bend
	 * (1360-1390); positions from the spectrum itself. */
	hn_t = max_in(tr, 2200, 2300, &pn);
	hb_t = max_in(tr, 1360, 1390, &pb);
	hn_a = value_at(atr, pn);
	hb_a = value_at(atr, pb);
	assert_true(hn_t > 0.05 && hb_t > 0.05);
	ratio = (hn_a / hb_a) / (hn_t / hb_t);
	/* Harrick: expected pb / pn; neighbouring tails move it by < 2 %. */
	if (fabs(ratio / (pb / pn) - 1.0) > 0.02) {
		print_error("ATR ratio %.4f, expected %.4f\n", ratio, pb / pn);
		fail();
	}
	irr_spectrum_free(atr);
	irr_spectrum_free(tr);
	irr_tables_free(t);
}

/* Least-squares coefficients (a, b) of m = a u + b v over all points. */
static void fit2(const irr_spectrum *m, const irr_spectrum *u, const irr_spectrum *v,
                 double *a, double *b, double *resid)
{
	double suu = 0, svv = 0, suv = 0, smu = 0, smv = 0, det, r = 0;
	size_t n = irr_spectrum_points(m);
	const double *ym = irr_spectrum_y(m), *yu = irr_spectrum_y(u), *yv = irr_spectrum_y(v);
	for (size_t i = 0; i < n; i++) {
		suu += yu[i] * yu[i];
		svv += yv[i] * yv[i];
		suv += yu[i] * yv[i];
		smu += ym[i] * yu[i];
		smv += ym[i] * yv[i];
	}
	det = suu * svv - suv * suv;
	*a = (smu * svv - smv * suv) / det;
	*b = (smv * suu - smu * suv) / det;
	for (size_t i = 0; i < n; i++)
		r = fmax(r, fabs(ym[i] - *a * yu[i] - *b * yv[i]));
	*resid = r;
}

static void mixture_shares_scale_components(void **state)
{
	/* A mixture is the share-weighted sum of its components, rescaled as a
	 * whole: M = k (s1 U/ku + s2 V/kv). Fitting M = a U + b V gives
	 * a/b = (s1/s2)(kv/ku); the unknown scales cancel between two
	 * mixtures, so (a/b) / (a'/b') = (s1/s2) / (s1'/s2'). Shares given as
	 * 0.35/0.15 are rescaled to 0.7/0.3. */
	irr_tables *t = tables();
	irr_synth_options o;
	irr_synth_component u[] = {{"C1CCCCC1", 1.0, NULL}}, v[] = {{"CC#N", 1.0, NULL}};
	irr_synth_component m1[] = {{"C1CCCCC1", 0.35, NULL}, {"CC#N", 0.15, NULL}};
	irr_synth_component m2[] = {{"C1CCCCC1", 2.0, NULL}, {"CC#N", 2.0, NULL}};
	irr_spectrum *su = NULL, *sv = NULL, *s1 = NULL, *s2 = NULL;
	irr_error err;
	double a1, b1, a2, b2, r1, r2, got;
	(void)state;
	irr_synth_options_init(&o);
	assert_int_equal(irr_synth_mixture(&su, u, 1, t, &o, NULL, &err), IRR_OK);
	assert_int_equal(irr_synth_mixture(&sv, v, 1, t, &o, NULL, &err), IRR_OK);
	assert_int_equal(irr_synth_mixture(&s1, m1, 2, t, &o, NULL, &err), IRR_OK);
	assert_int_equal(irr_synth_mixture(&s2, m2, 2, t, &o, NULL, &err), IRR_OK);
	fit2(s1, su, sv, &a1, &b1, &r1);
	fit2(s2, su, sv, &a2, &b2, &r2);
	/* Exactly linear (to rounding), with positive parts. */
	assert_true(r1 < 1e-9 && r2 < 1e-9);
	assert_true(a1 > 0 && b1 > 0 && a2 > 0 && b2 > 0);
	got = (a1 / b1) / (a2 / b2);
	if (fabs(got - (0.7 / 0.3)) > 1e-6) {
		print_error("share ratio %.6f, expected %.6f\n", got, 0.7 / 0.3);
		fail();
	}
	irr_spectrum_free(su);
	irr_spectrum_free(sv);
	irr_spectrum_free(s1);
	irr_spectrum_free(s2);
	irr_tables_free(t);
}

static double rms_in(const irr_spectrum *a, const irr_spectrum *b, double lo, double hi, size_t *n)
{
	double ss = 0;
	*n = 0;
	for (size_t i = 0; i < irr_spectrum_points(a); i++) {
		double x = irr_spectrum_x(a)[i];
		if (x >= lo && x <= hi) {
			double d = irr_spectrum_y(a)[i] - irr_spectrum_y(b)[i];
			ss += d * d;
			(*n)++;
		}
	}
	return sqrt(ss / (double)*n);
}

static void noise_is_seeded_and_has_the_asked_rms(void **state)
{
	irr_tables *t = tables();
	irr_synth_options o;
	irr_synth_component c = {"CCO", 1.0, NULL};
	irr_spectrum *clean = NULL, *n1 = NULL, *n1b = NULL, *n2 = NULL;
	irr_error err;
	size_t n;
	double rms;
	(void)state;
	irr_synth_options_init(&o);
	assert_int_equal(irr_synth_mixture(&clean, &c, 1, t, &o, NULL, &err), IRR_OK);
	o.noise = 0.004;
	o.seed = 42;
	assert_int_equal(irr_synth_mixture(&n1, &c, 1, t, &o, NULL, &err), IRR_OK);
	assert_int_equal(irr_synth_mixture(&n1b, &c, 1, t, &o, NULL, &err), IRR_OK);
	o.seed = 43;
	assert_int_equal(irr_synth_mixture(&n2, &c, 1, t, &o, NULL, &err), IRR_OK);
	assert_memory_equal(irr_spectrum_y(n1), irr_spectrum_y(n1b),
	                    irr_spectrum_points(n1) * sizeof(double));
	assert_true(memcmp(irr_spectrum_y(n1), irr_spectrum_y(n2),
	                   irr_spectrum_points(n1) * sizeof(double)) != 0);
	rms = rms_in(n1, clean, 400, 4000, &n);
	assert_true(n >= 1000);
	if (fabs(rms / 0.004 - 1.0) > 0.10) {
		print_error("noise RMS %.5f for 0.004\n", rms);
		fail();
	}
	irr_spectrum_free(clean);
	irr_spectrum_free(n1);
	irr_spectrum_free(n1b);
	irr_spectrum_free(n2);
	irr_tables_free(t);
}

static void baseline_and_co2_are_added(void **state)
{
	irr_tables *t = tables();
	irr_synth_options o;
	irr_synth_component c = {"CCCCCC", 1.0, NULL}; /* n-hexane: nothing near 2350 or 667 */
	irr_spectrum *plain = NULL, *extra = NULL;
	irr_error err;
	double p;
	(void)state;
	irr_synth_options_init(&o);
	assert_int_equal(irr_synth_mixture(&plain, &c, 1, t, &o, NULL, &err), IRR_OK);
	o.co2 = 0.05;
	o.baseline_low = 0.1;
	o.baseline_high = 0.3;
	assert_int_equal(irr_synth_mixture(&extra, &c, 1, t, &o, NULL, &err), IRR_OK);
	/* Linear baseline: +0.1 at 400, +0.3 at 4000, +0.2 in the middle. */
	assert_true(fabs(value_at(extra, 4000) - value_at(plain, 4000) - 0.3) < 1e-3);
	assert_true(fabs(value_at(extra, 2200) - value_at(plain, 2200) - 0.2) < 2e-3);
	/* CO2: maxima at 2360 and 2340, and at 667, over the baseline. */
	max_in(extra, 2350, 2375, &p);
	assert_true(fabs(p - 2360) <= 1.0);
	max_in(extra, 2325, 2349, &p);
	assert_true(fabs(p - 2340) <= 1.0);
	max_in(extra, 655, 680, &p);
	assert_true(fabs(p - 667) <= 1.0);
	assert_true(value_at(extra, 2360) - value_at(plain, 2360) > 0.05 + 0.2);
	irr_spectrum_free(plain);
	irr_spectrum_free(extra);
	irr_tables_free(t);
}

static void bad_input_is_refused_with_a_reason(void **state)
{
	irr_tables *t = tables();
	irr_synth_options o;
	irr_synth_component good = {"CCO", 1.0, NULL}, bad[] = {{"CCO", 0.5, NULL}, {"C1CC(", 0.5, NULL}};
	irr_synth_component zero = {"CCO", 0.0, NULL};
	irr_spectrum *s = NULL;
	irr_error err;
	(void)state;
	irr_synth_options_init(&o);
	assert_int_equal(irr_synth_mixture(&s, bad, 2, t, &o, NULL, &err), IRR_EINPUT);
	assert_null(s);
	assert_non_null(strstr(err.file, "component 2"));
	assert_int_equal(irr_synth_mixture(&s, &zero, 1, t, &o, NULL, &err), IRR_EINPUT);
	assert_int_equal(irr_synth_mixture(&s, &good, 0, t, &o, NULL, &err), IRR_EINPUT);
	o.low = 4000;
	o.high = 400;
	assert_int_equal(irr_synth_mixture(&s, &good, 1, t, &o, NULL, &err), IRR_EINPUT);
	irr_synth_options_init(&o);
	o.spacing = 0;
	assert_int_equal(irr_synth_mixture(&s, &good, 1, t, &o, NULL, &err), IRR_EINPUT);
	irr_synth_options_init(&o);
	o.noise = NAN;
	assert_int_equal(irr_synth_mixture(&s, &good, 1, t, &o, NULL, &err), IRR_EINPUT);
	irr_synth_options_init(&o);
	o.y_units = IRR_Y_PERCENT_T;
	assert_int_equal(irr_synth_mixture(&s, &good, 1, t, &o, NULL, &err), IRR_EINPUT);
	assert_null(s);
	irr_tables_free(t);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(lorentzian_follows_its_definition),
		cmocka_unit_test(difdup_lines_match_hand_encoding),
		cmocka_unit_test(jcamp_round_trips_every_form),
		cmocka_unit_test(uneven_axis_is_written_as_xypoints),
		cmocka_unit_test(transmittance_is_ten_to_minus_absorbance),
		cmocka_unit_test(csv_round_trips),
		cmocka_unit_test(too_few_points_are_refused),
		cmocka_unit_test(lorentzian_comes_back_from_peak_picking),
		cmocka_unit_test(synthesized_spectrum_has_grid_scale_and_bands),
		cmocka_unit_test(atr_scales_bands_by_inverse_wavenumber),
		cmocka_unit_test(mixture_shares_scale_components),
		cmocka_unit_test(noise_is_seeded_and_has_the_asked_rms),
		cmocka_unit_test(baseline_and_co2_are_added),
		cmocka_unit_test(bad_input_is_refused_with_a_reason),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
