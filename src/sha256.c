/* sha256.c: SHA-256 as specified in FIPS 180-4 (Secure Hash Standard,
 * NIST 2015), section 6.2; used for table digests and input hashes. On x86
 * processors with the SHA extensions (Intel SHA Extensions, 2013; the
 * SHA256RNDS2/MSG1/MSG2 instructions) the compression runs on them, found
 * at run time by CPUID; elsewhere the portable code below. */
#include "irrecon/sha256.h"
#include "sha256_impl.h"

#include <string.h>

#if (defined(__x86_64__) || defined(__i386__)) && !defined(IRR_NO_SIMD)
#include <cpuid.h>
#include <immintrin.h>
#include <stdatomic.h>
#define IRR_SHA_X86 1
#endif

/* FIPS 180-4, 4.2.2: first 32 bits of the fractional parts of the cube
 * roots of the first 64 primes. */
static const uint32_t K[64] = {
	0x428a2f98, 0x71374491, 0xb5c0fbcf, 0xe9b5dba5, 0x3956c25b, 0x59f111f1, 0x923f82a4, 0xab1c5ed5,
	0xd807aa98, 0x12835b01, 0x243185be, 0x550c7dc3, 0x72be5d74, 0x80deb1fe, 0x9bdc06a7, 0xc19bf174,
	0xe49b69c1, 0xefbe4786, 0x0fc19dc6, 0x240ca1cc, 0x2de92c6f, 0x4a7484aa, 0x5cb0a9dc, 0x76f988da,
	0x983e5152, 0xa831c66d, 0xb00327c8, 0xbf597fc7, 0xc6e00bf3, 0xd5a79147, 0x06ca6351, 0x14292967,
	0x27b70a85, 0x2e1b2138, 0x4d2c6dfc, 0x53380d13, 0x650a7354, 0x766a0abb, 0x81c2c92e, 0x92722c85,
	0xa2bfe8a1, 0xa81a664b, 0xc24b8b70, 0xc76c51a3, 0xd192e819, 0xd6990624, 0xf40e3585, 0x106aa070,
	0x19a4c116, 0x1e376c08, 0x2748774c, 0x34b0bcb5, 0x391c0cb3, 0x4ed8aa4a, 0x5b9cca4f, 0x682e6ff3,
	0x748f82ee, 0x78a5636f, 0x84c87814, 0x8cc70208, 0x90befffa, 0xa4506ceb, 0xbef9a3f7, 0xc67178f2
};

#define ROTR(x, n) (((x) >> (n)) | ((x) << (32 - (n))))

static void compress_portable(uint32_t h[8], const unsigned char p[64])
{
	uint32_t w[64], a, b, c, d, e, f, g, hh;
	for (int t = 0; t < 16; t++)
		w[t] = (uint32_t)p[4 * t] << 24 | (uint32_t)p[4 * t + 1] << 16 |
		       (uint32_t)p[4 * t + 2] << 8 | (uint32_t)p[4 * t + 3];
	for (int t = 16; t < 64; t++) {
		uint32_t s0 = ROTR(w[t - 15], 7) ^ ROTR(w[t - 15], 18) ^ (w[t - 15] >> 3);
		uint32_t s1 = ROTR(w[t - 2], 17) ^ ROTR(w[t - 2], 19) ^ (w[t - 2] >> 10);
		w[t] = w[t - 16] + s0 + w[t - 7] + s1;
	}
	a = h[0], b = h[1], c = h[2], d = h[3], e = h[4], f = h[5], g = h[6], hh = h[7];
	for (int t = 0; t < 64; t++) {
		uint32_t S1 = ROTR(e, 6) ^ ROTR(e, 11) ^ ROTR(e, 25);
		uint32_t ch = (e & f) ^ (~e & g);
		uint32_t t1 = hh + S1 + ch + K[t] + w[t];
		uint32_t S0 = ROTR(a, 2) ^ ROTR(a, 13) ^ ROTR(a, 22);
		uint32_t maj = (a & b) ^ (a & c) ^ (b & c);
		uint32_t t2 = S0 + maj;
		hh = g, g = f, f = e, e = d + t1, d = c, c = b, b = a, a = t1 + t2;
	}
	h[0] += a, h[1] += b, h[2] += c, h[3] += d;
	h[4] += e, h[5] += f, h[6] += g, h[7] += hh;
}

