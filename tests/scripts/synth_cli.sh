#!/usr/bin/env bash
# synth_cli.sh: the `irrecon synth` command as a user meets it: the same
# seed gives byte-identical files and another seed another file; the output
# format follows the file name or --format; --range and --spacing set the
# grid (JCAMP-DX 4.24 ##FIRSTX/##LASTX/##NPOINTS, McDonald & Wilks 1988);
# transmittance stays in (0, 1] (T = 10^-A); hazardous structures get
# their safety caution; bad input is one line
# "irrecon: ..." on stderr with exit 2, and never clobbers an existing file.
set -u
cd "$(dirname "$0")/../.."
BUILD=${BUILD:-build}
IRRECON=$BUILD/irrecon
T=$(mktemp -d)
trap 'rm -rf "$T"' EXIT
fail=0
bad() { echo "FAIL: $*"; fail=$((fail+1)); }

S='CC(C)CCOC(C)=O'   # isoamyl acetate
"$IRRECON" synth --structure "$S" --noise 0.003 --co2 0.01 --seed 7 -o "$T/a.jdx" || bad "synth a.jdx"
"$IRRECON" synth --structure "$S" --noise 0.003 --co2 0.01 --seed 7 -o "$T/b.jdx" || bad "synth b.jdx"
"$IRRECON" synth --structure "$S" --noise 0.003 --co2 0.01 --seed 8 -o "$T/c.jdx" || bad "synth c.jdx"
cmp -s "$T/a.jdx" "$T/b.jdx" || bad "same seed, different files"
cmp -s "$T/a.jdx" "$T/c.jdx" && bad "different seeds, same file"
"$IRRECON" synth --structure "$S" --noise 0.003 --co2 0.01 --seed 7 > "$T/stdout.jdx" || bad "synth to stdout"
cmp -s "$T/a.jdx" "$T/stdout.jdx" || bad "stdout differs from -o"

# Format from the name, or forced.
"$IRRECON" synth --structure "$S" -o "$T/s.csv" || bad "synth csv"
[ "$(head -n 1 "$T/s.csv")" = "wavenumber_cm-1,absorbance" ] || bad "CSV header: $(head -n 1 "$T/s.csv")"
"$IRRECON" synth --structure "$S" --format jcamp-affn -o "$T/affn.txt" || bad "synth affn"
grep -q '^##XYDATA=(X++(Y..Y))$' "$T/affn.txt" || bad "AFFN file has no ##XYDATA"
grep -A1 '^##XYDATA' "$T/affn.txt" | tail -n 1 | grep -Eq '^[0-9.]+( -?[0-9]+)+$' || bad "AFFN data line is not plain numbers"

# Grid: 500-3500 every 2.5 cm-1 is 1201 points, written high to low.
"$IRRECON" synth --structure "$S" --range 500:3500 --spacing 2.5 -o "$T/g.jdx" || bad "synth grid"
grep -q '^##NPOINTS=1201$' "$T/g.jdx" || bad "NPOINTS: $(grep NPOINTS "$T/g.jdx")"
grep -q '^##FIRSTX=3500$' "$T/g.jdx" || bad "FIRSTX: $(grep FIRSTX "$T/g.jdx")"
grep -q '^##LASTX=500$' "$T/g.jdx" || bad "LASTX: $(grep LASTX "$T/g.jdx")"
grep -q '^##DELTAX=-2.5$' "$T/g.jdx" || bad "DELTAX: $(grep DELTAX "$T/g.jdx")"

# Transmittance: every value in (0, 1].
"$IRRECON" synth --structure "$S" --units transmittance --max-absorbance 1.5 --noise 0.001 -o "$T/t.csv" || bad "synth transmittance"
awk -F, 'NR > 1 && ($2 <= 0 || $2 > 1.01) { print "T out of range at " $1 ": " $2; b=1 } END { exit b }' "$T/t.csv" || bad "transmittance outside (0, 1]"

# A mixture: shares that leave nothing for --structure are refused.
"$IRRECON" synth --component 'CCO:0.6' --component 'CC(C)=O:0.6' -o "$T/m.jdx" || bad "mixture of components only"

expect_error() { # description, args...
	local what=$1; shift
	local err rc
	err=$("$IRRECON" synth "$@" 2>&1 >/dev/null); rc=$?
	[ "$rc" = 2 ] || bad "$what: exit $rc, expected 2"
	[ "$(printf '%s\n' "$err" | wc -l)" = 1 ] || bad "$what: error is not one line: $err"
	case "$err" in "irrecon: "*) ;; *) bad "$what: error does not start with 'irrecon: ': $err" ;; esac
}
expect_error "malformed SMILES" --structure 'C1CC(' -o "$T/x.jdx"
expect_error "reversed range" --structure "$S" --range 4000:400
expect_error "zero spacing" --structure "$S" --spacing 0
expect_error "component without share" --structure "$S" --component 'CCO'
expect_error "shares leave nothing" --structure "$S" --component 'CCO:1.2'
expect_error "unknown option" --structure "$S" --frobnicate
expect_error "no structure" --noise 0.01
expect_error "bad units" --structure "$S" --units percent
expect_error "missing structure file" --structure-file "$T/nothing.smi"
expect_error "unwritable output" --structure "$S" -o "$T/no/such/dir/x.jdx"
: > "$T/empty.smi"
expect_error "empty structure file" --structure-file "$T/empty.smi"

# A failing run leaves an existing output untouched.
cp "$T/a.jdx" "$T/keep.jdx"
"$IRRECON" synth --structure 'C1CC(' -o "$T/keep.jdx" 2>/dev/null
cmp -s "$T/a.jdx" "$T/keep.jdx" || bad "failed run changed the existing output"
ls "$T" | grep -q '\.tmp\.' && bad "temporary file left behind"

# Safety: an organic azide (the brief's list of hazards: azide, diazo,
# peroxide) gets the caution on stderr; ethanol gets nothing there.
err=$("$IRRECON" synth --structure 'CCCN=[N+]=[N-]' -o "$T/az.jdx" 2>&1 >/dev/null) || bad "synth azide failed"
printf '%s' "$err" | grep -q '^irrecon: caution: azide' || bad "no azide caution: $err"
err=$("$IRRECON" synth --structure 'CCO' -o "$T/eth.jdx" 2>&1 >/dev/null) || bad "synth ethanol failed"
[ -z "$err" ] || bad "unexpected stderr for ethanol: $err"

"$IRRECON" synth --help | grep -q '^usage: irrecon synth' || bad "--help"
[ "$fail" -eq 0 ]
