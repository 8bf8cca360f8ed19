#!/usr/bin/env bash
# install.sh: `make install PREFIX=<temp>` puts the program, both libraries,
# the headers, the group tables, the man page and irrecon.pc in place; the
# public header compiles alone as C11 and as C++11 with -pedantic -Werror;
# examples/embed/check_sample.c builds with `pkg-config --cflags --libs
# irrecon` against the installed library alone and checks one sample.
# Sources: the pkg-config file format (pkg-config(1)); the sample's true
# structure from ../shared/ir-reference/MANIFEST.tsv (acetophenone), which
# the example must not report as inconsistent.
set -u
cd "$(dirname "$0")/../.."
BUILD=${BUILD:-build}
REFDIR=${IRRECON_REFDIR:-../shared/ir-reference}
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
fail() { echo "FAIL: $*"; exit 1; }

make -s install PREFIX="$tmp/prefix" BUILD="$BUILD" >"$tmp/install.log" 2>&1 || { cat "$tmp/install.log"; fail "make install"; }
p=$tmp/prefix
for f in bin/irrecon lib/libirrecon.a lib/libirrecon.so lib/libirrecon.so.0 include/irrecon.h \
         include/irrecon/reconcile.h include/irrecon/request.h include/irrecon/batch.h \
         share/man/man1/irrecon.1 lib/pkgconfig/irrecon.pc share/irrecon/group-tables/solvents/solvents.json; do
  [ -e "$p/$f" ] || fail "not installed: $f"
done
ls "$p"/share/irrecon/group-tables/*.json >/dev/null 2>&1 || fail "no group tables installed"
"$p/bin/irrecon" --version | grep -q '^irrecon [0-9]' || fail "installed program does not run"

# The installed program finds the installed tables on its own.
"$p/bin/irrecon" predict 'CC(=O)c1ccccc1' --json >"$tmp/predict.json" || fail "installed predict"
grep -q '"schema":[[:space:]]*"irrecon.predict/1"' "$tmp/predict.json" || fail "installed predict output"

# The public header alone, strict C and C++.
printf '#include <irrecon.h>\nint main(void) { return irr_version() ? 0 : 1; }\n' >"$tmp/h.c"
cc -std=c11 -Wall -Wextra -pedantic -Werror -I"$p/include" -c "$tmp/h.c" -o "$tmp/h.o" || fail "irrecon.h as C11"
c++ -x c++ -std=c++11 -Wall -Wextra -pedantic -Werror -I"$p/include" -c "$tmp/h.c" -o "$tmp/hpp.o" || fail "irrecon.h as C++11"
for h in "$p"/include/irrecon/*.h; do
  printf '#include <irrecon/%s>\n' "$(basename "$h")" >"$tmp/one.c"
  cc -std=c11 -Wall -Wextra -pedantic -Werror -I"$p/include" -fsyntax-only "$tmp/one.c" || fail "$(basename "$h") alone"
done

export PKG_CONFIG_PATH="$p/lib/pkgconfig"
[ "$(pkg-config --modversion irrecon)" = "$("$p/bin/irrecon" --version | awk '{print $2}')" ] || fail "irrecon.pc version"
[ "$(pkg-config --variable=tablesdir irrecon)" = "$p/share/irrecon/group-tables" ] || fail "irrecon.pc tablesdir"
# shellcheck disable=SC2046
cc -std=c11 -Wall -Wextra -pedantic -Werror examples/embed/check_sample.c \
   $(pkg-config --cflags --libs irrecon) -Wl,-rpath,"$p/lib" -o "$tmp/check_sample" || fail "example does not build"
ldd "$tmp/check_sample" | grep -q "$p/lib/libirrecon.so.0" || fail "example not linked to the installed library"

# The man page documents every command the program lists.
for c in $("$p/bin/irrecon" --help | awk '/^Commands:/ {on = 1; next} on && /^  [a-z]/ {print $1}'); do
  grep -q "^\.SS \"irrecon $c\"" "$p/share/man/man1/irrecon.1" || fail "man page lacks the command $c"
done
# The man page is well-formed roff.
if command -v groff >/dev/null; then
  groff -man -Tutf8 -ww -z "$p/share/man/man1/irrecon.1" 2>"$tmp/groff.log" || fail "man page"
  [ -s "$tmp/groff.log" ] && { cat "$tmp/groff.log"; fail "man page warnings"; }
fi

if [ ! -f "$REFDIR/acetophenone.jdx" ]; then
  echo "skipped: reference spectra folder $REFDIR not found (set IRRECON_REFDIR)"
  exit 77
fi
IRRECON_TABLES="$p/share/irrecon/group-tables" "$tmp/check_sample" 'CC(=O)c1ccccc1' "$REFDIR/acetophenone.jdx" \
  >"$tmp/out.txt" 2>&1
rc=$?
cat "$tmp/out.txt"
[ $rc -eq 0 ] || [ $rc -eq 1 ] || fail "example exit status $rc"
grep -q '^sample LPC-0417-03: consistent' "$tmp/out.txt" || fail "the true structure of acetophenone.jdx is not found consistent"
echo "install, header, pkg-config and embedding example: ok"
