/* test_jcamp.c: the JCAMP-DX reader (src/jcamp.c) against its sources.
 *
 * Sources:
 * - Real measured spectra in ../shared/ir-reference/ (override with
 *   IRRECON_REFDIR): every file must decode with the point count and the
 *   first and last X that its own header (##NPOINTS, ##FIRSTX, ##LASTX) and
 *   MANIFEST.tsv state, and a first Y within one ##YFACTOR step of ##FIRSTY
 *   (README.md of that folder: the files round FIRSTY; fixdec1 only to the
 *   printed precision; jtpolysd has a mistyped YFACTOR and must warn).
 * - The same measurement in several encodings (README.md): indene-fix
 *   (absorbance, 4 decimals) and indene-xy (transmittance, 4 decimals) on
 *   one grid agree to their printed precision through A = -log10(T);
 *   indene-difdup (another grid) agrees with indene-xy within the linear
 *   interpolation error bound |e| <= h^2/8 max|f''| (standard numerical
 *   analysis, from memory) plus the rounding of both files; the two
 *   polystyrene files hold the same raw integers.
 * - The ASDF rules of JCAMP-DX 4.24 (McDonald & Wilks, Appl. Spectrosc. 42
 *   (1988) 151): sequences generated here are encoded by a small
 *   independent encoder in this file (AFFN, PAC, SQZ, DIF, DUP, mixtures,
 *   Y-check values, line breaks anywhere) and must decode back exactly.
 * - Bad input: hand-made broken files; each must fail with IRR_EINPUT (or
 *   IRR_ELIMIT for limits) naming the file and, where there is one, the line.
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

/* ---- helpers ------------------------------------------------------------ */

static char *slurp(const char *path, size_t *len)
{
	FILE *f = fopen(path, "rb");
	char *buf;
	long n;
	if (!f)
		return NULL;
	fseek(f, 0, SEEK_END);
	n = ftell(f);
	fseek(f, 0, SEEK_SET);
	buf = malloc((size_t)n + 1);
	if (buf && fread(buf, 1, (size_t)n, f) != (size_t)n) {
		free(buf);
		buf = NULL;
	}
	fclose(f);
	if (buf) {
		buf[n] = '\0';
		if (len)
			*len = (size_t)n;
	}
	return buf;
}

/* The value of a header record, found by the test itself (not by the
 * reader under test): "##LABEL=" at a line start, up to "$$" or the line end. */
static int header_value(const char *text, const char *label, char *out, size_t size)
{
	size_t ll = strlen(label);
	for (const char *p = text; (p = strstr(p, label)); p += ll) {
		if (p != text && p[-1] != '\n')
			continue;
		p += ll;
		while (*p == ' ')
			p++;
		size_t n = 0;
		while (p[n] && p[n] != '\r' && p[n] != '\n' && !(p[n] == '$' && p[n + 1] == '$'))
			n++;
		while (n && p[n - 1] == ' ')
			n--;
		if (n >= size)
			n = size - 1;
		memcpy(out, p, n);
		out[n] = '\0';
		return 1;
	}
	return 0;
}

static double header_number(const char *text, const char *label)
{
	char v[128];
	assert_true(header_value(text, label, v, sizeof v));
	return strtod(v, NULL);
}

static int has_warning(const irr_spectrum *s, const char *needle)
{
	for (size_t i = 0; i < irr_spectrum_warning_count(s); i++)
		if (strstr(irr_spectrum_warning(s, i), needle))
			return 1;
	return 0;
}

static irr_spectrum *read_ref(const char *file)
{
	char path[1200];
	irr_spectrum *s = NULL;
	irr_error err;
	irr_error_clear(&err);
	snprintf(path, sizeof path, "%s/%s", refdir(), file);
	if (irr_spectrum_read_file(&s, path, NULL, &err) != IRR_OK)
		fail_msg("%s: %s (line %ld)", file, err.message, err.line);
	return s;
}

static int close_rel(double a, double b, double rel)
{
	return fabs(a - b) <= rel * fmax(fabs(a), fabs(b));
}

/* ---- the shared reference files ---------------------------------------- */

/* The header records of the shared files that really disagree with their
 * data (read off the files themselves): every other file must read
 * without a warning. */
static const struct {
	const char *file;
	const char *labels; /* the records named, in order */
} known_warnings[] = {
	/* ##DELTAX= -2.000002 while X runs from 400 up to 4000 */
	{"4-chloroaniline.jdx", "##DELTAX"},
	/* ##MAXY= 80, ##MINY= 0.5; the data span -0.23 to 79.45 */
	{"indene-difdup.jdx", "##MAXY ##MINY"},
	/* README.md: mistyped ##YFACTOR (and so ##MAXY, ##MINY) */
	{"polystyrene-film-difdup-bad-yfactor.jdx", "##YFACTOR ##MAXY ##MINY"},
	/* ##MAXY= 79.17, ##MINY= 0.19: percent, over fractional data */
	{"unidentified/dupdec2.jdx", "##MAXY ##MINY"},
	/* ##MAXY= 81.962; the data reach 81.985 */
	{"unidentified/fixdec1.jdx", "##MAXY"},
};

static void check_known_warnings(const irr_spectrum *s, const char *file)
{
	const char *labels = "";
	char want[128], *tok, *save = NULL;
	size_t k = 0;
	for (size_t i = 0; i < sizeof known_warnings / sizeof known_warnings[0]; i++)
		if (!strcmp(known_warnings[i].file, file))
			labels = known_warnings[i].labels;
	snprintf(want, sizeof want, "%s", labels);
	for (tok = strtok_r(want, " ", &save); tok; tok = strtok_r(NULL, " ", &save), k++) {
		if (k >= irr_spectrum_warning_count(s) ||
		    strncmp(irr_spectrum_warning(s, k), tok, strlen(tok)) != 0)
			fail_msg("%s: warning %zu should name %s", file, k + 1, tok);
	}
	if (irr_spectrum_warning_count(s) != k)
		fail_msg("%s: unexpected warning '%s'", file, irr_spectrum_warning(s, k));
}

