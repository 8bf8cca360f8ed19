/* vlog.c: the natural logarithm of transmittance points eight (AVX-512) or
 * four (AVX2 with FMA) at a time, bit-identical to the C library's log(),
 * for the absorbance conversion of spectrum.c (A = -log10 T).
 *
 * Why identical and not merely accurate: every later stage (noise, peaks,
 * verdicts) must not change with the processor, and the
 * plain C path (IRR_NO_SIMD builds, other machines) calls log().
 *
 * Method: the table-driven logarithm of Szabolcs Nagy (Arm optimized-routines
 * math/log.c, 2018), which GNU libc uses for log() since 2.28
 * (sysdeps/ieee754/dbl-64/e_log.c and e_log_data.c). With x = 2^k z, z in
 * [0x1.6p-1, 0x1.6p+0) and c the centre of z's 1/128 subinterval,
 *     log(x) = k ln2 + log(c) + log1p(z/c - 1),
 * log1p(r) by a degree-5 polynomial in r (|r| < 1/256). Inputs within
 * [1 - 2^-4, 1 + 0x1.09p-4) take a degree-11 polynomial in r = x - 1 instead,
 * with r*r split exactly (Dekker's 2^27 splitting) for the quadratic term.
 * The coefficients and the invc/logc table are those published values
 * (MIT licence in optimized-routines; LGPL-2.1+ in GNU libc).
 *
 * The same result bits need the same operations in the same order,
 * including where libm fuses a multiply and an add. On x86-64, glibc picks
 * its FMA build of log (__ieee754_log_fma) when the processor has FMA and
 * AVX2; the fused operations below follow that build's machine code
 * (glibc 2.36, Debian 12), one vector lane for one scalar call. Other C
 * libraries or builds may fuse elsewhere, so the first call checks the
 * vector paths against log() on 4,096 inputs of both kinds and keeps to
 * log() if any result differs. Lanes the formulas do not cover (zero,
 * negative, subnormal, infinite, NaN) go to the plain expression. */
#include "vlog.h"

#include <math.h>
#include <pthread.h>
#include <stdint.h>
#include <string.h>

#if defined(__x86_64__) && defined(__GNUC__) && !defined(IRR_NO_SIMD)
#include <immintrin.h>
#define VL_X86 1
#endif

static void neglog_plain(double *y, size_t n, double scale, double nonpos)
{
	for (size_t i = 0; i < n; i++)
		y[i] = y[i] > 0 ? -log(y[i]) * scale : nonpos;
}

#ifdef VL_X86

/* ln 2 split so that k * LN2HI is exact for every exponent k. */
#define LN2HI 0x1.62e42fefa3800p-1
#define LN2LO 0x1.ef35793c76730p-45
/* log1p(r) - r ~ r^2 (A0 + r A1 + r^2 A2 + r^3 A3 + r^4 A4), |r| < 1/256. */
#define A0 -0x1.0000000000001p-1
#define A1 0x1.555555551305bp-2
#define A2 -0x1.fffffffeb4590p-3
#define A3 0x1.999b324f10111p-3
#define A4 -0x1.55575e506c89fp-3
/* log(1 + r) ~ r + B0 r^2 + ... + B10 r^12 near x = 1 (B0 = -1/2). */
#define B0 -0x1p-1
#define B1 0x1.5555555555577p-2
#define B2 -0x1.ffffffffffdcbp-3
#define B3 0x1.999999995dd0cp-3
#define B4 -0x1.55555556745a7p-3
#define B5 0x1.24924a344de30p-3
#define B6 -0x1.fffffa4423d65p-4
#define B7 0x1.c7184282ad6cap-4
#define B8 -0x1.999eb43b068ffp-4
#define B9 0x1.78182f7afd085p-4
#define B10 -0x1.5521375d145cdp-4
/* The subintervals of z start at OFF's significand; near-1 range [LO, HI). */
#define OFF 0x3fe6000000000000ULL
#define NEAR_LO 0x3fee000000000000ULL /* 1 - 2^-4 */
#define NEAR_SPAN 0x0003090000000000ULL /* (1 + 0x1.09p-4) - (1 - 2^-4), as bits */
/* Positive normal finite doubles: bits - 2^-1022's bits below this. */
#define NORM_LO 0x0010000000000000ULL
#define NORM_SPAN 0x7fe0000000000000ULL
/* The bits of 2^52: a small integer u OR-ed in is 2^52 + u exactly. */
#define KD_MAGIC 0x4330000000000000ULL

