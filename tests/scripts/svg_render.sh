#!/usr/bin/env bash
# svg_render.sh: the SVG plot of `irrecon check --svg` (src/report_svg.c).
# For several inputs (a synthetic absorbance example, a transmittance
# example, a real measured spectrum from ../shared/ir-reference, a peak
# list, hostile and overlong text):
#  - the file is well-formed XML (xmllint --noout, Debian libxml2-utils);
#  - two runs give byte-identical files;
#  - headless Chromium (Debian chromium) renders it to a PNG that is not
#    blank (share of non-white pixels, and ink in the plot area);
#  - in the rendered page every <text> lies inside the viewBox and no two
#    band labels overlap (boxes from getBoundingClientRect, read back with
#    --dump-dom);
#  - the sample id is escaped, not injected (an element in it stays text).
# Skips (77) when chromium or xmllint is missing; the measured-spectrum case
# is left out (with a message) when the reference folder is absent.
set -u
cd "$(dirname "$0")/../.."
BUILD=${BUILD:-build}
IRRECON=$BUILD/irrecon
REF=${IRRECON_REFDIR:-../shared/ir-reference}
command -v xmllint >/dev/null 2>&1 || { echo "skipped: xmllint (libxml2-utils) is not installed"; exit 77; }
CHROME=$(command -v chromium || command -v chromium-browser || true)
[ -n "$CHROME" ] || { echo "skipped: chromium is not installed"; exit 77; }
T=$(mktemp -d)   # absolute: chromium is given file:// URLs
trap 'rm -rf "$T"' EXIT
fail=0
bad() { echo "FAIL: $*"; fail=$((fail+1)); }

chrome() { # extra chromium arguments...
	local prof; prof=$(mktemp -d)
	timeout 90 "$CHROME" --headless --no-sandbox --disable-gpu --disable-quic --no-first-run \
		--disable-background-networking --disable-component-update --disable-sync \
		--user-data-dir="$prof" "$@" 2>/dev/null
	local rc=$?
	rm -rf "$prof"
	return $rc
}

# Preflight: a browser that cannot render a trivial SVG here (no display
# stack, sandbox refused) is an environment problem, not a plot defect.
printf '<svg xmlns="http://www.w3.org/2000/svg" width="40" height="30"><rect width="40" height="30" fill="#000"/></svg>\n' > "$T/pre.svg"
if ! chrome --screenshot="$T/pre.png" --window-size=40,30 "file://$T/pre.svg" >/dev/null || [ ! -s "$T/pre.png" ]; then
	echo "skipped: headless chromium cannot render in this environment"
	exit 77
fi

cases=()
mk() { # name, check arguments... (exit 0 or 1 both fine: any verdict plots)
	local name=$1; shift
	"$IRRECON" check "$@" --svg "$T/$name.svg" >/dev/null 2>"$T/$name.err"
	local rc=$?
	if [ $rc -ge 2 ] || [ ! -s "$T/$name.svg" ]; then
		bad "$name: check exited $rc: $(head -n 1 "$T/$name.err")"; return
	fi
	"$IRRECON" check "$@" --svg "$T/$name.again.svg" >/dev/null 2>&1
	cmp -s "$T/$name.svg" "$T/$name.again.svg" || bad "$name: two runs differ"
	cases+=("$name")
}

E=examples
mk oxidation --structure-file $E/oxidation-leftover-alcohol/product.smi \
	--starting-material 'CC(C)(C)C1CCC(O)CC1' --spectrum $E/oxidation-leftover-alcohol/LPC-2231-04.jdx --sample LPC-2231-04
mk wrong_structure --structure-file $E/ester-wrong-structure/registered.smi \
	--spectrum $E/ester-wrong-structure/LPC-3305-11.csv --sample LPC-3305-11
mk transmittance --structure-file $E/amide-coupling/product.smi --sampling transmission \
	--spectrum $E/amide-coupling/LPC-5512-01.jdx --sample LPC-5512-01
