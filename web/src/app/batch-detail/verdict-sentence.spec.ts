import { formatK } from '@equilight/analysis';
import { fixtureAnalysis } from './analysis-fixture';
import {
  calibrationOnlyAnalysis,
  lowerBoundAnalysis,
  notConvergedAnalysis,
  poorlyDeterminedAnalysis,
} from './analysis-variants-fixture';
import { noVerdictText, shortVerdict } from './verdict-sentence';

const sentence = (v: ReturnType<typeof shortVerdict>) => (v ? `${v.lead} ${v.kWord} ${v.kText}` : null);

describe('the short verdict (real analyses of invented batches)', () => {
  it('a determined K: model, K with unit and 95 % interval, in the headline’s own words', () => {
    const r = fixtureAnalysis().result;
    // Invented readings made from K = 620 L/mol (analysis-fixture.ts); the interval must hold it.
    expect(sentence(shortVerdict(r))).toBe(`1:1 fits best: K = ${formatK(r.headline)}`);
    expect(r.headline!.kCi95![0]).toBeLessThan(620);
    expect(r.headline!.kCi95![1]).toBeGreaterThan(620);
  });

  it('a lower bound, a poorly determined K and a failed fit keep their short wording', () => {
    const lower = lowerBoundAnalysis().result;
    expect(lower.headline!.status).toBe('lower-bound');
    expect(sentence(shortVerdict(lower))).toBe(`1:1 fits best: K ${lower.headline!.text}`);
    expect(shortVerdict(lower)!.kText).toMatch(/^> /);

    const poor = poorlyDeterminedAnalysis().result;
    expect(poor.headline!.status).toBe('poorly-determined');
    expect(shortVerdict(poor)!.kText).toContain('poorly determined');
    expect(shortVerdict(poor)!.kText.length).toBeLessThan(poor.stoichiometry!.verdict.length + 80);

    const failed = notConvergedAnalysis().result;
    const v = shortVerdict(failed);
    if (v) expect(v.kText).not.toMatch(/^\d/);
  });

  it('no mixtures: no K, and a sentence that says why', () => {
    const r = calibrationOnlyAnalysis().result;
    expect(shortVerdict(r)).toBeNull();
    expect(noVerdictText(r)).toBe('No equilibrium mixtures in this batch.');
  });
});
