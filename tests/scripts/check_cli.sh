#!/usr/bin/env bash
# check_cli.sh: `irrecon check` and `irrecon rank` from the outside: exit
# statuses (0 consistent, 1 other verdicts, 2 errors), one-line errors that
# name the file and line, byte-identical JSON, 80-column text, atomic output.
# Sources: benzoic acid band list (tests/data/check/benzoic-acid.peaks.csv,
# Silverstein, Webster & Kiemle 7th ed. ch. 2; from memory); real spectra
# from ../shared/ir-reference (MANIFEST.tsv names the compounds).
set -u
cd "$(dirname "$0")/../.."
B=${BUILD:-build}/irrecon
R=${IRRECON_REFDIR:-../shared/ir-reference}
T=$(mktemp -d); trap 'rm -rf "$T"' EXIT
fails=0
fail() { echo "FAIL: $*"; fails=$((fails+1)); }
expect_rc() {  # want, command...
	local want=$1; shift
	"$@" >"$T/out" 2>"$T/err"; local rc=$?
	[ "$rc" = "$want" ] || fail "exit $rc (want $want): $*; $(head -c 300 "$T/err")"
}
ACID=tests/data/check/benzoic-acid.peaks.csv

# Peak list of benzoic acid: consistent as benzoic acid, not as a ketone.
expect_rc 0 "$B" check --structure 'OC(=O)c1ccccc1' --peaks "$ACID" --sampling transmission
grep -q '^== CONSISTENT ==' "$T/out" || fail "text report does not open with the verdict"
expect_rc 1 "$B" check --structure 'CC(=O)c1ccccc1' --peaks "$ACID" --sampling transmission
grep -q 'INCONSISTENT' "$T/out" || fail "ketone given for an acid is not inconsistent"
awk 'length($0) > 80 { bad = 1 } END { exit bad }' "$T/out" || fail "text report wider than 80 columns"

# JSON: valid, schema, byte-identical across runs.
"$B" check --structure 'OC(=O)c1ccccc1' --peaks "$ACID" --sample LPC-0007 --json > "$T/a.json"
"$B" check --structure 'OC(=O)c1ccccc1' --peaks "$ACID" --sample LPC-0007 --json > "$T/b.json"
cmp -s "$T/a.json" "$T/b.json" || fail "JSON differs between two runs"
/usr/bin/python3 - "$T/a.json" <<'PY' || fail "JSON content"
import json, sys
d = json.load(open(sys.argv[1]))
assert d["schema"] == "irrecon.check/1", d["schema"]
assert d["sample"] == "LPC-0007"
assert d["verdict"] == "consistent"
assert 0.5 <= d["score"] <= 1
for k in ("reasons", "structure", "expected", "observed", "starting_materials", "reagents",
          "solvents", "cautions", "provenance"):
    assert k in d, k
assert d["structure"]["formula"] == "C7H6O2"
assert len(d["provenance"]["input"]["sha256"]) == 64
assert len(d["provenance"]["tables_digest"]) == 64
assert any("evidence" in c for c in d["cautions"])
co = [e for e in d["expected"] if e["label"].startswith("C=O")]
assert co and co[0]["status"] == "found" and abs(co[0]["peak"] - 1687) < 0.01
PY

# Every key the result can carry is documented in the schema document.
"$B" check --structure 'OC(=O)c1ccccc1' --peaks "$ACID" --starting-material 'CC(=O)c1ccccc1' \
	--reagent 'O=C(Cl)c1ccccc1' --solvent THF --json > "$T/full.json"
/usr/bin/python3 - "$T/full.json" docs/check-result-schema.md <<'PY' || fail "undocumented JSON keys"
import json, re, sys
d = json.load(open(sys.argv[1]))
doc = open(sys.argv[2]).read()
keys = set()
def walk(v):
    if isinstance(v, dict):
        for k, x in v.items():
            keys.add(k)
            walk(x)
    elif isinstance(v, list):
        for x in v:
            walk(x)
walk(d)
missing = sorted(k for k in keys if "`%s`" % k not in doc)
if missing:
    print("not in docs/check-result-schema.md:", missing)
    sys.exit(1)
PY

# A named solvent from the library; --output and --output atomicity.
expect_rc 0 "$B" check --structure 'OC(=O)c1ccccc1' --peaks "$ACID" --solvent 'ethyl acetate' --json --output "$T/r.json"
[ -s "$T/r.json" ] && [ ! -s "$T/out" ] || fail "--output did not take the report"
/usr/bin/python3 -c "import json,sys; d=json.load(open('$T/r.json')); s=d['solvents'][0]; assert s['name']=='ethyl acetate' and s['status']=='absent', s" || fail "solvent entry"
echo keep > "$T/keep.json"
expect_rc 2 "$B" check --structure 'OC(=O)c1ccccc1' --peaks "$ACID" --solvent 'not a solvent' --json --output "$T/keep.json"
[ "$(cat "$T/keep.json")" = keep ] || fail "an error clobbered the output file"
[ "$(wc -l < "$T/err")" = 1 ] && grep -q "^irrecon: " "$T/err" || fail "error is not one line: $(cat "$T/err")"

# Errors: bad SMILES in a structure file names the file and line.
printf '# Larkspur batch 7\n\nC1CC(=O\n' > "$T/s.smi"
expect_rc 2 "$B" check --structure-file "$T/s.smi" --peaks "$ACID"
grep -q "s.smi:3:" "$T/err" || fail "structure file error lacks file:line: $(cat "$T/err")"
expect_rc 2 "$B" check --structure 'CCO' --spectrum "$T/none.jdx"
grep -q "none.jdx" "$T/err" || fail "missing spectrum not named"
expect_rc 2 "$B" check --structure 'CCO'
expect_rc 2 "$B" check --structure 'CCO' --peaks "$ACID" --phase plasma
expect_rc 0 "$B" check --help
expect_rc 0 "$B" check --list-solvents
[ "$(grep -c . "$T/out")" -ge 26 ] || fail "solvent library lists fewer than 25 entries"

if [ -f "$R/MANIFEST.tsv" ]; then
	# Real spectrum: true structure 0, wrong one 1; SVG written.
	expect_rc 0 "$B" check --structure 'CC(=O)c1ccccc1' --spectrum "$R/acetophenone.jdx" --sampling transmission --svg "$T/a.svg"
	[ -s "$T/a.svg" ] || fail "no SVG written"
	expect_rc 1 "$B" check --structure 'CC(O)c1ccccc1' --spectrum "$R/acetophenone.jdx" --sampling transmission
	# rank: the true structure first, exit 0.
	expect_rc 0 "$B" rank --spectrum "$R/acetophenone.jdx" --sampling transmission \
		--candidate 'CC(O)c1ccccc1' --candidate 'CCc1ccccc1' --candidate 'CC(=O)c1ccccc1' --json
	/usr/bin/python3 -c "
import json; d=json.load(open('$T/out'))
assert d['schema']=='irrecon.rank/1'
c=d['candidates']; assert c[0]['smiles']=='CC(=O)c1ccccc1', c[0]['smiles']
assert c[0]['result']['verdict']=='consistent'
assert all(x['result']['verdict']=='inconsistent' for x in c[1:])
assert [x['rank'] for x in c]==[1,2,3]" || fail "rank order"
	expect_rc 1 "$B" rank --spectrum "$R/acetophenone.jdx" --candidate 'CC(O)c1ccccc1'
else
	echo "note: $R not found; real-spectrum part skipped"
fi

[ $fails -eq 0 ] || exit 1
echo "check CLI: all cases passed"