/* {1/c, log(c)} for the 128 subintervals, c near each one's centre, chosen
 * (by the method's author) so that log(c) has trailing zero bits. */
static const double tab[128][2] = {
	{0x1.734f0c3e0de9fp+0, -0x1.7cc7f79e69000p-2},
	{0x1.713786a2ce91fp+0, -0x1.76feec20d0000p-2},
	{0x1.6f26008fab5a0p+0, -0x1.713e31351e000p-2},
	{0x1.6d1a61f138c7dp+0, -0x1.6b85b38287800p-2},
	{0x1.6b1490bc5b4d1p+0, -0x1.65d5590807800p-2},
	{0x1.69147332f0cbap+0, -0x1.602d076180000p-2},
	{0x1.6719f18224223p+0, -0x1.5a8ca86909000p-2},
	{0x1.6524f99a51ed9p+0, -0x1.54f4356035000p-2},
	{0x1.63356aa8f24c4p+0, -0x1.4f637c36b4000p-2},
	{0x1.614b36b9ddc14p+0, -0x1.49da7fda85000p-2},
	{0x1.5f66452c65c4cp+0, -0x1.445923989a800p-2},
	{0x1.5d867b5912c4fp+0, -0x1.3edf439b0b800p-2},
	{0x1.5babccb5b90dep+0, -0x1.396ce448f7000p-2},
	{0x1.59d61f2d91a78p+0, -0x1.3401e17bda000p-2},
	{0x1.5805612465687p+0, -0x1.2e9e2ef468000p-2},
	{0x1.56397cee76bd3p+0, -0x1.2941b3830e000p-2},
	{0x1.54725e2a77f93p+0, -0x1.23ec58cda8800p-2},
	{0x1.52aff42064583p+0, -0x1.1e9e129279000p-2},
	{0x1.50f22dbb2bddfp+0, -0x1.1956d2b48f800p-2},
	{0x1.4f38f4734ded7p+0, -0x1.141679ab9f800p-2},
	{0x1.4d843cfde2840p+0, -0x1.0edd094ef9800p-2},
	{0x1.4bd3ec078a3c8p+0, -0x1.09aa518db1000p-2},
	{0x1.4a27fc3e0258ap+0, -0x1.047e65263b800p-2},
	{0x1.4880524d48434p+0, -0x1.feb224586f000p-3},
	{0x1.46dce1b192d0bp+0, -0x1.f474a7517b000p-3},
	{0x1.453d9d3391854p+0, -0x1.ea4443d103000p-3},
	{0x1.43a2744b4845ap+0, -0x1.e020d44e9b000p-3},
	{0x1.420b54115f8fbp+0, -0x1.d60a22977f000p-3},
	{0x1.40782da3ef4b1p+0, -0x1.cc00104959000p-3},
	{0x1.3ee8f5d57fe8fp+0, -0x1.c202956891000p-3},
	{0x1.3d5d9a00b4ce9p+0, -0x1.b81178d811000p-3},
	{0x1.3bd60c010c12bp+0, -0x1.ae2c9ccd3d000p-3},
	{0x1.3a5242b75dab8p+0, -0x1.a45402e129000p-3},
	{0x1.38d22cd9fd002p+0, -0x1.9a877681df000p-3},
	{0x1.3755bc5847a1cp+0, -0x1.90c6d69483000p-3},
	{0x1.35dce49ad36e2p+0, -0x1.87120a645c000p-3},
	{0x1.34679984dd440p+0, -0x1.7d68fb4143000p-3},
	{0x1.32f5cceffcb24p+0, -0x1.73cb83c627000p-3},
	{0x1.3187775a10d49p+0, -0x1.6a39a9b376000p-3},
	{0x1.301c8373e3990p+0, -0x1.60b3154b7a000p-3},
	{0x1.2eb4ebb95f841p+0, -0x1.5737d76243000p-3},
	{0x1.2d50a0219a9d1p+0, -0x1.4dc7b8fc23000p-3},
	{0x1.2bef9a8b7fd2ap+0, -0x1.4462c51d20000p-3},
	{0x1.2a91c7a0c1babp+0, -0x1.3b08abc830000p-3},
	{0x1.293726014b530p+0, -0x1.31b996b490000p-3},
	{0x1.27dfa5757a1f5p+0, -0x1.2875490a44000p-3},
	{0x1.268b39b1d3bbfp+0, -0x1.1f3b9f879a000p-3},
	{0x1.2539d838ff5bdp+0, -0x1.160c8252ca000p-3},
	{0x1.23eb7aac9083bp+0, -0x1.0ce7f57f72000p-3},
	{0x1.22a012ba940b6p+0, -0x1.03cdc49fea000p-3},
	{0x1.2157996cc4132p+0, -0x1.f57bdbc4b8000p-4},
	{0x1.201201dd2fc9bp+0, -0x1.e370896404000p-4},
	{0x1.1ecf4494d480bp+0, -0x1.d17983ef94000p-4},
	{0x1.1d8f5528f6569p+0, -0x1.bf9674ed8a000p-4},
	{0x1.1c52311577e7cp+0, -0x1.adc79202f6000p-4},
	{0x1.1b17c74cb26e9p+0, -0x1.9c0c3e7288000p-4},
	{0x1.19e010c2c1ab6p+0, -0x1.8a646b372c000p-4},
	{0x1.18ab07bb670bdp+0, -0x1.78d01b3ac0000p-4},
	{0x1.1778a25efbcb6p+0, -0x1.674f145380000p-4},
	{0x1.1648d354c31dap+0, -0x1.55e0e6d878000p-4},
	{0x1.151b990275fddp+0, -0x1.4485cdea1e000p-4},
	{0x1.13f0ea432d24cp+0, -0x1.333d94d6aa000p-4},
	{0x1.12c8b7210f9dap+0, -0x1.22079f8c56000p-4},
	{0x1.11a3028ecb531p+0, -0x1.10e4698622000p-4},
	{0x1.107fbda8434afp+0, -0x1.ffa6c6ad20000p-5},
	{0x1.0f5ee0f4e6bb3p+0, -0x1.dda8d4a774000p-5},
	{0x1.0e4065d2a9fcep+0, -0x1.bbcece4850000p-5},
	{0x1.0d244632ca521p+0, -0x1.9a1894012c000p-5},
	{0x1.0c0a77ce2981ap+0, -0x1.788583302c000p-5},
	{0x1.0af2f83c636d1p+0, -0x1.5715e67d68000p-5},
	{0x1.09ddb98a01339p+0, -0x1.35c8a49658000p-5},
	{0x1.08cabaf52e7dfp+0, -0x1.149e364154000p-5},
	{0x1.07b9f2f4e28fbp+0, -0x1.e72c082eb8000p-6},
	{0x1.06ab58c358f19p+0, -0x1.a55f152528000p-6},
	{0x1.059eea5ecf92cp+0, -0x1.63d62cf818000p-6},
	{0x1.04949cdd12c90p+0, -0x1.228fb8caa0000p-6},
	{0x1.038c6c6f0ada9p+0, -0x1.c317b20f90000p-7},
	{0x1.02865137932a9p+0, -0x1.419355daa0000p-7},
	{0x1.0182427ea7348p+0, -0x1.81203c2ec0000p-8},
	{0x1.008040614b195p+0, -0x1.0040979240000p-9},
	{0x1.fe01ff726fa1ap-1, 0x1.feff384900000p-9},
	{0x1.fa11cc261ea74p-1, 0x1.7dc41353d0000p-7},
	{0x1.f6310b081992ep-1, 0x1.3cea3c4c28000p-6},
	{0x1.f25f63ceeadcdp-1, 0x1.b9fc114890000p-6},
	{0x1.ee9c8039113e7p-1, 0x1.1b0d8ce110000p-5},
	{0x1.eae8078cbb1abp-1, 0x1.58a5bd001c000p-5},
	{0x1.e741aa29d0c9bp-1, 0x1.95c8340d88000p-5},
	{0x1.e3a91830a99b5p-1, 0x1.d276aef578000p-5},
	{0x1.e01e009609a56p-1, 0x1.07598e598c000p-4},
	{0x1.dca01e577bb98p-1, 0x1.253f5e30d2000p-4},
	{0x1.d92f20b7c9103p-1, 0x1.42edd8b380000p-4},
	{0x1.d5cac66fb5ccep-1, 0x1.606598757c000p-4},
	{0x1.d272caa5ede9dp-1, 0x1.7da76356a0000p-4},
	{0x1.cf26e3e6b2ccdp-1, 0x1.9ab434e1c6000p-4},
	{0x1.cbe6da2a77902p-1, 0x1.b78c7bb0d6000p-4},
	{0x1.c8b266d37086dp-1, 0x1.d431332e72000p-4},
	{0x1.c5894bd5d5804p-1, 0x1.f0a3171de6000p-4},
	{0x1.c26b533bb9f8cp-1, 0x1.067152b914000p-3},
	{0x1.bf583eeece73fp-1, 0x1.147858292b000p-3},
	{0x1.bc4fd75db96c1p-1, 0x1.2266ecdca3000p-3},
	{0x1.b951e0c864a28p-1, 0x1.303d7a6c55000p-3},
	{0x1.b65e2c5ef3e2cp-1, 0x1.3dfc33c331000p-3},
	{0x1.b374867c9888bp-1, 0x1.4ba366b7a8000p-3},
	{0x1.b094b211d304ap-1, 0x1.5933928d1f000p-3},
	{0x1.adbe885f2ef7ep-1, 0x1.66acd2418f000p-3},
	{0x1.aaf1d31603da2p-1, 0x1.740f8ec669000p-3},
	{0x1.a82e63fd358a7p-1, 0x1.815c0f51af000p-3},
	{0x1.a5740ef09738bp-1, 0x1.8e92954f68000p-3},
	{0x1.a2c2a90ab4b27p-1, 0x1.9bb3602f84000p-3},
	{0x1.a01a01393f2d1p-1, 0x1.a8bed1c2c0000p-3},
	{0x1.9d79f24db3c1bp-1, 0x1.b5b515c01d000p-3},
	{0x1.9ae2505c7b190p-1, 0x1.c2967ccbcc000p-3},
	{0x1.9852ef297ce2fp-1, 0x1.cf635d5486000p-3},
	{0x1.95cbaeea44b75p-1, 0x1.dc1bd3446c000p-3},
	{0x1.934c69de74838p-1, 0x1.e8c01b8cfe000p-3},
	{0x1.90d4f2f6752e6p-1, 0x1.f5509c0179000p-3},
	{0x1.8e6528effd79dp-1, 0x1.00e6c121fb800p-2},
	{0x1.8bfce9fcc007cp-1, 0x1.071b80e93d000p-2},
	{0x1.899c0dabec30ep-1, 0x1.0d46b9e867000p-2},
	{0x1.87427aa2317fbp-1, 0x1.13687334bd000p-2},
	{0x1.84f00acb39a08p-1, 0x1.1980d67234800p-2},
	{0x1.82a49e8653e55p-1, 0x1.1f8ffe0cc8000p-2},
	{0x1.8060195f40260p-1, 0x1.2595fd7636800p-2},
	{0x1.7e22563e0a329p-1, 0x1.2b9300914a800p-2},
	{0x1.7beb377dcb5adp-1, 0x1.3187210436000p-2},
	{0x1.79baa679725c2p-1, 0x1.377266dec1800p-2},
	{0x1.77907f2170657p-1, 0x1.3d54ffbaf3000p-2},
	{0x1.756cadbd6130cp-1, 0x1.432eee32fe000p-2},
};