/* MANIFEST.tsv columns: file, compound, smiles, phase_or_sampling, y_units,
 * points, first_x, last_x, ... */
static void every_shared_file_matches_its_header(void **state)
{
	char path[1200], line[4096];
	FILE *f;
	int files = 0;
	(void)state;
	NEED_REFDIR();
	snprintf(path, sizeof path, "%s/MANIFEST.tsv", refdir());
	f = fopen(path, "r");
	assert_non_null(f);
	assert_non_null(fgets(line, sizeof line, f)); /* column names */
	while (fgets(line, sizeof line, f)) {
		char *col[8], *p = line, *text;
		int nc = 0;
		irr_spectrum *s;
		while (nc < 8 && p) {
			col[nc++] = p;
			p = strchr(p, '\t');
			if (p)
				*p++ = '\0';
		}
		assert_int_equal(nc, 8);
		size_t points = (size_t)strtoul(col[5], NULL, 10);
		double first_x = strtod(col[6], NULL), last_x = strtod(col[7], NULL);
		s = read_ref(col[0]);
		assert_int_equal(irr_spectrum_points(s), points);
		assert_true(close_rel(irr_spectrum_first_x(s), first_x, 1e-9));
		assert_true(close_rel(irr_spectrum_last_x(s), last_x, 1e-9));
		assert_true(close_rel(irr_spectrum_x(s)[0], first_x, 1e-9));
		assert_true(close_rel(irr_spectrum_x(s)[points - 1], last_x, 1e-9));
		if (strstr(col[0], ".jdx")) {
			double yf, firsty, y0;
			snprintf(path, sizeof path, "%s/%s", refdir(), col[0]);
			text = slurp(path, NULL);
			assert_non_null(text);
			assert_string_equal(irr_spectrum_source_format(s), "jcamp-dx");
			/* The file's own header, read by this test. */
			assert_int_equal((size_t)header_number(text, "##NPOINTS="), points);
			assert_true(close_rel(header_number(text, "##FIRSTX="), first_x, 1e-9));
			assert_true(close_rel(header_number(text, "##LASTX="), last_x, 1e-9));
			yf = fabs(header_number(text, "##YFACTOR="));
			firsty = header_number(text, "##FIRSTY=");
			y0 = irr_spectrum_y(s)[0];
			if (strstr(col[0], "bad-yfactor")) {
				/* README.md: decodes to 0.98338 where FIRSTY says 0.98163. */
				assert_true(fabs(y0 - 0.98338) < 1e-5);
				assert_true(has_warning(s, "##YFACTOR"));
			} else if (strstr(col[0], "fixdec1")) {
				/* README.md: within the printed precision of FIRSTY
				 * ("64.915": half a unit in the third decimal). */
				assert_true(fabs(y0 - firsty) <= 0.0005);
			} else {
				if (!(fabs(y0 - firsty) <= yf * (1 + 1e-9)))
					fail_msg("%s: first Y %.10g vs ##FIRSTY %.10g, YFACTOR %g",
					         col[0], y0, firsty, yf);
				assert_false(has_warning(s, "##YFACTOR"));
			}
			free(text);
		} else {
			/* README.md: header wavenumber_cm-1,absorbance. */
			assert_string_equal(irr_spectrum_source_format(s), "csv");
			assert_int_equal(irr_spectrum_source_y_units(s), IRR_Y_ABSORBANCE);
		}
		check_known_warnings(s, col[0]);
		irr_spectrum_free(s);
		files++;
	}
	fclose(f);
	/* README.md: 31 JCAMP-DX files and 5 CSV files. */
	assert_int_equal(files, 36);
}

/* indene-fix (A, 4 decimals) and indene-xy (T, 4 decimals), same grid. */
static void indene_fix_and_xy_agree_to_their_precision(void **state)
{
	irr_spectrum *a, *t;
	size_t n, compared = 0;
	(void)state;
	NEED_REFDIR();
	a = read_ref("indene-fix.jdx");
	t = read_ref("indene-xy.jdx");
	n = irr_spectrum_points(a);
	assert_int_equal(n, irr_spectrum_points(t));
	assert_int_equal(irr_spectrum_source_y_units(a), IRR_Y_ABSORBANCE);
	assert_int_equal(irr_spectrum_source_y_units(t), IRR_Y_TRANSMITTANCE);
	for (size_t i = 0; i < n; i++) {
		double x = irr_spectrum_x(a)[i], av = irr_spectrum_y(a)[i], tv = irr_spectrum_y(t)[i];
		assert_true(x == irr_spectrum_x(t)[i]);
		/* README.md: indene-fix is clipped at A = 3.000. */
		if (av >= 3.0 || tv <= 0.001)
			continue;
		double tol = 0.5e-4 + 0.5e-4 / (tv * log(10.0)) + 1e-12;
		if (!(fabs(av + log10(tv)) <= tol))
			fail_msg("indene at %g cm-1: A %.5f, -log10(T) %.5f", x, av, -log10(tv));
		compared++;
	}
	assert_true(compared > 3500);
	irr_spectrum_free(a);
	irr_spectrum_free(t);
}

