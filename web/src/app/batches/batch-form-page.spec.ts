import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { TestBed } from '@angular/core/testing';
import { MatChipOptionHarness } from '@angular/material/chips/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { Router, provideRouter } from '@angular/router';
import { BatchFormPage } from './batch-form-page';
import { batchFixture } from './batch-fixture';

const INSTRUMENTS = [
  { id: 2, name: 'Reader Bay 2', kind: 'plate_reader', plateFormat: '96', active: true },
  { id: 5, name: 'Cuvette bench', kind: 'cuvette_spectrophotometer', plateFormat: 'cuvette', active: true },
  { id: 6, name: 'Retired reader', kind: 'plate_reader', plateFormat: '96', active: false },
];
const LAYOUTS = [
  {
    id: 3,
    name: 'Job plate',
    format: '96',
    cuvetteCount: null,
    currentVersion: 2,
    positionCount: 40,
    roleCounts: {},
    updatedAt: '',
  },
  {
    id: 7,
    name: 'Cuvette row',
    format: 'cuvette',
    cuvetteCount: 8,
    currentVersion: 1,
    positionCount: 8,
    roleCounts: {},
    updatedAt: '',
  },
];
const MANIFESTS = [
  { id: 4, name: 'Job mixtures', layoutId: 3, currentVersion: 1, sampleCount: 40, updatedAt: '' },
  { id: 8, name: 'Cuvette standards', layoutId: 7, currentVersion: 1, sampleCount: 8, updatedAt: '' },
];

// Material harnesses open real overlays; on a busy two-core machine that takes seconds.
jest.setTimeout(20_000);

