import { benesiHildebrandStep, crossChecks, jobStep, moleRatioStep } from '../../batch-step-cross-checks';
import { rankCandidates } from '../../batch-step-stoichiometry';
import { jobSeries, moleRatioSeriesB, simulate } from '../batch-fixtures';
import { readJson } from '../reference-data';
import { ironThiocyanateBatch, K1, runToMixtures } from './iron-thiocyanate';

/** Job's maxima x_B = b/(a + b) (shared/reference/other_facts.json, a mathematical fact). */
const jobMaxima = readJson<{ jobs_method_max_mole_fraction: { cases: Record<string, number> } }>(
  'other_facts.json',
).jobs_method_max_mole_fraction.cases;

/** An invented strong complex (binding complete within the noise) in the given design, up to the mixtures. */
const strong = (model: string, mixtures: [number, number][]) =>
  runToMixtures(
    simulate({ model, k: model === '1:1' ? 1e10 : 1e15, epsilon: 3000, mixtures, noiseSd: 0.001 }),
    {},
  );

describe('cross-checks step', () => {
  it.each([
    ['1:1', '1:1'],
    ['1:2', 'M:L 1:2'],
  ])("Job's method finds the maximum of a %s complex at x_B = b/(a + b)", (model, key) => {
    const r = strong(model, jobSeries());
    const job = jobStep(r.mix.usable, r.mix.candidates, r.s)!;
    expect(job.maxMoleFractionB).toBeCloseTo(jobMaxima[key], 1);
    expect(job.nearestModel).toBe(model);
    expect(job.sampleIds).toHaveLength(11);
    // A₀ + B₀ = 5×10⁻⁴ M for the whole series.
    expect(job.totalConcentrationM).toBeCloseTo(5e-4, 12);
  });

  it('the mole-ratio method puts the break of a strong 1:1 complex at B/A = 1', () => {
    // Source: Yoe J.H. & Jones A.L. (1944) Ind. Eng. Chem. Anal. Ed. 16, 111: the break lies at the
    // combining ratio b/a.
    const r = strong('1:1', moleRatioSeriesB());
    const mr = moleRatioStep(r.mix.usable, r.mix.candidates, r.s)!;
    expect(mr.fixed).toBe('A');
    expect(mr.fixedConcentrationM).toBeCloseTo(1e-4, 12);
    expect(Math.abs(mr.breakRatio! - 1)).toBeLessThan(0.05);
    expect(mr.nearestModel).toBe('1:1');
    expect(jobStep(r.mix.usable, r.mix.candidates, r.s)).toBeNull();
  });

  it('Benesi–Hildebrand on Fe³⁺ in excess gives K₁ near 98 M⁻¹ and near the global 1:1 fit', () => {
    // Source: Benesi & Hildebrand (1949) J. Am. Chem. Soc. 71, 2703; K₁ = 98 M⁻¹ (de Berg et al.
    // 2016, chemistry_refs.json). [Fe³⁺] ≥ 50 × [SCN⁻]: the free-iron approximation holds to ~2 %.
    const r = runToMixtures(ironThiocyanateBatch());
    const st = rankCandidates(r.mix.usable, r.mix.candidates, r.mix.epsilonSource, r.s);
    const bh = benesiHildebrandStep(r.mix.usable, st.fits, r.s)!;
    expect(bh.applicable).toBe(true);
    expect(bh.reason).toMatch(
      /^1:1 double-reciprocal line over 7 mixtures with A in ≥ \d+(\.\d+)?-fold excess$/,
    );
    expect(Math.abs(bh.result!.k! / K1 - 1)).toBeLessThan(0.08);
    expect(Math.abs(bh.kRatioToGlobalFit! - 1)).toBeLessThan(0.08);
  });

  it('Benesi–Hildebrand is not applicable without an excess, and absent without mixtures', () => {
    const r = strong('1:1', jobSeries());
    const bh = benesiHildebrandStep(r.mix.usable, new Map(), r.s)!;
    expect(bh).toMatchObject({ applicable: false, sampleIds: [], result: null, kRatioToGlobalFit: null });
    expect(bh.reason).toMatch(/^needs at least \d+ mixtures with one reactant in ≥ /);
    expect(benesiHildebrandStep([], new Map(), r.s)).toBeNull();
  });

  it('gathers the three', () => {
    const r = strong('1:1', jobSeries());
    const all = crossChecks(r.mix.usable, r.mix.candidates, new Map(), r.s);
    expect(all.job).toEqual(jobStep(r.mix.usable, r.mix.candidates, r.s));
    expect(all.moleRatio).toEqual(moleRatioStep(r.mix.usable, r.mix.candidates, r.s));
    expect(all.benesiHildebrand).toEqual(benesiHildebrandStep(r.mix.usable, new Map(), r.s));
  });
});
