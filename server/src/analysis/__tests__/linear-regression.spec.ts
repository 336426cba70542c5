import fc from 'fast-check';
import * as ss from 'simple-statistics';
import { calibrate } from '../calibration';
import { detectionLimits } from '../detection-limits';
import { concentrationFromAbsorbance } from '../inverse-prediction';
import { fitLinear } from '../linear-regression';
import { lre, readJson, readXy } from './reference-data';

interface LinearCertified {
  parameters: Record<string, { estimate: number; std_dev: number }>;
  residual_standard_deviation: number;
  r_squared: number;
}

describe('fitLinear', () => {
  it('reproduces NIST StRD Norris (certified values) to at least 9 significant digits', () => {
    // Source: NIST/ITL StRD linear regression dataset Norris (shared/reference/Norris_certified.json).
    const { x, y } = readXy('Norris');
    const cert = readJson<LinearCertified>('Norris_certified.json');
    const fit = fitLinear(x, y);
    expect(lre(fit.intercept, cert.parameters.B0.estimate)).toBeGreaterThanOrEqual(9);
    expect(lre(fit.slope, cert.parameters.B1.estimate)).toBeGreaterThanOrEqual(9);
    expect(lre(fit.interceptSe as number, cert.parameters.B0.std_dev)).toBeGreaterThanOrEqual(9);
    expect(lre(fit.slopeSe, cert.parameters.B1.std_dev)).toBeGreaterThanOrEqual(9);
    expect(lre(fit.residualSd, cert.residual_standard_deviation)).toBeGreaterThanOrEqual(9);
    expect(lre(fit.r2, cert.r_squared)).toBeGreaterThanOrEqual(9);
  });

  it.each(['NoInt1', 'NoInt2'])(
    'reproduces NIST StRD %s (through the origin, uncentred R²) to 9 digits',
    (name) => {
      // Source: NIST/ITL StRD no-intercept datasets (shared/reference/<name>_certified.json).
      const { x, y } = readXy(name);
      const cert = readJson<LinearCertified>(`${name}_certified.json`);
      const fit = fitLinear(x, y, true);
      expect(lre(fit.slope, cert.parameters.B1.estimate)).toBeGreaterThanOrEqual(9);
      expect(lre(fit.slopeSe, cert.parameters.B1.std_dev)).toBeGreaterThanOrEqual(9);
      expect(lre(fit.residualSd, cert.residual_standard_deviation)).toBeGreaterThanOrEqual(9);
      expect(lre(fit.r2, cert.r_squared)).toBeGreaterThanOrEqual(9);
      expect(fit.interceptSe).toBeNull();
    },
  );

  it('agrees with simple-statistics on random data', () => {
    // Source: simple-statistics (npm) linearRegression and rSquared.
    fc.assert(
      fc.property(
        fc.array(
          fc.tuple(
            fc.double({ min: -1e3, max: 1e3, noNaN: true }),
            fc.double({ min: -1e3, max: 1e3, noNaN: true }),
          ),
          {
            minLength: 3,
            maxLength: 40,
          },
        ),
        (pairs) => {
          const x = pairs.map((p) => p[0]);
          const y = pairs.map((p) => p[1]);
          fc.pre(ss.variance(x) > 1e-3);
          const fit = fitLinear(x, y);
          const ref = ss.linearRegression(pairs);
          const line = ss.linearRegressionLine(ref);
          const scale = Math.max(1, ...y.map(Math.abs));
          expect(Math.abs(fit.slope - ref.m)).toBeLessThanOrEqual(1e-8 * (Math.abs(ref.m) + scale));
          expect(Math.abs(fit.intercept - ref.b)).toBeLessThanOrEqual(1e-8 * (Math.abs(ref.b) + scale * 1e3));
          if (ss.variance(y) > 1e-6) {
            expect(fit.r2).toBeCloseTo(ss.rSquared(pairs, line), 8);
          }
        },
      ),
      { seed: 42, numRuns: 200 },
    );
  });

  it('is invariant to the order of the rows (property)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.integer({ min: -1000, max: 1000 }), fc.integer({ min: -1000, max: 1000 })), {
          minLength: 3,
          maxLength: 30,
        }),
        fc.integer(),
        (pairs, seed) => {
          fc.pre(new Set(pairs.map((p) => p[0])).size > 1);
          const shuffled = pairs
            .map((p, i) => ({ p, k: Math.sin(seed + i * 7.1) }))
            .sort((a, b) => a.k - b.k)
            .map((e) => e.p);
          const a = fitLinear(
            pairs.map((p) => p[0]),
            pairs.map((p) => p[1]),
          );
          const b = fitLinear(
            shuffled.map((p) => p[0]),
            shuffled.map((p) => p[1]),
          );
          expect(b.slope).toBeCloseTo(a.slope, 9);
          expect(b.intercept).toBeCloseTo(a.intercept, 6);
          expect(b.residualSd).toBeCloseTo(a.residualSd, 6);
        },
      ),
      { seed: 7, numRuns: 100 },
    );
  });

  it('refuses too few points and a constant x', () => {
    expect(() => fitLinear([1, 2], [1, 2])).toThrow(/at least 3/);
    expect(() => fitLinear([2, 2, 2], [1, 2, 3])).toThrow(/all x values are equal/);
  });
});

