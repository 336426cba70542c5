/**
 * Finds the largest subset of mixtures that forms a mole-ratio series: one reactant at the same initial
 * concentration (within a relative tolerance) and the other at at least `minPoints` different
 * concentrations. Returns the indices and which reactant is held (empty when there is none).
 *
 * Units: concentrations mol/L; tolerance a fraction.
 * Reference: Yoe J.H. & Jones A.L. (1944) Ind. Eng. Chem. Anal. Ed. 16, 111 (the method's premise).
 *
 * @example
 * findMoleRatioSeries([1, 2, 3, 4, 5].map((i) => ({ a0M: 1e-4, b0M: i * 5e-5 })), 0.02, 5); // { indices: [0, 1, 2, 3, 4], fixed: 'A' }
 */
export function findMoleRatioSeries(
  mixtures: readonly { a0M: number; b0M: number }[],
  relativeTolerance = 0.02,
  minPoints = 6,
): { indices: number[]; fixed: 'A' | 'B' } {
  let best: { indices: number[]; fixed: 'A' | 'B' } = { indices: [], fixed: 'A' };
  for (const fixed of ['A', 'B'] as const) {
    const held = (m: { a0M: number; b0M: number }): number => (fixed === 'A' ? m.a0M : m.b0M);
    const varied = (m: { a0M: number; b0M: number }): number => (fixed === 'A' ? m.b0M : m.a0M);
    for (let i = 0; i < mixtures.length; i++) {
      const c = held(mixtures[i]);
      if (!(c > 0)) continue;
      const members = mixtures
        .map((m, j) => (Math.abs(held(m) - c) <= relativeTolerance * c && varied(m) >= 0 ? j : -1))
        .filter((j) => j >= 0);
      const levels = new Set(members.map((j) => varied(mixtures[j]).toPrecision(4)));
      if (levels.size >= minPoints && members.length > best.indices.length)
        best = { indices: members, fixed };
    }
  }
  return best;
}
