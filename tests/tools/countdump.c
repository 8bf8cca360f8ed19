/* countdump.c: test driver for the structure and perception stages. Reads
 * SMILES (one per line, optional name after a tab or blank; '#' comments)
 * from stdin and prints, per line, the bond counts of irr_perceive as
 * tab-separated fields:
 *   smiles o_h n_h c_n_triple c_o_double aromatic_rings c_h_sp c_h_sp2 c_h_sp3
 * or "smiles ERROR <code> <message>" for input the library rejects.
 * With -g it prints the groups instead: "smiles id{attrs}xcount ...".
 * Used by tests/scripts/rdkit_counts.sh to compare with RDKit. */
#include "irrecon/perceive.h"
#include "irrecon/structure.h"

#include <stdio.h>
#include <string.h>

static void print_groups(const irr_inventory *inv)
{
	for (size_t g = 0; g < irr_inventory_group_count(inv); g++) {
		const irr_group *gr = irr_inventory_group(inv, g);
		const irr_group_attrs *a = &gr->attrs;
		printf("\t%s", gr->id);
		if (a->conjugated)
			printf(" conj");
		if (a->ring_size)
			printf(" ring=%d", a->ring_size);
		if (a->n_h)
			printf(" nh=%d", a->n_h);
		if (a->aryl)
			printf(" aryl=%d", a->aryl);
		if (a->hbond_intra)
			printf(" hb");
		if (a->pattern[0])
			printf(" %s", a->pattern);
		printf(" x%d", gr->count);
	}
	for (size_t k = 0; k < irr_inventory_caution_count(inv); k++)
		printf("\tCAUTION %.30s", irr_inventory_caution(inv, k));
}

int main(int argc, char **argv)
{
	int groups = argc > 1 && strcmp(argv[1], "-g") == 0;
	char line[100000];
	while (fgets(line, sizeof line, stdin)) {
		char *p = line;
		while (*p == ' ' || *p == '\t')
			p++;
		if (*p == '#' || *p == '\n' || *p == '\0')
			continue;
		size_t len = strcspn(p, " \t\r\n");
		p[len] = '\0';
		irr_molecule *m = NULL;
		irr_inventory *inv = NULL;
		irr_error err;
		irr_error_clear(&err);
		int rc = irr_molecule_from_smiles(&m, p, "SMILES", &err);
		if (rc == IRR_OK)
			rc = irr_perceive(&inv, m, NULL, &err);
		if (rc != IRR_OK) {
			printf("%s\tERROR\t%d\t%s\n", p, rc, err.message);
		} else if (groups) {
			printf("%s", p);
			print_groups(inv);
			printf("\n");
		} else {
			const irr_counts *k = irr_inventory_counts(inv);
			printf("%s\t%d\t%d\t%d\t%d\t%d\t%d\t%d\t%d\n", p, k->o_h, k->n_h, k->c_n_triple,
			       k->c_o_double, k->aromatic_rings, k->c_h_sp, k->c_h_sp2, k->c_h_sp3);
		}
		irr_inventory_free(inv);
		irr_molecule_free(m);
	}
	return 0;
}
