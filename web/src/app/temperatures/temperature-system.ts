import type { ChartSeries, ScatterChartModel } from '../shared/chart/chart-data';

import type { SystemTemperatures, TemperatureGroup } from '@equilight/contracts';

export type {
  SystemTemperatures,
  TemperatureGroup,
  TemperaturePoint,
  TemperaturePointsPage,
} from '@equilight/contracts';
export type { VantHoffResult as VantHoffFit } from '@equilight/analysis';

/** Batches listed per page of a system's points table. */
export const POINTS_PAGE_SIZE = 25;

/** One page of one system's batches, as the page asks for it. */
export interface PointsRequest {
  system: string;
  includeUnapproved: boolean;
  page: number;
  pageSize: number;
}

const KELVIN_OFFSET = 273.15;

/** 1/T in K⁻¹ for a temperature in °C. */
export function inverseKelvin(temperatureC: number): number {
  return 1 / (temperatureC + KELVIN_OFFSET);
}

/** The groups with at least one batch in the fit (the others have no K to draw). */
function drawn(system: SystemTemperatures): (TemperatureGroup & { kGeometricMean: number })[] {
  return system.groups.filter(
    (g): g is TemperatureGroup & { kGeometricMean: number } => g.used > 0 && g.kGeometricMean !== null,
  );
}

/**
 * The van 't Hoff chart: at each temperature, the mean ln K of the batches in the fit (the log of their
 * geometric mean) with a whisker from the least to the greatest K, and the fitted line
 * ln K = intercept + slope/T over the temperatures used. The batches themselves are in the table.
 */
export function vantHoffChart(system: SystemTemperatures): ScatterChartModel {
  const groups = drawn(system);
  const fit = system.vantHoff;
  // With no fit (fewer than two usable temperatures) no point is "in the fit".
  const series: ChartSeries[] = [
    {
      label: fit ? 'Mean ln K in the fit' : 'Mean ln K',
      kind: 'points',
      points: groups.map((g) => ({ x: inverseKelvin(g.temperatureC), y: Math.log(g.kGeometricMean) })),
    },
  ];
  let whiskers = 0;
  for (const g of groups) {
    if (g.kMin === null || g.kMax === null || g.kMin === g.kMax) continue;
    const x = inverseKelvin(g.temperatureC);
    series.push({
      label: 'Least to greatest K',
      kind: 'range',
      points: [
        { x, y: Math.log(g.kMin) },
        { x, y: Math.log(g.kMax) },
      ],
      hideInLegend: whiskers++ > 0,
    });
  }
  if (fit && groups.length) {
    const xs = groups.map((g) => inverseKelvin(g.temperatureC));
    series.push({
      label: 'van \u2019t Hoff fit',
      kind: 'line',
      points: [Math.min(...xs), Math.max(...xs)].map((x) => ({ x, y: fit.intercept + fit.slope * x })),
    });
  }
  const span = groups.length
    ? `${groups[0].temperatureC}–${groups[groups.length - 1].temperatureC} °C`
    : 'no temperature';
  return {
    series,
    xTitle: '1/T (K⁻¹)',
    yTitle: 'ln K',
    summary: fit
      ? `ln K against 1/T for ${system.systemName}: mean ln K at ${groups.length} temperatures (${span}) from ${system.counts.used} batches in the fit, R² ${fit.r2.toFixed(4)}.`
      : `ln K against 1/T for ${system.systemName}: no fit yet.`,
  };
}
