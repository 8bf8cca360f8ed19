/* json_write.h: compact JSON text written straight into a buffer, byte for
 * byte as cJSON_PrintUnformatted (cJSON 1.7.15, Debian's libcjson) would
 * print the same tree, without building the tree; tests/unit/
 * test_json_write.c holds it to the linked cJSON. Library-internal. */
#ifndef IRRECON_JSON_WRITE_H
#define IRRECON_JSON_WRITE_H

#include "buf.h"

#include <stddef.h>

struct irr_check;

#define IRR_JW_MAX_DEPTH 32

/* Zero-initialise ({0}) to start. Keys are given inside objects and NULL
 * inside arrays. Faults (nesting too deep, out of memory) set `bad` or
 * out.oom; later calls then do nothing. out.p is malloc'd; the owner frees
 * it. */
typedef struct irr_jw {
	irr_buf out;
	int depth;
	int bad;
	unsigned char first[IRR_JW_MAX_DEPTH];    /* no member written yet */
	unsigned char is_array[IRR_JW_MAX_DEPTH]; /* which bracket closes it */
} irr_jw;

void irr_jw__begin_object(irr_jw *w, const char *key);
void irr_jw__begin_array(irr_jw *w, const char *key);
void irr_jw__end(irr_jw *w);
/* A NULL `v` writes null. */
void irr_jw__string(irr_jw *w, const char *key, const char *v);
void irr_jw__number(irr_jw *w, const char *key, double v);
void irr_jw__bool(irr_jw *w, const char *key, int v);
void irr_jw__null(irr_jw *w, const char *key);

/* Writes `d` as cJSON 1.7.15 prints a number made by cJSON_CreateNumber(d):
 * the int if it is one, else "%1.15g" when that reads back within a
 * relative DBL_EPSILON, else "%1.17g"; NaN and infinities as null. `out`
 * holds at least 32 bytes; returns the length written (no NUL counted). */
size_t irr_json__format_number(char *out, double d);

/* The one-line "irrecon.check/1" result, as cJSON_PrintUnformatted prints
 * irr_report_json_object(c), without the trailing newline. On success *out
 * is malloc'd (caller frees); IRR_EINPUT for a check without a prediction,
 * IRR_ENOMEM. */
int irr_report__json_line(char **out, const struct irr_check *c);

#endif