/* indene-difdup (%T, 0.96427 cm-1 grid) against indene-xy interpolated. */
static void indene_difdup_agrees_after_interpolation(void **state)
{
	irr_spectrum *d, *t;
	const double *xd, *yd, *xt, *yt;
	size_t nd, nt, j = 1, compared = 0;
	(void)state;
	NEED_REFDIR();
	d = read_ref("indene-difdup.jdx");
	t = read_ref("indene-xy.jdx");
	nd = irr_spectrum_points(d);
	nt = irr_spectrum_points(t);
	xd = irr_spectrum_x(d);
	yd = irr_spectrum_y(d);
	xt = irr_spectrum_x(t);
	yt = irr_spectrum_y(t);
	for (size_t i = 0; i < nd; i++) {
		while (j + 2 < nt && xt[j + 1] <= xd[i])
			j++;
		if (xd[i] < xt[j] || xd[i] > xt[j + 1] || j + 2 >= nt)
			continue;
		double f = (xd[i] - xt[j]) / (xt[j + 1] - xt[j]);
		double ti = yt[j] * (1 - f) + yt[j + 1] * f;
		double c = fmax(fabs(yt[j - 1] - 2 * yt[j] + yt[j + 1]),
		                fabs(yt[j] - 2 * yt[j + 1] + yt[j + 2]));
		/* h = 1 cm-1; c estimates |f''| h^2 from the second difference,
		 * doubled because difdup is itself interpolated; 1e-4 for the
		 * rounding of both files (0.005 %T and 0.00005 T). */
		double tol = c / 4 + 1e-4;
		if (!(fabs(yd[i] / 100 - ti) <= tol))
			fail_msg("indene at %g cm-1: difdup %.5f, xy interpolated %.5f", xd[i],
			         yd[i] / 100, ti);
		compared++;
	}
	assert_true(compared > 3600);
	irr_spectrum_free(d);
	irr_spectrum_free(t);
}

static void polystyrene_files_hold_the_same_integers(void **state)
{
	irr_spectrum *a, *b;
	size_t n;
	(void)state;
	NEED_REFDIR();
	a = read_ref("polystyrene-film.jdx");
	b = read_ref("polystyrene-film-difdup-bad-yfactor.jdx");
	n = irr_spectrum_points(a);
	assert_int_equal(n, 1844);
	assert_int_equal(irr_spectrum_points(b), n);
	/* The declared factors (README.md): 2.384185791e-09 and the mistyped
	 * 2.3884185791e-09. */
	for (size_t i = 0; i < n; i++) {
		double ra = irr_spectrum_y(a)[i] / 2.384185791e-09;
		double rb = irr_spectrum_y(b)[i] / 2.3884185791e-09;
		assert_true(fabs(ra - nearbyint(ra)) < 1e-3);
		assert_true(fabs(rb - nearbyint(rb)) < 1e-3);
		if (nearbyint(ra) != nearbyint(rb))
			fail_msg("point %zu: raw %.0f vs %.0f", i + 1, ra, rb);
	}
	assert_true(has_warning(b, "##YFACTOR"));
	assert_true(has_warning(b, "##FIRSTY"));
	/* The warning points at the right factor (README.md: 2.384185791e-09,
	 * to the six digits FIRSTY supports). */
	assert_true(has_warning(b, "2.38419e-09"));
	assert_false(has_warning(a, "##YFACTOR"));
	irr_spectrum_free(a);
	irr_spectrum_free(b);
}

/* ---- ASDF: an independent encoder and round trips ----------------------- */

static uint32_t rng = 0x9e3779b9u;
static uint32_t rnd(void)
{
	rng ^= rng << 13;
	rng ^= rng >> 17;
	rng ^= rng << 5;
	return rng;
}

typedef struct sbuf {
	char *p;
	size_t n, cap;
} sbuf;

static void put(sbuf *b, const char *fmt, ...)
{
	va_list ap;
	int k;
	for (;;) {
		va_start(ap, fmt);
		k = vsnprintf(b->p + b->n, b->cap - b->n, fmt, ap);
		va_end(ap);
		if ((size_t)k < b->cap - b->n)
			break;
		b->cap = b->cap * 2 + (size_t)k + 64;
		b->p = realloc(b->p, b->cap);
		assert_non_null(b->p);
	}
	b->n += (size_t)k;
}

/* Writes v with its first digit replaced by a pseudo-digit (JCAMP-DX 4.24,
 * Table of ASDF characters): SQZ @A-I / a-i, DIF %J-R / j-r, DUP S-Z s. */
static void put_coded(sbuf *b, long v, char zero, const char *pos, const char *neg)
{
	char digits[32];
	long a = v < 0 ? -v : v;
	snprintf(digits, sizeof digits, "%ld", a);
	if (a == 0)
		put(b, "%c", zero);
	else
		put(b, "%c%s", v < 0 ? neg[digits[0] - '1'] : pos[digits[0] - '1'], digits + 1);
}

static void put_sqz(sbuf *b, long v) { put_coded(b, v, '@', "ABCDEFGHI", "abcdefghi"); }
static void put_dif(sbuf *b, long v) { put_coded(b, v, '%', "JKLMNOPQR", "jklmnopqr"); }
static void put_dup(sbuf *b, long count)
{
	char digits[32];
	snprintf(digits, sizeof digits, "%ld", count);
	put(b, "%c%s", "STUVWXYZs"[digits[0] - '1'], digits + 1);
}

enum { F_AFFN, F_PAC, F_SQZ, F_DIF, F_MIXED, F_COUNT };

typedef struct tok {
	int kind; /* 0 value, 1 difference */
	long v;
} tok;

/* Encodes y[0..n-1] (integers) as one JCAMP-DX block with X = 1..n. Forms:
 * AFFN (blank or comma separated), PAC (sign-delimited), SQZ, DIF (with
 * the Y-check value at each line start), or a random mix per line; DUP on
 * or off; lines of 1..maxper ordinates. */
