import { analyzeBatch } from '../batch';
import { BatchResult } from '../batch-types';
import { solveEquilibrium } from '../equilibrium-solve';
import { fitEquilibriumModel } from '../global-fit';
import { formatK } from '../number-format';
import { parseStoichiometry } from '../stoichiometry-model';
import { stoichiometryCrossChecks } from '../stoichiometry-cross-checks';
import { Design, jobSeries, moleRatioSeriesA, moleRatioSeriesB, simulate } from './batch-fixtures';
import { readJson } from './reference-data';

/** Job's maxima b/(a+b) for a complex A_aB_b (shared/reference/other_facts.json, a mathematical fact). */
const jobMaxima = readJson<{ jobs_method_max_mole_fraction: { cases: Record<string, number> } }>(
  'other_facts.json',
).jobs_method_max_mole_fraction.cases;

const errors = (r: BatchResult): string[] => r.qc.filter((f) => f.severity === 'error').map((f) => f.message);
const best = (r: BatchResult) => r.stoichiometry?.candidates.find((c) => c.model === r.stoichiometry?.best);

describe('strong complexes (K·c ≫ 100): the right stoichiometry, K as a lower bound, no contradicting error (invented data)', () => {
  // K·c^(a+b−1) ≈ 10⁶ – 10⁸ at these concentrations: binding is complete within the noise.
  const cases: { model: string; k: number; epsilon: number; design: 'job' | 'ratio-B' | 'ratio-A' }[] = [
    { model: '1:1', k: 1e10, epsilon: 4000, design: 'job' },
    { model: '1:2', k: 1e15, epsilon: 3000, design: 'job' },
    { model: '2:1', k: 1e15, epsilon: 3000, design: 'job' },
    { model: '1:1', k: 1e10, epsilon: 4000, design: 'ratio-B' },
    { model: '1:2', k: 1e15, epsilon: 3000, design: 'ratio-B' },
    { model: '2:1', k: 1e15, epsilon: 3000, design: 'ratio-A' },
  ];
  for (const c of cases) {
    it(`${c.model} in a ${c.design === 'job' ? "Job's" : 'mole-ratio'} design`, () => {
      const mixtures =
        c.design === 'job' ? jobSeries() : c.design === 'ratio-B' ? moleRatioSeriesB() : moleRatioSeriesA();
      const { readings, samples } = simulate({ ...c, mixtures, noiseSd: 0.002 });
      const r = analyzeBatch(readings, samples);
      expect(r.stoichiometry?.best).toBe(c.model);
      const top = best(r);
      expect(top?.fit?.status).toBe('lower-bound');
      expect(top?.fit?.k).toBeNull();
      const lowerBound = top?.fit?.kLowerBound95 as number;
      expect(lowerBound).toBeGreaterThan(0);
      // A one-sided 95 % lower bound must lie below the truth.
      expect(lowerBound).toBeLessThan(c.k);
      expect(r.headline?.text).toMatch(
        /^> .* \(95 % lower bound; too large to determine from these concentrations\)$/,
      );
      expect(r.headline?.kUnit).toBe(c.model === '1:1' ? 'L·mol⁻¹' : 'L²·mol⁻²');
      expect(errors(r)).toEqual([]);
      expect(r.qc.some((f) => f.code === 'k-lower-bound')).toBe(true);
      if (c.design === 'job') {
        // Source: Job's maxima, shared/reference/other_facts.json.
        const key = c.model === '1:1' ? '1:1' : `M:L ${c.model}`;
        expect(r.job?.maxMoleFractionB as number).toBeCloseTo(jobMaxima[key], 1);
        expect(r.job?.nearestModel).toBe(c.model);
      } else {
        expect(r.moleRatio?.nearestModel).toBe(c.model);
        const ratio = c.design === 'ratio-B' ? top!.b / top!.a : top!.a / top!.b;
        expect(Math.abs((r.moleRatio?.breakRatio as number) / ratio - 1)).toBeLessThan(0.05);
      }
      expect(r.qc.some((f) => f.code === 'job-disagrees' || f.code === 'mole-ratio-disagrees')).toBe(false);
    });
  }

  it("a strong 1:2 Job's series is no longer called 1:1 (the 1:2 fit's AIC decides)", () => {
    const { readings, samples } = simulate({
      model: '1:2',
      k: 1e15,
      epsilon: 3000,
      mixtures: jobSeries(),
      noiseSd: 0.002,
    });
    const r = analyzeBatch(readings, samples);
    const one = r.stoichiometry?.candidates.find((c) => c.model === '1:1');
    const two = best(r);
    expect((one?.fit?.aic as number) - (two?.fit?.aic as number)).toBeGreaterThan(10);
    expect(two?.ruledOut).toBe(false);
    expect(r.stoichiometry?.verdict).toMatch(/^1:2 fits best, with K too large to determine/);
  });

  it('tris(1,10-phenanthroline)iron(II), log β₃ ≈ 21.3 (from memory, handbook order of magnitude), peaks at x_L = 0.75', () => {
    // Ferroin is the classic 1:3 Job's example; its maximum at 0.75 is in other_facts.json (M:L 1:3).
    const { readings, samples } = simulate({
      model: '1:3',
      k: 10 ** 21.3,
      epsilon: 11100, // ε(510 nm) ≈ 1.11 × 10⁴ L·mol⁻¹·cm⁻¹ (from memory)
      mixtures: Array.from(
        { length: 11 },
        (_, i) => [1e-4 * (1 - i / 10), 1e-4 * (i / 10)] as [number, number],
      ),
      noiseSd: 0.002,
    });
    const r = analyzeBatch(readings, samples);
    expect(r.stoichiometry?.best).toBe('1:3');
    expect(r.job?.maxMoleFractionB as number).toBeCloseTo(jobMaxima['M:L 1:3'], 1);
    expect(best(r)?.fit?.status).toBe('lower-bound');
    expect(r.headline?.kUnit).toBe('L³·mol⁻³');
    expect(errors(r)).toEqual([]);
  });
});

