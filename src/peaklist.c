/* peaklist.c: reads peak lists that users already have, as CSV/TSV
 * (position[,intensity[,width]]) or JSON, into an irr_peaklist.
 *
 * CSV: one band per line; ',', ';', tab or blanks between fields (the first
 * data line decides); '#' starts a comment; an optional header line (first
 * field not a number); intensity a number (bigger = stronger: absorbance or
 * any relative scale; transmittance when the header names the column so)
 * or a class (s, m, w, vs, vw, strong, medium, weak);
 * width the FWHM in cm-1. The measured range is a line "range,LO,HI" or a
 * comment "# range: LO HI" (or LO-HI); 400-4000 cm-1 otherwise.
 *
 * JSON: an array of numbers or of objects {"position", "intensity",
 * "width" (or "fwhm"), "height"}, or an object {"range": [lo, hi],
 * "peaks": [...]}; irrecon's own "irrecon.peaks/1" output reads back too.
 * A small parser of our own is used (not cJSON) so that every error can
 * name the line of the value it is about. */
#include "peakpick.h"

#include <errno.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <strings.h>

#define MAX_LIST_BYTES ((size_t)64 * 1024 * 1024)
#define MAX_DEPTH 32
/* A measured spectrum shows tens of bands, rarely more than a few hundred;
 * the matching downstream grows faster than linearly with the count, so a
 * longer list is refused rather than run for minutes. */
#define MAX_LIST_PEAKS 10000
/* The most plausible band positions; beyond them a number is a typo or a
 * wavelength. */
#define POS_MIN 10.0
#define POS_MAX 15000.0

/* rel_height given to bands whose intensity is only a class: the middle of
 * the class's span under the default thresholds (peaks.h). */
static double class_rel_height(irr_intensity c)
{
	switch (c) {
	case IRR_INT_STRONG: return 1.0;
	case IRR_INT_MEDIUM: return 0.2;
	case IRR_INT_WEAK: return 0.05;
	default: return 0.0;
	}
}

static int parse_class(const char *s, irr_intensity *out)
{
	static const struct { const char *name; irr_intensity v; } names[] = {
		{"s", IRR_INT_STRONG}, {"vs", IRR_INT_STRONG}, {"m", IRR_INT_MEDIUM},
		{"w", IRR_INT_WEAK}, {"vw", IRR_INT_WEAK}, {"var", IRR_INT_VARIABLE},
		{"v", IRR_INT_VARIABLE}, {"very strong", IRR_INT_STRONG},
		{"very weak", IRR_INT_WEAK},
	};
	for (size_t i = 0; i < sizeof names / sizeof names[0]; i++)
		if (!strcasecmp(s, names[i].name)) {
			*out = names[i].v;
			return IRR_OK;
		}
	if (irr_intensity_parse(s, out) == IRR_OK && *out != IRR_INT_NONE)
		return IRR_OK;
	return IRR_EINPUT;
}

/* Finishes a list: range check, classes, order. */
static int finish(irr_peaklist *pl, const long *lines, const char *name, irr_error *err)
{
	irr_peak_options o;
	if (pl->count == 0)
		return irr_error_set(err, IRR_EINPUT, name, 0,
		                     "the peak list is empty (no line holds a peak position)");
	for (size_t i = 0; i < pl->count; i++) {
		double p = pl->peaks[i].position;
		if (p < pl->range_low || p > pl->range_high)
			return irr_error_set(err, IRR_EINPUT, name, lines[i],
			                     "peak at %.2f cm-1 lies outside the stated range %.1f-%.1f",
			                     p, pl->range_low, pl->range_high);
	}
	irr_peak_options_init(&o);
	irr_peaks__classify(pl, &o);
	irr_peaks__sort(pl);
	return IRR_OK;
}

