import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { TestBed } from '@angular/core/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { PlannerPage } from './planner-page';

const LAYOUT_SUMMARY = {
  id: 7,
  name: 'Iron series plate',
  format: '96',
  cuvetteCount: null,
  currentVersion: 1,
  positionCount: 4,
  roleCounts: { blank: 2, standard: 2 },
  updatedAt: '2026-11-30T10:00:00.000Z',
};
const LAYOUT = {
  ...LAYOUT_SUMMARY,
  version: 1,
  positions: [
    { position: 'A1', role: 'blank' },
    { position: 'A2', role: 'blank' },
    { position: 'A3', role: 'standard', replicateGroup: 'S1' },
    { position: 'A4', role: 'standard', replicateGroup: 'S1' },
  ],
  versions: [{ version: 1, createdAt: '2026-11-30T10:00:00.000Z', createdById: 1 }],
};

// Material harnesses open real overlays; on a busy two-core machine that takes seconds.
jest.setTimeout(20_000);

describe('PlannerPage', () => {
  async function setup() {
    TestBed.configureTestingModule({
      imports: [PlannerPage],
      providers: [provideHttpClient(), provideHttpClientTesting()],
    });
    const fixture = TestBed.createComponent(PlannerPage);
    const http = TestBed.inject(HttpTestingController);
    fixture.detectChanges();
    http.expectOne('/api/layouts').flush([LAYOUT_SUMMARY]);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const type = async (testId: string, value: string) => {
      const input = el.querySelector<HTMLInputElement>(`[data-testid="${testId}"]`)!;
      input.value = value;
      input.dispatchEvent(new Event('input'));
      await fixture.whenStable();
    };
    const chooseLayout = async () => {
      const loader = TestbedHarnessEnvironment.loader(fixture);
      const select = await loader.getHarness(MatSelectHarness.with({ selector: '[data-testid="layout"]' }));
      await select.open();
      await select.clickOptions({ text: /Iron series plate/ });
      http.expectOne('/api/layouts/7').flush(LAYOUT);
      await fixture.whenStable();
    };
    return { fixture, el, type, chooseLayout, http };
  }

  const screenRows = (el: HTMLElement) =>
    [...el.querySelectorAll('.eq-table-wrap [data-testid="pipetting-table"] tbody tr')].map((r) =>
      [...r.querySelectorAll('td')].map((td) => td.textContent?.replace(/\s+/g, ' ').trim()).join(' | '),
    );

  it('shows the reagent cautions', async () => {
    const { el } = await setup();
    const text = el.querySelector('[data-testid="cautions"]')!.textContent!;
    expect(text).toContain('thiocyanate');
    expect(text).toContain('safety data sheet');
    expect(text).toMatch(/protection your lab requires/);
  });

  it('renders the pipetting table of the default Job series with units', async () => {
    const { el } = await setup();
    expect(screenRows(el)).toHaveLength(9);
    expect(screenRows(el)[0]).toMatch(/^C1 \| mix-01 \| /);
    const header = el.querySelector('.eq-table-wrap thead')!.textContent!;
    expect(header).toContain('mL');
    expect(header).toContain('mol/L');
    expect(el.textContent).toContain('L·mol⁻¹·cm⁻¹');
  });

  it('recomputes on edits and marks mixtures above the linear range with icon and text', async () => {
    const { el, type } = await setup();
    await type('mixture-count', '4');
    await type('k-assumed', '1000');
    await type('epsilon', '5000');
    await type('ceiling', '0.5');
    const rows = screenRows(el);
    expect(rows).toHaveLength(4);
    // Mixture 2: 3.000 mL A, 2.000 mL B, 5.000 mL diluent, A ≈ 0.641 (see planner.spec.ts).
    expect(rows[1]).toContain('3.000 | 2.000 | 5.000');
    expect(rows[1]).toContain('0.641');
    expect(rows[1]).toContain('Above the linear range');
    expect(rows[0]).toContain('In range');
    expect(el.querySelector('[data-testid="plan-summary"]')!.textContent).toContain(
      '2 mixture(s) predicted above the linear range',
    );
  });

  it('refuses to export a plan with a mixture that cannot be made', async () => {
    const { el, type } = await setup();
    await type('stock-a', '0.0001');
    expect(el.querySelector('[data-testid="plan-summary"]')!.textContent).toContain('cannot be made');
    expect(el.querySelector<HTMLButtonElement>('[data-testid="export-csv"]')!.disabled).toBe(true);
  });

  it('shows a message instead of a table while a field is invalid', async () => {
    const { el, type } = await setup();
    await type('total-volume', '-1');
    expect(screenRows(el)).toHaveLength(0);
    expect(el.textContent).toContain('Correct the marked fields');
  });

  it('exports the plan as a manifest CSV in the browser', async () => {
    const { el, type } = await setup();
    await type('mixture-count', '4');
    let saved: Blob | undefined;
    const createObjectURL = jest.fn((blob: Blob) => {
      saved = blob;
      return 'blob:plan';
    });
    Object.assign(URL, { createObjectURL, revokeObjectURL: jest.fn() });
    const click = jest.spyOn(HTMLAnchorElement.prototype, 'click').mockImplementation(function (
      this: HTMLAnchorElement,
    ) {
      expect(this.download).toMatch(/^mixture-plan-\d{4}-\d{2}-\d{2}\.csv$/);
    });
    el.querySelector<HTMLButtonElement>('[data-testid="export-csv"]')!.click();
    expect(click).toHaveBeenCalledTimes(1);
    const text = await saved!.text();
    expect(text.split('\r\n')).toEqual([
      'position,sample_id,role,stock_a_M,volume_a_mL,stock_b_M,volume_b_mL,total_volume_mL',
      'C1,mix-01,mixture,0.002,4,0.002,1,10',
      'C2,mix-02,mixture,0.002,3,0.002,2,10',
      'C3,mix-03,mixture,0.002,2,0.002,3,10',
      'C4,mix-04,mixture,0.002,1,0.002,4,10',
      '',
    ]);
    click.mockRestore();
  });

  it('prints a prep sheet with the plan and the cautions', async () => {
    const { fixture, el } = await setup();
    const print = jest.fn();
    Object.assign(window, { print });
    el.querySelector<HTMLButtonElement>('[data-testid="print-plan"]')!.click();
    await fixture.whenStable();
    expect(print).toHaveBeenCalledTimes(1);
    const sheet = el.querySelector('[data-testid="prep-sheet"]')!;
    expect(sheet.querySelectorAll('tbody tr')).toHaveLength(9);
    expect(sheet.textContent).toContain('Prepared by');
    expect(sheet.textContent).toContain('thiocyanates');
  });

  it('names no single reagent in the cautions heading and shows the H-statements of the named stocks', async () => {
    const { el, type } = await setup();
    expect(el.querySelector('#cautions-title')!.textContent).toBe(
      'Before you pipette: cautions for the reagents in this plan',
    );
    await type('reagent-a', 'Iron(III) nitrate');
    await type('reagent-b', 'some ligand');
    await type('cas-b', '333-20-0');
    const items = [...el.querySelectorAll('[data-testid="reagent-caution"]')].map((li) =>
      li.textContent!.replace(/\s+/g, ' '),
    );
    expect(items[0]).toContain('H272 May intensify fire; oxidizer');
    expect(items[1]).toContain('Potassium thiocyanate');
    expect(items[2]).toContain('Water'); // the default diluent, deionised water
    expect(el.querySelector('[data-testid="reagent-source"]')!.textContent).toContain('safety data sheet');
  });

  it('gives the general caution for a reagent the table does not hold', async () => {
    const { el, type } = await setup();
    await type('reagent-a', 'Reagent X-17');
    const first = el.querySelector('[data-testid="reagent-caution"]')!.textContent!;
    expect(first).toContain('Reagent X-17');
    expect(first).toContain('treat it as hazardous');
  });

  it('plans µL to the fill volume on the free positions of a chosen plate layout, with a preview', async () => {
    const { el, type, chooseLayout } = await setup();
    await type('mixture-count', '4');
    await chooseLayout();
    expect(el.querySelector('[data-testid="free-count"]')!.textContent).toContain('92 free position(s)');
    expect(el.querySelector<HTMLInputElement>('[data-testid="fill-volume"]')!.value).toBe('200');
    expect(el.querySelector('[data-testid="total-volume"]')).toBeNull();
    const header = el.querySelector('.eq-table-wrap thead')!.textContent!;
    expect(header).toContain('µL');
    const rows = screenRows(el);
    expect(rows).toHaveLength(4);
    // 200 µL wells, Job's series at 1e-3 mol/L from 2e-3 mol/L stocks, mixture 2 at x_B = 0.4: V_A = 6e-4 × 200 / 2e-3 = 60 µL, V_B = 40 µL, diluent 100 µL (C₁V₁ = C₂V₂).
    expect(rows.map((r) => r.split(' | ')[0])).toEqual(['A5', 'A6', 'A7', 'A8']);
    expect(rows[1]).toContain('60.0 | 40.0 | 100.0');
    const preview = el.querySelector('[data-testid="plate-preview"]')!;
    expect(preview.textContent).toContain('Iron series plate');
    expect(preview.querySelector('[aria-label*="A6, mixture"], [title*="A6, mixture"]')).not.toBeNull();
  });

  it('warns per mixture below the LOQ and shows the LOQ as an absorbance', async () => {
    const { el, type } = await setup();
    await type('mixture-count', '4');
    await type('k-assumed', '1000');
    await type('epsilon', '5000');
    await type('loq', '0.0001');
    expect(el.querySelector('[data-testid="loq-absorbance"]')!.textContent).toContain('0.500');
    const rows = screenRows(el);
    // Hand-worked in planner.spec.ts: complex 8.35e-5, 1.28e-4, 1.28e-4, 8.35e-5 mol/L.
    expect(rows.map((r) => r.includes('Below the LOQ'))).toEqual([true, false, false, true]);
    expect(el.querySelector('[data-testid="plan-summary"]')!.textContent).toContain(
      '2 mixture(s) predicted below the LOQ',
    );
  });
});
