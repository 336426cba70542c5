import type { AnalysisSettings, SpectralAnalysisResult } from '@equilight/analysis';
import { runSpectra } from './spectra-compute';
import {
  EPSILON_A,
  EPSILON_AB,
  SPECTRA_K,
  SPECTRA_WAVELENGTHS,
  complexOneToOne,
  spectraPlate,
} from './spectra-fixture';
import {
  DEFAULT_SPECTRA_OPTIONS,
  candidateRows,
  hasSpectra,
  overlayChart,
  residualGrid,
  screeChart,
  shownFit,
  speciesChart,
  spectraHeadline,
  spectraSettings,
} from './spectra-model';

const BASE: AnalysisSettings = { pathLengthCm: 1, candidates: ['1:1', '1:2'] };
// B is transparent in the invented system: said so, the fits hold two absorbing species, as counted.
const OPTIONS = { ...DEFAULT_SPECTRA_OPTIONS, reactantB: 'none' as const };

describe('Spectra section model (an invented two-species titration read as spectra)', () => {
  const plate = spectraPlate();
  let result: SpectralAnalysisResult;

  beforeAll(() => {
    const outcome = runSpectra(plate.readings, plate.samples, spectraSettings(BASE, OPTIONS));
    expect(outcome.error).toBeNull();
    result = outcome.result!;
  });

  it('shows itself only for spectra: ≥ 10 wavelengths at a position', () => {
    expect(hasSpectra(plate.readings)).toBe(true);
    const few = plate.readings.filter((r) => r.wavelengthNm <= 440); // 9 wavelengths
    expect(hasSpectra(few)).toBe(false);
    const one = plate.readings.filter((r) => r.wavelengthNm === 500);
    expect(hasSpectra(one)).toBe(false);
  });

  it('counts two absorbing species and recovers K of the 1:1 complex within its interval', () => {
    expect(result.speciesCount).toBe(2);
    expect(result.best).toBe('1:1');
    const best = shownFit(result, null)!;
    expect(best.model).toBe('1:1');
    // The invented data were made from K = 2500 L/mol with the closed-form 1:1 quadratic.
    expect(Math.abs(best.k! / SPECTRA_K - 1)).toBeLessThan(0.05);
    const [lo, hi] = best.kCi95 as [number, number];
    expect(lo).toBeLessThan(SPECTRA_K);
    expect(hi).toBeGreaterThan(SPECTRA_K);
    const headline = spectraHeadline(result)!;
    expect(headline.model).toBe('1:1');
    expect(headline.text).toMatch(/^[\d.]+ L·mol⁻¹ \(95 % CI [\d.]+ to [\d.]+\)$/);
  });

  it('ranks the candidates by AIC, best first, with K, its unit, AIC and convergence', () => {
    const rows = candidateRows(result);
    expect(rows.map((r) => r.model)).toEqual(['1:1', '1:2']);
    expect(rows[0]).toMatchObject({ rank: 1, verdict: 'best', converged: true, deltaAic: '0.0' });
    expect(rows[0].k).toContain('L·mol⁻¹');
    expect(rows[1].k === '—' || rows[1].k.includes('L²·mol⁻²')).toBe(true);
    expect(Number(rows[1].deltaAic)).toBeGreaterThan(2);
    const aic = result.candidates.find((c) => c.model === '1:1')!.aic!;
    expect(rows[0].aic).toBe(aic.toFixed(1));
  });

  it('overlays one blank-corrected spectrum per mixture that follows Beer–Lambert', () => {
    const chart = overlayChart(result);
    expect(chart.series).toHaveLength(plate.mixtures.length);
    expect(chart.series.every((s) => s.points.length === SPECTRA_WAVELENGTHS.length)).toBe(true);
    expect(chart.xTitle).toBe('Wavelength (nm)');
    expect(chart.legend).toBe(false); // 18 mixtures: colour order, not a legend
    // Beer–Lambert (1 cm): A = ε_A·[A] + ε_AB·[AB], computed here from the closed form; noise SD 0.001.
    plate.mixtures.forEach((m, i) => {
      const ab = complexOneToOne(SPECTRA_K, m.a0M, m.b0M);
      const j = SPECTRA_WAVELENGTHS.indexOf(510);
      const expected = EPSILON_A[j] * (m.a0M - ab) + EPSILON_AB[j] * ab;
      expect(Math.abs(chart.series[i].points[j].y - expected)).toBeLessThan(0.005);
      expect(chart.series[i].points[j].x).toBe(510);
    });
  });

  it('marks the noise level on the scree plot with as many singular values above it as species', () => {
    const chart = screeChart(result);
    const [values, noise] = chart.series;
    expect(noise.dashed).toBe(true);
    const level = noise.points[0].y;
    expect(values.points.filter((p) => p.y > level)).toHaveLength(2);
    expect(values.points[0]).toEqual({ x: 1, y: Math.log10(result.singularValues[0]) });
    expect(chart.summary).toContain('2 absorbing species');
  });

  it('draws each species’ spectrum with ± SE lines, close to the invented spectra', () => {
    const fit = shownFit(result, '1:1')!;
    const chart = speciesChart(fit, result.wavelengthsNm);
    const main = chart.series.filter((s) => !s.hideInLegend);
    expect(main.map((s) => s.label)).toEqual(['A', 'AB']);
    expect(chart.series.filter((s) => s.hideInLegend && s.dashed)).toHaveLength(4);
    const peak = SPECTRA_WAVELENGTHS.indexOf(510);
    const ab = main[1].points[peak].y;
    expect(Math.abs(ab / EPSILON_AB[peak] - 1)).toBeLessThan(0.05);
    const upper = chart.series.find((s) => s.label === 'AB + SE')!;
    expect(upper.points[peak].y).toBeGreaterThan(ab);
    expect(chart.yTitle).toBe('ε (L·mol⁻¹·cm⁻¹)');
  });

  it('maps the residuals on a scale symmetric about zero, mixtures × wavelengths', () => {
    const fit = shownFit(result, '1:1')!;
    const grid = residualGrid(result, fit);
    expect(grid.rows).toHaveLength(plate.mixtures.length);
    expect(grid.values[0]).toHaveLength(SPECTRA_WAVELENGTHS.length);
    expect(grid.range.min).toBe(-grid.range.max);
    expect(grid.maxAbs).toBeLessThan(0.006); // noise SD 0.001 on mixtures and on the mean blank
    expect(grid.summary).toMatch(/18 mixtures × 41 wavelengths/);
  });

  it('passes the page’s settings on, and leaves the fitted baseline out with non-negative spectra', () => {
    const base: AnalysisSettings = {
      ...BASE,
      fitBaseline: true,
      exclusions: [{ position: 'A5', reason: 'bubble' }],
    };
    const plain = spectraSettings(base, { ...OPTIONS, fromNm: 420, toNm: 580 });
    expect(plain).toMatchObject({ fitBaseline: true, fromNm: 420, toNm: 580, reactantB: 'none' });
    expect(plain.exclusions).toEqual(base.exclusions);
    expect(spectraSettings(base, { ...OPTIONS, nonNegativeSpectra: true }).fitBaseline).toBe(false);
  });
});
