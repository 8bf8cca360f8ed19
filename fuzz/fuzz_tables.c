/* fuzz_tables.c: libFuzzer target for the group-table loader. The table
 * loader reads files, so each input is written to a private folder as the
 * only *.json there and loaded from it; a table that loads is then used to
 * perceive and predict a fixed molecule, which runs its SMARTS groups and
 * context rules. Seeds: tests/fuzz-seeds/tables/. */
#include <stdint.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

#include "fuzz.h"
#include "irrecon/perceive.h"
#include "irrecon/predict.h"
#include "irrecon/structure.h"
#include "irrecon/tables.h"

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size);

static char dir[256], path[300];
static irr_molecule *mol;

static void cleanup(void)
{
	unlink(path);
	rmdir(dir);
}

static void setup(void)
{
	irr_error err;
	const char *base;
	if (dir[0])
		return;
	base = access("/dev/shm", W_OK) == 0 ? "/dev/shm" : "/tmp";
	snprintf(dir, sizeof dir, "%s/irrecon-fuzz-tables.XXXXXX", base);
	if (!mkdtemp(dir))
		abort();
	snprintf(path, sizeof path, "%s/fuzz.json", dir);
	atexit(cleanup);
	irr_error_clear(&err);
	/* Ester, amide, alkene, aromatic ring, O-H: touches most rule kinds.
	 * Methyl (E)-3-(4-acetamido-2-hydroxyphenyl)prop-2-enoate, a made-up
	 * demo structure. */
	if (irr_molecule_from_smiles(&mol, "COC(=O)/C=C/c1ccc(NC(C)=O)cc1O", "SMILES", &err) != IRR_OK)
		abort();
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
	FILE *f;
	irr_tables *t = NULL;
	irr_error err;
	int rc;

	if (size > FUZZ_MAX_INPUT)
		return 0;
	setup();
	f = fopen(path, "wb");
	if (!f)
		abort();
	if (size && fwrite(data, 1, size, f) != size)
		abort();
	fclose(f);

	irr_error_clear(&err);
	rc = irr_tables_load(&t, dir, NULL, 0, &err);
	fuzz_check_error(rc, &err);
	if (rc == IRR_OK) {
		irr_inventory *inv = NULL;
		if (!t)
			abort();
		(void)irr_tables_digest(t);
		irr_error_clear(&err);
		rc = irr_perceive(&inv, mol, t, &err);
		fuzz_check_error(rc, &err);
		if (rc == IRR_OK) {
			irr_prediction *pr = NULL;
			irr_predict_options po;
			irr_predict_options_init(&po);
			for (int phase = 0; phase < 3; phase++) {
				po.phase = (irr_phase)phase;
				po.sampling = phase == 1 ? IRR_SAMPLING_TRANSMISSION : IRR_SAMPLING_ATR;
				irr_error_clear(&err);
				rc = irr_predict(&pr, inv, t, &po, &err);
				fuzz_check_error(rc, &err);
				irr_prediction_free(pr);
				pr = NULL;
			}
		}
		irr_inventory_free(inv);
	} else if (t) {
		abort();
	}
	irr_tables_free(t);
	return 0;
}
