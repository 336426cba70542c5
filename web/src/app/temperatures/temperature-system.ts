import type { ScatterChartModel } from '../shared/chart/chart-data';

import type { SystemTemperatures, TemperaturePoint } from '@equilight/contracts';

export type { SystemTemperatures, TemperaturePoint } from '@equilight/contracts';
export type { VantHoffResult as VantHoffFit } from '@equilight/analysis';

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
  const fit = system.vantHoff;
  // With no fit (fewer than two usable temperatures) no point is "in the fit".
  const series: ScatterChartModel['series'] = [
    { label: fit ? 'In the fit' : 'ln K of a batch', kind: 'points', points: used },
  ];
  if (left.length) series.push({ label: 'Left out', kind: 'flagged', points: left });
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
