import { UsableMixture } from './batch-step-mixtures';
import { BenesiHildebrandBatchResult, JobBatchResult, MoleRatioBatchResult } from './batch-types';
import { benesiHildebrand } from './benesi-hildebrand';
import { GlobalFitResult } from './global-fit';
import { jobAnalysis } from './job';
import { findJobSeries } from './job-series';
import { findMoleRatioSeries } from './mole-ratio-series';
import { moleRatioAnalysis } from './mole-ratio';
import { ResolvedAnalysisSettings } from './options';
import { Stoichiometry } from './stoichiometry-model';

/** The cross-checks step: the graphical methods beside the global fits. */
export interface CrossChecksStep {
  job: JobBatchResult | null;
  moleRatio: MoleRatioBatchResult | null;
  benesiHildebrand: BenesiHildebrandBatchResult | null;
}

/**
 * Job's method on the largest series of usable mixtures at one total concentration A₀ + B₀ (within the
 * settings' relative tolerance and with their minimum of points): the maximum of the absorbance over
 * x_B and the stoichiometry nearest to it. Null when there is no such series.
 *
 * Units: mole fraction dimensionless, concentrations mol/L, absorbance dimensionless.
 * Reference: Job P. (1928) Ann. Chim. 9, 113, via `job.ts`.
 *
 * @example
 * jobStep(mixtures.usable, mixtures.candidates, s)?.maxMoleFractionB; // ≈ 0.5 for a 1:1 complex
 */
export function jobStep(
  usable: readonly UsableMixture[],
  candidates: readonly Stoichiometry[],
  s: ResolvedAnalysisSettings,
): JobBatchResult | null {
  const indices = findJobSeries(usable, s.job.relativeTolerance, s.job.minPoints);
  if (indices.length === 0) return null;
  const members = indices.map((i) => usable[i]);
  const r = jobAnalysis(
    members.map((m) => ({ moleFractionB: m.moleFractionB, absorbance: m.absorbance })),
    candidates,
  );
  return {
    ...r,
    sampleIds: members.map((m) => m.sampleId),
    totalConcentrationM: members.reduce((sum, m) => sum + m.a0M + m.b0M, 0) / members.length,
  };
}

/**
 * The mole-ratio method on the largest series with one reactant held constant: the break of the
 * absorbance against the ratio varied/held and the stoichiometry nearest to it. Null when there is no
 * such series.
 *
 * Units: ratio dimensionless, concentrations mol/L.
 * Reference: Yoe J.H. & Jones A.L. (1944) Ind. Eng. Chem. Anal. Ed. 16, 111, via `mole-ratio.ts`.
 *
 * @example
 * moleRatioStep(mixtures.usable, mixtures.candidates, s)?.breakRatio; // ≈ 1 for a 1:1 complex
 */
export function moleRatioStep(
  usable: readonly UsableMixture[],
  candidates: readonly Stoichiometry[],
  s: ResolvedAnalysisSettings,
): MoleRatioBatchResult | null {
  const series = findMoleRatioSeries(usable, s.moleRatio.relativeTolerance, s.moleRatio.minPoints);
  if (series.indices.length === 0) return null;
  const members = series.indices.map((i) => usable[i]);
  const varied = series.fixed === 'A' ? 'B' : 'A';
  const r = moleRatioAnalysis(
    members.map((m) => ({
      ratio: varied === 'B' ? m.b0M / m.a0M : m.a0M / m.b0M,
      absorbance: m.absorbance,
    })),
    varied,
    candidates,
  );
  return {
    ...r,
    sampleIds: members.map((m) => m.sampleId),
    fixed: series.fixed,
    fixedConcentrationM:
      members.reduce((sum, m) => sum + (series.fixed === 'A' ? m.a0M : m.b0M), 0) / members.length,
  };
}

/**
 * The Benesi–Hildebrand cross-check of a 1:1 K: the double-reciprocal line 1/A against 1/[excess
 * reactant] over the mixtures with B (else A) in at least the settings' fold excess, and the ratio of
 * its K to the global 1:1 fit's. Not applicable (with the reason) when too few mixtures have an excess;
 * null when no mixture is usable.
 *
 * Units: K L·mol⁻¹; concentrations mol/L; path cm.
 * Reference: Benesi H.A. & Hildebrand J.H. (1949) J. Am. Chem. Soc. 71, 2703, via `benesi-hildebrand.ts`.
 *
 * @example
 * benesiHildebrandStep(mixtures.usable, stoich.fits, s)?.kRatioToGlobalFit; // ≈ 1 when both agree
 */
export function benesiHildebrandStep(
  usable: readonly UsableMixture[],
  fits: ReadonlyMap<string, GlobalFitResult>,
  s: ResolvedAnalysisSettings,
): BenesiHildebrandBatchResult | null {
  if (usable.length === 0) return null;
  const { minExcessRatio: ratio, minPoints } = s.benesiHildebrand;
  const excessB = usable.filter((m) => m.b0M >= ratio * m.a0M && m.a0M > 0);
  const excessA = usable.filter((m) => m.a0M >= ratio * m.b0M && m.b0M > 0);
  const who: 'A' | 'B' | null = excessB.length >= minPoints ? 'B' : excessA.length >= minPoints ? 'A' : null;
  if (who === null) {
    return {
      applicable: false,
      reason: `needs at least ${minPoints} mixtures with one reactant in ≥ ${ratio}-fold excess`,
      sampleIds: [],
      result: null,
      kRatioToGlobalFit: null,
    };
  }
  const list = who === 'B' ? excessB : excessA;
  const result = benesiHildebrand(
    list.map((m) => ({ a0M: m.a0M, b0M: m.b0M, absorbance: m.absorbance, pathLengthCm: s.pathLengthCm })),
    who,
  );
  const k11 = fits.get('1:1')?.k ?? null;
  return {
    applicable: result !== null,
    reason: result
      ? `1:1 double-reciprocal line over ${list.length} mixtures with ${who} in ≥ ${ratio}-fold excess`
      : 'the double-reciprocal line could not be fitted',
    sampleIds: list.map((m) => m.sampleId),
    result,
    kRatioToGlobalFit: result?.k != null && k11 !== null ? result.k / k11 : null,
  };
}

/**
 * The graphical cross-checks of the stoichiometry and K: Job's method, the mole-ratio method and
 * Benesi–Hildebrand (see each). Their agreement with the chosen stoichiometry is judged in the QC step.
 *
 * @example
 * crossChecks(mixtures.usable, mixtures.candidates, stoich.fits, s).job?.nearestModel; // "1:1"
 */
export function crossChecks(
  usable: readonly UsableMixture[],
  candidates: readonly Stoichiometry[],
  fits: ReadonlyMap<string, GlobalFitResult>,
  s: ResolvedAnalysisSettings,
): CrossChecksStep {
  return {
    job: jobStep(usable, candidates, s),
    moleRatio: moleRatioStep(usable, candidates, s),
    benesiHildebrand: benesiHildebrandStep(usable, fits, s),
  };
}
