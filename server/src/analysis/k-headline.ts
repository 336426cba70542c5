import { CandidateResult, KHeadline } from './batch-types';
import { formatK } from './number-format';

/**
 * The batch's one K: the best candidate's global fit as a statement (value with interval, bound, or
 * reason), with its unit and text. Every screen, report, mail and the CLI print this, so the same K
 * reads the same everywhere.
 *
 * Units: K M^(1−a−b), written in L and mol.
 * Reference: profile-likelihood intervals, Bates & Watts (1988) §6.1.
 *
 * @example
 * kHeadline(result.stoichiometry.candidates[0])?.text; // "839 L·mol⁻¹ (95 % CI 811 to 886)"
 */
export function kHeadline(best: CandidateResult | null | undefined): KHeadline | null {
  const fit = best?.fit;
  if (!best || !fit) return null;
  const statement = {
    model: best.model,
    status: fit.status,
    k: fit.k,
    kCi95: fit.kCi95,
    kLowerBound95: fit.kLowerBound95,
    kUpperBound95: fit.kUpperBound95,
    message: fit.status === 'not-converged' || fit.status === 'not-determined' ? fit.message : null,
  };
  return { ...statement, kUnit: fit.kUnit, epsilonFixed: fit.epsilonFixed, text: formatK(statement) };
}
