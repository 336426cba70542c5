import { TestBed } from '@angular/core/testing';
import { PlannerPage } from './planner-page';

// Material harnesses open real overlays; on a busy two-core machine that takes seconds.
jest.setTimeout(20_000);

describe('PlannerPage', () => {
  async function setup() {
    TestBed.configureTestingModule({ imports: [PlannerPage] });
    const fixture = TestBed.createComponent(PlannerPage);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const type = async (testId: string, value: string) => {
      const input = el.querySelector<HTMLInputElement>(`[data-testid="${testId}"]`)!;
      input.value = value;
      input.dispatchEvent(new Event('input'));
      await fixture.whenStable();
    };
    return { fixture, el, type };
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
});
