import type {
  CalibrationResult,
  JobBatchResult,
  MixtureResult,
  MoleRatioBatchResult,
} from '@equilight/analysis';
import { formatNumber } from '../format/number-format';

/** A point of a scatter chart; `flagged` points are drawn as triangles (shape, not colour alone). */
export interface XY {
  x: number;
  y: number;
}

export interface ChartSeries {
  label: string;
  /** `range`: two points joined by a thin line with a cap at each end (a least-to-greatest whisker). */
  kind: 'points' | 'flagged' | 'line' | 'range';
  points: XY[];
  /** A colour of its own (e.g. one per spectrum); default by kind. */
  colour?: string;
  /** Drawn dashed and thin (a noise level, a ± SE bound). */
  dashed?: boolean;
  /** Left out of the legend (the second bound of a pair, one of many spectra). */
  hideInLegend?: boolean;
}

export interface ScatterChartModel {
  series: ChartSeries[];
  xTitle: string;
  yTitle: string;
  /** One sentence describing the chart for a screen reader; the tables beside it carry the numbers. */
  summary: string;
  /** Show the legend (default true). */
  legend?: boolean;
}

/** Standards (flagged ones apart) and the fitted line A = S·c + b over the standards' range. */
export function calibrationChart(cal: CalibrationResult): ScatterChartModel {
  const ok = cal.points.filter((p) => !p.aboveLinearRange && !p.outlier);
  const flagged = cal.points.filter((p) => p.aboveLinearRange || p.outlier);
  const xs = cal.points.map((p) => p.concentrationM);
  const xMax = Math.max(0, ...xs);
  const xMin = Math.min(0, ...xs);
  const series: ChartSeries[] = [
    { label: 'Standards', kind: 'points', points: ok.map((p) => ({ x: p.concentrationM, y: p.absorbance })) },
  ];
  if (flagged.length)
    series.push({
      label: 'Flagged standards',
      kind: 'flagged',
      points: flagged.map((p) => ({ x: p.concentrationM, y: p.absorbance })),
    });
  series.push({
    label: 'Fitted line',
    kind: 'line',
    points: [xMin, xMax].map((x) => ({ x, y: cal.slope * x + cal.intercept })),
  });
  return {
    series,
    xTitle: 'Concentration (mol/L)',
    yTitle: 'Corrected absorbance (AU)',
    summary: `Calibration: ${cal.n} standards and the fitted line, R² ${cal.r2.toFixed(4)}.`,
  };
}

/** Residuals (observed − fitted absorbance) against concentration, with the zero line. */
export function residualChart(cal: CalibrationResult): ScatterChartModel {
  const xs = cal.points.map((p) => p.concentrationM);
  const flagged = cal.points.filter((p) => p.aboveLinearRange || p.outlier);
  const series: ChartSeries[] = [
    {
      label: 'Residuals',
      kind: 'points',
      points: cal.points
        .filter((p) => !p.aboveLinearRange && !p.outlier)
        .map((p) => ({ x: p.concentrationM, y: p.residual })),
    },
  ];
  if (flagged.length)
    series.push({
      label: 'Flagged standards',
      kind: 'flagged',
      points: flagged.map((p) => ({ x: p.concentrationM, y: p.residual })),
    });
  series.push({
    label: 'Zero',
    kind: 'line',
    points: [
      { x: Math.min(0, ...xs), y: 0 },
      { x: Math.max(0, ...xs), y: 0 },
    ],
  });
  return {
    series,
    xTitle: 'Concentration (mol/L)',
    yTitle: 'Residual (AU)',
    summary: `Residuals of the ${cal.n} standards around the fitted line.`,
  };
}

/** The Job's series (absorbance against mole fraction of B) and its two straight branches. */
export function jobChart(job: JobBatchResult, mixtures: readonly MixtureResult[]): ScatterChartModel {
  const ids = new Set(job.sampleIds);
  const points = mixtures
    .filter((m) => ids.has(m.sampleId) && m.absorbance !== null)
    .map((m) => ({ x: m.moleFractionB, y: m.absorbance as number }))
    .sort((a, b) => a.x - b.x);
  const series: ChartSeries[] = [{ label: 'Mixtures', kind: 'points', points }];
  const xMax = job.maxMoleFractionB;
  if (job.left && xMax !== null)
    series.push({
      label: 'Rising branch',
      kind: 'line',
      points: [0, xMax].map((x) => ({ x, y: job.left!.slope * x + job.left!.intercept })),
    });
  if (job.right && xMax !== null)
    series.push({
      label: 'Falling branch',
      kind: 'line',
      points: [xMax, 1].map((x) => ({ x, y: job.right!.slope * x + job.right!.intercept })),
    });
  return {
    series,
    xTitle: 'Mole fraction of B, B₀/(A₀ + B₀)',
    yTitle: 'Corrected absorbance (AU)',
    summary:
      xMax === null
        ? `Job's plot of ${points.length} mixtures; no maximum found.`
        : `Job's plot of ${points.length} mixtures; the branches meet at a mole fraction of B of ${xMax.toFixed(3)}.`,
  };
}

/**
 * The mole-ratio series (absorbance against varied ÷ fixed reactant) with its rising line and plateau
 * meeting at the break; drawn by the same scatter chart as Job's plot.
 */
export function moleRatioChart(
  moleRatio: MoleRatioBatchResult,
  mixtures: readonly MixtureResult[],
): ScatterChartModel {
  const ids = new Set(moleRatio.sampleIds);
  const ratioOf = (m: MixtureResult) => (moleRatio.varied === 'B' ? m.b0M / m.a0M : m.a0M / m.b0M);
  const points = mixtures
    .filter((m) => ids.has(m.sampleId) && m.absorbance !== null)
    .map((m) => ({ x: ratioOf(m), y: m.absorbance as number }))
    .filter((p) => Number.isFinite(p.x))
    .sort((a, b) => a.x - b.x);
  const series: ChartSeries[] = [{ label: 'Mixtures', kind: 'points', points }];
  const xBreak = moleRatio.breakRatio;
  const xMax = Math.max(0, ...points.map((p) => p.x));
  const { rising, plateau } = moleRatio;
  if (rising && xBreak !== null)
    series.push({
      label: 'Rising line',
      kind: 'line',
      points: [0, xBreak].map((x) => ({ x, y: rising.slope * x + rising.intercept })),
    });
  if (plateau && xBreak !== null)
    series.push({
      label: 'Plateau',
      kind: 'line',
      points: [xBreak, Math.max(xBreak, xMax)].map((x) => ({ x, y: plateau.slope * x + plateau.intercept })),
    });
  const varied = moleRatio.varied;
  const fixed = varied === 'B' ? 'A' : 'B';
  return {
    series,
    xTitle: `Mole ratio ${varied}₀/${fixed}₀`,
    yTitle: 'Corrected absorbance (AU)',
    summary:
      xBreak === null
        ? `Mole-ratio plot of ${points.length} mixtures; no break found.`
        : `Mole-ratio plot of ${points.length} mixtures; the lines meet at ${varied}:${fixed} = ${formatNumber(xBreak)}.`,
  };
}