static char *encode(const long *y, size_t n, int form, int dup, int maxper)
{
	sbuf b = {malloc(256), 0, 256};
	size_t i = 0;
	int last_line_dif = 0;
	put(&b, "##TITLE= round trip\r\n##JCAMP-DX= 4.24\r\n##DATA TYPE= INFRARED SPECTRUM\r\n"
	        "##XUNITS= 1/CM\r\n##YUNITS= ABSORBANCE\r\n##XFACTOR= 1\r\n##YFACTOR= 1\r\n"
	        "##FIRSTX= 1\r\n##LASTX= %zu\r\n##NPOINTS= %zu\r\n##FIRSTY= %ld\r\n"
	        "##XYDATA= (X++(Y..Y))\r\n", n, n, y[0]);
	while (i < n) {
		int f = form == F_MIXED ? (int)(rnd() % 4) : form;
		size_t per = 1 + rnd() % (unsigned)maxper, start = i, ntok = 0;
		tok t[64];
		/* A line after a DIF line repeats the last ordinate first. */
		int check = last_line_dif;
		size_t first = check ? i - 1 : i;
		if (per > 60)
			per = 60;
		if (i + per > n)
			per = n - i;
		put(&b, "%zu", first + 1);
		if (f == F_DIF) {
			t[ntok++] = (tok){0, y[first]};
			for (size_t k = first + 1; k < i + per; k++)
				t[ntok++] = (tok){1, y[k] - y[k - 1]};
		} else {
			if (check) {
				/* A non-DIF line still owes the check value. */
				t[ntok++] = (tok){0, y[first]};
			}
			for (size_t k = i; k < i + per; k++)
				t[ntok++] = (tok){0, y[k]};
		}
		int emitted_kind = 0;
		for (size_t k = 0; k < ntok;) {
			size_t run = 1;
			/* DUP repeats the token before it. A zero difference right
			 * after a value is written as a repeat of the value, as some
			 * writers do after a Y-check ("A666T" in indene-difdup). */
			if (dup && f != F_AFFN && f != F_PAC)
				while (k + run < ntok &&
				       ((t[k + run].kind == t[k].kind && t[k + run].v == t[k].v) ||
				        (t[k].kind == 0 && t[k + run].kind == 1 && t[k + run].v == 0)))
					run++;
			emitted_kind = t[k].kind;
			if (f == F_AFFN) {
				put(&b, (rnd() & 1) ? " %ld" : ",%ld", t[k].v);
			} else if (f == F_PAC) {
				put(&b, "%+ld", t[k].v);
			} else if (t[k].kind == 0) {
				put_sqz(&b, t[k].v);
			} else {
				put_dif(&b, t[k].v);
			}
			if (run > 1)
				put_dup(&b, (long)run);
			k += run;
		}
		put(&b, "\r\n");
		last_line_dif = f == F_DIF && emitted_kind == 1;
		i += per;
		(void)start;
	}
	/* A DIF last line still needs its check: JCAMP-DX writers add a line
	 * holding only the check value (with the X of that point). */
	if (last_line_dif) {
		put(&b, "%zu", n);
		put_sqz(&b, y[n - 1]);
		put(&b, "\r\n");
	}
	put(&b, "##END=\r\n");
	return b.p;
}

static void decode_and_compare(const char *text, const long *y, size_t n)
{
	irr_spectrum *s = NULL;
	irr_error err;
	irr_error_clear(&err);
	if (irr_spectrum_read_memory(&s, text, strlen(text), "generated", NULL, &err) != IRR_OK)
		fail_msg("generated file: %s (line %ld)\n%.2000s", err.message, err.line, text);
	assert_int_equal(irr_spectrum_points(s), n);
	for (size_t i = 0; i < n; i++) {
		if (irr_spectrum_y(s)[i] != (double)y[i])
			fail_msg("point %zu: %.17g, expected %ld\n%.3000s", i + 1,
			         irr_spectrum_y(s)[i], y[i], text);
		assert_true(irr_spectrum_x(s)[i] == (double)(i + 1));
	}
	irr_spectrum_free(s);
}

static void asdf_round_trips(void **state)
{
	(void)state;
	for (int trial = 0; trial < 400; trial++) {
		size_t n = 2 + rnd() % 300;
		long *y = malloc(n * sizeof *y);
		int kind = (int)(rnd() % 4);
		long v = (long)(rnd() % 2000001) - 1000000;
		assert_non_null(y);
		for (size_t i = 0; i < n; i++) {
			switch (kind) {
			case 0: /* random integers of any size and sign */
				y[i] = (long)(rnd() % 200000001) - 100000000;
				break;
			case 1: /* runs: repeated values and repeated differences */
				if (rnd() % 4 == 0)
					v += (long)(rnd() % 21) - 10;
				y[i] = v;
				break;
			case 2: /* smooth, like a spectrum, crossing zero */
				y[i] = (long)(5000.0 * sin((double)i / 7.0));
				break;
			default: /* constant stretches with linear ramps */
				y[i] = (i / 17) % 2 ? (long)(i * 3) - 400 : -7;
				break;
			}
		}
		int form = (int)(trial % F_COUNT);
		int dup = (trial / F_COUNT) % 2;
		int maxper = (trial % 3 == 0) ? 1 : (trial % 3 == 1 ? 5 : 40);
		char *text = encode(y, n, form, dup, maxper);
		decode_and_compare(text, y, n);
		free(text);
		free(y);
	}
}

/* 'E' is the SQZ digit +5 unless it follows an AFFN number and is followed
 * by a sign and a digit (an exponent). */
