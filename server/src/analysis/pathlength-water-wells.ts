import { pathLengthFromWaterPeak, WATER_K_FACTOR_PER_CM } from './pathlength-water';
import { Reading, SampleDefinition } from './types';

/** One well's path length from its water peak. */
export interface WellPathLength {
  position: string;
  pathLengthCm: number;
  /** Mean absorbance of the well near the peak and the baseline wavelength. */
  absorbancePeak: number;
  absorbanceBaseline: number;
}

/** Per-well path lengths of a plate from the near-infrared water peak. */
export interface WaterPeakPathLengths {
  /** The wavelengths found near the peak and the baseline (the means of those read), nm. */
  peakNm: number;
  baselineNm: number;
  kFactorPerCm: number;
  /** How the lengths were found, for a legend: "water peak". */
  source: 'water peak';
  wells: WellPathLength[];
  /** The same lengths by position (what the analysis settings take). */
  byPosition: Record<string, number>;
  /** Wells left at the nominal path, with the reason. */
  warnings: string[];
}

export interface WaterPeakOptions {
  /** Peak and baseline wavelengths, nm. Defaults 977 and 900. */
  peakNm?: number;
  baselineNm?: number;
  /** A reading within this distance of a wavelength counts for it, nm. Default 3 (975–980 nm readers). */
  toleranceNm?: number;
  /** Water k-factor A(peak) − A(baseline) over 1 cm. Default {@link WATER_K_FACTOR_PER_CM}. */
  kFactorPerCm?: number;
  /** Plausible path lengths, cm; a well outside is left at the nominal path. Default 0.02–2. */
  minCm?: number;
  maxCm?: number;
}

/**
 * Per-well path lengths from the water peak: for every well with a manifest row (an aqueous sample,
 * blank or standard) and readings near both 977 nm and 900 nm, l = (A₉₇₇ − A₉₀₀)/k
 * ({@link pathLengthFromWaterPeak}). Wells without both readings, or whose difference is not positive or
 * gives an implausible length, keep the nominal path (with a warning). Returns null when the readings
 * hold no wavelength near the peak or none near the baseline (nothing to derive).
 *
 * Units: wavelengths nm, absorbance dimensionless, k per cm, path cm.
 * Reference: Lampinen J. et al. (2012), microplate path-length correction (application note); k ≈ 0.172 at
 * 975 nm/25 °C tabulated in the fpcountr R package (Csibra & Stan, Nat. Commun. 13, 6600, 2022); 0.18 for
 * 977 − 900 nm at room temperature (common practice).
 *
 * @example
 * wellPathLengthsFromWaterPeak(readings, samples)?.byPosition; // { A1: 0.52, A2: 0.55, … }
 */
export function wellPathLengthsFromWaterPeak(
  readings: readonly Reading[],
  samples: readonly SampleDefinition[],
  options: WaterPeakOptions = {},
): WaterPeakPathLengths | null {
  const peakNm = options.peakNm ?? 977;
  const baselineNm = options.baselineNm ?? 900;
  const tolerance = options.toleranceNm ?? 3;
  const k = options.kFactorPerCm ?? WATER_K_FACTOR_PER_CM;
  const minCm = options.minCm ?? 0.02;
  const maxCm = options.maxCm ?? 2;
  const aqueous = new Set(samples.map((s) => s.position.toUpperCase()));
  type Sums = { sum: number; n: number; nmSum: number };
  const peak = new Map<string, Sums>();
  const base = new Map<string, Sums>();
  const peakNmRead: number[] = [];
  const baseNmRead: number[] = [];
  for (const r of readings) {
    const near = (target: number) => Math.abs(r.wavelengthNm - target) <= tolerance;
    const into = near(peakNm) ? peak : near(baselineNm) ? base : null;
    if (!into) continue;
    (into === peak ? peakNmRead : baseNmRead).push(r.wavelengthNm);
    const pos = r.position.toUpperCase();
    if (!aqueous.has(pos) || r.absorbance === null || !Number.isFinite(r.absorbance)) continue;
    const s = into.get(pos) ?? { sum: 0, n: 0, nmSum: 0 };
    s.sum += r.absorbance;
    s.n++;
    into.set(pos, s);
  }
  if (peakNmRead.length === 0 || baseNmRead.length === 0) return null;
  const mean = (xs: number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
  const wells: WellPathLength[] = [];
  const warnings: string[] = [];
  const noWater: string[] = [];
  const outside: string[] = [];
  const unread: string[] = [];
  for (const pos of [...aqueous].sort(comparePositions)) {
    const p = peak.get(pos);
    const b = base.get(pos);
    if (!p || !b) {
      unread.push(pos);
      continue;
    }
    const a977 = p.sum / p.n;
    const a900 = b.sum / b.n;
    if (!(a977 - a900 > 0)) {
      noWater.push(pos);
      continue;
    }
    const l = pathLengthFromWaterPeak(a977, a900, k);
    if (l < minCm || l > maxCm) {
      outside.push(`${pos} (${l.toPrecision(3)} cm)`);
      continue;
    }
    wells.push({ position: pos, pathLengthCm: l, absorbancePeak: a977, absorbanceBaseline: a900 });
  }
  if (unread.length)
    warnings.push(`no water-peak readings at ${unread.join(', ')}: the nominal path length is used there`);
  if (noWater.length)
    warnings.push(
      `A(${peakNm}) does not exceed A(${baselineNm}) at ${noWater.join(', ')} (not water-filled?): the nominal path length is used there`,
    );
  if (outside.length)
    warnings.push(
      `implausible water-peak path length at ${outside.join(', ')} (outside ${minCm}–${maxCm} cm): the nominal path length is used there`,
    );
  return {
    peakNm: mean(peakNmRead),
    baselineNm: mean(baseNmRead),
    kFactorPerCm: k,
    source: 'water peak',
    wells,
    byPosition: Object.fromEntries(wells.map((w) => [w.position, w.pathLengthCm])),
    warnings,
  };
}

const POSITION_RE = /^([A-Z]+)(\d+)$/;
function comparePositions(a: string, b: string): number {
  const ma = POSITION_RE.exec(a);
  const mb = POSITION_RE.exec(b);
  if (ma && mb) return ma[1] === mb[1] ? Number(ma[2]) - Number(mb[2]) : ma[1] < mb[1] ? -1 : 1;
  return a < b ? -1 : a > b ? 1 : 0;
}
