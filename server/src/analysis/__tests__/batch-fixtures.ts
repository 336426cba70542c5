// Invented batches shared by the analysis specs and the characterisation snapshots. Not measurements.
import { solveEquilibrium } from '../equilibrium-solve';
import { seededRandom } from '../random';
import { parseStoichiometry } from '../stoichiometry-model';
import { Reading, SampleDefinition } from '../types';

/** Invented cuvette batch: 1:1 complex, K = 850 M⁻¹, ε = 1250 L/(mol·cm), background 0.04. */
export function makeBatch(noiseSd = 0.002, seed = 5): { readings: Reading[]; samples: SampleDefinition[] } {
  const rng = seededRandom(seed);
  const model = parseStoichiometry('1:1');
  const samples: SampleDefinition[] = [];
  const readings: Reading[] = [];
  let n = 0;
  const add = (s: Omit<SampleDefinition, 'position'>, complexM: number): string => {
    const position = `C${++n}`;
    samples.push({ position, ...s });
    readings.push({
      position,
      wavelengthNm: 640,
      absorbance: 0.04 + 1250 * complexM + noiseSd * rng.normal(),
    });
    return position;
  };
  add({ sampleId: 'BLK', role: 'blank', replicateGroup: 'B' }, 0);
  add({ sampleId: 'BLK', role: 'blank', replicateGroup: 'B' }, 0);
  for (const c of [1e-4, 2e-4, 3e-4, 4e-4, 5e-4, 6e-4])
    add({ sampleId: `S${c}`, role: 'standard', concentrationM: c }, c);
  add({ sampleId: 'U1', role: 'unknown', dilutionFactor: 10, replicateGroup: 'U1' }, 3e-4);
  add({ sampleId: 'U1', role: 'unknown', dilutionFactor: 10, replicateGroup: 'U1' }, 3e-4);
  for (let i = 1; i <= 9; i++) {
    const vb = 0.4 * i;
    const a0 = (5e-3 * (4 - vb)) / 10;
    const b0 = (5e-3 * vb) / 10;
    add(
      {
        sampleId: `J${i}`,
        role: 'mixture',
        stockAM: 5e-3,
        volumeAMl: 4 - vb,
        stockBM: 5e-3,
        volumeBMl: vb,
        totalVolumeMl: 10,
      },
      solveEquilibrium(850, a0, b0, model).productM,
    );
  }
  for (const vb of [0.4, 0.8, 1.2, 1.6]) {
    const a0 = (5e-3 * 0.4) / 10;
    const b0 = (5e-2 * vb) / 10;
    add(
      {
        sampleId: `X${vb}`,
        role: 'mixture',
        stockAM: 5e-3,
        volumeAMl: 0.4,
        stockBM: 5e-2,
        volumeBMl: vb,
        totalVolumeMl: 10,
      },
      solveEquilibrium(850, a0, b0, model).productM,
    );
  }
  return { readings, samples };
}

export interface Design {
  model: string;
  k: number;
  epsilon: number;
  /** [A₀, B₀] per mixture, mol/L (stocks 1 mM, 10 mL flasks). */
  mixtures: [number, number][];
  noiseSd: number;
  seed?: number;
  standards?: boolean;
}

/** Invented batch: blanks, optional standards of the complex, and the given mixtures. */
export function simulate(d: Design): { readings: Reading[]; samples: SampleDefinition[] } {
  const rng = seededRandom(d.seed ?? 3);
  const model = parseStoichiometry(d.model);
  const readings: Reading[] = [];
  const samples: SampleDefinition[] = [];
  let n = 0;
  const add = (s: Omit<SampleDefinition, 'position'>, complexM: number): void => {
    const position = `C${++n}`;
    samples.push({ position, ...s });
    readings.push({
      position,
      wavelengthNm: 500,
      absorbance: 0.03 + d.epsilon * complexM + d.noiseSd * rng.normal(),
    });
  };
  add({ sampleId: 'BLK', role: 'blank', replicateGroup: 'BLK' }, 0);
  add({ sampleId: 'BLK', role: 'blank', replicateGroup: 'BLK' }, 0);
  if (d.standards) {
    for (const c of [2e-5, 5e-5, 1e-4, 1.5e-4, 2e-4, 2.5e-4])
      add({ sampleId: `S${c}`, role: 'standard', concentrationM: c }, c);
  }
  const stock = 1e-3;
  d.mixtures.forEach(([a0, b0], i) => {
    add(
      {
        sampleId: `M${i + 1}`,
        role: 'mixture',
        stockAM: stock,
        volumeAMl: (a0 / stock) * 10,
        stockBM: stock,
        volumeBMl: (b0 / stock) * 10,
        totalVolumeMl: 10,
      },
      solveEquilibrium(d.k, a0, b0, model).productM,
    );
  });
  return { readings, samples };
}

/** Continuous variation at A₀ + B₀ = 5×10⁻⁴ M, 11 points x_B = 0 … 1 (the ends hold one reactant only). */
export const jobSeries = (): [number, number][] =>
  Array.from({ length: 11 }, (_, i) => [5e-4 * (1 - i / 10), 5e-4 * (i / 10)] as [number, number]);
/** A held at 10⁻⁴ M, B rising to four-fold. */
export const moleRatioSeriesB = (): [number, number][] =>
  [0.25, 0.5, 0.75, 1, 1.25, 1.5, 1.75, 2, 2.5, 3, 3.5, 4].map((r) => [1e-4, r * 1e-4] as [number, number]);
/** B held at 10⁻⁴ M, A rising to four-fold. */
export const moleRatioSeriesA = (): [number, number][] =>
  [0.25, 0.5, 0.75, 1, 1.25, 1.5, 1.75, 2, 2.5, 3, 3.5, 4].map((r) => [r * 1e-4, 1e-4] as [number, number]);