describe('one K, from the ε the batch says (invented plate, K = 2000 L·mol⁻¹)', () => {
  const design: Design = {
    model: '1:1',
    k: 2000,
    epsilon: 1800,
    standards: true,
    noiseSd: 0.002,
    seed: 11,
    // A held at 2×10⁻⁴ M with B rising, plus a Job's series: K·c ≈ 0.4 – 2, well determined.
    mixtures: [
      ...[0.5, 1, 2, 3, 4, 6, 8].map((r) => [2e-4, r * 2e-4] as [number, number]),
      ...[0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9].map(
        (x) => [1e-3 * (1 - x), 1e-3 * x] as [number, number],
      ),
    ],
  };
  const { readings, samples } = simulate(design);
  const r = analyzeBatch(readings, samples);
  const top = best(r)!;

  it('the headline fit holds ε at the standards’ value; the free-ε fit is the cross-check', () => {
    expect(r.epsilonSource.kind).toBe('standards');
    expect(top.fit?.epsilonFixed).toBe(true);
    expect(top.fit?.epsilonLPerMolCm).toBeCloseTo(r.calibration!.epsilonLPerMolCm, 6);
    expect(top.freeFit?.epsilonFixed).toBe(false);
    expect(top.warnings.some((w) => w.includes('with ε fitted too (cross-check)'))).toBe(true);
  });

  it('the headline K agrees with the per-mixture K', () => {
    expect(Math.abs((top.fit!.k as number) / (top.kMean as number) - 1)).toBeLessThan(0.1);
    expect(r.headline?.k).toBe(top.fit?.k);
    expect(r.headline?.text).toBe(formatK(top.fit));
  });

  it('its 95 % interval (profile likelihood, ε and intercept propagated) covers the truth in about 95 % of repeats', () => {
    let covered = 0;
    const repeats = 40;
    for (let seed = 100; seed < 100 + repeats; seed++) {
      const sim = simulate({ ...design, seed });
      const fit = best(analyzeBatch(sim.readings, sim.samples))!.fit!;
      const [lo, hi] = fit.kCi95 as [number, number];
      if (lo < design.k && hi > design.k) covered++;
    }
    // Binomial(40, 0.95): at least 34 covered with probability > 0.99.
    expect(covered).toBeGreaterThanOrEqual(34);
  });

  it('a typed ε moves the headline and the per-mixture K together', () => {
    const typed = analyzeBatch(readings, samples, { epsilonLPerMolCm: 1800 * 1.1, epsilonSeLPerMolCm: 10 });
    const t = best(typed)!;
    expect(typed.epsilonSource.kind).toBe('given');
    expect(t.fit?.epsilonLPerMolCm).toBeCloseTo(1980, 9);
    expect(t.fit?.k).not.toBeCloseTo(top.fit!.k as number, 0);
    // Both now read the same ε: headline and per-mixture mean move in the same direction.
    expect(Math.sign((t.fit!.k as number) - (top.fit!.k as number))).toBe(
      Math.sign((t.kMean as number) - (top.kMean as number)),
    );
  });

  it('a wrong typed ε makes the held and the free fit disagree: a QC warning', () => {
    const wrong = analyzeBatch(readings, samples, { epsilonLPerMolCm: 1800 * 1.6, epsilonSeLPerMolCm: 5 });
    expect(wrong.qc.find((f) => f.code === 'k-fits-disagree')?.severity).toBe('warning');
  });
});

