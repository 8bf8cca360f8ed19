/* jcamp.h: internals of the "read spectrum" stage shared by spectrum.c,
 * jcamp.c and csvread.c: the spectrum object's layout and the two readers.
 * Not installed; nothing outside these three files includes it. */
#ifndef IRRECON_JCAMP_INTERNAL_H
#define IRRECON_JCAMP_INTERNAL_H

#include <stddef.h>
#include "irrecon/spectrum.h"

#define IRR_SPECTRUM__DEFAULT_MAX_BYTES ((size_t)256 * 1024 * 1024)
#define IRR_SPECTRUM__DEFAULT_MAX_POINTS ((size_t)1000000)

struct irr_spectrum {
	size_t n;
	double *x, *y;
	irr_yunits units;        /* current */
	irr_yunits source_units; /* as read */
	int x_micrometers;       /* X as read is in micrometres (until normalised) */
	int normalised;
	char *name;
	const char *format;      /* static string */
	char *title;
	double first_x, last_x;  /* as read */
	double y_step;           /* quantisation step of Y as read (YFACTOR), 0 = unknown */
	char **warnings;
	size_t nwarn, capwarn;
	double *sat;             /* pairs low, high (cm-1) */
	size_t nsat, capsat;
	double range_lo, range_hi;
};

/* A new spectrum with room for n points (x and y allocated, unset). The
 * caller (a reader) owns it; free with irr_spectrum_free. */
int irr_spectrum__create(irr_spectrum **out, size_t n, const char *name,
                         const char *format, irr_error *err);
/* Replaces the point arrays by malloc'd ones (ownership moves to s). */
void irr_spectrum__adopt(irr_spectrum *s, double *x, double *y, size_t n);
int irr_spectrum__set_title(irr_spectrum *s, const char *title, size_t len);
/* irr_error_set with numbers always printed with '.', whatever locale the
 * embedding program has set (messages quote values from the file). */
int irr_spectrum__fail(irr_error *err, int code, const char *file, long line,
                       const char *fmt, ...)
#if defined(__GNUC__)
	__attribute__((format(printf, 5, 6)))
#endif
	;
/* Appends a warning (printf-style, locale-independent like the above).
 * Returns IRR_OK or IRR_ENOMEM. */
int irr_spectrum__warn(irr_spectrum *s, const char *fmt, ...)
#if defined(__GNUC__)
	__attribute__((format(printf, 2, 3)))
#endif
	;
/* Checks that X is finite and strictly monotonic and Y finite; on failure
 * fills err (file = s->name, line = lines[i] when lines is not NULL). */
int irr_spectrum__check_xy(const irr_spectrum *s, const long *lines, irr_error *err);

/* Effective limits from options (0 = default). */
size_t irr_spectrum__max_points(const irr_read_options *o);
size_t irr_spectrum__max_bytes(const irr_read_options *o);

/* The readers. `data` is NUL-terminated at data[len] (the NUL is not part of
 * the input; embedded NULs are an error). Caller owns *out. */
int irr_jcamp__read(irr_spectrum **out, const char *data, size_t len,
                    const char *name, const irr_read_options *o, irr_error *err);
int irr_jcamp__list_blocks(irr_block_info **out, size_t *count, const char *data,
                           size_t len, const char *name, irr_error *err);
int irr_csv__read(irr_spectrum **out, const char *data, size_t len,
                  const char *name, const irr_read_options *o, irr_error *err);

/* Checks the complete lines of the first part of a CSV input, so that a
 * huge file that is not a spectrum fails before it is read in full. */
int irr_csv__check_prefix(const char *data, size_t len, const char *name,
                          const irr_read_options *o, irr_error *err);

/* Reads a whole file into a NUL-terminated malloc'd buffer (caller frees),
 * refusing files larger than max_bytes before reading them, and binary
 * data from the first 64 KiB. When `o` is not NULL and the file is longer
 * than that, a text prefix that is not JCAMP-DX is checked as CSV first. */
int irr_spectrum__slurp(char **out, size_t *len, const char *path,
                        size_t max_bytes, const irr_read_options *o, irr_error *err);

#endif
