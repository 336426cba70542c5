import type { BatchResult } from '../../analysis';
import { headlinesDiffer, sameValue } from '../batches.service';

/** Just the parts of a result its headline reads. */
function result(best: string, fit: Record<string, unknown>): BatchResult {
  return {
    qc: [],
    stoichiometry: { best, verdict: '', candidates: [{ model: best, fit }] },
  } as unknown as BatchResult;
}

describe('comparing an approved headline with a re-analysis', () => {
  it('when only rounding noise differs then it is the same; at the 6th significant figure it differs', () => {
    expect(sameValue(841.2345678, 841.2345678 * (1 + 1e-9))).toBe(true);
    expect(sameValue(841.2345, 841.2355)).toBe(false);
    expect(sameValue([800, 880], [800, 880])).toBe(true);
    expect(sameValue(null, undefined)).toBe(true);
  });

  it('when the best model, K or its interval changes then it differs', () => {
    const approved = result('1:1', { k: 841, kCi95: [807, 876] });
    expect(headlinesDiffer(approved, result('1:1', { k: 841, kCi95: [807, 876] }))).toBe(false);
    expect(headlinesDiffer(approved, result('1:2', { k: 841, kCi95: [807, 876] }))).toBe(true);
    expect(headlinesDiffer(approved, result('1:1', { k: 850, kCi95: [807, 876] }))).toBe(true);
    expect(headlinesDiffer(approved, result('1:1', { k: 841, kCi95: null }))).toBe(true);
  });

  it('when a later engine reports a fit status the old one did not then that alone is no difference; a changed status is', () => {
    const old = result('1:1', { k: 841, kCi95: [807, 876] });
    const later = result('1:1', { k: 841, kCi95: [807, 876], status: 'determined', kLowerBound95: null });
    expect(headlinesDiffer(old, later)).toBe(false);
    const bound = result('1:1', { k: 841, kCi95: [807, 876], status: 'lower-bound', kLowerBound95: 500 });
    expect(headlinesDiffer(later, bound)).toBe(true);
  });
});
