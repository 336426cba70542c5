import { benesiHildebrand } from './benesi-hildebrand';
import { blankCorrection } from './blank';
import { calibrate, CalibrationResult, CalibrationStandard } from './calibration';
import { mixtureInitialConcentrations } from './dilution';
import { fitEquilibriumModel, GlobalFitResult } from './global-fit';
import { concentrationFromAbsorbance } from './inverse-prediction';
import { jobAnalysis } from './job';
import { findJobSeries } from './job-series';
import { kStatistics, KStatistics } from './k-statistics';
import { MixtureMeasurement } from './mixture-measurement';
import { monteCarloK } from './monte-carlo';
import { AnalysisSettings, resolveAnalysisSettings, ResolvedAnalysisSettings } from './options';
import { replicateStats } from './replicates';
import { parseStoichiometry, Stoichiometry } from './stoichiometry-model';
import { rankStoichiometries } from './stoichiometry-ranking';
import { propagateKUncertainty } from './uncertainty-propagation';
import { epsilonSourceOf } from './epsilon-source';
import { kHeadline } from './k-headline';
import { findMoleRatioSeries } from './mole-ratio-series';
import { moleRatioAnalysis } from './mole-ratio';
import { EPSILON_UNIT, formatK, formatNumber, K_CONCENTRATION_CONSTANT_NOTE, kUnit } from './number-format';
import { crossCheckNotes, intervalsOverlap, stoichiometryCrossChecks } from './stoichiometry-cross-checks';
import { Reading, SampleDefinition } from './types';
import {
  BATCH_RESULT_SCHEMA_VERSION,
  BatchResult,
  BenesiHildebrandBatchResult,
  CandidateResult,
  JobBatchResult,
  MixtureResult,
  MoleRatioBatchResult,
  PositionResult,
  QcCode,
  QcFlag,
  ReplicateGroupResult,
  StoichiometryResult,
  UncertaintyResult,
  UnknownResult,
} from './batch-types';

/** Optional timing hook for benchmarks: `timings` receives milliseconds per step. */
export interface BatchInstrumentation {
  clock: () => number;
  timings: Record<string, number>;
}

interface Group {
  key: string;
  sample: SampleDefinition;
  positions: PositionResult[];
}

const POSITION_RE = /^([A-Z]+)(\d+)$/;

function comparePositions(a: string, b: string): number {
  const ma = POSITION_RE.exec(a);
  const mb = POSITION_RE.exec(b);
  if (ma && mb) return ma[1] === mb[1] ? Number(ma[2]) - Number(mb[2]) : ma[1] < mb[1] ? -1 : 1;
  return a < b ? -1 : a > b ? 1 : 0;
}

function chooseWavelength(
  readings: readonly Reading[],
  s: ResolvedAnalysisSettings,
  warnings: string[],
): number | null {
  if (s.wavelengthNm !== null) return s.wavelengthNm;
  const counts = new Map<number, number>();
  for (const r of readings) counts.set(r.wavelengthNm, (counts.get(r.wavelengthNm) ?? 0) + 1);
  if (counts.size === 0) return null;
  const sorted = [...counts.entries()].sort((u, v) => v[1] - u[1] || u[0] - v[0]);
  if (counts.size > 1) {
    warnings.push(
      `readings at ${counts.size} wavelengths (${[...counts.keys()].sort((u, v) => u - v).join(', ')} nm); ` +
        `analysed ${sorted[0][0]} nm — set the wavelength to choose another`,
    );
  }
  return sorted[0][0];
}