static int add_peak(irr_peaklist *pl, long **lines, size_t *lcap, long line,
                    double pos, int has_int, double inum, irr_intensity icls,
                    double width, const char *name, irr_error *err)
{
	irr_peak p;
	if (!(pos >= POS_MIN && pos <= POS_MAX))
		return irr_error_set(err, IRR_EINPUT, name, line,
		                     "position %g is not a wavenumber in cm-1 (%g-%g)", pos, POS_MIN, POS_MAX);
	if (width < 0.0 || width > 5000.0)
		return irr_error_set(err, IRR_EINPUT, name, line, "width %g cm-1 is not plausible", width);
	memset(&p, 0, sizeof p);
	p.position = pos;
	p.low = p.high = pos;
	if (width > 0.0) {
		p.fwhm = width;
		p.low = pos - 0.5 * width;
		p.high = pos + 0.5 * width;
	}
	if (has_int == 1) {
		if (!(inum >= 0.0))
			return irr_error_set(err, IRR_EINPUT, name, line,
			                     "intensity %g is negative (give band heights, bigger = stronger)", inum);
		p.height = inum;
	} else if (has_int == 2) {
		p.intensity = icls;
		p.rel_height = class_rel_height(icls);
	}
	if (pl->count >= MAX_LIST_PEAKS)
		return irr_error_set(err, IRR_ELIMIT, name, line,
		                     "more than %d peaks: over the limit for a peak list", MAX_LIST_PEAKS);
	if (pl->count == *lcap) {
		size_t nc = *lcap ? 2 * *lcap : 64;
		long *nl = realloc(*lines, nc * sizeof *nl);
		if (!nl)
			return irr_error_set(err, IRR_ENOMEM, name, line, "out of memory");
		*lines = nl;
		*lcap = nc;
	}
	(*lines)[pl->count] = line;
	if (irr_peaks__push(pl, &p) != IRR_OK)
		return irr_error_set(err, IRR_ENOMEM, name, line, "out of memory");
	return IRR_OK;
}

/* ---- CSV ------------------------------------------------------------------ */

static char *trim(char *s)
{
	char *e;
	while (*s == ' ' || *s == '\t')
		s++;
	e = s + strlen(s);
	while (e > s && (e[-1] == ' ' || e[-1] == '\t'))
		*--e = '\0';
	/* Quoted fields from spreadsheets. */
	if (e - s >= 2 && s[0] == '"' && e[-1] == '"') {
		e[-1] = '\0';
		s++;
	}
	return s;
}

static int whole_number(const char *s, double *v)
{
	char *end;
	if (irr_parse_double(s, &end, v) != IRR_OK)
		return 0;
	while (*end == ' ' || *end == '\t')
		end++;
	return *end == '\0';
}

/* Splits line in place on delim (' ' = runs of blanks); returns field count
 * (at most max). */
static int split(char *line, char delim, char **f, int max)
{
	int n = 0;
	char *p = line;
	if (delim == ' ') {
		while (*p) {
			while (*p == ' ' || *p == '\t')
				p++;
			if (!*p)
				break;
			if (n == max)
				return max + 1;
			f[n++] = p;
			while (*p && *p != ' ' && *p != '\t')
				p++;
			if (*p)
				*p++ = '\0';
		}
		return n;
	}
	for (;;) {
		char *q = strchr(p, delim);
		if (n == max)
			return max + 1;
		f[n++] = p;
		if (!q)
			break;
		*q = '\0';
		p = q + 1;
	}
	for (int i = 0; i < n; i++)
		f[i] = trim(f[i]);
	return n;
}