/* AVX-512: eight lanes. Each step names the scalar operation of libm's
 * FMA build it repeats; fmadd(a, b, c) is one rounding of a*b + c. */
__attribute__((target("avx512f,avx2,fma"), always_inline)) static inline __m512d
log_main8(__m512i ix)
{
	const __m512i tmp = _mm512_sub_epi64(ix, _mm512_set1_epi64((long long)OFF));
	/* Subinterval index (7 bits below the exponent) and exponent k. */
	const __m512i i2 = _mm512_slli_epi64(
		_mm512_and_si512(_mm512_srli_epi64(tmp, 45), _mm512_set1_epi64(127)), 1);
	/* k + 2048 (top 12 bits of tmp, sign flipped) into a double's
	 * significand at 2^52: (double)k exactly, with AVX-512F alone. */
	const __m512i kb = _mm512_xor_si512(_mm512_srli_epi64(tmp, 52), _mm512_set1_epi64(0x800));
	const __m512i iz = _mm512_sub_epi64(
		ix, _mm512_and_si512(tmp, _mm512_set1_epi64((long long)(0xfffULL << 52))));
	const __m512d invc = _mm512_i64gather_pd(i2, &tab[0][0], 8);
	const __m512d logc = _mm512_i64gather_pd(i2, &tab[0][1], 8);
	const __m512d z = _mm512_castsi512_pd(iz);
	const __m512d kd = _mm512_sub_pd(
		_mm512_castsi512_pd(_mm512_or_si512(kb, _mm512_set1_epi64((long long)KD_MAGIC))),
		_mm512_set1_pd(0x1.0000000000800p52));
	/* r = z/c - 1 in one rounding; w = k ln2hi + log c. */
	const __m512d r = _mm512_fmadd_pd(z, invc, _mm512_set1_pd(-1.0));
	const __m512d w = _mm512_fmadd_pd(kd, _mm512_set1_pd(LN2HI), logc);
	/* hi + lo = r + log c + k ln2. */
	const __m512d hi = _mm512_add_pd(r, w);
	const __m512d r2 = _mm512_mul_pd(r, r);
	__m512d lo = _mm512_add_pd(_mm512_sub_pd(w, hi), r);
	lo = _mm512_fmadd_pd(kd, _mm512_set1_pd(LN2LO), lo);
	const __m512d r3 = _mm512_mul_pd(r, r2);
	const __m512d p1 = _mm512_fmadd_pd(r, _mm512_set1_pd(A2), _mm512_set1_pd(A1));
	__m512d p2 = _mm512_fmadd_pd(r, _mm512_set1_pd(A4), _mm512_set1_pd(A3));
	const __m512d q = _mm512_fmadd_pd(r2, _mm512_set1_pd(A0), lo);
	p2 = _mm512_fmadd_pd(p2, r2, p1);
	/* lo + r2 A0 + r3 (A1 + r A2 + r2 (A3 + r A4)) + hi. */
	return _mm512_add_pd(_mm512_fmadd_pd(r3, p2, q), hi);
}

