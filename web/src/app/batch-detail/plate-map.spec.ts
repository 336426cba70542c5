import { Component, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import type { PositionResult, QcFlag } from '@equilight/analysis';
import type { PlateFormat } from '../batches/batch';
import { fixtureAnalysis } from './analysis-fixture';
import { ROLE_CODE } from '../shared/role-code/role-style';
import { PlateMap } from './plate-map';

function position(p: string, changes: Partial<PositionResult> = {}): PositionResult {
  return {
    position: p,
    sampleId: `S-${p}`,
    role: 'unknown',
    replicateGroup: null,
    absorbanceRaw: 0.5,
    reads: 1,
    pathLengthCm: 1,
    absorbanceCorrected: 0.45,
    status: 'used',
    exclusionReason: null,
    ...changes,
  };
}

@Component({
  imports: [PlateMap],
  template: `<eq-plate-map
    [format]="format()"
    [positions]="positions()"
    [qc]="qc()"
    [wavelengthNm]="590"
    [pathLengthCm]="1"
    [waterPeakPathsCm]="waterPaths()"
    [selected]="selected()"
    (positionSelect)="chosen.push($event); selected.set($event)"
  />`,
})
class Host {
  readonly format = signal<PlateFormat>('96');
  readonly positions = signal<PositionResult[]>([]);
  readonly qc = signal<QcFlag[]>([]);
  readonly selected = signal<string | null>(null);
  readonly waterPaths = signal<Record<string, number> | null>(null);
  readonly chosen: string[] = [];
}

async function setup(format: PlateFormat, positions: PositionResult[], qc: QcFlag[] = []) {
  const fixture = TestBed.createComponent(Host);
  fixture.componentInstance.format.set(format);
  fixture.componentInstance.positions.set(positions);
  fixture.componentInstance.qc.set(qc);
  await fixture.whenStable();
  const el = fixture.nativeElement as HTMLElement;
  const cell = (p: string) => el.querySelector<HTMLElement>(`[data-position="${p}"]`)!;
  return { fixture, el, cell, host: fixture.componentInstance };
}

describe('PlateMap', () => {
  it('renders a 96-well plate as an ARIA grid of 8 rows × 12 wells with row and column headers', async () => {
    const { el } = await setup('96', [position('A1'), position('H12', { absorbanceCorrected: 0.9 })]);
    const grid = el.querySelector('[role="grid"]')!;
    expect(grid.querySelectorAll('[role="gridcell"]')).toHaveLength(96);
    expect(grid.querySelectorAll('[role="row"]')).toHaveLength(9);
    expect([...grid.querySelectorAll('[role="rowheader"]')].map((h) => h.textContent?.trim())).toEqual(
      'ABCDEFGH'.split(''),
    );
    expect(grid.querySelectorAll('[role="columnheader"]')).toHaveLength(13);
  });

  it('when positions hold roles then each shows the shared role badge and the key lists the roles present', async () => {
    const { el, cell } = await setup('96', [
      position('A1', { role: 'blank' }),
      position('A2', { role: 'standard' }),
      position('B1'),
    ]);
    const badge = cell('A2').querySelector<HTMLElement>('.eq-role-badge')!;
    expect(badge.getAttribute('data-role')).toBe('standard');
    expect(badge.textContent!.trim()).toBe(ROLE_CODE.standard.letter);
    expect(decodeURIComponent(badge.style.backgroundImage)).toContain(ROLE_CODE.standard.fill);
    const key = el.querySelector('[data-testid="role-legend"]')!;
    expect([...key.querySelectorAll('li')].map((li) => li.getAttribute('data-role'))).toEqual([
      'blank',
      'standard',
      'unknown',
    ]);
    expect(key.textContent).toContain(ROLE_CODE.unknown.patternLabel);
  });

  it('renders a 384-well plate as 16 × 24', async () => {
    const { el, cell } = await setup('384', [position('P24')]);
    expect(el.querySelectorAll('[role="gridcell"]')).toHaveLength(384);
    expect(cell('P24')).not.toBeNull();
    expect(el.querySelector('[data-format="384"]')).not.toBeNull();
  });

  it('renders a cuvette sequence in rows of twelve, as far as the highest cuvette', async () => {
    const a = fixtureAnalysis();
    const { el, cell } = await setup('cuvette', a.result.positions);
    expect(el.querySelectorAll('[role="gridcell"]')).toHaveLength(24);
    expect([...el.querySelectorAll('[role="rowheader"]')].map((h) => h.textContent?.trim())).toEqual([
      'C1–C12',
      'C13–C24',
    ]);
    expect(cell('C1').textContent).toContain('B');
    expect(cell('C3').textContent).toContain('S');
    expect(cell('C9').textContent).toContain('U');
    expect(cell('C11').textContent).toContain('M');
  });

  it('colours by corrected absorbance on viridis, with a legend of the range and its units', async () => {
    const { el, cell } = await setup('96', [
      position('A1', { absorbanceCorrected: 0.1 }),
      position('A2', { absorbanceCorrected: 0.6 }),
    ]);
    expect(cell('A1').style.backgroundColor).toBe('rgb(68, 1, 84)');
    expect(cell('A2').style.backgroundColor).toBe('rgb(253, 231, 37)');
    const legend = el.querySelector('[data-testid="plate-legend"]')!;
    expect(legend.textContent).toContain('viridis');
    expect(el.querySelector('[data-testid="legend-min"]')!.textContent).toBe('0.1000');
    expect(el.querySelector('[data-testid="legend-max"]')!.textContent).toBe('0.6000');
    expect(el.querySelector('[data-testid="legend-unit"]')!.textContent).toContain('absorbance units (AU)');
    expect(el.querySelector('[data-testid="legend-unit"]')!.textContent).toContain('590 nm');
  });

  it('marks missing, saturated, excluded and flagged positions with a symbol and says so in words', async () => {
    const { cell, el } = await setup(
      '96',
      [
        position('A1', { status: 'missing', absorbanceRaw: null, absorbanceCorrected: null }),
        position('A2', { status: 'saturated', absorbanceRaw: null, absorbanceCorrected: null }),
        position('A3', { status: 'excluded', absorbanceCorrected: null, exclusionReason: 'bubble seen' }),
        position('A4'),
      ],
      [
        {
          code: 'negative-absorbance',
          severity: 'warning',
          message: 'A4 is below the blank',
          position: 'A4',
          sampleId: null,
          value: -0.01,
          threshold: -0.005,
        },
      ],
    );
    expect(cell('A1').getAttribute('data-marker')).toBe('missing');
    expect(cell('A1').querySelector('.eq-map__marker')!.getAttribute('data-symbol')).toBe('∅');
    expect(cell('A2').getAttribute('data-marker')).toBe('saturated');
    expect(cell('A2').querySelector('.eq-map__marker')!.getAttribute('data-symbol')).toBe('▲');
    expect(cell('A3').getAttribute('data-marker')).toBe('excluded');
    expect(cell('A3').querySelector('.eq-map__marker')!.getAttribute('data-symbol')).toBe('✕');
    expect(cell('A3').getAttribute('aria-label')).toContain('reason: bubble seen');
    expect(cell('A4').getAttribute('data-marker')).toBe('flagged');
    expect(cell('A4').getAttribute('aria-label')).toContain('1 QC flag');
    for (const m of ['missing', 'saturated', 'excluded', 'flagged'])
      expect(el.querySelector(`[data-testid="legend-${m}"]`)).not.toBeNull();
    expect(cell('B1').getAttribute('aria-label')).toBe('B1, empty');
  });

  it("marks every position a replicate group's finding names", async () => {
    const { cell } = await setup(
      '96',
      [position('A1'), position('A2'), position('A3')],
      [
        {
          code: 'replicate-cv-high',
          severity: 'warning',
          message: 'Replicates disagree',
          position: 'A1 A2',
          sampleId: 'WQ-9',
          value: 0.3,
          threshold: 0.1,
        },
      ],
    );
    expect(cell('A1').getAttribute('data-marker')).toBe('flagged');
    expect(cell('A2').getAttribute('data-marker')).toBe('flagged');
    expect(cell('A3').getAttribute('data-marker')).not.toBe('flagged');
  });

  it('keeps one tab stop and moves it with the arrow keys; focus shows the tooltip', async () => {
    const { cell, fixture, el } = await setup('96', [
      position('A1', {
        replicateGroup: 'R1',
        sampleId: 'WQ-7',
        absorbanceRaw: 0.512,
        absorbanceCorrected: 0.47,
      }),
      position('A2'),
      position('B2'),
    ]);
    expect(el.querySelectorAll('[tabindex="0"]')).toHaveLength(1);
    expect(cell('A1').tabIndex).toBe(0);
    cell('A1').focus();
    await fixture.whenStable();
    const tooltip = el.querySelector('[data-testid="plate-tooltip"]')!;
    expect(tooltip.getAttribute('role')).toBe('tooltip');
    const text = tooltip.textContent!.replace(/\s+/g, ' ');
    expect(text).toContain('WQ-7');
    expect(text).toContain('0.5120 AU');
    expect(text).toContain('0.4700 AU');
    expect(text).toContain('R1');
    expect(text).toContain('used');
    expect(cell('A1').getAttribute('aria-describedby')).toBe(tooltip.id);

    cell('A1').dispatchEvent(new KeyboardEvent('keydown', { key: 'ArrowRight', bubbles: true }));
    await fixture.whenStable();
    expect(document.activeElement).toBe(cell('A2'));
    expect(cell('A2').tabIndex).toBe(0);
    expect(cell('A1').tabIndex).toBe(-1);
    cell('A2').dispatchEvent(new KeyboardEvent('keydown', { key: 'ArrowDown', bubbles: true }));
    await fixture.whenStable();
    expect(document.activeElement).toBe(cell('B2'));
    cell('B2').dispatchEvent(new KeyboardEvent('keydown', { key: 'End', bubbles: true }));
    await fixture.whenStable();
    expect(document.activeElement).toBe(cell('B12'));
  });

  it('shows the tooltip while the pointer is over a cell, its badge included, and hides it when it leaves', async () => {
    const { cell, fixture, el } = await setup('96', [
      position('A1', { role: 'standard', sampleId: 'ST-3' }),
      position('A2', { sampleId: 'ST-4' }),
    ]);
    const tooltip = () => el.querySelector('[data-testid="plate-tooltip"]');
    const pointer = (type: 'mouseover' | 'mouseout', target: Element, relatedTarget: Element | null) =>
      target.dispatchEvent(new MouseEvent(type, { bubbles: true, relatedTarget }));
    const badge = cell('A1').querySelector('eq-role-badge')!;
    expect(badge).not.toBeNull();

    pointer('mouseover', badge, el); // enters A1 straight onto its badge
    await fixture.whenStable();
    expect(tooltip()!.textContent).toContain('ST-3');
    pointer('mouseout', badge, cell('A1')); // from the badge to the cell around it: still inside A1
    await fixture.whenStable();
    expect(tooltip()!.textContent).toContain('ST-3');
    pointer('mouseover', cell('A1'), badge);
    await fixture.whenStable();
    expect(tooltip()!.textContent).toContain('ST-3');
    pointer('mouseout', cell('A1'), cell('A2')); // leaves A1 for A2
    pointer('mouseover', cell('A2'), cell('A1'));
    await fixture.whenStable();
    expect(tooltip()!.textContent).toContain('ST-4');
    pointer('mouseout', cell('A2'), el); // leaves the grid
    await fixture.whenStable();
    expect(tooltip()).toBeNull();
  });

  it('shows the path length of a well from the water peak in its tooltip and says so in the legend', async () => {
    const { cell, fixture, el, host } = await setup('96', [
      position('A1', { pathLengthCm: 0.5239 }),
      position('A2'),
    ]);
    expect(el.querySelector('[data-testid="legend-unit"]')!.textContent).toContain('1 cm path');
    host.waterPaths.set({ A1: 0.5239 });
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="legend-unit"]')!.textContent).toContain(
      'path length per well from the water peak',
    );
    cell('A1').focus();
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="plate-tooltip-path"]')!.textContent).toBe('0.52 cm (water peak)');
    cell('A2').focus();
    await fixture.whenStable();
    expect(el.querySelector('[data-testid="plate-tooltip-path"]')).toBeNull();
  });

  it('emits the position on click and on Enter, and marks it selected', async () => {
    const { cell, fixture, host } = await setup('96', [position('C3'), position('D4')]);
    cell('C3').click();
    await fixture.whenStable();
    expect(host.chosen).toEqual(['C3']);
    expect(cell('C3').getAttribute('aria-selected')).toBe('true');
    cell('C3').dispatchEvent(new KeyboardEvent('keydown', { key: 'ArrowRight', bubbles: true }));
    await fixture.whenStable();
    cell('C4').dispatchEvent(new KeyboardEvent('keydown', { key: 'Enter', bubbles: true }));
    // C4 is empty: nothing to select there.
    expect(host.chosen).toEqual(['C3']);
    cell('D4').click();
    await fixture.whenStable();
    expect(host.chosen).toEqual(['C3', 'D4']);
  });
});