static void blocks_portable(uint32_t h[8], const unsigned char *p, size_t nblocks)
{
	for (; nblocks; nblocks--, p += 64)
		compress_portable(h, p);
}

#ifdef IRR_SHA_X86
/* The same compression on the SHA extensions. The state is kept as the
 * register pairs ABEF and CDGH that SHA256RNDS2 works on; each 128-bit
 * message vector holds four schedule words W[4i..4i+3], and each
 * SHA256RNDS2 does two rounds (FIPS 180-4, 6.2.2 steps 1-3). */
__attribute__((target("sha,sse4.1")))
static void blocks_shani(uint32_t h[8], const unsigned char *p, size_t nblocks)
{
	/* Big-endian words (FIPS 180-4, 3.1) from little-endian lanes. */
	const __m128i bswap = _mm_set_epi64x(0x0c0d0e0f08090a0bULL, 0x0405060700010203ULL);
	__m128i tmp = _mm_loadu_si128((const __m128i *)&h[0]);     /* DCBA */
	__m128i st1 = _mm_loadu_si128((const __m128i *)&h[4]);     /* HGFE */
	tmp = _mm_shuffle_epi32(tmp, 0xB1);                        /* CDAB */
	st1 = _mm_shuffle_epi32(st1, 0x1B);                        /* EFGH */
	__m128i st0 = _mm_alignr_epi8(tmp, st1, 8);                /* ABEF */
	st1 = _mm_blend_epi16(st1, tmp, 0xF0);                     /* CDGH */
	for (; nblocks; nblocks--, p += 64) {
		__m128i save0 = st0, save1 = st1, w[4], m;
		for (int i = 0; i < 16; i++) {
			if (i < 4) {
				w[i] = _mm_shuffle_epi8(_mm_loadu_si128((const __m128i *)(p + 16 * i)),
				                        bswap);
			} else {
				/* W[t] = s1(W[t-2]) + W[t-7] + s0(W[t-15]) + W[t-16]. */
				__m128i v = _mm_sha256msg1_epu32(w[i & 3], w[(i + 1) & 3]);
				v = _mm_add_epi32(v, _mm_alignr_epi8(w[(i + 3) & 3], w[(i + 2) & 3], 4));
				w[i & 3] = _mm_sha256msg2_epu32(v, w[(i + 3) & 3]);
			}
			m = _mm_add_epi32(w[i & 3], _mm_loadu_si128((const __m128i *)&K[4 * i]));
			st1 = _mm_sha256rnds2_epu32(st1, st0, m);
			m = _mm_shuffle_epi32(m, 0x0E);
			st0 = _mm_sha256rnds2_epu32(st0, st1, m);
		}
		st0 = _mm_add_epi32(st0, save0);
		st1 = _mm_add_epi32(st1, save1);
	}
	tmp = _mm_shuffle_epi32(st0, 0x1B);                        /* FEBA */
	st1 = _mm_shuffle_epi32(st1, 0xB1);                        /* DCHG */
	st0 = _mm_blend_epi16(tmp, st1, 0xF0);                     /* DCBA */
	st1 = _mm_alignr_epi8(st1, tmp, 8);                        /* HGFE */
	_mm_storeu_si128((__m128i *)&h[0], st0);
	_mm_storeu_si128((__m128i *)&h[4], st1);
}

/* CPUID leaf 7 EBX bit 29 (SHA), leaf 1 ECX bits 9 (SSSE3) and 19 (SSE4.1).
 * 0 = not asked yet, 1 = portable, 2 = SHA extensions. */
static atomic_int sha_impl;

static int have_shani(void)
{
	unsigned a, b, c, d;
	if (!__get_cpuid(1, &a, &b, &c, &d) || !(c & (1u << 9)) || !(c & (1u << 19)))
		return 0;
	if (!__get_cpuid_count(7, 0, &a, &b, &c, &d))
		return 0;
	return (b >> 29) & 1;
}
#endif

