#!/usr/bin/env bash
# predict_cli.sh: `irrecon predict` output. Checks: the JSON carries schema
# irrecon.predict/1 with structure, counts, groups, bands (sorted, each with
# a named source) and cautions; the table digest equals coreutils sha256sum
# over the table files in name order; the text table fits 80 columns and
# shows every region; cautions appear for azide, diazo, peroxide, polynitro
# and isocyanate structures (the groups the issue names); phase and user
# tables change the prediction as documented; IRRECON_TABLES is honoured.
# Counts checked by hand from the structure (ethyl acetate C4H8O2: one C=O,
# eight H on sp3 carbon).
set -u
cd "$(dirname "$0")/../.."
BUILD=${BUILD:-build}
P="$BUILD/irrecon"
PY=/usr/bin/python3
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
fails=0
fail() { echo "FAIL: $*"; fails=$((fails+1)); }

"$P" predict --json 'CCOC(C)=O' >"$tmp/ea.json" || fail "predict --json ethyl acetate"
digest=$(cat $(LC_ALL=C ls group-tables/*.json) | sha256sum | cut -d' ' -f1)
$PY - "$tmp/ea.json" "$digest" <<'PY' || fail "ethyl acetate JSON"
import json, sys
d = json.load(open(sys.argv[1]))
assert d["schema"] == "irrecon.predict/1", d["schema"]
assert d["structure"]["smiles"] == "CCOC(C)=O" and d["structure"]["formula"] == "C4H8O2", d["structure"]
c = d["counts"]
for k in ("o_h", "n_h", "c_n_triple", "c_o_double", "aromatic_rings", "c_h_sp", "c_h_sp2", "c_h_sp3"):
    assert k in c, k
assert (c["c_o_double"], c["c_h_sp3"], c["o_h"], c["c_h_sp2"]) == (1, 8, 0, 0), c
ids = [g["id"] for g in d["groups"]]
assert "ester" in ids, ids
for g in d["groups"]:
    assert set(("id", "name", "count", "atoms")) <= set(g), g
b = d["bands"]
assert [x["typical"] for x in b] == sorted((x["typical"] for x in b), reverse=True)
for x in b:
    assert set(("group", "label", "low", "high", "typical", "intensity", "shape", "weight", "source")) <= set(x), x
    assert x["low"] <= x["typical"] <= x["high"] and 0 <= x["weight"] <= 1 and x["source"], x
co = [x for x in b if x["group"] == "ester" and x["label"] == "C=O stretch"]
assert len(co) == 1 and co[0]["low"] <= 1742 <= co[0]["high"], co  # Silverstein 7th ed.: ethyl acetate 1742; from memory
assert d["cautions"] == []
assert d["tables"]["sha256"] == sys.argv[2], (d["tables"]["sha256"], sys.argv[2])
PY

# Cautions for energetic or very toxic groups.
for smi in 'CCCCN=[N+]=[N-]' 'CCOC(=O)C=[N+]=[N-]' 'CC(C)(C)OOC(C)(C)C' \
           'Cc1c(cc(cc1[N+](=O)[O-])[N+](=O)[O-])[N+](=O)[O-]' 'O=C=Nc1ccccc1'; do
  "$P" predict --json "$smi" | $PY -c 'import json,sys; d=json.load(sys.stdin); sys.exit(0 if d["cautions"] else 1)' ||
    fail "no caution for $smi"
  "$P" predict "$smi" | grep -q '^  CAUTION: ' || fail "no CAUTION line for $smi"
done

# Text: 80 columns, every region for a structure that spans them.
"$P" predict 'OC(=O)c1ccc(N=[N+]=[N-])cc1' >"$tmp/t.txt" || fail "text predict"
awk 'length($0) > 80 { print "line " NR " is " length($0) " columns"; bad=1 } END { exit bad }' "$tmp/t.txt" || fail "text wider than 80 columns"
# long band labels (1,2-disubstituted alkene, stereo not given) and a long SMILES
"$P" predict 'CC=CC(C)(C)OC(=O)c1ccc(NS(=O)(=O)c2ccc(cc2)[N+](=O)[O-])cc1CCCCCCCCCC' >"$tmp/t2.txt" || fail "text predict 2"
awk 'length($0) > 80 { print "line " NR " is " length($0) " columns"; bad=1 } END { exit bad }' "$tmp/t2.txt" || fail "text 2 wider than 80 columns"
for r in 'above 3000' '3000-2500' '2500-2000' '2000-1500' 'fingerprint'; do
  grep -q -- "-- .*$r" "$tmp/t.txt" || fail "region '$r' missing"
done

# Phase: free O-H only outside the condensed phase (Silverstein 7th ed.: free O-H 3650-3584; from memory).
"$P" predict --json CCO | grep -q '(free)' && fail "free O-H in condensed phase"
"$P" predict --json --phase solution CCO | grep -q '"O-H stretch (free)"' || fail "no free O-H in solution"

# User tables: replace a group by id, add a SMARTS group.
"$P" predict --json --add-table tests/data/tables/user-ok.json 'CC(C)(C)[Si](C)(C)OCCC#N' >"$tmp/u.json" || fail "user table"
$PY - "$tmp/u.json" <<'PY' || fail "user table content"
import json, sys
d = json.load(open(sys.argv[1]))
cn = [b for b in d["bands"] if b["group"] == "nitrile"]
assert len(cn) == 1 and "LPC-IR-7" in cn[0]["source"], cn
assert any(g["id"] == "larkspur_tbs_ether" for g in d["groups"]), [g["id"] for g in d["groups"]]
assert any(b["group"] == "larkspur_tbs_ether" for b in d["bands"])
PY

# The example table in group-tables/README.md is a working table: alone
# (--tables ""), it gives cyclopentanone its strained C=O (1745, Silverstein
# 7th ed.; from memory).
awk '/^```json$/ {on=1; next} /^```$/ {on=0} on' group-tables/README.md >"$tmp/readme.json"
"$P" predict --json --tables "" --add-table "$tmp/readme.json" 'O=C1CCCC1' >"$tmp/r.json" || fail "README example table"
$PY -c 'import json,sys; d=json.load(open(sys.argv[1])); b=[x for x in d["bands"] if x["label"]=="C=O stretch"]; assert len(b)==1 and b[0]["low"]<=1745<=b[0]["high"], b' "$tmp/r.json" ||
  fail "README example table prediction"

# IRRECON_TABLES: a folder holding only the nitrogen table.
mkdir "$tmp/tables" && cp group-tables/nitrogen.json "$tmp/tables/"
IRRECON_TABLES="$tmp/tables" "$P" predict --json 'CC#N' >"$tmp/e.json" || fail "IRRECON_TABLES"
$PY -c 'import json,sys; d=json.load(open(sys.argv[1])); g={b["group"] for b in d["bands"]}; assert g=={"nitrile"}, g' "$tmp/e.json" ||
  fail "IRRECON_TABLES not honoured"

# Structure file with a name; --output writes the same as stdout.
printf '# Larkspur Process Chemistry (demo)\nCC(=O)Nc1ccc(O)cc1 LPC-0415 crude amide\n' >"$tmp/s.smi"
"$P" predict --structure-file "$tmp/s.smi" --output "$tmp/o.txt" || fail "--structure-file/--output"
grep -q 'LPC-0415 crude amide' "$tmp/o.txt" || fail "structure name not shown"
"$P" predict --help | grep -q 'usage: irrecon predict' || fail "--help"

echo "$fails failures"
[ $fails -eq 0 ]
