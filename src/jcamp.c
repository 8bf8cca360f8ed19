/* jcamp.c: JCAMP-DX reader (McDonald & Wilks, Appl. Spectrosc. 42 (1988)
 * 151; JCAMP-DX 4.24 and its later revisions). Splits a file into labelled
 * data records, walks compound (LINK) files as a flat list of blocks with an
 * explicit stack, decodes ##XYDATA=(X++(Y..Y)) in every ASDF form (AFFN,
 * PAC, SQZ, DIF, DUP and mixtures, with the DIF Y-check value),
 * ##XYPOINTS=(XY..XY) and ##PEAK TABLE=(XY..XY), and checks the header
 * records against the data. */
#include "irrecon/spectrum.h"
#include "jcamp.h"
#include "spectrum_vec.h"

#include <math.h>
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define MAX_NESTING 32
#define MAX_RECORDS 200000

typedef struct record {
	char label[48];   /* normalised: no blanks, '-', '/', '_'; upper case */
	const char *val;  /* just after '=' */
	const char *end;  /* start of the next record (or end of input) */
	long line;        /* line of the "##" */
	int block;        /* index into the block table, -1 = outside any */
} record;

typedef struct block {
	int parent;
	int title_rec;
	int end_rec;      /* -1 = never closed */
	int data_rec;     /* first XYDATA / XYPOINTS / PEAK TABLE, -1 none */
	int ntuples_rec;
	char data_type[64];
} block;

typedef struct scan {
	record *rec;
	size_t nrec, caprec;
	block *blk;
	size_t nblk, capblk;
} scan;

static void scan_free(scan *sc)
{
	free(sc->rec);
	free(sc->blk);
}

static int is_blank(char c)
{
	return c == ' ' || c == '\t';
}

static char upper(char c)
{
	return (c >= 'a' && c <= 'z') ? (char)(c - 'a' + 'A') : c;
}

/* Label normalisation of JCAMP-DX 4.24: blanks, '-', '/', '_' are ignored
 * and case does not matter ("DATA TYPE" = "DATATYPE", "JCAMP_DX" = "JCAMP-DX"). */
static void normalise_label(const char *p, const char *e, char *out, size_t size)
{
	size_t n = 0;
	for (; p < e; p++) {
		char c = *p;
		if (c == ' ' || c == '\t' || c == '-' || c == '/' || c == '_')
			continue;
		if (n + 1 < size)
			out[n++] = upper(c);
	}
	out[n] = '\0';
}

/* The value of a one-line record, without the "$$" comment and blanks, as
 * a bounded C string. Continuation lines are included for text records. */
static void record_text(const record *r, char *out, size_t size, int first_line_only)
{
	const char *p = r->val, *e = r->end;
	size_t n = 0;
	int in_comment = 0;
	while (p < e && is_blank(*p))
		p++;
	for (; p < e && n + 1 < size; p++) {
		char c = *p;
		if (c == '\r' || c == '\n') {
			if (first_line_only)
				break;
			in_comment = 0;
			if (n && out[n - 1] != ' ')
				out[n++] = ' ';
			continue;
		}
		if (in_comment)
			continue;
		if (c == '$' && p + 1 < e && p[1] == '$') {
			in_comment = 1;
			continue;
		}
		out[n++] = c;
	}
	while (n && (out[n - 1] == ' ' || out[n - 1] == '\t'))
		n--;
	out[n] = '\0';
}

static int grow(void **arr, size_t *cap, size_t need, size_t elem)
{
	size_t c;
	void *p;
	if (need <= *cap)
		return 0;
	c = *cap ? *cap : 16;
	while (c < need)
		c *= 2;
	if (!(p = realloc(*arr, c * elem)))
		return -1;
	*arr = p;
	*cap = c;
	return 0;
}

/* Splits the input into records and blocks. Iterative: nesting is tracked
 * with a bounded stack, so no input can drive recursion. */
static int scan_records(scan *sc, const char *data, size_t len, const char *name,
                        irr_error *err)
{
	const char *p = data, *end = data + len;
	long line = 1;
	int stack[MAX_NESTING], depth = 0;
	memset(sc, 0, sizeof *sc);
	if (len >= 3 && (unsigned char)p[0] == 0xEF && (unsigned char)p[1] == 0xBB &&
	    (unsigned char)p[2] == 0xBF)
		p += 3;
	while (p < end) {
		const char *eol = memchr(p, '\n', (size_t)(end - p));
		const char *q = p;
		if (!eol)
			eol = end;
		while (q < eol && is_blank(*q))
			q++;
		if (eol - q >= 2 && q[0] == '#' && q[1] == '#') {
			const char *eq = memchr(q + 2, '=', (size_t)(eol - q - 2));
			record *r;
			if (!eq) {
				/* "##END" without '=' is common enough to accept. */
				char lab[48];
				const char *le = eol;
				if (le > q && le[-1] == '\r')
					le--;
				normalise_label(q + 2, le, lab, sizeof lab);
				if (strcmp(lab, "END") != 0)
					return irr_spectrum__fail(err, IRR_EINPUT, name, line,
					                     "malformed record: a '##' line without '='");
				eq = le - 1;
			}
			/* Real files hold tens of records (a few thousand with
			 * pages); a flood of "##X=" lines is not a spectrum and must
			 * not cost gigabytes of record table. */
			if (sc->nrec >= MAX_RECORDS)
				return irr_spectrum__fail(err, IRR_ELIMIT, name, line,
				                          "more than %d labelled records: not an infrared JCAMP-DX file (the limit)",
				                          MAX_RECORDS);
			if (grow((void **)&sc->rec, &sc->caprec, sc->nrec + 1, sizeof *sc->rec) < 0)
				return irr_spectrum__fail(err, IRR_ENOMEM, name, 0, "out of memory");
			r = &sc->rec[sc->nrec];
			normalise_label(q + 2, eq, r->label, sizeof r->label);
			r->val = eq + 1;
			r->end = end;
			r->line = line;
			r->block = depth ? stack[depth - 1] : -1;
			if (sc->nrec)
				sc->rec[sc->nrec - 1].end = q;
			sc->nrec++;
			if (!strcmp(r->label, "TITLE")) {
				block *b;
				if (depth == MAX_NESTING)
					return irr_spectrum__fail(err, IRR_EINPUT, name, line,
					                     "blocks nested more than %d deep", MAX_NESTING);
				if (grow((void **)&sc->blk, &sc->capblk, sc->nblk + 1, sizeof *sc->blk) < 0)
					return irr_spectrum__fail(err, IRR_ENOMEM, name, 0, "out of memory");
				b = &sc->blk[sc->nblk];
				memset(b, 0, sizeof *b);
				b->parent = depth ? stack[depth - 1] : -1;
				b->title_rec = (int)(sc->nrec - 1);
				b->end_rec = b->data_rec = b->ntuples_rec = -1;
				stack[depth++] = (int)sc->nblk;
				r->block = (int)sc->nblk;
				sc->nblk++;
			} else if (!strcmp(r->label, "END")) {
				if (depth) {
					sc->blk[stack[depth - 1]].end_rec = (int)(sc->nrec - 1);
					depth--;
				}
			} else if (r->block < 0) {
				if (sc->nblk == 0)
					return irr_spectrum__fail(err, IRR_EINPUT, name, line,
					                     "##%s before the first ##TITLE= (a JCAMP-DX block starts with ##TITLE=)",
					                     r->label);
			} else {
				block *b = &sc->blk[r->block];
				if (!strcmp(r->label, "XYDATA") || !strcmp(r->label, "XYPOINTS") ||
				    !strcmp(r->label, "PEAKTABLE")) {
					if (b->data_rec < 0)
						b->data_rec = (int)(sc->nrec - 1);
				} else if (!strcmp(r->label, "NTUPLES")) {
					b->ntuples_rec = (int)(sc->nrec - 1);
				} else if (!strcmp(r->label, "DATATYPE") && !b->data_type[0]) {
					char t[64];
					record_text(r, t, sizeof t, 1);
					for (char *c = t; *c; c++)
						*c = upper(*c);
					memcpy(b->data_type, t, sizeof t);
				}
			}
		}
		p = eol < end ? eol + 1 : end;
		line++;
	}
	if (sc->nblk == 0)
		return irr_spectrum__fail(err, IRR_EINPUT, name, 1,
		                     "no ##TITLE= record: not a JCAMP-DX file");
	return IRR_OK;
}

