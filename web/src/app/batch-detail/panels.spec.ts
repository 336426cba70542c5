import { TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { fixtureAnalysis } from './analysis-fixture';
import { CalibrationPanel } from './calibration-panel';
import { calibrationChart, jobChart, residualChart } from '../shared/chart/chart-data';
import { EquilibriumPanel } from './equilibrium-panel';
import { formatKValue, formatNumber } from '../shared/format/number-format';
import { ScatterChart } from '../shared/chart/scatter-chart';
import { ScatterChartStub } from '../shared/chart/scatter-chart-stub';
import { UnknownsTable, sampleFindings } from './unknowns-table';
import { QcPanel, messageAfterPlace, placeOf } from './qc-panel';
import { replicateSpreadAnalysis } from './analysis-variants-fixture';
import type { QcFlag, UnknownResult } from '@equilight/analysis';

const text = (el: Element | null) => (el?.textContent ?? '').replace(/\s+/g, ' ').trim();

describe('batch page tables (real analysis of an invented batch)', () => {
  const analysis = fixtureAnalysis();
  const result = analysis.result;

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [{ provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
    });
    for (const panel of [CalibrationPanel, EquilibriumPanel])
      TestBed.overrideComponent(panel, {
        remove: { imports: [ScatterChart] },
        add: { imports: [ScatterChartStub] },
      });
  });

  it('calibration: slope, intercept, R², ε, LOD and LOQ with their units, and the standards table', async () => {
    const fixture = TestBed.createComponent(CalibrationPanel);
    fixture.componentRef.setInput('calibration', result.calibration);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const cal = result.calibration!;
    const stats = text(el.querySelector('[data-testid="calibration-stats"]'));
    expect(stats).toContain(`${formatNumber(cal.slope, 4)} ± ${formatNumber(cal.slopeSe, 2)} AU·L·mol⁻¹`);
    expect(stats).toContain(`${formatNumber(cal.intercept, 3)} ± ${formatNumber(cal.interceptSe, 2)} AU`);
    expect(text(el.querySelector('[data-testid="calibration-r2"]'))).toBe(cal.r2.toFixed(5));
    expect(text(el.querySelector('[data-testid="calibration-epsilon"]'))).toMatch(
      /^14\d\d(\.\d)? ± .* L·mol⁻¹·cm⁻¹$/,
    );
    expect(text(el.querySelector('[data-testid="calibration-lod"]'))).toBe(`${formatNumber(cal.lodM)} mol/L`);
    expect(text(el.querySelector('[data-testid="calibration-loq"]'))).toBe(`${formatNumber(cal.loqM)} mol/L`);
    expect(text(el.querySelector('[data-testid="calibration-range"]'))).toContain('all standards in range');
    const rows = el.querySelectorAll('[data-testid="standards-table"] tbody tr');
    expect(rows).toHaveLength(6);
    expect(text(rows[0])).toContain('CAL-1');
    expect(text(el.querySelector('[data-testid="standards-table"] thead'))).toContain('c (mol/L)');
    expect(el.querySelectorAll('canvas[role="img"]')).toHaveLength(2);
  });

  it('calibration: says so when there is none', async () => {
    const fixture = TestBed.createComponent(CalibrationPanel);
    fixture.componentRef.setInput('calibration', null);
    await fixture.whenStable();
    expect(text(fixture.nativeElement.querySelector('[data-testid="no-calibration"]'))).toContain(
      'No calibration',
    );
  });

  it('unknowns: concentration in mol/L with SE and the dilution factor', async () => {
    const fixture = TestBed.createComponent(UnknownsTable);
    fixture.componentRef.setInput('unknowns', result.unknowns);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const row = el.querySelector('[data-sample="WQ-41"]')!;
    const u = result.unknowns[0];
    expect(text(row)).toContain('× 2');
    expect(text(row)).toContain('C9, C10');
    expect(text(row.querySelector('[data-testid="unknown-concentration"]'))).toBe(
      formatNumber(u.concentrationM, 4),
    );
    expect(text(row)).toContain(formatNumber(u.seM, 2));
    expect(text(el.querySelector('thead'))).toContain('c (mol/L)');
    expect(text(el.querySelector('thead'))).toContain('SE (mol/L)');
    // ≈ 2 × 1.7e-4 M, the value the invented readings were made from
    expect(u.concentrationM).toBeCloseTo(3.4e-4, 5);
  });

  it("unknowns: each sample's QC column shows its own findings, not 'none' for all", async () => {
    const spread = replicateSpreadAnalysis().result;
    const fixture = TestBed.createComponent(UnknownsTable);
    fixture.componentRef.setInput('unknowns', spread.unknowns);
    fixture.componentRef.setInput('controls', spread.controls);
    fixture.componentRef.setInput('qc', spread.qc);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    // C10 read 30 % above C9: the replicate check (CV over the batch's limit) names WQ-41's positions.
    const finding = spread.qc.find((f) => f.code === 'replicate-cv-high');
    expect(finding).toBeDefined();
    const cell = text(el.querySelector('[data-sample="WQ-41"] [data-testid="unknown-qc"]'));
    expect(cell).not.toContain('none');
    expect(cell).toContain('Replicates disagree');
    // Every other row with no finding of its own still says none.
    const others = [...el.querySelectorAll('tbody tr')].filter(
      (r) => r.getAttribute('data-sample') !== 'WQ-41',
    );
    for (const row of others) {
      const own = sampleFindings(
        [...spread.unknowns, ...spread.controls].find((u) => u.sampleId === row.getAttribute('data-sample'))!,
        spread.qc,
      );
      expect(text(row.querySelector('[data-testid="unknown-qc"]'))).toBe(
        own.length ? own.map((f) => f.title).join(' ') : 'none',
      );
    }
  });

  it('a finding naming a replicate group\'s positions ("C9 C10") belongs to each of them, each code once', () => {
    const row: UnknownResult = {
      ...result.unknowns[0],
      sampleId: 'WQ-41',
      positions: ['C10'],
      flags: ['replicate-cv-high'],
    };
    const flag = (position: string | null, sampleId: string | null): QcFlag => ({
      code: 'replicate-cv-high',
      severity: 'warning',
      message: 'replicates differ',
      position,
      sampleId,
      value: 0.2,
      threshold: 0.05,
    });
    expect(sampleFindings(row, [flag('C9 C10', null)]).map((f) => f.code)).toEqual(['replicate-cv-high']);
    expect(sampleFindings({ ...row, flags: [] }, [flag('C11 C12', null)])).toEqual([]);
    expect(sampleFindings({ ...row, flags: [] }, [flag(null, 'WQ-41')])).toHaveLength(1);
  });

  it('QC lines do not repeat the position ("at C8" then "C8: …")', () => {
    const f: QcFlag = {
      code: 'saturated-reading',
      severity: 'warning',
      message: 'C8: saturated reading skipped',
      position: 'C8',
      sampleId: null,
      value: null,
      threshold: null,
    };
    expect(messageAfterPlace(f)).toBe('saturated reading skipped');
    expect(messageAfterPlace({ ...f, position: null })).toBe('C8: saturated reading skipped');
    const group: QcFlag = {
      ...f,
      code: 'replicate-cv-high',
      position: 'C1 C2 C3',
      sampleId: 'TAP-001',
      message: 'TAP-001: replicate CV 9.0 % is above the limit',
    };
    expect(messageAfterPlace(group)).toBe('replicate CV 9.0 % is above the limit');
    expect(placeOf(group)).toBe('TAP-001 at C1, C2, C3');
    expect(placeOf(f)).toBe('at C8');
  });

  it('equilibrium: the verdict, K per candidate with units and CI, ICE tables and a candidate switch', async () => {
    const fixture = TestBed.createComponent(EquilibriumPanel);
    fixture.componentRef.setInput('result', result);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    // The long verdict is said once, at the top of the page, not again in this panel.
    expect(el.querySelector('[data-testid="verdict-detail"]')).toBeNull();
    expect(text(el)).not.toContain(result.stoichiometry!.verdict);
    const oneToOne = el.querySelector('[data-testid="candidates-table"] [data-model="1:1"]')!;
    const fit = result.stoichiometry!.candidates.find((c) => c.model === '1:1')!.fit!;
    expect(text(oneToOne.querySelector('[data-testid="candidate-k"]'))).toBe(`${formatKValue(fit)} L·mol⁻¹`);
    expect(text(oneToOne.querySelector('[data-testid="candidate-interval"]'))).toMatch(
      /^95 % CI [\d.]+ to [\d.]+$/,
    );
    expect(text(oneToOne)).toContain('best');
    expect(text(el.querySelector('[data-model="1:2"]'))).toContain('ruled out');
    expect(text(el.querySelector('[data-model="1:2"]'))).toContain('L²·mol⁻²');

    const ice = el.querySelector('[data-testid="ice-tables"] [data-sample="JS-5"]')!;
    const rowHeads = [...ice.querySelectorAll('tbody th')].map((h) => text(h));
    expect(rowHeads).toEqual(['Initial', 'Change', 'Equilibrium', 'K']);
    expect(text(ice.querySelector('thead'))).toContain('mol/L');
    expect(text(ice.querySelector('thead'))).toContain('[AB]');
    expect(text(ice.querySelector('[data-testid="mixture-k"]'))).toMatch(/^6\d\d(\.\d)? L·mol⁻¹$/);
    expect(text(el.querySelector('[data-testid="chosen-k"]'))).toContain('K under 1:1');
    expect(text(el.querySelector('[data-testid="benesi-hildebrand"]'))).toContain('L·mol⁻¹');
    expect(text(el.querySelector('[data-testid="job-summary"]'))).not.toBe('');
    expect(text(el.querySelector('[data-testid="uncertainty"]'))).toContain('Propagated');
  });

  it('QC panel: severity as icon and word, with meaning and what to do', async () => {
    const fixture = TestBed.createComponent(QcPanel);
    fixture.componentRef.setInput('flags', [
      {
        code: 'replicate-cv-high',
        severity: 'warning',
        message: 'WQ-41 replicates differ by 9 %',
        position: null,
        sampleId: 'WQ-41',
        value: 0.09,
        threshold: 0.05,
      },
      {
        code: 'calibration-r2-low',
        severity: 'error',
        message: 'R² 0.97 is below 0.995',
        position: null,
        sampleId: null,
        value: 0.97,
        threshold: 0.995,
      },
    ]);
    await fixture.whenStable();
    const items = [...fixture.nativeElement.querySelectorAll('[data-testid="qc-list"] li')] as HTMLElement[];
    expect(items.map((i) => i.getAttribute('data-severity'))).toEqual(['error', 'warning']);
    expect(text(items[0])).toContain('Error');
    expect(text(items[0])).toContain('Calibration not straight enough');
    expect(text(items[0])).toContain('What to do:');
    expect(text(items[1])).toContain('Warning');
    expect(text(items[1])).toContain('WQ-41');
  });
});

