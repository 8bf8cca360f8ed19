#!/usr/bin/env bash
# The program under valgrind memcheck (issue 6, item 2): every worked
# example (each line of examples/cases.tsv, each request in
# examples/request/), every command on those files (predict, peaks, axis,
# synth, rank, batch with one and two worker processes), and the error paths
# of a few broken inputs from tests/data/bad/. Each run must show zero
# memcheck errors and no definite, indirect or possible leaks. Still-reachable
# memory is not a leak; tests/valgrind.supp hides only Open Babel's plugin
# loader (kept for the life of the process by design) from the report.
set -u
cd "$(dirname "$0")/../.."
BUILD=${BUILD:-build}
IRRECON=${IRRECON:-$BUILD/irrecon}
[ -x "$IRRECON" ] || { echo "memcheck: $IRRECON is not built"; exit 1; }
command -v valgrind >/dev/null || { echo "valgrind not installed (Debian: apt-get install valgrind)"; exit 77; }
if ldd "$IRRECON" 2>/dev/null | grep -q libasan || nm "$IRRECON" 2>/dev/null | grep -q __asan_init; then
	echo "memcheck: $IRRECON is a sanitizer build; valgrind needs the plain one"; exit 77
fi
T=$(mktemp -d "${TMPDIR:-/tmp}/irrecon-memcheck.XXXXXX")
trap 'rm -rf "$T"' EXIT
# A private copy: another `make` in a shared tree may relink the program.
cp "$IRRECON" "$T/irrecon"
PROG=$T/irrecon
VG=(valgrind --quiet --leak-check=full --show-leak-kinds=definite,indirect,possible
    --errors-for-leak-kinds=definite,indirect,possible --error-exitcode=99
    --trace-children=yes --child-silent-after-fork=no
    --suppressions=tests/valgrind.supp)

n=0; running=0
PAR=${MEMCHECK_JOBS:-2}
# vg NAME EXPECTED_STATUS ARGS...: one run under memcheck, in the background
# (PAR at a time); the program's own exit status must be the expected one
# (0/1/2, or '*' for any of them). The verdict goes to $T/NAME.result.
vg() {
	local name=$1 want=$2; shift 2
	n=$((n + 1))
	vg_one "$name" "$want" "$@" &
	running=$((running + 1))
	if [ "$running" -ge "$PAR" ]; then
		wait -n
		running=$((running - 1))
	fi
}
vg_one() {
	local name=$1 want=$2; shift 2
	local log=$T/$name rc bad
	"${VG[@]}" --log-file="$log.vg.%p" "$PROG" "$@" >"$log.out" 2>"$log.err" </dev/null
	rc=$?
	bad=$(cat "$log".vg.* 2>/dev/null | grep -E '^==[0-9]+== ' | grep -vE '^==[0-9]+== *$' | head -n 30)
	{
		if [ $rc -eq 99 ] || [ -n "$bad" ]; then
			echo "FAIL $name: memcheck found problems:"
			sed 's/^/    /' <<<"$bad"
		elif [ "$want" != '*' ] && [ "$rc" != "$want" ]; then
			echo "FAIL $name: exit $rc, expected $want: $(head -n 2 "$log.err")"
		elif [ "$want" = '*' ] && [ "$rc" -gt 2 ]; then
			echo "FAIL $name: exit $rc: $(head -n 2 "$log.err")"
		else
			echo ok
		fi
	} >"$log.result"
}

# 1. The worked examples, as cases.tsv runs them, with JSON and the plot.
if [ -f examples/cases.tsv ]; then
	while IFS=$'\t' read -r case status verdict checks args; do
		case $case in ''|'#'*) continue ;; esac
		# The arguments are shell words with '...' quoting, as in the README.
		mapfile -d '' argv < <(printf '%s' "$args" | xargs printf '%s\0')
		# check also writes JSON and the plot; rank has no plot.
		if [ "${argv[0]}" = check ]; then
			vg "example-$case" "$status" "${argv[@]}" --json --svg "$T/$case.svg"
		else
			vg "example-$case" "$status" "${argv[@]}" --json
		fi
	done <examples/cases.tsv
