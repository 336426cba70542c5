import zlib from 'node:zlib';

/** One part of a hand-built ZIP: its name, its deflated bytes, and what the archive claims about it. */
export interface ZipPart {
  name: string;
  deflated: Buffer;
  crc32: number;
  /** The uncompressed size written into the archive (a bomb may lie about it). */
  declaredSize: number;
}

export function part(name: string, content: Buffer | string): ZipPart {
  const bytes = Buffer.isBuffer(content) ? content : Buffer.from(content, 'utf8');
  return { name, deflated: zlib.deflateRawSync(bytes), crc32: zlib.crc32(bytes), declaredSize: bytes.length };
}

/**
 * A part holding `repeat` copies of `unit` followed by `tail`, deflated as a stream so the test never
 * holds the whole uncompressed text in memory (hundreds of megabytes become a few hundred kilobytes).
 */
export async function repeatedPart(name: string, head: string, unit: string, repeat: number, tail: string) {
  const deflate = zlib.createDeflateRaw({ level: 9 });
  const chunks: Buffer[] = [];
  deflate.on('data', (chunk: Buffer) => chunks.push(chunk));
  const done = new Promise<void>((resolve, reject) => {
    deflate.on('end', resolve);
    deflate.on('error', reject);
  });
  const block = Buffer.from(unit.repeat(Math.max(1, Math.floor((1 << 20) / unit.length))), 'utf8');
  const perBlock = Math.max(1, Math.floor((1 << 20) / unit.length));
  let crc = zlib.crc32(head);
  let size = Buffer.byteLength(head);
  deflate.write(head);
  let left = repeat;
  while (left > 0) {
    const n = Math.min(left, perBlock);
    const piece = n === perBlock ? block : Buffer.from(unit.repeat(n), 'utf8');
    crc = zlib.crc32(piece, crc);
    size += piece.length;
    if (!deflate.write(piece)) await new Promise((resolve) => deflate.once('drain', resolve));
    left -= n;
  }
  crc = zlib.crc32(tail, crc);
  size += Buffer.byteLength(tail);
  deflate.end(tail);
  await done;
  return { name, deflated: Buffer.concat(chunks), crc32: crc, declaredSize: size };
}

/** A plain ZIP (deflate, no ZIP64) of the parts, in the layout every spreadsheet program writes. */
export function zipOf(parts: ZipPart[]): Buffer {
  const locals: Buffer[] = [];
  const centrals: Buffer[] = [];
  let offset = 0;
  for (const p of parts) {
    const name = Buffer.from(p.name, 'utf8');
    const local = Buffer.alloc(30);
    local.writeUInt32LE(0x04034b50, 0);
    local.writeUInt16LE(20, 4);
    local.writeUInt16LE(0x0800, 6); // UTF-8 names
    local.writeUInt16LE(8, 8);
    local.writeUInt32LE(p.crc32 >>> 0, 14);
    local.writeUInt32LE(p.deflated.length, 18);
    local.writeUInt32LE(p.declaredSize, 22);
    local.writeUInt16LE(name.length, 26);
    const central = Buffer.alloc(46);
    central.writeUInt32LE(0x02014b50, 0);
    central.writeUInt16LE(20, 4);
    central.writeUInt16LE(20, 6);
    central.writeUInt16LE(0x0800, 8);
    central.writeUInt16LE(8, 10);
    central.writeUInt32LE(p.crc32 >>> 0, 16);
    central.writeUInt32LE(p.deflated.length, 20);
    central.writeUInt32LE(p.declaredSize, 24);
    central.writeUInt16LE(name.length, 28);
    central.writeUInt32LE(offset, 42);
    locals.push(local, name, p.deflated);
    centrals.push(central, name);
    offset += local.length + name.length + p.deflated.length;
  }
  const directory = Buffer.concat(centrals);
  const end = Buffer.alloc(22);
  end.writeUInt32LE(0x06054b50, 0);
  end.writeUInt16LE(parts.length, 8);
  end.writeUInt16LE(parts.length, 10);
  end.writeUInt32LE(directory.length, 12);
  end.writeUInt32LE(offset, 16);
  return Buffer.concat([...locals, directory, end]);
}

/** The parts every XLSX workbook needs around its one worksheet (Office Open XML, ECMA-376 part 1). */
export function workbookSkeleton(): ZipPart[] {
  return [
    part(
      '[Content_Types].xml',
      '<?xml version="1.0" encoding="UTF-8"?><Types xmlns="http://schemas.openxmlformats.org/package/2006/content-types">' +
        '<Default Extension="rels" ContentType="application/vnd.openxmlformats-package.relationships+xml"/>' +
        '<Default Extension="xml" ContentType="application/xml"/>' +
        '<Override PartName="/xl/workbook.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.sheet.main+xml"/>' +
        '<Override PartName="/xl/worksheets/sheet1.xml" ContentType="application/vnd.openxmlformats-officedocument.spreadsheetml.worksheet+xml"/>' +
        '</Types>',
    ),
    part(
      '_rels/.rels',
      '<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">' +
        '<Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/officeDocument" Target="xl/workbook.xml"/>' +
        '</Relationships>',
    ),
    part(
      'xl/workbook.xml',
      '<?xml version="1.0" encoding="UTF-8"?><workbook xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main" xmlns:r="http://schemas.openxmlformats.org/officeDocument/2006/relationships">' +
        '<sheets><sheet name="manifest" sheetId="1" r:id="rId1"/></sheets></workbook>',
    ),
    part(
      'xl/_rels/workbook.xml.rels',
      '<?xml version="1.0" encoding="UTF-8"?><Relationships xmlns="http://schemas.openxmlformats.org/package/2006/relationships">' +
        '<Relationship Id="rId1" Type="http://schemas.openxmlformats.org/officeDocument/2006/relationships/worksheet" Target="worksheets/sheet1.xml"/>' +
        '</Relationships>',
    ),
  ];
}

export const SHEET_HEAD =
  '<?xml version="1.0" encoding="UTF-8"?><worksheet xmlns="http://schemas.openxmlformats.org/spreadsheetml/2006/main"><sheetData>';
export const SHEET_TAIL = '</sheetData></worksheet>';
