import { AnalysisError } from './errors';

/**
 * A candidate complex A_aB_b formed by aA + bB ⇌ A_aB_b. `label` is "a:b" (A:B), e.g. "1:2" is one
 * A (e.g. the metal ion) with two B (e.g. the ligand). K has units M^(1−a−b).
 */
export interface Stoichiometry {
  a: number;
  b: number;
  label: string;
}

/**
 * Reads "a:b" (positive integers up to 6) into a {@link Stoichiometry}.
 *
 * Units: none. Reference: IUPAC Gold Book, "stoichiometric number".
 *
 * @example
 * parseStoichiometry('1:2'); // { a: 1, b: 2, label: '1:2' }
 */
export function parseStoichiometry(label: string): Stoichiometry {
  const m = /^\s*(\d+)\s*:\s*(\d+)\s*$/.exec(label);
  const a = m ? Number(m[1]) : NaN;
  const b = m ? Number(m[2]) : NaN;
  if (!(a >= 1 && a <= 6 && b >= 1 && b <= 6)) {
    throw new AnalysisError(
      'invalid-settings',
      `stoichiometry "${label}" is not of the form a:b with 1 ≤ a, b ≤ 6`,
    );
  }
  return { a, b, label: `${a}:${b}` };
}
