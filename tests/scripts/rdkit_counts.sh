#!/usr/bin/env bash
# Cross-check of the bond counts of irr_perceive (o_h, n_h, c_n_triple,
# c_o_double, aromatic_rings, c_h_sp, c_h_sp2, c_h_sp3) against RDKit
# (Debian python3-rdkit, run with /usr/bin/python3) on the molecules of
# tests/data/molecules/coverage.smi. Every difference must be listed, with
# its explanation, in tests/data/molecules/rdkit_expected_diff.tsv; a listed
# difference that no longer occurs fails too (stale entry). Then the same
# for the groups that have a plain textbook definition, counted by RDKit
# SMARTS (tests/tools/rdkit_groups.py; expected differences in
# tests/data/molecules/rdkit_group_expected_diff.tsv).
set -u
cd "$(dirname "$0")/../.."
BUILD=${BUILD:-build}
data=tests/data/molecules
if ! /usr/bin/python3 -c 'import rdkit' 2>/dev/null; then
  echo "RDKit (Debian python3-rdkit) is not installed; run make deps"
  exit 77
fi
[ -f "$BUILD/libirrecon.a" ] || { echo "no $BUILD/libirrecon.a: run make first"; exit 1; }
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
cc -std=c11 -Iinclude -c tests/tools/countdump.c -o "$tmp/countdump.o" || exit 1
g++ -o "$tmp/countdump" "$tmp/countdump.o" "$BUILD/libirrecon.a" \
    $(pkg-config --libs openbabel-3 libcjson) -lm || exit 1
"$tmp/countdump" < "$data/coverage.smi" > "$tmp/ours.tsv" || exit 1
/usr/bin/python3 tests/tools/rdkit_counts.py < "$data/coverage.smi" > "$tmp/rdkit.tsv" || exit 1

/usr/bin/python3 - "$tmp/ours.tsv" "$tmp/rdkit.tsv" "$data/rdkit_expected_diff.tsv" <<'PY'
import sys
fields = ["o_h", "n_h", "c_n_triple", "c_o_double", "aromatic_rings",
          "c_h_sp", "c_h_sp2", "c_h_sp3"]
ours = [l.rstrip("\n").split("\t") for l in open(sys.argv[1])]
ref = [l.rstrip("\n").split("\t") for l in open(sys.argv[2])]
expected = {}
for line in open(sys.argv[3]):
    if not line.strip() or line.startswith("#"):
        continue
    smi, field, a, b, why = line.rstrip("\n").split("\t")
    if not why.strip():
        sys.exit(f"expected difference without explanation: {smi} {field}")
    expected[(smi, field)] = (a, b)
bad = 0
seen = set()
if len(ours) != len(ref):
    sys.exit(f"line counts differ: irrecon {len(ours)}, RDKit {len(ref)}")
for o, r in zip(ours, ref):
    if o[0] != r[0]:
        sys.exit(f"out of step: {o[0]} vs {r[0]}")
    if o[1] == "ERROR" or r[1] == "ERROR":
        print(f"FAIL {o[0]}: rejected ({' '.join(o[1:])} / {' '.join(r[1:])})")
        bad += 1
        continue
    for f, a, b in zip(fields, o[1:], r[1:]):
        if a == b:
            continue
        key = (o[0], f)
        if expected.get(key) == (a, b):
            seen.add(key)
            continue
        print(f"FAIL {o[0]} {f}: irrecon {a}, RDKit {b} (not an expected difference)")
        bad += 1
for key in expected:
    if key not in seen:
        print(f"FAIL stale expected difference: {key[0]} {key[1]}")
        bad += 1
print(f"{len(ours)} molecules, {len(seen)} expected differences, {bad} failures")
sys.exit(1 if bad else 0)
PY
counts_rc=$?

"$tmp/countdump" -g < "$data/coverage.smi" > "$tmp/groups.tsv" || exit 1
/usr/bin/python3 tests/tools/rdkit_groups.py < "$tmp/groups.tsv" > "$tmp/group-diff.tsv" || exit 1
/usr/bin/python3 - "$tmp/group-diff.tsv" "$data/rdkit_group_expected_diff.tsv" <<'PY'
import sys
found = {}
for line in open(sys.argv[1]):
    smi, key, a, b = line.rstrip("\n").split("\t")
    found[(smi, key)] = (a, b)
expected = {}
for line in open(sys.argv[2]):
    if not line.strip() or line.startswith("#"):
        continue
    smi, key, a, b, why = line.rstrip("\n").split("\t")
    if not why.strip():
        sys.exit(f"expected group difference without explanation: {smi} {key}")
    expected[(smi, key)] = (a, b)
bad = 0
for k, v in found.items():
    if expected.get(k) != v:
        print(f"FAIL {k[0]} {k[1]}: irrecon {v[0]}, RDKit SMARTS {v[1]} (not an expected difference)")
        bad += 1
for k in expected:
    if k not in found:
        print(f"FAIL stale expected group difference: {k[0]} {k[1]}")
        bad += 1
print(f"groups: {len(found)} differences, all expected" if not bad else f"groups: {bad} failures")
sys.exit(1 if bad else 0)
PY
groups_rc=$?
[ $counts_rc -eq 0 ] && [ $groups_rc -eq 0 ]
