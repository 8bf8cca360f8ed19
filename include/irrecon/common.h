/* irrecon/common.h: what every stage shares: status codes, the error record,
 * band intensity/shape classes, sampling conditions, and locale-independent
 * number parsing and printing. */
#ifndef IRRECON_COMMON_H
#define IRRECON_COMMON_H

#include <stddef.h>

#ifdef __cplusplus
extern "C" {
#endif

/* Status codes: 0 is success, negatives are failures. */
enum irr_status {
	IRR_OK = 0,
	IRR_ERROR = -1,     /* generic failure */
	IRR_EINPUT = -2,    /* malformed or unusable input (file, SMILES, table) */
	IRR_ENOMEM = -3,    /* allocation failed */
	IRR_EIO = -4,       /* could not read or write a file */
	IRR_ELIMIT = -5,    /* a configured size or count limit was exceeded */
	IRR_ENOTFOUND = -6  /* a named thing (block, solvent, table) does not exist */
};

/* The error record. Owned by the caller (usually on its stack); the library
 * fills it on failure. `file` is the input the problem is in ("" when none),
 * `line` its 1-based line (0 when not applicable). */
typedef struct irr_error {
	int code;
	long line;
	char file[1024];
	char message[1024];
} irr_error;

/* Fills `err` (when not NULL) and returns `code`, so that failures read
 * `return irr_error_set(err, IRR_EINPUT, path, line, "bad %s", x);`. */
int irr_error_set(irr_error *err, int code, const char *file, long line,
                  const char *fmt, ...)
#if defined(__GNUC__)
	__attribute__((format(printf, 5, 6)))
#endif
	;
void irr_error_clear(irr_error *err);
/* Writes "file:line: message" (parts left out when empty) into buf. */
void irr_error_format(const irr_error *err, char *buf, size_t size);

/* Intensity class of a band (expected or observed). */
typedef enum irr_intensity {
	IRR_INT_NONE = 0,
	IRR_INT_WEAK,
	IRR_INT_MEDIUM,
	IRR_INT_STRONG,
	IRR_INT_VARIABLE
} irr_intensity;

/* Shape class of a band. */
typedef enum irr_shape {
	IRR_SHAPE_SHARP = 0,
	IRR_SHAPE_BROAD,
	IRR_SHAPE_VERY_BROAD,
	IRR_SHAPE_DOUBLET
} irr_shape;

typedef enum irr_phase {
	IRR_PHASE_CONDENSED = 0, /* neat liquid or solid: O-H/N-H hydrogen-bonded */
	IRR_PHASE_SOLUTION,      /* dilute solution: free O-H possible */
	IRR_PHASE_GAS
} irr_phase;

typedef enum irr_sampling {
	IRR_SAMPLING_ATR = 0,
	IRR_SAMPLING_TRANSMISSION
} irr_sampling;

/* Names as used in tables, options and JSON ("strong", "very_broad", ...).
 * Returned strings are static. Parsers return IRR_OK or IRR_EINPUT. */
const char *irr_intensity_name(irr_intensity v);
int irr_intensity_parse(const char *s, irr_intensity *out);
const char *irr_shape_name(irr_shape v);
int irr_shape_parse(const char *s, irr_shape *out);
const char *irr_phase_name(irr_phase v);
int irr_phase_parse(const char *s, irr_phase *out);
const char *irr_sampling_name(irr_sampling v);
int irr_sampling_parse(const char *s, irr_sampling *out);

/* Locale-independent numbers: the decimal point is always '.', whatever
 * setlocale() the embedding program has done.
 * irr_parse_double: like strtod (sets *end), but rejects nan/inf spellings,
 * hex floats and results that overflow; returns IRR_OK or IRR_EINPUT. */
int irr_parse_double(const char *s, char **end, double *out);
/* Prints v with `decimals` digits after the point ('%.*f'); decimals < 0
 * means shortest round-trip form ('%.17g' trimmed). Returns the length. */
int irr_format_double(char *buf, size_t size, double v, int decimals);

/* Library version, e.g. "0.1.0". Static string. */
const char *irr_version(void);

#ifdef __cplusplus
}
#endif
#endif
