#!/usr/bin/env bash
# batch_real.sh: `irrecon batch` on six real spectra of ../shared/ir-reference
# with their true structures from its MANIFEST.tsv, named by absolute paths:
# refused one by one without --allow-outside (exit 2), checked with it, and
# byte-identical for --jobs 1 and --jobs 3. Each result's input SHA-256 must
# be the one published in the folder's SHA256SUMS.
set -u
cd "$(dirname "$0")/../.."
. tests/scripts/batch_lib.inc
cd "$plate"
if [ ! -f "$REFDIR/MANIFEST.tsv" ]; then
  echo "skipped (real-spectra part): reference folder $REFDIR not found (set IRRECON_REFDIR)"
  exit 77
fi
ref=$(cd "$REFDIR" && pwd)
{
  echo "sample,structure,spectrum"
  for f in acetophenone cyclohexanone aniline n-hexane ethylbenzene cyclohexene; do
    smi=$(awk -F'\t' -v f="$f.jdx" '$1 == f {print $3}' "$ref/MANIFEST.tsv")
    [ -n "$smi" ] || fail "no SMILES for $f in MANIFEST.tsv"
    echo "$f,$smi,$ref/$f.jdx"
  done
} >real.csv
"$P" batch --quiet --jobs 1 --allow-outside real.csv >real.1
"$P" batch --quiet --jobs 3 --allow-outside real.csv >real.3
cmp -s real.1 real.3 || fail "real spectra: --jobs 3 differs from --jobs 1"
[ "$(grep -c '"irrecon.check/1"' real.1)" -eq 6 ] || fail "real spectra: not 6 results"
/usr/bin/python3 - real.1 "$ref/SHA256SUMS" <<'PY' || fail "input digests differ from SHA256SUMS"
import json, os, sys
sums = dict(reversed(l.split()) for l in open(sys.argv[2]) if l.strip())
for l in open(sys.argv[1]):
    inp = json.loads(l)["provenance"]["input"]
    if sums[os.path.basename(inp["name"])] != inp["sha256"]:
        print("digest of", inp["name"]); sys.exit(1)
PY
"$P" batch --quiet real.csv >real.refused
[ $? -eq 2 ] || fail "absolute paths accepted without --allow-outside"
[ "$(grep -c 'absolute path' real.refused)" -eq 6 ] || fail "absolute paths not refused one by one"
echo "batch on real spectra: ok"
