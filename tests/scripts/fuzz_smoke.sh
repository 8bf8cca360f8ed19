#!/usr/bin/env bash
# A 10-second run of every fuzz target (tools/fuzz) from its seeds alone, as
# part of `make test`: the targets still build against the current library,
# and the seeds plus ten seconds of mutation find no crash, leak, hang or
# undefined behaviour. The long runs are `make fuzz`. Skips (77) when clang
# or libFuzzer is not installed.
set -u
cd "$(dirname "$0")/../.."
unset MAKEFLAGS MFLAGS MAKELEVEL
SECS=${FUZZ_SMOKE_SECONDS:-10}
if ! command -v clang >/dev/null || ! command -v clang++ >/dev/null; then
	echo "clang not installed (Debian: apt-get install clang libclang-rt-dev); fuzz smoke run skipped"
	exit 77
fi
B=${FUZZ_BUILD:-build-fuzz}
corpus=$B/smoke-corpus
rm -rf "$corpus"
FUZZ_BUILD=$B FUZZ_CORPUS=$corpus ./tools/fuzz -j 2 -t "$SECS"
rc=$?
rm -rf "$corpus"
case $rc in
0) echo "fuzz smoke: every target ran ${SECS}s clean" ; exit 0 ;;
3) echo "clang's libFuzzer not installed (Debian: apt-get install libclang-rt-dev); fuzz smoke run skipped"; exit 77 ;;
1) echo "fuzz smoke: a target found a problem (inputs under $B/crashes/)"; exit 1 ;;
*) echo "fuzz smoke: could not build or run the targets"; exit 1 ;;
esac
