import { TestBed } from '@angular/core/testing';
import { toMolar } from '@equilight/analysis';
import { fixtureAnalysis, fixtureReadings, fixtureSamples, FIXTURE_EPSILON } from './analysis-fixture';
import { formatNumber } from '../shared/format/number-format';
import { UnknownsTable } from './unknowns-table';

const text = (el: Element | null) => (el?.textContent ?? '').replace(/\s+/g, ' ').trim();

// Cobalt: 58.933 g/mol, the IUPAC standard atomic weight of Co (from memory).
const CO_G_PER_MOL = 58.933;

/** The invented batch with two check standards of nominal 10 mg/L Co: one reads 9.9 mg/L, one 8.0 mg/L. */
function withControls(settings: { concentrationUnit: 'mg/L' | 'mol/L'; molarMassGPerMol: number | null }) {
  const nominalM = toMolar(10, 'mg/L', CO_G_PER_MOL);
  const samples = [
    ...fixtureSamples(),
    { position: 'C30', sampleId: 'QC-GOOD', role: 'control' as const, concentrationM: nominalM },
    { position: 'C31', sampleId: 'QC-LOW', role: 'control' as const, concentrationM: nominalM },
  ];
  const blank = 0.041;
  const readings = fixtureReadings(samples).map((r) =>
    r.position === 'C30'
      ? { ...r, absorbance: blank + FIXTURE_EPSILON * nominalM * 0.99 }
      : r.position === 'C31'
        ? { ...r, absorbance: blank + FIXTURE_EPSILON * nominalM * 0.8 }
        : r,
  );
  return fixtureAnalysis({
    samples,
    readings,
    batch: {
      settings: {
        ...fixtureAnalysis().batch.settings,
        ...settings,
        recoveryLimitsPct: [90, 110],
      },
    },
  }).result;
}

describe('UnknownsTable: units and control recovery (real analysis of an invented batch)', () => {
  async function render(result: ReturnType<typeof withControls>) {
    const fixture = TestBed.createComponent(UnknownsTable);
    fixture.componentRef.setInput('unknowns', result.unknowns);
    fixture.componentRef.setInput('controls', result.controls);
    fixture.componentRef.setInput('qc', result.qc);
    fixture.componentRef.setInput('settings', result.settings);
    await fixture.whenStable();
    return fixture.nativeElement as HTMLElement;
  }

  it('when the batch reports in mg/L, then concentrations, SE and nominal values are in mg/L', async () => {
    const result = withControls({ concentrationUnit: 'mg/L', molarMassGPerMol: CO_G_PER_MOL });
    const el = await render(result);
    expect(text(el.querySelector('[data-testid="unknowns-c-header"]'))).toBe('c (mg/L)');
    expect(text(el.querySelector('caption'))).toContain('in mg/L (molar mass 58.933 g/mol)');
    const u = result.unknowns[0];
    // mg/L = mol/L × g/mol × 1000.
    expect(text(el.querySelector('[data-sample="WQ-41"] [data-testid="unknown-concentration"]'))).toBe(
      formatNumber(u.concentrationM! * CO_G_PER_MOL * 1000, 4),
    );
  });

  it('when a control recovers outside the limits, then its Recovery cell says so in words and the QC cell names it', async () => {
    const result = withControls({ concentrationUnit: 'mg/L', molarMassGPerMol: CO_G_PER_MOL });
    const el = await render(result);
    expect(text(el.querySelector('[data-testid="recovery-header"]'))).toBe(
      'Recovery (%) of nominal; limits 90–110',
    );
    const good = result.controls.find((c) => c.sampleId === 'QC-GOOD')!;
    const low = result.controls.find((c) => c.sampleId === 'QC-LOW')!;
    expect(good.recoveryPct).toBeGreaterThan(95);
    expect(low.recoveryPct).toBeLessThan(85);
    expect(text(el.querySelector('[data-sample="QC-GOOD"] [data-testid="control-recovery"]'))).toBe(
      `${good.recoveryPct!.toFixed(1)} , of 10.00 mg/L`,
    );
    const lowCell = el.querySelector('[data-sample="QC-LOW"] [data-testid="control-recovery"]')!;
    expect(text(lowCell)).toBe(`warning${low.recoveryPct!.toFixed(1)} out of limits, of 10.00 mg/L`);
    expect(text(el.querySelector('[data-sample="QC-LOW"] [data-testid="unknown-qc"]'))).toContain(
      'Recovery out of limits',
    );
  });

  it('when a result has no unit or no nominal values (stored before), then it reads in mol/L without a Recovery column', async () => {
    const result = withControls({ concentrationUnit: 'mol/L', molarMassGPerMol: null });
    const old = {
      ...result,
      settings: { ...result.settings, concentrationUnit: undefined },
      controls: result.controls.map(({ nominalM: _n, recoveryPct: _r, ...c }) => c),
    };
    const fixture = TestBed.createComponent(UnknownsTable);
    fixture.componentRef.setInput('unknowns', old.unknowns);
    fixture.componentRef.setInput('controls', old.controls);
    fixture.componentRef.setInput('settings', old.settings);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    expect(text(el.querySelector('[data-testid="unknowns-c-header"]'))).toBe('c (mol/L)');
    expect(el.querySelector('[data-testid="recovery-header"]')).toBeNull();
  });
});