describe('chart data mapping', () => {
  const result = fixtureAnalysis().result;

  it('calibration chart: the standards and a fitted line over their range', () => {
    const chart = calibrationChart(result.calibration!);
    expect(chart.series.map((s) => s.kind)).toEqual(['points', 'line']);
    expect(chart.series[0].points).toHaveLength(6);
    const [from, to] = chart.series[1].points;
    expect(from).toEqual({ x: 0, y: result.calibration!.intercept });
    expect(to.x).toBe(6e-4);
    expect(to.y).toBeCloseTo(result.calibration!.slope * 6e-4 + result.calibration!.intercept, 12);
    expect(chart.xTitle).toContain('mol/L');
  });

  it('residual chart: one residual per standard and a zero line', () => {
    const chart = residualChart(result.calibration!);
    expect(chart.series[0].points.map((p) => p.y)).toEqual(result.calibration!.points.map((p) => p.residual));
    expect(chart.series.at(-1)!.points.every((p) => p.y === 0)).toBe(true);
  });

  it("Job's chart: the series mixtures by mole fraction and two branches meeting at the maximum", () => {
    const chart = jobChart(result.job!, result.mixtures);
    const points = chart.series[0].points;
    expect(points).toHaveLength(result.job!.sampleIds.length);
    expect(points.map((p) => p.x)).toEqual([...points.map((p) => p.x)].sort((a, b) => a - b));
    const rising = chart.series.find((s) => s.label === 'Rising branch')!;
    const falling = chart.series.find((s) => s.label === 'Falling branch')!;
    expect(rising.points[1].x).toBe(result.job!.maxMoleFractionB);
    expect(falling.points[0].x).toBe(result.job!.maxMoleFractionB);
    expect(rising.points[1].y).toBeCloseTo(falling.points[0].y, 6);
  });
});