/* "LO HI", "LO-HI", "LO,HI", "LO to HI" after "range". */
static int parse_range_text(const char *s, double *lo, double *hi)
{
	char *end;
	while (*s == ' ' || *s == '\t' || *s == ':' || *s == '=' || *s == ',' || *s == ';')
		s++;
	if (irr_parse_double(s, &end, lo) != IRR_OK)
		return IRR_EINPUT;
	s = end;
	while (*s == ' ' || *s == '\t' || *s == ',' || *s == ';' || *s == '-')
		s++;
	if (!strncasecmp(s, "to", 2))
		s += 2;
	if (irr_parse_double(s, &end, hi) != IRR_OK)
		return IRR_EINPUT;
	s = end;
	while (*s == ' ' || *s == '\t')
		s++;
	if (!strncasecmp(s, "cm-1", 4))
		s += 4;
	while (*s == ' ' || *s == '\t')
		s++;
	return *s ? IRR_EINPUT : IRR_OK;
}

static int set_range(irr_peaklist *pl, double a, double b, const char *name, long line,
                     irr_error *err)
{
	double lo = a < b ? a : b, hi = a < b ? b : a;
	if (!(lo >= POS_MIN && hi <= POS_MAX && hi > lo))
		return irr_error_set(err, IRR_EINPUT, name, line,
		                     "measured range %g-%g is not a wavenumber range in cm-1", a, b);
	pl->range_low = lo;
	pl->range_high = hi;
	return IRR_OK;
}

static int read_csv(irr_peaklist *pl, char *data, size_t len, const char *name,
                    long **lines, size_t *lcap, irr_error *err)
{
	char delim = 0;
	int seen_header = 0, trans = 0;
	long line = 0;
	char *p = data, *endp = data + len;
	int rc;
	while (p < endp) {
		char *nl = memchr(p, '\n', (size_t)(endp - p));
		char *l = p, *f[8];
		int nf;
		size_t ll;
		line++;
		if (nl) {
			*nl = '\0';
			p = nl + 1;
		} else {
			p = endp;
		}
		ll = strlen(l);
		if (ll && l[ll - 1] == '\r')
			l[--ll] = '\0';
		if (line == 1 && (unsigned char)l[0] == 0xEF && (unsigned char)l[1] == 0xBB &&
		    (unsigned char)l[2] == 0xBF)
			l += 3;
		l = trim(l);
		if (!*l)
			continue;
		if (*l == '#') {
			char *c = l + 1;
			while (*c == ' ' || *c == '\t')
				c++;
			if (!strncasecmp(c, "range", 5)) {
				double a, b;
				if (parse_range_text(c + 5, &a, &b) != IRR_OK)
					return irr_error_set(err, IRR_EINPUT, name, line,
					                     "cannot read the range comment (want '# range: LO HI')");
				if ((rc = set_range(pl, a, b, name, line, err)) != IRR_OK)
					return rc;
			}
			continue;
		}
		if (!strncasecmp(l, "range", 5) && (l[5] == ',' || l[5] == ';' || l[5] == '\t' ||
		                                    l[5] == ' ' || l[5] == ':' || l[5] == '=')) {
			double a, b;
			if (parse_range_text(l + 5, &a, &b) != IRR_OK)
				return irr_error_set(err, IRR_EINPUT, name, line,
				                     "cannot read the range line (want 'range,LO,HI')");
			if ((rc = set_range(pl, a, b, name, line, err)) != IRR_OK)
				return rc;
			continue;
		}
		if (!delim)
			delim = strchr(l, '\t') ? '\t' : strchr(l, ';') ? ';' : strchr(l, ',') ? ',' : ' ';
		nf = split(l, delim, f, 3);
		if (nf == 0 || (nf == 1 && !f[0][0]))
			continue; /* blank once quotes are taken off */
		if (nf > 3)
			return irr_error_set(err, IRR_EINPUT, name, line,
			                     "more than 3 fields (want position[,intensity[,width]])");
		{
			double pos, inum = 0.0, width = 0.0;
			int has_int = 0;
			irr_intensity icls = IRR_INT_NONE;
			if (!whole_number(f[0], &pos)) {
				if (!seen_header && pl->count == 0) {
					seen_header = 1;
					/* A transmittance column (lower = stronger) is
					 * converted to absorbance at the end. */
					if (nf >= 2 && (strcasestr(f[1], "%t") || strcasestr(f[1], "transm")))
						trans = 1;
					continue;
				}
				return irr_error_set(err, IRR_EINPUT, name, line,
				                     "'%.40s' is not a number (position in cm-1)", f[0]);
			}
			if (nf >= 2 && f[1][0]) {
				if (whole_number(f[1], &inum))
					has_int = 1;
				else if (parse_class(f[1], &icls) == IRR_OK)
					has_int = 2;
				else
					return irr_error_set(err, IRR_EINPUT, name, line,
					                     "intensity '%.40s' is neither a number nor a class (s, m, w)",
					                     f[1]);
			}
			if (nf == 3 && f[2][0] && (!whole_number(f[2], &width) || width <= 0.0))
				return irr_error_set(err, IRR_EINPUT, name, line,
				                     "width '%.40s' is not a positive number (FWHM in cm-1)", f[2]);
			if (trans && has_int == 1 && !(inum > 0.0))
				return irr_error_set(err, IRR_EINPUT, name, line,
				                     "transmittance %g is not above 0", inum);
			if ((rc = add_peak(pl, lines, lcap, line, pos, has_int, inum, icls, width, name, err)) != IRR_OK)
				return rc;
		}
	}
	if (trans) {
		/* Transmittance to absorbance, A = -log10 T; percent when any
		 * value exceeds 1.5 (a fraction cannot). */
		double scale = 1.0;
		for (size_t i = 0; i < pl->count; i++)
			if (pl->peaks[i].height > 1.5)
				scale = 0.01;
		for (size_t i = 0; i < pl->count; i++) {
			irr_peak *q = &pl->peaks[i];
			if (q->height > 0.0) {
				double t = q->height * scale;
				if (t > 1.0)
					return irr_error_set(err, IRR_EINPUT, name, (*lines)[i],
					                     "transmittance %g is above 100 %%", q->height);
				q->height = -log10(t);
			}
		}
	}
	return IRR_OK;
}