static int is_infrared(const block *b)
{
	return (strstr(b->data_type, "INFRARED") || !strncmp(b->data_type, "IR", 2)) &&
	       !strstr(b->data_type, "INTERFEROGRAM");
}

static void block_title(const scan *sc, const block *b, char *out, size_t size)
{
	record_text(&sc->rec[b->title_rec], out, size, 1);
}

int irr_jcamp__list_blocks(irr_block_info **out, size_t *count, const char *data,
                           size_t len, const char *name, irr_error *err)
{
	scan sc;
	irr_block_info *bi;
	int rc;
	*out = NULL;
	*count = 0;
	if ((rc = scan_records(&sc, data, len, name, err)) < 0) {
		scan_free(&sc);
		return rc;
	}
	if (!(bi = calloc(sc.nblk, sizeof *bi))) {
		scan_free(&sc);
		return irr_spectrum__fail(err, IRR_ENOMEM, name, 0, "out of memory");
	}
	for (size_t i = 0; i < sc.nblk; i++) {
		bi[i].index = (int)i + 1;
		block_title(&sc, &sc.blk[i], bi[i].title, sizeof bi[i].title);
		snprintf(bi[i].data_type, sizeof bi[i].data_type, "%s", sc.blk[i].data_type);
		bi[i].has_data = sc.blk[i].data_rec >= 0;
	}
	*out = bi;
	*count = sc.nblk;
	scan_free(&sc);
	return IRR_OK;
}

/* ---- numbers ------------------------------------------------------------ */

/* Size of one unit in the last printed digit of a number as written
 * ("80" -> 1, "0.6509407" -> 1e-7, "9.8163E-0001" -> 1e-5): a header value
 * cannot be more exact than that. */
static double printed_unit(const char *s)
{
	int decimals = 0, seen_point = 0, expo = 0;
	const char *p = s;
	while (*p == ' ' || *p == '+' || *p == '-')
		p++;
	for (; *p; p++) {
		if (*p == '.')
			seen_point = 1;
		else if (*p >= '0' && *p <= '9')
			decimals += seen_point;
		else
			break;
	}
	if (*p == 'E' || *p == 'e')
		expo = atoi(p + 1);
	return pow(10.0, (double)(expo - decimals));
}

typedef struct hval {
	int have;
	double v;
	long line;
	char text[64];
} hval;

static int header_number(const record *r, hval *h, const char *name, irr_error *err)
{
	char t[64], *e;
	double v;
	record_text(r, t, sizeof t, 1);
	if (irr_parse_double(t, &e, &v) < 0 || (*e && *e != ' ' && *e != '\t'))
		return irr_spectrum__fail(err, IRR_EINPUT, name, r->line,
		                     "##%s=%s is not a number", r->label, t);
	h->have = 1;
	h->v = v;
	h->line = r->line;
	memcpy(h->text, t, sizeof t);
	return IRR_OK;
}

/* ---- ASDF tokens -------------------------------------------------------- */

enum { TK_END = 0, TK_ABS, TK_DIF, TK_DUP, TK_BAD, TK_MISSING, TK_NONFINITE, TK_NANWORD };

typedef struct token {
	int kind;
	double v;
	const char *at;
} token;

/* Digits following a first digit `d0`; SQZ/DIF/DUP values are integers,
 * AFFN/PAC values may carry a fraction and (AFFN/PAC only) an exponent
 * written E+nn / E-nn. A bare 'E' or 'e' is the SQZ digit +5 / -5. */
static const char *read_number(const char *p, const char *e, int neg, int d0,
                               int allow_fraction, double *out, int *ok)
{
	uint64_t mant = (uint64_t)d0;
	int digits = d0 ? 1 : 0, frac = 0, seen_point = 0, expo = 0, slow = 0;
	*ok = 1;
	for (; p < e; p++) {
		char c = *p;
		if (c >= '0' && c <= '9') {
			if (digits < 19) {
				mant = mant * 10 + (uint64_t)(c - '0');
				if (mant)
					digits++;
				frac += seen_point;
			} else {
				/* Beyond 19 significant digits only the scale matters. */
				if (!seen_point)
					expo++;
				slow = 1;
			}
		} else if (c == '.' && allow_fraction && !seen_point) {
			seen_point = 1;
		} else if ((c == 'E' || c == 'e') && allow_fraction && p + 2 < e &&
		           (p[1] == '+' || p[1] == '-') && p[2] >= '0' && p[2] <= '9') {
			int eneg = p[1] == '-', ev = 0;
			p += 2;
			while (p < e && *p >= '0' && *p <= '9') {
				if (ev < 10000)
					ev = ev * 10 + (*p - '0');
				p++;
			}
			expo += eneg ? -ev : ev;
			break;
		} else {
			break;
		}
	}
	{
		int scale = expo - frac;
		double v;
		static const double p10[] = {1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8,
		                             1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
		                             1e17, 1e18, 1e19, 1e20, 1e21, 1e22};
		/* Exact when the mantissa and the power of ten are both exact
		 * doubles (Clinger's fast path), which is every value in practice. */
		if (!slow && mant < ((uint64_t)1 << 53) && scale >= -22 && scale <= 22)
			v = scale < 0 ? (double)mant / p10[-scale] : (double)mant * p10[scale];
		else
			v = (double)mant * pow(10.0, scale);
		if (!isfinite(v))
			*ok = 0;
		*out = neg ? -v : v;
	}
	return p;
}

static int word_at(const char *p, const char *e, const char *w)
{
	size_t n = strlen(w);
	if ((size_t)(e - p) < n)
		return 0;
	for (size_t i = 0; i < n; i++)
		if (upper(p[i]) != w[i])
			return 0;
	return p + n == e || is_blank(p[n]) || p[n] == ',' || p[n] == ';' || p[n] == '\r';
}

/* NaN or infinity written out as a word ("NaN", "-inf", "Infinity"),
 * starting at p: refused before the ASDF rules could read "NaN" as DIF 5,
 * SQZ -1, DIF 5. Only whole words after a separator count, since
 * compressed data run letters together. */
static int nan_word_at(const char *p, const char *e)
{
	char b = p[-1]; /* a data line never starts the buffer: a label precedes it */
	if (!(is_blank(b) || b == ',' || b == ';' || b == '\n' || b == '\r'))
		return 0;
	if (*p == '+' || *p == '-')
		p++;
	return word_at(p, e, "NAN") || word_at(p, e, "INF") || word_at(p, e, "INFINITY");
}

/* Character classes of ASDF (JCAMP-DX 4.24, Table of pseudo-digits): the
 * high nibble is the class, the low nibble the digit a pseudo-digit
 * stands for. One table lookup per character keeps decoding fast. */
enum {
	K_OTHER = 0x00, K_SEP = 0x10, K_SEMI = 0x20, K_DIGIT = 0x30, K_SIGN = 0x40,
	K_DOT = 0x50, K_MISS = 0x60, K_SQZP = 0x70, K_SQZN = 0x80, K_DIFP = 0x90,
	K_DIFN = 0xA0, K_DUP = 0xB0
};
static const unsigned char asdf_class[256] = {
	[' '] = K_SEP, ['\t'] = K_SEP, [','] = K_SEP, ['\r'] = K_SEP,
	[';'] = K_SEMI, ['0'] = K_DIGIT | 0, ['1'] = K_DIGIT | 1, ['2'] = K_DIGIT | 2,
	['3'] = K_DIGIT | 3, ['4'] = K_DIGIT | 4, ['5'] = K_DIGIT | 5, ['6'] = K_DIGIT | 6,
	['7'] = K_DIGIT | 7, ['8'] = K_DIGIT | 8, ['9'] = K_DIGIT | 9, ['+'] = K_SIGN,
	['-'] = K_SIGN, ['.'] = K_DOT, ['?'] = K_MISS, ['@'] = K_SQZP | 0,
	['A'] = K_SQZP | 1, ['B'] = K_SQZP | 2, ['C'] = K_SQZP | 3, ['D'] = K_SQZP | 4,
	['E'] = K_SQZP | 5, ['F'] = K_SQZP | 6, ['G'] = K_SQZP | 7, ['H'] = K_SQZP | 8,
	['I'] = K_SQZP | 9, ['a'] = K_SQZN | 1, ['b'] = K_SQZN | 2, ['c'] = K_SQZN | 3,
	['d'] = K_SQZN | 4, ['e'] = K_SQZN | 5, ['f'] = K_SQZN | 6, ['g'] = K_SQZN | 7,
	['h'] = K_SQZN | 8, ['i'] = K_SQZN | 9, ['%'] = K_DIFP | 0, ['J'] = K_DIFP | 1,
	['K'] = K_DIFP | 2, ['L'] = K_DIFP | 3, ['M'] = K_DIFP | 4, ['N'] = K_DIFP | 5,
	['O'] = K_DIFP | 6, ['P'] = K_DIFP | 7, ['Q'] = K_DIFP | 8, ['R'] = K_DIFP | 9,
	['j'] = K_DIFN | 1, ['k'] = K_DIFN | 2, ['l'] = K_DIFN | 3, ['m'] = K_DIFN | 4,
	['n'] = K_DIFN | 5, ['o'] = K_DIFN | 6, ['p'] = K_DIFN | 7, ['q'] = K_DIFN | 8,
	['r'] = K_DIFN | 9, ['S'] = K_DUP | 1, ['T'] = K_DUP | 2, ['U'] = K_DUP | 3,
	['V'] = K_DUP | 4, ['W'] = K_DUP | 5, ['X'] = K_DUP | 6, ['Y'] = K_DUP | 7,
	['Z'] = K_DUP | 8, ['s'] = K_DUP | 9,
};

