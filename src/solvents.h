/* solvents.h: library-internal view of the solvent library's atmosphere
 * section (CO2, water vapour, moisture), used by reconcile.c. */
#ifndef IRRECON_SOLVENTS_INTERNAL_H
#define IRRECON_SOLVENTS_INTERNAL_H

#include "irrecon/solvents.h"

typedef struct irr_solvents__air {
	size_t nco2;
	const irr_solvent_band *co2;      /* carbon dioxide bands */
	size_t nclusters;
	const double (*clusters)[2];      /* water vapour line regions, cm-1 */
	int vapour_min_lines;             /* lines needed to call a cluster */
	double vapour_max_fwhm;           /* cm-1; wider peaks are not lines */
	size_t nmoist;
	const irr_solvent_band *moist;    /* moisture bands: O-H, H-O-H bend */
	double moist_max_rel;             /* moisture only when this weak */
} irr_solvents__air;

const irr_solvents__air *irr_solvents__atmosphere(const irr_solvent_library *lib);
/* Path of the library file loaded. */
const char *irr_solvents__path(const irr_solvent_library *lib);

#endif
