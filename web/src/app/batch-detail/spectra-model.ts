import type {
  AnalysisSettings,
  KStatement,
  KStatus,
  ReactantSpectrumSetting,
  SpectralAnalysisResult,
  SpectralFitResult,
  SpectralSettings,
} from '@equilight/analysis';
import type { ChartSeries, ScatterChartModel } from '../shared/chart/chart-data';
import { type ScaleRange, VIRIDIS_CONTROL_POINTS, viridis } from '../shared/chart/colour-scale';
import { DASH, EPSILON_UNIT, formatK, formatNumber } from '../shared/format/number-format';

export { MIN_SPECTRUM_WAVELENGTHS, hasSpectra } from './spectra-presence';

/** The section's own what-if settings; the rest (exclusions, candidates, path) come from the page's. */
export interface SpectraOptions {
  fromNm: number | null;
  toNm: number | null;
  nonNegativeSpectra: boolean;
  reactantA: ReactantSpectrumSetting;
  reactantB: ReactantSpectrumSetting;
}

export const DEFAULT_SPECTRA_OPTIONS: SpectraOptions = {
  fromNm: null,
  toNm: null,
  nonNegativeSpectra: false,
  reactantA: 'fitted',
  reactantB: 'fitted',
};

export const REACTANT_CHOICES: readonly { value: ReactantSpectrumSetting; label: string }[] = [
  { value: 'fitted', label: 'fitted with the others' },
  { value: 'none', label: 'does not absorb' },
  { value: 'from-pure-mixtures', label: 'held at its own mixtures’ spectrum' },
];

/**
 * The whole-spectrum settings: the batch's (with the page's what-if edits: exclusions, candidates, path
 * length, fitted baseline) and the section's own. A fitted baseline is not combined with non-negative
 * spectra (they exclude each other), so asking for non-negative spectra leaves the baseline out.
 */
export function spectraSettings(base: AnalysisSettings, o: SpectraOptions): SpectralSettings {
  return {
    pathLengthCm: base.pathLengthCm,
    pathLengthByPositionCm: base.pathLengthByPositionCm,
    candidates: base.candidates,
    exclusions: base.exclusions,
    ambiguityDeltaAic: base.ambiguityDeltaAic,
    ruledOutDeltaAic: base.ruledOutDeltaAic,
    fit: base.fit,
    solver: base.solver,
    fitBaseline: o.nonNegativeSpectra ? false : base.fitBaseline,
    fromNm: o.fromNm,
    toNm: o.toNm,
    nonNegativeSpectra: o.nonNegativeSpectra,
    reactantA: o.reactantA,
    reactantB: o.reactantB,
  };
}

/** A wavelength as the page writes it elsewhere: "450", "632.8" (no trailing zeros). */
export function nmText(wavelengthNm: number): string {
  return String(Number(wavelengthNm.toFixed(2)));
}

/** A colour per series along viridis, stopping short of its pale end (kept readable on white). */
function seriesColour(i: number, n: number): string {
  return viridis(n <= 1 ? 0 : (0.85 * i) / (n - 1));
}

/** Every mixture's blank-corrected spectrum, coloured along the mixtures' order. */
export function overlayChart(r: SpectralAnalysisResult): ScatterChartModel {
  const n = r.mixtures.length;
  const series: ChartSeries[] = r.mixtures.map((m, i) => ({
    label: m.sampleId,
    kind: 'line',
    colour: seriesColour(i, n),
    points: r.wavelengthsNm.map((x, j) => ({ x, y: r.absorbance[i][j] })),
  }));
  const all = r.absorbance.flat();
  const lo = Math.min(...r.wavelengthsNm);
  const hi = Math.max(...r.wavelengthsNm);
  return {
    series,
    legend: n <= 8,
    xTitle: 'Wavelength (nm)',
    yTitle: 'Corrected absorbance (AU)',
    summary:
      `Spectra of ${n} mixtures from ${nmText(lo)} to ${nmText(hi)} nm, blank-corrected; ` +
      `absorbance from ${formatNumber(Math.min(...all))} to ${formatNumber(Math.max(...all))}.`,
  };
}

/** log₁₀ of the singular values in order, with the noise level as a dashed line. */
export function screeChart(r: SpectralAnalysisResult): ScatterChartModel {
  const shown = r.singularValues.slice(0, 20);
  const points = shown.flatMap((v, i) => (v > 0 ? [{ x: i + 1, y: Math.log10(v) }] : []));
  const series: ChartSeries[] = [{ label: 'Singular values', kind: 'points', points }];
  if (r.noiseLevel > 0)
    series.push({
      label: 'Noise level',
      kind: 'line',
      colour: '#b3245c',
      dashed: true,
      points: [
        { x: 1, y: Math.log10(r.noiseLevel) },
        { x: Math.max(2, shown.length), y: Math.log10(r.noiseLevel) },
      ],
    });
  return {
    series,
    xTitle: 'Component',
    yTitle: 'log₁₀ singular value',
    summary:
      `Singular values of the absorbance matrix: ${r.speciesCount} above the noise level ` +
      `${formatNumber(r.noiseLevel)}, so ${r.speciesCount} absorbing species.`,
  };
}

