/* cmd_predict.c: `irrecon predict SMILES`: the bands a proposed structure
 * must show, as an 80-column table grouped by spectral region or as JSON
 * ("irrecon.predict/1"), with the safety cautions for its groups. */
#include <errno.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cjson/cJSON.h>

#include "cli/cli.h"
#include "irrecon/common.h"
#include "irrecon/keys.h"
#include "irrecon/perceive.h"
#include "irrecon/predict.h"
#include "irrecon/structure.h"
#include "irrecon/tables.h"

#define MAX_EXTRA_TABLES 32

static const cli_opt opts[] = {
	{"--structure-file", "FILE", "read the SMILES from FILE (first line that is not\n"
	                             "blank or '#'; text after the SMILES is its name)"},
	{"--json", NULL, "print JSON (schema irrecon.predict/1) instead of the table"},
	{"--output", "FILE", "write to FILE (replaced atomically) instead of stdout"},
	{"--phase", "PHASE", "condensed (default), solution or gas"},
	{"--sampling", "HOW", "atr (default) or transmission"},
	{"--tables", "DIR", "group-table folder (default: $IRRECON_TABLES, else built in)"},
	{"--add-table", "FILE", "also load FILE (repeatable); its groups add to or\n"
	                        "replace groups of the same id"},
	{"--help", NULL, "show this help"},
	{NULL, NULL, NULL}
};

static void help(void)
{
	printf("usage: irrecon predict SMILES [OPTIONS]\n"
	       "       irrecon predict --structure-file FILE [OPTIONS]\n\n"
	       "Lists the infrared bands the structure should show, from the group-frequency\n"
	       "tables, highest wavenumber first, grouped by spectral region.\n\n"
	       "Options:\n");
	cli_opt_help(opts, 22);
	printf("\nTable columns: window and typical position (cm-1); intensity class\n"
	       "(s strong, m medium, w weak, v variable); shape; diagnostic weight 0-1 (how\n"
	       "much a missing band counts against the structure); band, with its group and\n"
	       "the number of such groups. '~' marks an overtone or combination band.\n"
	       "Windows are handbook ranges, not measurements: a verdict built on them is\n"
	       "evidence, never proof of identity or purity.\n\n"
	       "Exit status: 0 success, 2 error.\n");
}

/* "ketone (conjugated, ring 6)": the key's trade name and the context that
 * moves its bands. */
static void group_title(char *buf, size_t size, const irr_group *g, const irr_tables *t)
{
	const char *name = irr_key_name(g->id);
	const irr_group_attrs *a = &g->attrs;
	char ctx[160] = "";
	size_t n = 0;
	if (!name) {
		const irr_table_group *tg = irr_tables_find_id(t, g->id);
		name = tg ? tg->name : g->id;
	}
#define ADD(...) n += (size_t)snprintf(ctx + n, n < sizeof ctx ? sizeof ctx - n : 0, __VA_ARGS__)
	if (a->pattern[0])
		ADD("%s%s", n ? ", " : "", a->pattern);
	if (a->conjugated)
		ADD("%sconjugated", n ? ", " : "");
	if (a->ring_size)
		ADD("%sring %d", n ? ", " : "", a->ring_size);
	if (!strcmp(g->id, "amine") || !strcmp(g->id, "amide") || !strcmp(g->id, "ammonium") ||
	    !strcmp(g->id, "lactam") || !strcmp(g->id, "imide") || !strcmp(g->id, "urea") ||
	    !strcmp(g->id, "carbamate") || !strcmp(g->id, "thiocarbamate") ||
	    !strcmp(g->id, "sulfonamide"))
		ADD("%s%d N-H", n ? ", " : "", a->n_h);
	if (a->aryl == 1)
		ADD("%saryl", n ? ", " : "");
	else if (a->aryl > 1)
		ADD("%saryl x%d", n ? ", " : "", a->aryl);
	if (a->hbond_intra)
		ADD("%sinternal H-bond", n ? ", " : "");
#undef ADD
	if (n)
		snprintf(buf, size, "%s (%s)", name, ctx);
	else
		snprintf(buf, size, "%s", name);
}

static char intensity_letter(irr_intensity i)
{
	switch (i) {
	case IRR_INT_STRONG: return 's';
	case IRR_INT_MEDIUM: return 'm';
	case IRR_INT_WEAK: return 'w';
	case IRR_INT_VARIABLE: return 'v';
	default: return '-';
	}
}

/* Last column of a line: at most `width` columns, cut with '>' when too
 * long (no padding, so lines carry no trailing blanks). */
