// Cuts the Material Symbols Outlined font (4 MB) down to the icons in web/src/app/core/icons/icon-set.json
// and writes web/src/generated/material-symbols-outlined.woff2, which web/src/icon-font.scss loads.
// Templates keep writing icon names (<mat-icon>science</mat-icon>): the font's 'liga' feature turns the
// letters into the icon. The subset keeps the letters, each icon's glyph and those ligatures only
// (no layout closure, which would pull in every icon spelt with the same letters), and pins the
// variation axes to what the app shows (outlined, weight 400, grade 0); optical size stays variable
// because Chromium sets it from the font size.
// Usage: node scripts/build-icon-font.mjs   (run by npm run build:web)
import { Buffer } from 'node:buffer';
import fs from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import * as hb from 'harfbuzzjs';

const require = createRequire(import.meta.url);
const subsetFont = require('subset-font');
const fontverter = require('fontverter');

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');
const ICON_SET = path.join(root, 'web/src/app/core/icons/icon-set.json');
const SOURCE_FONT = require.resolve('material-symbols/material-symbols-outlined.woff2');
const OUTPUT = path.join(root, 'web/src/generated/material-symbols-outlined.woff2');
const AXES = { FILL: 0, wght: 400, GRAD: 0, opsz: { min: 20, max: 48 } };

/** The glyph a name becomes through the font's ligatures, or null when it stays letters. */
function ligatureGlyph(font, name) {
  const buffer = new hb.Buffer();
  buffer.addText(name);
  buffer.guessSegmentProperties();
  hb.shape(font, buffer);
  const glyphs = buffer.getGlyphInfos();
  return glyphs.length === 1 && glyphs[0].codepoint !== 0 ? glyphs[0].codepoint : null;
}

function openFont(ttf) {
  const face = new hb.Face(new hb.Blob(ttf));
  return { face, font: new hb.Font(face) };
}

/** The subset font for the given icon names; throws when a name is not an icon of the font. */
export async function buildIconFont(names) {
  const ttf = await fontverter.convert(fs.readFileSync(SOURCE_FONT), 'truetype');
  const { face, font } = openFont(ttf);
  const unicodeOf = new Map();
  for (const u of face.collectUnicodes()) {
    const gid = font.nominalGlyph(u);
    if (gid !== undefined && !unicodeOf.has(gid)) unicodeOf.set(gid, u);
  }
  const codePoints = [];
  const unknown = [];
  for (const name of names) {
    const gid = ligatureGlyph(font, name);
    if (gid === null || !unicodeOf.has(gid)) unknown.push(name);
    else codePoints.push(unicodeOf.get(gid));
  }
  if (unknown.length) throw new Error(`Not icons of Material Symbols Outlined: ${unknown.join(', ')}`);

  const letters = new Set(names.join(''));
  const text = [...letters].join('') + String.fromCodePoint(...codePoints);
  const woff2 = await subsetFont(Buffer.from(ttf), text, {
    targetFormat: 'woff2',
    noLayoutClosure: true,
    variationAxes: AXES,
  });

  // The cut font must still turn every name into its icon.
  const check = openFont(await fontverter.convert(woff2, 'truetype'));
  const lost = names.filter((name) => ligatureGlyph(check.font, name) === null);
  if (lost.length) throw new Error(`The cut icon font lost the ligatures of: ${lost.join(', ')}`);
  return woff2;
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const names = JSON.parse(fs.readFileSync(ICON_SET, 'utf8'));
  const started = Date.now();
  const woff2 = await buildIconFont(names);
  fs.mkdirSync(path.dirname(OUTPUT), { recursive: true });
  fs.writeFileSync(OUTPUT, woff2);
  console.log(
    `icon font: ${names.length} icons, ${(woff2.length / 1024).toFixed(1)} kB (from ${(fs.statSync(SOURCE_FONT).size / 1024).toFixed(0)} kB) in ${Date.now() - started} ms → ${path.relative(root, OUTPUT)}`,
  );
}
