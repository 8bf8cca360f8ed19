/* cmd_rank.c: `irrecon rank`: one spectrum against several candidate
 * structures (the product, a starting material, a likely side product),
 * ordered by verdict and score with their key reasons. The spectrum is read
 * and its peaks picked once; every candidate is checked on the same peaks. */
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cjson/cJSON.h>

#include "cli/cli.h"
#include "cli/cmd_check.h"
#include "irrecon/reconcile.h"
#include "irrecon/report.h"
#include "irrecon/tables.h"

#define RANK_SCHEMA "irrecon.rank/1"
#define KEY_REASONS 3

static const cli_opt opts[] = {
	{"--candidate", "SMILES", "a candidate structure; repeat for each (at least one)"},
	{"--candidates-file", "FILE", "candidates from FILE, one SMILES per line ('#' comments)"},
	{"--spectrum", "FILE", "the measured spectrum (JCAMP-DX or CSV/TSV)"},
	{"--peaks", "FILE", "a peak list (CSV or JSON) instead of a spectrum"},
	{"--starting-material", "S", "a starting material (SMILES or library name); repeatable"},
	{"--reagent", "S", "a reagent (SMILES or library name); repeatable"},
	{"--solvent", "S", "a solvent (library name or SMILES); repeatable"},
	{"--sample", "ID", "the sample id"},
	{"--phase", "P", "condensed (default), solution or gas"},
	{"--sampling", "S", "atr (default) or transmission"},
	{"--json", NULL, "print JSON (schema irrecon.rank/1)"},
	{"--output", "FILE", "write to FILE (replaced atomically)"},
	{"--block", "N", "compound JCAMP-DX file: use block N"},
	{"--max-bytes", "N", "refuse input files larger than N bytes (default 256 MiB)"},
	{"--max-points", "N", "refuse spectra of more than N points (default 1,000,000)"},
	{"--tables", "DIR", "group tables folder"},
	{"--add-table", "FILE", "an extra group table; repeatable"},
	{"--help", NULL, "show this help"},
	{NULL, NULL, NULL}
};

static void help(void)
{
	printf("usage: irrecon rank --spectrum FILE --candidate SMILES --candidate SMILES ...\n\n"
	       "Checks one spectrum against several candidate structures and orders them:\n"
	       "consistent before consistent_impure before inconclusive before\n"
	       "inconsistent, then by score; ties keep the order given.\n\n"
	       "Options:\n");
	cli_opt_help(opts, 23);
	printf("\nExit status: 0 when some candidate is consistent, 1 otherwise, 2 error.\n");
}

typedef struct entry {
	size_t given;        /* position on the command line */
	char *smiles;
	irr_check *c;
} entry;

static int verdict_rank(irr_verdict v)
{
	switch (v) {
	case IRR_VERDICT_CONSISTENT: return 0;
	case IRR_VERDICT_CONSISTENT_IMPURE: return 1;
	case IRR_VERDICT_INCONCLUSIVE: return 2;
	default: return 3;
	}
}

static int entry_cmp(const void *a, const void *b)
{
	const entry *x = a, *y = b;
	int rx = verdict_rank(irr_check_verdict(x->c)), ry = verdict_rank(irr_check_verdict(y->c));
	double sx = irr_check_score(x->c), sy = irr_check_score(y->c);
	if (rx != ry)
		return rx - ry;
	if (sx != sy)
		return sx > sy ? -1 : 1;
	return x->given < y->given ? -1 : x->given > y->given;
}

static int add_candidates_file(entry *e, size_t *n, size_t cap, const char *path, irr_error *err)
{
	FILE *f = fopen(path, "rb");
	char line[65536];
	long ln = 0;
	if (!f)
		return irr_error_set(err, IRR_EIO, path, 0, "cannot open");
	while (fgets(line, sizeof line, f)) {
		char *p = line, *q;
		ln++;
		while (*p == ' ' || *p == '\t')
			p++;
		if (!*p || *p == '#' || *p == '\n' || *p == '\r')
			continue;
		q = p + strcspn(p, " \t\r\n");
		*q = '\0';
		if (*n >= cap) {
			fclose(f);
			return irr_error_set(err, IRR_ELIMIT, path, ln, "more than %zu candidates", cap);
		}
		e[*n].given = *n;
		if (!(e[*n].smiles = strdup(p))) {
			fclose(f);
			return irr_error_set(err, IRR_ENOMEM, path, ln, "out of memory");
		}
		(*n)++;
	}
	fclose(f);
	return IRR_OK;
}