# Hostile and overlong text: markup, a byte that is not UTF-8 and a control
# character in the sample id, a 40-atom SMILES.
mk hostile --structure 'CCCCCCCCCCCCCCCCC(=O)OCC(COC(=O)CCCCCCC)OC(=O)c1ccc(cc1)C#N' \
	--spectrum $E/residual-ethyl-acetate/LPC-4470-02.jdx \
	--sample '<script>alert(1)</script> & "LPC" '\''x'\'' — µ-batch'$'\xff\x01''with a very long name that goes on and on and on'
printf 'position,intensity\n3062,weak\n2925,medium\n1686,strong\n1599,medium\n1450,medium\n1360,strong\n1266,strong\n761,strong\n691,strong\n' > "$T/peaks.csv"
mk peaklist --structure 'CC(=O)c1ccccc1' --peaks "$T/peaks.csv" --sample peak-list
# A narrow range (only the double-bond region measured), written by synth.
"$IRRECON" synth --structure 'CC(=O)c1ccccc1' --range 1550:1850 --spacing 0.5 -o "$T/narrow.jdx" \
	|| bad "synth for the narrow case"
mk narrow --structure 'CC(=O)c1ccccc1' --spectrum "$T/narrow.jdx" --sample narrow-range
if [ -f "$REF/acetophenone.jdx" ]; then
	mk measured --structure 'CC(=O)c1ccccc1' --spectrum "$REF/acetophenone.jdx" --sample acetophenone
else
	echo "note: $REF/acetophenone.jdx not found; measured-spectrum case left out"
fi

for c in "${cases[@]}"; do
	xmllint --noout "$T/$c.svg" 2>"$T/$c.xml.err" || bad "$c: not well-formed XML: $(head -n 2 "$T/$c.xml.err")"
	W=$(sed -n 's/.*<svg [^>]*width="\([0-9]*\)".*/\1/p' "$T/$c.svg" | head -n 1)
	H=$(sed -n 's/.*<svg [^>]*height="\([0-9]*\)".*/\1/p' "$T/$c.svg" | head -n 1)
	[ -n "$W" ] && [ -n "$H" ] || { bad "$c: no width/height on <svg>"; continue; }
	chrome --screenshot="$T/$c.png" --window-size="$W,$H" "file://$T/$c.svg" >/dev/null \
		|| bad "$c: chromium could not render"
	[ -s "$T/$c.png" ] || { bad "$c: no PNG"; continue; }
	/usr/bin/python3 - "$T/$c.png" "$c" <<'PY' || bad "$c: rendered PNG looks blank"
