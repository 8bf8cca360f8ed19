/* csvread.c: reader for two-column spectrum exports (CSV, semicolon, tab or
 * whitespace separated): detects the delimiter and a header line, takes the
 * units from the header (or the options), accepts decimal commas only when
 * asked, skips '#' comment lines. */
#include "irrecon/spectrum.h"
#include "jcamp.h"

#include <ctype.h>
#include <stdlib.h>
#include <string.h>

/* Metadata lines allowed before the data (instrument exports write a
 * dozen or so: sample, date, resolution, scans). */
#define MAX_HEADER_LINES 100

#define DECIMAL_COMMA_HINT "if the file uses decimal commas, read it with the decimal-comma option (--decimal-comma)"

typedef struct line_ref {
	const char *p;
	size_t len;
	long no;
} line_ref;

/* Next line from *pos: \n, \r\n or a lone \r ends it. */
static int next_line(const char *data, size_t len, size_t *pos, long *no, line_ref *out)
{
	size_t i = *pos, j;
	if (i >= len)
		return 0;
	j = i;
	while (j < len && data[j] != '\n' && data[j] != '\r')
		j++;
	out->p = data + i;
	out->len = j - i;
	out->no = ++*no;
	if (j < len && data[j] == '\r' && j + 1 < len && data[j + 1] == '\n')
		j++;
	*pos = j < len ? j + 1 : j;
	return 1;
}

static void trim(const char **p, size_t *len)
{
	while (*len && (**p == ' ' || **p == '\t'))
		(*p)++, (*len)--;
	while (*len && ((*p)[*len - 1] == ' ' || (*p)[*len - 1] == '\t'))
		(*len)--;
}

static int is_blank_or_comment(const line_ref *l)
{
	const char *p = l->p;
	size_t n = l->len;
	/* A UTF-8 byte order mark on the first line is not content. */
	if (n >= 3 && (unsigned char)p[0] == 0xEF && (unsigned char)p[1] == 0xBB &&
	    (unsigned char)p[2] == 0xBF)
		p += 3, n -= 3;
	trim(&p, &n);
	return n == 0 || p[0] == '#';
}

/* Splits a line into at most `max` fields. delim 0 = runs of blanks. */
static size_t split(const char *p, size_t len, char delim, const char **f, size_t *fl, size_t max)
{
	size_t nf = 0, i = 0;
	if (len >= 3 && (unsigned char)p[0] == 0xEF && (unsigned char)p[1] == 0xBB &&
	    (unsigned char)p[2] == 0xBF)
		i = 3;
	if (!delim) {
		while (i < len && nf < max) {
			size_t s;
			while (i < len && (p[i] == ' ' || p[i] == '\t'))
				i++;
			if (i >= len)
				break;
			s = i;
			while (i < len && p[i] != ' ' && p[i] != '\t')
				i++;
			f[nf] = p + s;
			fl[nf++] = i - s;
		}
		return nf;
	}
	while (nf < max) {
		size_t s = i;
		while (i < len && p[i] != delim)
			i++;
		f[nf] = p + s;
		fl[nf] = i - s;
		trim(&f[nf], &fl[nf]);
		/* Strip one pair of quotes, as spreadsheets write them. */
		if (fl[nf] >= 2 && f[nf][0] == '"' && f[nf][fl[nf] - 1] == '"')
			f[nf]++, fl[nf] -= 2;
		nf++;
		if (i >= len)
			break;
		i++;
	}
	/* "x,y," is two fields, not three. */
	while (nf > 0 && fl[nf - 1] == 0)
		nf--;
	return nf;
}

static int ci_contains(const char *p, size_t len, const char *needle)
{
	size_t m = strlen(needle);
	for (size_t i = 0; i + m <= len; i++) {
		size_t k = 0;
		while (k < m && tolower((unsigned char)p[i + k]) == needle[k])
			k++;
		if (k == m)
			return 1;
	}
	return 0;
}

static int ci_equal(const char *p, size_t len, const char *w)
{
	size_t m = strlen(w);
	if (len != m)
		return 0;
	for (size_t i = 0; i < m; i++)
		if (tolower((unsigned char)p[i]) != w[i])
			return 0;
	return 1;
}