/* The rest of a plain integer after its first digit; 0 when it is not a
 * plain integer that fits (a fraction, an exponent, > 17 digits), so that
 * the general reader takes over. */
static int read_plain_int(const char **pp, const char *e, uint64_t *m)
{
	const char *p = *pp, *start = p;
	uint64_t v = *m;
	(void)e;
	/* No bound check: every data line ends in a non-digit ('\n', '$',
	 * '#' of the next record, or the NUL the readers put after the input). */
	while ((unsigned)(*p - '0') <= 9) {
		v = v * 10 + (uint64_t)(*p - '0');
		p++;
	}
	if (p - start > 16)
		return 0;
	*pp = p;
	*m = v;
	return 1;
}

/* Next ASDF token on the line [*pp, e). Separators: blanks and ','
 * (and ';' where pairs are listed). */
static void next_token(const char **pp, const char *e, int semicolon_sep, token *t)
{
	const char *p = *pp;
	unsigned k;
	int ok = 1, neg = 0;
	uint64_t m;
	for (;; p++) {
		if (p >= e) {
			t->at = p;
			t->kind = TK_END;
			*pp = p;
			return;
		}
		k = asdf_class[(unsigned char)*p];
		if (k == K_SEP || (k == K_SEMI && semicolon_sep))
			continue;
		break;
	}
	t->at = p;
	/* Words only follow separators; compressed data have none. */
	if ((p != *pp || p[-1] == '\n') &&
	    (*p == 'N' || *p == 'n' || *p == 'I' || *p == 'i' ||
	     (k == K_SIGN && p + 1 < e && (p[1] == 'N' || p[1] == 'n' || p[1] == 'I' || p[1] == 'i'))) &&
	    nan_word_at(p, e)) {
		t->kind = TK_NANWORD;
		*pp = p;
		return;
	}
	switch (k & 0xF0) {
	case K_SQZN:
		neg = 1;
		/* fall through */
	case K_SQZP:
		t->kind = TK_ABS;
		break;
	case K_DIFN:
		neg = 1;
		/* fall through */
	case K_DIFP:
		t->kind = TK_DIF;
		break;
	case K_DUP:
		t->kind = TK_DUP;
		break;
	case K_DIGIT: {
		/* AFFN: a fraction or an exponent goes to the general reader. */
		const char *q = p + 1;
		m = k & 0x0F;
		t->kind = TK_ABS;
		if (read_plain_int(&q, e, &m) &&
		    !(q < e && (*q == '.' || ((*q == 'E' || *q == 'e') && q + 2 < e &&
		                              (q[1] == '+' || q[1] == '-'))))) {
			t->v = (double)m;
			*pp = q;
			return;
		}
		p = read_number(p + 1, e, 0, (int)(k & 0x0F), 1, &t->v, &ok);
		t->kind = ok ? TK_ABS : TK_NONFINITE;
		*pp = p;
		return;
	}
	case K_DOT:
		if (p + 1 < e && (unsigned)(p[1] - '0') <= 9) {
			p = read_number(p, e, 0, 0, 1, &t->v, &ok);
			t->kind = ok ? TK_ABS : TK_NONFINITE;
			*pp = p;
			return;
		}
		t->kind = TK_BAD;
		*pp = p;
		return;
	case K_SIGN:
		/* PAC: the sign is the delimiter. */
		if (p + 1 < e && ((unsigned)(p[1] - '0') <= 9 || p[1] == '.')) {
			neg = *p == '-';
			if (p[1] == '.')
				p = read_number(p + 1, e, neg, 0, 1, &t->v, &ok);
			else
				p = read_number(p + 2, e, neg, p[1] - '0', 1, &t->v, &ok);
			t->kind = ok ? TK_ABS : TK_NONFINITE;
			*pp = p;
			return;
		}
		t->kind = TK_BAD;
		*pp = p;
		return;
	case K_MISS:
		t->kind = TK_MISSING;
		*pp = p + 1;
		return;
	default:
		t->kind = TK_BAD;
		*pp = p;
		return;
	}
	/* SQZ, DIF, DUP: a pseudo-digit, then plain digits. */
	p++;
	m = k & 0x0F;
	if (read_plain_int(&p, e, &m)) {
		t->v = neg ? -(double)m : (double)m;
	} else {
		p = read_number(t->at + 1, e, neg, (int)(k & 0x0F), 0, &t->v, &ok);
		if (!ok)
			t->kind = TK_NONFINITE;
	}
	*pp = p;
}

/* The ordinates of a compressed line are nearly all SQZ, DIF or DUP
 * tokens with plain digits right after each other: those are decoded here
 * without the general path's checks; anything else (separators, AFFN,
 * PAC, words, errors) goes to next_token. */
static inline void next_y_token(const char **pp, const char *e, token *t)
{
	const char *p = *pp;
	unsigned k, kc;
	uint64_t m;
	const char *start;
	if (p >= e)
		goto general;
	k = asdf_class[(unsigned char)*p];
	kc = k & 0xF0;
	if (kc < K_SQZP || kc > K_DUP)
		goto general;
	start = p + 1;
	m = k & 0x0F;
	p = start;
	while ((unsigned)(*p - '0') <= 9) {
		m = m * 10 + (uint64_t)(*p - '0');
		p++;
	}
	if (p - start > 16)
		goto general;
	t->at = *pp;
	t->kind = kc == K_DUP ? TK_DUP : (kc == K_DIFP || kc == K_DIFN) ? TK_DIF : TK_ABS;
	t->v = (kc == K_SQZN || kc == K_DIFN) ? -(double)(int64_t)m : (double)(int64_t)m;
	*pp = p;
	return;
general:
	next_token(pp, e, 0, t);
}

/* ---- data decoding ---------------------------------------------------------- */

typedef struct decoded {
	double *raw;       /* Y (or, for pairs, interleaved X,Y) in file units before factors */
	size_t n, cap;     /* values */
	long *lines;       /* pairs: line of each point */
	size_t ncap_lines;
	/* X++(Y..Y) only */
	double first_line_x, last_line_x;
	size_t last_line_index; /* index of the point the last line's X names */
	int have_line_x;
	long line_mismatch;     /* first line whose abscissa is out of step (0 none) */
	double mismatch_x, mismatch_expect;
	long last_line;
	int fixed;              /* cap is ##NPOINTS: more is an error, not a limit */
	long bad_line;          /* the line whose count the next abscissa contradicts */
	size_t bad_count;
	double bad_implied;
	const char *bad_suspect;
	size_t bad_suspect_len;
} decoded;

static int push_value(decoded *d, double v, size_t limit, const char *name, long line,
                      const char *what, irr_error *err)
{
	if (d->n == d->cap) {
		size_t c = d->cap ? d->cap * 2 : 4096;
		double *p;
		if (d->n >= limit) {
			if (d->fixed)
				return irr_spectrum__fail(err, IRR_EINPUT, name, line,
				                     "##NPOINTS=%zu but ##XYDATA holds more values", limit);
			return irr_spectrum__fail(err, IRR_ELIMIT, name, line,
			                     "more %s than %zu (the limit)", what, limit);
		}
		if (c > limit)
			c = limit;
		if (!(p = realloc(d->raw, c * sizeof *p)))
			return irr_spectrum__fail(err, IRR_ENOMEM, name, line, "out of memory");
		d->raw = p;
		d->cap = c;
	}
	d->raw[d->n++] = v;
	return IRR_OK;
}

