#!/usr/bin/env bash
# predict_reference.sh: the diagnostic bands of real measured spectra fall
# inside the windows `irrecon predict` gives for their true structures.
# Source of the positions: the spectra in ../shared/ir-reference/ (third-party
# measured data, see its README.md and MANIFEST.tsv), listed with file, group
# and band in tests/data/predict/reference-bands.tsv. Each position is first
# confirmed in its file: the absorbance (file read with the library's reader
# through ctypes, no peak picking, so picker tuning cannot move it) has a
# local maximum within 8 cm-1 of it; then it is checked against the window.
set -u
cd "$(dirname "$0")/../.."
BUILD=${BUILD:-build}
REFDIR=${IRRECON_REFDIR:-../shared/ir-reference}
if [ ! -d "$REFDIR" ]; then
  echo "reference spectra folder $REFDIR not found (set IRRECON_REFDIR)"
  exit 77
fi
[ -x "$BUILD/irrecon" ] || { echo "no $BUILD/irrecon: run make"; exit 1; }
exec /usr/bin/python3 - "$BUILD/irrecon" "$REFDIR" tests/data/predict/reference-bands.tsv "$BUILD/libirrecon.so" <<'PY'
import ctypes as C, json, subprocess, sys
irrecon, refdir, table, libpath = sys.argv[1:5]
lib = C.CDLL(libpath)
lib.irr_spectrum_points.restype = C.c_size_t
lib.irr_spectrum_x.restype = C.POINTER(C.c_double)
lib.irr_spectrum_y.restype = C.POINTER(C.c_double)
def absorbance(path):
    """(x, y) ascending wavenumber, absorbance, as the library reads the file."""
    s, err = C.c_void_p(), C.create_string_buffer(4096)  # irr_error is ~2 KB
    if lib.irr_spectrum_read_file(C.byref(s), path.encode(), None, err) or lib.irr_spectrum_normalise(s, err):
        raise SystemExit("FAIL: cannot read %s" % path)
    n = lib.irr_spectrum_points(s)
    px, py = lib.irr_spectrum_x(s), lib.irr_spectrum_y(s)
    x, y = [px[i] for i in range(n)], [py[i] for i in range(n)]
    lib.irr_spectrum_free(s)
    return x, y
def has_maximum_near(xy, pos, tol=8.0):
    x, y = xy
    span = max(y) - min(y)
    for i in range(1, len(x) - 1):
        if abs(x[i] - pos) > tol:
            continue
        # a maximum over +-4 cm-1 (at least one point each side, for coarse files)
        reach = max(4.0, 1.01 * abs(x[i + 1] - x[i]), 1.01 * abs(x[i] - x[i - 1]))
        near = range(max(0, i - 100), min(len(x), i + 101))
        if not all(y[i] >= y[j] for j in near if abs(x[j] - x[i]) <= reach):
            continue
        # and it stands out: at least 0.5 % of the spectrum's range above the
        # lowest point within 30 cm-1 (noise ripples do not)
        if y[i] - min(y[j] for j in near if abs(x[j] - x[i]) <= 30.0) >= 0.005 * span:
            return True
    return False
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
        peaks_cache[path] = absorbance(path)
    if not has_maximum_near(peaks_cache[path], pos):
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
