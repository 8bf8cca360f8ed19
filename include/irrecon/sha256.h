/* irrecon/sha256.h: a small SHA-256 (FIPS 180-4) for table digests and
 * input hashes in reports. Streaming: init, update any number of times,
 * final. No allocation. */
#ifndef IRRECON_SHA256_H
#define IRRECON_SHA256_H

#include <stddef.h>
#include <stdint.h>

#ifdef __cplusplus
extern "C" {
#endif

typedef struct irr_sha256 {
	uint32_t h[8];
	uint64_t nbytes;      /* total message length so far */
	unsigned char buf[64];
	size_t nbuf;          /* bytes waiting in buf */
} irr_sha256;

void irr_sha256_init(irr_sha256 *s);
void irr_sha256_update(irr_sha256 *s, const void *data, size_t len);
/* Writes the 32-byte digest; `s` must be re-initialised before reuse. */
void irr_sha256_final(irr_sha256 *s, unsigned char digest[32]);
/* Writes the 64 lowercase hex digits and a terminating NUL (65 bytes). */
void irr_sha256_hex(const unsigned char digest[32], char hex[65]);
/* One-shot: hex digest of `len` bytes. */
void irr_sha256_data_hex(const void *data, size_t len, char hex[65]);

#ifdef __cplusplus
}
#endif
#endif