static irr_yunits header_y_units(const char *p, size_t len)
{
	/* Column names that are only the quantity's symbol. */
	if (ci_equal(p, len, "a"))
		return IRR_Y_ABSORBANCE;
	if (ci_equal(p, len, "t"))
		return IRR_Y_TRANSMITTANCE;
	if (ci_equal(p, len, "r"))
		return IRR_Y_REFLECTANCE;
	if (ci_contains(p, len, "%t") || ci_contains(p, len, "percent") ||
	    ci_contains(p, len, "% t") || ci_contains(p, len, "(%)") || ci_contains(p, len, "[%]"))
		return IRR_Y_PERCENT_T;
	if (ci_contains(p, len, "kubelka") || ci_contains(p, len, "k-m"))
		return IRR_Y_KUBELKA_MUNK;
	if (ci_contains(p, len, "transm"))
		return IRR_Y_TRANSMITTANCE;
	if (ci_contains(p, len, "absorb") || ci_contains(p, len, "abs"))
		return IRR_Y_ABSORBANCE;
	if (ci_contains(p, len, "reflect"))
		return IRR_Y_REFLECTANCE;
	if (ci_contains(p, len, "arb") || ci_contains(p, len, "a.u."))
		return IRR_Y_ARBITRARY;
	return IRR_Y_UNKNOWN;
}

/* `needle` as a unit token: not inside a longer word ("um" in "spectrum"
 * is not micrometres). */
static int ci_token(const char *p, size_t len, const char *needle)
{
	size_t m = strlen(needle);
	for (size_t i = 0; i + m <= len; i++) {
		size_t k = 0;
		while (k < m && tolower((unsigned char)p[i + k]) == needle[k])
			k++;
		if (k == m && (i == 0 || !isalpha((unsigned char)p[i - 1])) &&
		    (i + m == len || !isalpha((unsigned char)p[i + m])))
			return 1;
	}
	return 0;
}

/* 0 = cm-1 or not said, 1 = micrometres, -1 = nanometres (not infrared). */
static int header_x_units(const char *p, size_t len)
{
	if (ci_contains(p, len, "cm-1") || ci_contains(p, len, "cm^-1") ||
	    ci_contains(p, len, "1/cm") || ci_contains(p, len, "wavenumber"))
		return 0;
	if (ci_token(p, len, "nm") || ci_contains(p, len, "nanomet"))
		return -1;
	return ci_token(p, len, "um") || ci_contains(p, len, "\xc2\xb5m") ||
	       ci_contains(p, len, "micro") || ci_contains(p, len, "wavelength");
}

static int looks_non_finite(const char *p, size_t len)
{
	if (len && (*p == '+' || *p == '-'))
		p++, len--;
	return ci_contains(p, len < 3 ? len : 3, "nan") || ci_contains(p, len < 3 ? len : 3, "inf");
}

/* Parses one field as a whole number; 0 ok, -1 not a number. */
static int parse_field(const char *p, size_t len, int decimal_comma, double *out)
{
	char buf[64];
	char *end;
	if (len == 0 || len >= sizeof buf)
		return -1;
	memcpy(buf, p, len);
	buf[len] = '\0';
	if (decimal_comma) {
		char *c = strchr(buf, ',');
		if (c) {
			if (strchr(buf, '.') || strchr(c + 1, ','))
				return -1;
			*c = '.';
		}
	}
	if (irr_parse_double(buf, &end, out) < 0 || *end)
		return -1;
	return 0;
}

static size_t count_fields(const char *p, size_t len, char delim)
{
	size_t n = 1;
	for (size_t i = 0; i < len; i++)
		n += p[i] == delim;
	return n;
}

static int starts_like_number(const char *p, size_t len)
{
	if (len && (*p == '+' || *p == '-'))
		p++, len--;
	if (len && *p == '.')
		p++, len--;
	return len && *p >= '0' && *p <= '9';
}

static char pick_delimiter(const line_ref *l, int decimal_comma)
{
	if (memchr(l->p, '\t', l->len))
		return '\t';
	if (memchr(l->p, ';', l->len))
		return ';';
	if (!decimal_comma && memchr(l->p, ',', l->len))
		return ',';
	return 0;
}

