/* irrecon/spectrum.h: the "read spectrum" stage. Reads JCAMP-DX (all ASDF
 * forms, compound LINK files) and two-column CSV/TSV exports into one
 * spectrum object, and normalises it to absorbance on an ascending
 * wavenumber axis with saturated regions and the measured range marked. */
#ifndef IRRECON_SPECTRUM_H
#define IRRECON_SPECTRUM_H

#include <stddef.h>
#include "irrecon/common.h"

#ifdef __cplusplus
extern "C" {
#endif

typedef enum irr_yunits {
	IRR_Y_UNKNOWN = 0,
	IRR_Y_TRANSMITTANCE,   /* fraction, 0..1 */
	IRR_Y_PERCENT_T,       /* 0..100 */
	IRR_Y_ABSORBANCE,
	IRR_Y_REFLECTANCE,
	IRR_Y_KUBELKA_MUNK,
	IRR_Y_ARBITRARY
} irr_yunits;

/* Static names: "unknown", "transmittance", "percent_transmittance",
 * "absorbance", "reflectance", "kubelka_munk", "arbitrary". */
const char *irr_yunits_name(irr_yunits u);

typedef struct irr_read_options {
	int block;            /* compound JCAMP-DX: 1-based block; 0 = the infrared one */
	int decimal_comma;    /* CSV: accept ',' as the decimal separator */
	irr_yunits y_units;   /* CSV without a units header: what Y is (UNKNOWN = detect) */
	int x_micrometers;    /* CSV: X is in micrometres, not cm-1 */
	size_t max_bytes;     /* refuse larger files; 0 = default (256 MiB) */
	size_t max_points;    /* refuse more points; 0 = default (1,000,000) */
} irr_read_options;

/* Fills `o` with the defaults above. */
void irr_read_options_init(irr_read_options *o);

typedef struct irr_spectrum irr_spectrum;

/* Reads a spectrum file; the format (JCAMP-DX or CSV/TSV) is detected from
 * the content. On success *out is a new spectrum owned by the caller (free
 * with irr_spectrum_free). On failure *out is NULL and err names the file and
 * line. `o` may be NULL for defaults. */
int irr_spectrum_read_file(irr_spectrum **out, const char *path,
                           const irr_read_options *o, irr_error *err);
/* Same from memory; `name` is used in messages. The buffer is not kept. */
int irr_spectrum_read_memory(irr_spectrum **out, const char *data, size_t len,
                             const char *name, const irr_read_options *o,
                             irr_error *err);
/* Builds a spectrum from arrays (copied). Caller owns *out. */
int irr_spectrum_from_xy(irr_spectrum **out, const double *x, const double *y,
                         size_t n, irr_yunits units, const char *name,
                         irr_error *err);
void irr_spectrum_free(irr_spectrum *s);

/* Converts in place to absorbance on an ascending cm-1 axis: detects
 * transmittance vs absorbance when the file does not say (with a warning),
 * finds saturated/clipped regions and the measured range. Idempotent. */
int irr_spectrum_normalise(irr_spectrum *s, irr_error *err);

/* Accessors. Arrays are borrowed from `s` and valid until it is freed or
 * normalised. Before normalisation they are as read (file order, file
 * units); after it, ascending cm-1 and absorbance. */
size_t irr_spectrum_points(const irr_spectrum *s);
const double *irr_spectrum_x(const irr_spectrum *s);
const double *irr_spectrum_y(const irr_spectrum *s);
irr_yunits irr_spectrum_y_units(const irr_spectrum *s);       /* current */
irr_yunits irr_spectrum_source_y_units(const irr_spectrum *s); /* as read */
int irr_spectrum_is_normalised(const irr_spectrum *s);
const char *irr_spectrum_name(const irr_spectrum *s);          /* path or given name */
const char *irr_spectrum_source_format(const irr_spectrum *s); /* "jcamp-dx", "csv", "arrays" */
const char *irr_spectrum_title(const irr_spectrum *s);         /* ##TITLE or "" */
double irr_spectrum_first_x(const irr_spectrum *s);            /* as read */
double irr_spectrum_last_x(const irr_spectrum *s);

/* Warnings met while reading or normalising ("##YFACTOR ... disagrees"). */
size_t irr_spectrum_warning_count(const irr_spectrum *s);
const char *irr_spectrum_warning(const irr_spectrum *s, size_t i);

/* Saturated (clipped, or transmittance at zero) ranges, in cm-1, low<high;
 * set by normalisation. */
size_t irr_spectrum_saturated_count(const irr_spectrum *s);
void irr_spectrum_saturated_range(const irr_spectrum *s, size_t i,
                                  double *low, double *high);
/* Measured range in cm-1 (low < high); valid after normalisation. */
void irr_spectrum_range(const irr_spectrum *s, double *low, double *high);

/* JCAMP-DX compound files: the blocks of a file. */
typedef struct irr_block_info {
	int index;              /* 1-based, in file order (##TITLE records) */
	char title[256];
	char data_type[64];     /* ##DATA TYPE, e.g. "INFRARED SPECTRUM", "LINK" */
	int has_data;           /* has ##XYDATA, ##XYPOINTS or ##PEAK TABLE */
} irr_block_info;
/* Lists the blocks. *out is a malloc'd array owned by the caller (free()). */
int irr_jcamp_list_blocks(irr_block_info **out, size_t *count, const char *path,
                          irr_error *err);

#ifdef __cplusplus
}
#endif
#endif
