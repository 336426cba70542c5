import fs from 'node:fs';
import zlib from 'node:zlib';

/**
 * Unpack a WOFF 1.0 font into the plain OpenType/TrueType file it wraps (W3C WOFF File Format 1.0,
 * §4–5): a 44-byte header, a table directory of 20-byte entries, each table zlib-compressed unless
 * its compressed length equals its original length. The PDF writer then embeds the plain font
 * without inflating it again for every report.
 */
export function woffToSfnt(woff: Buffer): Buffer {
  if (woff.readUInt32BE(0) !== 0x774f4646) throw new Error('Not a WOFF font');
  const flavor = woff.readUInt32BE(4);
  const numTables = woff.readUInt16BE(12);
  const tables: { tag: number; checksum: number; data: Buffer }[] = [];
  for (let i = 0; i < numTables; i++) {
    const entry = 44 + i * 20;
    const tag = woff.readUInt32BE(entry);
    const offset = woff.readUInt32BE(entry + 4);
    const compLength = woff.readUInt32BE(entry + 8);
    const origLength = woff.readUInt32BE(entry + 12);
    const checksum = woff.readUInt32BE(entry + 16);
    const raw = woff.subarray(offset, offset + compLength);
    const data = compLength < origLength ? zlib.inflateSync(raw) : Buffer.from(raw);
    if (data.length !== origLength) throw new Error('WOFF table has the wrong length');
    tables.push({ tag, checksum, data });
  }
  tables.sort((a, b) => a.tag - b.tag);
  const pad = (n: number): number => (n + 3) & ~3;
  const headerSize = 12 + 16 * numTables;
  const size = headerSize + tables.reduce((sum, t) => sum + pad(t.data.length), 0);
  const out = Buffer.alloc(size);
  let entrySelector = 0;
  while (2 ** (entrySelector + 1) <= numTables) entrySelector++;
  const searchRange = 2 ** entrySelector * 16;
  out.writeUInt32BE(flavor, 0);
  out.writeUInt16BE(numTables, 4);
  out.writeUInt16BE(searchRange, 6);
  out.writeUInt16BE(entrySelector, 8);
  out.writeUInt16BE(numTables * 16 - searchRange, 10);
  let offset = headerSize;
  tables.forEach((t, i) => {
    const entry = 12 + i * 16;
    out.writeUInt32BE(t.tag, entry);
    out.writeUInt32BE(t.checksum, entry + 4);
    out.writeUInt32BE(offset, entry + 8);
    out.writeUInt32BE(t.data.length, entry + 12);
    t.data.copy(out, offset);
    offset += pad(t.data.length);
  });
  return out;
}

const cache = new Map<string, Buffer>();

/** A shipped WOFF font as a plain font file, unpacked once per process. */
export function loadWoffFont(file: string): Buffer {
  let font = cache.get(file);
  if (!font) {
    font = woffToSfnt(fs.readFileSync(file));
    cache.set(file, font);
  }
  return font;
}
