import { promisify } from 'node:util';
import zlib from 'node:zlib';
import { AppError } from '../common/app-error';
import { ParseError } from '../parsers';

/**
 * What a manifest workbook may hold. A manifest lists one row per position: at most a 384-well plate,
 * or the longest cuvette sequence a layout allows (999), plus one header row. Its columns are the
 * eleven documented ones; the bound leaves room for a lab's own note columns.
 */
export const MANIFEST_MAX_SHEET_ROWS = 1000;
export const MANIFEST_MAX_SHEET_COLUMNS = 64;
/** Every `<c>` element counts, empty or not: each becomes an object in memory when the sheet is read. */
export const MANIFEST_MAX_SHEET_CELLS = MANIFEST_MAX_SHEET_ROWS * MANIFEST_MAX_SHEET_COLUMNS;
/**
 * All parts of the workbook together, uncompressed. A full 384-well manifest with styles is about
 * 100 kB; ten megabytes leaves a hundredfold margin and still keeps the reader's memory small.
 */
export const MANIFEST_MAX_UNCOMPRESSED_BYTES = 10 * 1024 * 1024;
/** A workbook has a dozen parts; thousands of them are not a manifest. */
export const MANIFEST_MAX_ZIP_ENTRIES = 500;

const inflateRaw = promisify(zlib.inflateRaw);
const MB = (bytes: number): string => `${(bytes / 1024 / 1024).toFixed(0)} MB`;

interface ZipEntry {
  name: string;
  method: number;
  compressedSize: number;
  declaredSize: number;
  localHeaderOffset: number;
}

function notAWorkbook(file: string, why: string): ParseError {
  return new ParseError({ file, detail: `the file is not a readable XLSX workbook (${why})` });
}

function tooLarge(file: string, detail: string): AppError {
  return new AppError(
    'manifest_too_large',
    413,
    `${file}: ${detail}; a manifest workbook may expand to at most ${MB(MANIFEST_MAX_UNCOMPRESSED_BYTES)} in total.`,
  );
}

/** The central directory of a ZIP file (ZIP64 is refused: no manifest needs it). */
function readCentralDirectory(zip: Buffer, file: string): ZipEntry[] {
  const EOCD = 0x06054b50;
  const searchFrom = Math.max(0, zip.length - 22 - 0xffff);
  let eocd = -1;
  for (let i = zip.length - 22; i >= searchFrom; i--) {
    if (zip.readUInt32LE(i) === EOCD) {
      eocd = i;
      break;
    }
  }
  if (eocd < 0) throw notAWorkbook(file, 'no ZIP directory');
  const count = zip.readUInt16LE(eocd + 10);
  const size = zip.readUInt32LE(eocd + 12);
  const offset = zip.readUInt32LE(eocd + 16);
  if (count === 0xffff || size === 0xffffffff || offset === 0xffffffff)
    throw notAWorkbook(file, 'a ZIP64 archive');
  if (count > MANIFEST_MAX_ZIP_ENTRIES)
    throw tooLarge(file, `the workbook has ${count} parts, more than ${MANIFEST_MAX_ZIP_ENTRIES}`);
  if (offset + size > eocd) throw notAWorkbook(file, 'the ZIP directory points outside the file');
  const entries: ZipEntry[] = [];
  let at = offset;
  for (let n = 0; n < count; n++) {
    if (at + 46 > zip.length || zip.readUInt32LE(at) !== 0x02014b50)
      throw notAWorkbook(file, 'a damaged ZIP directory');
    const nameLength = zip.readUInt16LE(at + 28);
    const extraLength = zip.readUInt16LE(at + 30);
    const commentLength = zip.readUInt16LE(at + 32);
    const entry: ZipEntry = {
      method: zip.readUInt16LE(at + 10),
      compressedSize: zip.readUInt32LE(at + 20),
      declaredSize: zip.readUInt32LE(at + 24),
      localHeaderOffset: zip.readUInt32LE(at + 42),
      name: zip.toString('utf8', at + 46, at + 46 + nameLength),
    };
    if (entry.compressedSize === 0xffffffff || entry.declaredSize === 0xffffffff)
      throw notAWorkbook(file, 'a ZIP64 archive');
    entries.push(entry);
    at += 46 + nameLength + extraLength + commentLength;
  }
  return entries;
}

/** The compressed bytes of one entry, located through its local header. */
function compressedData(zip: Buffer, entry: ZipEntry, file: string): Buffer {
  const at = entry.localHeaderOffset;
  if (at + 30 > zip.length || zip.readUInt32LE(at) !== 0x04034b50)
    throw notAWorkbook(file, `a damaged part ${entry.name}`);
  const start = at + 30 + zip.readUInt16LE(at + 26) + zip.readUInt16LE(at + 28);
  const end = start + entry.compressedSize;
  if (end > zip.length) throw notAWorkbook(file, `the part ${entry.name} is cut short`);
  return zip.subarray(start, end);
}

