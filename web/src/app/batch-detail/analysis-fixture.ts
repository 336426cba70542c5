// Invented test data: a cuvette batch of a 1:1 complex, generated from K = 620 L/mol and ε = 1400
// L·mol⁻¹·cm⁻¹ with a fixed ripple standing in for noise. Not a measurement.
import {
  type AnalysisSettings,
  type Reading,
  type SampleDefinition,
  analyzeBatch,
} from '@equilight/analysis';
import type { Batch } from '../batches/batch';
import type { BatchAnalysis } from './batch-analysis';
import { DEFAULT_BATCH_SETTINGS } from '@equilight/contracts';

export const FIXTURE_K = 620;
export const FIXTURE_EPSILON = 1400;
const BLANK = 0.041;
const WAVELENGTH_NM = 590;

const ripple = (i: number) => 0.0018 * Math.sin(i * 2.3 + 0.4);

function complex(a0: number, b0: number, k: number): number {
  const s = a0 + b0 + 1 / k;
  return (s - Math.sqrt(s * s - 4 * a0 * b0)) / 2;
}

export function fixtureSamples(): SampleDefinition[] {
  const samples: SampleDefinition[] = [
    { position: 'C1', sampleId: 'RB-1', role: 'blank', replicateGroup: 'RB' },
    { position: 'C2', sampleId: 'RB-1', role: 'blank', replicateGroup: 'RB' },
  ];
  [1e-4, 2e-4, 3e-4, 4e-4, 5e-4, 6e-4].forEach((c, i) =>
    samples.push({ position: `C${3 + i}`, sampleId: `CAL-${i + 1}`, role: 'standard', concentrationM: c }),
  );
  samples.push(
    { position: 'C9', sampleId: 'WQ-41', role: 'unknown', dilutionFactor: 2, replicateGroup: 'WQ-41' },
    { position: 'C10', sampleId: 'WQ-41', role: 'unknown', dilutionFactor: 2, replicateGroup: 'WQ-41' },
  );
  // A Job's series at 2 mM total (stocks 5 mM, 10 mL flasks), then B in excess.
  for (let i = 1; i <= 9; i++) {
    samples.push({
      position: `C${10 + i}`,
      sampleId: `JS-${i}`,
      role: 'mixture',
      stockAM: 0.005,
      volumeAMl: 4 - 0.4 * i,
      stockBM: 0.005,
      volumeBMl: 0.4 * i,
      totalVolumeMl: 10,
    });
  }
  [0.4, 0.8, 1.2, 1.6, 2.0].forEach((v, i) =>
    samples.push({
      position: `C${20 + i}`,
      sampleId: `EX-${i + 1}`,
      role: 'mixture',
      stockAM: 0.005,
      volumeAMl: 0.4,
      stockBM: 0.05,
      volumeBMl: v,
      totalVolumeMl: 10,
    }),
  );
  return samples;
}

export function fixtureReadings(samples = fixtureSamples()): Reading[] {
  return samples.map((s, i) => {
    let a = BLANK;
    if (s.role === 'standard') a += FIXTURE_EPSILON * (s.concentrationM ?? 0);
    if (s.role === 'unknown') a += FIXTURE_EPSILON * 1.7e-4;
    if (s.role === 'mixture') {
      const a0 = ((s.stockAM ?? 0) * (s.volumeAMl ?? 0)) / (s.totalVolumeMl ?? 1);
      const b0 = ((s.stockBM ?? 0) * (s.volumeBMl ?? 0)) / (s.totalVolumeMl ?? 1);
      a += FIXTURE_EPSILON * complex(a0, b0, FIXTURE_K);
    }
    return {
      position: s.position,
      wavelengthNm: WAVELENGTH_NM,
      absorbance: Number((a + ripple(i)).toFixed(4)),
    };
  });
}

export function fixtureBatch(changes: Partial<Batch> = {}): Batch {
  return {
    id: 7,
    name: 'Cobalt–ligand run 12 (invented)',
    state: 'open',
    profileId: 2,
    profileName: 'Cuvette bench (demo)',
    layoutId: 3,
    layoutName: 'Cuvette series 24',
    layoutVersion: 2,
    manifestId: 4,
    manifestName: 'Run 12 manifest',
    manifestVersion: 1,
    runId: 'CL-12',
    expectedFiles: 1,
    fileCount: 1,
    systemName: 'Co–L',
    temperatureC: 25,
    settings: {
      ...DEFAULT_BATCH_SETTINGS,
      wavelengthNm: null,
      candidates: ['1:1', '1:2', '2:1'],
    },
    createdAt: '2031-05-02T08:00:00Z',
    updatedAt: '2031-05-02T08:10:00Z',
    lastActivityAt: '2031-05-02T08:10:00Z',
    reviewedBy: null,
    reviewedAt: null,
    approvedBy: null,
    createdBy: null,
    approvedAt: null,
    approvalComment: null,
    summary: null,
    ...changes,
  };
}

/** The analysis the server would answer with, computed by the real analysis module. */
export function fixtureAnalysis(
  options: {
    batch?: Partial<Batch>;
    readings?: Reading[];
    settings?: AnalysisSettings;
    samples?: SampleDefinition[];
  } = {},
): BatchAnalysis {
  const batch = fixtureBatch(options.batch);
  const samples = options.samples ?? fixtureSamples();
  const readings = (options.readings ?? fixtureReadings(samples)).map((r) => ({ ...r, intakeFileId: 1 }));
  const settings: AnalysisSettings = options.settings ?? {
    wavelengthNm: batch.settings.wavelengthNm,
    pathLengthCm: batch.settings.pathLengthCm,
    candidates: batch.settings.candidates,
    calibrationModel: batch.settings.calibrationModel,
    linearRangeMaxAbsorbance: batch.settings.linearRangeMaxAbsorbance,
    r2Min: batch.settings.r2Min,
    replicateCvMax: batch.settings.replicateCvMax,
    kCvMax: batch.settings.kCvMax,
    epsilonLPerMolCm: batch.settings.epsilonLPerMolCm,
    exclusions: batch.settings.exclusions,
    monteCarlo: { draws: batch.settings.monteCarloDraws, seed: 1 },
    fitBaseline: batch.settings.fitBaseline,
    concentrationUnit: batch.settings.concentrationUnit,
    molarMassGPerMol: batch.settings.molarMassGPerMol,
    recoveryLimitsPct: batch.settings.recoveryLimitsPct,
  };
  return {
    batch,
    readings,
    samples,
    layoutPositions: samples.map((s) => ({
      position: s.position,
      role: s.role,
      ...(s.replicateGroup ? { replicateGroup: s.replicateGroup } : {}),
    })),
    files: [
      {
        id: 31,
        originalName: 'CL-12.csv',
        sha256: 'c0ffee'.padEnd(64, '0'),
        status: 'stored',
        readingCount: readings.length,
        receivedAt: '2031-05-02T08:10:00Z',
      },
    ],
    settings,
    result: analyzeBatch(readings, samples, settings),
    record: null,
    approvals: [],
  };
}