static int token_error(const token *t, const char *end, const char *name, long line,
                       const char *rec, irr_error *err)
{
	int len = (int)(end - t->at);
	if (len > 40)
		len = 40;
	if (len < 1)
		len = 1;
	if (t->kind == TK_MISSING)
		return irr_spectrum__fail(err, IRR_EINPUT, name, line,
		                     "missing value '?' in ##%s", rec);
	if (t->kind == TK_NANWORD)
		return irr_spectrum__fail(err, IRR_EINPUT, name, line,
		                     "a value is not a finite number (NaN or infinity) in ##%s", rec);
	if (t->kind == TK_NONFINITE)
		return irr_spectrum__fail(err, IRR_EINPUT, name, line,
		                     "number '%.*s' in ##%s is out of range (not finite)", len, t->at, rec);
	{
		unsigned char c = (unsigned char)*t->at;
		if (c >= 0x20 && c < 0x7f)
			return irr_spectrum__fail(err, IRR_EINPUT, name, line,
			                     "unexpected character '%c' in ##%s", c, rec);
		return irr_spectrum__fail(err, IRR_EINPUT, name, line,
		                     "unexpected character (byte 0x%02x) in ##%s", c, rec);
	}
}

/* The data lines of a record: after the variable list on its first line. */
static const char *data_start(const record *r, long *line)
{
	const char *nl = memchr(r->val, '\n', (size_t)(r->end - r->val));
	*line = r->line + 1;
	return nl ? nl + 1 : r->end;
}

/* Line end, and end of the data on it (before a "$$" comment). */
static const char *line_end(const char *p, const char *e, const char **data_end)
{
	const char *nl = memchr(p, '\n', (size_t)(e - p));
	const char *le = nl ? nl : e, *c = p;
	*data_end = le;
	while ((c = memchr(c, '$', (size_t)(le - c))) && c + 1 < le) {
		if (c[1] == '$') {
			*data_end = c;
			break;
		}
		c++;
	}
	return le;
}

/* The error for a point count that disagrees with ##NPOINTS. When a line's
 * abscissa already showed where the count went wrong, that line is named,
 * with the text that most likely caused it. */
static int npoints_error(const decoded *d, size_t np, int more, long line_now,
                         const char *name, irr_error *err)
{
	if (d->bad_line)
		return irr_spectrum__fail(err, IRR_EINPUT, name, d->bad_line,
		                     "##NPOINTS=%zu but ##XYDATA holds %s: this line holds %zu Y values where its X and the next line's X imply %.0f%s%.*s%s",
		                     np, more ? "more values" : "fewer values", d->bad_count,
		                     d->bad_implied, d->bad_suspect_len ? " (look at '" : "",
		                     (int)d->bad_suspect_len, d->bad_suspect ? d->bad_suspect : "",
		                     d->bad_suspect_len ? "')" : "");
	if (more)
		return irr_spectrum__fail(err, IRR_EINPUT, name, line_now,
		                     "##NPOINTS=%zu but ##XYDATA holds more values", np);
	return irr_spectrum__fail(err, IRR_EINPUT, name, line_now,
	                     "##NPOINTS=%zu but ##XYDATA holds %zu values (truncated?)", np, d->n);
}

/* ##XYDATA=(X++(Y..Y)). Each line: an abscissa, then ordinates in any
 * ASDF mix. DUP repeats the previous token (a value, or a difference);
 * after a line that ends in DIF form the next line starts with a Y-check
 * value that repeats the last ordinate, and is dropped. `xfactor`, `x0`
 * and `dx` (in file X units) check each line's abscissa against the
 * point count so far. */