static char *render_text(entry *e, size_t n, const char *sample)
{
	char *buf = NULL;
	size_t len = 0;
	FILE *f = open_memstream(&buf, &len);
	if (!f)
		return NULL;
	fprintf(f, "== candidates ranked%s%.40s ==\n", sample ? " == sample " : "", sample ? sample : "");
	for (size_t i = 0; i < n; i++) {
		const irr_check *c = e[i].c;
		char sc[32];
		size_t shown = 0;
		irr_format_double(sc, sizeof sc, irr_check_score(c), 2);
		fprintf(f, "\n%2zu. %-17s %s  %.60s\n", i + 1, irr_verdict_name(irr_check_verdict(c)), sc,
		        e[i].smiles);
		if (strlen(e[i].smiles) > 60)
			fprintf(f, "    %s\n", e[i].smiles);
		for (size_t k = 0; k < irr_check_reason_count(c) && shown < KEY_REASONS; k++) {
			const irr_reason *r = irr_check_reason(c, k);
			/* Key reasons: the decisive ones, else the first few. */
			const char *t = r->text;
			size_t col = 8, tl = strlen(t);
			fprintf(f, "    %s ", r->decisive ? "!" : "-");
			col = 6;
			while (tl) {
				size_t take = tl;
				if (col + take > 80) {
					take = 80 - col;
					while (take > 0 && t[take] != ' ')
						take--;
					if (!take)
						take = 80 - col;
				}
				fwrite(t, 1, take, f);
				fputc('\n', f);
				t += take, tl -= take;
				while (*t == ' ')
					t++, tl--;
				if (tl)
					fputs("      ", f);
				col = 6;
			}
			shown++;
		}
	}
	fclose(f);
	return buf;
}

static char *render_json(entry *e, size_t n, const char *sample)
{
	cJSON *root = cJSON_CreateObject(), *arr;
	if (!root)
		return NULL;
	cJSON_AddStringToObject(root, "schema", RANK_SCHEMA);
	if (sample)
		cJSON_AddStringToObject(root, "sample", sample);
	else
		cJSON_AddNullToObject(root, "sample");
	arr = cJSON_AddArrayToObject(root, "candidates");
	for (size_t i = 0; i < n; i++) {
		cJSON *o = cJSON_CreateObject();
		cJSON *res = irr_report_json_object(e[i].c);
		cJSON_AddNumberToObject(o, "rank", (double)(i + 1));
		cJSON_AddNumberToObject(o, "given", (double)(e[i].given + 1));
		cJSON_AddStringToObject(o, "smiles", e[i].smiles);
		cJSON_AddItemToObject(o, "result", res);
		cJSON_AddItemToArray(arr, o);
	}
	return cli_json_text(root);
}

int cmd_rank(int argc, char **argv)
{
	int status = CLI_ERROR, taken;
	char *solv_file = NULL, *text = NULL;
	size_t ncand = 0, cap = (size_t)argc + 4096;
	entry *cand = NULL;
	cli_check_args ca;
	irr_tables *t = NULL;
	irr_check *base = NULL;
	irr_error err;
	cli_args args = {"rank", opts, argc, argv, 1, 0, NULL};
	const cli_opt *d;
	const char *v;
	int next;

	irr_error_clear(&err);
	cand = calloc(cap, sizeof *cand);
	if (cli_check_args_init(&ca, argc) || !cand) {
		irr_error_set(&err, IRR_ENOMEM, "", 0, "out of memory");
		goto fail;
	}
	while ((next = cli_opt_next(&args, &d, &v)) != CLI_ARGS_END) {
		const char *a = d ? d->name : "";
		if (next == CLI_ERROR || (taken = cli_check_option("rank", a, v, &ca)) == CLI_ERROR) {
			status = CLI_ERROR;
			goto out;
		}
		if (taken)
			continue;
		if (!strcmp(a, "--help")) {
			help();
			status = CLI_OK;
			goto out;
		} else if (!strcmp(a, "--candidate")) {
			cand[ncand].given = ncand;
			if (!(cand[ncand++].smiles = strdup(v))) {
				irr_error_set(&err, IRR_ENOMEM, "", 0, "out of memory");
				goto fail;
			}
		} else if (!strcmp(a, "--candidates-file")) {
			if (add_candidates_file(cand, &ncand, cap, v, &err))
				goto fail;
		}
	}
	if (!ncand) {
		status = cli_usage_error("rank", "give at least one --candidate");
		goto out;
	}
	if (!!ca.spectrum + !!ca.peaks != 1) {
		status = cli_usage_error("rank", "give one of --spectrum or --peaks");
		goto out;
	}
	if (cli_check_begin(&base, &t, &solv_file, &ca, &err) ||
	    cli_check_finish_inputs(base, &ca, &err))
		goto fail;
	for (size_t i = 0; i < ncand; i++) {
		char name[64];
		snprintf(name, sizeof name, "--candidate %zu", i + 1);
		if (irr_check_clone_inputs(&cand[i].c, base, &err) ||
		    irr_check_set_structure_named(cand[i].c, cand[i].smiles, name, &err) ||
		    irr_check_run(cand[i].c, &err))
			goto fail;
	}
	qsort(cand, ncand, sizeof *cand, entry_cmp);
	text = ca.json ? render_json(cand, ncand, ca.sample) : render_text(cand, ncand, ca.sample);
	if (!text) {
		irr_error_set(&err, IRR_ENOMEM, "", 0, "cannot build the report");
		goto fail;
	}
	if (cli_write_file_atomic(ca.output ? ca.output : "-", text, strlen(text), &err))
		goto fail;
	status = irr_check_verdict(cand[0].c) == IRR_VERDICT_CONSISTENT ? CLI_OK : CLI_NOT_CONSISTENT;
	goto out;
fail:
	status = cli_fail(&err);
out:
	free(text);
	for (size_t i = 0; cand && i < ncand; i++) {
		irr_check_free(cand[i].c);
		free(cand[i].smiles);
	}
	free(cand);
	irr_check_free(base);
	irr_tables_free(t);
	free(solv_file);
	cli_check_args_free(&ca);
	return status;
}
