/* fuzz.h: what the libFuzzer targets under fuzz/ share: a NUL-terminated
 * copy of the fuzzer's bytes (the readers want data[len] == '\0') and a
 * check that a failure left a usable one-line error behind. */
#ifndef IRRECON_FUZZ_H
#define IRRECON_FUZZ_H

#include <stdint.h>
#include <stdlib.h>
#include <string.h>

#include "irrecon/common.h"

/* Inputs longer than this are cut: the readers are linear, and longer
 * inputs only make each run slower without reaching new code. */
#define FUZZ_MAX_INPUT ((size_t)256 * 1024)

/* A malloc'd copy with a NUL after the last byte; caller frees. */
static inline char *fuzz_copy(const uint8_t *data, size_t *len)
{
	char *s;
	if (*len > FUZZ_MAX_INPUT)
		*len = FUZZ_MAX_INPUT;
	s = (char *)malloc(*len + 1);
	if (!s)
		abort();
	if (*len)
		memcpy(s, data, *len);
	s[*len] = '\0';
	return s;
}

/* A failure must leave a message, on one line: the program prints it as
 * "irrecon: file:line: message" and a blank or split line is a bug. */
static inline void fuzz_check_error(int rc, const irr_error *err)
{
	if (rc == IRR_OK)
		return;
	if (rc > 0 || err->message[0] == '\0' || err->code != rc)
		abort();
	if (strchr(err->message, '\n') || strchr(err->file, '\n'))
		abort();
	if (err->line < 0)
		abort();
}

#endif
