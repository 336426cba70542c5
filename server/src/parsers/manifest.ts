import { SAMPLE_ROLES, type SampleDefinition, type SampleRole } from '../analysis/types';
import { isFormulaLike, parseDecimal } from './cell-values';
import { detectDelimiter, readCsvRows, type CsvRow } from './csv-rows';
import { decodeText } from './decode-text';
import { excerpt, ParseError, showCell } from './parse-error';
import type { PlateFormat } from './parse-rules';
import { describePositions, isValidPosition, normalisePosition } from './position';

/** One thing wrong with a manifest; `row` is the 1-based line in the file (the header's line for column problems). */
export interface ManifestProblem {
  row: number;
  column: string;
  message: string;
}

export interface ManifestParseResult {
  /** The rows without problems. A manifest with any problem should not be used as a whole. */
  samples: SampleDefinition[];
  problems: ManifestProblem[];
}

type NumberField =
  'concentrationM' | 'dilutionFactor' | 'stockAM' | 'volumeAMl' | 'stockBM' | 'volumeBMl' | 'totalVolumeMl';

const TEXT_COLUMNS = {
  position: 'position',
  sample_id: 'sampleId',
  role: 'role',
  replicate_group: 'replicateGroup',
} as const;
const NUMBER_COLUMNS: Record<string, NumberField> = {
  concentration_M: 'concentrationM',
  dilution_factor: 'dilutionFactor',
  stock_a_M: 'stockAM',
  volume_a_mL: 'volumeAMl',
  stock_b_M: 'stockBM',
  volume_b_mL: 'volumeBMl',
  total_volume_mL: 'totalVolumeMl',
};
const ALL_COLUMNS = [...Object.keys(TEXT_COLUMNS), ...Object.keys(NUMBER_COLUMNS)];
const REQUIRED_COLUMNS = ['position', 'sample_id', 'role'];
/** Fields that must be above zero rather than merely not negative. */
const POSITIVE_FIELDS: ReadonlySet<NumberField> = new Set(['dilutionFactor', 'totalVolumeMl']);
const NEEDED_BY_ROLE: Partial<Record<SampleRole, string[]>> = {
  standard: ['concentration_M'],
  mixture: ['stock_a_M', 'volume_a_mL', 'stock_b_M', 'volume_b_mL', 'total_volume_mL'],
};
// Volumes within this relative margin of the total are taken as equal (rounding in the sheet).
const VOLUME_TOLERANCE = 1e-9;

function canonicalColumn(name: string): string | undefined {
  return ALL_COLUMNS.find((c) => c.toLowerCase() === name.toLowerCase());
}

/**
 * Reads a sample manifest and reports every problem at once, each with its row and column.
 * Files that are not a manifest at all (binary, empty, no sample rows) throw a ParseError.
 */
/** The plate (or cuvette sequence) the manifest is for: a position off it is a problem of its row. */
export interface ManifestPlate {
  format: PlateFormat;
  /** Cuvettes in the sequence (cuvette layouts). */
  cuvetteCount?: number | null;
}

export async function parseManifestCsv(
  content: Buffer,
  fileName: string,
  plate?: ManifestPlate,
): Promise<ManifestParseResult> {
  const { text } = decodeText(content, fileName, 'utf-8');
  const delimiter = detectDelimiter(text, 0, [',', ';', '\t']);
  const rows = await readCsvRows(text, { file: fileName, delimiter, skipLines: 0 });
  const [header, ...data] = rows;
  if (header === undefined)
    throw new ParseError({ file: fileName, detail: 'no samples: the file has no header row' });
  if (data.length === 0) {
    throw new ParseError({
      file: fileName,
      line: header.line,
      detail: 'no samples: the file has a header row but no sample rows',
    });
  }
  const problems: ManifestProblem[] = [];
  const columnAt = new Map<string, number>();
  header.cells.forEach((cell, i) => {
    if (cell === '') {
      if (data.some((r) => (r.cells[i] ?? '') !== '')) {
        problems.push({ row: header.line, column: `#${i + 1}`, message: 'a column with values has no name' });
      }
      return;
    }
    const name = canonicalColumn(cell);
    if (name === undefined) {
      problems.push({
        row: header.line,
        column: excerpt(cell),
        message: `unknown column: expected only ${ALL_COLUMNS.join(', ')}`,
      });
    } else if (columnAt.has(name)) {
      problems.push({
        row: header.line,
        column: excerpt(cell),
        message: 'the header names this column twice',
      });
    } else {
      columnAt.set(name, i);
    }
  });
  for (const name of REQUIRED_COLUMNS) {
    if (!columnAt.has(name))
      problems.push({ row: header.line, column: name, message: 'required column is missing' });
  }
  const decimalMarks: ('.' | ',')[] = delimiter === ',' ? ['.'] : ['.', ','];
  const firstRowOf = new Map<string, number>();
  const samples = data.flatMap((row) => {
    const sample = readSampleRow(row, header, columnAt, decimalMarks, firstRowOf, problems, plate);
    return sample ? [sample] : [];
  });
  return { samples, problems };
}

