// Characterisation guard for analyzeBatch: every batch the repository holds (the invented spec
// batches, samples/analysis, samples/demo) and a set of edge cases run through it, and the whole
// BatchResult is compared with a stored snapshot. Any change in a number, a word, the order of the QC
// flags or warnings, or the order of keys fails here. Update the snapshots only for an intended change
// of the output (and say so in the commit).
import { readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { parseInstrumentFile, parseManifestCsv } from '../../parsers';
import { ParseRulesInput } from '../../parsers/parse-rules';
import { analyzeBatch } from '../batch';
import { AnalysisSettings } from '../options';
import { seededRandom } from '../random';
import { Reading, SampleDefinition } from '../types';
import { jobSeries, makeBatch, moleRatioSeriesA, moleRatioSeriesB, simulate } from './batch-fixtures';

const ROOT = resolve(__dirname, '../../../..');

/**
 * JSON that keeps what plain JSON would lose: key order as built, NaN, ±Infinity, −0 and undefined
 * are written as tagged strings, so a snapshot tells them apart from null or 0.
 */
function exactJson(value: unknown): string {
  return JSON.stringify(
    value,
    function (_key, v: unknown) {
      if (v === undefined) return '«undefined»';
      if (typeof v === 'number') {
        if (Number.isNaN(v)) return '«NaN»';
        if (v === Infinity) return '«Infinity»';
        if (v === -Infinity) return '«-Infinity»';
        if (Object.is(v, -0)) return '«-0»';
      }
      return v;
    },
    1,
  );
}

interface Case {
  name: string;
  load: () => Promise<{ readings: Reading[]; samples: SampleDefinition[] }>;
  settings?: AnalysisSettings;
}

const sync =
  (f: () => { readings: Reading[]; samples: SampleDefinition[] }): Case['load'] =>
  () =>
    Promise.resolve(f());

async function fromFiles(
  readingFiles: string[],
  manifestFile: string,
  rules: ParseRulesInput = { plateFormat: 'cuvette' },
): Promise<{ readings: Reading[]; samples: SampleDefinition[] }> {
  const readings: Reading[] = [];
  for (const f of readingFiles) {
    const run = await parseInstrumentFile(readFileSync(join(ROOT, f)), f, rules);
    readings.push(...run.readings);
  }
  const manifest = await parseManifestCsv(readFileSync(join(ROOT, manifestFile)), manifestFile);
  return { readings, samples: manifest.samples };
}

const base = makeBatch();
const edit = (f: (r: Reading) => Reading): Case['load'] =>
  sync(() => ({ readings: base.readings.map(f), samples: base.samples }));

/** One K, from the ε the batch says (the hard-case plate, K = 2000 L·mol⁻¹). */
const plate = {
  model: '1:1',
  k: 2000,
  epsilon: 1800,
  standards: true,
  noiseSd: 0.002,
  seed: 11,
  mixtures: [
    ...[0.5, 1, 2, 3, 4, 6, 8].map((r) => [2e-4, r * 2e-4] as [number, number]),
    ...[0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9].map(
      (x) => [1e-3 * (1 - x), 1e-3 * x] as [number, number],
    ),
  ],
};

const cases: Case[] = [
  // The spec batch (batch.spec.ts) and its variants.
  { name: 'spec batch', load: sync(() => makeBatch()) },
  { name: 'spec batch, noisier', load: sync(() => makeBatch(0.01, 9)) },
  {
    name: 'spec batch, exclusions (one unmatched)',
    load: sync(() => base),
    settings: {
      exclusions: [
        { position: 'c3', reason: 'bubble in cuvette' },
        { position: 'Z9', reason: 'no such cuvette' },
      ],
    },
  },
  {
    name: 'spec batch, saturated and missing readings',
    load: edit((r) =>
      r.position === 'C4'
        ? { ...r, absorbance: null, flag: 'saturated' as const }
        : r.position === 'C9'
          ? { ...r, absorbance: null }
          : r,
    ),
  },
  {
    name: 'spec batch, QC thresholds',
    load: edit((r) =>
      r.position === 'C9' ? { ...r, absorbance: 0.6 } : r.position === 'C5' ? { ...r, absorbance: 0.02 } : r,
    ),
    settings: { linearRangeMaxAbsorbance: 0.5, r2Min: 0.99999 },
  },
  {
    name: 'spec batch, scrambled mixtures',
    load: sync(() => {
      const rng = seededRandom(1);
      return {
        readings: base.readings.map((r) => {
          const s = base.samples.find((x) => x.position === r.position);
          return s?.role === 'mixture' ? { ...r, absorbance: 0.05 + 0.5 * rng.uniform() } : r;
        }),
        samples: base.samples,
      };
    }),
  },
  {
    name: 'spec batch, extra position and a second wavelength',
    load: sync(() => ({
      readings: [
        ...base.readings,
        { position: 'C99', wavelengthNm: 640, absorbance: 0.3 },
        { position: 'C1', wavelengthNm: 900, absorbance: 0.1 },
      ],
      samples: base.samples,
    })),
  },
  {
    name: 'spec batch, manifest problems',
    load: sync(() => ({
      readings: base.readings.filter((r) => r.position !== 'C20'),
      samples: [
        ...base.samples.map((s) =>
          s.position === 'C3'
            ? { ...s, concentrationM: undefined }
            : s.position === 'C10'
              ? { ...s, sampleId: 'U2' }
              : s.position === 'C14'
                ? { ...s, totalVolumeMl: 1 }
                : s,
        ),
        { position: 'c5', sampleId: 'DUP', role: 'unknown' as const },
      ],
    })),
  },
  {
    name: 'spec batch, no blank, through the origin, path lengths by position',
    load: sync(() => ({ readings: base.readings, samples: base.samples.filter((s) => s.role !== 'blank') })),
    settings: { calibrationModel: 'through-origin', pathLengthByPositionCm: { C12: 0.5, C13: 2 } },
  },
  {
    name: 'spec batch, two standards for a straight line',
    load: sync(() => ({
      readings: base.readings,
      samples: base.samples.filter((s) => s.role !== 'standard' || s.concentrationM! <= 2e-4),
    })),
  },
  {
    name: 'spec batch, no standards, no ε',
    load: sync(() => ({
      readings: base.readings,
      samples: base.samples.filter((s) => s.role !== 'standard'),
    })),
  },
  {
    name: 'spec batch, typed ε, fitted baseline, Monte Carlo, two candidates',
    load: sync(() => base),
    settings: {
      epsilonLPerMolCm: 1250,
      epsilonSeLPerMolCm: 20,
      fitBaseline: true,
      monteCarlo: { draws: 60, seed: 4 },
      candidates: ['1:2', '1:1'],
    },
  },
  {
    name: 'spec batch, Monte Carlo',
    load: sync(() => base),
    settings: { monteCarlo: { draws: 200, seed: 3 } },
  },
  { name: 'spec batch, wavelength not read', load: sync(() => base), settings: { wavelengthNm: 700 } },
  {
    name: 'spec batch, curved calibration, unknowns near the blank',
    load: sync(() => {
      const conc = new Map(base.samples.map((s) => [s.position, s.concentrationM]));
      return {
        readings: base.readings.map((r) => {
          const c = conc.get(r.position);
          if (c !== undefined) return { ...r, absorbance: (r.absorbance ?? 0) - 3e5 * c * c };
          return r.position === 'C9' || r.position === 'C10' ? { ...r, absorbance: 0.0405 } : r;
        }),
        samples: base.samples,
      };
    }),
  },
  {
    name: 'spec batch, standards all at one concentration',
    load: sync(() => ({
      readings: base.readings,
      samples: base.samples.map((s) => (s.role === 'standard' ? { ...s, concentrationM: 2e-4 } : s)),
    })),
  },
  {
    name: 'spec batch, few noisy mixtures (ambiguous)',
    load: sync(() => {
      const rng = seededRandom(2);
      const keep = new Set(['C11', 'C14', 'C17', 'C19', 'C20', 'C22']);
      const samples = base.samples.filter((s) => s.role !== 'mixture' || keep.has(s.position));
      return {
        readings: base.readings.map((r) => ({ ...r, absorbance: (r.absorbance ?? 0) + 0.01 * rng.normal() })),
        samples,
      };
    }),
    settings: { candidates: ['1:1', '1:2'] },
  },
  {
    name: 'spec batch, unknowns between LOD and LOQ',
    load: edit((r) => (r.position === 'C9' || r.position === 'C10' ? { ...r, absorbance: 0.052 } : r)),
  },
  {
    name: 'hard case: weak binding, very noisy, two candidates',
    load: sync(() =>
      simulate({
        model: '1:1',
        k: 300,
        epsilon: 2000,
        noiseSd: 0.01,
        seed: 5,
        mixtures: [1, 2, 3, 4].map((i) => [1e-4, i * 5e-5] as [number, number]),
      }),
    ),
    settings: { candidates: ['1:1', '1:2'] },
  },
  { name: 'empty batch', load: sync(() => ({ readings: [], samples: [] })) },
  // The hard cases (verdict-hard-cases.spec.ts).
  ...(
    [
      { model: '1:1', k: 1e10, epsilon: 4000, design: 'job' },
      { model: '1:2', k: 1e15, epsilon: 3000, design: 'job' },
      { model: '2:1', k: 1e15, epsilon: 3000, design: 'job' },
      { model: '1:1', k: 1e10, epsilon: 4000, design: 'ratio-B' },
      { model: '1:2', k: 1e15, epsilon: 3000, design: 'ratio-B' },
      { model: '2:1', k: 1e15, epsilon: 3000, design: 'ratio-A' },
    ] as const
  ).map((c): Case => ({
    name: `hard case: strong ${c.model}, ${c.design}`,
    load: sync(() =>
      simulate({
        ...c,
        mixtures:
          c.design === 'job' ? jobSeries() : c.design === 'ratio-B' ? moleRatioSeriesB() : moleRatioSeriesA(),
        noiseSd: 0.002,
      }),
    ),
  })),
  {
    name: 'hard case: tris complex, 1:3',
    load: sync(() =>
      simulate({
        model: '1:3',
        k: 10 ** 21.3,
        epsilon: 11100,
        mixtures: Array.from(
          { length: 11 },
          (_, i) => [1e-4 * (1 - i / 10), 1e-4 * (i / 10)] as [number, number],
        ),
        noiseSd: 0.002,
      }),
    ),
  },
  { name: 'hard case: plate', load: sync(() => simulate(plate)) },
  { name: 'hard case: plate, seed 100', load: sync(() => simulate({ ...plate, seed: 100 })) },
  { name: 'hard case: plate, seed 101', load: sync(() => simulate({ ...plate, seed: 101 })) },
  {
    name: 'hard case: plate, typed ε',
    load: sync(() => simulate(plate)),
    settings: { epsilonLPerMolCm: 1800 * 1.1, epsilonSeLPerMolCm: 10 },
  },
  {
    name: 'hard case: plate, wrong typed ε',
    load: sync(() => simulate(plate)),
    settings: { epsilonLPerMolCm: 1800 * 1.6, epsilonSeLPerMolCm: 5 },
  },
  {
    name: 'hard case: fit not converged',
    load: sync(() =>
      simulate({
        model: '1:1',
        k: 2000,
        epsilon: 1800,
        noiseSd: 0.002,
        mixtures: [0.5, 1, 2, 3, 4, 6].map((r) => [2e-4, r * 2e-4] as [number, number]),
      }),
    ),
    settings: { fit: { maxIterations: 1 } },
  },
  {
    name: 'hard case: weak binding, noisy',
    load: sync(() =>
      simulate({
        model: '1:1',
        k: 500,
        epsilon: 2000,
        noiseSd: 0.004,
        standards: true,
        mixtures: [1, 2, 3, 4, 5, 6].map((i) => [1e-4, i * 5e-5] as [number, number]),
      }),
    ),
  },
  // The sample files.
  {
    name: 'samples/analysis',
    load: () => fromFiles(['samples/analysis/readings.csv'], 'samples/analysis/manifest.csv'),
  },
  {
    name: 'samples/analysis, CLI options',
    load: () => fromFiles(['samples/analysis/readings.csv'], 'samples/analysis/manifest.csv'),
    settings: {
      wavelengthNm: 640,
      candidates: ['1:1', '1:2'],
      exclusions: [{ position: 'C20', reason: 'excluded on the command line' }],
      monteCarlo: { draws: 100, seed: 1 },
    },
  },
  {
    name: 'samples/demo CX-15',
    load: () => fromFiles(['samples/demo/complex/CX-15.csv'], 'samples/demo/complex/manifest.csv'),
  },
  {
    name: 'samples/demo CX-35',
    load: () => fromFiles(['samples/demo/complex/CX-35.csv'], 'samples/demo/complex/manifest.csv'),
  },
  {
    name: 'samples/demo CX-25 (three exports)',
    load: () =>
      fromFiles(
        [1, 2, 3].map((i) => `samples/demo/exports/cuvette-1/CX-25-part${i}.csv`),
        'samples/demo/complex/manifest.csv',
      ),
  },
  {
    name: 'samples/demo CX-25 part 1 only',
    load: () =>
      fromFiles(['samples/demo/exports/cuvette-1/CX-25-part1.csv'], 'samples/demo/complex/manifest.csv'),
  },
  {
    name: 'samples/demo water FE-101',
    load: () =>
      fromFiles(['samples/demo/exports/plate-reader-1/FE-101.csv'], 'samples/demo/water/manifest.csv', {
        format: 'plate_grid',
        plateFormat: '96',
      }),
  },
];

describe('analyzeBatch characterisation (the whole BatchResult against stored snapshots)', () => {
  for (const c of cases) {
    it(c.name, async () => {
      const { readings, samples } = await c.load();
      expect(exactJson(analyzeBatch(readings, samples, c.settings))).toMatchSnapshot();
    });
  }
});
