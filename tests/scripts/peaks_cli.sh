#!/usr/bin/env bash
# peaks_cli.sh: `irrecon peaks` on measured spectra. Checks: the JSON carries
# schema irrecon.peaks/1 with the spectrum block (points, first_x, last_x as
# the file's header states them, y_units, source_format, warnings,
# saturated_ranges) and peaks with every field, sorted highest first; the
# polystyrene film shows the bands ../shared/ir-reference/README.md names
# (1601, 1493, 1452, 757, 698 cm-1) within 2 cm-1 as maxima; the mistyped
# YFACTOR file warns, naming ##YFACTOR; the toluene ATR clip (README:
# A = 5.000 at 693-729 cm-1) is a saturated peak, not dropped; the table fits
# 80 columns; options change what they say; a peak list reads back; bad
# input exits 2 with one "irrecon: file[:line]: ..." line and leaves an
# existing --output file untouched.
# Header values (NPOINTS, FIRSTX, LASTX) from the files themselves and
# ../shared/ir-reference/MANIFEST.tsv.
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

"$P" peaks --json "$REF/polystyrene-film.jdx" >"$tmp/ps.json" || fail "peaks --json polystyrene-film"
$PY - "$tmp/ps.json" <<'PY' || fail "polystyrene film JSON"
import json, sys
d = json.load(open(sys.argv[1]))
assert d["schema"] == "irrecon.peaks/1", d["schema"]
s = d["spectrum"]
for k in ("points", "first_x", "last_x", "y_units", "source_format", "warnings", "saturated_ranges"):
    assert k in s, k
# ##NPOINTS=1844, ##FIRSTX=4.47484259e+02, ##LASTX=4.00228378e+03 (the file)
assert s["points"] == 1844, s["points"]
assert abs(s["first_x"] - 447.484259) < 1e-6 and abs(s["last_x"] - 4002.28378) < 1e-4, s
assert s["y_units"] == "transmittance" and s["source_format"] == "jcamp-dx", s
p = d["peaks"]
assert p and [x["position"] for x in p] == sorted((x["position"] for x in p), reverse=True)
for x in p:
    for k in ("position", "height", "area", "fwhm", "intensity", "broad", "shoulder", "saturated"):
        assert k in x, (k, x)
    assert x["intensity"] in ("strong", "medium", "weak"), x
maxima = [x for x in p if not x["shoulder"]]
for want in (1601, 1493, 1452, 757, 698):   # README.md band positions
    best = min(maxima, key=lambda x: abs(x["position"] - want))
    assert abs(best["position"] - want) <= 2.0, (want, best)
# 698 is the strongest band of a polystyrene film.
top = max(maxima, key=lambda x: x["height"])
assert abs(top["position"] - 698) <= 2 and top["intensity"] == "strong", top
PY

"$P" peaks --json "$REF/polystyrene-film-difdup-bad-yfactor.jdx" >"$tmp/bad.json" || fail "peaks bad-yfactor"
$PY - "$tmp/bad.json" <<'PY' || fail "mistyped YFACTOR warning"
import json, sys
d = json.load(open(sys.argv[1]))
assert any("YFACTOR" in w for w in d["spectrum"]["warnings"]), d["spectrum"]["warnings"]
PY

"$P" peaks --json "$REF/toluene-atr.csv" >"$tmp/tol.json" || fail "peaks toluene-atr"
$PY - "$tmp/tol.json" <<'PY' || fail "toluene ATR saturated band"
import json, sys
d = json.load(open(sys.argv[1]))
sat = [x for x in d["peaks"] if x["saturated"]]
assert sat, "no saturated peak"
for x in sat:   # README: clipped at A = 5.000 between 693 and 729 cm-1
    assert 690 <= x["position"] <= 732 and x["intensity"] == "strong", x
assert d["spectrum"]["saturated_ranges"], d["spectrum"]
assert d["spectrum"]["points"] == 1798   # MANIFEST.tsv
PY

# The table: 80 columns, a header line, one row per band.
"$P" peaks "$REF/polystyrene-film.jdx" >"$tmp/ps.txt" || fail "peaks table"
awk 'NR > 1 && length($0) > 80 { bad = 1; print "long line: " $0 } END { exit bad }' "$tmp/ps.txt" || fail "table wider than 80 columns"
grep -q '^ *698\.[0-9] ' "$tmp/ps.txt" || fail "table lacks the 698 band"
n_json=$($PY -c 'import json,sys; print(len(json.load(open(sys.argv[1]))["peaks"]))' "$tmp/ps.json")
n_tab=$(grep -cE '^ +[0-9]+\.[0-9] ' "$tmp/ps.txt")
[ "$n_json" = "$n_tab" ] || fail "table rows $n_tab != JSON peaks $n_json"

