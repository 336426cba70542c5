import { chooseWavelength, comparePositions, resolvePositions } from '../../batch-step-positions';
import { resolveAnalysisSettings } from '../../options';
import { Reading, SampleDefinition } from '../../types';

// Invented cuvette and plate rows; no measurement.
const samples: SampleDefinition[] = [
  { position: 'A10', sampleId: 'S2', role: 'standard', concentrationM: 2e-4 },
  { position: 'a2', sampleId: 'BLK', role: 'blank' },
  { position: 'B1', sampleId: 'U1', role: 'unknown' },
  { position: 'B2', sampleId: 'U2', role: 'unknown' },
  { position: 'B3', sampleId: 'U3', role: 'unknown' },
  { position: 'B4', sampleId: 'U4', role: 'unknown' },
];
const readings: Reading[] = [
  { position: 'A2', wavelengthNm: 510, absorbance: 0.04 },
  { position: 'A2', wavelengthNm: 510, absorbance: 0.06 },
  { position: 'a10', wavelengthNm: 510.3, absorbance: 0.5 },
  { position: 'B1', wavelengthNm: 510, absorbance: null, flag: 'saturated' },
  { position: 'B2', wavelengthNm: 510, absorbance: null },
  { position: 'B3', wavelengthNm: 510, absorbance: 0.2 },
  { position: 'H12', wavelengthNm: 510, absorbance: 0.3 },
  { position: 'A2', wavelengthNm: 620, absorbance: 0.9 },
];

describe('positions step', () => {
  it('orders positions as on a plate: rows A–H, then columns by number (A2 before A10)', () => {
    // Source: the 96-well layout of rows A–H and columns 1–12 (ANSI/SLAS 1-2004 footprint, from memory).
    expect(['A10', 'B1', 'A2', 'A1'].sort(comparePositions)).toEqual(['A1', 'A2', 'A10', 'B1']);
    expect(['C10', 'C9', 'C1'].sort(comparePositions)).toEqual(['C1', 'C9', 'C10']);
  });

  it('analyses the most frequent wavelength, says so when there are several, and obeys the settings', () => {
    const auto = chooseWavelength(readings, resolveAnalysisSettings({}));
    expect(auto.wavelengthNm).toBe(510);
    expect(auto.warnings).toEqual([
      'readings at 3 wavelengths (510, 510.3, 620 nm); analysed 510 nm — set the wavelength to choose another',
    ]);
    expect(chooseWavelength(readings, resolveAnalysisSettings({ wavelengthNm: 620 }))).toEqual({
      wavelengthNm: 620,
      warnings: [],
    });
    expect(chooseWavelength([], resolveAnalysisSettings({})).wavelengthNm).toBeNull();
  });

  it('joins rows to readings case-insensitively, averages the reads and never reads a bad one as zero', () => {
    const step = resolvePositions(
      readings,
      samples,
      resolveAnalysisSettings({ exclusions: [{ position: 'b3', reason: 'scratched cuvette' }] }),
    );
    expect(step.wavelengthNm).toBe(510);
    const by = new Map(step.positions.map((p) => [p.position, p]));
    expect(step.positions.map((p) => p.position)).toEqual(['A2', 'A10', 'B1', 'B2', 'B3', 'B4', 'H12']);
    // Arithmetic mean of the two reads (ISO 3534-1:2006): (0.04 + 0.06)/2.
    expect(by.get('A2')?.absorbanceRaw).toBeCloseTo(0.05, 15);
    expect(by.get('A2')?.reads).toBe(2);
    // 510.3 nm lies within the default 0.5 nm tolerance of 510 nm.
    expect(by.get('A10')?.absorbanceRaw).toBe(0.5);
    expect(by.get('B1')).toMatchObject({ status: 'saturated', absorbanceRaw: null });
    expect(by.get('B2')).toMatchObject({ status: 'missing', absorbanceRaw: null });
    expect(by.get('B3')).toMatchObject({ status: 'excluded', exclusionReason: 'scratched cuvette' });
    expect(by.get('B4')).toMatchObject({ status: 'no-reading', reads: 0 });
    expect(by.get('H12')).toMatchObject({ status: 'no-sample', sampleId: null, role: null });
    expect(step.positions.every((p) => p.absorbanceCorrected === null)).toBe(true);
    expect(step.sampleByPosition.get('A2')?.sampleId).toBe('BLK');
    expect(step.warnings).toEqual([
      'readings at 3 wavelengths (510, 510.3, 620 nm); analysed 510 nm — set the wavelength to choose another',
      'readings at H12 have no manifest row and were not used',
      'no reading at 510 nm for B4',
    ]);
  });

  it('warns about a position listed twice (the first row wins) and an exclusion that matches nothing', () => {
    const step = resolvePositions(
      readings,
      [...samples, { position: 'A10', sampleId: 'OTHER', role: 'unknown' }],
      resolveAnalysisSettings({
        wavelengthNm: 510,
        exclusions: [{ position: 'G7', reason: 'no such well' }],
      }),
    );
    expect(step.sampleByPosition.get('A10')?.sampleId).toBe('S2');
    expect(step.warnings.slice(0, 2)).toEqual([
      'manifest lists A10 twice; the first row is used',
      'exclusion of G7 matches no position in this batch',
    ]);
  });

  it('takes the path length per position, else the batch’s', () => {
    const step = resolvePositions(
      readings,
      samples,
      resolveAnalysisSettings({ pathLengthCm: 1, pathLengthByPositionCm: { B3: 0.5 } }),
    );
    expect(step.positions.find((p) => p.position === 'B3')?.pathLengthCm).toBe(0.5);
    expect(step.positions.find((p) => p.position === 'A2')?.pathLengthCm).toBe(1);
  });

  it('leaves its input untouched', () => {
    const before = JSON.stringify([readings, samples]);
    resolvePositions(readings, samples, resolveAnalysisSettings({}));
    expect(JSON.stringify([readings, samples])).toBe(before);
  });
});
