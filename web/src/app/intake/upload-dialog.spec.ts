import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { UploadDialog, type UploadDialogData } from './upload-dialog';

describe('UploadDialog', () => {
  async function setup(data: UploadDialogData) {
    TestBed.configureTestingModule({
      imports: [UploadDialog],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
        { provide: MAT_DIALOG_DATA, useValue: data },
        { provide: MatDialogRef, useValue: { close: jest.fn() } },
      ],
    });
    const fixture = TestBed.createComponent(UploadDialog);
    await fixture.whenStable();
    return { fixture, http: TestBed.inject(HttpTestingController), el: fixture.nativeElement as HTMLElement };
  }

  function chooseFile(el: HTMLElement, f: File): void {
    const input = el.querySelector<HTMLInputElement>('[data-testid=upload-input]')!;
    Object.defineProperty(input, 'files', { value: [f], configurable: true });
    input.dispatchEvent(new Event('change'));
  }

  const send = (el: HTMLElement) => el.querySelector<HTMLButtonElement>('[data-testid=upload-send]')!.click();
  const sample = () => new File(['position,wavelength_nm,absorbance\nA1,450,0.512\n'], 'run-88.csv');

  it('when sent without a file or profile then says what is missing and sends nothing', async () => {
    const { fixture, http, el } = await setup({
      profiles: [
        { id: 1, name: 'Reader A' },
        { id: 2, name: 'Reader B' },
      ],
    });
    send(el);
    await fixture.whenStable();
    expect(el.textContent).toContain('Choose a file to send.');
    expect(el.textContent).toContain('Choose the instrument that wrote the file.');
    http.expectNone('/api/ingest');
  });

  it('sends the profile and the file as multipart and shows that it was queued', async () => {
    const { fixture, http, el } = await setup({ profiles: [{ id: 1, name: 'Reader A' }] });
    chooseFile(el, sample());
    await fixture.whenStable();
    expect(el.textContent).toContain('run-88.csv');
    expect(el.textContent).toMatch(/\d+ B/);
    send(el);
    const req = http.expectOne({ method: 'POST', url: '/api/ingest' });
    const body = req.request.body as FormData;
    expect(body.get('profileId')).toBe('1');
    expect((body.get('file') as File).name).toBe('run-88.csv');
    req.flush({ id: 41, status: 'queued' }, { status: 202, statusText: 'Accepted' });
    await fixture.whenStable();
    const receipt = el.querySelector('[data-testid=upload-receipt]')?.textContent ?? '';
    expect(receipt).toContain('#41');
    expect(receipt).toContain('queued');
  });

  it('shows a duplicate as the file it repeats', async () => {
    const { fixture, http, el } = await setup({ profiles: [{ id: 1, name: 'Reader A' }] });
    chooseFile(el, sample());
    send(el);
    http
      .expectOne('/api/ingest')
      .flush({ id: 42, status: 'duplicate', duplicateOfId: 17 }, { status: 202, statusText: 'Accepted' });
    await fixture.whenStable();
    const receipt = el.querySelector('[data-testid=upload-receipt]')?.textContent ?? '';
    expect(receipt).toContain('Duplicate');
    expect(receipt).toContain('#17');
  });

  it('shows the server refusal as it is', async () => {
    const { fixture, http, el } = await setup({ profiles: [{ id: 1, name: 'Reader A' }] });
    chooseFile(el, sample());
    send(el);
    http
      .expectOne('/api/ingest')
      .flush(
        { error: { code: 'payload_too_large', message: 'The file is larger than 50 MB.' } },
        { status: 413, statusText: 'Payload Too Large' },
      );
    await fixture.whenStable();
    expect(el.querySelector('[data-testid=upload-error]')?.textContent).toContain(
      'The file is larger than 50 MB.',
    );
  });

  it('when the profiles could not be listed then takes the profile number instead', async () => {
    const { fixture, http, el } = await setup({ profiles: null });
    const input = el.querySelector<HTMLInputElement>('[data-testid=upload-profile-id]')!;
    input.value = '3';
    input.dispatchEvent(new Event('input'));
    chooseFile(el, sample());
    send(el);
    const req = http.expectOne('/api/ingest');
    expect((req.request.body as FormData).get('profileId')).toBe('3');
    req.flush({ id: 43, status: 'queued' }, { status: 202, statusText: 'Accepted' });
    await fixture.whenStable();
  });
});
