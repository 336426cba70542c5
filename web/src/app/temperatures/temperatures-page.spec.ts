import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { provideRouter } from '@angular/router';
import { formatK, vantHoff } from '@equilight/analysis';
import { ScatterChart } from '../shared/chart/scatter-chart';
import { ScatterChartStub } from '../shared/chart/scatter-chart-stub';
import {
  type SystemTemperatures,
  type TemperaturePoint,
  type TemperaturePointsPage,
  inverseKelvin,
  vantHoffChart,
} from './temperature-system';
import { TemperaturesPage } from './temperatures-page';

const text = (el: Element | null) => (el?.textContent ?? '').replace(/\s+/g, ' ').trim();

// Invented: K of a 1:1 complex at three temperatures (three batches at 15 °C), one batch at 45 °C not
// approved yet, one at 55 °C whose K is only a lower bound.
const USED = [
  { temperatureC: 15, k: 880 },
  { temperatureC: 15, k: 910 },
  { temperatureC: 15, k: 941 },
  { temperatureC: 25, k: 700 },
  { temperatureC: 35, k: 548 },
];
const FIT = vantHoff(USED);
const SYSTEM = 'Ni–L (invented)';
const geometricMean = (ks: number[]) => Math.exp(ks.reduce((s, k) => s + Math.log(k), 0) / ks.length);
const at15 = USED.filter((p) => p.temperatureC === 15).map((p) => p.k);

function system(): SystemTemperatures {
  return {
    systemName: SYSTEM,
    model: '1:1',
    vantHoff: { ...FIT },
    note: "van 't Hoff fit over 5 batches at 3 temperatures (1:1).",
    counts: { batches: 30, used: 5 },
    groups: [
      { temperatureC: 15, batches: 3, used: 3, kGeometricMean: geometricMean(at15), kMin: 880, kMax: 941 },
      { temperatureC: 25, batches: 1, used: 1, kGeometricMean: 700, kMin: 700, kMax: 700 },
      { temperatureC: 35, batches: 1, used: 1, kGeometricMean: 548, kMin: 548, kMax: 548 },
      { temperatureC: 45, batches: 24, used: 0, kGeometricMean: null, kMin: null, kMax: null },
      { temperatureC: 55, batches: 1, used: 0, kGeometricMean: null, kMin: null, kMax: null },
    ],
  };
}

function point(
  i: number,
  temperatureC: number,
  k: number | null,
  excludedBecause: string | null,
): TemperaturePoint {
  const statement =
    k === null
      ? {
          model: '1:1',
          status: 'lower-bound' as const,
          k: null,
          kCi95: [1.2e6, null] as [number, null],
          kLowerBound95: 2.1e6,
          kUpperBound95: null,
        }
      : {
          model: '1:1',
          status: 'determined' as const,
          k,
          kCi95: [k * 0.94, k * 1.06] as [number, number],
          kLowerBound95: null,
          kUpperBound95: null,
        };
  return {
    batchId: 10 + i,
    batchName: `Ni–L ${temperatureC} °C run ${i}`,
    state: excludedBecause === 'not approved yet' ? 'open' : 'approved',
    temperatureC,
    model: '1:1',
    k,
    kSe: k === null ? null : k * 0.03,
    kCi95: statement.kCi95,
    kText: formatK(statement),
    excludedBecause,
  };
}

/** The system's 30 batches by temperature then id, as the server pages them. */
const ALL_POINTS: TemperaturePoint[] = [
  ...USED.map((p, i) => point(i, p.temperatureC, p.k, null)),
  ...Array.from({ length: 24 }, (_, i) => point(5 + i, 45, 3.1e6, 'not approved yet')),
  point(
    29,
    55,
    null,
    'K > 2.1 × 10⁶ L·mol⁻¹ (95 % lower bound; too large to determine from these concentrations)',
  ),
];
const pageOf = (page: number, points = ALL_POINTS): TemperaturePointsPage => ({
  items: points.slice(page * 25, page * 25 + 25),
  total: points.length,
  page,
  pageSize: 25,
});
const pointsUrl = (page: number, include = false) =>
  `/api/temperatures/points?system=${encodeURIComponent(SYSTEM)}&includeUnapproved=${include}&page=${page}&pageSize=25`;