/* Near 1: r = x - 1, log1p(r) = r + B0 r^2 + r^3 P(r), with the r^2 term
 * split exactly as rhi^2 + (r + rhi) rlo (rhi: r's upper 26 bits). */
__attribute__((target("avx512f,avx2,fma"), always_inline)) static inline __m512d
log_near8(__m512d x)
{
	const __m512d r = _mm512_sub_pd(x, _mm512_set1_pd(1.0));
	const __m512d split = _mm512_set1_pd(0x1p27), b0 = _mm512_set1_pd(B0);
	__m512d a = _mm512_fmadd_pd(r, _mm512_set1_pd(B2), _mm512_set1_pd(B1));
	__m512d b = _mm512_fmadd_pd(r, _mm512_set1_pd(B5), _mm512_set1_pd(B4));
	__m512d c = _mm512_fmadd_pd(r, _mm512_set1_pd(B8), _mm512_set1_pd(B7));
	const __m512d r2 = _mm512_mul_pd(r, r);
	a = _mm512_fmadd_pd(r2, _mm512_set1_pd(B3), a);
	b = _mm512_fmadd_pd(r2, _mm512_set1_pd(B6), b);
	const __m512d r3 = _mm512_mul_pd(r, r2);
	c = _mm512_fmadd_pd(r2, _mm512_set1_pd(B9), c);
	c = _mm512_fmadd_pd(r3, _mm512_set1_pd(B10), c);
	c = _mm512_fmadd_pd(c, r3, b);
	const __m512d p = _mm512_fmadd_pd(c, r3, a);
	/* rhi = (r + r 2^27) - r 2^27, each sum fused as in libm. */
	const __m512d t = _mm512_fmadd_pd(r, split, r);
	const __m512d rhi = _mm512_fnmadd_pd(r, split, t);
	const __m512d rhi2 = _mm512_mul_pd(rhi, rhi);
	const __m512d rlo = _mm512_sub_pd(r, rhi);
	const __m512d hi = _mm512_fmadd_pd(rhi2, b0, r);
	const __m512d d = _mm512_sub_pd(r, hi);
	const __m512d s = _mm512_add_pd(r, rhi);
	__m512d lo = _mm512_fmadd_pd(rhi2, b0, d);
	lo = _mm512_fmadd_pd(_mm512_mul_pd(b0, rlo), s, lo);
	return _mm512_add_pd(hi, _mm512_fmadd_pd(p, r3, lo));
}

