import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { provideRouter } from '@angular/router';
import { batchListItemFixture } from '../batches/batch-fixture';
import { AssignDialog, unassignedHint } from './assign-dialog';
import type { IntakeFile } from './intake-file';

const FILE: IntakeFile = {
  id: 41,
  profileId: 3,
  profileName: 'Cuvette bench',
  originalName: 'MLX-8.csv',
  sha256: 'a'.repeat(64),
  sizeBytes: 1200,
  status: 'unassigned',
  duplicateOfId: null,
  error: null,
  runId: 'MLX-8',
  batchId: null,
  readingCount: 24,
  source: 'watcher',
  receivedAt: '2031-03-01T08:00:00Z',
  finishedAt: '2031-03-01T08:00:01Z',
  warnings: [],
};

jest.setTimeout(30_000);

describe('AssignDialog', () => {
  async function setup(file: IntakeFile = FILE) {
    const close = jest.fn();
    TestBed.configureTestingModule({
      imports: [AssignDialog],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        provideRouter([]),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
        { provide: MAT_DIALOG_DATA, useValue: { file } },
        { provide: MatDialogRef, useValue: { close } },
      ],
    });
    const fixture = TestBed.createComponent(AssignDialog);
    fixture.detectChanges();
    const http = TestBed.inject(HttpTestingController);
    return { fixture, http, close, el: fixture.nativeElement as HTMLElement };
  }

  it('says which run id no batch waits for, offers only open batches of the same instrument, and assigns', async () => {
    const { fixture, http, close, el } = await setup();
    const list = http.expectOne((r) => r.url === '/api/batches');
    // The server does the filtering: open or reviewed batches of the file's instrument.
    expect(list.request.params.get('profileId')).toBe('3');
    expect(list.request.params.get('unapproved')).toBe('true');
    const items = [
      batchListItemFixture({ id: 7, name: 'Bench run 9', profileId: 3, runId: 'MLX-9', state: 'open' }),
    ];
    list.flush({ items, total: items.length });
    await fixture.whenStable();
    expect(el.textContent).toContain('No batch waits for run id MLX-8 — create one, or assign by hand.');
    expect(el.textContent).not.toContain('profile matches');
    el.querySelector<HTMLElement>('[data-testid=assign-batch] .mat-mdc-select-trigger')!.click();
    await fixture.whenStable();
    const options = [...document.querySelectorAll('mat-option')].map((o) => o.textContent ?? '');
    expect(options).toHaveLength(1);
    expect(options[0]).toContain('Bench run 9');
    document.querySelector<HTMLElement>('mat-option')!.click();
    await fixture.whenStable();
    el.querySelector<HTMLButtonElement>('[data-testid=assign-confirm]')!.click();
    const req = http.expectOne({ method: 'POST', url: '/api/intake/41/assign' });
    expect(req.request.body).toEqual({ batchId: 7 });
    req.flush({ ...FILE, status: 'stored', batchId: 7 });
    await fixture.whenStable();
    expect(close).toHaveBeenCalledWith(expect.objectContaining({ id: 41, batchId: 7, status: 'stored' }));
  });

  it('points to creating a batch when none is open for the instrument', async () => {
    const { fixture, http, el } = await setup();
    http.expectOne((r) => r.url === '/api/batches').flush({ items: [], total: 0 });
    await fixture.whenStable();
    expect(el.querySelector('[data-testid=assign-none]')?.textContent).toContain('Create a batch');
    expect(el.querySelector<HTMLButtonElement>('[data-testid=assign-confirm]')!.disabled).toBe(true);
  });

  it('has a hint for a file without a run id too', () => {
    expect(unassignedHint(null)).toMatch(/No run id was found.*assign it by hand/);
  });
});
