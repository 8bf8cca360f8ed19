#!/usr/bin/env bash
# batch_jobs.sh: `irrecon batch` gives one line per sample in manifest order,
# byte-identical for --jobs 1, 2 and 4 (worker processes: Open Babel is not
# thread-safe); CSV and JSON Lines manifests of the same plate give the same
# results; --shard K/N outputs merged with `paste -d '\n' | sed '/^$/d'` (as
# the README shows) rebuild the unsharded output; the exit status follows
# the records (2 any error record, else 1 any verdict not consistent, else 0).
set -u
cd "$(dirname "$0")/../.."
. tests/scripts/batch_lib.inc

cd "$plate"
for j in 1 2 4; do
  "$P" batch --jobs "$j" plate.csv >"out.$j" 2>"err.$j"
  echo $? >"rc.$j"
done
cmp -s out.1 out.2 || fail "--jobs 2 output differs from --jobs 1"
cmp -s out.1 out.4 || fail "--jobs 4 output differs from --jobs 1"
cmp -s rc.1 rc.4 || fail "exit status differs between --jobs 1 and 4"
[ "$(wc -l <out.1)" -eq 12 ] || fail "expected 12 lines, got $(wc -l <out.1)"
[ "$(cat rc.1)" = "$(expected_status out.1)" ] || fail "exit status $(cat rc.1), records say $(expected_status out.1)"
[ "$(cat rc.1)" = 2 ] || fail "a plate with bad rows must exit 2"

# Manifest order, one line per row, bad rows included.
/usr/bin/python3 - plate.csv out.1 <<'PY' || fail "samples not in manifest order"
import csv, json, sys
rows = [r for r in csv.reader(l for l in open(sys.argv[1]) if not l.startswith("#"))][1:]
want = [r[0] for r in rows]
got = [json.loads(l)["sample"] for l in open(sys.argv[2])]
if want != got:
    print("want", want); print("got ", got); sys.exit(1)
PY

# The same plate as JSON Lines: the same results (error records name their
# own manifest, so that key is left out of the comparison).
"$P" batch --jobs 2 --quiet plate.jsonl >out.jsonl
/usr/bin/python3 - out.1 out.jsonl <<'PY' || fail "CSV and JSON Lines manifests disagree"
import json, sys
def load(p):
    out = []
    for l in open(p):
        r = json.loads(l)
        r.pop("manifest", None)
        if "error" in r:
            r["error"].pop("file", None)
            r["error"]["message"] = r["error"]["message"].split(":")[0]
        out.append(r)
    return out
a, b = load(sys.argv[1]), load(sys.argv[2])
for x, y in zip(a, b):
    if x != y and not ("error" in x and "error" in y):
        print("differs:", x.get("sample"), y.get("sample")); sys.exit(1)
sys.exit(0 if len(a) == len(b) else 1)
PY

# Shards, merged back in manifest order.
for k in 1 2 3; do "$P" batch --quiet --shard "$k/3" plate.csv >"shard.$k"; done
[ "$(wc -l <shard.1)" -eq 4 ] || fail "shard 1/3 of 12 samples should hold 4"
paste -d '\n' shard.1 shard.2 shard.3 | sed '/^$/d' >merged
cmp -s merged out.1 || fail "merged shards differ from the unsharded output"
"$P" batch --quiet --shard 4/3 plate.csv >/dev/null 2>err.shard && fail "--shard 4/3 accepted"
grep -q -- "--shard needs K/N" err.shard || fail "--shard 4/3 message: $(cat err.shard)"

# The summary on stderr counts each verdict and lists the failures; no
# progress bar when stderr is not a terminal.
grep -q "^irrecon batch: 12 samples" err.1 || fail "summary: $(head -n 1 err.1)"
n_err=$(grep -c '"irrecon.error/1"' out.1)
grep -Eq "^  failed +$n_err\$" err.1 || fail "summary does not count $n_err failures"
grep -q "LPC-0912-05 .*'\\.\\.' leaves the manifest's folder" err.1 || fail "summary lacks the refused path"
grep -q $'\r' err.1 && fail "progress bar drawn when stderr is not a terminal"
if command -v script >/dev/null; then
  script -qec "'$P' batch --out tty.jsonl plate.csv" /dev/null >tty.log 2>&1
  grep -q "left" tty.log || fail "no progress bar on a terminal"
fi

echo "batch jobs, order, shards and summary: ok"