__attribute__((target("avx512f,avx2,fma"))) static size_t
neglog8(double *y, size_t n, double scale, double nonpos)
{
	const __m512i near_lo = _mm512_set1_epi64((long long)NEAR_LO);
	const __m512i near_span = _mm512_set1_epi64((long long)NEAR_SPAN);
	const __m512i norm_lo = _mm512_set1_epi64((long long)NORM_LO);
	const __m512i norm_span = _mm512_set1_epi64((long long)NORM_SPAN);
	const __m512i one = _mm512_castpd_si512(_mm512_set1_pd(1.0));
	const __m512d vscale = _mm512_set1_pd(scale);
	const __m512i sign = _mm512_set1_epi64((long long)0x8000000000000000ULL);
	size_t i = 0;
	for (; i + 8 <= n; i += 8) {
		const __m512d x = _mm512_loadu_pd(y + i);
		const __m512i ix = _mm512_castpd_si512(x);
		__mmask8 normal = _mm512_cmplt_epu64_mask(_mm512_sub_epi64(ix, norm_lo), norm_span);
		__mmask8 near = _mm512_cmplt_epu64_mask(_mm512_sub_epi64(ix, near_lo), near_span);
		__m512d l;
		if (normal != 0xff) {
			/* Zero, negative, subnormal, infinite or NaN in this block. */
			neglog_plain(y + i, 8, scale, nonpos);
			continue;
		}
		if (near == 0)
			l = log_main8(ix);
		else if (near == 0xff)
			l = log_near8(x);
		else
			l = _mm512_mask_blend_pd(near, log_main8(ix), log_near8(x));
		/* log(1) is +0 (libm returns it directly). */
		l = _mm512_mask_blend_pd(_mm512_cmpeq_epi64_mask(ix, one), l, _mm512_setzero_pd());
		/* -log(y) * scale: the sign flip is exact, then one rounding. */
		l = _mm512_castsi512_pd(_mm512_xor_si512(_mm512_castpd_si512(l), sign));
		_mm512_storeu_pd(y + i, _mm512_mul_pd(l, vscale));
	}
	return i;
}

