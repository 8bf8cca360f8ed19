// jcamp_crosscheck.mjs: compares irrecon's decoding of a JCAMP-DX file with
// the independent reader of the npm package jcampconverter (cheminfo).
// Usage: node jcamp_crosscheck.mjs MODULE_DIR FILE.jdx DUMP.txt [DIVERGES_AT]
//   MODULE_DIR   folder holding node_modules/jcampconverter
//   DUMP.txt     irrecon's decoding: one "x y" pair per line, file order
//   DIVERGES_AT  1-based point from which a known jcampconverter defect
//                makes its Y wrong (see jcamp_crosscheck.sh); points before
//                it must agree, points from it on are reported only
// Exit 0 when every X and Y compared agree to 1e-9 relative, 1 otherwise.
// Header values are read with comments removed ("$$ ..." ends a value in
// JCAMP-DX 4.24), which is how the standard defines them.
import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { pathToFileURL } from 'node:url';
import path from 'node:path';

const [moduleDir, file, dump, divergesArg] = process.argv.slice(2);
const divergesAt = divergesArg ? Number(divergesArg) : Infinity;
const req = createRequire(path.join(path.resolve(moduleDir), 'package.json'));
const { convert } = await import(pathToFileURL(req.resolve('jcampconverter')).href);

const result = convert(readFileSync(file, 'latin1'), { removeComments: true });
const spectra = result.flatten.flatMap((b) => b.spectra).filter((s) => s.data && s.data.x);
if (spectra.length === 0) {
  console.log(`${file}: jcampconverter found no data`);
  process.exit(1);
}
const ref = spectra[0].data;
const ours = readFileSync(dump, 'utf8').trim().split('\n').map((l) => l.split(/\s+/).map(Number));

if (ours.length !== ref.x.length) {
  console.log(`${file}: irrecon ${ours.length} points, jcampconverter ${ref.x.length}`);
  process.exit(1);
}
// Relative to the larger magnitude; values at (or crossing) zero are
// compared against the scale of their series.
const scale = (a) => a.reduce((m, v) => Math.max(m, Math.abs(v)), 0);
const sx = scale(ref.x), sy = scale(ref.y);
let worst = { dx: 0, dy: 0 }, bad = 0, beyond = 0;
for (let i = 0; i < ours.length; i++) {
  const [x, y] = ours[i];
  const rx = Math.abs(x - ref.x[i]) / Math.max(Math.abs(x), Math.abs(ref.x[i]), 1e-3 * sx);
  const ry = Math.abs(y - ref.y[i]) / Math.max(Math.abs(y), Math.abs(ref.y[i]), 1e-3 * sy);
  if (i + 1 >= divergesAt) {
    if (!(rx <= 1e-9 && ry <= 1e-9))
      beyond++;
    continue;
  }
  worst.dx = Math.max(worst.dx, rx);
  worst.dy = Math.max(worst.dy, ry);
  if (!(rx <= 1e-9 && ry <= 1e-9)) {
    if (bad < 3)
      console.log(`${file}: point ${i + 1}: irrecon (${x}, ${y}), jcampconverter (${ref.x[i]}, ${ref.y[i]})`);
    bad++;
  }
}
const compared = Math.min(ours.length, divergesAt - 1);
let note = '';
if (divergesAt !== Infinity)
  note = beyond
    ? `; from point ${divergesAt} on ${beyond} points differ (known jcampconverter defect, not compared)`
    : `; points from ${divergesAt} on now agree too (the known defect is gone: drop the exception)`;
console.log(`${file}: ${compared} points compared, worst relative difference X ${worst.dx.toExponential(2)}, Y ${worst.dy.toExponential(2)}${bad ? `, ${bad} points differ` : ''}${note}`);
process.exit(bad ? 1 : 0);
