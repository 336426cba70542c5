import { mean } from 'simple-statistics';
import { correctForBlank } from '../../batch-step-blank';
import { resolvePositions } from '../../batch-step-positions';
import { resolveAnalysisSettings } from '../../options';
import { Reading, SampleDefinition } from '../../types';
import { readJson } from '../reference-data';

// Skoog, Holler & Crouch, Principles of Instrumental Analysis, 6th ed., problem 14-10 (given data in
// shared/reference/worked_examples.json): 5.00×10⁻⁴ M indicator, all In⁻, reads A(625 nm) = 0.904 in 1 cm.
const skoog = readJson<{ examples: { id: string; given: Record<string, unknown> }[] }>(
  'worked_examples.json',
).examples.find((e) => e.id === 'skoog_PIA6_14-10')!.given as {
  C_indicator_M: number;
  b_cm: number;
  'in_0.1M_NaOH_(all In-)': { A625: number };
};
const A625 = skoog['in_0.1M_NaOH_(all In-)'].A625;

// Invented wells: three reagent blanks and the indicator read in wells of 0.55 cm and 1 cm liquid depth.
const samples: SampleDefinition[] = [
  { position: 'A1', sampleId: 'RB', role: 'blank', replicateGroup: 'RB' },
  { position: 'A2', sampleId: 'RB', role: 'blank', replicateGroup: 'RB' },
  { position: 'A3', sampleId: 'RB', role: 'blank', replicateGroup: 'RB' },
  { position: 'B1', sampleId: 'IN', role: 'unknown' },
  { position: 'B2', sampleId: 'IN-1cm', role: 'unknown' },
  { position: 'B3', sampleId: 'LOW', role: 'unknown' },
  { position: 'B4', sampleId: 'SAT', role: 'unknown' },
];
const blanks = [0.044, 0.046, 0.045];
const readings: Reading[] = [
  ...blanks.map((a, i) => ({ position: `A${i + 1}`, wavelengthNm: 625, absorbance: a })),
  { position: 'B1', wavelengthNm: 625, absorbance: 0.045 + A625 * 0.55 },
  { position: 'B2', wavelengthNm: 625, absorbance: 0.045 + A625 },
  { position: 'B3', wavelengthNm: 625, absorbance: 0.03 },
  { position: 'B4', wavelengthNm: 625, absorbance: null, flag: 'saturated' },
];

describe('blank step', () => {
  const s = resolveAnalysisSettings({ pathLengthCm: 1, pathLengthByPositionCm: { B1: 0.55 } });
  const located = resolvePositions(readings, samples, s);
  const step = correctForBlank(located.positions, s);
  const by = new Map(step.positions.map((p) => [p.position, p]));

  it('subtracts the mean blank (checked against simple-statistics)', () => {
    expect(step.blank.n).toBe(3);
    expect(step.blank.meanAbsorbance).toBeCloseTo(mean(blanks), 15);
    expect(by.get('B3')?.absorbanceCorrected).toBeCloseTo(0.03 - mean(blanks), 15);
    expect(step.warnings).toEqual([]);
  });

  it('scales a shorter path to the batch path: A(1 cm) = (A_well − A_blank)/l (Skoog 14-10 indicator)', () => {
    // Source: Beer–Lambert A = ε·l·c; the microplate formula A_1cm = A_well/pathlength after blank
    // subtraction (shared/reference/other_facts.json microplate_pathlength_correction).
    expect(by.get('B1')?.absorbanceCorrected).toBeCloseTo(A625, 12);
    expect(by.get('B2')?.absorbanceCorrected).toBeCloseTo(A625, 12);
    // ε = A/(l·c) = 1808 L·mol⁻¹·cm⁻¹ (worked_examples_computed.json eps_In_625).
    const eps = (by.get('B1')?.absorbanceCorrected as number) / (skoog.b_cm * skoog.C_indicator_M);
    expect(eps).toBeCloseTo(1808, 6);
  });

  it('leaves unusable positions uncorrected and the input positions as they were', () => {
    expect(by.get('B4')?.absorbanceCorrected).toBeNull();
    expect(located.positions.every((p) => p.absorbanceCorrected === null)).toBe(true);
  });

  it('uses absorbances as read, with a warning, when there is no usable blank', () => {
    const none = correctForBlank(
      located.positions.filter((p) => p.role !== 'blank'),
      s,
    );
    expect(none.blank).toEqual({ n: 0, meanAbsorbance: 0, sd: null, positions: [] });
    expect(none.positions.find((p) => p.position === 'B3')?.absorbanceCorrected).toBe(0.03);
    expect(none.warnings).toEqual(['no usable blank: absorbances are used as read']);
  });
});
