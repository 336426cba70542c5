import type { ScatterChartModel } from '../shared/chart/chart-data';

/** GET /api/temperatures: one chemical system's K across batches and its van 't Hoff fit. */
export interface TemperaturePoint {
  batchId: number;
  batchName: string;
  state: string;
  temperatureC: number;
  model: string | null;
  /** K of the batch's best candidate when it has a value (not for bounds or failed fits). */
  k: number | null;
  kSe: number | null;
  /** 95 % interval; an end is null when the data do not bound it. */
  kCi95: [number | null, number | null] | null;
  /** K as every screen and report states it (a bound or a failed fit reads as such). */
  kText: string | null;
  excludedBecause: string | null;
}

export interface VantHoffFit {
  n: number;
  deltaHJPerMol: number;
  deltaHSe: number | null;
  deltaSJPerMolK: number;
  deltaSSe: number | null;
  slope: number;
  intercept: number;
  r2: number;
}

export interface SystemTemperatures {
  systemName: string;
  model: string | null;
  points: TemperaturePoint[];
  vantHoff: VantHoffFit | null;
  note: string;
}

const isObj = (v: unknown): v is Record<string, unknown> => !!v && typeof v === 'object';

export function isSystemTemperatures(v: unknown): v is SystemTemperatures {
  return (
    isObj(v) &&
    typeof v['systemName'] === 'string' &&
    Array.isArray(v['points']) &&
    typeof v['note'] === 'string' &&
    (v['vantHoff'] === null || isObj(v['vantHoff']))
  );
}

const KELVIN_OFFSET = 273.15;

/** 1/T in K⁻¹ for a temperature in °C. */
export function inverseKelvin(temperatureC: number): number {
  return 1 / (temperatureC + KELVIN_OFFSET);
}

/**
 * The van 't Hoff chart: ln K against 1/T for the points in the fit and, apart, those left out
 * (drawn as triangles), with the fitted line ln K = intercept + slope/T over the temperatures used.
 */
export function vantHoffChart(system: SystemTemperatures): ScatterChartModel {
  const withK = system.points.filter((p) => p.k !== null && p.k > 0);
  const toXY = (p: TemperaturePoint) => ({ x: inverseKelvin(p.temperatureC), y: Math.log(p.k as number) });
  const used = withK.filter((p) => !p.excludedBecause).map(toXY);
  const left = withK.filter((p) => p.excludedBecause).map(toXY);
  const series: ScatterChartModel['series'] = [{ label: 'In the fit', kind: 'points', points: used }];
  if (left.length) series.push({ label: 'Left out', kind: 'flagged', points: left });
  const fit = system.vantHoff;
  if (fit && used.length) {
    const xs = used.map((p) => p.x);
    series.push({
      label: 'van \u2019t Hoff fit',
      kind: 'line',
      points: [Math.min(...xs), Math.max(...xs)].map((x) => ({ x, y: fit.intercept + fit.slope * x })),
    });
  }
  return {
    series,
    xTitle: '1/T (K⁻¹)',
    yTitle: 'ln K',
    summary: fit
      ? `ln K against 1/T for ${system.systemName}: ${used.length} batches in the fit, R² ${fit.r2.toFixed(4)}.`
      : `ln K against 1/T for ${system.systemName}: no fit yet.`,
  };
}
