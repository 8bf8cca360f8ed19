/* fuzz_smiles.c: libFuzzer target for SMILES through the Open Babel shim,
 * then perception and prediction with the bundled group tables, so that
 * unusual but valid molecules (charges, isotopes, '*', huge rings, many
 * components) reach every stage that walks the molecule graph.
 * Seeds: tests/fuzz-seeds/smiles/. */
#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "fuzz.h"
#include "irrecon/perceive.h"
#include "irrecon/predict.h"
#include "irrecon/structure.h"
#include "irrecon/tables.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static irr_tables *tables;

static void load_tables(void)
{
	irr_error err;
	const char *dir = getenv("IRRECON_TABLES");
	if (tables)
		return;
	irr_error_clear(&err);
	/* The source tree's tables (compiled in); a broken bundled table is a
	 * bug the unit tests report, so fuzz without them rather than stop. */
	if (irr_tables_load(&tables, dir ? dir : IRR_SOURCE_TABLES_DIR, NULL, 0, &err) != IRR_OK)
		tables = NULL;
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	size_t len = size;
	char *s;
	irr_molecule *m = NULL;
	irr_error err;
	int rc;

	/* A SMILES is one line; bigger inputs only slow Open Babel down. */
	if (size > 4096)
		return 0;
	load_tables();
	s = fuzz_copy(data, &len);
	if (strlen(s) != len) { /* embedded NUL: the program never passes one */
		free(s);
		return 0;
	}
	irr_error_clear(&err);
	rc = irr_molecule_from_smiles(&m, s, "SMILES", &err);
	fuzz_check_error(rc, &err);
	if (rc == IRR_OK) {
		irr_inventory *inv = NULL;
		if (!m || irr_molecule_atom_count(m) > IRR_MAX_HEAVY_ATOMS)
			abort();
		(void)irr_molecule_formula(m);
		irr_error_clear(&err);
		rc = irr_perceive(&inv, m, tables, &err);
		fuzz_check_error(rc, &err);
		if (rc == IRR_OK && tables) {
			irr_prediction *pr = NULL;
			irr_predict_options po;
			irr_predict_options_init(&po);
			irr_error_clear(&err);
			rc = irr_predict(&pr, inv, tables, &po, &err);
			fuzz_check_error(rc, &err);
			for (size_t i = 0; rc == IRR_OK && i < irr_prediction_count(pr); i++) {
				const irr_band *b = irr_prediction_band(pr, i);
				if (!(b->low <= b->high))
					abort();
			}
			irr_prediction_free(pr);
		}
		irr_inventory_free(inv);
	} else if (m) {
		abort();
	}
	irr_molecule_free(m);
	free(s);
	return 0;
}