static void e_is_sqz_digit_or_exponent(void **state)
{
	static const char head[] =
	    "##TITLE= e\n##DATA TYPE= INFRARED SPECTRUM\n##XUNITS= 1/CM\n##YUNITS= ABSORBANCE\n"
	    "##XFACTOR= 1\n##YFACTOR= 1\n##FIRSTX= 1\n##LASTX= 8\n##NPOINTS= 8\n"
	    "##XYDATA= (X++(Y..Y))\n";
	char text[512];
	irr_spectrum *s = NULL;
	irr_error err;
	const double want[8] = {150, 0.25, 55, 57, -53, 12, 55, 300};
	(void)state;
	snprintf(text, sizeof text, "%s1 1.5E+02 2.5e-01 E5E7e3\n6 12E5 3E+2\n##END=\n", head);
	irr_error_clear(&err);
	assert_int_equal(irr_spectrum_read_memory(&s, text, strlen(text), "e", NULL, &err), IRR_OK);
	assert_int_equal(irr_spectrum_points(s), 8);
	for (int i = 0; i < 8; i++)
		assert_true(irr_spectrum_y(s)[i] == want[i]);
	irr_spectrum_free(s);
}

/* The Y-check value followed by DUP repeats the value (indene-difdup.jdx
 * line 94 "2887.024A666TL1": 16.66 at 2887 and 2888 cm-1, as indene-xy.jdx
 * has them). */
static void dup_after_ycheck_repeats_the_value(void **state)
{
	static const char text[] =
	    "##TITLE= check dup\n##DATA TYPE= INFRARED SPECTRUM\n##XUNITS= 1/CM\n##YUNITS= ABSORBANCE\n"
	    "##XFACTOR= 1\n##YFACTOR= 1\n##FIRSTX= 1\n##LASTX= 6\n##NPOINTS= 6\n"
	    "##XYDATA= (X++(Y..Y))\n1A0JJ\n3A2TJ\n5A3J\n6A4\n##END=\n";
	const double want[6] = {10, 11, 12, 12, 13, 14};
	irr_spectrum *s = NULL;
	irr_error err;
	(void)state;
	irr_error_clear(&err);
	assert_int_equal(irr_spectrum_read_memory(&s, text, strlen(text), "t", NULL, &err), IRR_OK);
	assert_int_equal(irr_spectrum_points(s), 6);
	for (int i = 0; i < 6; i++)
		assert_true(irr_spectrum_y(s)[i] == want[i]);
	irr_spectrum_free(s);
}

/* Each header record that disagrees with the data gives a warning naming
 * it; the data are still read. Values here are written to disagree. */
static void header_checks_warn_naming_the_label(void **state)
{
	static const char head[] =
	    "##TITLE= checks\n##DATA TYPE= INFRARED SPECTRUM\n##XUNITS= 1/CM\n##YUNITS= ABSORBANCE\n"
	    "##XFACTOR= 1\n##YFACTOR= 0.01\n##FIRSTX= 4000\n##LASTX= 3993\n##NPOINTS= 8\n";
	static const struct {
		const char *extra, *label;
	} cases[] = {
		{"##DELTAX= -2\n", "##DELTAX"},     /* (3993 - 4000) / 7 = -1 */
		{"##FIRSTY= 0.20\n", "##FIRSTY"},  /* first Y is 0.10 */
		{"##MAXY= 0.9\n", "##MAXY"},       /* largest is 0.80 */
		{"##MINY= 0.2\n", "##MINY"},       /* smallest is 0.10 */
		{"##MAXX= 4100\n", "##MAXX"},
		{"##MINX= 3000\n", "##MINX"},
	};
	char text[1024];
	irr_error err;
	(void)state;
	for (size_t i = 0; i < sizeof cases / sizeof cases[0]; i++) {
		irr_spectrum *s = NULL;
		snprintf(text, sizeof text, "%s%s##XYDATA= (X++(Y..Y))\n4000 10 20 30 40\n3996 50 60 70 80\n##END=\n",
		         head, cases[i].extra);
		assert_int_equal(irr_spectrum_read_memory(&s, text, strlen(text), "h", NULL, &err), IRR_OK);
		if (!has_warning(s, cases[i].label))
			fail_msg("no warning naming %s", cases[i].label);
		irr_spectrum_free(s);
	}
	/* A wrong ##XFACTOR or ##LASTX puts the data lines' X out of step. */
	{
		static const char *const bad[][2] = {
		    {"##XFACTOR= 2\n##YFACTOR= 0.01\n##FIRSTX= 4000\n##LASTX= 3993\n", "##XFACTOR"},
		    {"##XFACTOR= 1\n##YFACTOR= 0.01\n##FIRSTX= 4000\n##LASTX= 3980\n", "##LASTX"},
		};
		for (size_t i = 0; i < 2; i++) {
			irr_spectrum *s = NULL;
			snprintf(text, sizeof text,
			         "##TITLE= x\n##DATA TYPE= INFRARED SPECTRUM\n##XUNITS= 1/CM\n##YUNITS= ABSORBANCE\n"
			         "%s##NPOINTS= 8\n##XYDATA= (X++(Y..Y))\n4000 10 20 30 40\n3996 50 60 70 80\n##END=\n",
			         bad[i][0]);
			assert_int_equal(irr_spectrum_read_memory(&s, text, strlen(text), "h", NULL, &err), IRR_OK);
			if (!has_warning(s, bad[i][1]))
				fail_msg("no warning naming %s", bad[i][1]);
			irr_spectrum_free(s);
		}
	}
	/* The same headers, consistent: no warning at all. */
	{
		irr_spectrum *s = NULL;
		snprintf(text, sizeof text, "%s##DELTAX= -1\n##FIRSTY= 0.1\n##MAXY= 0.8\n##MINY= 0.1\n"
		                            "##MAXX= 4000\n##MINX= 3993\n##XYDATA= (X++(Y..Y))\n"
		                            "4000 10 20 30 40\n3996 50 60 70 80\n##END=\n", head);
		assert_int_equal(irr_spectrum_read_memory(&s, text, strlen(text), "h", NULL, &err), IRR_OK);
		assert_int_equal(irr_spectrum_warning_count(s), 0);
		irr_spectrum_free(s);
	}
	/* A real case: 4-chloroaniline.jdx declares ##DELTAX= -2.000002 while
	 * its X runs from ##FIRSTX= 400 up to ##LASTX= 4000 (step +2). */
	if (have_refdir()) {
		irr_spectrum *s = read_ref("4-chloroaniline.jdx");
		assert_true(has_warning(s, "##DELTAX"));
		irr_spectrum_free(s);
	}
}

