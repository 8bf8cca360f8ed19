/* buf.h: a growable text buffer for the writers (text report, SVG, JCAMP-DX
 * and CSV output). Library-internal. */
#ifndef IRRECON_BUF_H
#define IRRECON_BUF_H

#include <stddef.h>

/* Zero-initialise ({0}) to start. After any failed allocation `oom` is set
 * and later appends do nothing, so callers check once at the end. `p` is
 * malloc'd and NUL-terminated (NULL while empty); the owner frees it. */
typedef struct irr_buf {
	char *p;
	size_t len, cap;
	int oom;
} irr_buf;

void irr_buf__add(irr_buf *b, const char *s, size_t n);
void irr_buf__str(irr_buf *b, const char *s);
/* printf into the buffer, in the C locale (a '%f' prints '.' whatever the
 * embedding program's locale). Output longer than 4 KiB is cut. */
void irr_buf__printf(irr_buf *b, const char *fmt, ...)
#if defined(__GNUC__)
	__attribute__((format(printf, 2, 3)))
#endif
	;

#endif
