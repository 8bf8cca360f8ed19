#!/usr/bin/env bash
# jcamp_crosscheck.sh: decodes every JCAMP-DX file of the shared reference
# set (../shared/ir-reference, or $IRRECON_REFDIR) with irrecon and with an
# independent reader, the npm package jcampconverter (cheminfo), run with the
# machine's Node.js; X and Y must agree to 1e-9 relative on every point.
# jcampconverter is installed into $BUILD/npm at test time. Skips (77) when
# the reference folder, node or the npm registry is not available.
set -u
cd "$(dirname "$0")/../.."
BUILD=${BUILD:-build}
REF=${IRRECON_REFDIR:-../shared/ir-reference}
CC=${CC:-cc}

if [ ! -f "$REF/MANIFEST.tsv" ]; then
	echo "skipped: reference spectra folder $REF not found (set IRRECON_REFDIR)"
	exit 77
fi
if ! command -v node >/dev/null 2>&1; then
	echo "skipped: Node.js (node) is not installed"
	exit 77
fi
NPM_DIR=$BUILD/npm
if [ ! -f "$NPM_DIR/node_modules/jcampconverter/package.json" ]; then
	if ! command -v npm >/dev/null 2>&1; then
		echo "skipped: npm is not installed, cannot fetch jcampconverter"
		exit 77
	fi
	mkdir -p "$NPM_DIR"
	if ! timeout 180 npm install --prefix "$NPM_DIR" --no-audit --no-fund jcampconverter >"$NPM_DIR/install.log" 2>&1; then
		echo "skipped: npm could not install jcampconverter (registry unreachable?); see $NPM_DIR/install.log"
		exit 77
	fi
fi
echo "jcampconverter $(node -p "require('./$NPM_DIR/node_modules/jcampconverter/package.json').version")"

mkdir -p "$BUILD/tests"
DUMP=$BUILD/tests/spectrum_dump
if ! $CC -std=c11 -D_GNU_SOURCE -O2 -Iinclude tests/tools/spectrum_dump.c "$BUILD/libirrecon.a" -lm -o "$DUMP"; then
	echo "FAIL: could not build the dump helper"
	exit 1
fi

# Known defects of the reference reader, with the first point they affect.
# indene-difdup.jdx line 94 "2887.024A666TL1": a DUP right after the
# Y-check value. jcampconverter 12.5.3 restarts from ##FIRSTY there (its Y
# jumps to 44.97); the value repeats instead (JCAMP-DX 4.24: DUP repeats
# the preceding value), as indene-xy.jdx, the same measurement, confirms
# with 0.1666 at 2887 and 2888 cm-1. irrecon's values beyond that point are
# checked against indene-xy.jdx in tests/unit/test_jcamp.c.
declare -A DIVERGES=( [indene-difdup.jdx]=2581 )

fail=0; n=0
TMP=$(mktemp)
trap 'rm -f "$TMP"' EXIT
for f in "$REF"/*.jdx "$REF"/unidentified/*.jdx; do
	[ -f "$f" ] || continue
	n=$((n + 1))
	if ! "$DUMP" "$f" >"$TMP" 2>/dev/null; then
		echo "FAIL: irrecon could not read $f"
		fail=$((fail + 1))
		continue
	fi
	if ! node tests/tools/jcamp_crosscheck.mjs "$NPM_DIR" "$f" "$TMP" "${DIVERGES[$(basename "$f")]:-}"; then
		fail=$((fail + 1))
	fi
done
echo "$n files cross-checked, $fail failed"
[ "$n" -gt 0 ] && [ "$fail" -eq 0 ]