/* ---- JSON ----------------------------------------------------------------- */

enum { JV_NULL, JV_FALSE, JV_TRUE, JV_NUM, JV_STR, JV_ARR, JV_OBJ };

typedef struct jv {
	int type;
	long line;
	double num;
	char *str;            /* string value */
	struct jv *kids;      /* array items or object values */
	char **keys;          /* object keys */
	size_t n;
} jv;

typedef struct jparse {
	const char *p, *end;
	long line;
	const char *name;
	irr_error *err;
} jparse;

static void jv_free(jv *v)
{
	if (!v)
		return;
	free(v->str);
	for (size_t i = 0; i < v->n; i++) {
		jv_free(&v->kids[i]);
		if (v->keys)
			free(v->keys[i]);
	}
	free(v->kids);
	free(v->keys);
}

static void jskip(jparse *j)
{
	while (j->p < j->end && (*j->p == ' ' || *j->p == '\t' || *j->p == '\n' || *j->p == '\r')) {
		if (*j->p == '\n')
			j->line++;
		j->p++;
	}
}

static int jfail(jparse *j, const char *what)
{
	return irr_error_set(j->err, IRR_EINPUT, j->name, j->line, "JSON: %s", what);
}

static int jstring(jparse *j, char **out)
{
	size_t cap = 16, n = 0;
	char *s = malloc(cap);
	if (!s)
		return irr_error_set(j->err, IRR_ENOMEM, j->name, j->line, "out of memory");
	j->p++; /* opening quote */
	for (;;) {
		char c;
		if (j->p >= j->end) {
			free(s);
			return jfail(j, "unterminated string");
		}
		c = *j->p++;
		if (c == '"')
			break;
		if ((unsigned char)c < 0x20) {
			free(s);
			return jfail(j, "control character in a string");
		}
		if (c == '\\') {
			if (j->p >= j->end) {
				free(s);
				return jfail(j, "unterminated string");
			}
			c = *j->p++;
			switch (c) {
			case '"': case '\\': case '/': break;
			case 'b': c = '\b'; break;
			case 'f': c = '\f'; break;
			case 'n': c = '\n'; break;
			case 'r': c = '\r'; break;
			case 't': c = '\t'; break;
			case 'u':
				/* Names and classes are ASCII; other characters are kept
				 * as '?', which is enough for messages. */
				for (int k = 0; k < 4; k++) {
					char h = j->p < j->end ? *j->p : 0;
					if (!((h >= '0' && h <= '9') || (h >= 'a' && h <= 'f') || (h >= 'A' && h <= 'F'))) {
						free(s);
						return jfail(j, "bad \\u escape");
					}
					j->p++;
				}
				c = '?';
				break;
			default:
				free(s);
				return jfail(j, "bad escape in a string");
			}
		}
		if (n + 2 > cap) {
			char *ns;
			if (cap > MAX_LIST_BYTES) {
				free(s);
				return jfail(j, "string too long");
			}
			ns = realloc(s, cap * 2);
			if (!ns) {
				free(s);
				return irr_error_set(j->err, IRR_ENOMEM, j->name, j->line, "out of memory");
			}
			s = ns;
			cap *= 2;
		}
		s[n++] = c;
	}
	s[n] = '\0';
	*out = s;
	return IRR_OK;
}