/**
 * Check a workbook's parts before any spreadsheet reader sees it: the sizes the archive declares, then
 * the sizes they really expand to (inflated with a hard output bound, so a ZIP bomb stops at the limit
 * instead of filling memory). Returns the uncompressed worksheets for the cell scan.
 * Throws a 413 AppError when the size limit is passed, a ParseError when the file is not a workbook.
 */
export async function inspectWorkbookArchive(zip: Buffer, file: string): Promise<Map<string, Buffer>> {
  const entries = readCentralDirectory(zip, file);
  const declared = entries.reduce((sum, e) => sum + e.declaredSize, 0);
  if (declared > MANIFEST_MAX_UNCOMPRESSED_BYTES)
    throw tooLarge(file, `its parts declare ${MB(declared)} uncompressed`);
  const worksheets = new Map<string, Buffer>();
  let actual = 0;
  for (const entry of entries) {
    const data = compressedData(zip, entry, file);
    const budget = MANIFEST_MAX_UNCOMPRESSED_BYTES - actual;
    let content: Buffer;
    if (entry.method === 0) {
      content = data;
    } else if (entry.method === 8) {
      try {
        content = await inflateRaw(data, { maxOutputLength: Math.max(1, budget) });
      } catch (err) {
        if ((err as { code?: string }).code === 'ERR_BUFFER_TOO_LARGE' || err instanceof RangeError)
          throw tooLarge(file, `the part ${entry.name} expands beyond the limit`);
        throw notAWorkbook(file, `the part ${entry.name} does not decompress`);
      }
    } else {
      throw notAWorkbook(file, `the part ${entry.name} uses compression method ${entry.method}`);
    }
    actual += content.length;
    if (actual > MANIFEST_MAX_UNCOMPRESSED_BYTES)
      throw tooLarge(file, `the part ${entry.name} expands beyond the limit`);
    if (/^xl\/worksheets\/[^/]+\.xml$/i.test(entry.name)) worksheets.set(entry.name, content);
  }
  return worksheets;
}

/** Column letters to a 1-based number: A → 1, Z → 26, AA → 27, XFD → 16384. */
export function columnNumber(letters: string): number {
  let n = 0;
  for (const c of letters) n = n * 26 + (c.charCodeAt(0) - 64);
  return n;
}

function columnLetters(n: number): string {
  let s = '';
  for (let m = n; m > 0; m = Math.floor((m - 1) / 26)) s = String.fromCharCode(65 + ((m - 1) % 26)) + s;
  return s;
}

/** The limit a cell at (row, column) passes, as a sentence; undefined when it is within the manifest. */
export function describeCellOutOfRange(row: number, column: number): string | undefined {
  const address = `${columnLetters(column)}${row}`;
  if (row > MANIFEST_MAX_SHEET_ROWS)
    return `cell ${address} is past row ${MANIFEST_MAX_SHEET_ROWS}, the last row a manifest may use (a header and at most ${MANIFEST_MAX_SHEET_ROWS - 1} positions)`;
  if (column > MANIFEST_MAX_SHEET_COLUMNS)
    return `cell ${address} is past column ${columnLetters(MANIFEST_MAX_SHEET_COLUMNS)} (${MANIFEST_MAX_SHEET_COLUMNS}), the last column a manifest may use`;
  return undefined;
}

const CELL_TAG = /<c\b([^>]*?)(\/?)>/g;
const CELL_REF = /\br="([A-Z]{1,3})([0-9]{1,7})"/;

/**
 * Scan the raw worksheet XML before it is read into objects: a cell holding something outside the
 * rows and columns a manifest can use, or more cell elements than a full manifest has, is refused here.
 * Empty styled cells (`<c r="XFD1" s="1"/>`) outside the range are formatting, not data, and pass.
 */
export function scanWorksheetCells(worksheets: Map<string, Buffer>, file: string): void {
  for (const [name, xml] of worksheets) {
    const text = xml.toString('utf8');
    let cells = 0;
    for (const match of text.matchAll(CELL_TAG)) {
      cells++;
      if (cells > MANIFEST_MAX_SHEET_CELLS)
        throw new ParseError({
          file,
          detail: `the sheet ${name} has more than ${MANIFEST_MAX_SHEET_CELLS} cells (${MANIFEST_MAX_SHEET_ROWS} rows × ${MANIFEST_MAX_SHEET_COLUMNS} columns), more than a manifest can hold`,
        });
      const ref = CELL_REF.exec(match[1] ?? '');
      if (!ref || match[2] === '/') continue;
      const problem = describeCellOutOfRange(Number(ref[2]), columnNumber(ref[1]!));
      if (problem) throw new ParseError({ file, detail: problem });
    }
  }
}
