// Invented batches of Fe³⁺ + SCN⁻ ⇌ FeSCN²⁺ for the step tests, run through the real steps. The
// constants are external: K₁ = 98 M⁻¹ (25 °C, I = 0.5 M; de Berg, Maeder & Clifford (2016) Inorg. Chim.
// Acta 445, 155, in shared/reference/chemistry_refs.json) and ε(447 nm) = 4700 L·mol⁻¹·cm⁻¹ (from
// memory, chemistry_refs.json). The noise is seeded; no measurement.
import { correctForBlank } from '../../batch-step-blank';
import { calibrateStandards } from '../../batch-step-calibration';
import { analyseMixtures } from '../../batch-step-mixtures';
import { resolvePositions } from '../../batch-step-positions';
import { groupReplicates } from '../../batch-step-replicates';
import { AnalysisSettings, resolveAnalysisSettings } from '../../options';
import { seededRandom } from '../../random';
import { Reading, SampleDefinition } from '../../types';
import { readJson } from '../reference-data';

const refs = readJson<{ values: { quantity: string; value: number | null }[] }>('chemistry_refs.json').values;
/** K₁ of FeSCN²⁺, M⁻¹ (de Berg et al. 2016, chemistry_refs.json). */
export const K1 = refs.find((v) => v.quantity === 'K1')!.value as number;
/** ε of FeSCN²⁺ at 447 nm, L·mol⁻¹·cm⁻¹ (from memory, chemistry_refs.json). */
export const EPSILON = refs.find((v) => v.quantity.startsWith('molar absorptivity of FeSCN'))!
  .value as number;
export const BLANK = 0.035;
/** Fe³⁺ (reactant A) and SCN⁻ (reactant B) stocks, mol/L; 10 mL flasks. */
export const STOCK_FE = 0.2;
export const STOCK_SCN = 1e-3;

/** [FeSCN²⁺] at equilibrium for a 1:1 complex: the smaller root of x² − (A₀ + B₀ + 1/K)x + A₀B₀ = 0. */
export function complexOneToOne(k: number, a0: number, b0: number): number {
  const sum = a0 + b0 + 1 / k;
  return (sum - Math.sqrt(sum * sum - 4 * a0 * b0)) / 2;
}

/** Fe³⁺ in excess: 2 mL SCN⁻ stock with 0.5 … 5 mL Fe³⁺ stock, made up to 10 mL. */
export const EXCESS_FE_ML = [0.5, 1, 1.5, 2, 3, 4, 5];

export function ironThiocyanateBatch(
  volumesFeMl: readonly number[] = EXCESS_FE_ML,
  noiseSd = 0.001,
  seed = 17,
): { readings: Reading[]; samples: SampleDefinition[] } {
  const rng = seededRandom(seed);
  const samples: SampleDefinition[] = [];
  const readings: Reading[] = [];
  const add = (s: Omit<SampleDefinition, 'position'>, complexM: number): void => {
    const position = `C${samples.length + 1}`;
    samples.push({ position, ...s });
    readings.push({
      position,
      wavelengthNm: 447,
      absorbance: BLANK + EPSILON * complexM + noiseSd * rng.normal(),
    });
  };
  add({ sampleId: 'RB', role: 'blank', replicateGroup: 'RB' }, 0);
  add({ sampleId: 'RB', role: 'blank', replicateGroup: 'RB' }, 0);
  volumesFeMl.forEach((v, i) => {
    const a0 = (STOCK_FE * v) / 10;
    const b0 = (STOCK_SCN * 2) / 10;
    add(
      {
        sampleId: `M${i + 1}`,
        role: 'mixture',
        stockAM: STOCK_FE,
        volumeAMl: v,
        stockBM: STOCK_SCN,
        volumeBMl: 2,
        totalVolumeMl: 10,
      },
      complexOneToOne(K1, a0, b0),
    );
  });
  return { readings, samples };
}

/** The steps up to the mixtures, as `analyzeBatch` chains them. */
export function runToMixtures(
  batch: { readings: Reading[]; samples: SampleDefinition[] },
  settings: AnalysisSettings = { epsilonLPerMolCm: EPSILON, epsilonSeLPerMolCm: 50 },
) {
  const s = resolveAnalysisSettings(settings);
  const located = resolvePositions(batch.readings, batch.samples, s);
  const blanked = correctForBlank(located.positions, s);
  const groups = groupReplicates(blanked.positions, located.sampleByPosition);
  const cal = calibrateStandards(blanked.positions, located.sampleByPosition, s);
  const mix = analyseMixtures(groups.groups, cal.calibration, s);
  return { s, located, blanked, groups, cal, mix };
}
