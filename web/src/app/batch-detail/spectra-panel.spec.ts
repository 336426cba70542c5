import { TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import type { AnalysisSettings, Reading, SampleDefinition } from '@equilight/analysis';
import { ScatterChart } from '../shared/chart/scatter-chart';
import { ScatterChartStub } from '../shared/chart/scatter-chart-stub';
import { SPECTRA_K, spectraPlate } from './spectra-fixture';
import { SPECTRA_DEBOUNCE_MS, SpectraPanel } from './spectra-panel';
import { WHAT_IF_WORKER, WhatIfRunner } from './what-if-runner';

const text = (el: Element | null) => (el?.textContent ?? '').replace(/\s+/g, ' ').trim();
const settle = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function render(readings: Reading[], samples: SampleDefinition[], settings: AnalysisSettings) {
  TestBed.configureTestingModule({
    providers: [
      { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      // jsdom has no Worker: the runner runs the same analysis in this thread.
      WhatIfRunner,
      { provide: WHAT_IF_WORKER, useValue: () => null },
    ],
  });
  TestBed.overrideComponent(SpectraPanel, {
    remove: { imports: [ScatterChart] },
    add: { imports: [ScatterChartStub] },
  });
  const fixture = TestBed.createComponent(SpectraPanel);
  fixture.componentRef.setInput('readings', readings);
  fixture.componentRef.setInput('samples', samples);
  fixture.componentRef.setInput('settings', settings);
  await fixture.whenStable();
  return fixture;
}

/** Waits for the debounce and the in-thread analysis, then for the view. */
async function analysed(fixture: Awaited<ReturnType<typeof render>>): Promise<HTMLElement> {
  const el = fixture.nativeElement as HTMLElement;
  for (let i = 0; i < 100 && !el.querySelector('[data-testid="spectra-candidates"]'); i++) {
    await settle(SPECTRA_DEBOUNCE_MS);
    await fixture.whenStable();
  }
  return el;
}

describe('Spectra panel (an invented titration read as spectra)', () => {
  jest.setTimeout(60_000);
  const plate = spectraPlate();
  const settings: AnalysisSettings = { pathLengthCm: 1, candidates: ['1:1', '1:2'] };

  // jsdom has no canvas: getContext answers null, as a browser without 2D drawing would (it logs otherwise).
  beforeEach(() => jest.spyOn(HTMLCanvasElement.prototype, 'getContext').mockReturnValue(null));
  afterEach(() => {
    TestBed.resetTestingModule();
    jest.restoreAllMocks();
  });

  it('shows K with its interval, the candidates ranked by AIC, the charts and the residual map', async () => {
    const fixture = await render(plate.readings, plate.samples, settings);
    const el = await analysed(fixture);
    const section = el.querySelector('[data-testid="spectra-section"]')!;
    expect(section.querySelector('h2')?.textContent).toBe('Spectra');
    expect([...section.querySelectorAll('h3')].map((h) => text(h))).toEqual([
      'Candidates',
      'Spectra of the mixtures',
      'Singular values',
      'Species spectra (1:1)',
      'Residual map (1:1)',
    ]);
    const k = text(el.querySelector('[data-testid="spectra-k-text"]'));
    expect(k).toMatch(/^[\d.]+ L·mol⁻¹ \(95 % CI [\d.]+ to [\d.]+\)$/);
    // The invented plate was made from K = 2500 L/mol.
    expect(Math.abs(Number(k.split(' ')[0]) / SPECTRA_K - 1)).toBeLessThan(0.05);
    const rows = [...el.querySelectorAll('[data-testid="spectra-candidates"] tbody tr')];
    expect(rows.map((r) => r.getAttribute('data-model'))).toEqual(['1:1', '1:2']);
    expect(text(rows[0])).toContain('best');
    expect(text(rows[0].querySelector('[data-testid="spectra-candidate-k"]'))).toBe(k);
    const headers = [...el.querySelectorAll('[data-testid="spectra-candidates"] thead th')].map((h) =>
      text(h),
    );
    expect(headers).toEqual([
      'Candidate',
      'Rank',
      'K with 95 % profile-likelihood interval',
      'AIC',
      'ΔAIC',
      'Converged',
      'Verdict',
    ]);
    const charts = [...el.querySelectorAll('canvas[role="img"]')];
    expect(charts).toHaveLength(4); // overlay, scree, species, residual map
    expect(charts.every((c) => (c.getAttribute('aria-label') ?? '').length > 20)).toBe(true);
    expect(el.querySelector('[data-testid="residual-map"]')?.getAttribute('aria-label')).toContain(
      '18 mixtures × 41 wavelengths',
    );
  });

  it('runs again with a narrower wavelength range typed in the section', async () => {
    const fixture = await render(plate.readings, plate.samples, settings);
    const el = await analysed(fixture);
    const from = el.querySelector<HTMLInputElement>('[data-testid="spectra-from"]')!;
    const to = el.querySelector<HTMLInputElement>('[data-testid="spectra-to"]')!;
    from.value = '450';
    to.value = '560';
    to.dispatchEvent(new Event('change'));
    for (let i = 0; i < 100; i++) {
      await settle(SPECTRA_DEBOUNCE_MS);
      await fixture.whenStable();
      if (text(el.querySelector('[data-testid="spectra-k"]')).includes('23 wavelengths')) break;
    }
    expect(text(el.querySelector('[data-testid="spectra-k"]'))).toContain('23 wavelengths (450–560 nm)');
  });

  it('says what is wrong with a reversed range and keeps the last analysis', async () => {
    const fixture = await render(plate.readings, plate.samples, settings);
    const el = await analysed(fixture);
    const from = el.querySelector<HTMLInputElement>('[data-testid="spectra-from"]')!;
    from.value = '700';
    el.querySelector<HTMLInputElement>('[data-testid="spectra-to"]')!.value = '450';
    from.dispatchEvent(new Event('change'));
    await fixture.whenStable();
    expect(text(el.querySelector('[data-testid="spectra-range-error"]'))).toMatch(/from.*below.*to/);
    expect(el.querySelector('[data-testid="spectra-candidates"]')).not.toBeNull();
  });

  it('runs again when a what-if edit touches the fit (an exclusion), not for one that does not', async () => {
    const fixture = await render(plate.readings, plate.samples, settings);
    await analysed(fixture);
    const runs = jest.spyOn(TestBed.inject(WhatIfRunner), 'runSpectra');
    fixture.componentRef.setInput('settings', { ...settings, wavelengthNm: 510 });
    await settle(SPECTRA_DEBOUNCE_MS * 2);
    await fixture.whenStable();
    expect(runs).not.toHaveBeenCalled();
    fixture.componentRef.setInput('settings', {
      ...settings,
      exclusions: [{ position: 'A5', reason: 'bubble in the well' }],
    });
    await settle(SPECTRA_DEBOUNCE_MS * 2);
    await fixture.whenStable();
    expect(runs).toHaveBeenCalledTimes(1);
    expect(runs.mock.calls[0][2].exclusions).toEqual([{ position: 'A5', reason: 'bubble in the well' }]);
  });

  it('hides itself for a batch read at one wavelength', async () => {
    const one = plate.readings.filter((r) => r.wavelengthNm === 510);
    const fixture = await render(one, plate.samples, settings);
    await settle(SPECTRA_DEBOUNCE_MS + 50);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    expect(el.querySelector('[data-testid="spectra-section"]')).toBeNull();
    expect(text(el)).toBe('');
  });
});
