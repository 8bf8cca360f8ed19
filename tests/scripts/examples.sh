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

# The commands of README.md's "Worked example", as printed there (output
# files sent to a temporary folder): check gives the verdict the text
# states, synth writes its file.
T=$(mktemp -d)
trap 'rm -rf "$T"' EXIT
/usr/bin/python3 - "$T" > "$T/readme-commands" <<'PY'
import re, sys
text = open("README.md", encoding="utf-8").read()
sec = text.split("## Worked example", 1)[1].split("\n## ", 1)[0]
cmds, cur = [], None
for line in sec.split("\n"):
    if line.startswith("    build/irrecon ") and cur is None:
        cur = line.strip()
    elif cur is not None and line.startswith("    "):
        cur += " " + line.strip()
    else:
        if cur is not None:
            cmds.append(cur)
        cur = None
if cur is not None:
    cmds.append(cur)
for c in cmds:
    c = c.replace("\\ ", "")
    c = re.sub(r"(--svg|-o) (\S+)", lambda m: "%s %s/%s" % (m.group(1), sys.argv[1], m.group(2)), c)
    print(c)
PY
nreadme=0
while IFS= read -r cmd; do
  nreadme=$((nreadme + 1))
  out=$(eval "$cmd" 2>&1); rc=$?
  case "$cmd" in
    *" check "*)
      if [ "$rc" != 1 ] || ! printf '%s' "$out" | head -n 1 | grep -q '== CONSISTENT IMPURE =='; then
        echo "FAIL README check command: exit $rc, $(printf '%s' "$out" | head -n 1)"; fails=$((fails + 1))
      else echo "ok README: $cmd"; fi
      svg=$(printf '%s' "$cmd" | sed -n 's/.*--svg \([^ ]*\).*/\1/p')
      [ -z "$svg" ] || [ -s "$svg" ] || { echo "FAIL README check command wrote no SVG"; fails=$((fails + 1)); } ;;
    *" synth "*)
      f=$(printf '%s' "$cmd" | sed -n 's/.* -o \([^ ]*\).*/\1/p')
      if [ "$rc" != 0 ] || [ ! -s "$f" ]; then
        echo "FAIL README synth command: exit $rc $out"; fails=$((fails + 1))
      else echo "ok README: $cmd"; fi ;;
  esac
done < "$T/readme-commands"
[ "$nreadme" -ge 2 ] || { echo "FAIL: README.md worked example commands not found ($nreadme)"; fails=$((fails + 1)); }

# make demo's script: builds nothing, shows the report and where the plot is.
out=$(BUILD="$BUILD" tools/demo 2>&1); rc=$?
if [ "$rc" != 0 ] || ! printf '%s' "$out" | grep -q '== CONSISTENT IMPURE ==' ||
   ! printf '%s' "$out" | grep -q "SVG plot written to .*/demo/LPC-2231-04.svg"; then
  echo "FAIL tools/demo: exit $rc"; printf '%s\n' "$out" | tail -n 5; fails=$((fails + 1))
else
  echo "ok tools/demo"
fi
[ "$fails" -eq 0 ]
