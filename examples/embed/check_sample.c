/* check_sample.c: a small program embedding the irrecon library, as a
 * notebook plug-in or an instrument's export hook would. It checks one
 * sample of Larkspur Process Chemistry and prints the verdict with its
 * reasons; exit status 0 consistent, 1 another verdict, 2 error.
 *
 * Build against an installed irrecon:
 *     cc -std=c11 check_sample.c $(pkg-config --cflags --libs irrecon) -o check_sample
 * Run:
 *     ./check_sample 'CC(=O)c1ccccc1' spectrum.jdx 'CC(O)c1ccccc1'
 * The group tables are found beside the installed library's data, or
 * through the IRRECON_TABLES environment variable. */
#include <stdio.h>
#include <stdlib.h>

#include <irrecon.h>

static int fail(const irr_error *err)
{
	char buf[2200];
	irr_error_format(err, buf, sizeof buf);
	fprintf(stderr, "check_sample: %s\n", buf);
	return 2;
}

int main(int argc, char **argv)
{
	irr_tables *tables = NULL;       /* ours: irr_tables_free */
	irr_request *req = NULL;         /* ours: irr_request_free */
	irr_check *check = NULL;         /* ours: irr_check_free */
	irr_error err;
	int status = 2;

	if (argc < 3) {
		fprintf(stderr, "usage: check_sample SMILES SPECTRUM [STARTING_MATERIAL...]\n");
		return 2;
	}
	irr_error_clear(&err);
	printf("irrecon library %s\n", irr_version());

	/* Tables are loaded once; a program checking many samples keeps them. */
	if (irr_tables_load(&tables, NULL, NULL, 0, &err) != IRR_OK)
		return fail(&err);
	if (irr_request_create(&req, &err) != IRR_OK) {
		status = fail(&err);
		goto done;
	}
	if (irr_request_set_sample(req, "LPC-0417-03") != IRR_OK ||
	    irr_request_set_structure(req, argv[1]) != IRR_OK ||
	    irr_request_set_spectrum_file(req, argv[2]) != IRR_OK) {
		fprintf(stderr, "check_sample: out of memory\n");
		goto done;
	}
	for (int i = 3; i < argc; i++)
		if (irr_request_add_starting_material(req, argv[i]) != IRR_OK) {
			fprintf(stderr, "check_sample: out of memory\n");
			goto done;
		}
	if (irr_request_run(&check, req, tables, &err) != IRR_OK) {
		status = fail(&err);
		goto done;
	}

	printf("sample %s: %s (score %.2f)\n", irr_request_sample(req),
	       irr_verdict_name(irr_check_verdict(check)), irr_check_score(check));
	for (size_t i = 0; i < irr_check_reason_count(check); i++)
		printf("  - %s\n", irr_check_reason(check, i)->text);
	for (size_t i = 0; i < irr_check_other_count(check); i++) {
		const irr_other *o = irr_check_other(check, i);
		printf("  %s %s: %s\n", irr_other_kind_name(o->kind), o->given,
		       irr_presence_name(o->presence));
	}
	for (size_t i = 0; i < irr_check_caution_count(check); i++)
		printf("  caution: %s\n", irr_check_caution(check, i));
	status = irr_check_verdict(check) == IRR_VERDICT_CONSISTENT ? 0 : 1;
done:
	irr_check_free(check);
	irr_request_free(req);
	irr_tables_free(tables);
	return status;
}