describe('detection limits and inverse prediction', () => {
  it('follows ICH Q2(R1): LOD = 3.3σ/S and LOQ = 10σ/S (values derived from NIST Norris)', () => {
    // Source: ICH Q2(R1) formulas (shared/reference/other_facts.json); numbers in Norris_derived_checks.json
    // were computed from the NIST-certified Norris residual SD and slope (derived, not certified).
    const derived = readJson<Record<string, number>>('Norris_derived_checks.json');
    const cert = readJson<LinearCertified>('Norris_certified.json');
    const byResidual = detectionLimits(cert.residual_standard_deviation, cert.parameters.B1.estimate);
    expect(byResidual.lod).toBeCloseTo(derived.LOD_resid_sd, 12);
    expect(byResidual.loq).toBeCloseTo(derived.LOQ_resid_sd, 12);
    const byIntercept = detectionLimits(cert.parameters.B0.std_dev, cert.parameters.B1.estimate);
    expect(byIntercept.lod).toBeCloseTo(derived.LOD_intercept_sd, 12);
    expect(byIntercept.loq).toBeCloseTo(derived.LOQ_intercept_sd, 12);
  });

  it('reads x back from y on the Norris line (Norris_derived_checks.json x_from_y_100)', () => {
    const { x, y } = readXy('Norris');
    const cal = calibrate(
      x.map((c, i) => ({ concentrationM: c, absorbance: y[i] })),
      { linearRangeMaxAbsorbance: 1e6 },
    );
    const derived = readJson<Record<string, number>>('Norris_derived_checks.json');
    expect(
      lre(concentrationFromAbsorbance(cal, 100).concentrationM, derived.x_from_y_100),
    ).toBeGreaterThanOrEqual(9);
    expect(lre(cal.lodM, derived.LOD_resid_sd)).toBeGreaterThanOrEqual(9);
  });

  it('gives the textbook inverse-prediction SE (Miller & Miller eq. 5.9) and applies the dilution factor', () => {
    const cal = calibrate(
      [0, 1e-4, 2e-4, 3e-4, 4e-4].map((c, i) => ({
        concentrationM: c,
        absorbance: 1000 * c + [0.002, -0.001, 0.003, -0.002, 0.001][i],
      })),
    );
    const a = 0.25;
    const s = cal.residualSd;
    const b = cal.slope;
    const expected = (s / b) * Math.sqrt(1 / 2 + 1 / 5 + (a - cal.absorbanceMean) ** 2 / (b * b * cal.sxx));
    const r = concentrationFromAbsorbance(cal, a, 2, 10);
    expect(r.seM).toBeCloseTo(expected * 10, 15);
    expect(r.concentrationM).toBeCloseTo(((a - cal.intercept) / b) * 10, 15);
  });

  it('flags standards above the linear range and outlying residuals', () => {
    const c = [1e-4, 2e-4, 3e-4, 4e-4, 5e-4, 6e-4, 7e-4, 8e-4, 9e-4];
    const noise = [0.001, -0.002, 0.0015, -0.001, 0.0005, -0.0015, 0.001, 0.06, -0.001];
    const cal = calibrate(
      c.map((v, i) => ({ concentrationM: v, absorbance: 1250 * v + noise[i], position: `C${i + 1}` })),
    );
    expect(cal.points.filter((p) => p.aboveLinearRange).map((p) => p.position)).toEqual(['C8', 'C9']);
    expect(cal.points.filter((p) => p.outlier).map((p) => p.position)).toEqual(['C8']);
    expect(cal.epsilonLPerMolCm).toBeCloseTo(cal.slope, 12);
  });
});
