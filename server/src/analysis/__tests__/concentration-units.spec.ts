import { analyzeBatch } from '../batch';
import {
  CONCENTRATION_UNITS,
  formatConcentration,
  fromMolar,
  inReportingUnit,
  reportingUnitOf,
  reportingUnitProblem,
  toMolar,
} from '../concentration-units';
import { controlRecovery, describeControl } from '../control-recovery';
import { resolveAnalysisSettings } from '../options';
import { makeBatch } from './batch-fixtures';

// Molar mass of iron: the IUPAC (CIAAW) standard atomic weight of Fe, 55.845(2) g/mol (from memory).
const FE_G_PER_MOL = 55.845;
// Molar mass of glucose, C6H12O6: 180.16 g/mol (from memory); clinical chemistry converts 1 mmol/L of
// glucose to 18.0 mg/dL = 180 mg/L (common practice in laboratory medicine, from memory).
const GLUCOSE_G_PER_MOL = 180.16;

describe('concentration units', () => {
  it('when a water lab reports iron in mg/L, then 1 mg/L Fe is 17.9 µmol/L (IUPAC atomic weight of Fe)', () => {
    const molar = toMolar(1, 'mg/L', FE_G_PER_MOL);
    expect(molar).toBeCloseTo(1e-3 / 55.845, 15);
    expect(fromMolar(molar, 'µmol/L')).toBeCloseTo(17.9, 1);
    expect(fromMolar(molar, 'µmol/L')).toBeCloseTo(17.907, 3);
    expect(fromMolar(molar, 'µg/L', FE_G_PER_MOL)).toBeCloseTo(1000, 9);
  });

  it('when glucose is 1 mmol/L, then it is 180 mg/L (the clinical 18 mg/dL per mmol/L)', () => {
    expect(fromMolar(1e-3, 'mg/L', GLUCOSE_G_PER_MOL)).toBeCloseTo(180.16, 9);
    expect(fromMolar(toMolar(1, 'mmol/L'), 'mg/L', GLUCOSE_G_PER_MOL) / 10).toBeCloseTo(18.0, 1);
  });

  it('when an amount unit is chosen, then the SI prefixes apply (IUPAC Green Book §3.6) and no molar mass is needed', () => {
    expect(fromMolar(2.5e-4, 'mol/L')).toBe(2.5e-4);
    expect(fromMolar(2.5e-4, 'mmol/L')).toBeCloseTo(0.25, 14);
    expect(fromMolar(2.5e-4, 'µmol/L')).toBeCloseTo(250, 10);
    expect(toMolar(250, 'µmol/L')).toBeCloseTo(2.5e-4, 18);
  });

  it('when any unit goes there and back, then the value is unchanged', () => {
    for (const unit of CONCENTRATION_UNITS) {
      expect(toMolar(fromMolar(3.3e-5, unit, FE_G_PER_MOL), unit, FE_G_PER_MOL)).toBeCloseTo(3.3e-5, 17);
    }
  });

  it('when a mass unit has no molar mass, then it refuses with a clear message', () => {
    expect(() => fromMolar(1e-5, 'mg/L')).toThrow("mg/L needs the analyte's molar mass (g/mol)");
    expect(() => toMolar(1, 'µg/L', null)).toThrow('µg/L needs');
    expect(() => fromMolar(1e-5, 'mg/L', -3)).toThrow('positive number of g/mol');
    expect(reportingUnitProblem('ppm', null)).toMatch(/unknown concentration unit "ppm"/);
    expect(reportingUnitProblem('mmol/L', null)).toBeNull();
    expect(() => resolveAnalysisSettings({ concentrationUnit: 'mg/L' })).toThrow(/molar mass/);
  });

  it('when a result carries no unit (stored before units), then it reports in mol/L', () => {
    expect(reportingUnitOf({})).toEqual({ unit: 'mol/L', molarMassGPerMol: null });
    const r = reportingUnitOf({ concentrationUnit: 'mg/L', molarMassGPerMol: FE_G_PER_MOL });
    expect(inReportingUnit(null, r)).toBeNull();
    expect(formatConcentration(2.5e-3 / FE_G_PER_MOL, r)).toBe('2.50 mg/L');
    expect(formatConcentration(null, r)).toBe('—');
  });
});

