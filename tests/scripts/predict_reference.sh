#!/usr/bin/env bash
# predict_reference.sh: the diagnostic bands of real measured spectra fall
# inside the windows `irrecon predict` gives for their true structures.
# Source of the positions: the spectra in ../shared/ir-reference/ (third-party
# measured data, see its README.md and MANIFEST.tsv), listed with file, group
# and band in tests/data/predict/reference-bands.tsv. Each position is first
# confirmed in its file (a picked band within 5 cm-1, via `irrecon peaks
# --json`), then checked against the predicted window.
set -u
cd "$(dirname "$0")/../.."
BUILD=${BUILD:-build}
REFDIR=${IRRECON_REFDIR:-../shared/ir-reference}
if [ ! -d "$REFDIR" ]; then
  echo "reference spectra folder $REFDIR not found (set IRRECON_REFDIR)"
  exit 77
fi
[ -x "$BUILD/irrecon" ] || { echo "no $BUILD/irrecon: run make"; exit 1; }
exec /usr/bin/python3 - "$BUILD/irrecon" "$REFDIR" tests/data/predict/reference-bands.tsv <<'PY'
import json, subprocess, sys
irrecon, refdir, table = sys.argv[1:4]
peaks_cache, pred_cache = {}, {}
def run(args):
    r = subprocess.run([irrecon] + args, capture_output=True, text=True)
    if r.returncode != 0:
        raise SystemExit("FAIL: irrecon %s: exit %d: %s" % (" ".join(args), r.returncode, r.stderr.strip()))
    return json.loads(r.stdout)
fails = checked = 0
for n, line in enumerate(open(table, encoding="utf-8"), 1):
    if not line.strip() or line.startswith("#"):
        continue
    f, smiles, group, label, pos, what = line.rstrip("\n").split("\t")
    pos = float(pos)
    path = refdir + "/" + f
    if path not in peaks_cache:
        peaks_cache[path] = [p["position"] for p in run(["peaks", "--json", path])["peaks"]]
    near = [p for p in peaks_cache[path] if abs(p - pos) <= 5.0]
    if not near:
        print("FAIL %s:%d: %s has no band near %.1f (%s)" % (table, n, f, pos, what)); fails += 1; continue
    if smiles not in pred_cache:
        pred_cache[smiles] = run(["predict", "--json", smiles])["bands"]
    cands = [b for b in pred_cache[smiles] if b["group"] == group and label in b["label"]]
    if not cands:
        print("FAIL %s:%d: %s: no predicted band '%s' of group %s" % (table, n, smiles, label, group)); fails += 1; continue
    if not any(b["low"] <= pos <= b["high"] for b in cands):
        wins = ", ".join("%g-%g" % (b["low"], b["high"]) for b in cands)
        print("FAIL %s:%d: %s %.1f (%s) outside %s '%s' window %s" % (table, n, f, pos, what, group, label, wins)); fails += 1; continue
    checked += 1
print("%d reference bands inside their predicted windows, %d failures" % (checked, fails))
sys.exit(1 if fails or checked < 60 else 0)
PY