static int decode_xydata(decoded *d, const record *r, size_t expect, size_t limit,
                         double xfactor, double x0, double dx, const char *name,
                         irr_error *err)
{
	long line;
	const char *p = data_start(r, &line), *e = r->end;
	double last = 0.0, prev_line_x = 0.0, last_dif = 0.0;
	int prev_kind = TK_END, dif_pending = 0, have_prev_line_x = 0, rc;
	size_t prev_line_start = 0;
	long prev_line_no = 0;
	const char *prev_suspect = NULL;
	size_t prev_suspect_len = 0;
	if (expect) {
		/* NPOINTS was checked against the limit before this allocation. */
		if (!(d->raw = malloc(expect * sizeof *d->raw)))
			return irr_spectrum__fail(err, IRR_ENOMEM, name, r->line, "out of memory");
		d->cap = expect;
		d->fixed = 1;
		limit = expect;
	}
	for (; p < e; line++) {
		const char *de, *le = line_end(p, e, &de), *q = p, *prev_at = NULL;
		const char *suspect = NULL;
		size_t suspect_len = 0, line_start_n;
		token t;
		double lx;
		int first_y = 1, affn_line = 0, prev_affn = 0;
		next_token(&q, de, 0, &t);
		if (t.kind == TK_END) {
			p = le < e ? le + 1 : e;
			continue;
		}
		if (t.kind != TK_ABS)
			return t.kind == TK_DIF || t.kind == TK_DUP
			       ? irr_spectrum__fail(err, IRR_EINPUT, name, line,
			                       "a data line must start with its X value, not a DIF or DUP character")
			       : token_error(&t, q, name, line, "XYDATA", err);
		lx = t.v;
		if (have_prev_line_x && dx != 0.0 && (lx - prev_line_x) * xfactor * dx <= 0)
			return irr_spectrum__fail(err, IRR_EINPUT, name, line,
			                     "X is not monotonic: this line's X (%.10g) does not go on from the previous line's (%.10g)",
			                     lx, prev_line_x);
		line_start_n = dif_pending && d->n ? d->n - 1 : d->n;
		/* The line's abscissa names the X of its first ordinate (the
		 * check value after a DIF line); when it is out of step, the line
		 * before holds too many or too few. Checked before this line's
		 * values so that an overflow on it can name the culprit. */
		{
			double expect_x = x0 + (double)line_start_n * dx;
			double tol = 0.5 * fabs(dx) + fabs(xfactor) + 1e-9 * fabs(expect_x);
			if (!d->have_line_x) {
				d->first_line_x = lx;
				d->have_line_x = 1;
			}
			if (dx != 0.0 && !d->line_mismatch && fabs(lx * xfactor - expect_x) > tol) {
				d->line_mismatch = line;
				d->mismatch_x = lx * xfactor;
				d->mismatch_expect = expect_x;
				if (have_prev_line_x) {
					d->bad_line = prev_line_no;
					d->bad_count = line_start_n - prev_line_start;
					d->bad_implied = floor((lx - prev_line_x) * xfactor / dx + 0.5);
					d->bad_suspect = prev_suspect;
					d->bad_suspect_len = prev_suspect_len;
				}
			}
			d->last_line_x = lx;
			d->last_line_index = line_start_n;
		}
		for (;;) {
			/* Past the first ordinate of a compressed line: SQZ, DIF
			 * and DUP tokens with plain digits, decoded and stored here
			 * as long as they fit what is allocated; anything else
			 * (separators, AFFN, errors, a full array) is left to the
			 * general path below, from the token it stopped at. */
			if (!first_y && !affn_line) {
				/* Locals: the stores through raw cannot then be taken
				 * to change the count or the capacity. */
				double *raw = d->raw, lst = last, ldif = last_dif;
				size_t dn = d->n, cap = d->cap;
				int pk = prev_kind;
				while (q < de) {
					const char *t0 = q, *st;
					unsigned k = asdf_class[(unsigned char)*q], kc = k & 0xF0;
					uint64_t m = k & 0x0F;
					if (kc < K_SQZP || kc > K_DUP)
						break;
					st = ++q;
					while ((unsigned)(*q - '0') <= 9) {
						m = m * 10 + (uint64_t)(*q - '0');
						q++;
					}
					if (q - st > 16) {
						q = t0;
						break;
					}
					if (kc == K_DUP) {
						if (m < 1 || m - 1 > cap - dn) {
							q = t0;
							break;
						}
						for (uint64_t c = 1; c < m; c++) {
							if (pk == TK_DIF)
								lst += ldif;
							raw[dn++] = lst;
						}
						continue;
					}
					if (dn == cap) {
						q = t0;
						break;
					}
					/* m < 10^17: exact through int64_t, whose conversion
					 * is one instruction. */
					/* The sign as a factor of +-1 (exact, -0 included):
					 * signs alternate at random, a branch on them would
					 * be mispredicted half the time. */
					static const double sign[16] = {
						[K_SQZN >> 4] = -1.0, [K_DIFN >> 4] = -1.0, [K_SQZP >> 4] = 1.0,
						[K_DIFP >> 4] = 1.0};
					double v = (double)(int64_t)m * sign[kc >> 4];
					if (kc == K_DIFP || kc == K_DIFN) {
						ldif = v;
						lst += ldif;
						pk = TK_DIF;
					} else {
						lst = v;
						pk = TK_ABS;
					}
					raw[dn++] = lst;
				}
				d->n = dn;
				last = lst;
				last_dif = ldif;
				prev_kind = pk;
			}
			next_y_token(&q, de, &t);
			if (t.kind == TK_END)
				break;
			if (first_y && t.kind != TK_ABS) {
				if (t.kind == TK_DIF || t.kind == TK_DUP)
					return irr_spectrum__fail(err, IRR_EINPUT, name, line,
					                     "the first Y value of a line is a %s, not an absolute value%s",
					                     t.kind == TK_DIF ? "DIF difference" : "DUP count",
					                     dif_pending ? " (after a DIF line it must repeat the last Y as a check)" : "");
				return token_error(&t, q, name, line, "XYDATA", err);
			}
			/* A letter glued to a plain number on a plain-number line is
			 * the likely culprit if the count goes wrong ("6O" for "60"). */
			if (first_y || affn_line) {
				if (affn_line && !suspect && prev_affn && t.kind != TK_ABS &&
				    t.at > p && t.at[-1] >= '0' && t.at[-1] <= '9') {
					suspect = prev_at;
					suspect_len = (size_t)(q - prev_at);
				}
				prev_affn = t.kind == TK_ABS && ((*t.at >= '0' && *t.at <= '9') || *t.at == '.' ||
				                                 *t.at == '+' || *t.at == '-');
				if (first_y)
					affn_line = prev_affn;
				prev_at = t.at;
			}
			switch (t.kind) {
			case TK_ABS:
				if (first_y && dif_pending) {
					/* The Y-check value. */
					if (t.v != last)
						return irr_spectrum__fail(err, IRR_EINPUT, name, line,
						                     "Y-check value %.10g does not repeat the last value %.10g of the line before (corrupt or truncated data)",
						                     t.v, last);
					prev_kind = TK_ABS;
					break;
				}
				last = t.v;
				if (d->fixed && d->n == d->cap)
					return npoints_error(d, expect, 1, line, name, err);
				if (d->n < d->cap)
					d->raw[d->n++] = last;
				else if ((rc = push_value(d, last, limit, name, line, "values", err)) < 0)
					return rc;
				prev_kind = TK_ABS;
				break;
			case TK_DIF:
				last += t.v;
				last_dif = t.v;
				if (d->fixed && d->n == d->cap)
					return npoints_error(d, expect, 1, line, name, err);
				if (d->n < d->cap)
					d->raw[d->n++] = last;
				else if ((rc = push_value(d, last, limit, name, line, "values", err)) < 0)
					return rc;
				prev_kind = TK_DIF;
				break;
			case TK_DUP: {
				double cnt = t.v;
				if (cnt < 1 || cnt != floor(cnt))
					return irr_spectrum__fail(err, IRR_EINPUT, name, line,
					                     "bad DUP count %.10g", cnt);
				if (cnt - 1 > (double)(limit - d->n)) {
					if (d->fixed)
						return irr_spectrum__fail(err, IRR_EINPUT, name, line,
						                     "DUP count %.0f goes beyond the limit set by ##NPOINTS=%zu",
						                     cnt, expect);
					return irr_spectrum__fail(err, IRR_ELIMIT, name, line,
					                     "DUP count %.0f goes beyond the limit of %zu points",
					                     cnt, limit);
				}
				for (double k = 1; k < cnt; k++) {
					if (prev_kind == TK_DIF)
						last += last_dif;
					if (d->n < d->cap)
						d->raw[d->n++] = last;
					else if ((rc = push_value(d, last, limit, name, line, "values", err)) < 0)
						return rc;
				}
				/* A DUP keeps the form of what it repeats. */
				break;
			}
			default:
				return token_error(&t, q, name, line, "XYDATA", err);
			}
			first_y = 0;
		}
		if (first_y)
			return irr_spectrum__fail(err, IRR_EINPUT, name, line,
			                     "a data line with an X value but no Y values");
		dif_pending = prev_kind == TK_DIF;
		prev_line_x = lx;
		prev_line_start = line_start_n;
		prev_line_no = line;
		prev_suspect = suspect;
		prev_suspect_len = suspect_len;
		have_prev_line_x = 1;
		d->last_line = line;
		p = le < e ? le + 1 : e;
	}
	if (d->fixed && d->n != expect && d->n > 0)
		return npoints_error(d, expect, d->n > expect, d->last_line, name, err);
	return IRR_OK;
}

/* ##XYPOINTS=(XY..XY) and ##PEAK TABLE=(XY..XY)/(XYW..XYW): groups of
 * numbers in AFFN or PAC, groups separated by ';' or blanks. */
static int decode_pairs(decoded *d, const record *r, int group, size_t limit,
                        const char *recname, const char *name, irr_error *err)
{
	long line;
	const char *p = data_start(r, &line), *e = r->end;
	size_t k = 0, np = 0;
	int rc;
	for (; p < e; line++) {
		const char *de, *le = line_end(p, e, &de), *q = p;
		token t;
		for (;;) {
			next_token(&q, de, 1, &t);
			if (t.kind == TK_END)
				break;
			if (t.kind != TK_ABS)
				return token_error(&t, q, name, line, recname, err);
			if (k < 2) {
				if ((rc = push_value(d, t.v, 2 * limit, name, line, "values", err)) < 0)
					return rc;
				if (k == 0) {
					if (np == d->ncap_lines) {
						size_t c = d->ncap_lines ? 2 * d->ncap_lines : 1024;
						long *nl = realloc(d->lines, c * sizeof *nl);
						if (!nl)
							return irr_spectrum__fail(err, IRR_ENOMEM, name, line, "out of memory");
						d->lines = nl;
						d->ncap_lines = c;
					}
					d->lines[np++] = line;
				}
			}
			k = (k + 1) % (size_t)group;
		}
		/* A group does not run over a line end. */
		if (k != 0)
			return irr_spectrum__fail(err, IRR_EINPUT, name, line,
			                     "##%s line ends in the middle of a group: an X without its Y%s",
			                     recname, group == 3 ? " and width" : "");
		d->last_line = line;
		p = le < e ? le + 1 : e;
	}
	return IRR_OK;
}

/* ---- the reader ------------------------------------------------------------ */

typedef struct header {
	hval xfactor, yfactor, firstx, lastx, deltax, npoints, firsty, maxy, miny, maxx, minx;
	const record *xunits, *yunits, *data;
} header;

static int choose_block(const scan *sc, const irr_read_options *o, const char *name,
                        irr_error *err)
{
	int want = o ? o->block : 0;
	if (want > 0) {
		if ((size_t)want > sc->nblk)
			return irr_spectrum__fail(err, IRR_ENOTFOUND, name, 0,
			                     "block %d asked for, but the file has %zu block%s",
			                     want, sc->nblk, sc->nblk == 1 ? "" : "s");
		if (sc->blk[want - 1].data_rec < 0)
			return irr_spectrum__fail(err, IRR_ENOTFOUND, name, sc->rec[sc->blk[want - 1].title_rec].line,
			                     "block %d (%s) holds no ##XYDATA, ##XYPOINTS or ##PEAK TABLE",
			                     want, sc->blk[want - 1].data_type[0] ? sc->blk[want - 1].data_type : "no ##DATA TYPE");
		return want - 1;
	}
	if (want < 0)
		return irr_spectrum__fail(err, IRR_EINPUT, name, 0, "block numbers start at 1");
	/* The first infrared block with a continuous spectrum; else the first
	 * infrared peak table; else a lone data block that does not say. */
	for (int pass = 0; pass < 2; pass++)
		for (size_t i = 0; i < sc->nblk; i++) {
			const block *b = &sc->blk[i];
			if (b->data_rec < 0 || !is_infrared(b))
				continue;
			if (pass == 0 && !strcmp(sc->rec[b->data_rec].label, "PEAKTABLE"))
				continue;
			return (int)i;
		}
	{
		int found = -1, ndata = 0;
		for (size_t i = 0; i < sc->nblk; i++)
			if (sc->blk[i].data_rec >= 0) {
				ndata++;
				if (found < 0 && !sc->blk[i].data_type[0])
					found = (int)i;
			}
		if (ndata == 1 && found >= 0)
			return found;
		if (ndata == 0) {
			for (size_t i = 0; i < sc->nblk; i++)
				if (sc->blk[i].ntuples_rec >= 0)
					return irr_spectrum__fail(err, IRR_EINPUT, name, sc->rec[sc->blk[i].ntuples_rec].line,
					                     "##NTUPLES (multi-page) data are not supported; no ##XYDATA, ##XYPOINTS or ##PEAK TABLE record");
			return irr_spectrum__fail(err, IRR_EINPUT, name, 0,
			                     "no data record: the file has no ##XYDATA, ##XYPOINTS or ##PEAK TABLE");
		}
		return irr_spectrum__fail(err, IRR_ENOTFOUND, name, 0,
		                     "no infrared block among %zu blocks; choose one by number (list the blocks first)",
		                     sc->nblk);
	}
}