/* AVX2 with FMA: the same steps four lanes at a time. AVX2 has no 64-bit
 * unsigned compare: a sign-flipped signed compare stands in for it. */
__attribute__((target("avx2,fma"), always_inline)) static inline __m256i
ult64_4(__m256i a, __m256i b)
{
	const __m256i s = _mm256_set1_epi64x((long long)0x8000000000000000ULL);
	return _mm256_cmpgt_epi64(_mm256_xor_si256(b, s), _mm256_xor_si256(a, s));
}

__attribute__((target("avx2,fma"), always_inline)) static inline __m256d
log_main4(__m256i ix)
{
	const __m256i tmp = _mm256_sub_epi64(ix, _mm256_set1_epi64x((long long)OFF));
	const __m256i i2 = _mm256_slli_epi64(
		_mm256_and_si256(_mm256_srli_epi64(tmp, 45), _mm256_set1_epi64x(127)), 1);
	const __m256i kb = _mm256_xor_si256(_mm256_srli_epi64(tmp, 52), _mm256_set1_epi64x(0x800));
	const __m256i iz = _mm256_sub_epi64(
		ix, _mm256_and_si256(tmp, _mm256_set1_epi64x((long long)(0xfffULL << 52))));
	const __m256d invc = _mm256_i64gather_pd(&tab[0][0], i2, 8);
	const __m256d logc = _mm256_i64gather_pd(&tab[0][1], i2, 8);
	const __m256d z = _mm256_castsi256_pd(iz);
	const __m256d kd = _mm256_sub_pd(
		_mm256_castsi256_pd(_mm256_or_si256(kb, _mm256_set1_epi64x((long long)KD_MAGIC))),
		_mm256_set1_pd(0x1.0000000000800p52));
	const __m256d r = _mm256_fmadd_pd(z, invc, _mm256_set1_pd(-1.0));
	const __m256d w = _mm256_fmadd_pd(kd, _mm256_set1_pd(LN2HI), logc);
	const __m256d hi = _mm256_add_pd(r, w);
	const __m256d r2 = _mm256_mul_pd(r, r);
	__m256d lo = _mm256_add_pd(_mm256_sub_pd(w, hi), r);
	lo = _mm256_fmadd_pd(kd, _mm256_set1_pd(LN2LO), lo);
	const __m256d r3 = _mm256_mul_pd(r, r2);
	const __m256d p1 = _mm256_fmadd_pd(r, _mm256_set1_pd(A2), _mm256_set1_pd(A1));
	__m256d p2 = _mm256_fmadd_pd(r, _mm256_set1_pd(A4), _mm256_set1_pd(A3));
	const __m256d q = _mm256_fmadd_pd(r2, _mm256_set1_pd(A0), lo);
	p2 = _mm256_fmadd_pd(p2, r2, p1);
	return _mm256_add_pd(_mm256_fmadd_pd(r3, p2, q), hi);
}

