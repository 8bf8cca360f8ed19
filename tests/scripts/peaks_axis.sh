#!/usr/bin/env bash
# peaks_axis.sh: `irrecon axis`, the wavenumber-axis check against
# polystyrene. Reference bands and tolerances: European Pharmacopoeia
# 2.2.24 / Japanese Pharmacopoeia (3060.0, 2849.5, 1942.9 cm-1 +-1.5;
# 1601.2, 1583.0, 1154.5, 1028.3 cm-1 +-1.0). Checks: the shared polystyrene
# film (../shared/ir-reference/polystyrene-film.jdx) passes on every band it
# resolves (exit 0) and the summary says how many were not resolved; the
# thick film unidentified/dupdec1.jdx (README: polystyrene bands) resolves
# all seven; the diamond-ATR spectrum fails (exit 1: ATR shifts strong bands
# low, as the help says); JSON carries schema irrecon.axis/1; a spectrum of
# something else (chloroform) does not pass (exit 1); bad input is exit 2.
set -u
cd "$(dirname "$0")/../.."
BUILD=${BUILD:-build}
P="$BUILD/irrecon"
PY=/usr/bin/python3
REF=${IRRECON_REFDIR:-../shared/ir-reference}
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
fails=0
fail() { echo "FAIL: $*"; fails=$((fails+1)); }

if [ ! -f "$REF/polystyrene-film.jdx" ]; then
	echo "reference spectra not found at $REF (set IRRECON_REFDIR)"
	exit 77
fi

"$P" axis "$REF/polystyrene-film.jdx" >"$tmp/film.txt"; rc=$?
[ $rc -eq 0 ] || fail "film: exit $rc, want 0"
cat "$tmp/film.txt"
grep -q 'not resolved' "$tmp/film.txt" || fail "film summary does not count unresolved bands"
awk 'NR != 2 && length($0) > 80 { bad = 1 } END { exit bad }' "$tmp/film.txt" || fail "table wider than 80 columns"

"$P" axis --json "$REF/polystyrene-film.jdx" >"$tmp/film.json"
$PY - "$tmp/film.json" <<'PY' || fail "film JSON"
import json, sys
d = json.load(open(sys.argv[1]))
assert d["schema"] == "irrecon.axis/1"
ref = [(3060.0, 1.5), (2849.5, 1.5), (1942.9, 1.5), (1601.2, 1.0), (1583.0, 1.0), (1154.5, 1.0), (1028.3, 1.0)]
assert [(b["reference"], b["tolerance"]) for b in d["bands"]] == ref
res = [b for b in d["bands"] if b["status"] != "not_found"]
assert len(res) >= 5 and d["passed"] is True
for b in res:
    assert b["status"] == "within" and abs(b["found"] - b["reference"]) <= b["tolerance"], b
for b in d["bands"]:
    if b["status"] == "not_found":
        assert b["found"] is None and b["reason"], b
assert d["not_resolved"] == 7 - len(res)
PY

"$P" axis --json "$REF/unidentified/dupdec1.jdx" >"$tmp/dd.json"; rc=$?
[ $rc -eq 0 ] || fail "dupdec1: exit $rc, want 0"
$PY -c 'import json,sys; d=json.load(open(sys.argv[1])); assert d["resolved"] == 7 and d["passed"], d' "$tmp/dd.json" || fail "dupdec1 resolves all seven"

"$P" axis "$REF/polystyrene-atr.csv" >"$tmp/atr.txt"; rc=$?
[ $rc -eq 1 ] || fail "ATR: exit $rc, want 1"

# Chloroform is no polystyrene: its few weak features near the references
# are far off, so the axis must not pass (exit 1).
"$P" axis --json "$REF/chloroform.jdx" >"$tmp/cl.json"; rc=$?
[ $rc -eq 1 ] || fail "chloroform: exit $rc, want 1"
$PY -c 'import json,sys; d=json.load(open(sys.argv[1])); assert not d["passed"], d' "$tmp/cl.json" || fail "chloroform passed"

printf 'wavenumber,absorbance\n' >"$tmp/empty.csv"
"$P" axis "$tmp/empty.csv" 2>"$tmp/err"; rc=$?
[ $rc -eq 2 ] || fail "empty: exit $rc, want 2"
grep -q "^irrecon: $tmp/empty.csv" "$tmp/err" || fail "empty: $(cat "$tmp/err")"
"$P" axis --search x "$REF/polystyrene-film.jdx" 2>/dev/null; [ $? -eq 2 ] || fail "bad --search"

[ $fails -eq 0 ] || { echo "$fails failure(s)"; exit 1; }
echo "peaks_axis: all checks passed"