static irr_yunits parse_yunits(const char *t, int *known)
{
	char u[64];
	size_t n = 0;
	for (const char *p = t; *p && n + 1 < sizeof u; p++)
		if (*p != ' ' && *p != '-' && *p != '_')
			u[n++] = upper(*p);
	u[n] = '\0';
	*known = 1;
	if (!strcmp(u, "%T") || !strcmp(u, "PERCENTTRANSMITTANCE") || !strcmp(u, "%TRANSMITTANCE") ||
	    !strcmp(u, "TRANSMITTANCE(%)") || !strcmp(u, "T%"))
		return IRR_Y_PERCENT_T;
	if (!strcmp(u, "TRANSMITTANCE") || !strcmp(u, "T"))
		return IRR_Y_TRANSMITTANCE;
	if (!strcmp(u, "ABSORBANCE") || !strcmp(u, "A") || !strcmp(u, "ABS"))
		return IRR_Y_ABSORBANCE;
	if (!strcmp(u, "REFLECTANCE") || !strcmp(u, "R") || !strcmp(u, "%R") ||
	    !strcmp(u, "PERCENTREFLECTANCE"))
		return IRR_Y_REFLECTANCE;
	if (!strcmp(u, "KUBELKAMUNK") || !strcmp(u, "KM"))
		return IRR_Y_KUBELKA_MUNK;
	if (!strcmp(u, "ARBITRARYUNITS") || !strcmp(u, "ARBITRARY") || !strcmp(u, "AU") ||
	    !strcmp(u, "ARB.UNITS") || !strcmp(u, "A.U."))
		return IRR_Y_ARBITRARY;
	*known = 0;
	return IRR_Y_UNKNOWN;
}

/* 0 = cm-1, 1 = micrometres, -1 = other. */
static int parse_xunits(const char *t)
{
	char u[64];
	size_t n = 0;
	for (const char *p = t; *p && n + 1 < sizeof u; p++)
		if (*p != ' ')
			u[n++] = upper(*p);
	u[n] = '\0';
	if (!strcmp(u, "1/CM") || !strcmp(u, "CM-1") || !strcmp(u, "CM^-1") ||
	    !strcmp(u, "WAVENUMBERS") || !strcmp(u, "WAVENUMBER") || !strcmp(u, "CM**-1"))
		return 0;
	if (!strcmp(u, "MICROMETERS") || !strcmp(u, "MICROMETRES") || !strcmp(u, "MICRONS") ||
	    !strcmp(u, "UM") || !strcmp(u, "MICROMETER"))
		return 1;
	return -1;
}

static int warn(const char *name, irr_error *err, int rc)
{
	return rc < 0 ? irr_spectrum__fail(err, IRR_ENOMEM, name, 0, "out of memory") : IRR_OK;
}

/* Y-range checks (##FIRSTY, ##MAXY, ##MINY) against the decoded data.
 * Header values are rounded by their writers: the tolerance is one YFACTOR
 * step or half a unit in the last printed digit, whichever is larger. */
static int check_y_headers(irr_spectrum *s, const header *h, double raw0, double rmin,
                           double rmax, double yf, const char *name, irr_error *err)
{
	double step = fabs(yf);
	int rc = IRR_OK, firsty_bad = 0;
	if (yf < 0) {
		double t = rmax;
		rmax = rmin;
		rmin = t;
	}
	if (h->firsty.have) {
		double y0 = raw0 * yf;
		double tol = fmax(step, 0.5 * printed_unit(h->firsty.text)) + 1e-9 * fabs(h->firsty.v);
		if (fabs(y0 - h->firsty.v) > tol) {
			double implied = raw0 != 0.0 ? h->firsty.v / raw0 : 0.0;
			int maxy_agrees = 0;
			firsty_bad = 1;
			if (implied != 0.0 && h->maxy.have) {
				/* FIRSTY is itself rounded (jtpolysd's to ~1e-8): the
				 * implied factor only counts to a few parts per million. */
				double tm = fmax(fabs(implied), 0.5 * printed_unit(h->maxy.text)) + 1e-5 * fabs(h->maxy.v);
				double m = implied > 0 ? rmax * implied : rmin * implied;
				if (yf < 0)
					m = implied > 0 ? rmin * implied : rmax * implied;
				maxy_agrees = fabs(m - h->maxy.v) <= tm;
			}
			char hint[128] = "";
			if (implied != 0.0) {
				/* Six digits: the rounding of FIRSTY allows no more. */
				char num[40];
				double mag = pow(10.0, floor(log10(fabs(implied))) - 5);
				irr_format_double(num, sizeof num, nearbyint(implied / mag) * mag, -1);
				snprintf(hint, sizeof hint, "; %s fit a YFACTOR of %s",
				         maxy_agrees ? "##FIRSTY and ##MAXY both" : "##FIRSTY would", num);
			}
			rc = irr_spectrum__warn(s,
			        "##YFACTOR=%s does not fit ##FIRSTY=%s: the first Y decodes to %.8g (off by %.3g, more than one YFACTOR step)%s",
			        h->yfactor.text, h->firsty.text, y0, y0 - h->firsty.v, hint);
			if ((rc = warn(name, err, rc)) < 0)
				return rc;
		}
	}
	if (h->maxy.have) {
		double v = rmax * yf, tol = fmax(step, 0.5 * printed_unit(h->maxy.text)) + 1e-9 * fabs(h->maxy.v);
		if (yf < 0)
			v = rmin * yf;
		if (fabs(v - h->maxy.v) > tol &&
		    (rc = warn(name, err, irr_spectrum__warn(s,
		             "##MAXY=%s disagrees with the largest decoded Y, %.8g%s", h->maxy.text, v,
		             firsty_bad ? " (see ##YFACTOR)" : ""))) < 0)
			return rc;
	}
	if (h->miny.have) {
		double v = rmin * yf, tol = fmax(step, 0.5 * printed_unit(h->miny.text)) + 1e-9 * fabs(h->miny.v);
		if (yf < 0)
			v = rmax * yf;
		if (fabs(v - h->miny.v) > tol &&
		    (rc = warn(name, err, irr_spectrum__warn(s,
		             "##MINY=%s disagrees with the smallest decoded Y, %.8g%s", h->miny.text, v,
		             firsty_bad ? " (see ##YFACTOR)" : ""))) < 0)
			return rc;
	}
	return IRR_OK;
}