/* Line ends: LF, CRLF and the lone CR of classic Mac OS files. */
static void line_endings(void **state)
{
	static const char lf[] =
	    "##TITLE= ends\n##DATA TYPE= INFRARED SPECTRUM\n##XUNITS= 1/CM\n##YUNITS= ABSORBANCE\n"
	    "##FIRSTX= 1000\n##LASTX= 1003\n##NPOINTS= 4\n##XYDATA= (X++(Y..Y))\n1000A2J\n1001A3JJ\n1003A5\n##END=\n";
	char text[sizeof lf * 2];
	(void)state;
	for (int mode = 0; mode < 3; mode++) {
		size_t n = 0;
		irr_spectrum *s = NULL;
		irr_error err;
		for (const char *p = lf; *p; p++) {
			if (*p == '\n' && mode == 1)
				text[n++] = '\r';
			text[n++] = (*p == '\n' && mode == 2) ? '\r' : *p;
		}
		assert_int_equal(irr_spectrum_read_memory(&s, text, n, "ends", NULL, &err), IRR_OK);
		assert_int_equal(irr_spectrum_points(s), 4);
		assert_true(irr_spectrum_y(s)[0] == 12 && irr_spectrum_y(s)[3] == 15);
		irr_spectrum_free(s);
	}
}

/* ---- other records and compound files ------------------------------------ */

static void xypoints_and_peak_table(void **state)
{
	static const char xy[] =
	    "##TITLE= pairs\n##DATA TYPE= INFRARED SPECTRUM\n##XUNITS= MICROMETERS\n"
	    "##YUNITS= %T\n##XFACTOR= 0.01\n##YFACTOR= 0.1\n##NPOINTS= 4\n"
	    "##XYPOINTS= (XY..XY)\n250, 999; 500, 500\n1000,100 2000, 1000\n##END=\n";
	static const char pk[] =
	    "##TITLE= peaks\n##DATA TYPE= INFRARED PEAK TABLE\n##XUNITS= 1/CM\n"
	    "##YUNITS= ABSORBANCE\n##PEAK TABLE= (XY..XY)\n1715, 0.9 2950, 0.4\n1450, 0.2\n##END=\n";
	irr_spectrum *s = NULL;
	irr_error err;
	double lo, hi;
	(void)state;
	irr_error_clear(&err);
	assert_int_equal(irr_spectrum_read_memory(&s, xy, strlen(xy), "xy", NULL, &err), IRR_OK);
	assert_int_equal(irr_spectrum_points(s), 4);
	assert_true(fabs(irr_spectrum_x(s)[0] - 2.5) < 1e-12 && fabs(irr_spectrum_y(s)[0] - 99.9) < 1e-12);
	assert_true(fabs(irr_spectrum_x(s)[3] - 20.0) < 1e-12 && fabs(irr_spectrum_y(s)[3] - 100.0) < 1e-12);
	assert_int_equal(irr_spectrum_source_y_units(s), IRR_Y_PERCENT_T);
	assert_int_equal(irr_spectrum_normalise(s, &err), IRR_OK);
	/* 1e4 / 20 um = 500 cm-1; 1e4 / 2.5 um = 4000 cm-1 (definition). */
	irr_spectrum_range(s, &lo, &hi);
	assert_true(fabs(lo - 500) < 1e-9 && fabs(hi - 4000) < 1e-9);
	/* 50 %T -> A = -log10(0.5) = 0.30103 (definition of absorbance). */
	assert_true(fabs(irr_spectrum_y(s)[2] - 0.30102999566) < 1e-9);
	irr_spectrum_free(s);

	assert_int_equal(irr_spectrum_read_memory(&s, pk, strlen(pk), "pk", NULL, &err), IRR_OK);
	assert_int_equal(irr_spectrum_points(s), 3);
	assert_true(irr_spectrum_x(s)[0] == 1450 && irr_spectrum_x(s)[2] == 2950);
	assert_true(irr_spectrum_y(s)[1] == 0.9);
	irr_spectrum_free(s);
}

static const char link_file[] =
    "##TITLE= LPC-0412 package (Larkspur Process Chemistry)\n##JCAMP-DX= 5.01\n"
    "##DATA TYPE= LINK\n##BLOCKS= 2\n"
    "##TITLE= LPC-0412 UV\n##JCAMP-DX= 4.24\n##DATA TYPE= UV/VIS SPECTRUM\n##BLOCK_ID= 1\n"
    "##XUNITS= NANOMETERS\n##YUNITS= ABSORBANCE\n##FIRSTX= 200\n##LASTX= 203\n##NPOINTS= 4\n"
    "##XYDATA= (X++(Y..Y))\n200 1 2 3 4\n##END=\n"
    "##TITLE= LPC-0412 IR\n##JCAMP-DX= 4.24\n##DATA TYPE= INFRARED SPECTRUM\n##BLOCK_ID= 2\n"
    "##XUNITS= 1/CM\n##YUNITS= ABSORBANCE\n##YFACTOR= 0.001\n##FIRSTX= 4000\n##LASTX= 1000\n"
    "##NPOINTS= 4\n##XYDATA= (X++(Y..Y))\n4000 12 15 900 20\n##END=\n"
    "##END=\n";