static void fit(FILE *out, const char *s, int width)
{
	int len = (int)strlen(s);
	if (len <= width)
		fputs(s, out);
	else
		fprintf(out, "%.*s>", width - 1, s);
}

/* Prints `text` after `lead`, wrapped at word breaks to `width` columns,
 * continuation lines indented under the text. */
static void wrap(FILE *out, const char *lead, const char *text, int width)
{
	int indent = (int)strlen(lead), col = indent;
	fputs(lead, out);
	while (*text) {
		size_t w = strcspn(text, " ");
		if (col > indent && col + 1 + (int)w > width) {
			fprintf(out, "\n%*s", indent, "");
			col = indent;
		} else if (col > indent) {
			fputc(' ', out);
			col++;
		}
		fwrite(text, 1, w, out);
		col += (int)w;
		text += w;
		while (*text == ' ')
			text++;
	}
	fputc('\n', out);
}

static void print_text(FILE *out, const irr_molecule *m, const char *title,
                       const irr_inventory *inv, const irr_prediction *p,
                       const irr_tables *t, const irr_predict_options *po)
{
	const irr_counts *c = irr_inventory_counts(inv);
	char a[32], b[32], d[32];
	size_t nb = irr_prediction_count(p);
	fprintf(out, "Expected bands for ");
	fit(out, irr_molecule_smiles(m), 50);
	fprintf(out, "\n");
	fprintf(out, "  formula %s", irr_molecule_formula(m));
	if (title && *title)
		fprintf(out, "   name %.50s", title);
	fprintf(out, "\n  %s phase, %s; tables sha256 %.12s\n", irr_phase_name(po->phase),
	        po->sampling == IRR_SAMPLING_ATR ? "ATR" : "transmission", irr_tables_digest(t));
	fprintf(out, "  bonds: O-H %d, N-H %d, C#N %d, C=O %d; aromatic rings %d;\n"
	             "         C-H on sp/sp2/sp3 carbon %d/%d/%d\n",
	        c->o_h, c->n_h, c->c_n_triple, c->c_o_double, c->aromatic_rings,
	        c->c_h_sp, c->c_h_sp2, c->c_h_sp3);
	for (size_t i = 0; i < irr_inventory_caution_count(inv); i++)
		wrap(out, "  CAUTION: ", irr_inventory_caution(inv, i), 79);
	fprintf(out, "\nGroups found\n");
	for (size_t i = 0; i < irr_inventory_group_count(inv); i++) {
		const irr_group *g = irr_inventory_group(inv, i);
		char gt[200];
		group_title(gt, sizeof gt, g, t);
		fprintf(out, "  %2zu  %3dx  ", i + 1, g->count);
		fit(out, gt, 68);
		fprintf(out, "\n");
	}
	if (irr_inventory_group_count(inv) == 0)
		fprintf(out, "  (none)\n");
	int region = -1;
	for (size_t i = 0; i < nb; i++) {
		const irr_band *bd = irr_prediction_band(p, i);
		int r = irr_region_of(bd->typical);
		char label[120];
		if (r != region) {
			region = r;
			fprintf(out, "\n-- %s\n", irr_region_name(r));
			fprintf(out, "  %-9s %5s %s %-7s %-3s %s\n", "window", "typ", "i", "shape", "wt",
			        "band [group no.]");
		}
		snprintf(label, sizeof label, "%s%s [%zu]", bd->overtone ? "~" : "", bd->label,
		         bd->group_index + 1);
		{
			char win[72];
			snprintf(win, sizeof win, "%s-%s", cli_fmt(a, sizeof a, bd->low, 0), cli_fmt(b, sizeof b, bd->high, 0));
			fprintf(out, "  %-9s %5s %c %-7s %3s ", win, cli_fmt(d, sizeof d, bd->typical, 0),
			        intensity_letter(bd->intensity),
			        bd->shape == IRR_SHAPE_VERY_BROAD ? "v.broad" : irr_shape_name(bd->shape),
			        (irr_format_double(b, sizeof b, bd->weight, 1), b));
		}
		fit(out, label, 47);
		fprintf(out, "\n");
	}
	if (nb == 0)
		fprintf(out, "\n  No bands: no group of this structure is in the tables.\n");
	fprintf(out, "\nSources are named per band in --json output. Windows are handbook ranges;\n"
	             "a match is evidence, not proof of identity or purity.\n");
}

