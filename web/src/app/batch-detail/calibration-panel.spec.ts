import { TestBed } from '@angular/core/testing';
import { calibrate, type CalibrationResult } from '@equilight/analysis';
import { fixtureAnalysis } from './analysis-fixture';
import { curvedCalibrationAnalysis } from './analysis-variants-fixture';
import { CalibrationPanel } from './calibration-panel';
import { EPSILON_UNIT, formatNumber, formatQuantity } from '../shared/format/number-format';
import { ScatterChart } from '../shared/chart/scatter-chart';
import { ScatterChartStub } from '../shared/chart/scatter-chart-stub';

const text = (el: Element | null) => (el?.textContent ?? '').replace(/\s+/g, ' ').trim();

async function render(calibration: CalibrationResult | null): Promise<HTMLElement> {
  TestBed.overrideComponent(CalibrationPanel, {
    remove: { imports: [ScatterChart] },
    add: { imports: [ScatterChartStub] },
  });
  const fixture = TestBed.createComponent(CalibrationPanel);
  fixture.componentRef.setInput('calibration', calibration);
  await fixture.whenStable();
  return fixture.nativeElement as HTMLElement;
}

describe('calibration panel: linearity and detection limits (real analyses of invented batches)', () => {
  it('a straight calibration: Mandel test passes, with PW and F in words', async () => {
    const cal = fixtureAnalysis().result.calibration!;
    const el = await render(cal);
    const m = cal.linearity!;
    expect(m.curved).toBe(false);
    const linearity = text(el.querySelector('[data-testid="calibration-linearity"]'));
    expect(linearity).toContain('linear');
    expect(linearity).toContain(
      `no significant curvature: PW ${formatNumber(m.testValue)} ≤ F ${formatNumber(m.criticalValue)} (99 %, 1 and 3 df)`,
    );
  });

  it('a calibration that bends: Mandel test says curved, with PW above F', async () => {
    const cal = curvedCalibrationAnalysis().result.calibration!;
    const m = cal.linearity!;
    expect(m.curved).toBe(true);
    // F(1, 3; 0.99) = 34.12, the tabulated 99 % point of the F distribution (NIST/SEMATECH e-Handbook of
    // Statistical Methods, §1.3.6.7.3, from memory).
    expect(m.criticalValue).toBeCloseTo(34.12, 1);
    const el = await render(cal);
    const linearity = text(el.querySelector('[data-testid="calibration-linearity"]'));
    expect(linearity).toContain('curved');
    expect(linearity).toContain(
      `a quadratic fits significantly better: PW ${formatNumber(m.testValue)} > F ${formatNumber(m.criticalValue)}`,
    );
  });

  it('labels LOD and LOQ "extrapolated below the lowest standard" when they are, with units from the format module', async () => {
    const cal = fixtureAnalysis().result.calibration!;
    expect(cal.lodExtrapolated).toBe(true);
    expect(cal.lodM).toBeLessThan(cal.lowestStandardM!);
    const el = await render(cal);
    expect(text(el.querySelector('[data-testid="calibration-lod"]'))).toBe(formatQuantity(cal.lodM, 'mol/L'));
    expect(text(el.querySelector('[data-testid="calibration-lod-extrapolated"] span'))).toBe(
      `extrapolated below the lowest standard (${formatQuantity(cal.lowestStandardM, 'mol/L')})`,
    );
    expect(text(el.querySelector('[data-testid="calibration-loq-extrapolated"]'))).toContain(
      'extrapolated below the lowest standard',
    );
    expect(text(el.querySelector('[data-testid="calibration-epsilon"]'))).toMatch(
      new RegExp(`^14\\d\\d(\\.\\d)? ± [\\d.]+ ${EPSILON_UNIT}$`),
    );
  });

  it('no label when the limits lie above the lowest standard', async () => {
    // Invented standards: a tiny lowest standard and ±0.01 AU scatter put the LOD above it.
    const cal = calibrate(
      [1e-6, 1e-4, 2e-4, 3e-4, 4e-4, 5e-4].map((c, i) => ({
        concentrationM: c,
        absorbance: 1400 * c + (i % 2 ? 0.01 : -0.01),
      })),
    );
    expect(cal.lodExtrapolated).toBe(false);
    expect(cal.loqExtrapolated).toBe(false);
    // ICH Q2(R1): LOD = 3.3 σ/S.
    expect(cal.lodM).toBeCloseTo((3.3 * cal.residualSd) / cal.slope, 12);
    const el = await render(cal);
    expect(el.querySelector('[data-testid="calibration-lod-extrapolated"]')).toBeNull();
    expect(el.querySelector('[data-testid="calibration-loq-extrapolated"]')).toBeNull();
  });

  it('says the Mandel test was not run with too few standards', async () => {
    const cal = calibrate(
      [1e-4, 2e-4, 3e-4, 4e-4].map((c) => ({ concentrationM: c, absorbance: 1400 * c + 0.001 })),
    );
    expect(cal.linearity).toBeNull();
    const el = await render(cal);
    expect(text(el.querySelector('[data-testid="calibration-linearity"]'))).toContain('not tested');
  });
});
