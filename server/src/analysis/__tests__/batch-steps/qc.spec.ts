import { analyzeBatch } from '../../batch';
import { CalibrationStep } from '../../batch-step-calibration';
import {
  absorbanceFlags,
  calibrationFlags,
  collectQcFlags,
  crossCheckFlags,
  qcFlag,
  readingFlags,
  replicateFlags,
  stoichiometryFlags,
  unknownFlags,
} from '../../batch-step-qc';
import { rankCandidates } from '../../batch-step-stoichiometry';
import { readBackUnknowns } from '../../batch-step-unknowns';
import { PositionResult, ReplicateGroupResult } from '../../batch-types';
import { calibrate } from '../../calibration';
import { resolveAnalysisSettings } from '../../options';
import { Reading } from '../../types';
import { makeBatch } from '../batch-fixtures';
import { readJson, readXy } from '../reference-data';
import { ironThiocyanateBatch, runToMixtures } from './iron-thiocyanate';

const s = resolveAnalysisSettings({});

function position(p: Partial<PositionResult> & { position: string }): PositionResult {
  return {
    sampleId: 'X',
    role: 'unknown',
    replicateGroup: null,
    absorbanceRaw: null,
    reads: 1,
    pathLengthCm: 1,
    absorbanceCorrected: null,
    status: 'used',
    exclusionReason: null,
    ...p,
  };
}