function createPage() {
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
  return { http, fixture, el: fixture.nativeElement as HTMLElement };
}

describe('vantHoffChart', () => {
  it('plots the mean ln K of each temperature with a least-to-greatest whisker, and the fitted line', () => {
    const chart = vantHoffChart(system());
    const [means, whisker, line] = chart.series;
    // Temperatures with no batch in the fit (45 and 55 °C) have no K to draw.
    expect(means.points).toHaveLength(3);
    expect(means.points[0].x).toBeCloseTo(1 / 288.15, 12);
    // ln of the geometric mean is the mean of ln K.
    expect(means.points[0].y).toBeCloseTo(at15.reduce((s, k) => s + Math.log(k), 0) / 3, 12);
    // Only 15 °C has several K: one whisker, from ln 880 to ln 941.
    expect(whisker.kind).toBe('range');
    expect(whisker.points.map((p) => p.y)).toEqual([Math.log(880), Math.log(941)]);
    expect(whisker.points[0].x).toBe(whisker.points[1].x);
    expect(whisker.hideInLegend).toBe(false);
    expect(line.kind).toBe('line');
    expect(line.points[0].x).toBeCloseTo(inverseKelvin(35), 12);
    expect(line.points[1].x).toBeCloseTo(inverseKelvin(15), 12);
    for (const p of line.points) expect(p.y).toBeCloseTo(FIT.intercept + FIT.slope * p.x, 12);
    expect(chart.series).toHaveLength(3);
    expect(chart.xTitle).toBe('1/T (K⁻¹)');
    expect(chart.summary).toBe(
      `ln K against 1/T for ${SYSTEM}: mean ln K at 3 temperatures (15–35 °C) from 5 batches in the fit, R² ${FIT.r2.toFixed(4)}.`,
    );
  });

  it('puts only the first of several whiskers in the legend', () => {
    const s = system();
    s.groups[1] = { ...s.groups[1], batches: 2, used: 2, kMin: 680, kMax: 721, kGeometricMean: 700.4 };
    const whiskers = vantHoffChart(s).series.filter((x) => x.kind === 'range');
    expect(whiskers.map((w) => w.hideInLegend)).toEqual([false, true]);
  });
});

