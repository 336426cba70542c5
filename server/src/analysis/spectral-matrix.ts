import { mixtureInitialConcentrations } from './dilution';
import { AnalysisError } from './errors';
import { ResolvedSpectralSettings } from './spectral-options';
import { Reading, SampleDefinition } from './types';

/** One row of the spectral matrix: a mixture (the mean of its replicate group). */
export interface SpectralMixtureRow {
  sampleId: string;
  /** Replicate group, or the position when the mixture has none. */
  group: string;
  positions: string[];
  /** Initial A and B after mixing (C₁V₁ = C₂V₂), mol/L. */
  a0M: number;
  b0M: number;
  /** The path every row is scaled to (the batch's), cm. */
  pathLengthCm: number;
}

/** Blank-corrected absorbance spectra of a batch's mixtures on one wavelength grid. */
export interface SpectralMatrix {
  wavelengthsNm: number[];
  mixtures: SpectralMixtureRow[];
  /** Mixtures × wavelengths: (A − mean blank at λ) × (batch path / position path), replicate-group means. */
  absorbance: number[][];
  /** Mean blank absorbance at each wavelength (0 without blanks). */
  blankAbsorbance: number[];
  blankPositions: string[];
  warnings: string[];
}

const POSITION_RE = /^([A-Z]+)(\d+)$/;

function comparePositions(a: string, b: string): number {
  const ma = POSITION_RE.exec(a);
  const mb = POSITION_RE.exec(b);
  if (ma && mb) return ma[1] === mb[1] ? Number(ma[2]) - Number(mb[2]) : ma[1] < mb[1] ? -1 : 1;
  return a < b ? -1 : a > b ? 1 : 0;
}

/** Wavelengths closer than 1 pm are one wavelength of the grid. */
const keyOf = (wavelengthNm: number): number => Math.round(wavelengthNm * 1000);

const nmList = (keys: readonly number[]): string =>
  keys.length > 6
    ? `${keys.length} wavelengths (${keys[0] / 1000}–${keys[keys.length - 1] / 1000} nm)`
    : `${keys.map((k) => k / 1000).join(', ')} nm`;

/**
 * Builds the mixtures × wavelengths absorbance matrix of a batch from its readings and manifest: a
 * position's value at λ is the mean of its readings there (a saturated or missing reading makes that cell
 * unusable, never zero); blank correction per wavelength, A − Ā_blank(λ), scaled to the batch path length
 * (A × l_batch / l_position); a mixture's row is the mean of its replicate group at each wavelength.
 * Mixtures usable at fewer than the set fraction of wavelengths are left out, then wavelengths where any
 * remaining mixture has no value (each with a warning); an optional range fromNm…toNm limits the grid.
 *
 * Units: wavelength nm, absorbance dimensionless, concentrations mol/L, volumes mL, path cm.
 * Reference: Beer–Lambert additivity and reagent-blank subtraction (Harris D.C., Quantitative Chemical
 * Analysis, ch. 4 and 18); C₁V₁ = C₂V₂ (common practice).
 *
 * @param readings parsed readings at any number of wavelengths
 * @param samples manifest rows (blanks and mixtures are used)
 * @param settings resolved whole-spectrum settings
 * @throws AnalysisError 'too-few-points' when fewer than two mixtures or no wavelength remain
 * @example
 * const matrix = buildSpectralMatrix(run.readings, manifest.samples, resolveSpectralSettings({ fromNm: 400 }));
 * matrix.absorbance.length; // number of mixtures
 */