describe('QC step', () => {
  it('fills what a flag does not name with null', () => {
    expect(qcFlag('no-calibration', 'warning', 'm', { value: 1 })).toEqual({
      code: 'no-calibration',
      severity: 'warning',
      message: 'm',
      position: null,
      sampleId: null,
      value: 1,
      threshold: null,
    });
  });

  it('reports skipped readings, one flag per position', () => {
    const flags = readingFlags([
      position({ position: 'C1', status: 'saturated' }),
      position({ position: 'C2', status: 'missing' }),
      position({ position: 'C3', status: 'excluded' }),
    ]);
    expect(flags.map((f) => [f.code, f.position, f.message])).toEqual([
      ['saturated-reading', 'C1', 'C1: saturated reading skipped'],
      ['missing-reading', 'C2', 'C2: missing reading skipped'],
    ]);
  });

  it('holds corrected absorbances against the negative tolerance and the linear range (blanks exempt)', () => {
    // Source: the usual photometric working range A ≈ 0.1–1.0 (common practice; shared/reference/
    // other_facts.json beer_lambert_linear_range): the default ceiling is 1.0.
    expect(s.linearRangeMaxAbsorbance).toBe(1);
    const flags = absorbanceFlags(
      [
        position({ position: 'C1', absorbanceCorrected: 1.2 }),
        position({ position: 'C2', absorbanceCorrected: -0.02 }),
        position({ position: 'C3', absorbanceCorrected: 0.5 }),
        position({ position: 'C4', absorbanceCorrected: -0.02, role: 'blank' }),
        position({ position: 'C5', absorbanceCorrected: 1.2, status: 'excluded' }),
      ],
      s,
    );
    expect(flags.map((f) => [f.code, f.position, f.value, f.threshold])).toEqual([
      ['above-linear-range', 'C1', 1.2, 1],
      ['negative-absorbance', 'C2', -0.02, -s.negativeAbsorbanceTolerance],
    ]);
  });

  it('flags a replicate CV above the limit, never for blanks', () => {
    const g = (role: ReplicateGroupResult['role'], cv: number | null): ReplicateGroupResult => ({
      group: 'G',
      sampleId: `S-${role}`,
      role,
      positions: ['C1', 'C2'],
      n: 2,
      skipped: 0,
      excluded: 0,
      mean: 0.3,
      sd: 0.3 * (cv ?? 0),
      cv,
    });
    const flags = replicateFlags(
      [g('unknown', 0.08), g('blank', 0.5), g('control', 0.01), g('unknown', null)],
      s,
    );
    expect(flags).toEqual([
      qcFlag('replicate-cv-high', 'warning', 'S-unknown: replicate CV 8.0 % is above the limit', {
        sampleId: 'S-unknown',
        position: 'C1 C2',
        value: 0.08,
        threshold: 0.05,
      }),
    ]);
  });

  it('says a calibration is missing only where one is wanted', () => {
    const short: CalibrationStep = { calibration: null, standardsUsed: 1, standardsNeeded: 3, warnings: [] };
    const none: CalibrationStep = { ...short, standardsUsed: 0 };
    const onlyMixtures = [position({ position: 'C1', role: 'mixture' })];
    expect(calibrationFlags(short, onlyMixtures, s).map((f) => [f.code, f.value, f.threshold])).toEqual([
      ['no-calibration', 1, 3],
    ]);
    expect(calibrationFlags(none, onlyMixtures, s)).toEqual([]);
    expect(calibrationFlags(none, [position({ position: 'C1' })], s)).toHaveLength(1);
  });

  it('flags a calibration below the R² limit (NIST StRD Norris, certified R² 0.99999…)', () => {
    // Source: NIST/ITL StRD Norris (Norris_certified.json): R² = 0.999993745883712.
    const { x, y } = readXy('Norris');
    const cert = readJson<{ r_squared: number }>('Norris_certified.json');
    const calibration = calibrate(
      x.map((c, i) => ({ concentrationM: c, absorbance: y[i] })),
      { linearRangeMaxAbsorbance: 1e6, outlierStudentizedResidual: 1e6 },
    );
    const step: CalibrationStep = { calibration, standardsUsed: 36, standardsNeeded: 3, warnings: [] };
    const strict = resolveAnalysisSettings({ r2Min: 0.999999, outlierStudentizedResidual: 1e6 });
    const lenient = resolveAnalysisSettings({ r2Min: 0.99999, outlierStudentizedResidual: 1e6 });
    expect(
      calibrationFlags(step, [], strict).find((f) => f.code === 'calibration-r2-low')?.value,
    ).toBeCloseTo(cert.r_squared, 12);
    expect(calibrationFlags(step, [], lenient).some((f) => f.code === 'calibration-r2-low')).toBe(false);
  });

  it('notes unknowns below the LOD or the LOQ with the limit as threshold (ICH Q2(R1), Norris-derived)', () => {
    // Source: Norris_derived_checks.json: LOQ = 10σ/S ≈ 8.83 on the NIST Norris line.
    const { x, y } = readXy('Norris');
    const derived = readJson<Record<string, number>>('Norris_derived_checks.json');
    const calibration = calibrate(
      x.map((c, i) => ({ concentrationM: c, absorbance: y[i] })),
      { linearRangeMaxAbsorbance: 1e6, outlierStudentizedResidual: 1e6 },
    );
    const step: CalibrationStep = { calibration, standardsUsed: 36, standardsNeeded: 3, warnings: [] };
    const group = (id: string, mean: number) => ({
      key: id,
      sample: { position: id, sampleId: id, role: 'unknown' as const },
      positions: [position({ position: id })],
      mean,
      n: 1,
    });
    const at = (xv: number): number => calibration.intercept + calibration.slope * xv;
    const read = readBackUnknowns([group('U5', at(5)), group('U50', at(50))], calibration, s);
    const flags = unknownFlags(read.unknowns, step);
    expect(flags.map((f) => [f.code, f.severity, f.sampleId, f.message])).toEqual([
      ['below-loq', 'info', 'U5', 'U5: concentration is below the LOQ'],
    ]);
    expect(flags[0].threshold).toBeCloseTo(derived.LOQ_resid_sd, 6);
  });

  describe('stoichiometry (Fe³⁺ + SCN⁻, K₁ = 98 M⁻¹ from de Berg et al. 2016)', () => {
    const r = runToMixtures(ironThiocyanateBatch());
    const st = rankCandidates(r.mix.usable, r.mix.candidates, r.mix.epsilonSource, r.s).stoichiometry!;

    it('names the mixtures a candidate is impossible for', () => {
      const flags = stoichiometryFlags(st, r.mix.usable, r.s);
      const oneTwo = flags.find((f) => f.code === 'candidate-impossible' && f.message.startsWith('1:2 '));
      expect(oneTwo?.severity).toBe('info');
      expect(oneTwo?.message).toMatch(/^1:2 is impossible for (M\d, )*M7 \(a reactant would go negative\)$/);
      expect(flags.some((f) => f.severity === 'error')).toBe(false);
    });

    it('calls K constant under no candidate an error, a note when binding is nearly complete', () => {
      const scattered = { ...st, candidates: st.candidates.map((c) => ({ ...c, kCv: 0.4 })) };
      const error = stoichiometryFlags(scattered, r.mix.usable, r.s).find((f) => f.code === 'k-not-constant');
      expect(error).toMatchObject({ severity: 'error', value: 0.4, threshold: 0.15 });
      const [top, ...rest] = scattered.candidates;
      const bound = {
        ...scattered,
        candidates: [{ ...top, fit: { ...top.fit!, status: 'lower-bound' as const } }, ...rest],
      };
      const note = stoichiometryFlags(bound, r.mix.usable, r.s).find((f) => f.code === 'k-not-constant');
      expect(note?.severity).toBe('info');
      expect(note?.message).toMatch(/expected when binding is nearly complete/);
    });

    it('passes an ambiguous verdict on as a note', () => {
      const flags = stoichiometryFlags(
        { ...st, ambiguous: true, verdict: 'two fit alike' },
        r.mix.usable,
        r.s,
      );
      expect(flags[flags.length - 1]).toEqual(qcFlag('stoichiometry-ambiguous', 'info', 'two fit alike'));
    });

    it('has nothing to say without a stoichiometry', () => {
      expect(stoichiometryFlags(null, [], r.s)).toEqual([]);
    });
  });

  it('turns a disagreeing Job maximum into a flag (Job 1:2 maximum at x_B = 0.667, other_facts.json)', () => {
    const job = {
      n: 9,
      maxMoleFractionB: 0.667,
      impliedRatioBToA: 2,
      nearestModel: '1:2',
      absorbanceAtMax: 0.5,
      sharpness: 0.97,
      left: null,
      right: null,
      message: '',
      sampleIds: [],
      totalConcentrationM: 5e-4,
    };
    const [f] = crossCheckFlags('1:1', job, null);
    expect(f).toMatchObject({ code: 'job-disagrees', severity: 'warning', position: null, threshold: null });
    expect(crossCheckFlags('1:2', job, null)).toEqual([]);
  });

  it('gathers every finding in one list, in step order, as analyzeBatch returns it', () => {
    const base = makeBatch();
    const readings: Reading[] = base.readings.map((r) =>
      r.position === 'C4'
        ? { ...r, absorbance: null, flag: 'saturated' as const }
        : r.position === 'C9'
          ? { ...r, absorbance: 0.6 }
          : r.position === 'C5'
            ? { ...r, absorbance: 0.02 }
            : r,
    );
    const settings = { linearRangeMaxAbsorbance: 0.5, r2Min: 0.99999 };
    const result = analyzeBatch(readings, base.samples, settings);
    const r = runToMixtures({ readings, samples: base.samples }, settings);
    const st = rankCandidates(r.mix.usable, r.mix.candidates, r.mix.epsilonSource, r.s);
    const read = readBackUnknowns(r.groups.groups, r.cal.calibration, r.s);
    const flags = collectQcFlags({
      settings: r.s,
      positions: r.blanked.positions,
      replicates: r.groups.replicates,
      calibration: r.cal,
      unknowns: read.unknowns,
      controls: read.controls,
      usableMixtures: r.mix.usable,
      stoichiometry: st.stoichiometry,
      job: result.job,
      moleRatio: result.moleRatio,
    });
    expect(flags).toEqual(result.qc);
    const order = [
      'saturated-reading',
      'negative-absorbance',
      'replicate-cv-high',
      'calibration-r2-low',
      'candidate-impossible',
    ];
    const seen = flags.map((f) => order.indexOf(f.code)).filter((i) => i >= 0);
    expect(seen).toEqual([...seen].sort((a, b) => a - b));
    expect(order.every((c) => flags.some((f) => f.code === c))).toBe(true);
  });
});
