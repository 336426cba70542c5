import { candidateEvidence, rankCandidates } from '../../batch-step-stoichiometry';
import { resolveAnalysisSettings } from '../../options';
import { parseStoichiometry } from '../../stoichiometry-model';
import { EPSILON, ironThiocyanateBatch, K1, runToMixtures } from './iron-thiocyanate';

describe('stoichiometry step (Fe³⁺ + SCN⁻, K₁ = 98 M⁻¹ from de Berg et al. 2016)', () => {
  const held = runToMixtures(ironThiocyanateBatch());
  const step = rankCandidates(held.mix.usable, held.mix.candidates, held.mix.epsilonSource, held.s);

  it('ranks 1:1 first and its headline fit recovers the published K₁ with ε held', () => {
    const st = step.stoichiometry!;
    expect(st.best).toBe('1:1');
    const top = st.candidates[0];
    expect(top.model).toBe('1:1');
    expect(top.rank).toBe(1);
    expect(top.kUnit).toBe('L·mol⁻¹');
    expect(top.fit?.epsilonFixed).toBe(true);
    expect(top.fit?.epsilonLPerMolCm).toBe(EPSILON);
    // Seeded noise of 0.001 absorbance: K within 5 % of 98 M⁻¹, and inside its own 95 % interval.
    expect(Math.abs(top.fit!.k! / K1 - 1)).toBeLessThan(0.05);
    const [lo, hi] = top.fit!.kCi95!;
    expect(lo).toBeLessThan(K1);
    expect(hi).toBeGreaterThan(K1);
    // Per-mixture K (ICE table) agrees with the global fit.
    expect(Math.abs(top.kMean! / K1 - 1)).toBeLessThan(0.05);
  });

  it('keeps the free-ε fit as the cross-check and its note among the candidate’s warnings', () => {
    const top = step.stoichiometry!.candidates[0];
    expect(top.freeFit?.epsilonFixed).toBe(false);
    expect(top.warnings.some((w) => w.includes('with ε fitted too (cross-check)'))).toBe(true);
    expect(step.warnings).toEqual(top.warnings);
  });

  it('counts the mixtures a candidate is impossible for', () => {
    const oneTwo = step.stoichiometry!.candidates.find((c) => c.model === '1:2')!;
    expect(oneTwo.nInfeasible).toBeGreaterThan(0);
    expect(oneTwo.nFeasible + oneTwo.nInfeasible).toBe(held.mix.usable.length);
  });

  it('keeps every candidate’s headline fit by label', () => {
    expect([...step.fits.keys()].sort()).toEqual([...held.s.candidates].sort());
    for (const c of step.stoichiometry!.candidates) expect(step.fits.get(c.model)).toBe(c.fit);
  });

  it('fits ε with K when the batch has no ε, with no per-mixture K and no cross-check', () => {
    const free = runToMixtures(ironThiocyanateBatch(), { candidates: ['1:1'] });
    const e = candidateEvidence(free.mix.usable, parseStoichiometry('1:1'), free.mix.epsilonSource, free.s);
    expect(e.kStats).toBeNull();
    expect(e.freeFit).toBeNull();
    expect(e.fit.epsilonFixed).toBe(false);
    expect(Math.abs(e.fit.epsilonLPerMolCm! / EPSILON - 1)).toBeLessThan(0.1);
  });

  it('has nothing to rank without a usable mixture', () => {
    expect(
      rankCandidates([], held.mix.candidates, held.mix.epsilonSource, resolveAnalysisSettings({})),
    ).toEqual({
      stoichiometry: null,
      fits: new Map(),
      warnings: [],
    });
  });
});
