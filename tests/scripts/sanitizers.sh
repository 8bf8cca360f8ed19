#!/usr/bin/env bash
# The test suite under AddressSanitizer and UndefinedBehaviorSanitizer
# (issue 6, item 2): builds the library, the program and every unit test
# into build-san/ with -fsanitize=address,undefined, then runs the unit
# tests and the bad-input corpus (tests/scripts/bad_inputs.sh) with that
# program. Any sanitizer report fails: UBSan halts on its first finding, and
# LeakSanitizer reports definite leaks (tests/lsan.supp says what it may
# ignore and why).
set -u
cd "$(dirname "$0")/../.."
# Called from `make test`: the outer make's jobserver is not ours.
unset MAKEFLAGS MFLAGS MAKELEVEL
B=${SAN_BUILD:-build-san}
SAN="-fsanitize=address,undefined -fno-omit-frame-pointer"
JOBS=${SAN_JOBS:-2}

units=()
for f in tests/unit/test_*.c; do
	[ -f "$f" ] && units+=("$B/tests/$(basename "$f" .c)")
done
log=$(mktemp)
trap 'rm -f "$log"' EXIT
start=$(date +%s)
if ! make --no-print-directory -s -j"$JOBS" BUILD="$B" SAN="$SAN" OPT=-O1 all "${units[@]}" >"$log" 2>&1; then
	tail -n 40 "$log"
	echo "sanitizers: the build in $B failed"
	exit 1
fi
echo "sanitizers: built $B in $(( $(date +%s) - start ))s"

export ASAN_OPTIONS=${ASAN_OPTIONS:-detect_leaks=1:abort_on_error=1:strict_string_checks=1:detect_stack_use_after_return=1:check_initialization_order=1}
export UBSAN_OPTIONS=${UBSAN_OPTIONS:-halt_on_error=1:print_stacktrace=1}
export LSAN_OPTIONS=${LSAN_OPTIONS:-suppressions=$PWD/tests/lsan.supp:print_suppressions=0}

fail=0
echo "== unit tests under ASan+UBSan"
BUILD=$B ONLY=unit ./tests/run-all || fail=1
echo "== bad-input corpus under ASan+UBSan"
BUILD=$B IRRECON=$B/irrecon bash tests/scripts/bad_inputs.sh || fail=1
echo "sanitizers: done in $(( $(date +%s) - start ))s"
exit $fail
