import { readFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { wellPathLengthsFromWaterPeak } from '../pathlength-water-wells';
import type { Reading, SampleDefinition } from '../types';
import { REFERENCE_DIR } from './reference-data';

/** k-factor of water at 25 °C, A(975) − A(900) over 1 cm (fpcountr table, Lampinen et al. 2012). */
function kAt25(): number {
  const rows = readFileSync(resolve(REFERENCE_DIR, 'kfactor_water_fpcountr.csv'), 'utf8')
    .split('\n')
    .filter((l) => /^\d/.test(l))
    .map((l) => l.split(',').map(Number));
  return rows.find((r) => r[0] === 25)![1];
}

const sample = (position: string, role: SampleDefinition['role'] = 'mixture'): SampleDefinition => ({
  position,
  sampleId: `S-${position}`,
  role,
});

describe('wellPathLengthsFromWaterPeak', () => {
  it('gives l = (A977 − A900)/k per aqueous well, with k from the reference table (0.172 at 25 °C)', () => {
    const k = kAt25();
    expect(k).toBeCloseTo(0.172, 3);
    // The reference's formula: pathlength_cm = (A977 − A900)_sample / (A977 − A900)_water,1cm
    // (../shared/reference/other_facts.json, microplate_pathlength_correction).
    const truth: Record<string, number> = { A1: 0.31, A2: 0.52, B1: 0.6 };
    const readings: Reading[] = [];
    for (const [position, l] of Object.entries(truth)) {
      readings.push({ position, wavelengthNm: 975, absorbance: 0.04 + k * l });
      readings.push({ position, wavelengthNm: 900, absorbance: 0.04 });
      readings.push({ position, wavelengthNm: 450, absorbance: 0.3 });
    }
    // H12 has no manifest row (an empty well): never given a length.
    readings.push({ position: 'H12', wavelengthNm: 975, absorbance: 0.05 });
    readings.push({ position: 'H12', wavelengthNm: 900, absorbance: 0.04 });
    const out = wellPathLengthsFromWaterPeak(
      readings,
      Object.keys(truth).map((p) => sample(p)),
      {
        kFactorPerCm: k,
      },
    )!;
    expect(out.source).toBe('water peak');
    expect(out.peakNm).toBe(975);
    expect(out.baselineNm).toBe(900);
    for (const [position, l] of Object.entries(truth)) expect(out.byPosition[position]).toBeCloseTo(l, 12);
    expect(out.byPosition).not.toHaveProperty('H12');
    expect(out.warnings).toEqual([]);
  });

  it('uses 0.18 per cm for 977 − 900 nm by default (common practice; within 0.01 of the 25 °C table value)', () => {
    const readings: Reading[] = [
      { position: 'A1', wavelengthNm: 977, absorbance: 0.14 },
      { position: 'A1', wavelengthNm: 900, absorbance: 0.05 },
    ];
    const out = wellPathLengthsFromWaterPeak(readings, [sample('A1')])!;
    expect(out.kFactorPerCm).toBe(0.18);
    expect(Math.abs(out.kFactorPerCm - kAt25())).toBeLessThanOrEqual(0.01);
    expect(out.byPosition.A1).toBeCloseTo(0.09 / 0.18, 12);
  });

  it('returns null without reads near both wavelengths, and keeps the nominal path where a well is not water', () => {
    expect(
      wellPathLengthsFromWaterPeak([{ position: 'A1', wavelengthNm: 977, absorbance: 0.1 }], [sample('A1')]),
    ).toBeNull();
    const out = wellPathLengthsFromWaterPeak(
      [
        { position: 'A1', wavelengthNm: 977, absorbance: 0.04 },
        { position: 'A1', wavelengthNm: 900, absorbance: 0.05 },
        { position: 'A2', wavelengthNm: 977, absorbance: 1.5 },
        { position: 'A2', wavelengthNm: 900, absorbance: 0.05 },
        { position: 'A3', wavelengthNm: 977, absorbance: null, flag: 'saturated' },
        { position: 'A3', wavelengthNm: 900, absorbance: 0.05 },
      ],
      [sample('A1'), sample('A2'), sample('A3', 'blank')],
    )!;
    expect(out.wells).toEqual([]);
    expect(out.warnings).toEqual([
      'no water-peak readings at A3: the nominal path length is used there',
      'A(977) does not exceed A(900) at A1 (not water-filled?): the nominal path length is used there',
      'implausible water-peak path length at A2 (8.06 cm) (outside 0.02–2 cm): the nominal path length is used there',
    ]);
  });
});
