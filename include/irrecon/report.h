/* irrecon/report.h: the "report" stage. Renders a run check (reconcile.h)
 * as a text report for an 80-column terminal, as JSON (schema
 * "irrecon.check/1", docs/check-result-schema.md) and as an SVG plot.
 *
 * Ownership: each *out is a NUL-terminated malloc'd string owned by the
 * caller (free()). On failure *out is NULL. Reports never print. */
#ifndef IRRECON_REPORT_H
#define IRRECON_REPORT_H

#include <stddef.h>
#include "irrecon/common.h"
#include "irrecon/reconcile.h"

#ifdef __cplusplus
extern "C" {
#endif

#define IRR_CHECK_SCHEMA "irrecon.check/1"

/* Text report: verdict and reasons first, then the bands found, missing,
 * unexplained and attributed; lines at most 80 columns. Returns IRR_OK,
 * IRR_ENOMEM, or IRR_EINPUT when the check has not been run. */
int irr_report_text(char **out, const irr_check *c);

/* JSON result, pretty-printed, ending in a newline. Byte-identical for the
 * same input (no times, no addresses). */
int irr_report_json(char **out, const irr_check *c);
/* The same result as a cJSON object (cJSON *), for embedding into other
 * documents (batch, requests). Returned as void * so that this header does
 * not need cJSON; the caller owns it (cJSON_Delete). NULL on failure. */
void *irr_report_json_object(const irr_check *c);

/* SVG plot options (implemented in src/report_svg.c). */
typedef struct irr_svg_options {
	int width, height;     /* pixels; 0 = defaults */
	const char *title;     /* NULL = sample id, else the input name */
} irr_svg_options;
void irr_svg_options_init(irr_svg_options *o);

/* The measured spectrum with expected windows and observed peaks marked by
 * status, labels on key bands, legend, sample id and verdict. With a peak
 * list instead of a spectrum, peaks are drawn as sticks. `o` may be NULL. */
int irr_report_svg(char **out, const irr_check *c, const irr_svg_options *o);

#ifdef __cplusplus
}
#endif
#endif