describe('TemperaturesPage', () => {
  it('shows ΔH° in kJ/mol and ΔS° in J·mol⁻¹·K⁻¹ with SE, K per temperature and the note; the toggle asks again', async () => {
    const { http, fixture, el } = createPage();
    await fixture.whenStable();
    http.expectOne('/api/temperatures?includeUnapproved=false').flush([system()]);
    http.expectOne(pointsUrl(0)).flush(pageOf(0));
    await fixture.whenStable();

    const dh = text(el.querySelector('[data-testid="delta-h"]'));
    expect(dh).toMatch(/^−?-?\d+(\.\d+)? ± \d+(\.\d+)? kJ\/mol$/);
    expect(Number(dh.split(' ')[0].replace('−', '-'))).toBeCloseTo(FIT.deltaHJPerMol / 1000, 1);
    expect(text(el.querySelector('[data-testid="delta-s"]'))).toContain('J·mol⁻¹·K⁻¹');
    expect(text(el.querySelector('[data-testid="note"]'))).toContain("van 't Hoff fit over 5 batches");
    expect(el.querySelector('canvas[role="img"]')!.getAttribute('aria-label')).toContain('ln K against 1/T');

    // Per temperature: batches, those in the fit, the geometric mean and the range of K in the shared format.
    const groups = el.querySelectorAll('[data-testid="groups-table"] tbody tr');
    expect(groups).toHaveLength(5);
    expect(text(el.querySelector('[data-testid="groups-table"] thead'))).toContain(
      'Geometric mean K (L·mol⁻¹)',
    );
    const cells = (row: Element) => [...row.querySelectorAll('td')].map(text);
    expect(cells(groups[0])).toEqual(['15.0', '3', '3', '910', '880 to 941']);
    expect(cells(groups[1])).toEqual(['25.0', '1', '1', '700', '700']);
    expect(cells(groups[3])).toEqual(['45.0', '24', '0', '—', '—']);

    (el.querySelector('[data-testid="include-unapproved"] button') as HTMLButtonElement).click();
    await fixture.whenStable();
    http.expectOne('/api/temperatures?includeUnapproved=true').flush([]);
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="no-systems"]')).not.toBeNull();
    http.verify();
  });

  it("lists a system's batches 25 at a time, asking the server for the next page", async () => {
    const { http, fixture, el } = createPage();
    await fixture.whenStable();
    http.expectOne('/api/temperatures?includeUnapproved=false').flush([system()]);
    http.expectOne(pointsUrl(0)).flush(pageOf(0));
    await fixture.whenStable();

    let rows = el.querySelectorAll('[data-testid="points-table"] tbody tr');
    expect(rows).toHaveLength(25);
    expect(text(el.querySelector('.mat-mdc-paginator-range-label'))).toBe('1 – 25 of 30');
    expect(text(rows[0])).toContain('15.0');
    expect(text(rows[0])).toContain('288.15');
    // The K text of the shared format: value, unit and the 95 % interval.
    expect(text(rows[0].querySelector('[data-testid="point-k"]'))).toBe(
      '1:1 880 L·mol⁻¹ (95 % CI 827 to 933)',
    );
    expect(rows[0].querySelector('a')!.getAttribute('href')).toBe('/batches/10');
    // with a fit, a usable point says it is in it, and the batch name and its state stay apart
    expect(text(rows[0])).toContain('yes');
    expect(text(rows[0])).toContain('run 0 (approved)');
    expect(text(rows[5])).toContain('no: not approved yet');

    el.querySelector<HTMLButtonElement>('button.mat-mdc-paginator-navigation-next')!.click();
    await fixture.whenStable();
    http.expectOne(pointsUrl(1)).flush(pageOf(1));
    await fixture.whenStable();
    rows = el.querySelectorAll('[data-testid="points-table"] tbody tr');
    expect(rows).toHaveLength(5);
    expect(text(el.querySelector('.mat-mdc-paginator-range-label'))).toBe('26 – 30 of 30');
    // A lower bound reads as a bound, never as a bare number.
    expect(text(rows[4].querySelector('[data-testid="point-k"]'))).toBe(
      '1:1 > 2.1 × 10⁶ L·mol⁻¹ (95 % lower bound; too large to determine from these concentrations)',
    );

    // A page that cannot be loaded says so in the table; the system's fit stays.
    el.querySelector<HTMLButtonElement>('button.mat-mdc-paginator-navigation-first')!.click();
    await fixture.whenStable();
    http
      .expectOne(pointsUrl(0))
      .flush({ error: { code: 'x', message: 'Database busy.' } }, { status: 503, statusText: 'x' });
    await fixture.whenStable();
    expect(text(el.querySelector('[role="alert"]'))).toContain('Database busy.');
    expect(el.querySelector('[data-testid="delta-h"]')).not.toBeNull();
    http.verify();
  });

  it("when a system has no van 't Hoff fit then no point claims to be in the fit", async () => {
    const { http, fixture, el } = createPage();
    await fixture.whenStable();
    const one = { ...system(), vantHoff: null, note: 'One temperature: no fit yet.' };
    http.expectOne('/api/temperatures?includeUnapproved=false').flush([one]);
    http.expectOne(pointsUrl(0)).flush(pageOf(0, ALL_POINTS.slice(0, 1)));
    await fixture.whenStable();
    const row = el.querySelector('[data-testid="points-table"] tbody tr')!;
    expect(text(row)).toContain('no fit yet');
    expect(text(row)).not.toMatch(/\byes\b/);
    expect(vantHoffChart(one).series[0].label).not.toContain('in the fit');
    expect(vantHoffChart(one).series.some((s) => s.kind === 'line')).toBe(false);
    http.verify();
  });
});
