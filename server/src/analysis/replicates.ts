/** Mean, SD and CV of a replicate group. */
export interface ReplicateStats {
  /** Usable values. */
  n: number;
  /** Values that were missing or not finite (skipped, never read as zero). */
  skipped: number;
  mean: number | null;
  /** Sample SD (n − 1); null with n < 2. */
  sd: number | null;
  /** SD/|mean| as a fraction; null when undefined. */
  cv: number | null;
}

/**
 * Replicate statistics: x̄ = Σx/n (with a corrective second pass), s = √(Σ(x − x̄)²/(n − 1)), CV = s/|x̄|.
 * Null and non-finite values are skipped and counted, never treated as zero.
 *
 * Units: those of the values (absorbance); CV a fraction.
 * Reference: ISO 3534-1:2006 (sample mean, sample standard deviation, coefficient of variation).
 *
 * @example
 * replicateStats([0.51, 0.49, null]); // { n: 2, skipped: 1, mean: 0.5, sd: 0.01414…, cv: 0.0283… }
 */
export function replicateStats(values: readonly (number | null)[]): ReplicateStats {
  const v = values.filter((x): x is number => x !== null && Number.isFinite(x));
  const n = v.length;
  const skipped = values.length - n;
  if (n === 0) return { n, skipped, mean: null, sd: null, cv: null };
  let s = 0;
  for (const x of v) s += x;
  let mean = s / n;
  let c = 0;
  for (const x of v) c += x - mean;
  mean += c / n;
  if (n < 2) return { n, skipped, mean, sd: null, cv: null };
  let ss = 0;
  for (const x of v) ss += (x - mean) ** 2;
  const sd = Math.sqrt(ss / (n - 1));
  return { n, skipped, mean, sd, cv: mean !== 0 ? sd / Math.abs(mean) : null };
}
