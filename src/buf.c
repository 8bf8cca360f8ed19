/* buf.c: the growable text buffer shared by the writers. */
#include "buf.h"

#include <locale.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

void irr_buf__add(irr_buf *b, const char *s, size_t n)
{
	if (b->oom)
		return;
	if (b->len + n + 1 > b->cap) {
		size_t cap = b->cap ? b->cap : 4096;
		char *np;
		while (cap < b->len + n + 1)
			cap *= 2;
		np = realloc(b->p, cap);
		if (!np) {
			b->oom = 1;
			return;
		}
		b->p = np;
		b->cap = cap;
	}
	memcpy(b->p + b->len, s, n);
	b->len += n;
	b->p[b->len] = '\0';
}

void irr_buf__str(irr_buf *b, const char *s)
{
	irr_buf__add(b, s, strlen(s));
}

void irr_buf__printf(irr_buf *b, const char *fmt, ...)
{
	static locale_t c_loc;
	locale_t old;
	char tmp[4096];
	va_list ap;
	int n;
	if (!c_loc)
		c_loc = newlocale(LC_ALL_MASK, "C", (locale_t)0);
	old = uselocale(c_loc);
	va_start(ap, fmt);
	n = vsnprintf(tmp, sizeof tmp, fmt, ap);
	va_end(ap);
	uselocale(old);
	if (n < 0)
		return;
	if ((size_t)n >= sizeof tmp)
		n = sizeof tmp - 1;
	irr_buf__add(b, tmp, (size_t)n);
}
