/* opts.c: the option tables of the irrecon commands: one table per command
 * drives its argv loop, its --help option list and (through --help) the
 * man page that tools/mkman builds. Also the option-value checks that
 * several commands share. */
#include "cli/cli.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#include <cjson/cJSON.h>

const char *cli_opt_long(const cli_opt *opt)
{
	const char *l = opt->name;
	if (l[0] == '-' && l[1] != '-' && l[1] && !strncmp(l + 2, ", ", 2))
		l += 4;
	return l;
}

const cli_opt *cli_opt_find(const cli_opt *opts, const char *name)
{
	for (const cli_opt *d = opts; d->name; d++)
		if (d->help && !strcmp(name, cli_opt_long(d)))
			return d;
	return NULL;
}

void cli_opt_help(const cli_opt *opts, int width)
{
	for (const cli_opt *d = opts; d->name; d++) {
		char lhs[64];
		if (!d->help) {
			printf("%s%s\n", d == opts ? "" : "\n", d->name);
			continue;
		}
		snprintf(lhs, sizeof lhs, "%s%s%s", d->name, d->arg ? " " : "", d->arg ? d->arg : "");
		printf("  %-*s%s", width, lhs, d->help[0] == '\n' ? "" : " ");
		/* Continuation lines of the help text line up under its first. */
		for (const char *h = d->help; *h; h++) {
			putchar(*h);
			if (*h == '\n')
				printf("%*s", width + 3, "");
		}
		putchar('\n');
	}
}

int cli_opt_next(cli_args *p, const cli_opt **opt, const char **value)
{
	const char *a;
	*opt = NULL;
	*value = NULL;
	if (p->i >= p->argc)
		return CLI_ARGS_END;
	a = p->argv[p->i++];
	if ((p->flags & CLI_ARGS_OPERANDS) && (a[0] != '-' || !strcmp(a, "-"))) {
		*value = a;
		return CLI_ARGS_NEXT;
	}
	if ((p->flags & CLI_ARGS_DASHDASH) && !strcmp(a, "--"))
		return CLI_ARGS_DASHDASH_SEEN;
	if ((p->flags & CLI_ARGS_DASH_H) && !strcmp(a, "-h"))
		a = "--help";
	for (const char *const *al = p->aliases; al && al[0]; al += 2)
		if (!strcmp(a, al[0])) {
			a = al[1];
			break;
		}
	if (!(*opt = cli_opt_find(p->opts, a)))
		return cli_usage_error(p->cmd, "unknown option '%s'", a);
	if ((*opt)->arg) {
		if (p->i >= p->argc) {
			if (p->flags & CLI_ARGS_NEEDS_VALUE)
				return cli_usage_error(p->cmd, "%s needs a value", a);
			return cli_usage_error(p->cmd, "%s needs %s", a, (*opt)->arg);
		}
		*value = p->argv[p->i++];
	}
	return CLI_ARGS_NEXT;
}

int cli_opt_is(const cli_opt *opt, const char *name)
{
	return opt && !strcmp(cli_opt_long(opt), name);
}

int cli_parse_count(const char *opt, const char *v, size_t *out)
{
	double num;
	char *end;
	(void)opt;
	if (irr_parse_double(v, &end, &num) != IRR_OK || *end || !(num >= 1 && num <= 1e15) ||
	    num != (double)(long long)num)
		return -1;
	*out = (size_t)num;
	return 0;
}

int cli_count_option(const char *cmd, const char *opt, const char *v, irr_read_options *ro)
{
	size_t n;
	if (cli_parse_count(opt, v, &n) || (!strcmp(opt, "--block") && n > 100000))
		return cli_usage_error(cmd, "%s needs a whole number >= 1, not '%s'", opt, v);
	if (!strcmp(opt, "--block"))
		ro->block = (int)n;
	else if (!strcmp(opt, "--max-bytes"))
		ro->max_bytes = n;
	else
		ro->max_points = n;
	return CLI_OK;
}

int cli_number_option(const char *cmd, const char *opt, const char *v, double *out)
{
	char *end;
	if (irr_parse_double(v, &end, out) != IRR_OK || *end)
		return cli_usage_error(cmd, "%s needs a number, not '%s'", opt, v);
	return CLI_OK;
}

int cli_read_option(const char *cmd, const char *opt, const char *v, irr_read_options *ro)
{
	double num;
	if (!strcmp(opt, "--decimal-comma")) {
		ro->decimal_comma = 1;
	} else if (!strcmp(opt, "--micrometres")) {
		ro->x_micrometers = 1;
	} else if (!strcmp(opt, "--y-units")) {
		static const irr_yunits all[] = {IRR_Y_TRANSMITTANCE, IRR_Y_PERCENT_T, IRR_Y_ABSORBANCE,
		                                 IRR_Y_REFLECTANCE, IRR_Y_KUBELKA_MUNK, IRR_Y_ARBITRARY};
		size_t k;
		for (k = 0; k < sizeof all / sizeof all[0]; k++)
			if (!strcmp(v, irr_yunits_name(all[k])))
				break;
		if (k == sizeof all / sizeof all[0])
			return cli_usage_error(cmd, "unknown Y units '%s'", v);
		ro->y_units = all[k];
	} else if (!strcmp(opt, "--block")) {
		if (cli_number_option(cmd, opt, v, &num))
			return CLI_ERROR;
		if (num < 1 || num > 1e6 || num != (double)(int)num)
			return cli_usage_error(cmd, "--block needs a whole number >= 1, not '%s'", v);
		ro->block = (int)num;
	} else if (!strcmp(opt, "--max-bytes") || !strcmp(opt, "--max-points")) {
		if (cli_number_option(cmd, opt, v, &num))
			return CLI_ERROR;
		if (!(num >= 1 && num <= 1e15) || num != floor(num))
			return cli_usage_error(cmd, "%s needs a whole number >= 1, not '%s'", opt, v);
		if (!strcmp(opt, "--max-bytes"))
			ro->max_bytes = (size_t)num;
		else
			ro->max_points = (size_t)num;
	} else {
		return -1;
	}
	return CLI_OK;
}

char *cli_json_text(cJSON *root)
{
	char *txt = root ? cJSON_Print(root) : NULL, *out = NULL;
	size_t len;
	cJSON_Delete(root);
	if (!txt)
		return NULL;
	len = strlen(txt);
	out = malloc(len + 2);
	if (out) {
		memcpy(out, txt, len);
		out[len] = '\n';
		out[len + 1] = '\0';
	}
	cJSON_free(txt);
	return out;
}