static cJSON *json_output(const irr_molecule *m, const char *title, const irr_inventory *inv,
                          const irr_prediction *p, const irr_tables *t,
                          const irr_predict_options *po)
{
	const irr_counts *c = irr_inventory_counts(inv);
	cJSON *root = cJSON_CreateObject(), *o, *arr;
	if (!root)
		return NULL;
	cJSON_AddStringToObject(root, "schema", "irrecon.predict/1");
	o = cJSON_AddObjectToObject(root, "structure");
	cJSON_AddStringToObject(o, "smiles", irr_molecule_smiles(m));
	cJSON_AddStringToObject(o, "formula", irr_molecule_formula(m));
	if (title && *title)
		cJSON_AddStringToObject(o, "name", title);
	o = cJSON_AddObjectToObject(root, "conditions");
	cJSON_AddStringToObject(o, "phase", irr_phase_name(po->phase));
	cJSON_AddStringToObject(o, "sampling", irr_sampling_name(po->sampling));
	o = cJSON_AddObjectToObject(root, "tables");
	cJSON_AddStringToObject(o, "sha256", irr_tables_digest(t));
	cJSON_AddNumberToObject(o, "groups", (double)irr_tables_group_count(t));
	o = cJSON_AddObjectToObject(root, "counts");
	cJSON_AddNumberToObject(o, "o_h", c->o_h);
	cJSON_AddNumberToObject(o, "n_h", c->n_h);
	cJSON_AddNumberToObject(o, "c_n_triple", c->c_n_triple);
	cJSON_AddNumberToObject(o, "c_o_double", c->c_o_double);
	cJSON_AddNumberToObject(o, "aromatic_rings", c->aromatic_rings);
	cJSON_AddNumberToObject(o, "c_h_sp", c->c_h_sp);
	cJSON_AddNumberToObject(o, "c_h_sp2", c->c_h_sp2);
	cJSON_AddNumberToObject(o, "c_h_sp3", c->c_h_sp3);
	cJSON_AddNumberToObject(o, "ch3", c->ch3);
	cJSON_AddNumberToObject(o, "ch2", c->ch2);
	cJSON_AddNumberToObject(o, "ch", c->ch);
	cJSON_AddNumberToObject(o, "heavy_atoms", c->heavy_atoms);
	cJSON_AddNumberToObject(o, "components", c->components);
	arr = cJSON_AddArrayToObject(root, "groups");
	for (size_t i = 0; i < irr_inventory_group_count(inv); i++) {
		const irr_group *g = irr_inventory_group(inv, i);
		cJSON *jg = cJSON_CreateObject(), *at, *ctx;
		char gt[200];
		group_title(gt, sizeof gt, g, t);
		cJSON_AddStringToObject(jg, "id", g->id);
		cJSON_AddStringToObject(jg, "name", gt);
		cJSON_AddNumberToObject(jg, "count", g->count);
		at = cJSON_AddArrayToObject(jg, "atoms");
		for (size_t k = 0; k < g->natoms; k++)
			cJSON_AddItemToArray(at, cJSON_CreateNumber(g->atoms[k]));
		ctx = cJSON_AddObjectToObject(jg, "context");
		cJSON_AddNumberToObject(ctx, "conjugated", g->attrs.conjugated);
		cJSON_AddNumberToObject(ctx, "ring_size", g->attrs.ring_size);
		cJSON_AddNumberToObject(ctx, "n_h", g->attrs.n_h);
		cJSON_AddNumberToObject(ctx, "aryl", g->attrs.aryl);
		cJSON_AddNumberToObject(ctx, "hbond_intra", g->attrs.hbond_intra);
		cJSON_AddStringToObject(ctx, "pattern", g->attrs.pattern);
		cJSON_AddItemToArray(arr, jg);
	}
	arr = cJSON_AddArrayToObject(root, "bands");
	for (size_t i = 0; i < irr_prediction_count(p); i++) {
		const irr_band *bd = irr_prediction_band(p, i);
		cJSON *jb = cJSON_CreateObject();
		cJSON_AddStringToObject(jb, "group", bd->group_id);
		cJSON_AddNumberToObject(jb, "group_index", (double)bd->group_index);
		cJSON_AddStringToObject(jb, "label", bd->label);
		cJSON_AddNumberToObject(jb, "low", bd->low);
		cJSON_AddNumberToObject(jb, "high", bd->high);
		cJSON_AddNumberToObject(jb, "typical", bd->typical);
		cJSON_AddStringToObject(jb, "intensity", irr_intensity_name(bd->intensity));
		cJSON_AddStringToObject(jb, "shape", irr_shape_name(bd->shape));
		cJSON_AddNumberToObject(jb, "weight", bd->weight);
		cJSON_AddBoolToObject(jb, "overtone", bd->overtone);
		cJSON_AddNumberToObject(jb, "region", irr_region_of(bd->typical));
		cJSON_AddStringToObject(jb, "source", bd->source ? bd->source : "");
		if (bd->note)
			cJSON_AddStringToObject(jb, "note", bd->note);
		cJSON_AddItemToArray(arr, jb);
	}
	arr = cJSON_AddArrayToObject(root, "cautions");
	for (size_t i = 0; i < irr_inventory_caution_count(inv); i++)
		cJSON_AddItemToArray(arr, cJSON_CreateString(irr_inventory_caution(inv, i)));
	return root;
}

