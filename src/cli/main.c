/* main.c: entry point of the irrecon program; dispatches to subcommands. */
#include <locale.h>
#include <stdio.h>
#include <string.h>

#include "cli/cli.h"
#include "irrecon/common.h"

static const cli_command commands[] = {
	{"check", cmd_check, "check a spectrum against a proposed structure (the main job)"},
	{"rank", cmd_rank, "order candidate structures by how well they fit one spectrum"},
	{"predict", cmd_predict, "list the bands a structure should show (table or JSON)"},
	{"peaks", cmd_peaks, "pick the bands of a spectrum (table or JSON)"},
	{"axis", cmd_axis, "check the wavenumber axis with a polystyrene film spectrum"},
	{"synth", cmd_synth, "write the spectrum a structure or mixture should give"},
	{"batch", cmd_batch, "check every sample of a manifest (JSON lines, in order)"},
	{NULL, NULL, NULL}
};

static void usage(FILE *f)
{
	fprintf(f, "usage: irrecon COMMAND [OPTIONS]\n"
	           "       irrecon COMMAND --help\n"
	           "       irrecon --version\n\n"
	           "Checks a measured infrared spectrum against a proposed structure.\n\n"
	           "Commands:\n");
	for (size_t i = 0; commands[i].name; i++)
		fprintf(f, "  %-10s %s\n", commands[i].name, commands[i].summary);
	fprintf(f, "\nExit status: 0 consistent (or success), 1 any other verdict, 2 error.\n"
	           "A verdict is evidence, never proof of identity or purity.\n");
}

int main(int argc, char **argv)
{
	/* Numbers are read and written with '.' always. The library takes care
	 * of itself; the program pins its own locale too, in case something
	 * loaded before main (a preload, a plugin) switched it. */
	setlocale(LC_ALL, "C");
	if (argc < 2) {
		usage(stderr);
		return CLI_ERROR;
	}
	if (!strcmp(argv[1], "--help") || !strcmp(argv[1], "-h") || !strcmp(argv[1], "help")) {
		usage(stdout);
		return CLI_OK;
	}
	if (!strcmp(argv[1], "--version")) {
		printf("irrecon %s\n", irr_version());
		return CLI_OK;
	}
	for (size_t i = 0; commands[i].name; i++)
		if (!strcmp(argv[1], commands[i].name))
			return commands[i].fn(argc - 1, argv + 1);
	fprintf(stderr, "irrecon: unknown command '%s' (see 'irrecon --help')\n", argv[1]);
	return CLI_ERROR;
}
