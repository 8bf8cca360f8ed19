/* json_write.c: compact JSON text written straight into a buffer (see
 * json_write.h). The batch writes thousands of results a second; printing
 * them through a cJSON tree cost more than reading and checking the
 * samples, mostly in cJSON's number printing, which formats every number
 * with "%1.15g" and parses it back to test the round trip. */
#include "json_write.h"

#include <float.h>
#include <limits.h>
#include <locale.h>
#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Exact powers of ten (every one up to 1e22 is a double). */
static const double p10[] = {1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9};

static size_t put_uint(char *out, unsigned long long v)
{
	char tmp[24];
	size_t n = 0, i;
	do {
		tmp[n++] = (char)('0' + v % 10);
		v /= 10;
	} while (v);
	for (i = 0; i < n; i++)
		out[i] = tmp[n - 1 - i];
	return n;
}

/* cJSON's own path, kept for the numbers the fast path does not take. */
static size_t slow_number(char *out, double d)
{
	char nb[26];
	double test = 0.0;
	char dp = localeconv()->decimal_point[0];
	int len = snprintf(nb, sizeof nb, "%1.15g", d);
	if (sscanf(nb, "%lg", &test) == 1) {
		double mx = fabs(test) > fabs(d) ? fabs(test) : fabs(d);
		if (!(fabs(test - d) <= mx * DBL_EPSILON))
			len = snprintf(nb, sizeof nb, "%1.17g", d);
	} else {
		len = snprintf(nb, sizeof nb, "%1.17g", d);
	}
	if (len < 0 || len > 25)
		len = 0;
	for (int i = 0; i < len; i++)
		out[i] = nb[i] == dp ? '.' : nb[i];
	out[len] = '\0';
	return (size_t)len;
}

size_t irr_json__format_number(char *out, double d)
{
	int vi;
	double ad = fabs(d);
	if (isnan(d) || isinf(d)) {
		memcpy(out, "null", 5);
		return 4;
	}
	if (d >= INT_MAX)
		vi = INT_MAX;
	else if (d <= (double)INT_MIN)
		vi = INT_MIN;
	else
		vi = (int)d;
	if (d == (double)vi) {
		size_t n = 0;
		/* "%1.15g" keeps the sign of a negative zero. */
		if (vi < 0 || signbit(d))
			out[n++] = '-';
		n += put_uint(out + n, vi < 0 ? (unsigned long long)(-(long long)vi) : (unsigned long long)vi);
		out[n] = '\0';
		return n;
	}
	/* When d is the double nearest to K / 10^dec with |K| < 10^15, "%1.15g"
	 * prints exactly that decimal (d lies within 1.2e-16 of it, relative,
	 * under half a unit of the 15th digit), it reads back as d, and with
	 * 1e-4 <= |d| < 1e15 "%g" picks the fixed notation; so the digits of K
	 * are the answer. The division is correctly rounded, so `k / f == d`
	 * is exactly the test "d is the double nearest to K / 10^dec". */
	if (ad >= 1e-4 && ad < 1e15) {
		for (int dec = 0; dec < (int)(sizeof p10 / sizeof p10[0]); dec++) {
			double f = p10[dec], x = d * f, k;
			if (fabs(x) >= 1e15)
				break;
			k = nearbyint(x);
			if (k / f == d) {
				char dig[24];
				unsigned long long K = (unsigned long long)fabs(k);
				size_t nd = put_uint(dig, K), n = 0, ip, end;
				if (k < 0)
					out[n++] = '-';
				if (nd <= (size_t)dec) {
					/* 0.000ddd */
					out[n++] = '0';
					out[n++] = '.';
					for (size_t z = nd; z < (size_t)dec; z++)
						out[n++] = '0';
					memcpy(out + n, dig, nd);
					n += nd;
				} else {
					ip = nd - (size_t)dec;
					memcpy(out + n, dig, ip);
					n += ip;
					if (dec) {
						out[n++] = '.';
						memcpy(out + n, dig + ip, (size_t)dec);
						n += (size_t)dec;
					}
				}
				if (dec) {
					end = n;
					while (out[end - 1] == '0')
						end--;
					if (out[end - 1] == '.')
						end--;
					n = end;
				}
				out[n] = '\0';
				return n;
			}
		}
	}
	return slow_number(out, d);
}

/* Room for n more bytes and the NUL; the buffer starts large enough for a
 * typical result, so it is rarely moved. */
