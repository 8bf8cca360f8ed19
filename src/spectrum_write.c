/* spectrum_write.c: writes a spectrum as a JCAMP-DX 4.24 block (AFFN or
 * SQZ/DIF/DUP ordinates; McDonald & Wilks, "JCAMP-DX: A Standard Form for
 * Exchange of Infrared Spectra in Computer Readable Form", Appl. Spectrosc.
 * 42 (1988) 151-162) or as a two-column CSV file. */
#include "irrecon/spectrum_write.h"
#include "buf.h"

#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* JCAMP-DX 4.24 keeps data lines to 80 characters. */
#define LINE_MAX_CHARS 80


/* A decimal with at most `decimals` places, trailing zeros dropped. */
static void fmt_trim(char *buf, size_t size, double v, int decimals)
{
	char *dot;
	size_t n;
	irr_format_double(buf, size, v, decimals);
	dot = strchr(buf, '.');
	if (!dot)
		return;
	n = strlen(buf);
	while (n > 0 && buf[n - 1] == '0')
		buf[--n] = '\0';
	if (n > 0 && buf[n - 1] == '.')
		buf[--n] = '\0';
	if (!strcmp(buf, "-0"))
		strcpy(buf, "0");
}

static void wb_num(irr_buf *b, double v, int decimals)
{
	char tmp[64];
	fmt_trim(tmp, sizeof tmp, v, decimals);
	irr_buf__str(b, tmp);
}

void irr_write_options_init(irr_write_options *o)
{
	memset(o, 0, sizeof *o);
	o->y_units = IRR_Y_UNKNOWN;
	o->form = IRR_JCAMP_DIFDUP;
	o->descending = 1;
	o->y_decimals = 6;
}

/* The ordinates converted to the target units, in file order (malloc'd). */
static int prepare(const irr_spectrum *s, const irr_write_options *o,
                   int allow_percent, double **xo, double **yo,
                   irr_yunits *units, irr_error *err)
{
	size_t n = irr_spectrum_points(s);
	const double *x = irr_spectrum_x(s), *y = irr_spectrum_y(s);
	const char *name = irr_spectrum_name(s) ? irr_spectrum_name(s) : "";
	irr_yunits from = irr_spectrum_y_units(s);
	irr_yunits to = o->y_units == IRR_Y_UNKNOWN ? from : o->y_units;
	int reverse;
	double *xs, *ys;

	*xo = *yo = NULL;
	if (n < 2)
		return irr_error_set(err, IRR_EINPUT, name, 0,
		                     "a spectrum needs at least 2 points to be written (has %zu)", n);
	if (to == IRR_Y_PERCENT_T && !allow_percent)
		return irr_error_set(err, IRR_EINPUT, name, 0,
		                     "JCAMP-DX is written as absorbance or transmittance (fraction), not percent");
	if (from != to) {
		int fa = from == IRR_Y_ABSORBANCE, ft = from == IRR_Y_TRANSMITTANCE || from == IRR_Y_PERCENT_T;
		int ta = to == IRR_Y_ABSORBANCE, tt = to == IRR_Y_TRANSMITTANCE || to == IRR_Y_PERCENT_T;
		if (!((fa || ft) && (ta || tt)))
			return irr_error_set(err, IRR_EINPUT, name, 0,
			                     "cannot convert %s to %s", irr_yunits_name(from),
			                     irr_yunits_name(to));
	}
	xs = malloc(n * sizeof *xs);
	ys = malloc(n * sizeof *ys);
	if (!xs || !ys) {
		free(xs);
		free(ys);
		return irr_error_set(err, IRR_ENOMEM, name, 0, "out of memory");
	}
	reverse = (x[n - 1] > x[0]) == (o->descending != 0);
	for (size_t i = 0; i < n; i++) {
		size_t j = reverse ? n - 1 - i : i;
		double v = y[j], t;
		if (!isfinite(x[j]) || !isfinite(v)) {
			free(xs);
			free(ys);
			return irr_error_set(err, IRR_EINPUT, name, 0,
			                     "point %zu is not a finite number", j + 1);
		}
		if (from != to) {
			/* Through fractional transmittance: T = 10^-A (Beer-Lambert). */
			t = from == IRR_Y_ABSORBANCE ? pow(10.0, -v)
			    : from == IRR_Y_PERCENT_T ? v / 100.0 : v;
			if (to == IRR_Y_ABSORBANCE) {
				if (t <= 0.0) {
					char xb[40];
					fmt_trim(xb, sizeof xb, x[j], 4);
					free(xs);
					free(ys);
					return irr_error_set(err, IRR_EINPUT, name, 0,
					                     "transmittance <= 0 at %s cm-1 has no absorbance", xb);
				}
				v = -log10(t);
			} else {
				v = to == IRR_Y_PERCENT_T ? 100.0 * t : t;
			}
		}
		xs[i] = x[j];
		ys[i] = v;
	}
	for (size_t i = 1; i < n; i++)
		if (!((xs[i] - xs[i - 1]) * (xs[1] - xs[0]) > 0.0)) {
			free(xs);
			free(ys);
			return irr_error_set(err, IRR_EINPUT, name, 0,
			                     "X is not strictly monotonic at point %zu", i + 1);
		}
	*xo = xs;
	*yo = ys;
	*units = to;
	return IRR_OK;
}

