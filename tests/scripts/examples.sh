#!/usr/bin/env bash
# The worked examples of examples/README.md (Larkspur Process Chemistry, a
# fictional lab; spectra made by tools/make-examples): each line of
# examples/cases.tsv is run with --json and must give the documented exit
# status, verdict and JSON values; each command must appear verbatim in
# examples/README.md, so the documentation cannot drift from what is tested.
# The expected outcomes are what the group-frequency tables predict for the
# structures used to make the spectra (common practice), not measured data.
set -u
cd "$(dirname "$0")/../.."
BUILD=${BUILD:-build}
IRRECON="$BUILD/irrecon"
[ -x "$IRRECON" ] || { echo "FAIL: $IRRECON not built"; exit 1; }
fails=0; n=0
tab=$'\t'
while IFS="$tab" read -r name want_exit want_verdict checks args; do
  case "$name" in ''|'#'*) continue ;; esac
  n=$((n + 1))
  [ "$want_verdict" = - ] && want_verdict=""
  [ "$checks" = - ] && checks=""
  if ! grep -qF -- "build/irrecon $args" examples/README.md; then
    echo "FAIL $name: command not shown in examples/README.md: build/irrecon $args"
    fails=$((fails + 1))
  fi
  eval "set -- $args"
  out=$("$IRRECON" "$@" --json 2>&1); rc=$?
  if [ "$rc" != "$want_exit" ]; then
    echo "FAIL $name: exit $rc, documented $want_exit"; echo "$out" | head -5
    fails=$((fails + 1)); continue
  fi
  if ! printf '%s' "$out" | /usr/bin/python3 -c '
import json, sys
name, verdict, checks = sys.argv[1], sys.argv[2], sys.argv[3]
d = json.load(sys.stdin)
bad = []
if verdict and d.get("verdict") != verdict:
    bad.append("verdict %r, documented %r" % (d.get("verdict"), verdict))
for c in [c.strip() for c in checks.split(";") if c.strip()]:
    path, want = c.split("=", 1)
    v = d
    try:
        for part in path.split("."):
            v = v[int(part)] if isinstance(v, list) else v[part]
    except (KeyError, IndexError, ValueError, TypeError):
        bad.append("%s: not in the result" % path); continue
    if str(v) != want:
        bad.append("%s = %r, documented %r" % (path, v, want))
for b in bad:
    print("FAIL %s: %s" % (name, b))
sys.exit(1 if bad else 0)
' "$name" "$want_verdict" "$checks"; then
    fails=$((fails + 1))
  else
    echo "ok $name"
  fi
done < examples/cases.tsv
[ "$n" -ge 6 ] || { echo "FAIL: only $n cases read from examples/cases.tsv"; exit 1; }
[ "$fails" -eq 0 ]
