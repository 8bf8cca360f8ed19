/* bench_gen.c: makes the data of `make bench` with the library's own
 * synthesizer and JCAMP-DX writer: N samples of drug-like structures (from
 * tools/bench_drugs.tsv), each a 7,000-point DIF/DUP-compressed spectrum
 * with noise, some with starting material left in, and manifests naming two
 * starting materials per sample. Invented data, for speed figures only.
 *
 *   bench_gen DRUGS.tsv OUTDIR N BIG
 * writes OUTDIR/spectra/LPC-B0000.jdx ..., OUTDIR/manifest.csv (N rows) and
 * OUTDIR/manifest-big.csv (BIG rows cycling over the same spectra). */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <sys/stat.h>

#include "irrecon.h"

typedef struct drug {
	char name[64];
	char smiles[3][256]; /* product, starting material 1, 2 */
} drug;

static int load_drugs(const char *path, drug **out, size_t *n)
{
	FILE *f = fopen(path, "r");
	char line[1024];
	drug *v = NULL;
	size_t cnt = 0, cap = 0;
	if (!f)
		return -1;
	while (fgets(line, sizeof line, f)) {
		char *fld[4], *p = line;
		int k;
		if (line[0] == '#' || line[0] == '\n')
			continue;
		line[strcspn(line, "\r\n")] = '\0';
		for (k = 0; k < 4 && p; k++) {
			fld[k] = p;
			p = strchr(p, '\t');
			if (p)
				*p++ = '\0';
		}
		if (k < 4)
			continue;
		if (cnt == cap) {
			cap = cap ? 2 * cap : 64;
			v = realloc(v, cap * sizeof *v);
			if (!v) {
				fclose(f);
				return -1;
			}
		}
		snprintf(v[cnt].name, sizeof v[cnt].name, "%s", fld[0]);
		for (k = 0; k < 3; k++)
			snprintf(v[cnt].smiles[k], sizeof v[cnt].smiles[k], "%s", fld[k + 1]);
		cnt++;
	}
	fclose(f);
	*out = v;
	*n = cnt;
	return cnt ? 0 : -1;
}

static int write_file(const char *path, const char *data, size_t len)
{
	FILE *f = fopen(path, "wb");
	if (!f)
		return -1;
	if (fwrite(data, 1, len, f) != len) {
		fclose(f);
		return -1;
	}
	return fclose(f);
}

int main(int argc, char **argv)
{
	drug *drugs;
	size_t ndrugs, n, big;
	irr_tables *t = NULL;
	irr_error err;
	char path[4096];
	FILE *man, *manbig;
	if (argc != 5) {
		fprintf(stderr, "usage: bench_gen DRUGS.tsv OUTDIR N BIG\n");
		return 2;
	}
	n = (size_t)strtoul(argv[3], NULL, 10);
	big = (size_t)strtoul(argv[4], NULL, 10);
	if (load_drugs(argv[1], &drugs, &ndrugs) != 0) {
		fprintf(stderr, "bench_gen: cannot read %s\n", argv[1]);
		return 2;
	}
	if (irr_tables_load(&t, NULL, NULL, 0, &err) != IRR_OK) {
		fprintf(stderr, "bench_gen: %s: %s\n", err.file, err.message);
		return 2;
	}
	snprintf(path, sizeof path, "%s/spectra", argv[2]);
	mkdir(argv[2], 0777);
	mkdir(path, 0777);
	snprintf(path, sizeof path, "%s/manifest.csv", argv[2]);
	man = fopen(path, "w");
	snprintf(path, sizeof path, "%s/manifest-big.csv", argv[2]);
	manbig = fopen(path, "w");
	if (!man || !manbig) {
		fprintf(stderr, "bench_gen: cannot write the manifests in %s\n", argv[2]);
		return 2;
	}
	fprintf(man, "sample,structure,spectrum,starting_materials\n");
	fprintf(manbig, "sample,structure,spectrum,starting_materials\n");
	for (size_t i = 0; i < n; i++) {
		const drug *d = &drugs[i % ndrugs];
		irr_synth_component comp[2];
		irr_synth_options so;
		irr_write_options wo;
		irr_spectrum *s = NULL;
		char *text = NULL, title[128];
		size_t len = 0, nc = 1;
		irr_synth_options_init(&so);
		so.spacing = 3600.0 / 6999.0;   /* 7,000 points over 400-4000 cm-1 */
		so.noise = 0.002;
		so.seed = (uint64_t)i + 1;
		so.baseline_low = 0.01 * (double)(i % 3);
		so.baseline_high = 0.02 * (double)(i % 4);
		so.co2 = (i % 4 == 0) ? 0.03 : 0.0;
		so.y_units = IRR_Y_TRANSMITTANCE;
		comp[0].smiles = d->smiles[0];
		comp[0].fraction = 1.0;
		/* Every fifth sample keeps some starting material: an incomplete
		 * reaction, so the batch has more than one verdict. */
		if (i % 5 == 1) {
			comp[1].smiles = d->smiles[1];
			comp[1].fraction = 0.2;
			nc = 2;
		}
		snprintf(title, sizeof title, "LPC-B%04zu %s (synthetic)", i, d->name);
		if (irr_synth_mixture(&s, comp, nc, t, &so, title, &err) != IRR_OK) {
			fprintf(stderr, "bench_gen: %s: %s\n", d->name, err.message);
			return 2;
		}
		irr_write_options_init(&wo);
		wo.form = IRR_JCAMP_DIFDUP;
		wo.title = title;
		wo.origin = "Larkspur Process Chemistry, bench data made by tools/bench_gen";
		wo.owner = "invented data";
		wo.y_decimals = 4;
		if (irr_spectrum_write_jcamp(&text, &len, s, &wo, &err) != IRR_OK) {
			fprintf(stderr, "bench_gen: %s: %s\n", d->name, err.message);
			return 2;
		}
		snprintf(path, sizeof path, "%s/spectra/LPC-B%04zu.jdx", argv[2], i);
		if (write_file(path, text, len) != 0) {
			fprintf(stderr, "bench_gen: cannot write %s\n", path);
			return 2;
		}
		free(text);
		irr_spectrum_free(s);
		fprintf(man, "LPC-B%04zu,%s,spectra/LPC-B%04zu.jdx,%s;%s\n", i, d->smiles[0], i,
		        d->smiles[1], d->smiles[2]);
	}
	for (size_t i = 0; i < big; i++) {
		const drug *d = &drugs[(i % n) % ndrugs];
		fprintf(manbig, "LPC-C%05zu,%s,spectra/LPC-B%04zu.jdx,%s;%s\n", i, d->smiles[0], i % n,
		        d->smiles[1], d->smiles[2]);
	}
	fclose(man);
	fclose(manbig);
	irr_tables_free(t);
	free(drugs);
	return 0;
}
