import { CalibrationStep } from './batch-step-calibration';
import { UsableMixture } from './batch-step-mixtures';
import {
  ControlResult,
  JobBatchResult,
  MoleRatioBatchResult,
  PositionResult,
  QcCode,
  QcFlag,
  ReplicateGroupResult,
  StoichiometryResult,
  UnknownResult,
} from './batch-types';
import { EPSILON_UNIT, formatK, formatNumber } from './number-format';
import { ResolvedAnalysisSettings } from './options';
import { intervalsOverlap, stoichiometryCrossChecks } from './stoichiometry-cross-checks';

/** Everything the QC step reads: the outputs of the earlier steps and the thresholds of the settings. */
export interface QcInput {
  settings: ResolvedAnalysisSettings;
  /** The blank-corrected positions. */
  positions: readonly PositionResult[];
  replicates: readonly ReplicateGroupResult[];
  calibration: CalibrationStep;
  unknowns: readonly UnknownResult[];
  controls: readonly ControlResult[];
  usableMixtures: readonly UsableMixture[];
  stoichiometry: StoichiometryResult | null;
  job: JobBatchResult | null;
  moleRatio: MoleRatioBatchResult | null;
}

/** A QC flag; position, sample, value and threshold are null unless given. */
export function qcFlag(
  code: QcCode,
  severity: QcFlag['severity'],
  message: string,
  extra: Partial<Pick<QcFlag, 'position' | 'sampleId' | 'value' | 'threshold'>> = {},
): QcFlag {
  return { code, severity, message, position: null, sampleId: null, value: null, threshold: null, ...extra };
}

/** Saturated and missing readings that were skipped. */
export function readingFlags(positions: readonly PositionResult[]): QcFlag[] {
  return positions.flatMap((p) =>
    p.status === 'saturated'
      ? [
          qcFlag('saturated-reading', 'warning', `${p.position}: saturated reading skipped`, {
            position: p.position,
            sampleId: p.sampleId,
          }),
        ]
      : p.status === 'missing'
        ? [
            qcFlag('missing-reading', 'warning', `${p.position}: missing reading skipped`, {
              position: p.position,
              sampleId: p.sampleId,
            }),
          ]
        : [],
  );
}

/**
 * Corrected absorbances (of positions other than blanks) below −tolerance or above the linear range
 * (absorbance, dimensionless; the upper limit is common practice for UV-Vis photometers).
 */
export function absorbanceFlags(positions: readonly PositionResult[], s: ResolvedAnalysisSettings): QcFlag[] {
  const flags: QcFlag[] = [];
  for (const p of positions) {
    const a = p.absorbanceCorrected;
    if (p.status !== 'used' || a === null || p.role === 'blank') continue;
    const where = { position: p.position, sampleId: p.sampleId, value: a };
    if (a < -s.negativeAbsorbanceTolerance) {
      flags.push(
        qcFlag(
          'negative-absorbance',
          'warning',
          `${p.position}: corrected absorbance ${a.toFixed(4)} is negative`,
          {
            ...where,
            threshold: -s.negativeAbsorbanceTolerance,
          },
        ),
      );
    }
    if (a > s.linearRangeMaxAbsorbance) {
      flags.push(
        qcFlag(
          'above-linear-range',
          'warning',
          `${p.position}: absorbance ${a.toFixed(3)} is above the linear range`,
          {
            ...where,
            threshold: s.linearRangeMaxAbsorbance,
          },
        ),
      );
    }
  }
  return flags;
}

/** Replicate groups (other than blanks) whose CV exceeds the settings' limit (CV a fraction; ISO 3534-1). */
export function replicateFlags(
  replicates: readonly ReplicateGroupResult[],
  s: ResolvedAnalysisSettings,
): QcFlag[] {
  return replicates.flatMap((g) =>
    g.role !== 'blank' && g.cv !== null && g.cv > s.replicateCvMax
      ? [
          qcFlag(
            'replicate-cv-high',
            'warning',
            `${g.sampleId}: replicate CV ${(g.cv * 100).toFixed(1)} % is above the limit`,
            {
              sampleId: g.sampleId,
              position: g.positions.join(' '),
              value: g.cv,
              threshold: s.replicateCvMax,
            },
          ),
        ]
      : [],
  );
}

/**
 * The calibration's QC: too few standards (when there are standards or unknowns), R² below the limit,
 * curvature by Mandel's test (ISO 8466-1), and standards whose studentised residual is an outlier.
 */