describe('a fit that does not converge is never shown as a number', () => {
  it('reads "did not converge" with the reason', () => {
    const { readings, samples } = simulate({
      model: '1:1',
      k: 2000,
      epsilon: 1800,
      noiseSd: 0.002,
      mixtures: [0.5, 1, 2, 3, 4, 6].map((r) => [2e-4, r * 2e-4] as [number, number]),
    });
    const r = analyzeBatch(readings, samples, { fit: { maxIterations: 1 } });
    for (const c of r.stoichiometry?.candidates ?? []) {
      if (c.fit?.status === 'not-converged') {
        expect(c.fit.k).toBeNull();
        expect(formatK(c.fit)).toMatch(/^did not converge: /);
      }
    }
    expect(r.stoichiometry?.candidates.some((c) => c.fit?.status === 'not-converged')).toBe(true);
  });
});

describe('poorly determined K is an interval, never "±314 %" (invented data)', () => {
  it('flags an interval wider than a decade and prints it as an interval', () => {
    // Weak binding (K·c ≈ 0.05) with noisy absorbances: K barely constrained.
    const pts = [1, 2, 3, 4, 5, 6].map((i) => {
      const a0M = 1e-4;
      const b0M = i * 5e-5;
      const x = solveEquilibrium(500, a0M, b0M, parseStoichiometry('1:1')).productM;
      return {
        a0M,
        b0M,
        absorbance: 2000 * x + [0.001, -0.0012, 0.0007, -0.0004, 0.0011, -0.0009][i - 1],
        pathLengthCm: 1,
      };
    });
    const fit = fitEquilibriumModel(pts, parseStoichiometry('1:1'));
    expect(['poorly-determined', 'upper-bound', 'not-determined']).toContain(fit.status);
    expect(formatK(fit)).not.toMatch(/±/);
    if (fit.status === 'poorly-determined')
      expect(formatK(fit)).toMatch(/^between .* \(poorly determined\)$/);
  });
});

describe("cross-checks: Job's maximum and the mole-ratio break against the chosen stoichiometry", () => {
  const job = {
    n: 9,
    maxMoleFractionB: 0.667,
    impliedRatioBToA: 2,
    nearestModel: '1:2',
    absorbanceAtMax: 0.5,
    sharpness: 0.97,
    left: null,
    right: null,
    message: '',
    sampleIds: [],
    totalConcentrationM: 5e-4,
  };
  it('a sharp Job maximum that disagrees is a warning naming both', () => {
    const [f] = stoichiometryCrossChecks('1:1', job, null);
    expect(f.code).toBe('job-disagrees');
    expect(f.severity).toBe('warning');
    expect(f.message).toContain('1:2');
    expect(f.message).toContain('1:1');
  });
  it('a rounded one is only a note, and agreement says nothing', () => {
    expect(stoichiometryCrossChecks('1:1', { ...job, sharpness: 0.6 }, null)[0].severity).toBe('info');
    expect(stoichiometryCrossChecks('1:2', job, null)).toEqual([]);
  });
});

describe('every candidate keeps its own fit notes', () => {
  it('a losing candidate’s warnings stay beside it', () => {
    const { readings, samples } = simulate({
      model: '1:2',
      k: 1e15,
      epsilon: 3000,
      mixtures: jobSeries(),
      noiseSd: 0.002,
    });
    const r = analyzeBatch(readings, samples);
    const losers = r.stoichiometry!.candidates.filter((c) => c.model !== r.stoichiometry!.best);
    expect(losers.every((c) => Array.isArray(c.warnings))).toBe(true);
    expect(losers.some((c) => c.warnings.length > 0)).toBe(true);
  });
});
