import { ReplicateGroup } from '../../batch-step-replicates';
import { readBack, readBackUnknowns } from '../../batch-step-unknowns';
import { PositionResult } from '../../batch-types';
import { calibrate } from '../../calibration';
import { resolveAnalysisSettings } from '../../options';
import { SampleDefinition } from '../../types';
import { lre, readJson, readXy } from '../reference-data';

// The NIST StRD Norris line as a calibration (shared/reference/Norris_xy.txt); the read-back values are
// Norris_derived_checks.json (x from y = 100; LOD and LOQ by ICH Q2(R1) from the certified values).
const { x, y } = readXy('Norris');
const calibration = calibrate(
  x.map((c, i) => ({ concentrationM: c, absorbance: y[i] })),
  { linearRangeMaxAbsorbance: 1e6, outlierStudentizedResidual: 1e6 },
);
const derived = readJson<Record<string, number>>('Norris_derived_checks.json');

function group(sample: Omit<SampleDefinition, 'position'>, mean: number | null, n: number): ReplicateGroup {
  const position = `P-${sample.sampleId}`;
  const p: PositionResult = {
    position,
    sampleId: sample.sampleId,
    role: sample.role,
    replicateGroup: sample.replicateGroup ?? null,
    absorbanceRaw: mean,
    reads: 1,
    pathLengthCm: 1,
    absorbanceCorrected: mean,
    status: 'used',
    exclusionReason: null,
  };
  return { key: `${sample.role}@${position}`, sample: { position, ...sample }, positions: [p], mean, n };
}

describe('unknowns step', () => {
  const s = resolveAnalysisSettings({ linearRangeMaxAbsorbance: 1e6 });

  it('reads the concentration back through the line and multiplies by the dilution factor', () => {
    const u = readBack(group({ sampleId: 'W1', role: 'unknown', dilutionFactor: 4 }, 100, 1), calibration, s);
    expect(lre(u.concentrationM! / 4, derived.x_from_y_100)).toBeGreaterThanOrEqual(9);
    expect(u).toMatchObject({ sampleId: 'W1', n: 1, absorbance: 100, dilutionFactor: 4, flags: [] });
    expect(u.seM).toBeGreaterThan(0);
  });

  it('flags below the LOD and below the LOQ on the measured (undiluted) concentration', () => {
    // LOD ≈ 2.91 and LOQ ≈ 8.83 (Norris_derived_checks.json): x = 1 and x = 5 on the Norris line.
    expect(derived.LOD_resid_sd).toBeGreaterThan(1);
    expect(derived.LOQ_resid_sd).toBeGreaterThan(5);
    const at = (xv: number): number => calibration.intercept + calibration.slope * xv;
    const lod = readBack(
      group({ sampleId: 'L', role: 'unknown', dilutionFactor: 10 }, at(1), 1),
      calibration,
      s,
    );
    const loq = readBack(
      group({ sampleId: 'Q', role: 'unknown', dilutionFactor: 10 }, at(5), 1),
      calibration,
      s,
    );
    expect(lod.flags).toEqual(['below-lod']);
    expect(loq.flags).toEqual(['below-loq']);
  });

  it('flags a mean above the linear range of the settings', () => {
    const narrow = resolveAnalysisSettings({ linearRangeMaxAbsorbance: 50 });
    expect(readBack(group({ sampleId: 'H', role: 'unknown' }, 100, 2), calibration, narrow).flags).toEqual([
      'above-linear-range',
    ]);
  });

  it('gives no concentration without a calibration or a usable reading', () => {
    expect(readBack(group({ sampleId: 'N', role: 'unknown' }, 100, 1), null, s)).toMatchObject({
      concentrationM: null,
      seM: null,
      flags: [],
    });
    expect(
      readBack(group({ sampleId: 'M', role: 'unknown' }, null, 0), calibration, s).concentrationM,
    ).toBeNull();
  });

  it('splits unknowns and controls, in group order, and ignores other roles', () => {
    const step = readBackUnknowns(
      [
        group({ sampleId: 'C', role: 'control' }, 300, 1),
        group({ sampleId: 'U', role: 'unknown' }, 200, 1),
        group({ sampleId: 'S', role: 'standard', concentrationM: 1 }, 100, 1),
      ],
      calibration,
      s,
    );
    expect(step.unknowns.map((u) => u.sampleId)).toEqual(['U']);
    expect(step.controls.map((u) => u.sampleId)).toEqual(['C']);
  });
});