export function calibrationFlags(
  step: CalibrationStep,
  positions: readonly PositionResult[],
  s: ResolvedAnalysisSettings,
): QcFlag[] {
  const { calibration, standardsUsed, standardsNeeded } = step;
  if (standardsUsed < standardsNeeded) {
    return standardsUsed > 0 || positions.some((p) => p.role === 'unknown')
      ? [
          qcFlag(
            'no-calibration',
            'warning',
            `a calibration needs at least ${standardsNeeded} usable standards, found ${standardsUsed}`,
            { value: standardsUsed, threshold: standardsNeeded },
          ),
        ]
      : [];
  }
  if (!calibration) return [];
  const flags: QcFlag[] = [];
  if (calibration.r2 < s.r2Min) {
    flags.push(
      qcFlag(
        'calibration-r2-low',
        'error',
        `calibration R² ${calibration.r2.toFixed(4)} is below ${s.r2Min}`,
        {
          value: calibration.r2,
          threshold: s.r2Min,
        },
      ),
    );
  }
  if (calibration.linearity?.curved) {
    flags.push(
      qcFlag(
        'calibration-curvature',
        'warning',
        `the calibration curves: Mandel's test (ISO 8466-1) PW ${calibration.linearity.testValue.toFixed(1)} > F ${calibration.linearity.criticalValue.toFixed(1)}; narrow the range or check the highest standards`,
        { value: calibration.linearity.testValue, threshold: calibration.linearity.criticalValue },
      ),
    );
  }
  for (const pt of calibration.points) {
    if (!pt.outlier) continue;
    flags.push(
      qcFlag(
        'calibration-outlier',
        'warning',
        `${pt.position}: standard residual is an outlier (studentised ${pt.studentizedResidual?.toFixed(2)})`,
        {
          position: pt.position,
          sampleId: pt.sampleId,
          value: pt.studentizedResidual,
          threshold: s.outlierStudentizedResidual,
        },
      ),
    );
  }
  return flags;
}

/** Unknowns read back below the LOD or the LOQ (ICH Q2(R1)), as notes. */
export function unknownFlags(unknowns: readonly UnknownResult[], step: CalibrationStep): QcFlag[] {
  const lod = step.calibration?.lodM ?? null;
  const loq = step.calibration?.loqM ?? null;
  return unknowns.flatMap((u) =>
    u.flags.flatMap((f) =>
      f === 'below-lod' || f === 'below-loq'
        ? [
            qcFlag(
              f,
              'info',
              `${u.sampleId}: concentration is ${f === 'below-lod' ? 'below the LOD' : 'below the LOQ'}`,
              {
                sampleId: u.sampleId,
                value: u.concentrationM,
                threshold: f === 'below-lod' ? lod : loq,
              },
            ),
          ]
        : [],
    ),
  );
}

/**
 * Controls whose recovery lies outside the batch's limits (recovery %, limits common practice by
 * default): an error, since every concentration of the batch may be biased as much.
 */
export function recoveryFlags(controls: readonly ControlResult[], s: ResolvedAnalysisSettings): QcFlag[] {
  const [low, high] = s.recoveryLimitsPct;
  return controls.flatMap((c) =>
    c.flags.includes('recovery-out-of-limits') && c.recoveryPct !== null
      ? [
          qcFlag(
            'recovery-out-of-limits',
            'error',
            `${c.sampleId}: recovery ${c.recoveryPct.toFixed(1)} % is outside the acceptance limits ${low}–${high} %`,
            {
              sampleId: c.sampleId,
              value: c.recoveryPct,
              threshold: c.recoveryPct < low ? low : high,
            },
          ),
        ]
      : [],
  );
}

/**
 * The stoichiometry's QC: per candidate, mixtures it is impossible for and a fit that did not converge
 * (an error for the top candidate); for the top candidate, K that is only a lower bound or poorly
 * determined, and held-ε and free-ε fits whose intervals do not overlap; K constant under no candidate
 * (CV above the limit; only a note when binding is nearly complete); an ambiguous ranking
 * (ΔAIC below the limit; Burnham & Anderson 2002).
 */
