/* refdata.h: where the unit tests find the real measured spectra of
 * ../shared/ir-reference (third-party data, read in place, never copied),
 * how they skip when the folder is absent, and the digests the folder
 * publishes in its SHA256SUMS. Include after <cmocka.h>. */
#ifndef IRRECON_TEST_REFDATA_H
#define IRRECON_TEST_REFDATA_H

#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>

/* The folder: $IRRECON_REFDIR, else ../shared/ir-reference from the
 * repository root (where make test runs). */
static inline const char *refdir(void)
{
	const char *d = getenv("IRRECON_REFDIR");
	return d && *d ? d : "../shared/ir-reference";
}

static inline int have_refdir(void)
{
	char p[1100];
	snprintf(p, sizeof p, "%s/MANIFEST.tsv", refdir());
	return access(p, R_OK) == 0;
}

/* Skips the calling test, saying why, when the folder is absent. */
#define NEED_REFDIR()                                                               \
	do {                                                                        \
		if (!have_refdir()) {                                               \
			print_message("skipped: reference spectra folder %s not found " \
			              "(set IRRECON_REFDIR)\n", refdir());          \
			skip();                                                     \
		}                                                                   \
	} while (0)

/* The digest the folder's SHA256SUMS publishes for `file` (sha256sum
 * format: 64 hex digits, two characters, the name). 0, or -1 if absent. */
static inline int published_sha256(const char *file, char hex[65])
{
	char path[1100], line[512];
	FILE *f;
	snprintf(path, sizeof path, "%s/SHA256SUMS", refdir());
	f = fopen(path, "r");
	if (!f)
		return -1;
	while (fgets(line, sizeof line, f)) {
		char *name = line + 66;
		if (strlen(line) <= 66)
			continue;
		name[strcspn(name, "\r\n")] = '\0';
		if (!strcmp(name, file)) {
			memcpy(hex, line, 64);
			hex[64] = '\0';
			fclose(f);
			return 0;
		}
	}
	fclose(f);
	return -1;
}

#endif