int irr_sha256__fast_available(void)
{
#ifdef IRR_SHA_X86
	return have_shani();
#else
	return 0;
#endif
}

void irr_sha256__force_portable(int portable)
{
#ifdef IRR_SHA_X86
	atomic_store_explicit(&sha_impl, portable ? 1 : 0, memory_order_relaxed);
#else
	(void)portable;
#endif
}

static void compress_blocks(uint32_t h[8], const unsigned char *p, size_t nblocks)
{
#ifdef IRR_SHA_X86
	int impl = atomic_load_explicit(&sha_impl, memory_order_relaxed);
	if (impl == 0) {
		impl = have_shani() ? 2 : 1;
		atomic_store_explicit(&sha_impl, impl, memory_order_relaxed);
	}
	if (impl == 2) {
		blocks_shani(h, p, nblocks);
		return;
	}
#endif
	blocks_portable(h, p, nblocks);
}

void irr_sha256_init(irr_sha256 *s)
{
	/* FIPS 180-4, 5.3.3: initial hash value. */
	static const uint32_t H0[8] = {0x6a09e667, 0xbb67ae85, 0x3c6ef372, 0xa54ff53a,
	                               0x510e527f, 0x9b05688c, 0x1f83d9ab, 0x5be0cd19};
	memcpy(s->h, H0, sizeof H0);
	s->nbytes = 0;
	s->nbuf = 0;
}

void irr_sha256_update(irr_sha256 *s, const void *data, size_t len)
{
	const unsigned char *p = data;
	s->nbytes += len;
	if (s->nbuf) {
		size_t take = 64 - s->nbuf < len ? 64 - s->nbuf : len;
		memcpy(s->buf + s->nbuf, p, take);
		s->nbuf += take, p += take, len -= take;
		if (s->nbuf < 64)
			return;
		compress_blocks(s->h, s->buf, 1);
		s->nbuf = 0;
	}
	if (len >= 64) {
		compress_blocks(s->h, p, len / 64);
		p += len / 64 * 64;
		len %= 64;
	}
	memcpy(s->buf, p, len);
	s->nbuf = len;
}

void irr_sha256_final(irr_sha256 *s, unsigned char digest[32])
{
	/* FIPS 180-4, 5.1.1: a 1 bit, zeros to 56 mod 64, 64-bit length in bits. */
	uint64_t bits = s->nbytes * 8;
	s->buf[s->nbuf++] = 0x80;
	if (s->nbuf > 56) {
		memset(s->buf + s->nbuf, 0, 64 - s->nbuf);
		compress_blocks(s->h, s->buf, 1);
		s->nbuf = 0;
	}
	memset(s->buf + s->nbuf, 0, 56 - s->nbuf);
	for (int i = 0; i < 8; i++)
		s->buf[56 + i] = (unsigned char)(bits >> (56 - 8 * i));
	compress_blocks(s->h, s->buf, 1);
	for (int i = 0; i < 8; i++) {
		digest[4 * i] = (unsigned char)(s->h[i] >> 24);
		digest[4 * i + 1] = (unsigned char)(s->h[i] >> 16);
		digest[4 * i + 2] = (unsigned char)(s->h[i] >> 8);
		digest[4 * i + 3] = (unsigned char)s->h[i];
	}
}

void irr_sha256_hex(const unsigned char digest[32], char hex[65])
{
	static const char d[] = "0123456789abcdef";
	for (int i = 0; i < 32; i++) {
		hex[2 * i] = d[digest[i] >> 4];
		hex[2 * i + 1] = d[digest[i] & 15];
	}
	hex[64] = '\0';
}

void irr_sha256_data_hex(const void *data, size_t len, char hex[65])
{
	irr_sha256 s;
	unsigned char dg[32];
	irr_sha256_init(&s);
	irr_sha256_update(&s, data, len);
	irr_sha256_final(&s, dg);
	irr_sha256_hex(dg, hex);
}