export function buildSpectralMatrix(
  readings: readonly Reading[],
  samples: readonly SampleDefinition[],
  settings: ResolvedSpectralSettings,
): SpectralMatrix {
  const warnings: string[] = [];
  const sampleByPosition = new Map<string, SampleDefinition>();
  for (const sample of samples) {
    const pos = sample.position.toUpperCase();
    if (sampleByPosition.has(pos)) warnings.push(`manifest lists ${pos} twice; the first row is used`);
    else sampleByPosition.set(pos, sample);
  }
  const excluded = new Set(settings.exclusions.map((e) => e.position));
  const inRange = (nm: number): boolean =>
    (settings.fromNm === null || nm >= settings.fromNm - 5e-4) &&
    (settings.toNm === null || nm <= settings.toNm + 5e-4);

  // Per position and wavelength: the sum and count of finite readings, or a flag that one was unusable.
  const cells = new Map<string, Map<number, { sum: number; n: number; bad: boolean }>>();
  const unassigned = new Set<string>();
  for (const r of readings) {
    const pos = r.position.toUpperCase();
    const sample = sampleByPosition.get(pos);
    if (!sample) {
      unassigned.add(pos);
      continue;
    }
    if (excluded.has(pos) || (sample.role !== 'blank' && sample.role !== 'mixture')) continue;
    if (!Number.isFinite(r.wavelengthNm) || !inRange(r.wavelengthNm)) continue;
    let byKey = cells.get(pos);
    if (!byKey) cells.set(pos, (byKey = new Map()));
    const key = keyOf(r.wavelengthNm);
    let cell = byKey.get(key);
    if (!cell) byKey.set(key, (cell = { sum: 0, n: 0, bad: false }));
    if (r.absorbance === null || !Number.isFinite(r.absorbance)) cell.bad = true;
    else {
      cell.sum += r.absorbance;
      cell.n++;
    }
  }
  if (unassigned.size)
    warnings.push(
      `readings at ${[...unassigned].sort(comparePositions).join(', ')} have no manifest row and were not used`,
    );
  const valueAt = (pos: string, key: number): number | null => {
    const cell = cells.get(pos)?.get(key);
    return cell && !cell.bad && cell.n > 0 ? cell.sum / cell.n : null;
  };

  const positionsOf = (role: 'blank' | 'mixture'): string[] =>
    [...cells.keys()].filter((p) => sampleByPosition.get(p)?.role === role).sort(comparePositions);
  const blankPositions = positionsOf('blank');
  const mixturePositions = positionsOf('mixture');
  let keys = [...new Set(mixturePositions.flatMap((p) => [...(cells.get(p)?.keys() ?? [])]))].sort(
    (u, v) => u - v,
  );

  // Blank per wavelength: the mean of the blanks with a usable reading there.
  const blankByKey = new Map<number, number>();
  if (blankPositions.length === 0) warnings.push('no usable blank: absorbances are used as read');
  else {
    const noBlank: number[] = [];
    for (const key of keys) {
      const values = blankPositions.map((p) => valueAt(p, key)).filter((v): v is number => v !== null);
      if (values.length) blankByKey.set(key, values.reduce((s, v) => s + v, 0) / values.length);
      else noBlank.push(key);
    }
    if (noBlank.length) {
      warnings.push(`no usable blank at ${nmList(noBlank)}: left out`);
      keys = keys.filter((k) => blankByKey.has(k));
    }
  }

  // Mixture rows: replicate-group means of the corrected values.
  const groups = new Map<string, { sample: SampleDefinition; positions: string[] }>();
  for (const pos of mixturePositions) {
    const sample = sampleByPosition.get(pos) as SampleDefinition;
    const key = sample.replicateGroup ? `g:${sample.replicateGroup}` : `p:${pos}`;
    const g = groups.get(key);
    if (g) {
      if (g.sample.sampleId !== sample.sampleId)
        warnings.push(
          `replicate group ${sample.replicateGroup} mixes samples ${g.sample.sampleId} and ${sample.sampleId}`,
        );
      g.positions.push(pos);
    } else groups.set(key, { sample, positions: [pos] });
  }
  type Row = { row: SpectralMixtureRow; values: Map<number, number> };
  let rows: Row[] = [];
  for (const g of groups.values()) {
    const sample = g.sample;
    let init;
    try {
      init = mixtureInitialConcentrations({
        stockAM: sample.stockAM ?? NaN,
        volumeAMl: sample.volumeAMl ?? NaN,
        stockBM: sample.stockBM ?? NaN,
        volumeBMl: sample.volumeBMl ?? NaN,
        totalVolumeMl: sample.totalVolumeMl,
      });
    } catch (e) {
      warnings.push(`mixture ${sample.sampleId}: ${(e as Error).message}; not analysed`);
      continue;
    }
    const values = new Map<number, number>();
    for (const key of keys) {
      const blank = blankByKey.get(key) ?? 0;
      const corrected = g.positions
        .map((pos) => {
          const v = valueAt(pos, key);
          const path = settings.pathLengthByPositionCm[pos] ?? settings.pathLengthCm;
          return v === null ? null : (v - blank) * (settings.pathLengthCm / path);
        })
        .filter((v): v is number => v !== null);
      if (corrected.length) values.set(key, corrected.reduce((s, v) => s + v, 0) / corrected.length);
    }
    rows.push({
      row: {
        sampleId: sample.sampleId,
        group: sample.replicateGroup ?? g.positions[0],
        positions: g.positions,
        a0M: init.a0M,
        b0M: init.b0M,
        pathLengthCm: settings.pathLengthCm,
      },
      values,
    });
  }

  // Sparse mixtures out first, then the wavelengths some remaining mixture lacks.
  const sparse = rows.filter((r) => r.values.size < settings.minWavelengthCoverage * keys.length);
  for (const r of sparse)
    warnings.push(
      `mixture ${r.row.sampleId}: usable readings at only ${r.values.size} of ${keys.length} wavelengths; not analysed`,
    );
  rows = rows.filter((r) => !sparse.includes(r));
  const gaps = keys.filter((k) => rows.some((r) => !r.values.has(k)));
  if (gaps.length) {
    warnings.push(`a mixture has no usable reading (saturated or missing) at ${nmList(gaps)}: left out`);
    keys = keys.filter((k) => !gaps.includes(k));
  }
  if (rows.length < 2)
    throw new AnalysisError(
      'too-few-points',
      `a whole-spectrum analysis needs at least 2 mixtures with spectra, found ${rows.length}`,
    );
  if (keys.length === 0)
    throw new AnalysisError('too-few-points', 'no wavelength has a usable reading for every mixture');
  return {
    wavelengthsNm: keys.map((k) => k / 1000),
    mixtures: rows.map((r) => r.row),
    absorbance: rows.map((r) => keys.map((k) => r.values.get(k) as number)),
    blankAbsorbance: keys.map((k) => blankByKey.get(k) ?? 0),
    blankPositions,
    warnings,
  };
}
