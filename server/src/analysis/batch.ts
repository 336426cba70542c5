import { correctForBlank } from './batch-step-blank';
import { calibrateStandards } from './batch-step-calibration';
import { crossChecks } from './batch-step-cross-checks';
import { analyseMixtures } from './batch-step-mixtures';
import { resolvePositions } from './batch-step-positions';
import { collectQcFlags } from './batch-step-qc';
import { groupReplicates } from './batch-step-replicates';
import { rankCandidates } from './batch-step-stoichiometry';
import { monteCarloBestK, propagateBestK } from './batch-step-uncertainty';
import { readBackUnknowns } from './batch-step-unknowns';
import { BATCH_RESULT_SCHEMA_VERSION, BatchResult } from './batch-types';
import { kHeadline } from './k-headline';
import { K_CONCENTRATION_CONSTANT_NOTE } from './number-format';
import { AnalysisSettings, resolveAnalysisSettings } from './options';
import { Reading, SampleDefinition } from './types';

/**
 * Optional timing hook for benchmarks: `timings` receives the clock's units (milliseconds) per step:
 * positions, blank, replicates, calibration, unknowns, mixtures, stoichiometry, uncertainty, monteCarlo,
 * jobAndBenesiHildebrand, qc.
 */
export interface BatchInstrumentation {
  clock: () => number;
  timings: Record<string, number>;
}

/** Runs one step, adding its duration to the instrumentation's timings when there is one. */
function timed<T>(instrumentation: BatchInstrumentation | undefined, name: string, run: () => T): T {
  if (!instrumentation) return run();
  const start = instrumentation.clock();
  const out = run();
  const t = instrumentation.timings;
  t[name] = (t[name] ?? 0) + (instrumentation.clock() - start);
  return out;
}

/**
 * Analyses one batch: blank correction, replicate statistics, Beer–Lambert calibration, unknown
 * concentrations, mixtures (C₁V₁ = C₂V₂ and an ICE table per candidate), stoichiometry ranking with
 * global fits and a verdict, the uncertainty of K, a Job's analysis when the mixtures form a Job's
 * series, a Benesi–Hildebrand cross-check, QC flags and warnings. Pure and deterministic: the server,
 * the CLI and the browser call this one function.
 *
 * A short pipeline of pure steps, each in its own `batch-step-*.ts` with typed input and output:
 * positions → blank → replicates → calibration → unknowns → mixtures → stoichiometry → uncertainty
 * (propagation, Monte Carlo) → cross-checks (Job, mole ratio, Benesi–Hildebrand) → QC. Each step returns
 * its own warnings; the QC flags are gathered by the last step from the others' outputs.
 *
 * Conventions: a position's value is the mean of its readings at the analysed wavelength; a missing or
 * saturated reading makes the position unusable (reported, never read as zero); corrected absorbance =
 * (A − mean blank) × (batch path / position path). Standards enter the calibration one position at a
 * time; unknowns and mixtures use the mean of their replicate group. Only the complex is assumed to
 * absorb at the analysed wavelength (after the blank).
 *
 * Units: absorbance dimensionless, concentrations mol/L, volumes mL, path cm, wavelength nm,
 * ε L·mol⁻¹·cm⁻¹, K M^(1−a−b).
 * Reference: see the method files (calibration: ICH Q2(R1); fits: Levenberg–Marquardt; Job 1928;
 * Benesi–Hildebrand 1949; uncertainty: JCGM 100 and 101).
 *
 * @param readings parsed readings (any wavelengths; the analysed one is chosen by the settings)
 * @param samples manifest rows
 * @param settings analysis settings; defaults filled by `resolveAnalysisSettings`
 * @param instrumentation optional clock to time the steps (benchmarks)
 * @example
 * const result = analyzeBatch(run.readings, manifest.samples, { wavelengthNm: 447, pathLengthCm: 1 });
 * result.stoichiometry?.verdict; // "1:1 fits best; 1:2 is ruled out: …"
 */
export function analyzeBatch(
  readings: readonly Reading[],
  samples: readonly SampleDefinition[],
  settings: AnalysisSettings = {},
  instrumentation?: BatchInstrumentation,
): BatchResult {
  const s = resolveAnalysisSettings(settings);
  const step = <T>(name: string, run: () => T): T => timed(instrumentation, name, run);
  const located = step('positions', () => resolvePositions(readings, samples, s));
  const blanked = step('blank', () => correctForBlank(located.positions, s));
  const positions = blanked.positions;
  const groups = step('replicates', () => groupReplicates(positions, located.sampleByPosition));
  const cal = step('calibration', () => calibrateStandards(positions, located.sampleByPosition, s));
  const read = step('unknowns', () => readBackUnknowns(groups.groups, cal.calibration, s));
  const mix = step('mixtures', () => analyseMixtures(groups.groups, cal.calibration, s));
  const stoich = step('stoichiometry', () =>
    rankCandidates(mix.usable, mix.candidates, mix.epsilonSource, s),
  );
  const { stoichiometry, fits } = stoich;
  const propagated = step('uncertainty', () =>
    propagateBestK(stoichiometry, fits, mix.measurements, mix.usable.length, s),
  );
  const uncertainty = step('monteCarlo', () => monteCarloBestK(propagated, mix.measurements, s));
  const checks = step('jobAndBenesiHildebrand', () => crossChecks(mix.usable, mix.candidates, fits, s));
  const qc = step('qc', () =>
    collectQcFlags({
      settings: s,
      positions,
      replicates: groups.replicates,
      calibration: cal,
      unknowns: read.unknowns,
      controls: read.controls,
      usableMixtures: mix.usable,
      stoichiometry,
      job: checks.job,
      moleRatio: checks.moleRatio,
    }),
  );
  return {
    schemaVersion: BATCH_RESULT_SCHEMA_VERSION,
    wavelengthNm: located.wavelengthNm,
    pathLengthCm: s.pathLengthCm,
    settings: s,
    positions,
    exclusions: s.exclusions,
    blank: blanked.blank,
    replicates: groups.replicates,
    calibration: cal.calibration,
    unknowns: read.unknowns,
    controls: read.controls,
    mixtures: mix.mixtures,
    stoichiometry,
    uncertainty: uncertainty.uncertainty,
    job: checks.job,
    moleRatio: checks.moleRatio,
    benesiHildebrand: checks.benesiHildebrand,
    epsilonSource: mix.epsilonSource,
    headline: kHeadline(stoichiometry?.candidates.find((c) => c.model === stoichiometry.best)),
    kNote: K_CONCENTRATION_CONSTANT_NOTE,
    qc,
    warnings: [
      ...located.warnings,
      ...blanked.warnings,
      ...groups.warnings,
      ...cal.warnings,
      ...mix.warnings,
      ...stoich.warnings,
      ...uncertainty.warnings,
    ],
  };
}