__attribute__((target("avx2,fma"), always_inline)) static inline __m256d
log_near4(__m256d x)
{
	const __m256d r = _mm256_sub_pd(x, _mm256_set1_pd(1.0));
	const __m256d split = _mm256_set1_pd(0x1p27), b0 = _mm256_set1_pd(B0);
	__m256d a = _mm256_fmadd_pd(r, _mm256_set1_pd(B2), _mm256_set1_pd(B1));
	__m256d b = _mm256_fmadd_pd(r, _mm256_set1_pd(B5), _mm256_set1_pd(B4));
	__m256d c = _mm256_fmadd_pd(r, _mm256_set1_pd(B8), _mm256_set1_pd(B7));
	const __m256d r2 = _mm256_mul_pd(r, r);
	a = _mm256_fmadd_pd(r2, _mm256_set1_pd(B3), a);
	b = _mm256_fmadd_pd(r2, _mm256_set1_pd(B6), b);
	const __m256d r3 = _mm256_mul_pd(r, r2);
	c = _mm256_fmadd_pd(r2, _mm256_set1_pd(B9), c);
	c = _mm256_fmadd_pd(r3, _mm256_set1_pd(B10), c);
	c = _mm256_fmadd_pd(c, r3, b);
	const __m256d p = _mm256_fmadd_pd(c, r3, a);
	const __m256d t = _mm256_fmadd_pd(r, split, r);
	const __m256d rhi = _mm256_fnmadd_pd(r, split, t);
	const __m256d rhi2 = _mm256_mul_pd(rhi, rhi);
	const __m256d rlo = _mm256_sub_pd(r, rhi);
	const __m256d hi = _mm256_fmadd_pd(rhi2, b0, r);
	const __m256d d = _mm256_sub_pd(r, hi);
	const __m256d s = _mm256_add_pd(r, rhi);
	__m256d lo = _mm256_fmadd_pd(rhi2, b0, d);
	lo = _mm256_fmadd_pd(_mm256_mul_pd(b0, rlo), s, lo);
	return _mm256_add_pd(hi, _mm256_fmadd_pd(p, r3, lo));
}