static int jvalue(jparse *j, jv *v, int depth)
{
	int rc;
	memset(v, 0, sizeof *v);
	jskip(j);
	v->line = j->line;
	if (j->p >= j->end)
		return jfail(j, "unexpected end of input");
	if (depth > MAX_DEPTH)
		return jfail(j, "nested too deeply");
	switch (*j->p) {
	case '{':
	case '[': {
		int obj = *j->p == '{';
		char close = obj ? '}' : ']';
		size_t cap = 0;
		v->type = obj ? JV_OBJ : JV_ARR;
		j->p++;
		jskip(j);
		if (j->p < j->end && *j->p == close) {
			j->p++;
			return IRR_OK;
		}
		for (;;) {
			char *key = NULL;
			jskip(j);
			if (obj) {
				if (j->p >= j->end || *j->p != '"')
					return jfail(j, "expected a \"key\" in an object");
				if ((rc = jstring(j, &key)) != IRR_OK)
					return rc;
				jskip(j);
				if (j->p >= j->end || *j->p != ':') {
					free(key);
					return jfail(j, "expected ':' after a key");
				}
				j->p++;
			}
			if (v->n == cap) {
				size_t nc = cap ? 2 * cap : 8;
				jv *nk = realloc(v->kids, nc * sizeof *nk);
				char **nks = NULL;
				if (nk)
					v->kids = nk;
				if (nk && obj) {
					nks = realloc(v->keys, nc * sizeof *nks);
					if (nks)
						v->keys = nks;
				}
				if (!nk || (obj && !nks)) {
					free(key);
					return irr_error_set(j->err, IRR_ENOMEM, j->name, j->line, "out of memory");
				}
				cap = nc;
			}
			if (obj)
				v->keys[v->n] = key;
			rc = jvalue(j, &v->kids[v->n], depth + 1);
			v->n++;
			if (rc != IRR_OK)
				return rc;
			jskip(j);
			if (j->p < j->end && *j->p == ',') {
				j->p++;
				continue;
			}
			if (j->p < j->end && *j->p == close) {
				j->p++;
				return IRR_OK;
			}
			return jfail(j, obj ? "expected ',' or '}'" : "expected ',' or ']'");
		}
	}
	case '"':
		v->type = JV_STR;
		return jstring(j, &v->str);
	case 't':
		if (j->end - j->p >= 4 && !memcmp(j->p, "true", 4)) {
			v->type = JV_TRUE;
			j->p += 4;
			return IRR_OK;
		}
		return jfail(j, "unexpected word");
	case 'f':
		if (j->end - j->p >= 5 && !memcmp(j->p, "false", 5)) {
			v->type = JV_FALSE;
			j->p += 5;
			return IRR_OK;
		}
		return jfail(j, "unexpected word");
	case 'n':
		if (j->end - j->p >= 4 && !memcmp(j->p, "null", 4)) {
			v->type = JV_NULL;
			j->p += 4;
			return IRR_OK;
		}
		return jfail(j, "unexpected word");
	default: {
		/* Numbers: copied out so strtod cannot run past the buffer. */
		char buf[64];
		size_t k = 0;
		char *end;
		while (j->p + k < j->end && k < sizeof buf - 1 &&
		       strchr("+-0123456789.eE", j->p[k]))
			k++;
		if (k == 0)
			return jfail(j, "unexpected character");
		memcpy(buf, j->p, k);
		buf[k] = '\0';
		if (irr_parse_double(buf, &end, &v->num) != IRR_OK || *end)
			return jfail(j, "bad number");
		v->type = JV_NUM;
		j->p += k;
		return IRR_OK;
	}
	}
}

