#!/usr/bin/env bash
# The bad-input corpus: runs every case in tests/data/bad/ (see the README
# there for the case format) and checks that the program fails the way a
# user can act on: the expected exit status (2), exactly one line on stderr
# reading "irrecon: FILE[:LINE]: message" with the file (and line) named and
# the expected words in the message, nothing on stdout, no crash or sanitizer
# report, within the time limit, and a pre-existing output file (@OUT@) left
# byte-for-byte as it was with no temporary file beside it.
#
#   env: IRRECON  the program (default $BUILD/irrecon, BUILD default build)
#        CASES    only the cases whose names match this grep -E pattern
#        KEEP=1   keep the per-case temporary folders (printed on failure)
#        VERBOSE=1 print the error line of every passing case too
set -u
cd "$(dirname "$0")/../.."
ROOT=$PWD
BUILD=${BUILD:-build}
IRRECON=${IRRECON:-$BUILD/irrecon}
DIR=tests/data/bad
MIN_CASES=60

if [ ! -x "$IRRECON" ]; then
	echo "bad_inputs: $IRRECON is not built (run make first)"
	exit 1
fi
# A private copy: in a shared tree another `make` may relink the program
# while the corpus runs.
PROG_DIR=$(mktemp -d "${TMPDIR:-/tmp}/irrecon-bad-prog.XXXXXX")
trap 'rm -rf "$PROG_DIR"' EXIT
cp "$IRRECON" "$PROG_DIR/irrecon" || { echo "bad_inputs: cannot copy $IRRECON"; exit 1; }
SHOWN=$IRRECON
IRRECON=$PROG_DIR/irrecon

pass=0; fail=0; failed=()
SENTINEL="irrecon bad-input corpus: this file existed before the run and must stay unchanged."

# Prints the one data file of a case: <case>.<ext>, whatever ext is.
case_file() {
	local c=$1 f
	for f in "$DIR/$c".*; do
		case $f in *.expect) continue ;; esac
		[ -e "$f" ] && { echo "$f"; return; }
	done
}

