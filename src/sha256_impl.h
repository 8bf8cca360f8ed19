/* sha256_impl.h: internals of src/sha256.c for its tests: which
 * compression function runs. Not installed. */
#ifndef IRRECON_SHA256_IMPL_H
#define IRRECON_SHA256_IMPL_H

/* 1 when this processor has the x86 SHA extensions (and SSSE3, SSE4.1). */
int irr_sha256__fast_available(void);
/* Nonzero: use the portable compression from now on; 0: choose by CPUID
 * again (the SHA extensions where available). Not thread-safe against
 * hashing in progress: for tests. */
void irr_sha256__force_portable(int portable);

#endif