export function stoichiometryFlags(
  stoichiometry: StoichiometryResult | null,
  usableMixtures: readonly UsableMixture[],
  s: ResolvedAnalysisSettings,
): QcFlag[] {
  if (!stoichiometry) return [];
  const ranked = stoichiometry.candidates;
  const flags: QcFlag[] = [];
  for (const c of ranked) {
    if (c.nInfeasible > 0) {
      const where = usableMixtures
        .filter((m) => m.ice.find((r) => r.model === c.model && !r.feasible))
        .map((m) => m.sampleId);
      flags.push(
        qcFlag(
          'candidate-impossible',
          'info',
          `${c.model} is impossible for ${where.join(', ')} (a reactant would go negative)`,
          {
            value: c.nInfeasible,
          },
        ),
      );
    }
    if (c.fit && !c.fit.converged) {
      flags.push(
        qcFlag(
          'fit-not-converged',
          c.rank === 1 ? 'error' : 'info',
          `${c.model}: global fit did not converge (${c.fit.message})`,
        ),
      );
    }
  }
  const top = ranked[0];
  if (top?.fit?.status === 'lower-bound') {
    flags.push(
      qcFlag(
        'k-lower-bound',
        'info',
        `${top.model}: K is too large to determine from these concentrations (${formatK(top.fit)}); to measure K, redesign the mixtures (the Planner shows which concentrations would)`,
        { value: top.fit.kLowerBound95 },
      ),
    );
  } else if (top?.fit?.status === 'poorly-determined') {
    flags.push(
      qcFlag('k-poorly-determined', 'warning', `${top.model}: K is poorly determined: ${formatK(top.fit)}`),
    );
  }
  if (top?.fit && top.freeFit && !intervalsOverlap(top.fit, top.freeFit)) {
    flags.push(
      qcFlag(
        'k-fits-disagree',
        'warning',
        `${top.model}: K with ε held at the batch's value (${formatK(top.fit)}) and K with ε fitted (${formatK(top.freeFit)}, ε ${formatNumber(top.freeFit.epsilonLPerMolCm)} ${EPSILON_UNIT}) disagree beyond their intervals; check the ε source`,
      ),
    );
  }
  const cvs = ranked.map((c) => c.kCv).filter((v): v is number => v !== null);
  if (cvs.length > 0 && cvs.every((v) => v > s.kCvMax)) {
    // Near complete binding per-mixture K rests on tiny free concentrations: its scatter is expected.
    const expected = top?.fit?.status === 'lower-bound';
    flags.push(
      qcFlag(
        'k-not-constant',
        expected ? 'info' : 'error',
        `K is not constant under any candidate (smallest CV ${(Math.min(...cvs) * 100).toFixed(1)} %)` +
          (expected ? '; expected when binding is nearly complete, the global fit decides' : ''),
        { value: Math.min(...cvs), threshold: s.kCvMax },
      ),
    );
  }
  if (stoichiometry.ambiguous) flags.push(qcFlag('stoichiometry-ambiguous', 'info', stoichiometry.verdict));
  return flags;
}

/** Job's maximum and the mole-ratio break against the chosen stoichiometry (see `stoichiometry-cross-checks.ts`). */
export function crossCheckFlags(
  best: string | null,
  job: JobBatchResult | null,
  moleRatio: MoleRatioBatchResult | null,
): QcFlag[] {
  return stoichiometryCrossChecks(best, job, moleRatio).map((check) =>
    qcFlag(check.code, check.severity, check.message, { value: check.value }),
  );
}

/**
 * The batch's QC findings, gathered in one place from the outputs of the earlier steps, in a fixed
 * order: readings, absorbances, replicates, calibration, unknowns, controls, stoichiometry, cross-checks. Each
 * finding carries its code, severity, message and, where there is one, the position, sample, value and
 * the threshold it was held against (thresholds from the settings).
 *
 * @example
 * collectQcFlags({ settings: s, positions, replicates, calibration, unknowns, controls, usableMixtures, stoichiometry, job, moleRatio })
 *   .map((f) => f.code); // ['saturated-reading', 'calibration-outlier', …]
 */
export function collectQcFlags(input: QcInput): QcFlag[] {
  const s = input.settings;
  return [
    ...readingFlags(input.positions),
    ...absorbanceFlags(input.positions, s),
    ...replicateFlags(input.replicates, s),
    ...calibrationFlags(input.calibration, input.positions, s),
    ...unknownFlags(input.unknowns, input.calibration),
    ...recoveryFlags(input.controls, s),
    ...stoichiometryFlags(input.stoichiometry, input.usableMixtures, s),
    ...crossCheckFlags(input.stoichiometry?.best ?? null, input.job, input.moleRatio),
  ];
}
