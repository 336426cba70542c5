import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { signal } from '@angular/core';
import { DeferBlockState, TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { provideRouter } from '@angular/router';
import { Subject, filter } from 'rxjs';
import type { Role } from '../core/auth/user';
import { AuthService } from '../core/auth/auth.service';
import { type LiveEvent, LiveEventsService } from '../core/live/live-events.service';
import { By } from '@angular/platform-browser';
import { fixtureAnalysis } from './analysis-fixture';
import { calibrationOnlyAnalysis } from './analysis-variants-fixture';
import type { ApprovalRecord, BatchAnalysis, EpsilonCandidate } from './batch-analysis';
import { WhatIfPanel } from './what-if-panel';
import { BatchDetailPage, LIVE_REFRESH_DEBOUNCE_MS, WHAT_IF_DEBOUNCE_MS } from './batch-detail-page';
import { CalibrationPanel } from './calibration-panel';
import { EquilibriumPanel } from './equilibrium-panel';
import { ScatterChart } from '../shared/chart/scatter-chart';
import { ScatterChartStub } from '../shared/chart/scatter-chart-stub';

const ANALYSIS_URL = '/api/batches/7/analysis?engineCheck=true';
const wait = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));
const text = (el: Element | null) => (el?.textContent ?? '').replace(/\s+/g, ' ').trim();

jest.setTimeout(30_000);

