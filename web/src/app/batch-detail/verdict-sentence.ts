import type { BatchResult } from '@equilight/analysis';

/** The batch's result in one short sentence: which model and its K; the long verdict goes behind "Details". */
export interface ShortVerdict {
  /** Words before K, e.g. "1:1 fits best:" or "1:1 and 1:2 cannot be told apart; for 1:1,". */
  lead: string;
  /** "K =" before a value, "K" before a bound or a reason ("K > 2.1 × 10⁶ …", "K did not converge: …"). */
  kWord: string;
  /** The headline's own K text (formatK: value, unit and interval, or the short wording of its state). */
  kText: string;
}

/**
 * The one-sentence result shown at the top of the batch page, built from the result's headline so it
 * reads as every report and mail does. Null when there is no K to state (see {@link noVerdictText}).
 */
export function shortVerdict(r: BatchResult): ShortVerdict | null {
  const h = r.headline;
  if (!h) return null;
  const s = r.stoichiometry;
  const second = s?.ambiguous ? s.candidates.find((c) => c.model !== h.model && c.rank === 2) : undefined;
  const lead = second
    ? `${h.model} and ${second.model} cannot be told apart; for ${h.model},`
    : `${h.model} fits best:`;
  const equals = h.status === 'determined' || (h.status === 'poorly-determined' && !h.kCi95);
  return { lead, kWord: equals ? 'K =' : 'K', kText: h.text };
}

/** What the top of the page says when there is no K. */
export function noVerdictText(r: BatchResult): string {
  if (!r.mixtures.length) return 'No equilibrium mixtures in this batch.';
  if (!r.stoichiometry) return 'No equilibrium result yet.';
  return 'No K: no candidate stoichiometry could be fitted.';
}