__attribute__((target("avx2,fma"))) static size_t
neglog4(double *y, size_t n, double scale, double nonpos)
{
	const __m256i near_lo = _mm256_set1_epi64x((long long)NEAR_LO);
	const __m256i near_span = _mm256_set1_epi64x((long long)NEAR_SPAN);
	const __m256i norm_lo = _mm256_set1_epi64x((long long)NORM_LO);
	const __m256i norm_span = _mm256_set1_epi64x((long long)NORM_SPAN);
	const __m256i one = _mm256_castpd_si256(_mm256_set1_pd(1.0));
	const __m256d vscale = _mm256_set1_pd(scale), sign = _mm256_set1_pd(-0.0);
	size_t i = 0;
	for (; i + 4 <= n; i += 4) {
		const __m256d x = _mm256_loadu_pd(y + i);
		const __m256i ix = _mm256_castpd_si256(x);
		int normal = _mm256_movemask_pd(_mm256_castsi256_pd(
			ult64_4(_mm256_sub_epi64(ix, norm_lo), norm_span)));
		__m256d nearm = _mm256_castsi256_pd(ult64_4(_mm256_sub_epi64(ix, near_lo), near_span));
		int near = _mm256_movemask_pd(nearm);
		__m256d l;
		if (normal != 0xf) {
			neglog_plain(y + i, 4, scale, nonpos);
			continue;
		}
		if (near == 0)
			l = log_main4(ix);
		else if (near == 0xf)
			l = log_near4(x);
		else
			l = _mm256_blendv_pd(log_main4(ix), log_near4(x), nearm);
		l = _mm256_andnot_pd(_mm256_castsi256_pd(_mm256_cmpeq_epi64(ix, one)), l);
		_mm256_storeu_pd(y + i, _mm256_mul_pd(_mm256_xor_pd(l, sign), vscale));
	}
	return i;
}

static int cpu_lanes(void)
{
	/* glibc uses its FMA build of log only with both FMA and AVX2. */
	if (!__builtin_cpu_supports("fma") || !__builtin_cpu_supports("avx2"))
		return 1;
	return __builtin_cpu_supports("avx512f") ? 8 : 4;
}

static void run(int lanes, double *y, size_t n, double scale, double nonpos)
{
	size_t i = 0;
	if (lanes == 8)
		i = neglog8(y, n, scale, nonpos);
	else if (lanes == 4)
		i = neglog4(y, n, scale, nonpos);
	neglog_plain(y + i, n - i, scale, nonpos);
}

/* The check of the first call: inputs over the whole table (2^-8 to 4,
 * every subinterval) and over the near-1 range, from a fixed xorshift
 * sequence (Marsaglia 2003), each vector path against log(). */
#define PROBES 4096
static int chosen_lanes = 1;
static pthread_once_t chosen_once = PTHREAD_ONCE_INIT;

static int agrees(int lanes)
{
	static double a[PROBES], b[PROBES];
	uint64_t s = 0x9e3779b97f4a7c15ULL;
	for (size_t i = 0; i < PROBES; i++) {
		uint64_t bits;
		s ^= s << 13;
		s ^= s >> 7;
		s ^= s << 17;
		if (i % 2) {
			/* exponent -8..1, random significand */
			bits = ((uint64_t)(1023 - 8 + (s >> 60) % 10) << 52) | (s & 0xfffffffffffffULL);
			memcpy(&a[i], &bits, sizeof a[i]);
		} else {
			a[i] = 0.9375 + (double)(s >> 11) * 0x1p-53 * 0.1275;
		}
	}
	memcpy(b, a, sizeof a);
	run(lanes, a, PROBES, 1.0, 0.0);
	neglog_plain(b, PROBES, 1.0, 0.0);
	return memcmp(a, b, sizeof a) == 0;
}

static void choose(void)
{
	int lanes = cpu_lanes();
	while (lanes > 1 && !agrees(lanes))
		lanes /= 2;
	chosen_lanes = lanes == 2 ? 1 : lanes;
}

int irr_vlog__lanes(void)
{
	pthread_once(&chosen_once, choose);
	return chosen_lanes;
}

void irr_vlog__neglog_scaled_with(int lanes, double *y, size_t n, double scale, double nonpos)
{
	int have = cpu_lanes();
	if (lanes > have || (lanes != 8 && lanes != 4))
		lanes = 1;
	run(lanes, y, n, scale, nonpos);
}

#else /* no vector code in this build */

int irr_vlog__lanes(void) { return 1; }

void irr_vlog__neglog_scaled_with(int lanes, double *y, size_t n, double scale, double nonpos)
{
	(void)lanes;
	neglog_plain(y, n, scale, nonpos);
}

#endif

void irr_vlog__neglog_scaled(double *y, size_t n, double scale, double nonpos)
{
	irr_vlog__neglog_scaled_with(irr_vlog__lanes(), y, n, scale, nonpos);
}
