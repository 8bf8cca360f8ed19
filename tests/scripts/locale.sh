#!/usr/bin/env bash
# Numbers must not depend on the locale (issue 6, item 5): runs predict,
# peaks and check (text, JSON and SVG) in the C locale and again under a
# decimal-comma locale (de_DE.UTF-8, generated with localedef into a private
# folder via LOCPATH, so the machine's locale set is left alone), and asserts
# byte-identical output. The program itself never calls setlocale(), so the
# second run also preloads a two-line library that does setlocale(LC_ALL, "")
# before main(), as a program embedding libirrecon might: only then would a
# stray printf("%f") or strtod() show a comma.
set -u
cd "$(dirname "$0")/../.."
BUILD=${BUILD:-build}
IRRECON=${IRRECON:-$BUILD/irrecon}
[ -x "$IRRECON" ] || { echo "locale: $IRRECON is not built"; exit 1; }
command -v localedef >/dev/null || { echo "localedef missing (Debian: apt-get install locales)"; exit 77; }
[ -d /usr/share/i18n/locales ] && [ -f /usr/share/i18n/locales/de_DE ] ||
	{ echo "locale sources missing (Debian: apt-get install locales)"; exit 77; }

T=$(mktemp -d "${TMPDIR:-/tmp}/irrecon-locale.XXXXXX")
trap 'rm -rf "$T"' EXIT
mkdir -p "$T/loc"
if ! localedef -i de_DE -f UTF-8 "$T/loc/de_DE.UTF-8" >"$T/localedef.log" 2>&1; then
	# localedef exits 1 for warnings but still writes the locale.
	[ -f "$T/loc/de_DE.UTF-8/LC_NUMERIC" ] || { cat "$T/localedef.log"; echo "locale: localedef failed"; exit 1; }
fi
export LOCPATH=$T/loc
DE=(env LOCPATH="$T/loc" LC_ALL=de_DE.UTF-8 LANG=de_DE.UTF-8)
# The locale must really print a decimal comma, or this test proves nothing.
probe=$("${DE[@]}" awk 'BEGIN { printf "%.2f", 3.25 }')
[ "$probe" = "3,25" ] || { echo "locale: de_DE.UTF-8 prints '$probe', not '3,25'"; exit 1; }

CC=${CC:-cc}
printf '#include <locale.h>\n__attribute__((constructor)) static void irr_test_setlocale(void) { setlocale(LC_ALL, ""); }\n' >"$T/setlocale.c"
"$CC" -shared -fPIC -o "$T/setlocale.so" "$T/setlocale.c" || { echo "locale: cannot build the preload library"; exit 1; }
# Under a sanitizer build the runtime must come first in the preload list.
PRE=$T/setlocale.so
if ldd "$IRRECON" 2>/dev/null | grep -q libasan; then
	PRE="$(ldd "$IRRECON" | awk '/libasan/ { print $3 }') $PRE"
fi

fail=0; n=0
# compare NAME ARGS...: runs the command three ways; "@SVG@" in ARGS is an
# output file whose bytes are compared too.
compare() {
	local name=$1; shift
	local mode args a
	for mode in c de pre; do
		mkdir -p "$T/$mode"
		args=()
		for a in "$@"; do args+=("${a//@SVG@/$T/$mode/$name.svg}"); done
		case $mode in
		c)   env LC_ALL=C "$IRRECON" "${args[@]}" >"$T/$mode/$name.out" 2>"$T/$mode/$name.err" ;;
		de)  "${DE[@]}" "$IRRECON" "${args[@]}" >"$T/$mode/$name.out" 2>"$T/$mode/$name.err" ;;
		pre) "${DE[@]}" LD_PRELOAD="$PRE" "$IRRECON" "${args[@]}" >"$T/$mode/$name.out" 2>"$T/$mode/$name.err" ;;
		esac
		echo $? >"$T/$mode/$name.rc"
	done
	n=$((n + 1))
	local rc
	rc=$(cat "$T/c/$name.rc")
	if [ "$rc" -gt 1 ] || [ ! -s "$T/c/$name.out" ]; then
		echo "FAIL $name: exit $rc in the C locale, or no output: $(head -n 2 "$T/c/$name.err")"
		fail=$((fail + 1)); return
	fi
	# A decimal number must appear, or the comparison proves nothing.
	if ! grep -qE '[0-9]\.[0-9]' "$T/c/$name.out"; then
		echo "FAIL $name: no decimal number in the output"
		fail=$((fail + 1)); return
	fi
	for mode in de pre; do
		if ! cmp -s "$T/c/$name.out" "$T/$mode/$name.out" || ! cmp -s "$T/c/$name.rc" "$T/$mode/$name.rc" ||
		   ! cmp -s "$T/c/$name.err" "$T/$mode/$name.err"; then
			echo "FAIL $name: output differs under de_DE.UTF-8 ($mode):"
			diff "$T/c/$name.out" "$T/$mode/$name.out" | head -n 6 | sed 's/^/    /'
			diff "$T/c/$name.err" "$T/$mode/$name.err" | head -n 4 | sed 's/^/    /'
			fail=$((fail + 1)); return
		fi
		if [ -f "$T/c/$name.svg" ] && ! cmp -s "$T/c/$name.svg" "$T/$mode/$name.svg"; then
			echo "FAIL $name: SVG differs under de_DE.UTF-8 ($mode):"
			diff "$T/c/$name.svg" "$T/$mode/$name.svg" | head -n 6 | sed 's/^/    /'
			fail=$((fail + 1)); return
		fi
	done
}

# Made-up demo structures of the fictional Larkspur lab: an unsaturated ester,
# an aryl ketone with an amide.
compare predict-text predict 'CCOC(=O)/C=C/c1ccc(OC)cc1'
compare predict-json predict --json 'CC(=O)c1ccc(NC(=O)C)cc1'

# Spectra: the corpus's small valid files (DIF/DUP and SQZ), the examples,
# and the shared measured spectra when present (CSV and JCAMP-DX with
# decimals in their headers).
spectra=(tests/data/bad/ok-dup.jdx tests/data/bad/ok-sqz.jdx)
while IFS= read -r f; do spectra+=("$f"); done < <(find examples -maxdepth 2 \( -name '*.jdx' -o -name '*.csv' \) 2>/dev/null | grep -vi manifest | sort | head -n 3)
REF=${IRRECON_REFDIR:-../shared/ir-reference}
for f in indene-difdup.jdx heptanes-atr.csv polystyrene-film.jdx; do
	[ -f "$REF/$f" ] && spectra+=("$REF/$f")
done
i=0
for f in "${spectra[@]}"; do
	i=$((i + 1))
	compare "peaks-$i-text" peaks "$f"
	compare "peaks-$i-json" peaks --json "$f"
done
compare check-json check --structure 'CCOC(=O)/C=C/c1ccccc1' --spectrum tests/data/bad/ok-dup.jdx --json --svg @SVG@
compare check-text check --structure 'CCOC(=O)/C=C/c1ccccc1' --spectrum "${spectra[-1]}" --solvent 'ethyl acetate'
if [ -f "$REF/acetophenone.jdx" ]; then
	compare check-ref check --structure 'CC(=O)c1ccccc1' --spectrum "$REF/acetophenone.jdx" --json --svg @SVG@
fi

echo "locale: $((n - fail)) of $n outputs identical under de_DE.UTF-8 (with and without setlocale)"
[ $fail -eq 0 ]