static const jv *jget(const jv *o, const char *key)
{
	if (!o || o->type != JV_OBJ)
		return NULL;
	for (size_t i = 0; i < o->n; i++)
		if (!strcmp(o->keys[i], key))
			return &o->kids[i];
	return NULL;
}

static int json_range(irr_peaklist *pl, const jv *r, const char *name, irr_error *err)
{
	if (r->type != JV_ARR || r->n != 2 || r->kids[0].type != JV_NUM || r->kids[1].type != JV_NUM)
		return irr_error_set(err, IRR_EINPUT, name, r->line, "\"range\" must be [low, high] in cm-1");
	return set_range(pl, r->kids[0].num, r->kids[1].num, name, r->line, err);
}

static int json_peak(irr_peaklist *pl, const jv *it, const char *name, long **lines,
                     size_t *lcap, irr_error *err)
{
	double pos, width = 0.0, inum = 0.0;
	int has_int = 0, rc;
	irr_intensity icls = IRR_INT_NONE;
	const jv *v;
	if (it->type == JV_NUM)
		return add_peak(pl, lines, lcap, it->line, it->num, 0, 0.0, IRR_INT_NONE, 0.0, name, err);
	if (it->type != JV_OBJ)
		return irr_error_set(err, IRR_EINPUT, name, it->line,
		                     "a peak must be a number or an object with \"position\"");
	v = jget(it, "position");
	if (!v || v->type != JV_NUM)
		return irr_error_set(err, IRR_EINPUT, name, v ? v->line : it->line,
		                     "a peak object needs a numeric \"position\" (cm-1)");
	pos = v->num;
	if (!(v = jget(it, "width")))
		v = jget(it, "fwhm");
	if (v && v->type != JV_NULL) {
		if (v->type != JV_NUM || v->num < 0.0)
			return irr_error_set(err, IRR_EINPUT, name, v->line, "\"width\" must be a number >= 0 (cm-1)");
		width = v->num;
	}
	/* "height" (irrecon's own output) is the measured number; "intensity"
	 * may be a number or a class. */
	v = jget(it, "height");
	if (v && v->type == JV_NUM && v->num > 0.0) {
		has_int = 1;
		inum = v->num;
	}
	v = jget(it, "intensity");
	if (v && v->type == JV_NUM && !has_int) {
		has_int = 1;
		inum = v->num;
	} else if (v && v->type == JV_STR) {
		if (parse_class(v->str, &icls) == IRR_OK) {
			if (!has_int)
				has_int = 2;
		} else if (strcasecmp(v->str, "none") != 0) {
			return irr_error_set(err, IRR_EINPUT, name, v->line,
			                     "intensity \"%.40s\" is not a class (strong, medium, weak)", v->str);
		}
	} else if (v && v->type != JV_NULL && v->type != JV_NUM) {
		return irr_error_set(err, IRR_EINPUT, name, v->line,
		                     "\"intensity\" must be a number or a class name");
	}
	if ((rc = add_peak(pl, lines, lcap, it->line, pos, has_int, inum, icls, width, name, err)) != IRR_OK)
		return rc;
	{
		irr_peak *p = &pl->peaks[pl->count - 1];
		const jv *b;
		if ((b = jget(it, "shoulder")) && b->type == JV_TRUE)
			p->shoulder = 1;
		if ((b = jget(it, "saturated")) && b->type == JV_TRUE) {
			const jv *lo = jget(it, "low"), *hi = jget(it, "high");
			p->saturated = 1;
			if (lo && hi && lo->type == JV_NUM && hi->type == JV_NUM && lo->num <= pos && hi->num >= pos) {
				p->low = lo->num;
				p->high = hi->num;
			}
		}
		if (has_int == 1 && icls != IRR_INT_NONE)
			p->intensity = icls;
	}
	return IRR_OK;
}

