/* spectrum_dump.c: prints a spectrum as irrecon reads it (before
 * normalisation), one "x y" pair per line with 17 significant digits, for
 * the cross-check against an independent JCAMP-DX reader. Test helper: it
 * checks nothing itself; tests/scripts/jcamp_crosscheck.sh compares its
 * output with the source of truth there, the npm package jcampconverter
 * reading the same files of ../shared/ir-reference. */
#include <stdio.h>
#include <stdlib.h>

#include "irrecon/spectrum.h"

int main(int argc, char **argv)
{
	irr_spectrum *s;
	irr_error err;
	char msg[2200];
	if (argc != 2) {
		fprintf(stderr, "usage: spectrum_dump FILE\n");
		return 2;
	}
	irr_error_clear(&err);
	if (irr_spectrum_read_file(&s, argv[1], NULL, &err) < 0) {
		irr_error_format(&err, msg, sizeof msg);
		fprintf(stderr, "spectrum_dump: %s\n", msg);
		return 2;
	}
	for (size_t i = 0; i < irr_spectrum_points(s); i++) {
		char a[40], b[40];
		irr_format_double(a, sizeof a, irr_spectrum_x(s)[i], -1);
		irr_format_double(b, sizeof b, irr_spectrum_y(s)[i], -1);
		printf("%s %s\n", a, b);
	}
	for (size_t i = 0; i < irr_spectrum_warning_count(s); i++)
		fprintf(stderr, "warning: %s\n", irr_spectrum_warning(s, i));
	irr_spectrum_free(s);
	return 0;
}
