import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { provideRouter } from '@angular/router';
import { formatK, vantHoff } from '@equilight/analysis';
import { ScatterChart } from '../shared/chart/scatter-chart';
import { ScatterChartStub } from '../shared/chart/scatter-chart-stub';
import { type SystemTemperatures, inverseKelvin, vantHoffChart } from './temperature-system';
import { TemperaturesPage } from './temperatures-page';

const text = (el: Element | null) => (el?.textContent ?? '').replace(/\s+/g, ' ').trim();

// Invented: K of a 1:1 complex at three temperatures, and one batch with another stoichiometry.
const POINTS = [
  { temperatureC: 15, k: 910 },
  { temperatureC: 25, k: 700 },
  { temperatureC: 35, k: 548 },
];
const FIT = vantHoff(POINTS);

function system(): SystemTemperatures {
  return {
    systemName: 'Ni–L (invented)',
    model: '1:1',
    points: [
      ...POINTS.map((p, i) => ({
        batchId: 10 + i,
        batchName: `Ni–L ${p.temperatureC} °C`,
        state: 'approved' as const,
        temperatureC: p.temperatureC,
        model: '1:1',
        k: p.k,
        kSe: p.k * 0.03,
        kCi95: [p.k * 0.94, p.k * 1.06] as [number, number],
        kText: formatK({
          model: '1:1',
          status: 'determined',
          k: p.k,
          kCi95: [p.k * 0.94, p.k * 1.06],
          kLowerBound95: null,
          kUpperBound95: null,
        }),
        excludedBecause: null,
      })),
      {
        batchId: 20,
        batchName: 'Ni–L 45 °C',
        state: 'open' as const,
        temperatureC: 45,
        model: '1:2',
        k: 3.1e6,
        kSe: null,
        kCi95: null,
        kText: formatK({
          model: '1:2',
          status: 'determined',
          k: 3.1e6,
          kCi95: null,
          kLowerBound95: null,
          kUpperBound95: null,
        }),
        excludedBecause: 'not approved yet',
      },
      {
        batchId: 21,
        batchName: 'Ni–L 55 °C',
        state: 'approved' as const,
        temperatureC: 55,
        model: '1:1',
        k: null,
        kSe: null,
        kCi95: [1.2e6, null],
        kText: formatK({
          model: '1:1',
          status: 'lower-bound',
          k: null,
          kCi95: [1.2e6, null],
          kLowerBound95: 2.1e6,
          kUpperBound95: null,
        }),
        excludedBecause: 'K is a lower bound',
      },
    ],
    vantHoff: { ...FIT },
    note: "van 't Hoff fit over 3 batches at 3 temperatures (1:1).",
  };
}

describe('vantHoffChart', () => {
  it('plots ln K against 1/T, keeps left-out batches apart, and draws the fitted line', () => {
    const chart = vantHoffChart(system());
    const [used, left, line] = chart.series;
    expect(used.points).toHaveLength(3);
    expect(used.points[0].x).toBeCloseTo(1 / 288.15, 12);
    expect(used.points[0].y).toBeCloseTo(Math.log(910), 12);
    expect(left.kind).toBe('flagged');
    expect(left.points).toHaveLength(1);
    expect(line.points[0].x).toBeCloseTo(inverseKelvin(35), 12);
    for (const p of line.points) expect(p.y).toBeCloseTo(FIT.intercept + FIT.slope * p.x, 12);
    expect(chart.xTitle).toBe('1/T (K⁻¹)');
  });
});

describe('TemperaturesPage', () => {
  it('shows ΔH° in kJ/mol and ΔS° in J·mol⁻¹·K⁻¹ with SE, the points and the note; the toggle asks again', async () => {
    TestBed.configureTestingModule({
      imports: [TemperaturesPage],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        provideRouter([]),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    TestBed.overrideComponent(TemperaturesPage, {
      remove: { imports: [ScatterChart] },
      add: { imports: [ScatterChartStub] },
    });
    const http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(TemperaturesPage);
    await fixture.whenStable();
    http.expectOne('/api/temperatures?includeUnapproved=false').flush([system()]);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;

    const dh = text(el.querySelector('[data-testid="delta-h"]'));
    expect(dh).toMatch(/^−?-?\d+(\.\d+)? ± \d+(\.\d+)? kJ\/mol$/);
    expect(Number(dh.split(' ')[0].replace('−', '-'))).toBeCloseTo(FIT.deltaHJPerMol / 1000, 1);
    expect(text(el.querySelector('[data-testid="delta-s"]'))).toContain('J·mol⁻¹·K⁻¹');
    expect(text(el.querySelector('[data-testid="note"]'))).toContain("van 't Hoff fit over 3 batches");
    const rows = el.querySelectorAll('tbody tr');
    expect(rows).toHaveLength(5);
    expect(text(rows[0])).toContain('15.0');
    expect(text(rows[0])).toContain('288.15');
    // The K text of the shared format: value, unit and the 95 % interval.
    expect(text(rows[0].querySelector('[data-testid="point-k"]'))).toBe(
      '1:1 910 L·mol⁻¹ (95 % CI 855 to 965)',
    );
    // A lower bound reads as a bound, never as a bare number.
    expect(text(rows[4].querySelector('[data-testid="point-k"]'))).toBe(
      '1:1 > 2.1 × 10⁶ L·mol⁻¹ (95 % lower bound; too large to determine from these concentrations)',
    );
    expect(rows[0].querySelector('a')!.getAttribute('href')).toBe('/batches/10');
    expect(text(rows[3])).toContain('no: not approved yet');
    expect(el.querySelector('canvas[role="img"]')!.getAttribute('aria-label')).toContain('ln K against 1/T');

    // with a fit, a usable point says it is in it, and the batch name and its state stay apart
    expect(text(rows[0])).toContain('yes');
    expect(text(rows[0])).toContain('°C (approved)');

    (el.querySelector('[data-testid="include-unapproved"] button') as HTMLButtonElement).click();
    await fixture.whenStable();
    http.expectOne('/api/temperatures?includeUnapproved=true').flush([]);
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="no-systems"]')).not.toBeNull();
    http.verify();
  });

  it("when a system has no van 't Hoff fit then no point claims to be in the fit", async () => {
    TestBed.configureTestingModule({
      imports: [TemperaturesPage],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        provideRouter([]),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    TestBed.overrideComponent(TemperaturesPage, {
      remove: { imports: [ScatterChart] },
      add: { imports: [ScatterChartStub] },
    });
    const http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(TemperaturesPage);
    await fixture.whenStable();
    const one = system();
    http
      .expectOne('/api/temperatures?includeUnapproved=false')
      .flush([{ ...one, points: [one.points[0]], vantHoff: null, note: 'One temperature: no fit yet.' }]);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const row = el.querySelector('tbody tr')!;
    expect(text(row)).toContain('no fit yet');
    expect(text(row)).not.toMatch(/\byes\b/);
    expect(vantHoffChart({ ...one, points: [one.points[0]], vantHoff: null }).series[0].label).not.toBe(
      'In the fit',
    );
    http.verify();
  });
});