/* The reader; with `prefix` set, `data` is only the first part of the
 * input: its lines are checked and nothing is built. */
static int csv_read(irr_spectrum **out, const char *data, size_t len, const char *name,
                    const irr_read_options *o, irr_error *err, int prefix)
{
	size_t pos = 0, cap, n = 0, max_points = irr_spectrum__max_points(o);
	long no = 0, last_no = 0;
	line_ref l;
	double *x = NULL, *y = NULL;
	long *lines = NULL;
	irr_spectrum *s = NULL;
	irr_yunits hdr_units = IRR_Y_UNKNOWN;
	int hdr_um = 0, have_header = 0, delim_known = 0, warned_cols = 0, rc = IRR_OK;
	int decimal_comma = o ? o->decimal_comma : 0;
	char delim = 0, hdr_delim = 0;
	line_ref hdr = {NULL, 0, 0};

	*out = NULL;
	/* Start small and grow: a huge file that fails on its second line
	 * should cost nothing. Growth stops at the point limit. */
	cap = 1024;
	x = malloc(cap * sizeof *x);
	y = malloc(cap * sizeof *y);
	lines = malloc(cap * sizeof *lines);
	if (!x || !y || !lines) {
		rc = irr_spectrum__fail(err, IRR_ENOMEM, name, 0, "out of memory");
		goto done;
	}

	while (next_line(data, len, &pos, &no, &l)) {
		const char *f[3];
		size_t fl[3], nf;
		double vx, vy;
		last_no = l.no;
		if (is_blank_or_comment(&l))
			continue;
		if (!delim_known) {
			delim = pick_delimiter(&l, decimal_comma);
			delim_known = 1;
		}
		nf = split(l.p, l.len, delim, f, fl, 3);
		/* A line is a header when its first field is words, not a
		 * number that fails to parse ("4000,5" is a decimal comma). */
		if (n == 0 && nf >= 1 && !starts_like_number(f[0], fl[0]) &&
		    parse_field(f[0], fl[0], decimal_comma, &vx) < 0 && !looks_non_finite(f[0], fl[0])) {
			/* Lines before the data: instrument metadata, then the
			 * column names. A text with no numbers in its first lines
			 * is not a spectrum export (and fails before a huge file
			 * is read in full). */
			if (++have_header > MAX_HEADER_LINES) {
				rc = irr_spectrum__fail(err, IRR_EINPUT, name, l.no,
				                        "no X,Y pair of numbers in the first %d lines: not a two-column spectrum export",
				                        MAX_HEADER_LINES);
				goto done;
			}
			hdr = l;
			hdr_delim = delim;
			/* The data may use another delimiter than the header
			 * ("wavenumber absorbance" over "1000,0.1"). */
			delim_known = 0;
			continue;
		}
		if (n == 0 && have_header) {
			/* The last line before the data names the columns and
			 * perhaps the units. */
			const char *hf[3];
			size_t hfl[3], hn = split(hdr.p, hdr.len, hdr_delim, hf, hfl, 3);
			if (hn >= 1) {
				hdr_um = header_x_units(hf[0], hfl[0]);
				if (hdr_um < 0) {
					rc = irr_spectrum__fail(err, IRR_EINPUT, name, hdr.no,
					                        "X column '%.*s' is in nanometres: not an infrared axis (cm-1 or micrometres)",
					                        (int)(hfl[0] > 60 ? 60 : hfl[0]), hf[0]);
					goto done;
				}
			}
			if (hn >= 2)
				hdr_units = header_y_units(hf[1], hfl[1]);
		}
		if (nf < 2) {
			rc = irr_spectrum__fail(err, IRR_EINPUT, name, l.no,
			                   "expected two columns (X and Y), found %zu%s%s", nf,
			                   (!decimal_comma && memchr(l.p, ',', l.len)) ? "; " : "",
			                   (!decimal_comma && memchr(l.p, ',', l.len)) ? DECIMAL_COMMA_HINT : "");
			goto done;
		}
		if (nf > 2)
			warned_cols = delim == ',' && !decimal_comma && count_fields(l.p, l.len, ',') == 4 ? 2 : 1;
		for (int k = 0; k < 2; k++) {
			double *dst = k ? &vy : &vx;
			if (parse_field(f[k], fl[k], decimal_comma, dst) < 0) {
				int comma = !decimal_comma && (memchr(f[k], ',', fl[k]) ||
				                               (delim == ',' && nf > 2));
				int len_show = fl[k] > 40 ? 40 : (int)fl[k];
				if (looks_non_finite(f[k], fl[k]))
					rc = irr_spectrum__fail(err, IRR_EINPUT, name, l.no,
					                   "%s value '%.*s' is not a finite number (NaN or infinity)",
					                   k ? "Y" : "X", len_show, f[k]);
				else
					rc = irr_spectrum__fail(err, IRR_EINPUT, name, l.no,
					                   "%s value '%.*s' is not a number%s%s",
					                   k ? "Y" : "X", len_show, f[k],
					                   comma ? "; " : "", comma ? DECIMAL_COMMA_HINT : "");
				goto done;
			}
		}
		if (n >= max_points) {
			rc = irr_spectrum__fail(err, IRR_ELIMIT, name, l.no,
			                   "more than %zu points (the limit)", max_points);
			goto done;
		}
		if (n == cap) {
			size_t nc = cap * 2 > max_points ? max_points : cap * 2;
			double *nx = realloc(x, nc * sizeof *x);
			double *ny = nx ? realloc(y, nc * sizeof *y) : NULL;
			long *nl = ny ? realloc(lines, nc * sizeof *lines) : NULL;
			if (nx)
				x = nx;
			if (ny)
				y = ny;
			if (nl)
				lines = nl;
			if (!nl)
				goto nomem;
			cap = nc;
		}
		x[n] = vx;
		y[n] = vy;
		lines[n] = l.no;
		n++;
	}
	if (prefix) {
		rc = IRR_OK;
		goto done;
	}
	if (n == 0) {
		rc = irr_spectrum__fail(err, IRR_EINPUT, name, last_no ? last_no : 1,
		                   "no data points: %s", len == 0 ? "the file is empty"
		                   : "no line holds an X,Y pair of numbers");
		goto done;
	}
	if ((rc = irr_spectrum__create(&s, 0, name, "csv", err)) < 0)
		goto done;
	irr_spectrum__adopt(s, x, y, n);
	x = y = NULL;
	if ((rc = irr_spectrum__check_xy(s, lines, err)) < 0)
		goto done;
	if (warned_cols &&
	    (rc = irr_spectrum__warn(s, "more than two columns: X and Y taken from the first two%s",
	                             warned_cols == 2 ? " (four comma-separated fields: "
	                                                DECIMAL_COMMA_HINT ")" : "")) < 0)
		goto nomem;
	s->x_micrometers = hdr_um || (o && o->x_micrometers);
	if (o && o->y_units != IRR_Y_UNKNOWN) {
		s->units = o->y_units;
		if (hdr_units != IRR_Y_UNKNOWN && hdr_units != o->y_units &&
		    (rc = irr_spectrum__warn(s, "the header says Y is %s; read as %s as asked",
		                             irr_yunits_name(hdr_units), irr_yunits_name(o->y_units))) < 0)
			goto nomem;
	} else {
		s->units = hdr_units;
	}
	s->source_units = s->units;
	s->first_x = s->x[0];
	s->last_x = s->x[n - 1];
	*out = s;
	s = NULL;
	rc = IRR_OK;
	goto done;
nomem:
	rc = irr_spectrum__fail(err, IRR_ENOMEM, name, 0, "out of memory");
done:
	free(x);
	free(y);
	free(lines);
	irr_spectrum_free(s);
	return rc;
}

int irr_csv__read(irr_spectrum **out, const char *data, size_t len,
                  const char *name, const irr_read_options *o, irr_error *err)
{
	return csv_read(out, data, len, name, o, err, 0);
}

int irr_csv__check_prefix(const char *data, size_t len, const char *name,
                          const irr_read_options *o, irr_error *err)
{
	irr_spectrum *s = NULL;
	return csv_read(&s, data, len, name, o, err, 1);
}
