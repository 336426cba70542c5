import { type ManifestCheck, type ManifestMismatch, type ManifestProblem, manifestRefusal } from './manifest';

/** What the last check (or refused save) of a manifest found, and whether its inputs changed since. */
export interface ManifestReview {
  /** The last check's answer; its samples are shown on the map. */
  readonly result: ManifestCheck | null;
  readonly problems: readonly ManifestProblem[];
  readonly mismatches: readonly ManifestMismatch[];
  /** Whether the problem list reflects a check at all. */
  readonly checked: boolean;
  /** Checked, but the inputs changed since. */
  readonly stale: boolean;
  /** The server refused only for mismatches with the layout: offer to save accepting them. */
  readonly offerAccept: boolean;
}

export const NOT_CHECKED: ManifestReview = {
  result: null,
  problems: [],
  mismatches: [],
  checked: false,
  stale: false,
  offerAccept: false,
};

export function checkedReview(result: ManifestCheck): ManifestReview {
  const { problems, mismatches } = result;
  return { result, problems, mismatches, checked: true, stale: false, offerAccept: false };
}

/** After an edit: a checked list becomes stale and saving anyway is no longer offered (same object if nothing changes). */
export function changedReview(review: ManifestReview): ManifestReview {
  if (!review.offerAccept && (!review.checked || review.stale)) return review;
  return { ...review, stale: review.stale || review.checked, offerAccept: false };
}

/** A refused save lists the problems or mismatches the server names; mismatches alone offer to save anyway. */
export function refusedReview(review: ManifestReview, err: unknown): ManifestReview {
  const refusal = manifestRefusal(err);
  if (refusal?.code === 'invalid_manifest') {
    const { problems, mismatches } = refusal;
    return { ...review, problems, mismatches, checked: true, stale: false };
  }
  if (refusal?.code === 'manifest_mismatch') {
    const { mismatches } = refusal;
    return { ...review, problems: [], mismatches, checked: true, stale: false, offerAccept: true };
  }
  return review;
}
