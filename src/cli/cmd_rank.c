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
	{"--max-points", "N", "refuse spectra of more than N points (default 4,000,000)"},
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
	const char *spectrum = NULL, *peaks = NULL, *output = NULL, *tables_dir = NULL;
	const char *sample = NULL;
	int json = 0, status = CLI_ERROR;
	char **extra = NULL, *solv_file = NULL, *text = NULL;
	size_t nextra = 0, ncand = 0, cap = (size_t)argc + 4096;
	struct { irr_other_kind kind; const char *what; } *others = NULL;
	size_t nothers = 0;
	entry *cand = NULL;
	irr_check_options o;
	irr_tables *t = NULL;
	irr_check *base = NULL;
	irr_error err;
	irr_read_options ro;

	irr_error_clear(&err);
	irr_check_options_init(&o);
	irr_read_options_init(&ro);
	extra = calloc((size_t)argc + 1, sizeof *extra);
	others = calloc((size_t)argc + 1, sizeof *others);
	cand = calloc(cap, sizeof *cand);
	if (!extra || !others || !cand) {
		irr_error_set(&err, IRR_ENOMEM, "", 0, "out of memory");
		goto fail;
	}
	cli_args args = {"rank", opts, argc, argv, 1, 0, NULL};
	const cli_opt *d;
	const char *v;
	int next;
	while ((next = cli_opt_next(&args, &d, &v)) != CLI_ARGS_END) {
		const char *a = d ? d->name : "";
		if (next == CLI_ERROR) {
			status = CLI_ERROR;
			goto out;
		}
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
		} else if (!strcmp(a, "--spectrum")) spectrum = v;
		else if (!strcmp(a, "--peaks")) peaks = v;
		else if (!strcmp(a, "--starting-material")) others[nothers].kind = IRR_OTHER_STARTING_MATERIAL, others[nothers++].what = v;
		else if (!strcmp(a, "--reagent")) others[nothers].kind = IRR_OTHER_REAGENT, others[nothers++].what = v;
		else if (!strcmp(a, "--solvent")) others[nothers].kind = IRR_OTHER_SOLVENT, others[nothers++].what = v;
		else if (!strcmp(a, "--sample")) sample = v;
		else if (!strcmp(a, "--phase")) {
			if (irr_phase_parse(v, &o.phase)) {
				status = cli_usage_error("rank", "--phase must be condensed, solution or gas, not '%s'", v);
				goto out;
			}
		} else if (!strcmp(a, "--sampling")) {
			if (irr_sampling_parse(v, &o.sampling)) {
				status = cli_usage_error("rank", "--sampling must be atr or transmission, not '%s'", v);
				goto out;
			}
		} else if (!strcmp(a, "--json")) json = 1;
		else if (!strcmp(a, "--output")) output = v;
		else if (!strcmp(a, "--tables")) tables_dir = v;
		else if (!strcmp(a, "--add-table")) extra[nextra++] = (char *)v;
		else if (!strcmp(a, "--block") || !strcmp(a, "--max-bytes") || !strcmp(a, "--max-points")) {
			if (cli_count_option("rank", a, v, &ro)) {
				status = CLI_ERROR;
				goto out;
			}
		}
	}
	if (!ncand) {
		status = cli_usage_error("rank", "give at least one --candidate");
		goto out;
	}
	if (!!spectrum + !!peaks != 1) {
		status = cli_usage_error("rank", "give one of --spectrum or --peaks");
		goto out;
	}
	if (cli_load_tables(&t, tables_dir, extra, nextra, &solv_file, &err) ||
	    irr_check_create(&base, t, &err))
		goto fail;
	o.sample_id = sample;
	o.solvents_file = solv_file;
	irr_check_set_options(base, &o);
	for (size_t k = 0; k < nothers; k++)
		if (irr_check_add_other(base, others[k].kind, others[k].what, &err))
			goto fail;
	if (cli_check_set_input(base, &o, spectrum, peaks, &ro, &err))
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
	text = json ? render_json(cand, ncand, sample) : render_text(cand, ncand, sample);
	if (!text) {
		irr_error_set(&err, IRR_ENOMEM, "", 0, "cannot build the report");
		goto fail;
	}
	if (cli_write_file_atomic(output ? output : "-", text, strlen(text), &err))
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
	free(extra);
	free(others);
	return status;
}
