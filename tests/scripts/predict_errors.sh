#!/usr/bin/env bash
# predict_errors.sh: bad input to `irrecon predict` gives one line on stderr
# ("irrecon: file:line: message"), nothing on stdout, exit status 2, and
# leaves an existing --output file untouched. Cases: empty SMILES,
# unbalanced rings and branches, unknown elements, an unkekulizable ring
# (c1cccc1), every broken table in tests/data/tables/, a missing table
# folder, a missing or bad structure file, bad option values.
set -u
cd "$(dirname "$0")/../.."
BUILD=${BUILD:-build}
P="$BUILD/irrecon"
tmp=$(mktemp -d); trap 'rm -rf "$tmp"' EXIT
fails=0; n=0
expect_error() {  # expected-substring, args...
  local want=$1; shift
  n=$((n+1))
  "$P" predict "$@" >"$tmp/out" 2>"$tmp/err"; local rc=$?
  local lines; lines=$(wc -l <"$tmp/err")
  if [ $rc -ne 2 ] || [ -s "$tmp/out" ] || [ "$lines" -ne 1 ] ||
     ! grep -q '^irrecon: ' "$tmp/err" || ! grep -qF -- "$want" "$tmp/err"; then
    echo "FAIL: predict $*: exit $rc, $lines stderr lines, want '$want':"; cat "$tmp/err" "$tmp/out" | head -5
    fails=$((fails+1))
  fi
}
expect_error "empty SMILES" ""
expect_error "empty SMILES" "   "
expect_error "kekulize" "c1cccc1"
expect_error "C1CC" "C1CC"
expect_error "C(C" "C(C"
expect_error "CC)C" "CC)C"
expect_error "Xx" "[Xx]C"
expect_error "Q" "CQC"
for f in tests/data/tables/*.json; do
  case $f in *user-ok.json) continue ;; esac
  expect_error "$f" CCO --add-table "$f"
done
expect_error "tests/data/tables/bad-syntax.json:7:" CCO --add-table tests/data/tables/bad-syntax.json
expect_error "tests/data/tables/missing-field.json:7: group 'larkspur_no_typical'" CCO --add-table tests/data/tables/missing-field.json
expect_error "$tmp/nowhere" CCO --tables "$tmp/nowhere"
expect_error "$tmp/none.smi" --structure-file "$tmp/none.smi"
printf '# Larkspur Process Chemistry, batch LPC-0412 (demo)\n\nC1CC(C LPC-0412\n' >"$tmp/bad.smi"
expect_error "$tmp/bad.smi:3:" --structure-file "$tmp/bad.smi"
printf '# nothing here\n\n' >"$tmp/empty.smi"
expect_error "no SMILES" --structure-file "$tmp/empty.smi"
expect_error "--phase" CCO --phase plasma
expect_error "--sampling" CCO --sampling diffuse
expect_error "unknown option" CCO --colour
expect_error "give a SMILES" 
expect_error "one SMILES" CCO CCN
# A failing run leaves an existing output file as it was.
echo "earlier result" >"$tmp/keep.txt"
expect_error "kekulize" "c1cccc1" --output "$tmp/keep.txt"
if [ "$(cat "$tmp/keep.txt")" != "earlier result" ]; then echo "FAIL: --output clobbered on error"; fails=$((fails+1)); fi
echo "$n error cases, $fails failures"
[ $fails -eq 0 ]