int irr_jcamp__read(irr_spectrum **out, const char *data, size_t len,
                    const char *name, const irr_read_options *o, irr_error *err)
{
	scan sc;
	header h;
	decoded d;
	irr_spectrum *s = NULL;
	const block *b;
	int bi, rc, xum = 0;
	size_t limit = irr_spectrum__max_points(o), n;
	double xf, yf;
	char text[128];

	*out = NULL;
	memset(&h, 0, sizeof h);
	memset(&d, 0, sizeof d);
	if ((rc = scan_records(&sc, data, len, name, err)) < 0)
		goto done;
	if ((rc = bi = choose_block(&sc, o, name, err)) < 0)
		goto done;
	b = &sc.blk[bi];

	if ((rc = irr_spectrum__create(&s, 0, name, "jcamp-dx", err)) < 0)
		goto done;
	block_title(&sc, b, text, sizeof text);
	if (irr_spectrum__set_title(s, text, strlen(text)) < 0)
		goto nomem;

	/* The block's own header records (a child block's records are its own). */
	for (size_t i = (size_t)b->title_rec + 1; i < sc.nrec; i++) {
		const record *r = &sc.rec[i];
		hval *hv = NULL;
		if (r->block != bi) {
			if ((int)i > b->end_rec && b->end_rec >= 0)
				break;
			continue;
		}
		if (!strcmp(r->label, "END"))
			break;
		if (!strcmp(r->label, "XFACTOR")) hv = &h.xfactor;
		else if (!strcmp(r->label, "YFACTOR")) hv = &h.yfactor;
		else if (!strcmp(r->label, "FIRSTX")) hv = &h.firstx;
		else if (!strcmp(r->label, "LASTX")) hv = &h.lastx;
		else if (!strcmp(r->label, "DELTAX")) hv = &h.deltax;
		else if (!strcmp(r->label, "NPOINTS")) hv = &h.npoints;
		else if (!strcmp(r->label, "FIRSTY")) hv = &h.firsty;
		else if (!strcmp(r->label, "MAXY")) hv = &h.maxy;
		else if (!strcmp(r->label, "MINY")) hv = &h.miny;
		else if (!strcmp(r->label, "MAXX")) hv = &h.maxx;
		else if (!strcmp(r->label, "MINX")) hv = &h.minx;
		else if (!strcmp(r->label, "XUNITS") || !strcmp(r->label, "YUNITS")) {
			const record **slot = r->label[0] == 'X' ? &h.xunits : &h.yunits;
			if (*slot) {
				char t1[128], t2[128];
				record_text(*slot, t1, sizeof t1, 1);
				record_text(r, t2, sizeof t2, 1);
				if (strcmp(t1, t2) != 0) {
					rc = irr_spectrum__fail(err, IRR_EINPUT, name, r->line,
					                   "##%s given twice in the block with different values (%s at line %ld, %s here)",
					                   r->label, t1, (*slot)->line, t2);
					goto done;
				}
			} else {
				*slot = r;
			}
		} else if (!strcmp(r->label, "XYDATA") || !strcmp(r->label, "XYPOINTS") ||
		           !strcmp(r->label, "PEAKTABLE")) {
			if ((int)i == b->data_rec) {
				h.data = r;
			} else if (!strcmp(r->label, sc.rec[b->data_rec].label)) {
				rc = irr_spectrum__fail(err, IRR_EINPUT, name, r->line,
				                   "##%s appears twice in the block (first at line %ld)",
				                   r->label, sc.rec[b->data_rec].line);
				goto done;
			}
		}
		if (hv) {
			if (hv->have) {
				hval again;
				if ((rc = header_number(r, &again, name, err)) < 0)
					goto done;
				if (again.v != hv->v) {
					rc = irr_spectrum__fail(err, IRR_EINPUT, name, r->line,
					                   "##%s given twice in the block with different values (%s at line %ld, %s here)",
					                   r->label, hv->text, hv->line, again.text);
					goto done;
				}
				continue;
			}
			if ((rc = header_number(r, hv, name, err)) < 0)
				goto done;
		}
	}
	if (!h.data) {
		rc = irr_spectrum__fail(err, IRR_EINPUT, name, sc.rec[b->title_rec].line,
		                   "no data record in the block");
		goto done;
	}


	/* Units. */
	if (h.xunits) {
		record_text(h.xunits, text, sizeof text, 1);
		xum = parse_xunits(text);
		if (xum < 0) {
			rc = irr_spectrum__fail(err, IRR_EINPUT, name, h.xunits->line,
			                   "##XUNITS=%s is not supported (1/CM or MICROMETERS)", text);
			goto done;
		}
	} else if ((rc = warn(name, err, irr_spectrum__warn(s, "no ##XUNITS: X read as 1/CM"))) < 0) {
		goto done;
	}
	s->x_micrometers = xum;
	if (h.yunits) {
		int known;
		record_text(h.yunits, text, sizeof text, 1);
		s->units = parse_yunits(text, &known);
		if (!known) {
			rc = irr_spectrum__fail(err, IRR_EINPUT, name, h.yunits->line,
			                   "##YUNITS=%s is not an infrared ordinate (TRANSMITTANCE, %%T, ABSORBANCE, REFLECTANCE, KUBELKA-MUNK or ARBITRARY UNITS)",
			                   text);
			goto done;
		}
	}
	s->source_units = s->units;

	xf = h.xfactor.have ? h.xfactor.v : 1.0;
	yf = h.yfactor.have ? h.yfactor.v : 1.0;
	if (xf == 0.0 || yf == 0.0) {
		rc = irr_spectrum__fail(err, IRR_EINPUT, name, xf == 0.0 ? h.xfactor.line : h.yfactor.line,
		                   "##%s is zero", xf == 0.0 ? "XFACTOR" : "YFACTOR");
		goto done;
	}
	if (h.npoints.have) {
		if (h.npoints.v < 1 || h.npoints.v != floor(h.npoints.v)) {
			rc = irr_spectrum__fail(err, IRR_EINPUT, name, h.npoints.line,
			                   "##NPOINTS=%s is not a positive whole number", h.npoints.text);
			goto done;
		}
		/* Checked before anything is allocated for the data. */
		if (h.npoints.v > (double)limit) {
			rc = irr_spectrum__fail(err, IRR_ELIMIT, name, h.npoints.line,
			                   "##NPOINTS=%s is more than the limit of %zu points",
			                   h.npoints.text, limit);
			goto done;
		}
	}

	record_text(h.data, text, sizeof text, 1);
	{
		char form[64];
		normalise_label(text, text + strlen(text), form, sizeof form);
		if (!strcmp(h.data->label, "XYDATA")) {
			double x0, dx = 0.0, dxh;
			int dx_from_lastx = 0;
			size_t np = h.npoints.have ? (size_t)h.npoints.v : 0;
			if (strcmp(form, "(X++(Y..Y))") != 0) {
				rc = irr_spectrum__fail(err, IRR_EINPUT, name, h.data->line,
				                   "##XYDATA=%s is not supported (only (X++(Y..Y)))", text);
				goto done;
			}
			if (!h.firstx.have || !(h.lastx.have || h.deltax.have)) {
				rc = irr_spectrum__fail(err, IRR_EINPUT, name, h.data->line,
				                   "##XYDATA needs ##FIRSTX and ##LASTX (or ##DELTAX)");
				goto done;
			}
			x0 = h.firstx.v;
			if (np > 1 && h.lastx.have) {
				dx = (h.lastx.v - x0) / (double)(np - 1);
				dx_from_lastx = 1;
			} else if (h.deltax.have) {
				dx = h.deltax.v;
			}
			if ((rc = decode_xydata(&d, h.data, np, limit, xf, x0, dx, name, err)) < 0)
				goto done;
			if (d.n == 0) {
				rc = irr_spectrum__fail(err, IRR_EINPUT, name, h.data->line,
				                   "##XYDATA holds no values (truncated?)");
				goto done;
			}
			if (h.npoints.have && d.n != np) {
				rc = irr_spectrum__fail(err, IRR_EINPUT, name, d.last_line ? d.last_line : h.data->line,
				                   "##NPOINTS=%zu but ##XYDATA holds %zu values%s",
				                   np, d.n, d.n < np ? " (truncated?)" : "");
				goto done;
			}
			n = d.n;
			if (!h.npoints.have) {
				if ((rc = warn(name, err, irr_spectrum__warn(s,
				             "no ##NPOINTS: %zu points counted in the data", n))) < 0)
					goto done;
				if (h.lastx.have && n > 1) {
					dx = (h.lastx.v - x0) / (double)(n - 1);
					dx_from_lastx = 1;
				}
			}
			if (n > 1 && dx == 0.0) {
				rc = irr_spectrum__fail(err, IRR_EINPUT, name, h.firstx.line,
				                   "X is not monotonic: ##FIRSTX equals ##LASTX");
				goto done;
			}
			/* Header cross-checks: warnings, naming the record. */
			if (h.deltax.have && n > 1 && h.lastx.have) {
				dxh = h.deltax.v;
				if (fabs(dxh - dx) > fmax(0.5 * printed_unit(h.deltax.text), 1e-6 * fabs(dx)) &&
				    (rc = warn(name, err, irr_spectrum__warn(s,
				             "##DELTAX=%s disagrees with (##LASTX - ##FIRSTX)/(##NPOINTS - 1) = %.10g",
				             h.deltax.text, dx))) < 0)
					goto done;
			}
			if (d.have_line_x) {
				double fx = d.first_line_x * xf;
				double tol = 0.5 * fabs(dx) + fabs(xf) + 0.5 * printed_unit(h.firstx.text);
				if (fabs(fx - x0) > tol &&
				    (rc = warn(name, err, irr_spectrum__warn(s,
				             "##FIRSTX=%s disagrees with the first data line's X, %.10g (##XFACTOR=%s)",
				             h.firstx.text, fx, h.xfactor.have ? h.xfactor.text : "1"))) < 0)
					goto done;
				if (d.line_mismatch && fabs(d.first_line_x * xf - x0) <= tol &&
				    (rc = warn(name, err, irr_spectrum__warn(s,
				             "data line %ld starts at X = %.10g where ##FIRSTX, ##LASTX and ##NPOINTS put X = %.10g (one of them, or ##XFACTOR, is wrong)",
				             d.line_mismatch, d.mismatch_x, d.mismatch_expect))) < 0)
					goto done;
				if (h.lastx.have && n > 1) {
					double lx = d.last_line_x * xf + (double)(n - 1 - d.last_line_index) * dx;
					double tl = 0.5 * fabs(dx) + fabs(xf) + 0.5 * printed_unit(h.lastx.text);
					if (fabs(lx - h.lastx.v) > tl &&
					    (rc = warn(name, err, irr_spectrum__warn(s,
					             "##LASTX=%s disagrees with the last data line, which ends at X = %.10g",
					             h.lastx.text, lx))) < 0)
						goto done;
				}
			}
			if (!(s->x = malloc(n * sizeof *s->x)))
				goto nomem;
			s->y = d.raw;
			d.raw = NULL;
			s->n = n;
			if (n < 2) {
				rc = irr_spectrum__fail(err, IRR_EINPUT, name, h.data->line,
				                   "1 data point: a spectrum needs at least 2");
				goto done;
			}
			{
				/* An evenly spaced axis is monotonic by construction
				 * and positive when both ends are; z is NaN exactly
				 * when some scaled Y is not finite. The raw extremes
				 * for the header checks on the way. */
				double z, raw0 = s->y[0], rmin, rmax;
				irr_spectrum__scale_points(s->x, s->y, n, x0, dx, yf, &rmin, &rmax, &z);
				if (dx_from_lastx)
					s->x[n - 1] = h.lastx.v;
				if ((rc = check_y_headers(s, &h, raw0, rmin, rmax, yf, name, err)) < 0)
					goto done;
				if (z != 0.0 || !isfinite(s->x[0]) || !isfinite(s->x[n - 1])) {
					size_t i = 0;
					while (i < n && isfinite(s->y[i]))
						i++;
					rc = irr_spectrum__fail(err, IRR_EINPUT, name, h.data->line,
					                   "point %zu is not a finite number after scaling by ##XFACTOR/##YFACTOR",
					                   i + 1);
					goto done;
				}
				if (!(s->x[0] > 0) || !(s->x[n - 1] > 0)) {
					rc = irr_spectrum__fail(err, IRR_EINPUT, name, h.firstx.line,
					                   "X runs from %.10g to %.10g: wavenumbers (and wavelengths) are positive, not negative or zero",
					                   s->x[0], s->x[n - 1]);
					goto done;
				}
			}
		} else {
			int group = 2;
			const char *recname = !strcmp(h.data->label, "XYPOINTS") ? "XYPOINTS" : "PEAK TABLE";
			if (!strcmp(form, "(XYW..XYW)") && strcmp(recname, "PEAK TABLE") == 0)
				group = 3;
			else if (strcmp(form, "(XY..XY)") != 0) {
				rc = irr_spectrum__fail(err, IRR_EINPUT, name, h.data->line,
				                   "##%s=%s is not supported (only (XY..XY)%s)", recname, text,
				                   group == 2 && !strcmp(recname, "PEAK TABLE") ? " or (XYW..XYW)" : "");
				goto done;
			}
			if ((rc = decode_pairs(&d, h.data, group, limit, recname, name, err)) < 0)
				goto done;
			n = d.n / 2;
			if (n == 0) {
				rc = irr_spectrum__fail(err, IRR_EINPUT, name, h.data->line,
				                   "##%s holds no values (truncated?)", recname);
				goto done;
			}
			if (h.npoints.have && (double)n != h.npoints.v) {
				rc = irr_spectrum__fail(err, IRR_EINPUT, name, d.last_line ? d.last_line : h.data->line,
				                   "##NPOINTS=%s but ##%s holds %zu points%s", h.npoints.text,
				                   recname, n, (double)n < h.npoints.v ? " (truncated?)" : "");
				goto done;
			}
			if (!(s->x = malloc(n * sizeof *s->x)) || !(s->y = malloc(n * sizeof *s->y)))
				goto nomem;
			s->n = n;
			for (size_t i = 0; i < n; i++) {
				s->x[i] = d.raw[2 * i] * xf;
				s->y[i] = d.raw[2 * i + 1] * yf;
			}
			if (!strcmp(recname, "PEAK TABLE")) {
				/* Peak tables need not be in order; a stick spectrum
				 * must be. Insertion sort: tables are short and
				 * usually sorted already. */
				for (size_t i = 1; i < n; i++) {
					double xv = s->x[i], yv = s->y[i];
					long lv = d.lines[i];
					size_t j = i;
					while (j > 0 && s->x[j - 1] > xv) {
						s->x[j] = s->x[j - 1];
						s->y[j] = s->y[j - 1];
						d.lines[j] = d.lines[j - 1];
						j--;
					}
					s->x[j] = xv;
					s->y[j] = yv;
					d.lines[j] = lv;
				}
				if ((rc = warn(name, err, irr_spectrum__warn(s,
				             "##PEAK TABLE read as %zu sticks, not a continuous spectrum", n))) < 0)
					goto done;
			}
			if ((rc = irr_spectrum__check_xy(s, d.lines, err)) < 0)
				goto done;
			if (h.firstx.have && fabs(s->x[0] - h.firstx.v) > fabs(xf) + 0.5 * printed_unit(h.firstx.text) + 1e-9 * fabs(h.firstx.v) &&
			    strcmp(recname, "PEAK TABLE") &&
			    (rc = warn(name, err, irr_spectrum__warn(s,
			             "##FIRSTX=%s disagrees with the first X, %.10g", h.firstx.text, s->x[0]))) < 0)
				goto done;
			if (h.lastx.have && fabs(s->x[n - 1] - h.lastx.v) > fabs(xf) + 0.5 * printed_unit(h.lastx.text) + 1e-9 * fabs(h.lastx.v) &&
			    strcmp(recname, "PEAK TABLE") &&
			    (rc = warn(name, err, irr_spectrum__warn(s,
			             "##LASTX=%s disagrees with the last X, %.10g", h.lastx.text, s->x[n - 1]))) < 0)
				goto done;
		}
	}
	/* ##MAXX / ##MINX against the (monotonic) axis. */
	{
		double a = s->x[0], z = s->x[s->n - 1];
		double mn = a < z ? a : z, mx = a < z ? z : a;
		const hval *hv[2] = {&h.maxx, &h.minx};
		const double got[2] = {mx, mn};
		for (int k = 0; k < 2; k++) {
			if (!hv[k]->have)
				continue;
			double tol = fabs(xf) + 0.5 * printed_unit(hv[k]->text) + 1e-9 * fabs(hv[k]->v);
			if (fabs(got[k] - hv[k]->v) > tol &&
			    (rc = warn(name, err, irr_spectrum__warn(s,
			             "##%s=%s disagrees with the %s X of the data, %.10g",
			             k ? "MINX" : "MAXX", hv[k]->text, k ? "smallest" : "largest", got[k]))) < 0)
				goto done;
		}
	}
	/* Checked after the data, whose count says more about a truncation. */
	if (b->end_rec < 0) {
		rc = irr_spectrum__fail(err, IRR_EINPUT, name, sc.rec[b->title_rec].line,
		                   "the block has no ##END= record (truncated file?)");
		goto done;
	}
	s->first_x = s->x[0];
	s->last_x = s->x[s->n - 1];
	s->y_step = fabs(yf);
	*out = s;
	s = NULL;
	rc = IRR_OK;
	goto done;
nomem:
	rc = irr_spectrum__fail(err, IRR_ENOMEM, name, 0, "out of memory");
done:
	free(d.raw);
	free(d.lines);
	irr_spectrum_free(s);
	scan_free(&sc);
	return rc;
}
