import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { MAT_DIALOG_DATA, MatDialogRef } from '@angular/material/dialog';
import { DEFAULT_RULES, type InstrumentProfile } from './instrument-profile';
import { ProfileDialog } from './profile-dialog';

export const READER_B: InstrumentProfile = {
  id: 4,
  name: 'Reader B (north bench)',
  kind: 'plate_reader',
  plateFormat: '384',
  fileFormat: 'plate_grid',
  rules: { ...DEFAULT_RULES, delimiter: ';', decimalMark: ',', skipLines: 2 },
  pathLengthCm: null,
  fillVolumeUl: 80,
  wellDiameterMm: 3.3,
  defaultWavelengthNm: 412,
  dropSubfolder: 'reader-b',
  fileNamePattern: '^grid_(?<run>\\w+)\\.csv$',
  active: true,
  hasToken: true,
  tokenPrefix: 'eqi_7Hc2',
  tokenCreatedAt: '2031-03-01T08:00:00Z',
  createdAt: '2031-03-01T08:00:00Z',
  updatedAt: '2031-03-02T08:00:00Z',
};

describe('ProfileDialog', () => {
  async function setup(profile?: InstrumentProfile) {
    const close = jest.fn();
    TestBed.configureTestingModule({
      imports: [ProfileDialog],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: MAT_DIALOG_DATA, useValue: { profile } },
        { provide: MatDialogRef, useValue: { close } },
      ],
    });
    const fixture = TestBed.createComponent(ProfileDialog);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const http = TestBed.inject(HttpTestingController);
    return { fixture, el, http, close };
  }

  function type(el: HTMLElement, selector: string, value: string): void {
    const input = el.querySelector<HTMLInputElement>(selector)!;
    input.value = value;
    input.dispatchEvent(new Event('input'));
  }

  function chooseFile(el: HTMLElement, selector: string, file: File): void {
    const input = el.querySelector<HTMLInputElement>(selector)!;
    Object.defineProperty(input, 'files', { value: [file], configurable: true });
    input.dispatchEvent(new Event('change'));
  }

  const submit = (el: HTMLElement) =>
    el.querySelector<HTMLButtonElement>('[data-testid=profile-save]')!.click();

  it('when submitted empty then marks what is missing and sends nothing', async () => {
    const { fixture, el, http } = await setup();
    submit(el);
    await fixture.whenStable();
    expect(el.querySelector('[data-testid=profile-error]')?.textContent).toContain('need attention');
    expect(el.textContent).toContain('Enter a name');
    http.expectNone('/api/instruments');
  });

  it('shows every field of a profile', async () => {
    const { el } = await setup();
    const text = el.textContent ?? '';
    for (const label of [
      'Name',
      'Kind',
      'Plate format',
      'File format',
      'Delimiter',
      'Decimal mark',
      'Encoding',
      'Header lines to skip',
      'Position',
      'Wavelength (nm)',
      'Absorbance',
      'Read time',
      'Temperature (°C)',
      'Replicate',
      'Spectrum wavelength column',
      'Path length',
      'Fill volume and well diameter',
      'Default wavelength',
      'Drop sub-folder',
      'File-name pattern',
      'Active',
      'Try a file',
    ]) {
      expect(text).toContain(label);
    }
    // A new plate reader starts from fill volume and well diameter (its light path follows from them).
    expect(text).toContain('µL');
    expect(text).toContain('mm');
    expect(text).toContain('nm');
  });

  it('when a new profile is added then posts every editable field and closes with the token', async () => {
    const { fixture, el, http, close } = await setup();
    type(el, '[data-testid=profile-name]', 'Reader A');
    type(el, '[data-testid=drop-subfolder]', 'reader-a');
    type(el, '[data-testid=file-name-pattern]', '^run-(\\d+)');
    // A new plate reader asks for fill volume and well diameter (its path length follows), not 1 cm.
    type(el, '[data-testid=fill-volume]', '200');
    type(el, '[data-testid=well-diameter]', '6.4');
    submit(el);
    const req = http.expectOne({ method: 'POST', url: '/api/instruments' });
    expect(req.request.body).toEqual({
      name: 'Reader A',
      kind: 'plate_reader',
      plateFormat: '96',
      fileFormat: 'long_table',
      rules: DEFAULT_RULES,
      pathLengthCm: null,
      fillVolumeUl: 200,
      wellDiameterMm: 6.4,
      defaultWavelengthNm: null,
      dropSubfolder: 'reader-a',
      fileNamePattern: '^run-(\\d+)',
      active: true,
    });
    const profile = { ...READER_B, id: 9, name: 'Reader A' };
    req.flush({ profile, token: 'eqi_secret-once' }, { status: 201, statusText: 'Created' });
    await fixture.whenStable();
    expect(close).toHaveBeenCalledWith({ kind: 'created', created: { profile, token: 'eqi_secret-once' } });
  });

  it('when the file-name pattern has no group or does not compile then says so', async () => {
    const { fixture, el, http } = await setup();
    type(el, '[data-testid=profile-name]', 'Reader A');
    type(el, '[data-testid=drop-subfolder]', 'reader-a');
    type(el, '[data-testid=file-name-pattern]', '^run-\\d+');
    submit(el);
    await fixture.whenStable();
    expect(el.textContent).toContain('Add a capture group');
    type(el, '[data-testid=file-name-pattern]', '^run-(\\d+');
    await fixture.whenStable();
    expect(el.textContent).toContain('Not a valid regular expression');
    http.expectNone('/api/instruments');
  });

  it('when a drop sub-folder climbs out of the drop folder then refuses it', async () => {
    const { fixture, el, http } = await setup();
    type(el, '[data-testid=profile-name]', 'Reader A');
    type(el, '[data-testid=drop-subfolder]', '../elsewhere');
    submit(el);
    await fixture.whenStable();
    expect(el.textContent).toContain('no slashes');
    http.expectNone('/api/instruments');
  });

  it('when editing a plate read by fill volume then patches with fill volume, diameter and no path length', async () => {
    const { fixture, el, http, close } = await setup(READER_B);
    expect(el.querySelector<HTMLInputElement>('[data-testid=fill-volume]')?.value).toBe('80');
    expect(el.querySelector('[data-testid=path-length]')).toBeNull();
    expect(el.textContent).toContain('µL');
    expect(el.textContent).toContain('mm');
    type(el, '[data-testid=fill-volume]', '');
    submit(el);
    await fixture.whenStable();
    http.expectNone('/api/instruments/4');
    type(el, '[data-testid=fill-volume]', '75');
    submit(el);
    const req = http.expectOne({ method: 'PATCH', url: '/api/instruments/4' });
    expect(req.request.body).toMatchObject({
      plateFormat: '384',
      fileFormat: 'plate_grid',
      rules: { delimiter: ';', decimalMark: ',', skipLines: 2 },
      pathLengthCm: null,
      fillVolumeUl: 75,
      wellDiameterMm: 3.3,
      defaultWavelengthNm: 412,
      fileNamePattern: '^grid_(?<run>\\w+)\\.csv$',
    });
    req.flush({ ...READER_B, fillVolumeUl: 75 });
    await fixture.whenStable();
    expect(close).toHaveBeenCalledWith({ kind: 'updated', profile: { ...READER_B, fillVolumeUl: 75 } });
  });

  it('when the server refuses then shows its message and stays open', async () => {
    const { fixture, el, http, close } = await setup(READER_B);
    submit(el);
    http.expectOne('/api/instruments/4').flush(
      {
        error: {
          code: 'conflict',
          message: 'Another profile already uses the drop sub-folder "reader-b".',
        },
      },
      { status: 409, statusText: 'Conflict' },
    );
    await fixture.whenStable();
    expect(el.querySelector('[data-testid=profile-error]')?.textContent).toContain('already uses');
    expect(close).not.toHaveBeenCalled();
  });

  it('when a file is tried then sends it with the current rules and shows count, metadata, warnings and readings', async () => {
    const { fixture, el, http } = await setup(READER_B);
    const file = new File(['run_id;P-17\n'], 'grid_P17.csv', { type: 'text/csv' });
    chooseFile(el, '[data-testid=try-input]', file);
    const req = http.expectOne({ method: 'POST', url: '/api/instruments/try' });
    const body = req.request.body as FormData;
    expect((body.get('file') as File).name).toBe('grid_P17.csv');
    expect(JSON.parse(body.get('rules') as string)).toEqual({
      ...READER_B.rules,
      format: 'plate_grid',
      plateFormat: '384',
      defaultWavelengthNm: 412,
    });
    req.flush({
      readingCount: 768,
      readings: [
        { position: 'A1', wavelengthNm: 412, absorbance: 0.1234 },
        { position: 'A2', wavelengthNm: 412, absorbance: null, flag: 'saturated' },
      ],
      metadata: { runId: 'P-17', wavelengthsNm: [412, 595], temperatureC: 25, extra: { operator: 'lab-3' } },
      warnings: ['Column 25 of the grid at line 4 is empty and was ignored.'],
    });
    await fixture.whenStable();
    const result = el.querySelector('[data-testid=try-result]')!.textContent ?? '';
    expect(el.querySelector('[data-testid=try-count]')?.textContent).toBe('768');
    expect(result).toContain('P-17');
    expect(result).toContain('412 nm, 595 nm');
    expect(result).toContain('25.0 °C');
    expect(result).toContain('operator');
    expect(result).toContain('was ignored');
    expect(result).toContain('0.1234');
    expect(result).toContain('saturated');
    expect(el.querySelector('[data-testid=try-run-from-name]')?.textContent).toContain('P17');
    expect(el.querySelectorAll('[data-testid=try-readings] tr.mat-mdc-row')).toHaveLength(2);
  });

  it('when the tried file does not parse then shows the exact message, line and column; and tries again with changed rules', async () => {
    const { fixture, el, http } = await setup(READER_B);
    chooseFile(el, '[data-testid=try-input]', new File(['x'], 'grid_P18.csv'));
    http.expectOne('/api/instruments/try').flush(
      {
        error: {
          code: 'parse_error',
          message: 'grid_P18.csv line 7, column 3: expected a number, found "1.2.3"',
          details: { line: 7, column: 3 },
        },
      },
      { status: 422, statusText: 'Unprocessable Entity' },
    );
    await fixture.whenStable();
    const failure = el.querySelector('[data-testid=try-failure]')!.textContent ?? '';
    expect(failure).toContain('expected a number, found "1.2.3"');
    expect(failure).toMatch(/Line\s*7/);
    expect(failure).toMatch(/Column\s*3/);

    // Change the decimal mark in the form, then try the same file again.
    const component = fixture.componentInstance as unknown as {
      form: { controls: { rules: { controls: { decimalMark: { setValue(v: string): void } } } } };
    };
    component.form.controls.rules.controls.decimalMark.setValue('.');
    el.querySelector<HTMLButtonElement>('[data-testid=try-again]')!.click();
    const again = http.expectOne('/api/instruments/try');
    expect(JSON.parse((again.request.body as FormData).get('rules') as string).decimalMark).toBe('.');
    again.flush({ readingCount: 0, readings: [], metadata: { wavelengthsNm: [], extra: {} }, warnings: [] });
    await fixture.whenStable();
    expect(el.querySelector('[data-testid=try-failure]')).toBeNull();
    expect(el.querySelector('[data-testid=try-count]')?.textContent).toBe('0');
  });

  it('when the rules contradict each other then does not send the file', async () => {
    const { fixture, el, http } = await setup(READER_B);
    const component = fixture.componentInstance as unknown as {
      form: { controls: { rules: { controls: { delimiter: { setValue(v: string): void } } } } };
    };
    component.form.controls.rules.controls.delimiter.setValue(',');
    await fixture.whenStable();
    expect(el.textContent).toContain('A decimal comma needs a semicolon or tab delimiter');
    chooseFile(el, '[data-testid=try-input]', new File(['x'], 'grid_P19.csv'));
    await fixture.whenStable();
    http.expectNone('/api/instruments/try');
    expect(el.querySelector('[data-testid=try-failure]')?.textContent).toContain('Fix the parsing rules');
  });
});