static const char *csv_units(irr_yunits u)
{
	switch (u) {
	case IRR_Y_ABSORBANCE: return "absorbance";
	case IRR_Y_TRANSMITTANCE: return "transmittance";
	case IRR_Y_PERCENT_T: return "percent_transmittance";
	default: return irr_yunits_name(u);
	}
}

static const char *jcamp_units(irr_yunits u)
{
	switch (u) {
	case IRR_Y_ABSORBANCE: return "ABSORBANCE";
	case IRR_Y_TRANSMITTANCE: return "TRANSMITTANCE";
	case IRR_Y_REFLECTANCE: return "REFLECTANCE";
	case IRR_Y_KUBELKA_MUNK: return "KUBELKA-MUNK";
	default: return "ARBITRARY UNITS";
	}
}

static int finish(irr_buf *b, char **out, size_t *len, const char *name, irr_error *err)
{
	if (b->oom) {
		free(b->p);
		return irr_error_set(err, IRR_ENOMEM, name, 0, "out of memory");
	}
	*out = b->p;
	if (len)
		*len = b->len;
	return IRR_OK;
}

static int clamp_decimals(int d)
{
	return d < 1 ? 6 : d > 9 ? 9 : d;
}

int irr_spectrum_write_csv(char **out, size_t *len, const irr_spectrum *s,
                           const irr_write_options *o, irr_error *err)
{
	irr_write_options def;
	double *x, *y;
	irr_yunits units;
	irr_buf b = {0};
	size_t n;
	int rc, dec;

	*out = NULL;
	if (len)
		*len = 0;
	if (!o) {
		irr_write_options_init(&def);
		o = &def;
	}
	if ((rc = prepare(s, o, 1, &x, &y, &units, err)) != IRR_OK)
		return rc;
	dec = clamp_decimals(o->y_decimals);
	n = irr_spectrum_points(s);
	irr_buf__printf(&b, "wavenumber_cm-1,%s\n", csv_units(units));
	for (size_t i = 0; i < n; i++) {
		wb_num(&b, x[i], 6);
		irr_buf__str(&b, ",");
		wb_num(&b, y[i], dec);
		irr_buf__str(&b, "\n");
	}
	free(x);
	free(y);
	return finish(&b, out, len, irr_spectrum_name(s), err);
}

/* SQZ, DIF and DUP forms of JCAMP-DX 4.24 (Table 2 of McDonald & Wilks):
 * the sign and first digit of a number fold into one letter; SQZ uses
 * @, A-I, a-i and DIF %, J-R, j-r. */
static size_t enc_folded(char *buf, long v, char zero, char pos1, char neg1)
{
	char d[24];
	size_t n;
	if (v == 0) {
		buf[0] = zero;
		buf[1] = '\0';
		return 1;
	}
	n = (size_t)snprintf(d, sizeof d, "%ld", v < 0 ? -v : v);
	buf[0] = (char)((v > 0 ? pos1 : neg1) + (d[0] - '1'));
	memcpy(buf + 1, d + 1, n);
	return n;
}

static size_t enc_sqz(char *buf, long v)
{
	return enc_folded(buf, v, '@', 'A', 'a');
}

static size_t enc_dif(char *buf, long v)
{
	return enc_folded(buf, v, '%', 'J', 'j');
}

/* DUP counts the value itself: "A5U" is 15 three times. S..Z = 1..8, s = 9. */
static size_t enc_dup(char *buf, long count)
{
	char d[24];
	size_t n = (size_t)snprintf(d, sizeof d, "%ld", count);
	buf[0] = d[0] == '9' ? 's' : (char)('S' + (d[0] - '1'));
	memcpy(buf + 1, d + 1, n);
	return n;
}