# Options do what they say: no shoulders; a stricter floor gives fewer bands.
"$P" peaks --json --no-shoulders "$REF/polystyrene-film.jdx" | $PY -c '
import json, sys
d = json.load(sys.stdin)
assert not any(x["shoulder"] for x in d["peaks"])' || fail "--no-shoulders"
n_strict=$("$P" peaks --json --min-rel 0.2 "$REF/polystyrene-film.jdx" | $PY -c 'import json,sys; print(len(json.load(sys.stdin)["peaks"]))')
[ "$n_strict" -lt "$n_json" ] && [ "$n_strict" -ge 1 ] || fail "--min-rel 0.2 gave $n_strict of $n_json"
"$P" peaks --json --broad 5 "$REF/polystyrene-film.jdx" | $PY -c '
import json, sys
d = json.load(sys.stdin)
assert all(x["broad"] == (x["fwhm"] >= 5) for x in d["peaks"] if x["fwhm"] > 0 and not x["saturated"])' || fail "--broad"

# Its own JSON reads back as a peak list, same positions.
"$P" peaks --json --peak-list "$tmp/ps.json" >"$tmp/back.json" || fail "peak list read-back"
$PY - "$tmp/ps.json" "$tmp/back.json" <<'PY' || fail "read-back positions"
import json, sys
a = [x["position"] for x in json.load(open(sys.argv[1]))["peaks"]]
b = [x["position"] for x in json.load(open(sys.argv[2]))["peaks"]]
assert a == b, (a, b)
PY
"$P" peaks --peak-list tests/data/peaks/polystyrene-classes.csv >"$tmp/list.txt" || fail "peak list table"
grep -q '1601.0' "$tmp/list.txt" || fail "peak list table lacks 1601"

# A compound (LINK) file made of two shared blocks: the blocks are listed,
# the first infrared one is the default, --block picks another.
{ printf '##TITLE=compound\r\n##JCAMP-DX=5.01\r\n##DATA TYPE=LINK\r\n##BLOCKS=2\r\n'
  cat "$REF/chloroform.jdx" "$REF/polystyrene-film.jdx"; printf '##END=\r\n'; } >"$tmp/link.jdx"
"$P" peaks --list-blocks "$tmp/link.jdx" >"$tmp/blocks.txt" || fail "--list-blocks"
grep -q '3 blocks' "$tmp/blocks.txt" && grep -q 'LINK' "$tmp/blocks.txt" || fail "block list: $(cat "$tmp/blocks.txt")"
"$P" peaks --json "$tmp/link.jdx" | $PY -c 'import json,sys; assert json.load(sys.stdin)["spectrum"]["points"] == 7701' \
	|| fail "default block is not the first infrared one (chloroform, 7701 points)"
"$P" peaks --json --block 3 "$tmp/link.jdx" | $PY -c 'import json,sys; assert json.load(sys.stdin)["spectrum"]["points"] == 1844' \
	|| fail "--block 3 is not the polystyrene film (1844 points)"
"$P" peaks --block 9 "$tmp/link.jdx" 2>/dev/null; [ $? -eq 2 ] || fail "--block 9 of 3"

# Bad input: exit 2, one line naming the file (and line), output untouched.
printf 'wavenumber,absorbance\n1000,0.1\n1001,nan\n1002,0.2\n' >"$tmp/nan.csv"
printf '##TITLE=cut\n##JCAMP-DX=4.24\n##XUNITS=1/CM\n##YUNITS=ABSORBANCE\n' >"$tmp/cut.jdx"
head -c 3000 /dev/urandom | tr -d '\n' >"$tmp/garbage.bin"
echo keep >"$tmp/out.txt"
for f in nan.csv cut.jdx garbage.bin missing.csv; do
	"$P" peaks "$tmp/$f" --output "$tmp/out.txt" >"$tmp/stdout" 2>"$tmp/stderr"
	rc=$?
	[ $rc -eq 2 ] || fail "$f: exit $rc, want 2"
	[ "$(wc -l <"$tmp/stderr")" -eq 1 ] || fail "$f: stderr is not one line: $(cat "$tmp/stderr")"
	grep -q "^irrecon: $tmp/$f" "$tmp/stderr" || fail "$f: error does not name the file: $(cat "$tmp/stderr")"
	[ ! -s "$tmp/stdout" ] || fail "$f: wrote to stdout"
	[ "$(cat "$tmp/out.txt")" = keep ] || fail "$f: --output file changed"
done
grep -q ":3: " <("$P" peaks "$tmp/nan.csv" 2>&1) || fail "nan.csv error lacks line 3"
"$P" peaks --peak-list tests/data/peaks/bad-number.csv 2>"$tmp/stderr"
[ $? -eq 2 ] && grep -q "bad-number.csv:3: " "$tmp/stderr" || fail "bad peak list: $(cat "$tmp/stderr")"
"$P" peaks --min-snr x "$REF/polystyrene-film.jdx" 2>/dev/null; [ $? -eq 2 ] || fail "bad option value"
"$P" peaks --frobnicate "$REF/polystyrene-film.jdx" 2>/dev/null; [ $? -eq 2 ] || fail "unknown option"
"$P" peaks --help | grep -q -- '--min-snr' || fail "--help lacks --min-snr"

[ $fails -eq 0 ] || { echo "$fails failure(s)"; exit 1; }
echo "peaks_cli: all checks passed"