describe('BatchFormPage', () => {
  async function setup() {
    TestBed.configureTestingModule({
      imports: [BatchFormPage],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        provideRouter([{ path: 'batches', children: [] }]),
      ],
    });
    const fixture = TestBed.createComponent(BatchFormPage);
    const http = TestBed.inject(HttpTestingController);
    fixture.detectChanges();
    http.expectOne('/api/instruments/summary').flush(INSTRUMENTS);
    http.expectOne('/api/layouts').flush(LAYOUTS);
    http.expectOne('/api/manifests').flush(MANIFESTS);
    await fixture.whenStable();
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const el = fixture.nativeElement as HTMLElement;
    const type = async (testId: string, value: string) => {
      const input = el.querySelector<HTMLInputElement>(`[data-testid="${testId}"]`)!;
      input.value = value;
      input.dispatchEvent(new Event('input'));
      input.dispatchEvent(new Event('blur'));
      await fixture.whenStable();
    };
    const select = (testId: string) =>
      loader.getHarness(MatSelectHarness.with({ selector: `[data-testid="${testId}"]` }));
    return { fixture, http, loader, el, type, select };
  }

  async function fillIn(ctx: Awaited<ReturnType<typeof setup>>) {
    const { http, type, select, fixture } = ctx;
    await type('batch-name', 'Iron–ligand Job series');
    await (await select('batch-instrument')).clickOptions({ text: /Reader Bay 2/ });
    await (await select('batch-layout')).clickOptions({ text: /Job plate/ });
    http.expectOne('/api/layouts/3').flush({
      ...LAYOUTS[0],
      version: 2,
      positions: [],
      versions: [
        { version: 1, createdAt: '2026-02-01T09:00:00.000Z', createdById: 1 },
        { version: 2, createdAt: '2026-02-03T09:00:00.000Z', createdById: 1 },
      ],
    });
    await fixture.whenStable();
    await (await select('batch-manifest')).clickOptions({ text: /Job mixtures/ });
    http.expectOne('/api/manifests/4').flush({
      ...MANIFESTS[0],
      layoutVersion: 2,
      version: 1,
      source: 'csv',
      fileName: 'job.csv',
      samples: [],
      versions: [{ version: 1, createdAt: '2026-02-04T09:00:00.000Z', createdById: 1, source: 'csv' }],
    });
    await fixture.whenStable();
    await type('batch-run-id', 'RUN-0417');
  }

  it('shows every problem and sends nothing while required fields are empty', async () => {
    const { fixture, http, el } = await setup();
    el.querySelector<HTMLButtonElement>('[data-testid="create-batch"]')!.click();
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="batch-error"]')!.textContent).toContain(
      'Some fields need attention',
    );
    const errors = [...el.querySelectorAll('mat-error')].map((e) => e.textContent?.trim());
    expect(errors).toEqual(
      expect.arrayContaining([
        'Give the batch a name (up to 120 characters)',
        'Choose the instrument that reads this run',
        'Choose a layout',
        'Choose a manifest',
        'Give the run id the instrument writes (up to 120 characters)',
      ]),
    );
    http.expectNone('/api/batches');
  });

  it('rejects out-of-range settings', async () => {
    const { fixture, el, type } = await setup();
    await type('batch-r2', '1.5');
    await type('batch-expected', '0');
    await type('batch-wavelength', '50');
    await fixture.whenStable();
    const errors = [...el.querySelectorAll('mat-error')].map((e) => e.textContent?.trim());
    expect(errors).toEqual(
      expect.arrayContaining(['From 0 to 1', 'A whole number from 1 to 1000', 'From 100 to 3300 nm']),
    );
  });

  it('offers only layouts of the instrument format and manifests mapped onto the layout', async () => {
    const { http, select, fixture } = await setup();
    await (await select('batch-instrument')).clickOptions({ text: /Cuvette bench/ });
    const layoutSelect = await select('batch-layout');
    await layoutSelect.open();
    expect(await Promise.all((await layoutSelect.getOptions()).map((o) => o.getText()))).toEqual([
      'Cuvette row · Cuvette sequence · 8 positions',
    ]);
    await layoutSelect.clickOptions({ text: /Cuvette row/ });
    http
      .expectOne('/api/layouts/7')
      .flush({ ...LAYOUTS[1], versions: [{ version: 1, createdAt: '', createdById: 1 }] });
    await fixture.whenStable();
    const manifestSelect = await select('batch-manifest');
    await manifestSelect.open();
    expect(await Promise.all((await manifestSelect.getOptions()).map((o) => o.getText()))).toEqual([
      'Cuvette standards · 8 samples',
    ]);
    const instruments = await select('batch-instrument');
    await instruments.open();
    expect(await Promise.all((await instruments.getOptions()).map((o) => o.getText()))).not.toContain(
      'Retired reader · 96-well plate',
    );
  });

  it('sends the typed body, with percentages as fractions, and goes back to the list', async () => {
    const ctx = await setup();
    const { http, el, type, loader, fixture } = ctx;
    const navigate = jest.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);
    await fillIn(ctx);
    await type('batch-expected', '3');
    await type('batch-temperature', '25');
    await type('batch-wavelength', '480');
    await type('batch-replicate-cv', '4');
    // An earlier layout version on purpose; the manifest stays at "Current", so its version is left to the server.
    await (await ctx.select('batch-layout-version')).clickOptions({ text: /^v1 / });
    const chip = await loader.getHarness(MatChipOptionHarness.with({ text: '1:3' }));
    await chip.toggle();
    el.querySelector<HTMLButtonElement>('[data-testid="create-batch"]')!.click();
    const req = http.expectOne({ method: 'POST', url: '/api/batches' });
    expect(req.request.body).toEqual({
      name: 'Iron–ligand Job series',
      profileId: 2,
      layoutId: 3,
      layoutVersion: 1,
      manifestId: 4,
      runId: 'RUN-0417',
      expectedFiles: 3,
      systemName: null,
      temperatureC: 25,
      settings: {
        wavelengthNm: 480,
        candidates: ['1:1', '1:2', '2:1'],
        calibrationModel: 'linear',
        linearRangeMaxAbsorbance: 1,
        r2Min: 0.995,
        replicateCvMax: 0.04,
        kCvMax: 0.15,
        concentrationUnit: 'mol/L',
        recoveryLimitsPct: [90, 110],
      },
    });
    req.flush(batchFixture(), { status: 201, statusText: 'Created' });
    await fixture.whenStable();
    expect(navigate).toHaveBeenCalledWith(['/batches']);
  });

  it('asks for the molar mass with mg/L and checks the recovery limits, then sends them', async () => {
    const ctx = await setup();
    const { http, el, type, fixture } = ctx;
    jest.spyOn(TestBed.inject(Router), 'navigate').mockResolvedValue(true);
    await fillIn(ctx);
    await (await ctx.select('batch-unit')).clickOptions({ text: 'mg/L' });
    await type('batch-recovery-low', '105');
    await type('batch-recovery-high', '95');
    await type('batch-molar-mass', '');
    el.querySelector<HTMLButtonElement>('[data-testid="create-batch"]')!.click();
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="molar-mass-needed"]')!.textContent).toContain(
      'mg/L needs the molar mass',
    );
    expect(el.querySelector('[data-testid="recovery-order"]')!.textContent).toContain(
      'Above the lower limit',
    );
    http.expectNone('/api/batches');

    // Iron: 55.845 g/mol (IUPAC standard atomic weight, from memory).
    await type('batch-molar-mass', '55.845');
    await type('batch-recovery-low', '95');
    await type('batch-recovery-high', '105');
    expect(el.querySelector('[data-testid="molar-mass-needed"]')).toBeNull();
    el.querySelector<HTMLButtonElement>('[data-testid="create-batch"]')!.click();
    const req = http.expectOne({ method: 'POST', url: '/api/batches' });
    expect(req.request.body.settings).toMatchObject({
      concentrationUnit: 'mg/L',
      molarMassGPerMol: 55.845,
      recoveryLimitsPct: [95, 105],
    });
    req.flush(batchFixture(), { status: 201, statusText: 'Created' });
  });

  it('creates with the current versions without waiting for the version lists', async () => {
    const { http, el, type, select, fixture } = await setup();
    await type('batch-name', 'Quick run');
    await (await select('batch-instrument')).clickOptions({ text: /Reader Bay 2/ });
    await (await select('batch-layout')).clickOptions({ text: /Job plate/ });
    await (await select('batch-manifest')).clickOptions({ text: /Job mixtures/ });
    await type('batch-run-id', 'RUN-0500');
    el.querySelector<HTMLButtonElement>('[data-testid="create-batch"]')!.click();
    const req = http.expectOne({ method: 'POST', url: '/api/batches' });
    expect(req.request.body).toEqual(expect.objectContaining({ layoutId: 3, manifestId: 4 }));
    expect(req.request.body).not.toHaveProperty('layoutVersion');
    expect(req.request.body).not.toHaveProperty('manifestVersion');
    req.flush(batchFixture(), { status: 201, statusText: 'Created' });
    await fixture.whenStable();
  });

  it('shows the API message when the server refuses the batch', async () => {
    const ctx = await setup();
    const { http, el, fixture } = ctx;
    await fillIn(ctx);
    el.querySelector<HTMLButtonElement>('[data-testid="create-batch"]')!.click();
    http.expectOne({ method: 'POST', url: '/api/batches' }).flush(
      {
        error: {
          code: 'conflict',
          message: 'Open batch "Earlier run" already collects run "RUN-0417" of this instrument.',
        },
      },
      { status: 409, statusText: 'Conflict' },
    );
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="batch-error"]')!.textContent).toContain(
      'already collects run "RUN-0417"',
    );
    expect(el.querySelector<HTMLButtonElement>('[data-testid="create-batch"]')!.disabled).toBe(false);
  });
});