int cmd_predict(int argc, char **argv)
{
	const char *smiles_arg = NULL, *structure_file = NULL, *tables_dir = NULL, *output = "-";
	const char *extra[MAX_EXTRA_TABLES];
	size_t n_extra = 0;
	int json = 0, rc = CLI_ERROR;
	char *file_smiles = NULL, *file_name = NULL, *text = NULL;
	size_t text_len = 0;
	long file_line = 0;
	irr_predict_options po;
	irr_error err;
	irr_tables *t = NULL;
	irr_molecule *m = NULL;
	irr_inventory *inv = NULL;
	irr_prediction *p = NULL;

	irr_error_clear(&err);
	irr_predict_options_init(&po);
	cli_args args = {"predict", opts, argc, argv, 1, CLI_ARGS_OPERANDS | CLI_ARGS_DASHDASH, NULL};
	const cli_opt *d;
	const char *v;
	int next;
	while ((next = cli_opt_next(&args, &d, &v)) != CLI_ARGS_END) {
		if (next == CLI_ERROR)
			return CLI_ERROR;
		if (next == CLI_ARGS_DASHDASH_SEEN) {
			if (args.i < argc && !smiles_arg)
				smiles_arg = argv[args.i++];
		} else if (!d) {
			if (smiles_arg)
				return cli_usage_error("predict", "give one SMILES (quote it for the shell)");
			smiles_arg = v;
		} else if (cli_opt_is(d, "--help")) {
			help();
			return CLI_OK;
		} else if (cli_opt_is(d, "--json")) {
			json = 1;
		} else if (cli_opt_is(d, "--structure-file")) {
			structure_file = v;
		} else if (cli_opt_is(d, "--output")) {
			output = v;
		} else if (cli_opt_is(d, "--phase")) {
			if (irr_phase_parse(v, &po.phase) != IRR_OK)
				return cli_usage_error("predict", "--phase is condensed, solution or gas, not '%s'", v);
		} else if (cli_opt_is(d, "--sampling")) {
			if (irr_sampling_parse(v, &po.sampling) != IRR_OK)
				return cli_usage_error("predict", "--sampling is atr or transmission, not '%s'", v);
		} else if (cli_opt_is(d, "--tables")) {
			tables_dir = v;
		} else if (cli_opt_is(d, "--add-table")) {
			if (n_extra == MAX_EXTRA_TABLES)
				return cli_usage_error("predict", "at most %d --add-table files", MAX_EXTRA_TABLES);
			extra[n_extra++] = v;
		}
	}
	if (!smiles_arg == !structure_file)
		return cli_usage_error("predict", "give a SMILES or --structure-file FILE (one of them)");

	if (structure_file) {
		if (cli_read_structure_file(&file_smiles, &file_name, &file_line, structure_file, &err))
			goto fail;
	}
	if (irr_tables_load(&t, tables_dir, extra, n_extra, &err))
		goto fail;
	if (irr_molecule_from_smiles(&m, structure_file ? file_smiles : smiles_arg,
	                             structure_file ? structure_file : "SMILES", &err)) {
		if (structure_file && err.line == 0)
			err.line = file_line;
		goto fail;
	}
	if (irr_perceive(&inv, m, t, &err))
		goto fail;
	if (irr_predict(&p, inv, t, &po, &err))
		goto fail;

	/* Everything goes to memory first: an error never leaves half a report. */
	if (json) {
		text = cli_json_text(json_output(m, file_name, inv, p, t, &po));
		text_len = text ? strlen(text) : 0;
	} else {
		FILE *mem = open_memstream(&text, &text_len);
		if (mem) {
			print_text(mem, m, file_name, inv, p, t, &po);
			if (fclose(mem) != 0) {
				free(text);
				text = NULL;
			}
		}
	}
	if (!text) {
		irr_error_set(&err, IRR_ENOMEM, "", 0, "out of memory");
		goto fail;
	}
	if (cli_write_file_atomic(output, text, text_len, &err))
		goto fail;
	rc = CLI_OK;
	goto done;
fail:
	rc = cli_fail(&err);
done:
	free(text);
	free(file_smiles);
	free(file_name);
	irr_prediction_free(p);
	irr_inventory_free(inv);
	irr_molecule_free(m);
	irr_tables_free(t);
	return rc;
}
