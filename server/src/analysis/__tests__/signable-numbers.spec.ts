import { calibrate } from '../calibration';
import { mandelTest } from '../mandel-test';
import { moleRatioAnalysis } from '../mole-ratio';
import { findMoleRatioSeries } from '../mole-ratio-series';
import {
  formatK,
  formatKValue,
  formatNumber,
  kUnit,
  kUnitOf,
  roundSignificant,
  significantDigits,
} from '../number-format';
import { profileInterval } from '../profile-likelihood';
import { fitQuadratic } from '../quadratic-regression';
import { studentTQuantile } from '../student-t';
import { lre, readJson, readXy } from './reference-data';

interface Certified {
  parameters: Record<string, { estimate: number; std_dev: number }>;
  residual_standard_deviation: number;
}

describe('profile-likelihood interval', () => {
  it('equals slope ± t·SE for a straight line (NIST StRD Norris, certified slope and SE)', () => {
    // Source: NIST/ITL StRD Norris (shared/reference/Norris_certified.json). For a model linear in θ the
    // likelihood region is exactly the t interval, so the certified SE fixes the limits.
    const { x, y } = readXy('Norris');
    const cert = readJson<Certified>('Norris_certified.json');
    const n = x.length;
    const xm = x.reduce((s, v) => s + v, 0) / n;
    const ym = y.reduce((s, v) => s + v, 0) / n;
    const rssAt = (slope: number): number =>
      x.reduce((s, xi, i) => s + (y[i] - ym - slope * (xi - xm)) ** 2, 0);
    const b1 = cert.parameters.B1;
    const t = studentTQuantile(0.975, n - 2);
    const p = profileInterval(rssAt, b1.estimate, rssAt(b1.estimate), n - 2, {
      range: [b1.estimate - 1, b1.estimate + 1],
      tolerance: 1e-13,
      initialStep: 1e-4,
    });
    expect(lre(p.lower95 as number, b1.estimate - t * b1.std_dev)).toBeGreaterThan(8);
    expect(lre(p.upper95 as number, b1.estimate + t * b1.std_dev)).toBeGreaterThan(8);
    const t95 = studentTQuantile(0.95, n - 2);
    expect(lre(p.lowerOneSided95 as number, b1.estimate - t95 * b1.std_dev)).toBeGreaterThan(8);
  });

  it('reports a side that the profile never leaves as unbounded', () => {
    // A profile that flattens out to the right: only a lower limit exists.
    const p = profileInterval((t) => 1 + 1 / (1 + Math.exp(3 * t)), 10, 1 + 1 / (1 + Math.exp(30)), 50, {
      range: [-10, 10],
    });
    expect(p.upper95).toBeNull();
    expect(p.upperOneSided95).toBeNull();
    expect(p.lower95).not.toBeNull();
    expect(p.lowerOneSided95 as number).toBeGreaterThan(p.lower95 as number);
  });
});

describe('calibration linearity (ISO 8466-1 Mandel test) and extrapolated limits', () => {
  it('fits the certified quadratic of NIST StRD Pontius to ≥ 7 digits', () => {
    // Source: NIST/ITL StRD Pontius (shared/reference/Pontius_certified.json), a quadratic calibration.
    const { x, y } = readXy('Pontius');
    const cert = readJson<Certified>('Pontius_certified.json');
    const q = fitQuadratic(x, y);
    ['B0', 'B1', 'B2'].forEach((name, i) => {
      expect(lre(q.coefficients[i], cert.parameters[name].estimate)).toBeGreaterThan(7);
      expect(lre(q.standardErrors[i], cert.parameters[name].std_dev)).toBeGreaterThan(6);
    });
    expect(lre(q.residualSd, cert.residual_standard_deviation)).toBeGreaterThan(7);
  });

  it('calls Pontius curved and Norris (a straight-line dataset) not curved', () => {
    const pontius = readXy('Pontius');
    expect(mandelTest(pontius.x, pontius.y)?.curved).toBe(true);
    const norris = readXy('Norris');
    expect(mandelTest(norris.x, norris.y)?.curved).toBe(false);
  });

  it('flags a Beer–Lambert calibration that bends at high absorbance (invented standards)', () => {
    const c = [0, 1e-4, 2e-4, 3e-4, 4e-4, 5e-4, 6e-4, 7e-4];
    // Stray-light-like saturation (invented): A = 2000·c − 9×10⁵·c².
    const cal = calibrate(
      c.map((ci, i) => ({
        concentrationM: ci,
        absorbance: 2000 * ci - 9e5 * ci * ci + [1, -1, 1, -1, 1, -1, 1, -1][i] * 5e-4,
      })),
    );
    expect(cal.linearity?.curved).toBe(true);
    const straight = calibrate(
      c.map((ci, i) => ({
        concentrationM: ci,
        absorbance: 2000 * ci + [1, -1, 1, -1, 1, -1, 1, -1][i] * 5e-4,
      })),
    );
    expect(straight.linearity?.curved).toBe(false);
  });

  it('labels an LOD or LOQ below the lowest standard as extrapolated', () => {
    const cal = calibrate(
      [2e-4, 4e-4, 6e-4, 8e-4, 1e-3].map((c, i) => ({
        concentrationM: c,
        absorbance: 1000 * c + [2, -1, 0, 1, -2][i] * 1e-4,
      })),
    );
    expect(cal.lowestStandardM).toBe(2e-4);
    expect(cal.lodM).toBeLessThan(2e-4);
    expect(cal.lodExtrapolated).toBe(true);
    expect(cal.loqExtrapolated).toBe(cal.loqM < 2e-4);
  });
});

