#!/usr/bin/env bash
# batch_errors.sh: a bad row of a manifest gives one irrecon.error/1 record
# naming the file and line, and the batch goes on; path tricks are refused
# (docs: README, "Many samples"); --out is written atomically: a failed or
# interrupted run leaves an existing output as it was and no temporary file;
# a worker process that dies costs only the samples it still owed.
# The expected messages and lines are read off tests/data/batch/plate.csv.
set -u
cd "$(dirname "$0")/../.."
. tests/scripts/batch_lib.inc
cd "$plate"

"$P" batch --quiet --jobs 2 plate.csv >out.jsonl
[ $? -eq 2 ] || fail "bad rows must give exit status 2"
/usr/bin/python3 - out.jsonl <<'PY' || fail "error records"
import json, sys
recs = {}
for l in open(sys.argv[1]):
    r = json.loads(l)
    recs[r["sample"]] = r
# sample: (manifest line, file named by the error, line named, message fragment)
want = {
    "LPC-0912-04": (7, "spectra/no-such-file.jdx", None, "cannot open"),
    "LPC-0912-05": (8, "plate.csv", 8, "'..' leaves the manifest's folder"),
    "LPC-0912-06": (9, "plate.csv", 9, "absolute path '/etc/passwd' refused"),
    "LPC-0912-07": (10, "plate.csv", 10, ""),
    "LPC-0912-08": (11, "plate.csv", 11, "3 fields, but the header has 9"),
    "LPC-0912-11": (14, "plate.csv", 14, "unknown phase 'plasma'"),
}
bad = 0
for s, (mline, efile, eline, frag) in want.items():
    r = recs[s]
    e = r.get("error")
    if (r["schema"] != "irrecon.error/1" or r["manifest_line"] != mline or
            not e["file"].endswith(efile) or e["line"] != eline or frag not in e["message"]):
        print("unexpected record for", s, r); bad = 1
for s in ("LPC-0912-01", "LPC-0912-02", "LPC-0912-03", "LPC-0912-09", "LPC-0912-10, repeat", "LPC-0912-12"):
    if recs[s]["schema"] != "irrecon.check/1":
        print("not checked:", s, recs[s]); bad = 1
# The peak-list row really used its peak list.
if recs["LPC-0912-09"]["provenance"]["input"]["kind"] != "peak_list":
    print("peak list not used:", recs["LPC-0912-09"]["provenance"]["input"]); bad = 1
sys.exit(bad)
PY

# A manifest that cannot be read as a whole: exit 2, one line naming file
# and line, and an existing --out file untouched.
printf 'old results\n' >kept.jsonl
printf 'sample,smiles,spectrum\nA,C,spectra/ketone.jdx\n' >badhead.csv
"$P" batch --out kept.jsonl badhead.csv 2>err.txt
[ $? -eq 2 ] || fail "unknown column: exit status"
grep -q "^irrecon: badhead.csv:1: unknown column 'smiles'" err.txt || fail "unknown column message: $(cat err.txt)"
[ "$(cat kept.jsonl)" = "old results" ] || fail "existing output changed by a failed run"
"$P" batch --out kept.jsonl no-such-manifest.csv 2>/dev/null
[ "$(cat kept.jsonl)" = "old results" ] || fail "existing output changed by a missing manifest"
ls ./*.tmp.* 2>/dev/null && fail "temporary file left behind"

# An interrupted run (SIGTERM, SIGINT) leaves the old output and no
# temporary file; a finished one replaces it.
NLONG=20000
{
  echo "sample,structure,spectrum"
  # Long enough to outlast 0.4 s on two jobs: a batch checks some 2,000
  # samples a second per job (README, Speed).
  seq 1 $NLONG | sed 's/.*/LPC-0913-&,CC(=O)c1ccccc1,spectra\/ketone.jdx/'
} >long.csv
for sig in TERM INT; do
  timeout -s "$sig" 0.4 "$P" batch --quiet --out kept.jsonl long.csv
  rc=$?
  [ $rc -eq 124 ] || [ $rc -ge 128 ] || fail "SIG$sig: the run ended by itself (status $rc); make long.csv longer"
  [ "$(cat kept.jsonl)" = "old results" ] || fail "SIG$sig: existing output changed by an interrupted run"
  ls ./*.tmp.* 2>/dev/null && fail "SIG$sig: temporary file left behind"
done
timeout -s TERM 0.4 "$P" batch --quiet --jobs 2 --out fresh.jsonl long.csv
rc=$?
[ $rc -eq 124 ] || [ $rc -ge 128 ] || fail "2 jobs: the run ended by itself (status $rc); make long.csv longer"
[ -e fresh.jsonl ] && fail "an interrupted run with 2 jobs left an output file"
ls ./*.tmp.* 2>/dev/null && fail "2 jobs: temporary file left behind"
"$P" batch --quiet --out kept.jsonl plate.csv
[ "$(wc -l <kept.jsonl)" -eq 12 ] || fail "a finished run did not replace the output"

# A worker process that dies (here: killed) costs only its own samples: they
# become error records in their places, the batch finishes in order, exit 2.
if command -v pgrep >/dev/null; then
  "$P" batch --quiet --jobs 2 --out crash.jsonl long.csv 2>crash.err &
  bp=$!
  w=
  for _ in $(seq 50); do
    sleep 0.05
    w=$(pgrep -P "$bp" | head -n 1)
    [ -n "$w" ] && break
  done
  [ -n "$w" ] || fail "no worker process seen"
  sleep 0.2
  kill -KILL "$w"
  wait "$bp"
  rc=$?
  [ $rc -eq 2 ] || fail "killed worker: exit status $rc"
  [ "$(wc -l <crash.jsonl)" -eq $NLONG ] || fail "killed worker: not one line per sample"
  grep -q '"the worker process checking this sample was ended by signal 9"' crash.jsonl || fail "killed worker: no record naming the signal"
  /usr/bin/python3 -c '
import json, sys
got = [json.loads(l)["sample"] for l in open(sys.argv[1])]
sys.exit(0 if got == ["LPC-0913-%d" % i for i in range(1, int(sys.argv[2]) + 1)] else 1)' crash.jsonl $NLONG || fail "killed worker: order lost"
fi

# Unknown options and missing values are usage errors.
"$P" batch --jobs 0 plate.csv 2>/dev/null; [ $? -eq 2 ] || fail "--jobs 0 accepted"
"$P" batch --frobnicate plate.csv 2>/dev/null; [ $? -eq 2 ] || fail "unknown option accepted"
"$P" batch 2>/dev/null; [ $? -eq 2 ] || fail "no manifest accepted"
"$P" batch --help | grep -q "^usage: irrecon batch MANIFEST" || fail "--help"
echo "batch errors and atomic output: ok"
