import { levenbergMarquardt } from '../levenberg-marquardt';
import { studentTCdf, studentTQuantile } from '../student-t';
import * as ss from 'simple-statistics';
import { lre, readJson, readXy } from './reference-data';

interface NonlinearCertified {
  parameters: Record<string, { start1: number; start2: number; estimate: number; std_dev: number }>;
  residual_sum_of_squares: number;
  residual_standard_deviation: number;
}

type Model = (b: readonly number[], x: number) => number;

// Model functions as printed in the NIST StRD .dat files.
const MODELS: Record<string, Model> = {
  Misra1a: ([b1, b2], x) => b1 * (1 - Math.exp(-b2 * x)),
  Misra1b: ([b1, b2], x) => b1 * (1 - (1 + (b2 * x) / 2) ** -2),
  Misra1c: ([b1, b2], x) => b1 * (1 - (1 + 2 * b2 * x) ** -0.5),
  Misra1d: ([b1, b2], x) => (b1 * b2 * x) / (1 + b2 * x),
  Chwirut2: ([b1, b2, b3], x) => Math.exp(-b1 * x) / (b2 + b3 * x),
  DanWood: ([b1, b2], x) => b1 * x ** b2,
};

describe('levenbergMarquardt against the NIST StRD nonlinear regression datasets', () => {
  // Source: NIST/ITL StRD nonlinear least-squares reference datasets (shared/reference/<name>_certified.json).
  const cases = Object.keys(MODELS).flatMap((name) => [
    [name, 'start1'],
    [name, 'start2'],
  ]);
  it.each(cases)(
    '%s from %s reaches the certified estimates to ≥ 6 digits (numerical Jacobian)',
    (name, start) => {
      const { x, y } = readXy(name);
      const cert = readJson<NonlinearCertified>(`${name}_certified.json`);
      const keys = Object.keys(cert.parameters);
      const init = keys.map((k) => cert.parameters[k][start as 'start1' | 'start2']);
      const f = MODELS[name];
      const r = levenbergMarquardt({ evaluate: (p) => x.map((v) => f(p, v)) }, y, init);
      expect(r.converged).toBe(true);
      keys.forEach((k, j) => {
        expect(lre(r.params[j], cert.parameters[k].estimate)).toBeGreaterThanOrEqual(6);
        // Standard errors from the Jacobian: certified to ≥ 4 digits (finite differences limit them).
        expect(lre(r.standardErrors[j] as number, cert.parameters[k].std_dev)).toBeGreaterThanOrEqual(4);
      });
      expect(lre(r.rss, cert.residual_sum_of_squares)).toBeGreaterThanOrEqual(6);
      expect(lre(r.residualSd as number, cert.residual_standard_deviation)).toBeGreaterThanOrEqual(6);
    },
  );

  it('uses an analytic Jacobian when given one (Misra1a, start 1)', () => {
    const { x, y } = readXy('Misra1a');
    const cert = readJson<NonlinearCertified>('Misra1a_certified.json');
    const r = levenbergMarquardt(
      {
        evaluate: (p) => x.map((v) => p[0] * (1 - Math.exp(-p[1] * v))),
        jacobian: (p) => x.map((v) => [1 - Math.exp(-p[1] * v), p[0] * v * Math.exp(-p[1] * v)]),
      },
      y,
      [cert.parameters.b1.start1, cert.parameters.b2.start1],
    );
    expect(lre(r.params[0], cert.parameters.b1.estimate)).toBeGreaterThanOrEqual(8);
    expect(lre(r.standardErrors[0] as number, cert.parameters.b1.std_dev)).toBeGreaterThanOrEqual(6);
  });

  it('reports non-convergence instead of guessing when the iteration limit is hit', () => {
    const { x, y } = readXy('Misra1a');
    const r = levenbergMarquardt(
      { evaluate: (p) => x.map((v) => p[0] * (1 - Math.exp(-p[1] * v))) },
      y,
      [500, 1e-4],
      {
        maxIterations: 2,
      },
    );
    expect(r.converged).toBe(false);
    expect(r.message).toMatch(/maximum of 2 iterations/);
  });
});

describe('Student t quantiles used for confidence intervals', () => {
  it('matches the closed forms for 1 and 2 degrees of freedom (mathematics)', () => {
    // df = 1 (Cauchy): t = tan(π(p − ½)); df = 2: t = (2p − 1)/√(2p(1 − p)).
    for (const p of [0.6, 0.9, 0.975, 0.995]) {
      expect(studentTQuantile(p, 1)).toBeCloseTo(Math.tan(Math.PI * (p - 0.5)), 9);
      expect(studentTQuantile(p, 2)).toBeCloseTo((2 * p - 1) / Math.sqrt(2 * p * (1 - p)), 9);
    }
  });

  it('matches printed t tables to 3 decimals (NIST/SEMATECH e-Handbook table 1.3.6.7.2, from memory)', () => {
    expect(studentTQuantile(0.975, 5)).toBeCloseTo(2.571, 3);
    expect(studentTQuantile(0.975, 10)).toBeCloseTo(2.228, 3);
    expect(studentTQuantile(0.975, 30)).toBeCloseTo(2.042, 3);
  });

  it('tends to the normal distribution of simple-statistics for large df', () => {
    // Source: simple-statistics errorFunction (normal CDF Φ(z) = ½(1 + erf(z/√2))).
    for (const z of [0.5, 1.2, 1.96, 2.8]) {
      expect(studentTCdf(z, 1e7)).toBeCloseTo(0.5 * (1 + ss.errorFunction(z / Math.SQRT2)), 6);
    }
    expect(studentTCdf(studentTQuantile(0.9, 7), 7)).toBeCloseTo(0.9, 12);
  });
});