/** Why a position is not on the manifest's plate or cuvette sequence, or null when it is. */
function offThePlate(position: string, plate: ManifestPlate): string | null {
  if (plate.format === 'cuvette') {
    const count = plate.cuvetteCount ?? null;
    const n = position.startsWith('C') ? Number(position.slice(1)) : NaN;
    if (!isValidPosition(position, 'cuvette'))
      return `${position} is not a cuvette position: expected ${describePositions('cuvette')}`;
    if (count !== null && n > count)
      return `${position} is off the sequence of ${count} cuvettes (C1…C${count})`;
    return null;
  }
  if (isValidPosition(position, plate.format)) return null;
  return `${position} is off the plate: expected ${describePositions(plate.format)}`;
}

function readSampleRow(
  row: CsvRow,
  header: CsvRow,
  columnAt: Map<string, number>,
  decimalMarks: ('.' | ',')[],
  firstRowOf: Map<string, number>,
  problems: ManifestProblem[],
  plate: ManifestPlate | undefined,
): SampleDefinition | undefined {
  const before = problems.length;
  const problem = (column: string, message: string) => problems.push({ row: row.line, column, message });
  const cell = (name: string) => {
    const i = columnAt.get(name);
    return i === undefined ? '' : (row.cells[i] ?? '');
  };
  const extra = row.cells.slice(header.cells.length).filter((c) => c !== '');
  if (row.cells.length < header.cells.length || extra.length > 0) {
    problem('', `the row has ${row.cells.length} cells, the header ${header.cells.length}`);
  }
  for (const name of columnAt.keys()) {
    if (isFormulaLike(cell(name))) problem(name, `formula-like cell ${showCell(cell(name))} is refused`);
  }
  const clean = (name: string) => (isFormulaLike(cell(name)) ? '' : cell(name));

  const positionText = clean('position');
  const position = normalisePosition(positionText);
  if (positionText === '') {
    if (columnAt.has('position') && !isFormulaLike(cell('position'))) problem('position', 'missing position');
  } else if (
    position === undefined ||
    !(isValidPosition(position, '384') || isValidPosition(position, 'cuvette'))
  ) {
    problem('position', `expected a position such as A1…P24 or C1, C2, …, found ${showCell(positionText)}`);
  } else if (firstRowOf.has(position)) {
    problem('position', `duplicate position ${position}: already on row ${firstRowOf.get(position)}`);
  } else {
    firstRowOf.set(position, row.line);
    const off = plate ? offThePlate(position, plate) : null;
    if (off) problem('position', off);
  }

  const sampleId = clean('sample_id');
  if (sampleId === '' && columnAt.has('sample_id') && !isFormulaLike(cell('sample_id')))
    problem('sample_id', 'missing sample_id');

  const roleText = clean('role').toLowerCase();
  const role = SAMPLE_ROLES.find((r) => r === roleText);
  if (columnAt.has('role') && !isFormulaLike(cell('role'))) {
    if (roleText === '') problem('role', 'missing role');
    else if (role === undefined)
      problem('role', `unknown role ${showCell(cell('role'))}: expected one of ${SAMPLE_ROLES.join(', ')}`);
  }

  const numbers: Partial<Record<NumberField, number>> = {};
  for (const [column, field] of Object.entries(NUMBER_COLUMNS)) {
    const text = clean(column);
    if (text === '') continue;
    const value = decimalMarks.map((m) => parseDecimal(text, m)).find((v) => v !== undefined);
    if (value === undefined) problem(column, `expected a number, found ${showCell(text)}`);
    else if (value < 0) problem(column, `must not be negative, found ${text}`);
    else if (value === 0 && POSITIVE_FIELDS.has(field))
      problem(column, `must be greater than 0, found ${text}`);
    else numbers[field] = value;
  }
  for (const column of (role && NEEDED_BY_ROLE[role]) ?? []) {
    if (cell(column) === '') problem(column, `missing ${column}: a ${role} needs it`);
  }
  const { volumeAMl, volumeBMl, totalVolumeMl } = numbers;
  if (
    role === 'mixture' &&
    volumeAMl !== undefined &&
    volumeBMl !== undefined &&
    totalVolumeMl !== undefined &&
    volumeAMl + volumeBMl > totalVolumeMl * (1 + VOLUME_TOLERANCE)
  ) {
    problem(
      'total_volume_mL',
      `volume_a_mL + volume_b_mL = ${+(volumeAMl + volumeBMl).toPrecision(12)} mL exceeds total_volume_mL ${totalVolumeMl} mL`,
    );
  }

  if (problems.length > before || position === undefined || role === undefined) return undefined;
  const sample: SampleDefinition = { position, sampleId, role, ...numbers };
  if (role === 'unknown' && sample.dilutionFactor === undefined) sample.dilutionFactor = 1;
  const group = clean('replicate_group');
  if (group !== '') sample.replicateGroup = group;
  return sample;
}