static void put_x(irr_buf *b, double x)
{
	/* XFACTOR is 1: the abscissa is written as a plain decimal. */
	wb_num(b, x, 6);
}

/* (X++(Y..Y)) lines in AFFN: "X y y y ..." up to 80 characters. */
static void write_affn(irr_buf *b, const double *x, const long *yi, size_t n)
{
	size_t i = 0;
	while (i < n) {
		char line[LINE_MAX_CHARS + 32], xs[48];
		size_t ll;
		fmt_trim(xs, sizeof xs, x[i], 6);
		ll = (size_t)snprintf(line, sizeof line, "%s", xs);
		do {
			char tok[32];
			size_t tl = (size_t)snprintf(tok, sizeof tok, " %ld", yi[i]);
			if (ll + tl > LINE_MAX_CHARS && ll > strlen(xs))
				break;
			memcpy(line + ll, tok, tl + 1);
			ll += tl;
			i++;
		} while (i < n);
		irr_buf__add(b, line, ll);
		irr_buf__str(b, "\n");
	}
}

/* (X++(Y..Y)) lines in DIF/DUP with the Y-check: every line after the first
 * starts with the last ordinate of the line before, as an absolute (SQZ)
 * value, and a last line holds only the final point, so a reader can verify
 * that no difference was lost (JCAMP-DX 4.24, section on DIF form). */
static void write_difdup(irr_buf *b, const double *x, const long *yi, size_t n)
{
	size_t i = 0; /* first point of the current line */
	for (;;) {
		char line[LINE_MAX_CHARS + 64], xs[48], tok[64];
		size_t ll, j;
		fmt_trim(xs, sizeof xs, x[i], 6);
		ll = (size_t)snprintf(line, sizeof line, "%s", xs);
		ll += enc_sqz(line + ll, yi[i]);
		j = i; /* last point written on this line */
		while (j + 1 < n) {
			long d = yi[j + 1] - yi[j];
			size_t run = 1, tl, k;
			while (j + 1 + run < n && yi[j + 1 + run] - yi[j + run] == d)
				run++;
			/* Take as much of the run as fits on the line. */
			for (k = run; k >= 1; k--) {
				tl = enc_dif(tok, d);
				if (k > 1)
					tl += enc_dup(tok + tl, (long)k);
				if (ll + tl <= LINE_MAX_CHARS)
					break;
			}
			if (k == 0)
				break;
			memcpy(line + ll, tok, tl);
			ll += tl;
			j += k;
			if (k < run)
				break;
		}
		irr_buf__add(b, line, ll);
		irr_buf__str(b, "\n");
		if (j + 1 >= n) {
			if (j > i) {
				/* The closing Y-check line. */
				fmt_trim(xs, sizeof xs, x[j], 6);
				irr_buf__str(b, xs);
				enc_sqz(tok, yi[j]);
				irr_buf__str(b, tok);
				irr_buf__str(b, "\n");
			}
			break;
		}
		i = j;
	}
}

/* A header value on one line: no line breaks, no "##" that would start a
 * new label, at most `max` characters. */
static void put_label(irr_buf *b, const char *label, const char *value, size_t max)
{
	char v[96];
	size_t k = 0;
	if (max > sizeof v - 1)
		max = sizeof v - 1;
	for (const char *p = value ? value : ""; *p && k < max; p++) {
		char c = *p;
		if (c == '\r' || c == '\n' || c == '\t')
			c = ' ';
		if (c == '#' && p[1] == '#')
			c = ' ';
		if ((unsigned char)c < 0x20)
			continue;
		v[k++] = c;
	}
	v[k] = '\0';
	irr_buf__printf(b, "##%s=%s\n", label, v);
}

