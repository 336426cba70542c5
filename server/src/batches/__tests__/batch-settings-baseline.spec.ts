import {
  analyzeBatch,
  parseStoichiometry,
  solveEquilibrium,
  type Reading,
  type SampleDefinition,
} from '../../analysis';
import { batchSettingsSchema, updateSettingsSchema } from '../../contracts/batches';
import { toAnalysisSettings } from '../batches.service';

/** Settings as a batch stored them before the baseline option existed. */
const STORED_BEFORE = {
  wavelengthNm: 520,
  pathLengthCm: 1,
  candidates: ['1:1'],
  calibrationModel: 'linear',
  linearRangeMaxAbsorbance: 1,
  r2Min: 0.995,
  replicateCvMax: 0.05,
  kCvMax: 0.15,
  epsilonLPerMolCm: null,
  monteCarloDraws: 0,
  exclusions: [],
};

describe('batch settings: a constant baseline in the fits', () => {
  it('when settings were stored without the option then they still parse, with the baseline off', () => {
    const settings = batchSettingsSchema.parse(JSON.parse(JSON.stringify(STORED_BEFORE)));
    expect(settings.fitBaseline).toBe(false);
    expect(toAnalysisSettings(settings).fitBaseline).toBe(false);
  });

  it('when a change asks for it then the analysis fits the baseline', () => {
    const change = updateSettingsSchema.parse({
      settings: { fitBaseline: true },
      reason: 'the indicator absorbs',
    });
    const settings = batchSettingsSchema.parse({ ...STORED_BEFORE, ...change.settings });
    const analysis = toAnalysisSettings(settings);
    expect(analysis.fitBaseline).toBe(true);

    // Invented indicator titration: A held at 0.1 mmol/L absorbs by itself (ε_A = 3000 L·mol⁻¹·cm⁻¹),
    // the complex more (ε_C = 9000); 1:1, K = 2000 L·mol⁻¹; complex from the module's solveEquilibrium.
    const model = parseStoichiometry('1:1');
    const samples: SampleDefinition[] = [{ position: 'C1', sampleId: 'BLK', role: 'blank' }];
    const readings: Reading[] = [{ position: 'C1', wavelengthNm: 520, absorbance: 0 }];
    [0.1, 0.2, 0.5, 1, 2, 4].forEach((mM, i) => {
      const position = `C${i + 2}`;
      const x = solveEquilibrium(2000, 1e-4, mM * 1e-3, model).productM;
      samples.push({
        position,
        sampleId: `MIX-${i + 1}`,
        role: 'mixture',
        stockAM: 0.001,
        volumeAMl: 1,
        stockBM: 0.01,
        volumeBMl: mM,
        totalVolumeMl: 10,
      });
      readings.push({ position, wavelengthNm: 520, absorbance: 3000 * (1e-4 - x) + 9000 * x });
    });
    const result = analyzeBatch(readings, samples, analysis);
    expect(result.settings.fitBaseline).toBe(true);
    const fit = result.stoichiometry?.candidates[0].fit;
    // The offset is ε_A·A₀ = 3000 × 10⁻⁴ = 0.300 (Beer–Lambert).
    expect(fit?.baseline).toBeCloseTo(0.3, 6);
    expect(fit?.k).toBeCloseTo(2000, 0);
  });

  it('when the option is not a boolean then the change is refused', () => {
    expect(
      updateSettingsSchema.safeParse({ settings: { fitBaseline: 'yes' }, reason: 'try it' }).success,
    ).toBe(false);
  });
});