static int read_json(irr_peaklist *pl, const char *data, size_t len, long line0,
                     const char *name, long **lines, size_t *lcap, irr_error *err)
{
	jparse j;
	jv root;
	const jv *arr;
	int rc;
	j.p = data;
	j.end = data + len;
	j.line = line0;
	j.name = name;
	j.err = err;
	rc = jvalue(&j, &root, 0);
	if (rc == IRR_OK) {
		jskip(&j);
		if (j.p < j.end)
			rc = jfail(&j, "unexpected text after the value");
	}
	if (rc != IRR_OK) {
		jv_free(&root);
		return rc;
	}
	if (root.type == JV_ARR) {
		arr = &root;
	} else if (root.type == JV_OBJ) {
		const jv *r = jget(&root, "range"), *sp = jget(&root, "spectrum");
		arr = jget(&root, "peaks");
		if (!arr || arr->type != JV_ARR) {
			rc = irr_error_set(err, IRR_EINPUT, name, arr ? arr->line : root.line,
			                   "the object needs a \"peaks\" array");
			goto done;
		}
		if (!r && sp)
			r = jget(sp, "measured_range");
		if (r && (rc = json_range(pl, r, name, err)) != IRR_OK)
			goto done;
		if (sp && (sp = jget(sp, "saturated_ranges")) && sp->type == JV_ARR) {
			for (size_t i = 0; i < sp->n; i++) {
				const jv *q = &sp->kids[i];
				double *ns;
				if (q->type != JV_ARR || q->n != 2 || q->kids[0].type != JV_NUM ||
				    q->kids[1].type != JV_NUM || !(q->kids[0].num <= q->kids[1].num)) {
					rc = irr_error_set(err, IRR_EINPUT, name, q->line,
					                   "a saturated range must be [low, high]");
					goto done;
				}
				ns = realloc(pl->sat, 2 * (pl->nsat + 1) * sizeof *ns);
				if (!ns) {
					rc = irr_error_set(err, IRR_ENOMEM, name, q->line, "out of memory");
					goto done;
				}
				pl->sat = ns;
				ns[2 * pl->nsat] = q->kids[0].num;
				ns[2 * pl->nsat + 1] = q->kids[1].num;
				pl->nsat++;
			}
		}
	} else {
		rc = irr_error_set(err, IRR_EINPUT, name, root.line,
		                   "a JSON peak list is an array or an object with \"peaks\"");
		goto done;
	}
	for (size_t i = 0; i < arr->n; i++)
		if ((rc = json_peak(pl, &arr->kids[i], name, lines, lcap, err)) != IRR_OK)
			goto done;
	rc = IRR_OK;
done:
	jv_free(&root);
	return rc;
}

/* ---- entry points --------------------------------------------------------- */