describe('mole-ratio method', () => {
  it('finds the break at B:A = 2 for complete 1:2 binding and at 1 for 1:1 (invented, noise-free)', () => {
    const ratios = [0.25, 0.5, 0.75, 1, 1.25, 1.5, 1.75, 2.25, 2.5, 3, 3.5, 4];
    const two = moleRatioAnalysis(
      ratios.map((r) => ({ ratio: r, absorbance: 0.3 * Math.min(r / 2, 1) })),
      'B',
    );
    expect(two.breakRatio as number).toBeCloseTo(2, 6);
    expect(two.nearestModel).toBe('1:2');
    const one = moleRatioAnalysis(
      ratios.map((r) => ({ ratio: r, absorbance: 0.3 * Math.min(r, 1) })),
      'B',
    );
    expect(one.breakRatio as number).toBeCloseTo(1, 6);
    expect(one.nearestModel).toBe('1:1');
    // With A varied, 2:1 breaks at A:B = 2.
    const a = moleRatioAnalysis(
      ratios.map((r) => ({ ratio: r, absorbance: 0.3 * Math.min(r / 2, 1) })),
      'A',
    );
    expect(a.nearestModel).toBe('2:1');
  });

  it('names no stoichiometry from an excess-only series (no combining ratio inside it; invented)', () => {
    // Moderate 1:1 binding, B from 5- to 40-fold excess: a curve that bends but holds no B:A = b/a point.
    const r = moleRatioAnalysis(
      [5, 10, 15, 20, 30, 40].map((ratio) => ({ ratio, absorbance: (0.5 * ratio) / (ratio + 12) })),
      'B',
    );
    expect(r.nearestModel).toBeNull();
  });

  it('recognises a series with one reactant held', () => {
    const series = findMoleRatioSeries(
      [1, 2, 3, 4, 5, 6].map((i) => ({ a0M: 1e-4, b0M: i * 5e-5 })).concat([{ a0M: 3e-4, b0M: 1e-4 }]),
      0.02,
      6,
    );
    expect(series.fixed).toBe('A');
    expect(series.indices).toEqual([0, 1, 2, 3, 4, 5]);
  });
});

describe('one number format', () => {
  it('writes K with its unit from the model', () => {
    expect(kUnit(1, 1)).toBe('L·mol⁻¹');
    expect(kUnitOf('1:2')).toBe('L²·mol⁻²');
    expect(kUnitOf('2:1')).toBe('L²·mol⁻²');
    expect(kUnitOf('1:3')).toBe('L³·mol⁻³');
  });

  it('rounds for CSV and JSON without binary noise', () => {
    expect(roundSignificant(0.1 + 0.2, 4)).toBe(0.3);
    expect(roundSignificant(839.4123, 3)).toBe(839);
  });

  it('shows a value to the second digit of its uncertainty (GUM §7.2.6)', () => {
    expect(significantDigits(839.4, 19)).toBe(3);
    expect(significantDigits(839.4, 1.9)).toBe(4);
    expect(formatNumber(2.412e35)).toBe('2.41 × 10³⁵');
    expect(formatNumber(839.41)).toBe('839');
  });

  it('states each kind of K in words, never as a bare number when there is none', () => {
    const base = { model: '1:1', kLowerBound95: null, kUpperBound95: null };
    expect(formatK({ ...base, status: 'determined', k: 839.4, kCi95: [810.9, 886.3] })).toBe(
      '839 L·mol⁻¹ (95 % CI 811 to 886)',
    );
    expect(
      formatK({ ...base, model: '1:2', status: 'lower-bound', k: null, kCi95: null, kLowerBound95: 2.1e6 }),
    ).toBe('> 2.1 × 10⁶ L²·mol⁻² (95 % lower bound; too large to determine from these concentrations)');
    expect(formatK({ ...base, status: 'poorly-determined', k: 900, kCi95: [140, 6500] })).toBe(
      'between 140 and 6500 L·mol⁻¹ (poorly determined)',
    );
    expect(
      formatK({ ...base, status: 'not-converged', k: null, kCi95: null, message: 'iteration limit' }),
    ).toBe('did not converge: iteration limit');
    expect(formatKValue({ ...base, status: 'not-converged', k: null, kCi95: null })).toBe('—');
  });
});
