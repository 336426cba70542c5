import type { PositionResult, PositionStatus, QcFlag, SampleRole } from '@equilight/analysis';
import { qcFindingPositions } from '@equilight/analysis';
import type { PlateFormat } from '../batches/batch';
import { type ScaleRange, colourFor, scaleRange, textColourOn } from '../shared/chart/colour-scale';
import { formatAbsorbance } from '../shared/format/number-format';
import { ROLE_CODE, asSampleRole } from '../shared/role-code/role-style';

/** What marks a position besides colour: a symbol in the cell and a pattern. */
export type CellMarker = 'missing' | 'saturated' | 'excluded' | 'flagged' | 'waiting';

export const MARKERS: Record<CellMarker, { symbol: string; label: string }> = {
  excluded: { symbol: '✕', label: 'excluded by a person' },
  saturated: { symbol: '▲', label: 'saturated reading' },
  missing: { symbol: '∅', label: 'missing reading' },
  flagged: { symbol: '!', label: 'QC flag' },
  waiting: { symbol: '…', label: 'no reading yet' },
};

export interface PlateCell {
  position: string;
  row: number;
  col: number;
  /** True when the layout has nothing here. */
  empty: boolean;
  role: SampleRole | null;
  roleLetter: string;
  sampleId: string | null;
  replicateGroup: string | null;
  raw: number | null;
  corrected: number | null;
  status: PositionStatus | 'empty';
  marker: CellMarker | null;
  flags: string[];
  exclusionReason: string | null;
  fill: string | null;
  ink: string | null;
  /** What a screen reader says for the cell (`describeCell`), made with the model, not at every check. */
  label: string;
}

export interface PlateModel {
  format: PlateFormat;
  rowLabels: string[];
  colLabels: string[];
  rows: PlateCell[][];
  range: ScaleRange | null;
}

export const CUVETTES_PER_ROW = 12;

const STATUS_WORDS: Record<PositionStatus | 'empty', string> = {
  used: 'used',
  excluded: 'excluded',
  saturated: 'saturated',
  missing: 'missing reading',
  'no-sample': 'no sample in the manifest',
  'no-reading': 'no reading yet',
  empty: 'empty',
};

export function statusWord(status: PositionStatus | 'empty'): string {
  return STATUS_WORDS[status];
}

function markerOf(status: PositionStatus | 'empty', flagged: boolean): CellMarker | null {
  if (status === 'excluded') return 'excluded';
  if (status === 'saturated') return 'saturated';
  if (status === 'missing') return 'missing';
  if (flagged) return 'flagged';
  if (status === 'no-reading') return 'waiting';
  return null;
}

/**
 * The cells of a 96- or 384-well plate (8×12, 16×24) or a cuvette sequence (rows of 12), from the
 * analysed positions, the layout, and the QC flags that name a position.
 */
export function buildPlateModel(
  format: PlateFormat,
  positions: readonly PositionResult[],
  layoutPositions: readonly { position: string; role: string; replicateGroup?: string }[],
  qc: readonly QcFlag[],
): PlateModel {
  const byPosition = new Map(positions.map((p) => [p.position.toUpperCase(), p]));
  const layout = new Map(layoutPositions.map((p) => [p.position.toUpperCase(), p]));
  const flags = new Map<string, string[]>();
  for (const f of qc) {
    if (f.severity === 'info') continue;
    // A replicate group's finding names each of its positions ("C10 C11"): it marks every one of them.
    for (const position of qcFindingPositions(f)) {
      const key = position.toUpperCase();
      flags.set(key, [...(flags.get(key) ?? []), f.message]);
    }
  }
  const range = scaleRange(positions.map((p) => p.absorbanceCorrected));

  let names: string[][];
  let rowLabels: string[];
  let colLabels: string[];
  if (format === 'cuvette') {
    const numbers = [...byPosition.keys(), ...layout.keys()]
      .map((p) => /^C(\d+)$/.exec(p))
      .filter((m): m is RegExpExecArray => !!m)
      .map((m) => Number(m[1]));
    const count = Math.max(1, ...numbers);
    const rowCount = Math.ceil(count / CUVETTES_PER_ROW);
    names = Array.from({ length: rowCount }, (_, r) =>
      Array.from(
        { length: Math.min(CUVETTES_PER_ROW, count - r * CUVETTES_PER_ROW) },
        (_, c) => `C${r * CUVETTES_PER_ROW + c + 1}`,
      ),
    );
    rowLabels = names.map((row) => `${row[0]}–${row[row.length - 1]}`);
    colLabels = Array.from({ length: Math.min(CUVETTES_PER_ROW, count) }, (_, c) => String(c + 1));
  } else {
    const [rowCount, colCount] = format === '384' ? [16, 24] : [8, 12];
    rowLabels = Array.from({ length: rowCount }, (_, r) => String.fromCharCode(65 + r));
    colLabels = Array.from({ length: colCount }, (_, c) => String(c + 1));
    names = rowLabels.map((letter) => colLabels.map((n) => `${letter}${n}`));
  }

  const rows = names.map((row, r) =>
    row.map((position, c): PlateCell => {
      const p = byPosition.get(position);
      const l = layout.get(position);
      const roleText = p?.role ?? asSampleRole(l?.role);
      const status: PositionStatus | 'empty' = p ? p.status : l ? 'no-reading' : 'empty';
      const cellFlags = flags.get(position) ?? [];
      const corrected = p?.absorbanceCorrected ?? null;
      const fill = corrected !== null && range ? colourFor(corrected, range) : null;
      const cell: Omit<PlateCell, 'label'> = {
        position,
        row: r,
        col: c,
        empty: !p && !l,
        role: roleText,
        roleLetter: roleText ? ROLE_CODE[roleText].letter : '',
        sampleId: p?.sampleId ?? null,
        replicateGroup: p?.replicateGroup ?? l?.replicateGroup ?? null,
        raw: p?.absorbanceRaw ?? null,
        corrected,
        status,
        marker: markerOf(status, cellFlags.length > 0),
        flags: cellFlags,
        exclusionReason: p?.exclusionReason ?? null,
        fill,
        ink: fill ? textColourOn(fill) : null,
      };
      return { ...cell, label: describeCell(cell) };
    }),
  );
  return { format, rowLabels, colLabels, rows, range };
}

/** The words a screen reader and the tooltip give for a cell. */
export function describeCell(cell: Omit<PlateCell, 'label'>): string {
  if (cell.empty) return `${cell.position}, empty`;
  const parts = [cell.position];
  if (cell.role) parts.push(cell.role);
  if (cell.sampleId) parts.push(`sample ${cell.sampleId}`);
  parts.push(`raw A ${formatAbsorbance(cell.raw)}`);
  parts.push(`corrected A ${formatAbsorbance(cell.corrected)}`);
  parts.push(`replicate group ${cell.replicateGroup ?? 'none'}`);
  parts.push(`status ${statusWord(cell.status)}`);
  if (cell.exclusionReason) parts.push(`reason: ${cell.exclusionReason}`);
  if (cell.flags.length) parts.push(`${cell.flags.length} QC flag${cell.flags.length > 1 ? 's' : ''}`);
  return parts.join(', ');
}