import sys
from PIL import Image
img = Image.open(sys.argv[1]).convert("L")
w, h = img.size
px = img.load()
ink = sum(1 for y in range(0, h, 2) for x in range(0, w, 2) if px[x, y] < 200)
share = ink / ((w // 2) * (h // 2))
# The plot area (middle of the canvas) must carry ink too: the spectrum.
mid = sum(1 for y in range(h // 4, 3 * h // 4, 2) for x in range(w // 8, 7 * w // 8, 2) if px[x, y] < 160)
print("%s: %dx%d, %.1f %% ink, %d dark pixels in the plot" % (sys.argv[2], w, h, 100 * share, mid))
sys.exit(0 if 0.01 < share < 0.6 and mid > 300 else 1)
PY
	# Text extents as the browser lays them out.
	{
		printf '<!doctype html><html><head><meta charset="utf-8"></head><body style="margin:0">\n'
		sed '1{/^<?xml/d}' "$T/$c.svg"
		cat <<'JS'
<pre id="irr-result"></pre>
<script>
const svg = document.querySelector('svg');
const vb = svg.viewBox.baseVal, r0 = svg.getBoundingClientRect();
const out = [];
let n = 0;
const boxes = [];
for (const t of svg.querySelectorAll('text')) {
  const r = t.getBoundingClientRect();
  const b = [r.left - r0.left, r.top - r0.top, r.right - r0.left, r.bottom - r0.top];
  n++;
  if (!(r.width > 0)) continue;
  if (b[0] < -0.5 || b[1] < -0.5 || b[2] > vb.width + 0.5 || b[3] > vb.height + 0.5)
    out.push('OUTSIDE ' + JSON.stringify(t.textContent) + ' ' + b.map((v) => v.toFixed(1)).join(','));
  if (t.classList.contains('irr-label')) boxes.push([b, t.textContent]);
}
for (let i = 0; i < boxes.length; i++)
  for (let j = i + 1; j < boxes.length; j++) {
    const [a, ta] = boxes[i], [c, tc] = boxes[j];
    if (a[0] < c[2] - 0.5 && c[0] < a[2] - 0.5 && a[1] < c[3] - 0.5 && c[1] < a[3] - 0.5)
      out.push('OVERLAP ' + JSON.stringify(ta) + ' ' + JSON.stringify(tc));
  }
out.push('TEXTS ' + n + ' LABELS ' + boxes.length + ' SCRIPTS ' + svg.querySelectorAll('script').length);
document.getElementById('irr-result').textContent = out.join('\n');
</script></body></html>
JS
	} > "$T/$c.html"
	chrome --dump-dom --window-size="$((W + 40)),$((H + 40))" "file://$T/$c.html" > "$T/$c.dom" \
		|| bad "$c: chromium could not load the page"
	res=$(/usr/bin/python3 -c 'import re, sys, html
m = re.search(r"<pre id=\"irr-result\">(.*?)</pre>", open(sys.argv[1], encoding="utf-8").read(), re.S)
print(html.unescape(m.group(1)) if m else "")' "$T/$c.dom")
	summary=$(printf '%s\n' "$res" | grep -o 'TEXTS [0-9]* LABELS [0-9]* SCRIPTS [0-9]*')
	[ -n "$summary" ] || { bad "$c: no layout result from chromium"; continue; }
	echo "$c: $summary"
	problems=$(printf '%s\n' "$res" | grep -E 'OUTSIDE|OVERLAP')
	[ -z "$problems" ] || bad "$c: $problems"
	case "$summary" in *"SCRIPTS 0") ;; *) bad "$c: a <script> element got into the SVG" ;; esac
	case "$summary" in "TEXTS "[0-9]" "*) bad "$c: too few texts: $summary" ;; esac
done
# Readable in grey print: the four window statuses differ in pattern
# geometry and outline dash, the three peak statuses in marker shape, not
# only in colour (checked on the legend of the first plot).
if [ -f "$T/oxidation.svg" ]; then
	/usr/bin/python3 - "$T/oxidation.svg" <<'PY' || bad "statuses are told apart by colour only"
import sys, xml.etree.ElementTree as ET
ns = {"s": "http://www.w3.org/2000/svg"}
root = ET.parse(sys.argv[1]).getroot()
pats = {p.get("id"): p for p in root.iter("{http://www.w3.org/2000/svg}pattern")}
names = ["irr-pat-found", "irr-pat-saturated", "irr-pat-missing", "irr-pat-unobservable"]
def shape(p):
    # Geometry only: element kinds, path data, transform; colours ignored.
    return (p.get("patternTransform"), tuple((c.tag, c.get("d"), c.get("r")) for c in p))
geo = [shape(pats[n]) for n in names if n in pats]
dashes = set()
for r in root.iter("{http://www.w3.org/2000/svg}rect"):
    f = r.get("fill", "")
    if f.startswith("url(#irr-pat-") and r.get("stroke"):  # outlined: lanes, legend
        dashes.add((f, r.get("stroke-dasharray")))
by_status = {}
for f, d in dashes:
    by_status.setdefault(f, set()).add(d)
ok = len(geo) == 4 and len(set(geo)) == 4
ok = ok and len({next(iter(v)) for v in by_status.values()}) == len(by_status) >= 4
texts = [t.text for t in root.iter("{http://www.w3.org/2000/svg}text")]
for w in ["found", "saturated", "missing", "unobservable", "explained", "attributed", "unexplained"]:
    ok = ok and w in texts
print("pattern geometries %d distinct, outline dashes %s" % (len(set(geo)), sorted(str(v) for v in by_status.values())))
sys.exit(0 if ok else 1)
PY
fi
# The hostile sample id is there as text.
if [ -f "$T/hostile.svg" ]; then
	grep -q '&lt;script&gt;alert(1)&lt;/script&gt; &amp;' "$T/hostile.svg" || bad "hostile: sample id not escaped as expected"
fi
[ ${#cases[@]} -ge 5 ] || bad "only ${#cases[@]} cases rendered"
[ "$fail" -eq 0 ]
