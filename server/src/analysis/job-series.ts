/**
 * Finds the largest subset of mixtures that forms a Job's series: the same total A₀ + B₀ (within a
 * relative tolerance) and at least `minPoints` different mole fractions of B. Returns their indices
 * (empty when there is none).
 *
 * Units: concentrations mol/L; tolerance a fraction.
 * Reference: Job P. (1928) Ann. Chim. 9, 113 (constant total concentration is the method's premise).
 *
 * @param mixtures initial concentrations, mol/L
 * @param relativeTolerance default 0.02
 * @param minPoints default 5
 * @example
 * findJobSeries([{ a0M: 8e-4, b0M: 2e-4 }, { a0M: 5e-4, b0M: 5e-4 }, { a0M: 2e-4, b0M: 8e-4 }], 0.02, 3); // [0, 1, 2]
 */
export function findJobSeries(
  mixtures: readonly { a0M: number; b0M: number }[],
  relativeTolerance = 0.02,
  minPoints = 5,
): number[] {
  const totals = mixtures.map((m) => m.a0M + m.b0M);
  let best: number[] = [];
  for (let i = 0; i < mixtures.length; i++) {
    const t = totals[i];
    if (!(t > 0)) continue;
    const members = totals
      .map((v, j) => (Math.abs(v - t) <= relativeTolerance * t ? j : -1))
      .filter((j) => j >= 0);
    const fractions = new Set(members.map((j) => (mixtures[j].b0M / totals[j]).toFixed(4)));
    if (fractions.size >= minPoints && members.length > best.length) best = members;
  }
  return best;
}