describe('control recovery', () => {
  // Recovery = observed / reference × 100 % (IUPAC Harmonized guidelines for the use of recovery
  // information, Pure Appl. Chem. 71 (1999) 337); limits 90–110 % are common practice.
  it('when a 2.50 mg/L check standard reads 2.41 mg/L, then its recovery is 96.4 % and within 90–110 %', () => {
    const r = controlRecovery(
      toMolar(2.41, 'mg/L', FE_G_PER_MOL),
      toMolar(2.5, 'mg/L', FE_G_PER_MOL),
      [90, 110],
    );
    expect(r.recoveryPct).toBeCloseTo(96.4, 10);
    expect(r.withinLimits).toBe(true);
  });

  it('when the recovery is on a limit it passes; beyond it fails; without a nominal there is none', () => {
    expect(controlRecovery(1.1, 1, [90, 110]).withinLimits).toBe(true);
    expect(controlRecovery(0.899, 1, [90, 110]).withinLimits).toBe(false);
    expect(controlRecovery(1e-5, undefined, [90, 110])).toEqual({
      nominalM: null,
      recoveryPct: null,
      withinLimits: null,
    });
    expect(controlRecovery(null, 1e-5, [90, 110]).recoveryPct).toBeNull();
    expect(controlRecovery(1e-6, 0, [90, 110]).recoveryPct).toBeNull();
  });

  it('when the limits are impossible, then the settings are refused', () => {
    expect(() => resolveAnalysisSettings({ recoveryLimitsPct: [110, 90] })).toThrow(/recovery limits/);
    expect(resolveAnalysisSettings({}).recoveryLimitsPct).toEqual([90, 110]);
  });

  it('when a batch holds a control off its nominal value, then its recovery is a QC error with a plain sentence', () => {
    const base = makeBatch();
    // The fixture's absorbance is 0.04 + 1250·c (mol/L); a control read at 3e-4 mol/L.
    const control = (sampleId: string, position: string, nominalM: number) => ({
      sample: {
        position,
        sampleId,
        role: 'control' as const,
        concentrationM: nominalM,
        replicateGroup: sampleId,
      },
      reading: { position, wavelengthNm: 640, absorbance: 0.04 + 1250 * 3e-4 },
    });
    const good = control('CHK-OK', 'C90', 3e-4);
    const low = control('CHK-LOW', 'C91', 3.6e-4); // reads 3e-4 of 3.6e-4: about 83 %
    const result = analyzeBatch(
      [...base.readings, good.reading, low.reading],
      [...base.samples, good.sample, low.sample],
      { concentrationUnit: 'µmol/L' },
    );
    const [ok, bad] = result.controls;
    expect(ok.recoveryPct).toBeGreaterThan(95);
    expect(ok.flags).not.toContain('recovery-out-of-limits');
    expect(bad.recoveryPct).toBeCloseTo((bad.concentrationM! / 3.6e-4) * 100, 10);
    expect(bad.recoveryPct).toBeLessThan(90);
    expect(bad.flags).toContain('recovery-out-of-limits');
    const finding = result.qc.find((f) => f.code === 'recovery-out-of-limits');
    expect(finding).toMatchObject({ severity: 'error', sampleId: 'CHK-LOW', threshold: 90 });
    expect(finding?.message).toMatch(
      /^CHK-LOW: recovery 8\d\.\d % is outside the acceptance limits 90–110 %$/,
    );
    // Results stay in mol/L; the unit rides along in the settings.
    expect(result.settings.concentrationUnit).toBe('µmol/L');
    expect(ok.concentrationM).toBeCloseTo(3e-4, 5);
  });

  it('when the limits are widened, then the same control passes', () => {
    const base = makeBatch();
    const result = analyzeBatch(
      [...base.readings, { position: 'C91', wavelengthNm: 640, absorbance: 0.04 + 1250 * 3e-4 }],
      [...base.samples, { position: 'C91', sampleId: 'CHK', role: 'control', concentrationM: 3.6e-4 }],
      { recoveryLimitsPct: [80, 120] },
    );
    expect(result.controls[0].flags).not.toContain('recovery-out-of-limits');
    expect(result.qc.some((f) => f.code === 'recovery-out-of-limits')).toBe(false);
  });
});

describe('describeControl', () => {
  it('when a check standard is stated in a mail, then it reads in the batch unit with its recovery', () => {
    const settings = {
      concentrationUnit: 'mg/L' as const,
      molarMassGPerMol: FE_G_PER_MOL,
      recoveryLimitsPct: [90, 110] as [number, number],
    };
    const nominalM = toMolar(2.5, 'mg/L', FE_G_PER_MOL);
    expect(
      describeControl(
        {
          sampleId: 'CHECK-2.5',
          concentrationM: toMolar(2.46, 'mg/L', FE_G_PER_MOL),
          flags: [],
          nominalM,
          recoveryPct: 98.4,
        },
        settings,
      ),
    ).toBe('CHECK-2.5: 2.46 mg/L against 2.50 mg/L nominal, recovery 98.4 % (limits 90–110 %)');
    expect(
      describeControl(
        {
          sampleId: 'CHECK-2.5',
          concentrationM: toMolar(2.1, 'mg/L', FE_G_PER_MOL),
          flags: ['recovery-out-of-limits'],
          nominalM,
          recoveryPct: 84,
        },
        settings,
      ),
    ).toMatch(/recovery 84\.0 % \(limits 90–110 %\) — out of limits$/);
    expect(describeControl({ sampleId: 'QC1', concentrationM: 1e-4, flags: [] }, {})).toBe(
      'QC1: 1.00 × 10⁻⁴ mol/L (no nominal value)',
    );
  });
});
