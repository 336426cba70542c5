import { rankCandidates } from '../../batch-step-stoichiometry';
import { monteCarloBestK, propagateBestK } from '../../batch-step-uncertainty';
import { resolveAnalysisSettings } from '../../options';
import { EPSILON, ironThiocyanateBatch, K1, runToMixtures } from './iron-thiocyanate';

describe('uncertainty step (Fe³⁺ + SCN⁻, K₁ = 98 M⁻¹ from de Berg et al. 2016)', () => {
  const settings = { epsilonLPerMolCm: EPSILON, epsilonSeLPerMolCm: 50, monteCarlo: { draws: 400, seed: 5 } };
  const r = runToMixtures(ironThiocyanateBatch(), settings);
  const st = rankCandidates(r.mix.usable, r.mix.candidates, r.mix.epsilonSource, r.s);
  const propagated = propagateBestK(st.stoichiometry, st.fits, r.mix.measurements, r.mix.usable.length, r.s);

  it('propagates the input uncertainties to the best candidate’s K', () => {
    expect(propagated?.model).toBe('1:1');
    expect(propagated?.fit).toBe(st.fits.get('1:1'));
    const p = propagated!.propagation!;
    expect(p.k).toBe(propagated!.fit.k);
    expect(Math.abs(p.k / K1 - 1)).toBeLessThan(0.05);
    expect(p.lnKSd).toBeGreaterThan(0);
    expect(p.kSd).toBeGreaterThan(0);
  });

  it('agrees with a Monte Carlo over the same inputs (GUM vs GUM Supplement 1)', () => {
    // Source: JCGM 101:2008 §8 (from memory) — the Monte Carlo method validates the law of propagation
    // of uncertainty (JCGM 100:2008) when the model is nearly linear over the inputs' spread. 15 % on
    // the standard uncertainty of ln K is about four standard errors of an SD from 400 draws (1/√800).
    const out = monteCarloBestK(propagated, r.mix.measurements, r.s);
    const mc = out.uncertainty!.monteCarlo!;
    expect(out.uncertainty!.model).toBe('1:1');
    expect(out.uncertainty!.propagation).toBe(propagated!.propagation);
    expect(mc.draws).toBe(400);
    expect(mc.seed).toBe(5);
    expect(Math.abs(mc.lnKSd / propagated!.propagation!.lnKSd - 1)).toBeLessThan(0.15);
    expect(mc.kCi95[0]).toBeLessThan(mc.kMedian);
    expect(mc.kCi95[1]).toBeGreaterThan(mc.kMedian);
    expect(out.warnings).toEqual(mc.failed > 0 ? [expect.stringMatching(/^Monte Carlo: /)] : []);
    // Seeded: the same draws give the same interval.
    expect(monteCarloBestK(propagated, r.mix.measurements, r.s).uncertainty!.monteCarlo!.kCi95).toEqual(
      mc.kCi95,
    );
  });

  it('runs no Monte Carlo when the settings ask for no draws', () => {
    const s0 = resolveAnalysisSettings({ ...settings, monteCarlo: { draws: 0 } });
    expect(monteCarloBestK(propagated, r.mix.measurements, s0).uncertainty?.monteCarlo).toBeNull();
  });

  it('gives nothing without a determined best K or when a usable mixture has no measurement', () => {
    expect(propagateBestK(null, st.fits, r.mix.measurements, r.mix.usable.length, r.s)).toBeNull();
    expect(
      propagateBestK(st.stoichiometry, new Map(), r.mix.measurements, r.mix.usable.length, r.s),
    ).toBeNull();
    expect(
      propagateBestK(st.stoichiometry, st.fits, r.mix.measurements.slice(1), r.mix.usable.length, r.s),
    ).toBeNull();
    const bound = new Map([['1:1', { ...st.fits.get('1:1')!, status: 'lower-bound' as const, k: null }]]);
    expect(propagateBestK(st.stoichiometry, bound, r.mix.measurements, r.mix.usable.length, r.s)).toBeNull();
    expect(monteCarloBestK(null, r.mix.measurements, r.s)).toEqual({ uncertainty: null, warnings: [] });
  });
});