/**
 * Analyses one batch: blank correction, replicate statistics, Beer–Lambert calibration, unknown
 * concentrations, mixtures (C₁V₁ = C₂V₂ and an ICE table per candidate), stoichiometry ranking with
 * global fits and a verdict, the uncertainty of K, a Job's analysis when the mixtures form a Job's
 * series, a Benesi–Hildebrand cross-check, QC flags and warnings. Pure and deterministic: the server,
 * the CLI and the browser call this one function.
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
  const warnings: string[] = [];
  const qc: QcFlag[] = [];
  const flag = (
    code: QcCode,
    severity: QcFlag['severity'],
    message: string,
    extra: Partial<Pick<QcFlag, 'position' | 'sampleId' | 'value' | 'threshold'>> = {},
  ): void => {
    qc.push({
      code,
      severity,
      message,
      position: null,
      sampleId: null,
      value: null,
      threshold: null,
      ...extra,
    });
  };
  let mark = instrumentation?.clock() ?? 0;
  const step = (name: string): void => {
    if (!instrumentation) return;
    const now = instrumentation.clock();
    instrumentation.timings[name] = (instrumentation.timings[name] ?? 0) + (now - mark);
    mark = now;
  };

  // Positions: manifest rows joined to readings at the analysed wavelength.
  const wavelengthNm = chooseWavelength(readings, s, warnings);
  const sampleByPosition = new Map<string, SampleDefinition>();
  for (const sample of samples) {
    const pos = sample.position.toUpperCase();
    if (sampleByPosition.has(pos)) warnings.push(`manifest lists ${pos} twice; the first row is used`);
    else sampleByPosition.set(pos, sample);
  }
  const readsByPosition = new Map<string, Reading[]>();
  for (const r of readings) {
    if (wavelengthNm === null || Math.abs(r.wavelengthNm - wavelengthNm) > s.wavelengthToleranceNm) continue;
    const pos = r.position.toUpperCase();
    const list = readsByPosition.get(pos);
    if (list) list.push(r);
    else readsByPosition.set(pos, [r]);
  }
  const exclusionByPosition = new Map(s.exclusions.map((e) => [e.position, e.reason]));
  for (const e of s.exclusions) {
    if (!sampleByPosition.has(e.position) && !readsByPosition.has(e.position)) {
      warnings.push(`exclusion of ${e.position} matches no position in this batch`);
    }
  }
  const allPositions = [...new Set([...sampleByPosition.keys(), ...readsByPosition.keys()])].sort(
    comparePositions,
  );
  const positions: PositionResult[] = allPositions.map((position) => {
    const sample = sampleByPosition.get(position);
    const reads = readsByPosition.get(position) ?? [];
    const pathLengthCm = s.pathLengthByPositionCm[position] ?? s.pathLengthCm;
    const base: PositionResult = {
      position,
      sampleId: sample?.sampleId ?? null,
      role: sample?.role ?? null,
      replicateGroup: sample?.replicateGroup ?? null,
      absorbanceRaw: null,
      reads: reads.length,
      pathLengthCm,
      absorbanceCorrected: null,
      status: 'used',
      exclusionReason: null,
    };
    const finiteReads = reads.filter((r) => r.absorbance !== null && Number.isFinite(r.absorbance));
    if (finiteReads.length > 0) {
      base.absorbanceRaw =
        finiteReads.reduce((sum, r) => sum + (r.absorbance as number), 0) / finiteReads.length;
    }
    if (!sample) base.status = 'no-sample';
    else if (exclusionByPosition.has(position)) {
      base.status = 'excluded';
      base.exclusionReason = exclusionByPosition.get(position) as string;
    } else if (reads.length === 0) base.status = 'no-reading';
    else if (finiteReads.length < reads.length) {
      base.status = reads.some((r) => r.flag === 'saturated') ? 'saturated' : 'missing';
    }
    return base;
  });
  const unassigned = positions.filter((p) => p.status === 'no-sample').map((p) => p.position);
  if (unassigned.length)
    warnings.push(`readings at ${unassigned.join(', ')} have no manifest row and were not used`);
  const unread = positions.filter((p) => p.status === 'no-reading').map((p) => p.position);
  if (unread.length) warnings.push(`no reading at ${wavelengthNm ?? '?'} nm for ${unread.join(', ')}`);
  for (const p of positions) {
    if (p.status === 'saturated') {
      flag('saturated-reading', 'warning', `${p.position}: saturated reading skipped`, {
        position: p.position,
        sampleId: p.sampleId,
      });
    } else if (p.status === 'missing') {
      flag('missing-reading', 'warning', `${p.position}: missing reading skipped`, {
        position: p.position,
        sampleId: p.sampleId,
      });
    }
  }
  step('positions');

  // Blank correction and path-length scaling.
  const blank = blankCorrection(
    positions
      .filter((p) => p.role === 'blank' && p.status === 'used')
      .map((p) => ({ position: p.position, absorbance: p.absorbanceRaw })),
  );
  if (blank.n === 0) warnings.push('no usable blank: absorbances are used as read');
  for (const p of positions) {
    if (p.status !== 'used' || p.absorbanceRaw === null) continue;
    p.absorbanceCorrected = (p.absorbanceRaw - blank.meanAbsorbance) * (s.pathLengthCm / p.pathLengthCm);
    if (p.role === 'blank') continue;
    if (p.absorbanceCorrected < -s.negativeAbsorbanceTolerance) {
      flag(
        'negative-absorbance',
        'warning',
        `${p.position}: corrected absorbance ${p.absorbanceCorrected.toFixed(4)} is negative`,
        {
          position: p.position,
          sampleId: p.sampleId,
          value: p.absorbanceCorrected,
          threshold: -s.negativeAbsorbanceTolerance,
        },
      );
    }
    if (p.absorbanceCorrected > s.linearRangeMaxAbsorbance) {
      flag(
        'above-linear-range',
        'warning',
        `${p.position}: absorbance ${p.absorbanceCorrected.toFixed(3)} is above the linear range`,
        {
          position: p.position,
          sampleId: p.sampleId,
          value: p.absorbanceCorrected,
          threshold: s.linearRangeMaxAbsorbance,
        },
      );
    }
  }
  step('blank');

  // Replicate groups.
  const groups = new Map<string, Group>();
  for (const p of positions) {
    const sample = sampleByPosition.get(p.position);
    if (!sample) continue;
    const key = sample.replicateGroup
      ? `${sample.role}:${sample.replicateGroup}`
      : `${sample.role}@${p.position}`;
    const g = groups.get(key);
    if (g) {
      if (g.sample.sampleId !== sample.sampleId) {
        warnings.push(
          `replicate group ${sample.replicateGroup} mixes samples ${g.sample.sampleId} and ${sample.sampleId}`,
        );
      }
      g.positions.push(p);
    } else groups.set(key, { key, sample, positions: [p] });
  }
  const replicates: ReplicateGroupResult[] = [];
  const groupMean = new Map<string, { mean: number | null; n: number }>();
  for (const g of groups.values()) {
    const used = g.positions.filter((p) => p.status === 'used');
    const stats = replicateStats(used.map((p) => p.absorbanceCorrected));
    const skipped = g.positions.filter(
      (p) => p.status === 'saturated' || p.status === 'missing' || p.status === 'no-reading',
    ).length;
    replicates.push({
      group: g.sample.replicateGroup ?? g.positions[0].position,
      sampleId: g.sample.sampleId,
      role: g.sample.role,
      positions: g.positions.map((p) => p.position),
      n: stats.n,
      skipped,
      excluded: g.positions.filter((p) => p.status === 'excluded').length,
      mean: stats.mean,
      sd: stats.sd,
      cv: stats.cv,
    });
    groupMean.set(g.key, { mean: stats.mean, n: stats.n });
    if (g.sample.role !== 'blank' && stats.cv !== null && stats.cv > s.replicateCvMax) {
      flag(
        'replicate-cv-high',
        'warning',
        `${g.sample.sampleId}: replicate CV ${(stats.cv * 100).toFixed(1)} % is above the limit`,
        {
          sampleId: g.sample.sampleId,
          position: g.positions.map((p) => p.position).join(' '),
          value: stats.cv,
          threshold: s.replicateCvMax,
        },
      );
    }
  }
  step('replicates');

  // Calibration on individual standard positions.
  const standards: CalibrationStandard[] = [];
  for (const p of positions) {
    if (p.role !== 'standard' || p.status !== 'used' || p.absorbanceCorrected === null) continue;
    const c = sampleByPosition.get(p.position)?.concentrationM;
    if (c === undefined || !Number.isFinite(c)) {
      warnings.push(`standard at ${p.position} has no concentration and was not used`);
      continue;
    }
    standards.push({
      concentrationM: c,
      absorbance: p.absorbanceCorrected,
      position: p.position,
      sampleId: p.sampleId ?? undefined,
    });
  }
  let calibration: CalibrationResult | null = null;
  const needed = s.calibrationModel === 'linear' ? 3 : 2;
  if (standards.length >= needed) {
    try {
      calibration = calibrate(standards, {
        pathLengthCm: s.pathLengthCm,
        throughOrigin: s.calibrationModel === 'through-origin',
        linearRangeMaxAbsorbance: s.linearRangeMaxAbsorbance,
        outlierStudentizedResidual: s.outlierStudentizedResidual,
      });
    } catch (e) {
      warnings.push(`calibration failed: ${(e as Error).message}`);
    }
  } else if (standards.length > 0 || positions.some((p) => p.role === 'unknown')) {
    flag(
      'no-calibration',
      'warning',
      `a calibration needs at least ${needed} usable standards, found ${standards.length}`,
      {
        value: standards.length,
        threshold: needed,
      },
    );
  }
  if (calibration) {
    if (calibration.r2 < s.r2Min) {
      flag('calibration-r2-low', 'error', `calibration R² ${calibration.r2.toFixed(4)} is below ${s.r2Min}`, {
        value: calibration.r2,
        threshold: s.r2Min,
      });
    }
    if (calibration.linearity?.curved) {
      flag(
        'calibration-curvature',
        'warning',
        `the calibration curves: Mandel's test (ISO 8466-1) PW ${calibration.linearity.testValue.toFixed(1)} > F ${calibration.linearity.criticalValue.toFixed(1)}; narrow the range or check the highest standards`,
        { value: calibration.linearity.testValue, threshold: calibration.linearity.criticalValue },
      );
    }
    if (calibration.lodExtrapolated || calibration.loqExtrapolated) {
      warnings.push(
        `${calibration.lodExtrapolated ? 'LOD' : ''}${calibration.lodExtrapolated && calibration.loqExtrapolated ? ' and ' : ''}${calibration.loqExtrapolated ? 'LOQ' : ''} ` +
          `lie below the lowest standard: extrapolated, not measured`,
      );
    }
    for (const pt of calibration.points) {
      if (pt.outlier) {
        flag(
          'calibration-outlier',
          'warning',
          `${pt.position}: standard residual is an outlier (studentised ${pt.studentizedResidual?.toFixed(2)})`,
          {
            position: pt.position,
            sampleId: pt.sampleId,
            value: pt.studentizedResidual,
            threshold: s.outlierStudentizedResidual,
          },
        );
      }
    }
  }
  step('calibration');

  // Unknowns and controls.
  const readBack = (g: Group): UnknownResult => {
    const { mean, n } = groupMean.get(g.key) as { mean: number | null; n: number };
    const dilutionFactor = g.sample.dilutionFactor ?? 1;
    const flags: QcCode[] = [];
    let concentrationM: number | null = null;
    let seM: number | null = null;
    if (calibration && mean !== null && n > 0) {
      const r = concentrationFromAbsorbance(calibration, mean, n, dilutionFactor);
      concentrationM = r.concentrationM;
      seM = r.seM;
      const measured = r.concentrationM / dilutionFactor;
      if (measured < calibration.lodM) flags.push('below-lod');
      else if (measured < calibration.loqM) flags.push('below-loq');
      if (mean > s.linearRangeMaxAbsorbance) flags.push('above-linear-range');
    }
    return {
      sampleId: g.sample.sampleId,
      group: g.sample.replicateGroup ?? g.positions[0].position,
      positions: g.positions.map((p) => p.position),
      n,
      absorbance: mean,
      dilutionFactor,
      concentrationM,
      seM,
      flags,
    };
  };
  const groupList = [...groups.values()];
  const unknowns = groupList.filter((g) => g.sample.role === 'unknown').map(readBack);
  const controls = groupList.filter((g) => g.sample.role === 'control').map(readBack);
  for (const u of unknowns) {
    for (const f of u.flags) {
      if (f === 'below-lod' || f === 'below-loq') {
        flag(
          f,
          'info',
          `${u.sampleId}: concentration is ${f === 'below-lod' ? 'below the LOD' : 'below the LOQ'}`,
          {
            sampleId: u.sampleId,
            value: u.concentrationM,
            threshold: f === 'below-lod' ? (calibration?.lodM ?? null) : (calibration?.loqM ?? null),
          },
        );
      }
    }
  }
  step('unknowns');

  // Mixtures: initial concentrations, product and ICE tables.
  const candidates: Stoichiometry[] = s.candidates.map(parseStoichiometry);
  const epsilonSource = epsilonSourceOf(s, calibration);
  const epsilon = epsilonSource.epsilonLPerMolCm;
  const intercept = epsilonSource.interceptAbsorbance;
  const mixtureGroups = groupList.filter((g) => g.sample.role === 'mixture');
  if (mixtureGroups.length > 0 && epsilon === null) warnings.push(epsilonSource.note);
  const mixtures: MixtureResult[] = [];
  const measurements: MixtureMeasurement[] = [];
  for (const g of mixtureGroups) {
    const sample = g.sample;
    const recipe = {
      stockAM: sample.stockAM ?? NaN,
      volumeAMl: sample.volumeAMl ?? NaN,
      stockBM: sample.stockBM ?? NaN,
      volumeBMl: sample.volumeBMl ?? NaN,
      totalVolumeMl: sample.totalVolumeMl,
    };
    let init;
    try {
      init = mixtureInitialConcentrations(recipe);
    } catch (e) {
      warnings.push(`mixture ${sample.sampleId}: ${(e as Error).message}; not analysed`);
      continue;
    }
    const { mean, n } = groupMean.get(g.key) as { mean: number | null; n: number };
    const productM =
      epsilon !== null && mean !== null ? (mean - intercept) / (epsilon * s.pathLengthCm) : null;
    const flags: QcCode[] = [];
    const stats =
      productM !== null
        ? candidates.map((c) => kStatistics([{ a0M: init.a0M, b0M: init.b0M, productM }], c))
        : [];
    const ice = stats.map((k) => k.rows[0]);
    if (ice.some((r) => !r.feasible)) flags.push('candidate-impossible');
    mixtures.push({
      sampleId: sample.sampleId,
      group: sample.replicateGroup ?? g.positions[0].position,
      positions: g.positions.map((p) => p.position),
      n,
      absorbance: mean,
      a0M: init.a0M,
      b0M: init.b0M,
      moleFractionB: init.a0M + init.b0M > 0 ? init.b0M / (init.a0M + init.b0M) : 0,
      totalVolumeMl: init.totalVolumeMl,
      productM,
      ice,
      flags,
    });
    if (mean !== null && n > 0) {
      measurements.push({
        ...recipe,
        totalVolumeMl: init.totalVolumeMl,
        absorbance: mean - intercept,
        pathLengthCm: s.pathLengthCm,
        replicates: n,
      });
    }
  }
  step('mixtures');

  // Stoichiometry: per-mixture K spread and a global fit per candidate, then the ranking.
  const usableMixtures = mixtures.filter((m) => m.absorbance !== null && m.n > 0);
  let stoichiometry: StoichiometryResult | null = null;
  const fits = new Map<string, GlobalFitResult>();
  if (usableMixtures.length > 0) {
    const points = usableMixtures.map((m) => ({
      a0M: m.a0M,
      b0M: m.b0M,
      absorbance: (m.absorbance as number) - intercept,
      pathLengthCm: s.pathLengthCm,
    }));
    const fitOptions = {
      fitBaseline: s.fitBaseline,
      maxIterations: s.fit.maxIterations,
      parameterTolerance: s.fit.parameterTolerance,
      solverTolerance: s.solver.tolerance,
      solverMaxIterations: s.solver.maxIterations,
    };
    const evidence = candidates.map((c) => {
      const kStats: KStatistics | null =
        epsilon !== null
          ? kStatistics(
              usableMixtures.map((m) => ({ a0M: m.a0M, b0M: m.b0M, productM: m.productM as number })),
              c,
            )
          : null;
      // The headline fit follows the batch's ε source; with ε held, the free-ε fit is the cross-check.
      const freeFit = fitEquilibriumModel(points, c, fitOptions);
      const fit =
        epsilon !== null
          ? fitEquilibriumModel(points, c, {
              ...fitOptions,
              fixedEpsilon: {
                value: epsilon,
                se: epsilonSource.epsilonSe ?? 0,
                interceptSe: epsilonSource.interceptSe,
                covariance: epsilonSource.epsilonInterceptCov,
              },
            })
          : freeFit;
      fits.set(c.label, fit);
      return { model: c.label, kStats, fit, freeFit: fit === freeFit ? null : freeFit };
    });
    const ranking = rankStoichiometries(evidence, {
      ambiguityDeltaAic: s.ambiguityDeltaAic,
      ruledOutDeltaAic: s.ruledOutDeltaAic,
      kCvMax: s.kCvMax,
    });
    const byModel = new Map(evidence.map((e) => [e.model, e]));
    const ranked: CandidateResult[] = ranking.ranked.map((r) => {
      const e = byModel.get(r.model) as (typeof evidence)[number];
      const c = parseStoichiometry(r.model);
      return {
        model: r.model,
        a: c.a,
        b: c.b,
        kUnit: kUnit(c.a, c.b),
        kMean: e.kStats?.kMean ?? null,
        kSd: e.kStats?.kSd ?? null,
        kCv: e.kStats?.kCv ?? null,
        nFeasible: e.kStats?.nFeasible ?? 0,
        nInfeasible: e.kStats?.nInfeasible ?? 0,
        fit: e.fit,
        freeFit: e.freeFit,
        warnings: [...e.fit.warnings, ...(e.freeFit ? crossCheckNotes(e.fit, e.freeFit) : [])],
        rank: r.rank,
        deltaAic: r.deltaAic,
        akaikeWeight: r.akaikeWeight,
        ruledOut: r.ruledOut,
        reason: r.reason,
      };
    });
    stoichiometry = {
      candidates: ranked,
      best: ranking.best,
      ambiguous: ranking.ambiguous,
      verdict: ranking.verdict,
    };
    for (const c of ranked) {
      if (c.nInfeasible > 0) {
        const where = usableMixtures
          .filter((m) => m.ice.find((r) => r.model === c.model && !r.feasible))
          .map((m) => m.sampleId);
        flag(
          'candidate-impossible',
          'info',
          `${c.model} is impossible for ${where.join(', ')} (a reactant would go negative)`,
          {
            value: c.nInfeasible,
          },
        );
      }
      if (c.fit && !c.fit.converged) {
        flag(
          'fit-not-converged',
          c.rank === 1 ? 'error' : 'info',
          `${c.model}: global fit did not converge (${c.fit.message})`,
        );
      }
      if (c.rank === 1) warnings.push(...c.warnings);
    }
    const top = ranked[0];
    if (top?.fit?.status === 'lower-bound') {
      flag(
        'k-lower-bound',
        'info',
        `${top.model}: K is too large to determine from these concentrations (${formatK(top.fit)}); to measure K, redesign the mixtures (the Planner shows which concentrations would)`,
        { value: top.fit.kLowerBound95 },
      );
    } else if (top?.fit?.status === 'poorly-determined') {
      flag('k-poorly-determined', 'warning', `${top.model}: K is poorly determined: ${formatK(top.fit)}`);
    }
    if (top?.fit && top.freeFit && !intervalsOverlap(top.fit, top.freeFit)) {
      flag(
        'k-fits-disagree',
        'warning',
        `${top.model}: K with ε held at the batch's value (${formatK(top.fit)}) and K with ε fitted (${formatK(top.freeFit)}, ε ${formatNumber(top.freeFit.epsilonLPerMolCm)} ${EPSILON_UNIT}) disagree beyond their intervals; check the ε source`,
      );
    }
    const cvs = ranked.map((c) => c.kCv).filter((v): v is number => v !== null);
    if (cvs.length > 0 && cvs.every((v) => v > s.kCvMax)) {
      // Near complete binding per-mixture K rests on tiny free concentrations: its scatter is expected.
      const expected = top?.fit?.status === 'lower-bound';
      flag(
        'k-not-constant',
        expected ? 'info' : 'error',
        `K is not constant under any candidate (smallest CV ${(Math.min(...cvs) * 100).toFixed(1)} %)` +
          (expected ? '; expected when binding is nearly complete, the global fit decides' : ''),
        {
          value: Math.min(...cvs),
          threshold: s.kCvMax,
        },
      );
    }
    if (ranking.ambiguous) flag('stoichiometry-ambiguous', 'info', ranking.verdict);
  }
  step('stoichiometry');

  // Uncertainty of the best candidate's K.
  let uncertainty: UncertaintyResult | null = null;
  const bestLabel = stoichiometry?.best ?? null;
  const bestFit = bestLabel ? fits.get(bestLabel) : undefined;
  if (
    bestLabel &&
    bestFit &&
    bestFit.status === 'determined' &&
    bestFit.k !== null &&
    measurements.length === usableMixtures.length
  ) {
    const model = parseStoichiometry(bestLabel);
    const propagation = propagateKUncertainty(measurements, model, bestFit, s.uncertainty);
    step('uncertainty');
    const monteCarlo =
      s.monteCarlo.draws > 0
        ? monteCarloK(measurements, model, bestFit, s.uncertainty, s.monteCarlo.draws, s.monteCarlo.seed)
        : null;
    if (monteCarlo && monteCarlo.failed > 0)
      warnings.push(`Monte Carlo: ${monteCarlo.failed} of ${monteCarlo.draws} refits did not converge`);
    uncertainty = { model: bestLabel, propagation, monteCarlo };
    step('monteCarlo');
  }

  // Job's series and the Benesi–Hildebrand cross-check.
  let job: JobBatchResult | null = null;
  const jobIdx = findJobSeries(usableMixtures, s.job.relativeTolerance, s.job.minPoints);
  if (jobIdx.length > 0) {
    const members = jobIdx.map((i) => usableMixtures[i]);
    const r = jobAnalysis(
      members.map((m) => ({ moleFractionB: m.moleFractionB, absorbance: m.absorbance as number })),
      candidates,
    );
    job = {
      ...r,
      sampleIds: members.map((m) => m.sampleId),
      totalConcentrationM: members.reduce((sum, m) => sum + m.a0M + m.b0M, 0) / members.length,
    };
  }
  let moleRatio: MoleRatioBatchResult | null = null;
  const series = findMoleRatioSeries(usableMixtures, s.moleRatio.relativeTolerance, s.moleRatio.minPoints);
  if (series.indices.length > 0) {
    const members = series.indices.map((i) => usableMixtures[i]);
    const varied = series.fixed === 'A' ? 'B' : 'A';
    const r = moleRatioAnalysis(
      members.map((m) => ({
        ratio: varied === 'B' ? m.b0M / m.a0M : m.a0M / m.b0M,
        absorbance: m.absorbance as number,
      })),
      varied,
      candidates,
    );
    moleRatio = {
      ...r,
      sampleIds: members.map((m) => m.sampleId),
      fixed: series.fixed,
      fixedConcentrationM:
        members.reduce((sum, m) => sum + (series.fixed === 'A' ? m.a0M : m.b0M), 0) / members.length,
    };
  }
  for (const check of stoichiometryCrossChecks(stoichiometry?.best ?? null, job, moleRatio)) {
    flag(check.code, check.severity, check.message, { value: check.value });
  }
  let bh: BenesiHildebrandBatchResult | null = null;
  if (usableMixtures.length > 0) {
    const ratio = s.benesiHildebrand.minExcessRatio;
    const excessB = usableMixtures.filter((m) => m.b0M >= ratio * m.a0M && m.a0M > 0);
    const excessA = usableMixtures.filter((m) => m.a0M >= ratio * m.b0M && m.b0M > 0);
    const use =
      excessB.length >= s.benesiHildebrand.minPoints
        ? { list: excessB, who: 'B' as const }
        : excessA.length >= s.benesiHildebrand.minPoints
          ? { list: excessA, who: 'A' as const }
          : null;
    if (!use) {
      bh = {
        applicable: false,
        reason: `needs at least ${s.benesiHildebrand.minPoints} mixtures with one reactant in ≥ ${ratio}-fold excess`,
        sampleIds: [],
        result: null,
        kRatioToGlobalFit: null,
      };
    } else {
      const result = benesiHildebrand(
        use.list.map((m) => ({
          a0M: m.a0M,
          b0M: m.b0M,
          absorbance: m.absorbance as number,
          pathLengthCm: s.pathLengthCm,
        })),
        use.who,
      );
      const k11 = fits.get('1:1')?.k ?? null;
      bh = {
        applicable: result !== null,
        reason: result
          ? `1:1 double-reciprocal line over ${use.list.length} mixtures with ${use.who} in ≥ ${ratio}-fold excess`
          : 'the double-reciprocal line could not be fitted',
        sampleIds: use.list.map((m) => m.sampleId),
        result,
        kRatioToGlobalFit: result?.k != null && k11 !== null ? result.k / k11 : null,
      };
    }
  }
  step('jobAndBenesiHildebrand');

  return {
    schemaVersion: BATCH_RESULT_SCHEMA_VERSION,
    wavelengthNm,
    pathLengthCm: s.pathLengthCm,
    settings: s,
    positions,
    exclusions: s.exclusions,
    blank,
    replicates,
    calibration,
    unknowns,
    controls,
    mixtures,
    stoichiometry,
    uncertainty,
    job,
    moleRatio,
    benesiHildebrand: bh,
    epsilonSource,
    headline: kHeadline(stoichiometry?.candidates.find((c) => c.model === stoichiometry?.best)),
    kNote: K_CONCENTRATION_CONSTANT_NOTE,
    qc,
    warnings,
  };
}
