// The demo instrument: drops the invented demo exports of samples/demo/exports into the drop folder one
// by one (written under a temporary name, then renamed, as real instruments do), about a minute and a half
// in all: the 25 °C cuvette run in three parts, the water plate, and the scanning run SP-7 (JCAMP-DX).
// Usage: node scripts/demo-instrument.mjs --drop data/drop [--marker data/.demo-instrument-done] [--gap-ms 15000]
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseArgs } from 'node:util';

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const { values } = parseArgs({
  options: {
    drop: { type: 'string', default: path.join(root, 'data', 'drop') },
    marker: { type: 'string' },
    'gap-ms': { type: 'string', default: '15000' },
  },
});
const exportsDir = path.join(root, 'samples', 'demo', 'exports');
const gapMs = Number(values['gap-ms']);
const plan = [
  ['cuvette-1', 'CX-25-part1.csv'],
  ['plate-reader-1', 'FE-101.csv'],
  ['scanner-1', 'SP-7-part1.jdx'],
  ['cuvette-1', 'CX-25-part2.csv'],
  ['scanner-1', 'SP-7-part2.jdx'],
  ['cuvette-1', 'CX-25-part3.csv'],
];

await new Promise((r) => setTimeout(r, Math.min(gapMs, 10_000)));
for (const [i, [folder, file]] of plan.entries()) {
  const targetDir = path.join(values.drop, folder);
  fs.mkdirSync(targetDir, { recursive: true });
  const temp = path.join(targetDir, `.${file}.tmp`);
  fs.copyFileSync(path.join(exportsDir, folder, file), temp);
  fs.renameSync(temp, path.join(targetDir, file));
  console.log(`[demo instrument] dropped ${folder}/${file} (${i + 1}/${plan.length}, invented demo data)`);
  if (i < plan.length - 1) await new Promise((r) => setTimeout(r, gapMs));
}
if (values.marker) fs.writeFileSync(values.marker, `${new Date().toISOString()}\n`);