int irr_spectrum_write_jcamp(char **out, size_t *len, const irr_spectrum *s,
                             const irr_write_options *o, irr_error *err)
{
	irr_write_options def;
	double *x, *y, yfactor, maxy, miny, deltax;
	long *yi = NULL;
	irr_yunits units;
	irr_buf b = {0};
	size_t n;
	int rc, dec, even = 1;
	const char *name = irr_spectrum_name(s) ? irr_spectrum_name(s) : "";
	const char *title;

	*out = NULL;
	if (len)
		*len = 0;
	if (!o) {
		irr_write_options_init(&def);
		o = &def;
	}
	if ((rc = prepare(s, o, 0, &x, &y, &units, err)) != IRR_OK)
		return rc;
	n = irr_spectrum_points(s);
	dec = clamp_decimals(o->y_decimals);
	maxy = miny = y[0];
	for (size_t i = 1; i < n; i++) {
		if (y[i] > maxy)
			maxy = y[i];
		if (y[i] < miny)
			miny = y[i];
	}
	/* Ordinates are written as integers times YFACTOR = 10^-dec; fewer
	 * decimals when the largest value would not fit a 32-bit integer,
	 * which is what many readers hold them in. */
	while (dec > 0 && fmax(fabs(maxy), fabs(miny)) * pow(10.0, dec) > 2.0e9)
		dec--;
	if (fmax(fabs(maxy), fabs(miny)) * pow(10.0, dec) > 2.0e9) {
		free(x);
		free(y);
		return irr_error_set(err, IRR_EINPUT, name, 0,
		                     "ordinates too large for JCAMP-DX integers");
	}
	yfactor = pow(10.0, -dec);
	yi = malloc(n * sizeof *yi);
	if (!yi) {
		free(x);
		free(y);
		return irr_error_set(err, IRR_ENOMEM, name, 0, "out of memory");
	}
	for (size_t i = 0; i < n; i++)
		yi[i] = lround(y[i] * pow(10.0, dec));
	deltax = (x[n - 1] - x[0]) / (double)(n - 1);
	for (size_t i = 1; i < n && even; i++)
		if (fabs(x[i] - (x[0] + deltax * (double)i)) > 1e-4 * fabs(deltax))
			even = 0;

	title = o->title ? o->title
	      : irr_spectrum_title(s) && irr_spectrum_title(s)[0] ? irr_spectrum_title(s)
	      : name;
	put_label(&b, "TITLE", title && title[0] ? title : "untitled", 70);
	irr_buf__str(&b, "##JCAMP-DX=4.24\n");
	irr_buf__str(&b, "##DATA TYPE=INFRARED SPECTRUM\n");
	put_label(&b, "ORIGIN", o->origin ? o->origin : "irrecon", 70);
	put_label(&b, "OWNER", o->owner ? o->owner : "unknown", 70);
	irr_buf__str(&b, "##XUNITS=1/CM\n");
	irr_buf__printf(&b, "##YUNITS=%s\n", jcamp_units(units));
	irr_buf__str(&b, "##XFACTOR=1\n");
	irr_buf__str(&b, "##YFACTOR=");
	wb_num(&b, yfactor, dec);
	irr_buf__str(&b, "\n##FIRSTX=");
	wb_num(&b, x[0], 6);
	irr_buf__str(&b, "\n##LASTX=");
	wb_num(&b, x[n - 1], 6);
	if (even) {
		irr_buf__str(&b, "\n##DELTAX=");
		wb_num(&b, deltax, 6);
	}
	irr_buf__str(&b, "\n##MAXY=");
	wb_num(&b, (double)lround(maxy * pow(10.0, dec)) * yfactor, dec);
	irr_buf__str(&b, "\n##MINY=");
	wb_num(&b, (double)lround(miny * pow(10.0, dec)) * yfactor, dec);
	irr_buf__printf(&b, "\n##NPOINTS=%zu\n", n);
	irr_buf__str(&b, "##FIRSTY=");
	wb_num(&b, (double)yi[0] * yfactor, dec);
	irr_buf__str(&b, "\n");
	if (o->comment && o->comment[0]) {
		char c[LINE_MAX_CHARS - 2];
		size_t k = 0;
		for (const char *p = o->comment; *p && k < sizeof c - 1; p++)
			c[k++] = (*p == '\n' || *p == '\r' || (unsigned char)*p < 0x20) ? ' ' : *p;
		c[k] = '\0';
		irr_buf__printf(&b, "$$ %s\n", c);
	}
	if (even) {
		irr_buf__str(&b, "##XYDATA=(X++(Y..Y))\n");
		if (o->form == IRR_JCAMP_AFFN)
			write_affn(&b, x, yi, n);
		else
			write_difdup(&b, x, yi, n);
	} else {
		irr_buf__str(&b, "##XYPOINTS=(XY..XY)\n");
		for (size_t i = 0; i < n; i++) {
			put_x(&b, x[i]);
			irr_buf__printf(&b, ", %ld\n", yi[i]);
		}
	}
	irr_buf__str(&b, "##END=\n");
	free(x);
	free(y);
	free(yi);
	return finish(&b, out, len, name, err);
}