int irr_peaklist_read_memory(irr_peaklist **out, const char *data, size_t len,
                             const char *name, irr_error *err)
{
	irr_peaklist *pl;
	long *lines = NULL;
	size_t lcap = 0, k = 0;
	char *copy;
	int rc;
	if (out)
		*out = NULL;
	if (!name)
		name = "";
	if (!out || (!data && len))
		return irr_error_set(err, IRR_EINPUT, name, 0, "no data");
	if (len > MAX_LIST_BYTES)
		return irr_error_set(err, IRR_ELIMIT, name, 0, "peak list larger than %zu bytes",
		                     MAX_LIST_BYTES);
	/* Binary garbage is refused up front (NUL bytes never occur in text). */
	if (len && memchr(data, '\0', len)) {
		long line = 1;
		const char *z = memchr(data, '\0', len);
		for (const char *q = data; q < z; q++)
			line += *q == '\n';
		return irr_error_set(err, IRR_EINPUT, name, line, "NUL byte: not a text file");
	}
	pl = irr_peaks__new();
	copy = malloc(len + 1);
	if (!pl || !copy) {
		irr_peaklist_free(pl);
		free(copy);
		return irr_error_set(err, IRR_ENOMEM, name, 0, "out of memory");
	}
	if (len)
		memcpy(copy, data, len);
	copy[len] = '\0';
	if (len >= 3 && (unsigned char)copy[0] == 0xEF && (unsigned char)copy[1] == 0xBB &&
	    (unsigned char)copy[2] == 0xBF)
		k = 3;
	while (k < len && (copy[k] == ' ' || copy[k] == '\t' || copy[k] == '\r' || copy[k] == '\n'))
		k++;
	if (k < len && (copy[k] == '[' || copy[k] == '{')) {
		long line0 = 1;
		for (size_t q = 0; q < k; q++)
			line0 += copy[q] == '\n';
		rc = read_json(pl, copy + k, len - k, line0, name, &lines, &lcap, err);
	} else {
		rc = read_csv(pl, copy, len, name, &lines, &lcap, err);
	}
	if (rc == IRR_OK)
		rc = finish(pl, lines, name, err);
	free(copy);
	free(lines);
	if (rc != IRR_OK) {
		irr_peaklist_free(pl);
		return rc;
	}
	*out = pl;
	return IRR_OK;
}

int irr_peaklist_read_file(irr_peaklist **out, const char *path, irr_error *err)
{
	FILE *f;
	char *buf = NULL;
	size_t len = 0, cap = 0;
	int rc;
	if (out)
		*out = NULL;
	if (!path)
		return irr_error_set(err, IRR_EINPUT, "", 0, "no file name");
	f = fopen(path, "rb");
	if (!f)
		return irr_error_set(err, IRR_EIO, path, 0, "cannot open: %s", strerror(errno));
	for (;;) {
		size_t got;
		if (len == cap) {
			char *nb;
			if (cap > MAX_LIST_BYTES) {
				free(buf);
				fclose(f);
				return irr_error_set(err, IRR_ELIMIT, path, 0, "peak list larger than %zu bytes",
				                     MAX_LIST_BYTES);
			}
			cap = cap ? 2 * cap : 65536;
			nb = realloc(buf, cap);
			if (!nb) {
				free(buf);
				fclose(f);
				return irr_error_set(err, IRR_ENOMEM, path, 0, "out of memory");
			}
			buf = nb;
		}
		got = fread(buf + len, 1, cap - len, f);
		len += got;
		if (got == 0) {
			if (ferror(f)) {
				free(buf);
				fclose(f);
				return irr_error_set(err, IRR_EIO, path, 0, "read error: %s", strerror(errno));
			}
			break;
		}
	}
	fclose(f);
	rc = irr_peaklist_read_memory(out, buf ? buf : "", len, path, err);
	free(buf);
	return rc;
}