static void link_file_blocks(void **state)
{
	char path[] = "/tmp/irrecon-test-link-XXXXXX";
	int fd = mkstemp(path);
	irr_block_info *bi = NULL;
	size_t nb = 0;
	irr_spectrum *s = NULL;
	irr_read_options o;
	irr_error err;
	(void)state;
	assert_true(fd >= 0);
	assert_int_equal(write(fd, link_file, sizeof link_file - 1), (ssize_t)(sizeof link_file - 1));
	close(fd);
	irr_error_clear(&err);
	assert_int_equal(irr_jcamp_list_blocks(&bi, &nb, path, &err), IRR_OK);
	assert_int_equal(nb, 3);
	assert_string_equal(bi[0].data_type, "LINK");
	assert_false(bi[0].has_data);
	assert_string_equal(bi[1].data_type, "UV/VIS SPECTRUM");
	assert_string_equal(bi[2].title, "LPC-0412 IR");
	assert_true(bi[2].has_data);
	free(bi);
	/* Default: the infrared block. */
	assert_int_equal(irr_spectrum_read_file(&s, path, NULL, &err), IRR_OK);
	assert_string_equal(irr_spectrum_title(s), "LPC-0412 IR");
	assert_true(fabs(irr_spectrum_y(s)[2] - 0.9) < 1e-12);
	irr_spectrum_free(s);
	/* By index: the UV block has nanometres, which is refused. */
	irr_read_options_init(&o);
	o.block = 2;
	assert_int_equal(irr_spectrum_read_file(&s, path, &o, &err), IRR_EINPUT);
	assert_null(s);
	assert_int_equal(err.line, 9);
	o.block = 7;
	assert_int_equal(irr_spectrum_read_file(&s, path, &o, &err), IRR_ENOTFOUND);
	unlink(path);
}

/* ---- bad input ------------------------------------------------------------ */

static const char good_head[] =
    "##TITLE= LPC-0412 crude ester (Larkspur Process Chemistry)\n" /* 1 */
    "##JCAMP-DX= 4.24\n"                                            /* 2 */
    "##DATA TYPE= INFRARED SPECTRUM\n"                              /* 3 */
    "##XUNITS= 1/CM\n"                                              /* 4 */
    "##YUNITS= ABSORBANCE\n"                                        /* 5 */
    "##XFACTOR= 1\n"                                                /* 6 */
    "##YFACTOR= 0.001\n"                                            /* 7 */
    "##FIRSTX= 4000\n"                                              /* 8 */
    "##LASTX= 1000\n"                                               /* 9 */
    "##NPOINTS= 16\n";                                              /* 10 */

static void expect_failure_text(const char *text, int code, long line, const char *words)
{
	const char *body = text;
	irr_spectrum *s = (irr_spectrum *)&s;
	irr_error err;
	irr_error_clear(&err);
	int rc = irr_spectrum_read_memory(&s, text, strlen(text), "broken.jdx", NULL, &err);
	if (rc != code)
		fail_msg("expected %d, got %d (%s) for:\n%s", code, rc, err.message, body);
	assert_null(s);
	assert_string_equal(err.file, "broken.jdx");
	if (line >= 0 && err.line != line)
		fail_msg("expected line %ld, got %ld (%s)", line, err.line, err.message);
	if (words && !strstr(err.message, words))
		fail_msg("message '%s' lacks '%s'", err.message, words);
	assert_null(strchr(err.message, '\n'));
}

static void expect_failure(const char *body, int code, long line, const char *words)
{
	char text[2048];
	snprintf(text, sizeof text, "%s%s", good_head, body);
	expect_failure_text(text, code, line, words);
}

