#!/usr/bin/env bash
# synth_jcamp_external.sh: JCAMP-DX written by `irrecon synth` (DIF/DUP and
# AFFN, absorbance and transmittance) is decoded by an independent reader,
# the npm package jcampconverter (cheminfo), and must give the same points
# as the CSV that the same command and seed write: X to 1e-6 cm-1, Y to the
# printed precision (6 decimals; both files round the same doubles). The
# files must also keep the rules of JCAMP-DX 4.24 (McDonald & Wilks, Appl.
# Spectrosc. 42 (1988) 151): ##TITLE first, ##END= last, the required labels,
# ##NPOINTS equal to the points decoded, no line over 80 characters.
# Skips (77) when node, npm or the registry is not available.
set -u
cd "$(dirname "$0")/../.."
BUILD=${BUILD:-build}
IRRECON=$BUILD/irrecon
if ! command -v node >/dev/null 2>&1; then
	echo "skipped: Node.js (node) is not installed"
	exit 77
fi
NPM_DIR=$BUILD/npm
if [ ! -f "$NPM_DIR/node_modules/jcampconverter/package.json" ]; then
	if ! command -v npm >/dev/null 2>&1; then
		echo "skipped: npm is not installed, cannot fetch jcampconverter"
		exit 77
	fi
	mkdir -p "$NPM_DIR"
	if ! timeout 180 npm install --prefix "$NPM_DIR" --no-audit --no-fund jcampconverter >"$NPM_DIR/install.log" 2>&1; then
		echo "skipped: npm could not install jcampconverter (registry unreachable?); see $NPM_DIR/install.log"
		exit 77
	fi
fi
T=$(mktemp -d)
trap 'rm -rf "$T"' EXIT
fail=0
run() { # name, synth options...
	local name=$1; shift
	local fmt=jcamp
	case " $* " in *" --format jcamp-affn "*) fmt=jcamp-affn ;; esac
	"$IRRECON" synth "$@" -o "$T/$name.jdx" || { echo "FAIL $name: synth (jdx)"; fail=$((fail+1)); return; }
	# Same spectrum as CSV (drop the --format option).
	local args=() skip=0
	for a in "$@"; do
		if [ $skip = 1 ]; then skip=0; continue; fi
		if [ "$a" = --format ]; then skip=1; continue; fi
		args+=("$a")
	done
	"$IRRECON" synth "${args[@]}" -o "$T/$name.csv" || { echo "FAIL $name: synth (csv)"; fail=$((fail+1)); return; }
	if ! awk 'length($0) > 80 { print "line " NR " has " length($0) " characters"; bad=1 } END { exit bad }' "$T/$name.jdx"; then
		echo "FAIL $name: line longer than 80 characters"; fail=$((fail+1))
	fi
	if ! node --input-type=module - "$NPM_DIR" "$T/$name.jdx" "$T/$name.csv" "$name" <<'JS'
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { pathToFileURL } from 'node:url';
import path from 'node:path';
const [moduleDir, jdx, csv, name] = process.argv.slice(2);
const req = createRequire(path.join(path.resolve(moduleDir), 'package.json'));
const { convert } = await import(pathToFileURL(req.resolve('jcampconverter')).href);
const text = readFileSync(jdx, 'latin1');
const bad = [];
const lines = text.split('\n').filter((l) => l.length);
if (!lines[0].startsWith('##TITLE=')) bad.push('first label is not ##TITLE');
if (lines[lines.length - 1] !== '##END=') bad.push('last label is not ##END=');
for (const lab of ['##JCAMP-DX=4.24', '##DATA TYPE=INFRARED SPECTRUM', '##ORIGIN=', '##OWNER=',
  '##XUNITS=1/CM', '##YUNITS=', '##XFACTOR=', '##YFACTOR=', '##FIRSTX=', '##LASTX=',
  '##NPOINTS=', '##FIRSTY=', '##XYDATA=(X++(Y..Y))'])
  if (!lines.some((l) => l.startsWith(lab))) bad.push('no ' + lab);
const npoints = Number((text.match(/##NPOINTS=(\d+)/) || [])[1]);
const res = convert(text, { removeComments: true });
const sp = res.flatten.flatMap((b) => b.spectra).filter((s) => s.data && s.data.x)[0];
const rows = readFileSync(csv, 'utf8').trim().split('\n');
const units = rows.shift().split(',')[1];
const pts = rows.map((r) => r.split(',').map(Number));
if (!sp) bad.push('jcampconverter decoded nothing');
else {
  const { x, y } = sp.data;
  if (x.length !== npoints) bad.push(`decoded ${x.length} points, ##NPOINTS=${npoints}`);
  if (x.length !== pts.length) bad.push(`decoded ${x.length} points, CSV has ${pts.length}`);
  const yu = (text.match(/##YUNITS=(.*)/) || [])[1];
  if (yu.toLowerCase() !== units) bad.push(`##YUNITS=${yu} but CSV ${units}`);
  let worst = 0, worstx = 0;
  for (let i = 0; i < Math.min(x.length, pts.length); i++) {
    worstx = Math.max(worstx, Math.abs(x[i] - pts[i][0]));
    worst = Math.max(worst, Math.abs(y[i] - pts[i][1]));
  }
  if (worstx > 1e-6) bad.push(`X differs by ${worstx}`);
  if (worst > 1.0000001e-6) bad.push(`Y differs by ${worst}`);
  console.log(`${name}: ${x.length} points, max |dY| ${worst.toExponential(2)}`);
}
for (const b of bad) console.log(`FAIL ${name}: ${b}`);
process.exit(bad.length ? 1 : 0);
JS
	then fail=$((fail+1)); fi
}
run difdup_abs   --structure 'CC(=O)Oc1ccccc1C(=O)O' --noise 0.003 --co2 0.02 --seed 11
run affn_abs     --structure 'CCN(CC)CC' --format jcamp-affn --baseline 0.05:-0.02 --seed 12
run difdup_trans --structure 'N#Cc1ccccc1' --units transmittance --noise 0.002 --seed 13 --range 450:3800 --spacing 0.964
run difdup_mix   --structure 'OCCCCO' --component 'CC(C)=O:0.3' --max-absorbance 2.5 --spacing 2
[ "$fail" -eq 0 ]