# Replaces the placeholders in one field: @CASE@ the case's data file,
# @BAD@ the corpus folder, @TMP@ the case's private folder, @OUT@ the
# pre-existing output file in it, @ROOT@ the repository.
subst() {
	local s=$1
	s=${s//@CASE@/$CASEFILE}
	s=${s//@BAD@/$DIR}
	s=${s//@TMP@/$TMP}
	s=${s//@OUT@/$TMP/out/existing.out}
	s=${s//@ROOT@/$ROOT}
	printf '%s' "$s"
}

# has_fragment 'A || B' TEXT: TEXT holds A or B (case ignored). TEXT is the
# message alone, never the file name before it, which often holds the
# same words ("csv-nan.csv").
has_fragment() {
	local rest=$1 alt
	while :; do
		alt=${rest%% || *}
		grep -qiF -- "$alt" <<<"$2" && return 0
		[ "$alt" = "$rest" ] && return 1
		rest=${rest#* || }
	done
}

check_case() {  # case name; sets WHY on failure
	local c=$1 exp=$DIR/$1.expect
	local run="" status="" where="" fragment="" stdin="" timeout_s=20 stdout_rule=empty
	local stderr_rule=one out_rule=kept
	local setups=() out_has=() key val
	WHY=""
	while IFS= read -r line || [ -n "$line" ]; do
		case $line in ''|'#'*) continue ;; esac
		key=${line%%:*}
		val=${line#*:}
		val=${val# }
		case $key in
		run) run=$val ;;
		status) status=$val ;;
		where) where=$val ;;
		error) fragment=$val ;;
		stdin) stdin=$val ;;
		timeout) timeout_s=$val ;;
		stdout) stdout_rule=$val ;;
		stderr) stderr_rule=$val ;;
		out) out_rule=$val ;;
		out-has) out_has+=("$val") ;;
		setup) setups+=("$val") ;;
		*) WHY="unknown field '$key' in $exp"; return 1 ;;
		esac
	done <"$exp"
	if [ -z "$run" ] || [ -z "$status" ]; then
		WHY="$exp needs run: and status:"
		return 1
	fi
	# A failing run must say where and what; a run that must succeed (an
	# odd but valid input found by fuzzing) may leave them out.
	if [ "$status" != 0 ] && { [ -z "$where" ] || [ -z "$fragment" ]; }; then
		WHY="$exp needs where: and error: (status $status)"
		return 1
	fi
	CASEFILE=$(case_file "$c")
	TMP=$(mktemp -d "${TMPDIR:-/tmp}/irrecon-bad.XXXXXX")
	mkdir -p "$TMP/out"
	printf '%s\n' "$SENTINEL" >"$TMP/out/existing.out"
	local s
	for s in "${setups[@]}"; do
		local -a p
		read -r -a p <<<"$(subst "$s")"
		set -- "${p[@]}"
		case $1 in
		sparse)  # sparse PATH SIZE: a file of SIZE bytes that takes no disk
			truncate -s "$3" "$2" || { WHY="setup failed: $s"; return 1; } ;;
		repeat)  # repeat PATH TEXT COUNT [PREFIX] [SUFFIX]: PREFIX, TEXT COUNT
			 # times, SUFFIX and a newline; the texts take printf %b escapes
			 # (\n newline, \040 blank)
			local body
			printf -v body '%b' "$3"
			{ printf '%b' "${5:-}"; for ((i = 0; i < $4; i++)); do printf '%s' "$body"; done; printf '%b\n' "${6:-}"; } >"$2" ;;
		seq)     # seq PATH FIRST STEP COUNT [SUFFIX]: COUNT lines "<value><SUFFIX>"
			awk -v a="$3" -v d="$4" -v n="$5" -v s="${6:-}" \
				'BEGIN { for (i = 0; i < n; i++) printf "%.4f%s\n", a + i * d, s }' >"$2" ;;
		copy)    # copy FROM TO
			cp "$2" "$3" || { WHY="setup failed: $s"; return 1; } ;;
		link)    # link TARGET PATH: a symbolic link
			ln -s "$2" "$3" || { WHY="setup failed: $s"; return 1; } ;;
		*) WHY="unknown setup '$1' in $exp"; return 1 ;;
		esac
	done
	# Arguments are split as xargs does: quotes '...' and "..." group, no
	# expansion of any kind (SMILES hold '#', '$', '(' and '*').
	local -a argv=()
	mapfile -d '' argv < <(subst "$run" | xargs printf '%s\0')
	local in=/dev/null
	[ -n "$stdin" ] && in=$(subst "$stdin")
	# The braces keep bash's own "Segmentation fault" notice out of the log;
	# the exit status still says it.
	{ timeout -k 2 "$timeout_s" "$IRRECON" "${argv[@]}" <"$in" >"$TMP/stdout" 2>"$TMP/stderr"; } 2>/dev/null
	local rc=$?
	local err nlines
	err=$(head -c 4000 "$TMP/stderr")
	nlines=$(wc -l <"$TMP/stderr")
	if [ $rc -eq 124 ] || [ $rc -eq 137 ]; then
		WHY="did not finish within ${timeout_s}s"
	elif [ $rc -ge 128 ]; then
		WHY="crashed (exit $rc): $(head -n 3 "$TMP/stderr")"
	elif grep -qE 'AddressSanitizer|LeakSanitizer|runtime error:|UndefinedBehaviorSanitizer' "$TMP/stderr"; then
		WHY="sanitizer report: $(grep -m 2 -E 'ERROR|runtime error|SUMMARY' "$TMP/stderr")"
	elif [ "$rc" != "$status" ]; then
		WHY="exit $rc, expected $status; stderr: $(head -n 2 "$TMP/stderr")"
	elif [ "$stderr_rule" = any ]; then
		:
	elif [ "$stderr_rule" = summary ]; then
		# A batch: stderr is the summary; one of its lines names the
		# failed row as "<where>: message".
		local want re
		want=$(subst "$where")
		re=$(printf '%s' "${want%:\*}" | sed 's|[][\.*^$()+?{}]|\\&|g')
		[ "${want%:\*}" != "$want" ] && re="$re:[1-9][0-9]*"
		local named="" l
		while IFS= read -r l; do
			l=${l#*"${want%:\*}":}              # the message after "FILE:"
			[[ $l =~ ^[0-9]+: ]] && l=${l#*:}   # and after "LINE:"
			named+="$l"$'\n'
		done < <(grep -E -- "(^|[[:space:]])$re: " "$TMP/stderr")
		if [ -z "$named" ] || ! has_fragment "$fragment" "$named"; then
			WHY="no stderr line names '$want: ...$fragment...': $(head -n 12 "$TMP/stderr" | tr '\n' '|')"
		fi
	elif [ "$nlines" -ne 1 ] || [ -z "$err" ]; then
		WHY="stderr has $nlines lines, expected exactly one: $(head -n 4 "$TMP/stderr" | tr '\n' '|')"
	else
		local want prefix got msg
		want=$(subst "$where")
		got=${err#irrecon: }
		prefix=${want%:\*}
		msg=${got#"$prefix":}
		if [ "$got" = "$err" ]; then
			WHY="error does not start with 'irrecon: ': $err"
		elif [ "$msg" = "$got" ]; then
			WHY="error should name '$prefix:': $err"
		elif [ "$prefix" != "$want" ] && ! [[ $msg =~ ^[1-9][0-9]*:\  ]]; then
			WHY="error should name '$prefix:LINE:': $err"
		fi
		# The message: what follows "FILE:" and "LINE:".
		[[ $msg =~ ^[0-9]+: ]] && msg=${msg#*:}
		if [ -z "$WHY" ] && ! has_fragment "$fragment" "$msg"; then
			WHY="error lacks '$fragment': $err"
		fi
	fi
	if [ -z "$WHY" ] && [ "$stdout_rule" = empty ] && [ -s "$TMP/stdout" ]; then
		WHY="wrote to stdout on error: $(head -c 200 "$TMP/stdout")"
	fi
	if [ -z "$WHY" ]; then
		if [ "$out_rule" = kept ] && [ "$(cat "$TMP/out/existing.out")" != "$SENTINEL" ]; then
			WHY="the existing output file was changed"
		elif [ "$out_rule" = replaced ] && [ "$(cat "$TMP/out/existing.out")" = "$SENTINEL" ]; then
			WHY="the output file was not written"
		elif [ "$(find "$TMP/out" -mindepth 1 | wc -l)" -ne 1 ]; then
			WHY="files left beside the output: $(find "$TMP/out" -mindepth 1 -not -name existing.out -printf '%f ')"
		fi
	fi
	local h
	for h in "${out_has[@]}"; do
		[ -n "$WHY" ] && break
		grep -qF -- "$(subst "$h")" "$TMP/out/existing.out" || WHY="the output lacks '$h'"
	done
	[ -z "$WHY" ] && [ -n "${VERBOSE:-}" ] && echo "ok   $c: $(head -n 1 <<<"$err")"
	if [ -n "$WHY" ] && [ -n "${KEEP:-}" ]; then
		WHY="$WHY [kept $TMP]"
	else
		rm -rf "$TMP"
	fi
	[ -z "$WHY" ]
}

n=0
for exp in "$DIR"/*.expect; do
	c=$(basename "$exp" .expect)
	if [ -n "${CASES:-}" ] && ! grep -qE -- "$CASES" <<<"$c"; then
		continue
	fi
	n=$((n + 1))
	if check_case "$c"; then
		pass=$((pass + 1))
	else
		fail=$((fail + 1))
		failed+=("$c")
		echo "FAIL $c: $WHY"
	fi
done
# The runner itself must be able to fail: a program that does nothing and
# exits 0, and one that prints a well-formed error without naming the file,
# are both rejected on an ordinary case.
if [ -z "${CASES:-}" ]; then
	real=$IRRECON
	printf '#!/bin/sh\nexit 0\n' >"$PROG_DIR/silent"
	printf '#!/bin/sh\necho "irrecon: somewhere:1: no data points: the file is empty" >&2\nexit 2\n' >"$PROG_DIR/vague"
	chmod +x "$PROG_DIR/silent" "$PROG_DIR/vague"
	for fake in silent vague; do
		IRRECON=$PROG_DIR/$fake
		if check_case csv-empty; then
			echo "FAIL runner self-check: a '$fake' program passed case csv-empty"
			fail=$((fail + 1))
		fi
	done
	IRRECON=$real
fi
if [ -z "${CASES:-}" ] && [ "$n" -lt $MIN_CASES ]; then
	echo "bad_inputs: only $n cases in $DIR (at least $MIN_CASES wanted)"
	fail=$((fail + 1))
fi
echo "bad inputs: $pass passed, $fail failed (program: $SHOWN)"
[ "$fail" -eq 0 ]
