/* common.c: error records, enum names, and locale-independent numbers. */
#include "irrecon/common.h"

#include <errno.h>
#include <locale.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* One "C" locale object for the process; newlocale is thread-safe and the
 * object is never freed (it lives as long as the library). */
static locale_t c_locale(void)
{
	static locale_t loc;
	if (!loc)
		loc = newlocale(LC_ALL_MASK, "C", (locale_t)0);
	return loc;
}

int irr_error_set(irr_error *err, int code, const char *file, long line,
                  const char *fmt, ...)
{
	va_list ap;
	if (!err)
		return code;
	err->code = code;
	err->line = line;
	snprintf(err->file, sizeof err->file, "%s", file ? file : "");
	{
		/* Messages quote numbers ("%g"): print them with '.', whatever
		 * locale the embedding program (or Open Babel) has set. */
		locale_t old = uselocale(c_locale());
		va_start(ap, fmt);
		vsnprintf(err->message, sizeof err->message, fmt, ap);
		va_end(ap);
		uselocale(old);
	}
	/* One-line errors: a stray newline from a quoted input would split it.
	 * File names come from inputs too (a request may name any path): their
	 * control characters show as '?', as ls -q shows them. */
	for (char *p = err->message; *p; p++)
		if (*p == '\n' || *p == '\r')
			*p = ' ';
	for (char *p = err->file; *p; p++)
		if ((unsigned char)*p < 0x20 || *p == 0x7f)
			*p = '?';
	return code;
}

void irr_error_clear(irr_error *err)
{
	if (err)
		memset(err, 0, sizeof *err);
}

void irr_error_format(const irr_error *err, char *buf, size_t size)
{
	if (!buf || !size)
		return;
	if (!err) {
		buf[0] = '\0';
		return;
	}
	if (err->file[0] && err->line > 0)
		snprintf(buf, size, "%s:%ld: %s", err->file, err->line, err->message);
	else if (err->file[0])
		snprintf(buf, size, "%s: %s", err->file, err->message);
	else
		snprintf(buf, size, "%s", err->message);
}

static const char *const intensity_names[] = {"none", "weak", "medium", "strong", "variable"};
static const char *const shape_names[] = {"sharp", "broad", "very_broad", "doublet"};
static const char *const phase_names[] = {"condensed", "solution", "gas"};
static const char *const sampling_names[] = {"atr", "transmission"};

static int parse_name(const char *s, const char *const *names, int n, int *out)
{
	if (!s)
		return IRR_EINPUT;
	for (int i = 0; i < n; i++) {
		const char *a = s, *b = names[i];
		/* Case-insensitive, and '-' or ' ' accepted for '_' ("very broad"). */
		while (*a && *b) {
			char ca = *a, cb = *b;
			if (ca >= 'A' && ca <= 'Z')
				ca = (char)(ca - 'A' + 'a');
			if (ca == '-' || ca == ' ')
				ca = '_';
			if (ca != cb)
				break;
			a++, b++;
		}
		if (!*a && !*b) {
			*out = i;
			return IRR_OK;
		}
	}
	return IRR_EINPUT;
}

#define NAME_FN(type, fname, table)                                           \
	const char *irr_##fname##_name(type v)                                \
	{                                                                     \
		int n = (int)(sizeof table / sizeof table[0]);                \
		return ((int)v >= 0 && (int)v < n) ? table[v] : "unknown";    \
	}                                                                     \
	int irr_##fname##_parse(const char *s, type *out)                    \
	{                                                                     \
		int i, rc = parse_name(s, table, (int)(sizeof table / sizeof table[0]), &i); \
		if (rc == IRR_OK && out)                                      \
			*out = (type)i;                                       \
		return rc;                                                    \
	}

NAME_FN(irr_intensity, intensity, intensity_names)
NAME_FN(irr_shape, shape, shape_names)
NAME_FN(irr_phase, phase, phase_names)
NAME_FN(irr_sampling, sampling, sampling_names)

int irr_parse_double(const char *s, char **end, double *out)
{
	const char *p = s;
	char *e;
	double v;
	if (!s) {
		if (end)
			*end = (char *)s;
		return IRR_EINPUT;
	}
	while (*p == ' ' || *p == '\t')
		p++;
	/* Only plain decimal forms: strtod would also take "nan", "inf", "0x1p3". */
	{
		const char *q = p;
		if (*q == '+' || *q == '-')
			q++;
		if (!((*q >= '0' && *q <= '9') || (*q == '.' && q[1] >= '0' && q[1] <= '9'))) {
			if (end)
				*end = (char *)s;
			return IRR_EINPUT;
		}
		if (q[0] == '0' && (q[1] == 'x' || q[1] == 'X')) {
			if (end)
				*end = (char *)s;
			return IRR_EINPUT;
		}
	}
	errno = 0;
	v = strtod_l(p, &e, c_locale());
	if (end)
		*end = e;
	if (e == p || !isfinite(v) || (errno == ERANGE && fabs(v) > 1.0))
		return IRR_EINPUT;
	if (out)
		*out = v;
	return IRR_OK;
}

int irr_format_double(char *buf, size_t size, double v, int decimals)
{
	locale_t old = uselocale(c_locale());
	int n;
	if (v == 0.0)
		v = 0.0; /* no "-0.000" */
	if (decimals >= 0) {
		n = snprintf(buf, size, "%.*f", decimals, v);
		/* Rounding to the printed precision can still yield "-0.00". */
		if (n > 1 && buf[0] == '-' && strspn(buf + 1, "0.") == (size_t)(n - 1))
			n = snprintf(buf, size, "%.*f", decimals, 0.0);
	} else {
		n = snprintf(buf, size, "%.17g", v);
		for (int p = 1; p < 17; p++) {
			char tmp[40];
			snprintf(tmp, sizeof tmp, "%.*g", p, v);
			if (strtod_l(tmp, NULL, c_locale()) == v) {
				n = snprintf(buf, size, "%s", tmp);
				break;
			}
		}
	}
	uselocale(old);
	return n;
}

const char *irr_version(void)
{
	return IRR_VERSION_STRING;
}
