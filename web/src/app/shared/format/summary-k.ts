import { DASH, formatKValue, kUnitOf } from './number-format';
import type { BatchResultSummary } from '../../batches/batch';

/** The K of a batch for a list cell, and its full statement for a tooltip or screen reader. */
export interface SummaryK {
  /** "1:1" or null without a best candidate. */
  model: string | null;
  /** "839 L·mol⁻¹", "> 4.2 × 10⁸ L·mol⁻¹", "140 to 6500 L·mol⁻¹", or words when there is no number. */
  value: string;
  /** A word for anything but a determined K ("lower bound", "poorly determined", …); null when determined. */
  qualifier: string | null;
  /** formatK's full sentence, as the batch page and reports state it. */
  text: string;
}

const QUALIFIER = {
  determined: null,
  'poorly-determined': 'poorly determined',
  'lower-bound': 'lower bound',
  'upper-bound': 'upper bound',
  'not-converged': 'did not converge',
  'not-determined': 'not determined',
} as const;

/**
 * The short K of a batch summary: the value (or bound, or interval) with its unit, the way
 * formatKValue writes a table cell. A fit that gave no number reads as words, never as a number.
 */
export function summaryK(summary: BatchResultSummary | null): SummaryK {
  if (!summary?.best) return { model: null, value: DASH, qualifier: null, text: '' };
  const model = summary.best;
  const status = summary.kStatus ?? (summary.k !== null ? 'determined' : 'not-determined');
  const value = formatKValue({
    model,
    status,
    k: summary.k,
    kCi95: summary.kCi95,
    kLowerBound95: summary.kLowerBound95,
    kUpperBound95: summary.kUpperBound95,
  });
  const unit = summary.kUnit || kUnitOf(model);
  const qualifier = QUALIFIER[status];
  return {
    model,
    value: value === DASH ? (qualifier ?? DASH) : `${value} ${unit}`,
    qualifier: value === DASH ? null : qualifier,
    text: summary.kText ?? '',
  };
}