/** One fit's species spectra, ε against λ, each with dashed lines at ε ± SE. */
export function speciesChart(fit: SpectralFitResult, wavelengthsNm: readonly number[]): ScatterChartModel {
  const n = fit.speciesSpectra.length;
  const series: ChartSeries[] = [];
  fit.speciesSpectra.forEach((s, i) => {
    const colour = seriesColour(i, n);
    series.push({
      label: `${s.species}${s.source === 'held' ? ' (held)' : ''}`,
      kind: 'line',
      colour,
      points: wavelengthsNm.map((x, j) => ({ x, y: s.epsilon[j] })),
    });
    if (s.se.some((v) => v !== null))
      for (const sign of [1, -1])
        series.push({
          label: `${s.species} ${sign > 0 ? '+' : '−'} SE`,
          kind: 'line',
          colour,
          dashed: true,
          hideInLegend: true,
          points: wavelengthsNm.flatMap((x, j) => {
            const se = s.se[j];
            return se === null ? [] : [{ x, y: s.epsilon[j] + sign * se }];
          }),
        });
  });
  const peaks = fit.speciesSpectra.map((s) => {
    const j = s.epsilon.reduce((best, v, k) => (v > s.epsilon[best] ? k : best), 0);
    return `${s.species} peaks at ${nmText(wavelengthsNm[j])} nm (ε ${formatNumber(s.epsilon[j])})`;
  });
  return {
    series,
    xTitle: 'Wavelength (nm)',
    yTitle: `ε (${EPSILON_UNIT})`,
    summary: `Species spectra of the ${fit.model} fit, dashed lines at ± one standard error: ${peaks.join('; ')}.`,
  };
}

/** The residual map of one fit: mixtures × wavelengths on a scale symmetric about zero. */
export interface ResidualGrid {
  rows: string[];
  wavelengthsNm: number[];
  values: number[][];
  range: ScaleRange;
  maxAbs: number;
  summary: string;
}

export function residualGrid(r: SpectralAnalysisResult, fit: SpectralFitResult): ResidualGrid {
  const maxAbs = Math.max(0, ...fit.residuals.flat().map(Math.abs));
  const m = maxAbs > 0 ? maxAbs : 1e-3;
  let worst = { i: 0, j: 0 };
  fit.residuals.forEach((row, i) =>
    row.forEach((v, j) => {
      if (Math.abs(v) > Math.abs(fit.residuals[worst.i][worst.j])) worst = { i, j };
    }),
  );
  const rows = r.mixtures.map((mx) => mx.sampleId);
  return {
    rows,
    wavelengthsNm: r.wavelengthsNm,
    values: fit.residuals,
    range: { min: -m, max: m },
    maxAbs,
    summary:
      `Residuals (measured − fitted absorbance) of the ${fit.model} fit, ${rows.length} mixtures × ` +
      `${r.wavelengthsNm.length} wavelengths: residual SD ${formatNumber(fit.residualSd)}, largest ` +
      `${formatNumber(maxAbs)} (${rows[worst.i] ?? DASH} at ${nmText(r.wavelengthsNm[worst.j])} nm).`,
  };
}

/** The colours of the residual map's legend: its gradient and three labelled values. */
export function residualLegend(grid: ResidualGrid): { gradient: string; ticks: string[] } {
  return {
    gradient: `linear-gradient(to right, ${VIRIDIS_CONTROL_POINTS.join(', ')})`,
    ticks: [formatNumber(grid.range.min), '0', formatNumber(grid.range.max)],
  };
}

/** A whole-spectrum fit as a K statement (the one K format). */
export function kStatementOf(fit: SpectralFitResult): KStatement {
  return {
    model: fit.model,
    status: fit.kStatus,
    k: fit.k,
    kCi95: fit.kCi95,
    kLowerBound95: fit.kLowerBound95,
    kUpperBound95: fit.kUpperBound95,
    message: fit.message,
  };
}

/** One row of the candidates table: model, rank, K with interval, AIC, ΔAIC, convergence, verdict. */
export interface SpectraCandidateRow {
  model: string;
  rank: number | null;
  k: string;
  status: KStatus;
  aic: string;
  deltaAic: string;
  converged: boolean;
  verdict: 'best' | 'ruled out' | 'possible';
  reason: string;
}

/** The candidates in the order they were fitted (the settings' order), so rows never jump; "best" marks the best. */
export function candidateRows(r: SpectralAnalysisResult): SpectraCandidateRow[] {
  const byModel = new Map(r.ranking.ranked.map((ranked) => [ranked.model, ranked]));
  return r.candidates.flatMap((fit) => {
    const ranked = byModel.get(fit.model);
    if (!ranked) return [];
    return [
      {
        model: fit.model,
        rank: ranked.rank,
        k: formatK(kStatementOf(fit)),
        status: fit.kStatus,
        aic: fit.aic === null ? DASH : fit.aic.toFixed(1),
        deltaAic: ranked.deltaAic === null ? DASH : ranked.deltaAic.toFixed(1),
        converged: fit.converged,
        verdict: ranked.model === r.best ? 'best' : ranked.ruledOut ? 'ruled out' : 'possible',
        reason: ranked.reason,
      },
    ];
  });
}

/** K of the best candidate for the section's headline; null when no candidate fits best. */
export function spectraHeadline(r: SpectralAnalysisResult): { model: string; text: string } | null {
  const fit = r.candidates.find((c) => c.model === r.best);
  return fit ? { model: fit.model, text: formatK(kStatementOf(fit)) } : null;
}

/** The fit whose spectra and residuals are shown: the one asked for, else the best, else the first. */
export function shownFit(r: SpectralAnalysisResult, model: string | null): SpectralFitResult | null {
  return (
    r.candidates.find((c) => c.model === model) ??
    r.candidates.find((c) => c.model === r.best) ??
    r.candidates[0] ??
    null
  );
}