describe('BatchDetailPage what-if flow (real analysis module)', () => {
  let events: Subject<LiveEvent>;
  let http: HttpTestingController;

  async function setup(
    role: Role = 'scientist',
    analysis: BatchAnalysis = fixtureAnalysis(),
    candidates: EpsilonCandidate[] = [],
  ) {
    events = new Subject<LiveEvent>();
    TestBed.configureTestingModule({
      imports: [BatchDetailPage],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        provideRouter([]),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
        {
          provide: LiveEventsService,
          useValue: {
            connected: signal(true),
            ofType: (...types: string[]) => events.pipe(filter((e) => types.includes(e.type))),
          },
        },
        { provide: AuthService, useValue: { hasRole: (...roles: Role[]) => roles.includes(role) } },
      ],
    });
    for (const panel of [CalibrationPanel, EquilibriumPanel])
      TestBed.overrideComponent(panel, {
        remove: { imports: [ScatterChart] },
        add: { imports: [ScatterChartStub] },
      });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(BatchDetailPage);
    fixture.componentRef.setInput('id', '7');
    await fixture.whenStable();
    http.expectOne(ANALYSIS_URL).flush(analysis);
    await fixture.whenStable();
    http.expectOne('/api/layouts/3').flush({ id: 3, format: 'cuvette' });
    // The ε candidates are asked for in an idle moment, after the result and the map (a timer in jsdom).
    http.expectNone('/api/batches/7/epsilon-sources');
    await wait(5);
    http.expectOne('/api/batches/7/epsilon-sources').flush(candidates);
    await fixture.whenStable();
    // The what-if panel and its analysis fields render in idle moments (two nested deferred blocks).
    for (let i = 0; i < 2; i++) {
      await wait(5);
      await fixture.whenStable();
    }
    const el = fixture.nativeElement as HTMLElement;
    return { fixture, el };
  }

  afterEach(() => {
    // The comments section asks for its own list (batch-comments.spec.ts checks it).
    for (const req of http.match('/api/batches/7/comments')) req.flush([]);
    http.verify();
  });

  async function settle(fixture: { whenStable(): Promise<unknown> }) {
    await fixture.whenStable();
    await wait(WHAT_IF_DEBOUNCE_MS + 20);
    await fixture.whenStable();
  }

  it('excluding a mixture with a reason changes K at once, marks it unsaved, and Save sends the reason', async () => {
    const { fixture, el } = await setup();
    const kBefore = text(el.querySelector('[data-testid="best-k-value"]'));
    expect(kBefore).toMatch(/^6\d\d(\.\d+)? L·mol⁻¹ \(95 % CI /);
    expect(el.querySelector('[data-testid="unsaved-banner"]')).toBeNull();

    // Pick the position on the map, give a reason, exclude.
    (el.querySelector('[data-position="C15"]') as HTMLElement).click();
    await fixture.whenStable();
    const reason = el.querySelector<HTMLInputElement>('[data-testid="exclude-reason"]')!;
    reason.value = 'air bubble in the light path';
    reason.dispatchEvent(new Event('input'));
    (el.querySelector('[data-testid="exclude-submit"]') as HTMLButtonElement).click();
    await settle(fixture);

    expect(text(el.querySelector('[data-testid="unsaved-banner"]'))).toContain(
      'Exclude C15 (air bubble in the light path)',
    );
    const kAfter = text(el.querySelector('[data-testid="best-k-value"]'));
    expect(kAfter).not.toBe(kBefore);
    expect(el.querySelector('[data-position="C15"]')!.getAttribute('data-marker')).toBe('excluded');

    // Save asks for a reason and sends only what changed.
    (el.querySelector('[data-testid="what-if-save"]') as HTMLButtonElement).click();
    await fixture.whenStable();
    const dialogInput = document.querySelector<HTMLTextAreaElement>('[data-testid="reason-input"]')!;
    dialogInput.value = 'C15 had a bubble; excluded after review';
    dialogInput.dispatchEvent(new Event('input'));
    document.querySelector<HTMLButtonElement>('[data-testid="reason-confirm"]')!.click();
    await fixture.whenStable();
    const put = http.expectOne('/api/batches/7/settings');
    expect(put.request.method).toBe('PUT');
    expect(put.request.body).toEqual({
      settings: { exclusions: [{ position: 'C15', reason: 'air bubble in the light path' }] },
      reason: 'C15 had a bubble; excluded after review',
    });
    const saved = fixtureAnalysis({
      batch: {
        settings: {
          ...fixtureAnalysis().batch.settings,
          exclusions: [{ position: 'C15', reason: 'air bubble in the light path' }],
        },
      },
    });
    put.flush(saved.batch);
    await fixture.whenStable();
    http.expectOne(ANALYSIS_URL).flush(saved);
    await settle(fixture);
    expect(el.querySelector('[data-testid="unsaved-banner"]')).toBeNull();
  });

  it('Reset drops the what-if and shows the saved result again', async () => {
    const { fixture, el } = await setup();
    const kBefore = text(el.querySelector('[data-testid="best-k-value"]'));
    const path = el.querySelector<HTMLInputElement>('[data-testid="what-if-path"]')!;
    path.value = '0.5';
    path.dispatchEvent(new Event('input'));
    path.dispatchEvent(new Event('change'));
    await settle(fixture);
    expect(text(el.querySelector('[data-testid="unsaved-banner"]'))).toContain('Path length 0.5 cm');
    // ε scales with 1/l and x = A/(ε·l) does not: K stays while the path alone changes.
    expect(text(el.querySelector('[data-testid="best-k-value"]'))).toBe(kBefore);
    (el.querySelector('[data-position="C12"]') as HTMLElement).click();
    await fixture.whenStable();
    const reason = el.querySelector<HTMLInputElement>('[data-testid="exclude-reason"]')!;
    reason.value = 'scratched cuvette';
    reason.dispatchEvent(new Event('input'));
    (el.querySelector('[data-testid="exclude-submit"]') as HTMLButtonElement).click();
    await settle(fixture);
    expect(text(el.querySelector('[data-testid="best-k-value"]'))).not.toBe(kBefore);
    (el.querySelector('[data-testid="what-if-reset"]') as HTMLButtonElement).click();
    await settle(fixture);
    expect(el.querySelector('[data-testid="unsaved-banner"]')).toBeNull();
    expect(text(el.querySelector('[data-testid="best-k-value"]'))).toBe(kBefore);
  });

  it('refetches on a live event for this batch and keeps the unsaved edits on top of the fresh data', async () => {
    const { fixture, el } = await setup();
    (el.querySelector('[data-position="C20"]') as HTMLElement).click();
    await fixture.whenStable();
    const reason = el.querySelector<HTMLInputElement>('[data-testid="exclude-reason"]')!;
    reason.value = 'pipetting slip';
    reason.dispatchEvent(new Event('input'));
    (el.querySelector('[data-testid="exclude-submit"]') as HTMLButtonElement).click();
    await settle(fixture);

    events.next({ type: 'file.stored', data: { id: 99, batchId: 8 }, at: '2031-05-02T08:11:00Z' });
    events.next({ type: 'file.stored', data: { id: 100, batchId: 7 }, at: '2031-05-02T08:11:00Z' });
    events.next({ type: 'batch.updated', data: { id: 7 }, at: '2031-05-02T08:11:01Z' });
    await wait(LIVE_REFRESH_DEBOUNCE_MS + 50);
    const fresh = fixtureAnalysis({ batch: { fileCount: 2, expectedFiles: 2 } });
    http.expectOne(ANALYSIS_URL).flush(fresh);
    await settle(fixture);
    expect(text(el.querySelector('[data-testid="file-count"]'))).toBe('2 of 2');
    expect(text(el.querySelector('[data-testid="unsaved-banner"]'))).toContain(
      'Exclude C20 (pipetting slip)',
    );
    expect(el.querySelector('[data-position="C20"]')!.getAttribute('data-marker')).toBe('excluded');
  });

  it('shows actions by role and locks the what-if of an approved batch', async () => {
    const { el } = await setup('lab_manager', fixtureAnalysis({ batch: { state: 'approved' } }));
    expect(el.querySelector('[data-testid="mark-reviewed"]')).toBeNull();
    expect(el.querySelector('[data-testid="approve"]')).toBeNull();
    expect(el.querySelector('[data-testid="reopen"]')).not.toBeNull();
    expect(text(el.querySelector('[data-testid="what-if-locked"]'))).toContain('approved and read-only');
    expect((el.querySelector('[data-testid="exclude-submit"]') as HTMLButtonElement).disabled).toBe(true);
    expect(el.querySelector('[data-testid="export-pdf"]')!.getAttribute('href')).toBe(
      '/api/batches/7/report.pdf',
    );
    expect(el.querySelector('[data-testid="export-results"]')!.getAttribute('href')).toBe(
      '/api/batches/7/export.csv?content=results',
    );
    expect(el.querySelector('[data-testid="export-xlsx"]')!.getAttribute('href')).toBe(
      '/api/batches/7/report.xlsx',
    );
  });

  it('a scientist marks an open batch reviewed but cannot approve', async () => {
    const { fixture, el } = await setup('scientist');
    expect(el.querySelector('[data-testid="approve"]')).toBeNull();
    (el.querySelector('[data-testid="mark-reviewed"]') as HTMLButtonElement).click();
    await fixture.whenStable();
    const req = http.expectOne('/api/batches/7/review');
    expect(req.request.method).toBe('POST');
    req.flush(fixtureAnalysis({ batch: { state: 'reviewed' } }).batch);
    await fixture.whenStable();
    http.expectOne(ANALYSIS_URL).flush(fixtureAnalysis({ batch: { state: 'reviewed' } }));
    await fixture.whenStable();
    expect(text(el.querySelector('[data-testid="batch-state"]'))).toContain('Reviewed');
  });

  it("an approved batch shows its approval record, the input hashes, and a note when today's engine differs", async () => {
    const approved = fixtureAnalysis({
      batch: {
        state: 'approved',
        approvedBy: 'Lab Manager',
        approvedAt: '2031-05-03T09:00:00Z',
        approvalComment: 'Fit and calibration checked.',
      },
    });
    const summary = {
      qcFlagCount: 0,
      qcErrorCount: 0,
      best: '1:1',
      k: 612.34,
      kSe: 10,
      kCi95: [590, 635] as [number, number],
      kStatus: 'determined' as const,
      kLowerBound95: null,
      kUpperBound95: null,
      kUnit: 'L·mol⁻¹',
      kText: '612 L·mol⁻¹ (95 % CI 590 to 635)',
    };
    const record: ApprovalRecord = {
      id: 4,
      batchId: 7,
      schemaVersion: 1,
      engine: {
        version: '0.1.0+0123456789ab',
        packageVersion: '0.1.0',
        sourceSha256: '0123456789ab'.padEnd(64, '0'),
      },
      approvedBy: 'Lab Manager',
      approvedAt: '2031-05-03T09:00:00Z',
      approvalComment: 'Fit and calibration checked.',
      settings: approved.batch.settings,
      files: [
        {
          id: 31,
          originalName: 'CL-12.csv',
          sha256: 'c0ffee'.padEnd(64, '0'),
          readingCount: 30,
          receivedAt: '2031-05-02T08:05:00Z',
        },
      ],
      summary,
      supersededAt: null,
      supersededBy: null,
      supersededReason: null,
    };
    const earlier: ApprovalRecord = {
      ...record,
      id: 2,
      supersededAt: '2031-05-02T12:00:00Z',
      supersededBy: 'Lab Manager',
      supersededReason: 'C15 excluded after all',
    };
    const { el } = await setup('scientist', {
      ...approved,
      record,
      approvals: [record, earlier],
      engineCheck: {
        engineVersion: '0.2.0+ffffffffffff',
        sameEngine: false,
        differs: true,
        inputsMatch: true,
        current: { ...summary, best: '1:2', k: 1.5e7, kCi95: null, kText: null },
        error: null,
      },
    });
    const block = el.querySelector('[data-testid="approval-record"]');
    expect(text(block?.querySelector('h2') ?? null)).toBe('Approval record 4');
    expect(text(el.querySelector('[data-testid="record-engine"]'))).toBe('0.1.0+0123456789ab');
    expect(text(el.querySelector('[data-testid="record-headline"]'))).toMatch(
      /^K \(1:1\) = 612 L·mol⁻¹ \(95 % CI 590 to 635\)/,
    );
    expect(text(el.querySelector('[data-testid="record-files"]'))).toContain('c0ffee'.padEnd(64, '0'));
    const note = text(el.querySelector('[data-testid="engine-note"]'));
    expect(note).toContain(
      'Re-analysis with the current engine (0.2.0+ffffffffffff) gives K (1:2) = 1.50 × 10⁷ L²·mol⁻².',
    );
    expect(note).toContain('stays as it is');
    expect(text(el.querySelector('[data-testid="earlier-approvals"]'))).toContain('Record 2');
    expect(text(el.querySelector('[data-testid="earlier-approvals"]'))).toContain('C15 excluded after all');
    // The what-if stays locked while approved.
    expect((el.querySelector('[data-testid="exclude-submit"]') as HTMLButtonElement).disabled).toBe(true);
  });

  it('offers ε from a calibration of the same system and saves it as that batch, naming the record', async () => {
    const candidate: EpsilonCandidate = {
      batchId: 5,
      batchName: 'Run 9',
      state: 'approved',
      temperatureC: 25,
      recordId: 4,
      wavelengthNm: 640,
      epsilonLPerMolCm: 1380,
      epsilonSe: 12,
    };
    const { fixture, el } = await setup('scientist', fixtureAnalysis(), [candidate]);
    const panel = fixture.debugElement.query(By.directive(WhatIfPanel)).componentInstance as WhatIfPanel;
    panel.epsilonSourceChange.emit('batch:5');
    await settle(fixture);
    expect(text(el.querySelector('[data-testid="unsaved-banner"]'))).toContain(
      'ε from batch "Run 9", approval record 4',
    );
    (el.querySelector('[data-testid="what-if-save"]') as HTMLButtonElement).click();
    await fixture.whenStable();
    const dialogInput = document.querySelector<HTMLTextAreaElement>('[data-testid="reason-input"]')!;
    dialogInput.value = 'Use the approved calibration of run 9';
    dialogInput.dispatchEvent(new Event('input'));
    document.querySelector<HTMLButtonElement>('[data-testid="reason-confirm"]')!.click();
    await fixture.whenStable();
    const put = http.expectOne('/api/batches/7/settings');
    expect(put.request.body).toEqual({
      settings: { epsilonFromBatchId: 5 },
      reason: 'Use the approved calibration of run 9',
    });
    const saved = fixtureAnalysis({
      batch: {
        updatedAt: '2031-05-02T08:20:00Z',
        settings: {
          ...fixtureAnalysis().batch.settings,
          epsilonLPerMolCm: 1380,
          epsilonSource: {
            batchId: 5,
            batchName: 'Run 9',
            recordId: 4,
            wavelengthNm: 640,
            epsilonLPerMolCm: 1380,
            takenAt: '2031-05-02T08:19:00Z',
          },
        },
      },
    });
    put.flush(saved.batch);
    await fixture.whenStable();
    http.expectOne(ANALYSIS_URL).flush(saved);
    await fixture.whenStable();
    await wait(5);
    http.expectOne('/api/batches/7/epsilon-sources').flush([candidate]);
    await settle(fixture);
    expect(text(el.querySelector('[data-testid="epsilon-source"]'))).toBe(
      '1380 L·mol⁻¹·cm⁻¹, from batch "Run 9", approval record 4',
    );
  });

  /** Renders the page's deferred blocks (the tab group waits for the viewport, which jsdom lacks). */
  async function renderDeferred(fixture: Awaited<ReturnType<typeof setup>>['fixture']) {
    for (let round = 0; round < 4; round++) {
      for (const block of await fixture.getDeferBlocks()) await block.render(DeferBlockState.Complete);
      fixture.detectChanges();
      await wait(5);
      await fixture.whenStable();
    }
  }

  it('says the result in one short sentence and shows the long verdict once, on demand', async () => {
    const analysis = fixtureAnalysis();
    const { fixture, el } = await setup('scientist', analysis);
    const r = analysis.result;
    // formatK of the headline: value, unit and 95 % interval, as every report states it.
    expect(text(el.querySelector('[data-testid="verdict"]'))).toBe(`1:1 fits best: K = ${r.headline!.text}`);
    expect(text(el.querySelector('[data-testid="best-k-value"]'))).toBe(r.headline!.text);
    expect(r.headline!.text).toMatch(/^6\d\d(\.\d+)? L·mol⁻¹ \(95 % CI [\d.]+ to [\d.]+\)$/);
    expect(text(el.querySelector('[data-testid="verdict"]'))).not.toContain('ruled out');

    const toggle = el.querySelector<HTMLButtonElement>('[data-testid="verdict-details-toggle"]')!;
    const detail = el.querySelector<HTMLElement>('[data-testid="verdict-detail"]')!;
    expect(toggle.getAttribute('aria-expanded')).toBe('false');
    expect(toggle.getAttribute('aria-controls')).toBe(detail.id);
    expect(detail.hidden).toBe(true);
    toggle.click();
    await fixture.whenStable();
    expect(toggle.getAttribute('aria-expanded')).toBe('true');
    expect(detail.hidden).toBe(false);
    expect(text(detail)).toBe(r.stoichiometry!.verdict);

    // Once (the equilibrium panel's own spec checks that it does not repeat it).
    await renderDeferred(fixture);
    expect(el.querySelectorAll('[data-testid="verdict-detail"]')).toHaveLength(1);
    expect(
      [...el.querySelectorAll('*')].filter(
        (n) => n.children.length === 0 && text(n) === r.stoichiometry!.verdict,
      ),
    ).toHaveLength(1);
  });

  it('a plain calibration batch opens on Calibration and hides the equilibrium tab and controls', async () => {
    const analysis = calibrationOnlyAnalysis();
    expect(analysis.result.mixtures).toHaveLength(0);
    const { fixture, el } = await setup('scientist', analysis);
    await renderDeferred(fixture);
    expect(text(el.querySelector('[data-testid="verdict"]'))).toBe('No equilibrium mixtures in this batch.');
    expect(el.querySelector('[data-testid="best-k"]')).toBeNull();
    expect(el.querySelector('[data-testid="verdict-details-toggle"]')).toBeNull();
    const tabs = [...el.querySelectorAll('[role="tab"]')];
    expect(tabs.map((t) => text(t))).not.toContain('Equilibrium');
    const selected = tabs.find((t) => t.getAttribute('aria-selected') === 'true');
    expect(text(selected ?? null)).toBe('Calibration');
    // What-if: the controls only an equilibrium fit reads are gone; wavelength and path stay.
    expect(el.querySelector('[data-testid="what-if-candidates"]')).toBeNull();
    expect(el.querySelector('[data-testid="what-if-baseline"]')).toBeNull();
    expect(el.querySelector('[data-testid="what-if-epsilon"]')).toBeNull();
    expect(el.querySelector('[data-testid="what-if-wavelength"]')).not.toBeNull();
    expect(el.querySelector('[data-testid="what-if-path"]')).not.toBeNull();
  });

  it('a batch with mixtures opens on Equilibrium with its controls', async () => {
    const { fixture, el } = await setup();
    await renderDeferred(fixture);
    const selected = [...el.querySelectorAll('[role="tab"]')].find(
      (t) => t.getAttribute('aria-selected') === 'true',
    );
    expect(text(selected ?? null)).toBe('Equilibrium');
    expect(el.querySelector('[data-testid="what-if-candidates"]')).not.toBeNull();
    expect(el.querySelector('[data-testid="what-if-baseline"]')).not.toBeNull();
  });
  it('keeps the tab the person opened when a live update adds the Equilibrium tab before it', async () => {
    // A batch read as spectra with no mixtures yet: tabs Spectra, Calibration, … (opens on Calibration).
    const scan = (a: BatchAnalysis): BatchAnalysis => {
      const first = a.readings[0]!;
      const extra = Array.from({ length: 12 }, (_, i) => ({ ...first, wavelengthNm: 400 + 10 * i }));
      return { ...a, readings: [...a.readings, ...extra] };
    };
    const { fixture, el } = await setup('scientist', scan(calibrationOnlyAnalysis()));
    await renderDeferred(fixture);
    const tabs = () => [...el.querySelectorAll<HTMLElement>('[role="tab"]')];
    const selected = () => text(tabs().find((t) => t.getAttribute('aria-selected') === 'true') ?? null);
    expect(tabs().map((t) => text(t))[0]).toBe('Spectra');
    expect(selected()).toBe('Calibration');
    tabs()
      .find((t) => text(t) === 'Files')!
      .click();
    await settle(fixture);
    expect(selected()).toBe('Files');

    // A stored file brings the first mixtures: the Equilibrium tab appears first, Files stays open.
    events.next({ type: 'file.stored', data: { id: 100, batchId: 7 }, at: '2031-05-02T08:11:00Z' });
    await wait(LIVE_REFRESH_DEBOUNCE_MS + 50);
    http.expectOne(ANALYSIS_URL).flush(scan(fixtureAnalysis()));
    await settle(fixture);
    await renderDeferred(fixture);
    expect(tabs().map((t) => text(t))[0]).toBe('Equilibrium');
    expect(selected()).toBe('Files');
  });
});