else
	echo "memcheck: examples/cases.tsv missing"; fail=$((fail + 1))
fi
for r in examples/request/*.request.json; do
	[ -f "$r" ] || continue
	vg "request-$(basename "$r" .request.json)" '*' check --request "$r"
done

# 2. Every command on the example files.
spectra=()
while IFS= read -r f; do spectra+=("$f"); done < <(find examples -name '*.jdx' -o -name '*.csv' | grep -v cases | sort)
for f in "${spectra[@]}"; do
	vg "peaks-$(basename "$f")" 0 peaks --json "$f"
done
vg predict-text 0 predict 'CC(C)(C)C1CCC(=O)CC1'
vg predict-json 0 predict --json --phase gas 'O=C(OC)c1ccc(N=[N+]=[N-])cc1'
vg synth 0 synth --structure 'CCOC(=O)C' --component 'CCO:0.2' --noise 0.002 --seed 7 -o "$T/synth.jdx"
wait; running=0   # the next run reads what synth wrote
vg synth-peaks 0 peaks "$T/synth.jdx"
vg axis '*' axis "${spectra[0]}"
vg rank '*' rank --spectrum examples/ester-wrong-structure/LPC-3305-11.csv \
	--candidate 'OC(=O)c1ccccc1' --candidate 'COC(=O)c1ccccc1'
# A manifest of the examples, one and two worker processes.
mkdir -p "$T/plate"
cp examples/oxidation-leftover-alcohol/LPC-2231-04.jdx examples/ester-wrong-structure/LPC-3305-11.csv "$T/plate/"
cat >"$T/plate/m.csv" <<'EOF'
sample,structure,spectrum,starting_materials,solvents
LPC-2231-04,CC(C)(C)C1CCC(=O)CC1,LPC-2231-04.jdx,CC(C)(C)C1CCC(O)CC1,
LPC-3305-11,COC(=O)c1ccccc1,LPC-3305-11.csv,,methanol
LPC-3305-12,CC(C,LPC-3305-11.csv,,
LPC-3305-13,CCO,../../etc/passwd,,
EOF
vg batch-jobs1 2 batch "$T/plate/m.csv" --out "$T/plate/out1.jsonl" --quiet
vg batch-jobs2 2 batch "$T/plate/m.csv" --out "$T/plate/out2.jsonl" --jobs 2 --quiet

# 3. Error paths: what is allocated before an error must be freed too.
vg err-jcamp 2 peaks tests/data/bad/jdx-dif-ycheck.jdx
vg err-csv 2 peaks tests/data/bad/csv-nonmonotonic.csv
vg err-smiles 2 predict 'CC(C(=O)O'
vg err-kekule 2 predict 'c1cccc1'
vg err-table 2 predict CCO --add-table tests/data/bad/table-window-reversed.json
vg err-smarts 2 predict CCO --add-table tests/data/bad/table-bad-smarts.json
vg err-request 2 check --request tests/data/bad/request-xy-lengths.json
vg err-peaks 2 check --structure CCO --peaks tests/data/bad/peaks-bad-class.csv
vg err-svg 2 check --structure CCO --spectrum tests/data/bad/jdx-sqz-truncated.jdx --svg "$T/never.svg"

wait
fail=0
for r in "$T"/*.result; do
	if [ "$(head -n 1 "$r")" != ok ]; then
		cat "$r"
		fail=$((fail + 1))
	fi
done
[ "$(find "$T" -maxdepth 1 -name '*.result' | wc -l)" -eq "$n" ] || { echo "memcheck: some runs left no result"; fail=$((fail + 1)); }
echo "memcheck: $((n - fail)) of $n runs clean"
[ $fail -eq 0 ]
