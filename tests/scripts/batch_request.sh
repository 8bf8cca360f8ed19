#!/usr/bin/env bash
# batch_request.sh: the notebook-workflow step `irrecon check --request`.
# The worked requests of examples/request run; a request from stdin gives
# the same JSON as from its file; a request gives byte for byte what the
# equivalent command line gives (docs/request-schema.md); inline x/y arrays
# check like the file they were exported from; a broken request is one line
# `irrecon: FILE:LINE: message`, exit 2, nothing on stdout. The spectrum of
# acetophenone is the real one of ../shared/ir-reference (true structure from
# its MANIFEST.tsv): its check must not be inconsistent.
set -u
cd "$(dirname "$0")/../.."
BUILD=${BUILD:-build}
P=$PWD/$BUILD/irrecon
REFDIR=${IRRECON_REFDIR:-../shared/ir-reference}
case $REFDIR in /*) ;; *) REFDIR=$PWD/$REFDIR ;; esac
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
fail() { echo "FAIL: $*"; exit 1; }

for r in examples/request/*.request.json; do
  "$P" check --request "$r" >"$tmp/out.json"
  rc=$?
  [ $rc -le 1 ] || fail "$r: exit status $rc"
  grep -q '"schema":[[:space:]]*"irrecon.check/1"' "$tmp/out.json" || fail "$r: no check result"
done
(cd examples/request && "$P" check --request - <LPC-2240-07.request.json) >"$tmp/stdin.json"
(cd examples/request && "$P" check --request LPC-2240-07.request.json) >"$tmp/file.json"
cmp -s "$tmp/stdin.json" "$tmp/file.json" || fail "stdin and file requests differ"

if [ ! -f "$REFDIR/acetophenone.jdx" ]; then
  echo "skipped: reference spectra folder $REFDIR not found (set IRRECON_REFDIR)"
  exit 77
fi
cp "$REFDIR/acetophenone.jdx" "$tmp/"
cd "$tmp"
cat >req.json <<'JSON'
{"schema": "irrecon.request/1", "sample": "LPC-0311-02",
 "structure": "CC(=O)c1ccccc1", "spectrum": "acetophenone.jdx",
 "starting_materials": ["CC(O)c1ccccc1"], "solvents": ["ethyl acetate"],
 "phase": "condensed", "sampling": "transmission"}
JSON
"$P" check --request req.json >by-request.json
rc1=$?
"$P" check --sample LPC-0311-02 --structure 'CC(=O)c1ccccc1' --spectrum acetophenone.jdx \
  --starting-material 'CC(O)c1ccccc1' --solvent 'ethyl acetate' --sampling transmission --json >by-options.json
rc2=$?
[ $rc1 = $rc2 ] || fail "exit status $rc1 (request) vs $rc2 (options)"
cmp -s by-request.json by-options.json || { diff by-request.json by-options.json | head; fail "request and command line disagree"; }
grep -q '"verdict":[[:space:]]*"inconsistent"' by-request.json && fail "acetophenone's true structure found inconsistent"

# Inline arrays: the points of an exported CSV, as a notebook would send them.
"$P" synth --structure 'CC(=O)c1ccccc1' --noise 0.002 --seed 5 --units transmittance -o s.csv
/usr/bin/python3 - s.csv <<'PY' >inline.json
import csv, json, sys
rows = list(csv.reader(open(sys.argv[1])))[1:]
x = [float(r[0]) for r in rows]
y = [float(r[1]) for r in rows]
print(json.dumps({"structure": "CC(=O)c1ccccc1",
                  "spectrum": {"x": x, "y": y, "y_units": "transmittance"}}))
PY
"$P" check --request inline.json >inline.out
rc_inline=$?
"$P" check --structure 'CC(=O)c1ccccc1' --spectrum s.csv --json >file.out
rc_file=$?
[ $rc_inline = $rc_file ] || fail "inline arrays: exit $rc_inline, file: exit $rc_file"
/usr/bin/python3 - inline.out file.out <<'PY' || fail "inline arrays check differently from the file"
import json, sys
a, b = (json.load(open(p)) for p in sys.argv[1:3])
same = lambda k: [ (e["label"], e["status"]) for e in a[k] ] == [ (e["label"], e["status"]) for e in b[k] ] if k == "expected" else True
ok = a["verdict"] == b["verdict"] and same("expected") and len(a["observed"]) == len(b["observed"])
sys.exit(0 if ok else 1)
PY

# Broken requests: one line naming file and line, exit 2, empty stdout.
printf '{\n  "structure": "CC(=O)c1ccccc1",\n  "spectrum": "acetophenone.jdx",\n  "solvent": ["THF"]\n}\n' >typo.json
"$P" check --request typo.json >typo.out 2>typo.err
[ $? -eq 2 ] || fail "misspelt key: exit status"
[ -s typo.out ] && fail "misspelt key: something on stdout"
[ "$(cat typo.err)" = 'irrecon: typo.json:4: unknown key "solvent"' ] || fail "misspelt key message: $(cat typo.err)"
printf '{"structure": "CC(=O)c1ccccc1", "spectrum": "missing.jdx"}' | "$P" check --request - >/dev/null 2>miss.err
[ $? -eq 2 ] || fail "missing spectrum: exit status"
grep -q '^irrecon: missing.jdx: cannot open' miss.err || fail "missing spectrum message: $(cat miss.err)"
echo "check --request: ok"
