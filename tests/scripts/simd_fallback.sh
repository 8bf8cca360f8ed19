#!/usr/bin/env bash
# The plain C paths against the vector ones. Reading, normalising, SHA-256
# and peak picking have SSE2, AVX and AVX-512 paths chosen at build or run
# time (src/peaks.c, src/sgfilter.c, src/spectrum.c, src/sha256.c); a
# processor without them runs plain C, which the machine running the tests
# would otherwise never execute. This builds tools/bench_read twice, as
# built and with those four files compiled -DIRR_NO_SIMD, and requires the
# two --dump outputs (digests, decoded points, warnings, every peak at 17
# significant digits, errors of the broken files) to be byte-identical on
# every spectrum of tests/data and examples/, and on the measured spectra
# of ../shared/ir-reference when that folder is there.
set -u
cd "$(dirname "$0")/../.."
unset MAKEFLAGS MFLAGS MAKELEVEL
BUILD=${BUILD:-build}
OUT=$BUILD/simd-fallback
REF=${IRRECON_REFDIR:-../shared/ir-reference}
mkdir -p "$OUT"
if ! make --no-print-directory -s "$BUILD/libirrecon.a" >"$OUT/make.log" 2>&1; then
	tail -n 20 "$OUT/make.log"
	echo "simd_fallback: the library does not build"
	exit 1
fi
CFLAGS_="-O2 -std=c11 -D_GNU_SOURCE -Iinclude -Isrc $(pkg-config --cflags openbabel-3 libcjson)"
LIBS_="$(pkg-config --libs openbabel-3 libcjson) -lstdc++ -lm -lpthread"
objs=()
for f in peaks sgfilter spectrum sha256; do
	cc $CFLAGS_ -DIRR_NO_SIMD -c "src/$f.c" -o "$OUT/$f.o" || { echo "simd_fallback: src/$f.c does not build with -DIRR_NO_SIMD"; exit 1; }
	objs+=("$OUT/$f.o")
done
# The objects come before the archive, so the linker takes them and never
# the archive's members of the same name.
cc $CFLAGS_ tools/bench_read.c "$BUILD/libirrecon.a" $LIBS_ -o "$OUT/bench_read" &&
	cc $CFLAGS_ tools/bench_read.c "${objs[@]}" "$BUILD/libirrecon.a" $LIBS_ -o "$OUT/bench_read_plain" ||
	{ echo "simd_fallback: bench_read does not link"; exit 1; }
if nm "$OUT/bench_read_plain" | grep -q ' t .*avx512\| T .*avx512'; then
	echo "simd_fallback: the plain build still holds AVX-512 code"
	exit 1
fi

files=()
while IFS= read -r f; do files+=("$f"); done < <(find tests/data examples -type f \( -name '*.jdx' -o -name '*.dx' -o -name '*.jcamp' -o -name '*.csv' -o -name '*.tsv' \) | LC_ALL=C sort)
nref=0
if [ -d "$REF" ]; then
	while IFS= read -r f; do files+=("$f"); nref=$((nref + 1)); done < <(find "$REF" -type f \( -name '*.jdx' -o -name '*.csv' \) | LC_ALL=C sort)
fi
"$OUT/bench_read" --dump "${files[@]}" >"$OUT/vector.txt" 2>&1
"$OUT/bench_read_plain" --dump "${files[@]}" >"$OUT/plain.txt" 2>&1
npeaks=$(grep -c '^peak ' "$OUT/vector.txt")
if ! cmp -s "$OUT/vector.txt" "$OUT/plain.txt"; then
	diff "$OUT/vector.txt" "$OUT/plain.txt" | head -n 20
	echo "simd_fallback: plain C and vector paths differ (dumps in $OUT)"
	exit 1
fi
echo "simd_fallback: ${#files[@]} files ($nref measured reference spectra), $npeaks peaks: plain C and vector paths give identical dumps"
[ "$nref" -gt 0 ] || echo "simd_fallback: note: $REF not found; only the repository's spectra were compared"
exit 0
