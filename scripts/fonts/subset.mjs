// Writes Latin subsets of the Source Sans 3 weights the app uses, as WOFF2, into
// assets/fonts/. The source is the TTF shipped by @expo-google-fonts/source-sans-3, so the
// output follows the installed package version. Runs offline; run by postinstall and before
// a web export (`npm run fonts:subset`). The full TTFs stay in use where a whole font file is
// needed (the lead chart's axis labels through Skia).
import fs from 'node:fs';
import path from 'node:path';
import { createRequire } from 'node:module';
import { fileURLToPath } from 'node:url';
import subsetFont from 'subset-font';

const require = createRequire(import.meta.url);
const ROOT = path.join(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
const OUT = path.join(ROOT, 'assets', 'fonts');
const WEIGHTS = ['400Regular', '600SemiBold', '700Bold'];

/** Code point ranges kept: Basic Latin, Latin-1, Latin Extended-A, and the punctuation,
 * arrows and signs the screens print (dashes, quotes, ellipsis, ±, ×, °, ≤, ≥, ≈, →, •). */
const RANGES = [
  [0x0020, 0x007e],
  [0x00a0, 0x017f],
  [0x02c6, 0x02c6],
  [0x02da, 0x02dc],
  [0x2000, 0x206f],
  [0x20ac, 0x20ac],
  [0x2122, 0x2122],
  [0x2190, 0x2199],
  [0x2212, 0x2212],
  [0x2248, 0x2248],
  [0x2260, 0x2265],
  [0x25b2, 0x25bc],
];

function text() {
  let out = '';
  for (const [from, to] of RANGES) for (let c = from; c <= to; c++) out += String.fromCodePoint(c);
  return out;
}

fs.mkdirSync(OUT, { recursive: true });
for (const weight of WEIGHTS) {
  const name = `SourceSans3_${weight}`;
  const source = require.resolve(`@expo-google-fonts/source-sans-3/${weight}/${name}.ttf`);
  const subset = await subsetFont(fs.readFileSync(source), text(), { targetFormat: 'woff2' });
  const target = path.join(OUT, `${name}.latin.woff2`);
  if (!fs.existsSync(target) || !fs.readFileSync(target).equals(subset)) fs.writeFileSync(target, subset);
  console.log(`${path.relative(ROOT, target)}: ${subset.length} bytes (from ${fs.statSync(source).size})`);
}