static void bad_input_fails_with_file_and_line(void **state)
{
	(void)state;
	/* The reference body decodes: 16 points. */
	{
		char text[1024];
		irr_spectrum *s = NULL;
		irr_error err;
		snprintf(text, sizeof text, "%s##XYDATA= (X++(Y..Y))\n4000 1 2 3 4 5 6 7 8\n"
		                            "2400 9 10 11 12 13 14 15 16\n##END=\n", good_head);
		assert_int_equal(irr_spectrum_read_memory(&s, text, strlen(text), "ok", NULL, &err), IRR_OK);
		assert_int_equal(irr_spectrum_points(s), 16);
		irr_spectrum_free(s);
	}
	/* Truncated: the file stops in the middle of the data. */
	expect_failure("##XYDATA= (X++(Y..Y))\n4000 1 2 3 4 5 6 7 8\n2400 9 10", IRR_EINPUT, 13, "NPOINTS");
	/* Missing data record. */
	expect_failure("##END=\n", IRR_EINPUT, -1, "XYDATA");
	/* Wrong NPOINTS (the data hold 15). */
	expect_failure("##XYDATA= (X++(Y..Y))\n4000 1 2 3 4 5 6 7 8\n2400 9 10 11 12 13 14 15\n##END=\n",
	               IRR_EINPUT, 13, "NPOINTS");
	/* A miscounted line in the middle is named by the next line's X. */
	expect_failure("##XYDATA= (X++(Y..Y))\n4000 1 2 3 4 5 6 7 8 9\n2400 9 10 11 12 13 14 15 16\n##END=\n",
	               IRR_EINPUT, 12, "NPOINTS");
	/* NaN and infinity. */
	expect_failure("##XYDATA= (X++(Y..Y))\n4000 1 2 NaN 4 5 6 7 8\n2400 9 10 11 12 13 14 15 16\n##END=\n",
	               IRR_EINPUT, 12, "NaN");
	expect_failure("##XYDATA= (X++(Y..Y))\n4000 1 2 3 4 5 6 7 8\n2400 9 10 -inf 12 13 14 15 16\n##END=\n",
	               IRR_EINPUT, 13, "infinity");
	expect_failure("##XYDATA= (X++(Y..Y))\n4000 1 2 3 4 5 6 7 8\n2400 9 10 1E+999 12 13 14 15 16\n##END=\n",
	               IRR_EINPUT, 13, "1E+999");
	/* Non-monotonic X: line abscissas going back, and XY pairs. */
	expect_failure("##XYDATA= (X++(Y..Y))\n4000 1 2 3 4 5 6 7 8\n4200 9 10 11 12 13 14 15 16\n##END=\n",
	               IRR_EINPUT, 13, "monotonic");
	expect_failure_text("##TITLE= pairs\n##DATA TYPE= INFRARED SPECTRUM\n##XUNITS= 1/CM\n"
	                    "##YUNITS= ABSORBANCE\n##NPOINTS= 3\n##XYPOINTS= (XY..XY)\n"
	                    "4000, 1\n3000, 2\n3500, 3\n##END=\n", IRR_EINPUT, 9, "monotonic");
	/* Garbage in the data. */
	expect_failure("##XYDATA= (X++(Y..Y))\n4000 1 2 3 4 5 6 7 8\n2400 9 10 11 12 ~13 14 15 16\n##END=\n",
	               IRR_EINPUT, 13, "character");
	/* A Y-check value that does not repeat the last value. */
	expect_failure("##XYDATA= (X++(Y..Y))\n4000AJJJJJJJ\n2600IJJJJJJJJ\n##END=\n",
	               IRR_EINPUT, 13, "check");
	/* ##NPOINTS above the point limit is refused before any allocation. */
	{
		char text[1024];
		irr_spectrum *s = NULL;
		irr_read_options o;
		irr_error err;
		irr_read_options_init(&o);
		o.max_points = 10;
		snprintf(text, sizeof text, "%s##XYDATA= (X++(Y..Y))\n4000 1 2 3 4 5 6 7 8\n"
		                            "2400 9 10 11 12 13 14 15 16\n##END=\n", good_head);
		assert_int_equal(irr_spectrum_read_memory(&s, text, strlen(text), "big", &o, &err), IRR_ELIMIT);
		assert_int_equal(err.line, 10);
		o.max_points = 0;
		o.max_bytes = 100;
		assert_int_equal(irr_spectrum_read_memory(&s, text, strlen(text), "big", &o, &err), IRR_ELIMIT);
		assert_null(s);
	}
}

/* A flood of labelled records is refused at a fixed count (200,000, far
 * beyond real files) instead of growing a record table without end. */
static void record_flood_hits_the_limit(void **state)
{
	size_t n = 250000, len = 0;
	char *text = malloc(16 + n * 6);
	irr_spectrum *s = NULL;
	irr_error err;
	(void)state;
	assert_non_null(text);
	len += (size_t)sprintf(text, "##TITLE= flood\n");
	for (size_t i = 0; i < n; i++) {
		memcpy(text + len, "##X=1\n", 6);
		len += 6;
	}
	assert_int_equal(irr_spectrum_read_memory(&s, text, len, "flood.jdx", NULL, &err), IRR_ELIMIT);
	assert_null(s);
	assert_int_equal(err.line, 200001); /* record 200,001 (the title is record 1) */
	free(text);
}

static void binary_and_truncated_shared_file(void **state)
{
	static const char garbage[] = "##TITLE= x\n\x01\x02\x00\x7f\xff binary";
	irr_spectrum *s = NULL;
	irr_error err;
	char path[1200], *text;
	size_t len;
	(void)state;
	irr_error_clear(&err);
	assert_int_equal(irr_spectrum_read_memory(&s, garbage, sizeof garbage - 1, "garbage.bin", NULL, &err),
	                 IRR_EINPUT);
	assert_null(s);
	assert_string_equal(err.file, "garbage.bin");
	assert_int_equal(err.line, 2);
	NEED_REFDIR();
	/* A real file cut in half fails, naming a line of the data. */
	snprintf(path, sizeof path, "%s/acetophenone.jdx", refdir());
	text = slurp(path, &len);
	assert_non_null(text);
	{
		/* ##XYDATA is on line 948; cut inside the data. */
		size_t xy = (size_t)(strstr(text, "##XYDATA=") - text);
		for (int k = 1; k <= 3; k++) {
			size_t cut = xy + (len - xy) * (size_t)k / 4;
			assert_int_equal(irr_spectrum_read_memory(&s, text, cut, "cut.jdx", NULL, &err),
			                 IRR_EINPUT);
			assert_null(s);
			assert_true(err.line > 948);
			assert_non_null(strstr(err.message, "NPOINTS"));
		}
	}
	free(text);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(every_shared_file_matches_its_header),
		cmocka_unit_test(indene_fix_and_xy_agree_to_their_precision),
		cmocka_unit_test(indene_difdup_agrees_after_interpolation),
		cmocka_unit_test(polystyrene_files_hold_the_same_integers),
		cmocka_unit_test(asdf_round_trips),
		cmocka_unit_test(e_is_sqz_digit_or_exponent),
		cmocka_unit_test(dup_after_ycheck_repeats_the_value),
		cmocka_unit_test(header_checks_warn_naming_the_label),
		cmocka_unit_test(line_endings),
		cmocka_unit_test(xypoints_and_peak_table),
		cmocka_unit_test(link_file_blocks),
		cmocka_unit_test(bad_input_fails_with_file_and_line),
		cmocka_unit_test(record_flood_hits_the_limit),
		cmocka_unit_test(binary_and_truncated_shared_file),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