static char *room(irr_jw *w, size_t n)
{
	irr_buf *b = &w->out;
	if (b->oom)
		return NULL;
	if (b->len + n + 1 > b->cap) {
		size_t cap = b->cap ? b->cap : 16384;
		char *np;
		while (cap < b->len + n + 1)
			cap *= 2;
		np = realloc(b->p, cap);
		if (!np) {
			b->oom = 1;
			return NULL;
		}
		b->p = np;
		b->cap = cap;
	}
	return b->p + b->len;
}

static void put(irr_jw *w, const char *s, size_t n)
{
	char *q = room(w, n);
	if (q) {
		memcpy(q, s, n);
		w->out.len += n;
		w->out.p[w->out.len] = '\0';
	}
}

/* RFC 8259 escapes as cJSON writes them: the two-character forms where
 * they exist, \u00xx in lower-case hex for the other control characters,
 * everything from 0x20 up (UTF-8 included) as it is but '"' and '\'. */
static const char esc_kind[256] = {
	'u', 'u', 'u', 'u', 'u', 'u', 'u', 'u', 'b', 't', 'n', 'u', 'f', 'r', 'u', 'u',
	'u', 'u', 'u', 'u', 'u', 'u', 'u', 'u', 'u', 'u', 'u', 'u', 'u', 'u', 'u', 'u',
	0, 0, '"', 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0,
	0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0,
	0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0,
	0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, '\\', 0, 0, 0};

/* Writes the n bytes of s quoted and escaped at q (room for 6 n + 2);
 * returns the end. */
static char *quote(char *q, const char *s, size_t n)
{
	static const char hex[] = "0123456789abcdef";
	const unsigned char *p = (const unsigned char *)s, *e = p + n;
	*q++ = '"';
	for (; p < e; p++) {
		char k = esc_kind[*p];
		if (!k) {
			*q++ = (char)*p;
			continue;
		}
		*q++ = '\\';
		*q++ = k;
		if (k == 'u') {
			*q++ = '0';
			*q++ = '0';
			*q++ = hex[*p >> 4];
			*q++ = hex[*p & 15];
		}
	}
	*q++ = '"';
	return q;
}

/* One member: the comma before it, the key inside objects, then either
 * the string `str` (quoted) or the raw text `raw` (rn bytes), all written
 * into one reservation. Returns 0 once the writer failed. */
static int member(irr_jw *w, const char *key, const char *str, const char *raw, size_t rn)
{
	size_t kn = key ? strlen(key) : 0, sn = str ? strlen(str) : 0;
	char *q, *q0;
	if (w->bad || w->out.oom)
		return 0;
	if (!(q = q0 = room(w, 1 + (key ? 6 * kn + 3 : 0) + (str ? 6 * sn + 2 : rn))))
		return 0;
	if (w->depth > 0) {
		if (!w->first[w->depth - 1])
			*q++ = ',';
		w->first[w->depth - 1] = 0;
	}
	if (key) {
		q = quote(q, key, kn);
		*q++ = ':';
	}
	if (str) {
		q = quote(q, str, sn);
	} else {
		memcpy(q, raw, rn);
		q += rn;
	}
	*q = '\0';
	w->out.len += (size_t)(q - q0);
	return 1;
}

static void open_(irr_jw *w, const char *key, const char *bracket)
{
	if (w->depth >= IRR_JW_MAX_DEPTH) {
		if (!w->out.oom)
			w->bad = 1;
		return;
	}
	if (!member(w, key, NULL, bracket, 1))
		return;
	w->is_array[w->depth] = bracket[0] == '[';
	w->first[w->depth++] = 1;
}

void irr_jw__begin_object(irr_jw *w, const char *key) { open_(w, key, "{"); }
void irr_jw__begin_array(irr_jw *w, const char *key) { open_(w, key, "["); }

void irr_jw__end(irr_jw *w)
{
	if (w->bad || w->out.oom)
		return;
	if (w->depth == 0) {
		w->bad = 1;
		return;
	}
	w->depth--;
	put(w, w->is_array[w->depth] ? "]" : "}", 1);
}

void irr_jw__string(irr_jw *w, const char *key, const char *v)
{
	member(w, key, v, "null", 4);
}

void irr_jw__number(irr_jw *w, const char *key, double v)
{
	char nb[32];
	size_t n = irr_json__format_number(nb, v);
	member(w, key, NULL, nb, n);
}

void irr_jw__bool(irr_jw *w, const char *key, int v)
{
	member(w, key, NULL, v ? "true" : "false", v ? 4 : 5);
}

void irr_jw__null(irr_jw *w, const char *key)
{
	member(w, key, NULL, "null", 4);
}
