import { ChangeDetectionStrategy, Component, signal } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { PlateGrid, describePosition } from './plate-grid';
import {
  type PlateCell,
  type PlateFormat,
  ROLE_CODE,
  comparePositions,
  plateGeometry,
} from './plate-geometry';
import { ROLE_PATTERN_TILE } from '@equilight/contracts';

@Component({
  imports: [PlateGrid],
  template: `<eq-plate-grid
    [format]="format()"
    [cuvetteCount]="cuvetteCount()"
    [cells]="cells()"
    [selected]="selected()"
    [readonly]="readonly()"
    (selectedChange)="selected.set($event)"
  />`,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
class Host {
  readonly format = signal<PlateFormat>('96');
  readonly cuvetteCount = signal(12);
  readonly cells = signal<Record<string, PlateCell>>({});
  readonly selected = signal<ReadonlySet<string>>(new Set());
  readonly readonly = signal(false);
}

describe('PlateGrid', () => {
  async function setup(init?: (host: Host) => void) {
    const fixture = TestBed.createComponent(Host);
    init?.(fixture.componentInstance);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    const well = (p: string) => el.querySelector<HTMLElement>(`[data-position="${p}"]`)!;
    const selected = () => [...fixture.componentInstance.selected()].sort(comparePositions);
    const mouse = (target: HTMLElement, type: string, init: MouseEventInit = {}) =>
      target.dispatchEvent(new MouseEvent(type, { bubbles: type !== 'mouseenter', button: 0, ...init }));
    const click = async (p: string, init: MouseEventInit = {}) => {
      mouse(well(p), 'mousedown', init);
      mouse(well(p), 'mouseup', init);
      await fixture.whenStable();
    };
    const key = async (key: string, init: KeyboardEventInit = {}) => {
      (document.activeElement ?? el).dispatchEvent(
        new KeyboardEvent('keydown', { key, bubbles: true, ...init }),
      );
      await fixture.whenStable();
    };
    return { fixture, el, well, selected, mouse, click, key, host: fixture.componentInstance };
  }

  it('when a well holds a role then it is painted with the contracts role code: colour, pattern and letter', async () => {
    const { well } = await setup((h) =>
      h.cells.set({ A1: { role: 'standard' }, A2: { role: 'mixture' }, A3: { role: 'blank' } }),
    );
    for (const [position, role] of [
      ['A1', 'standard'],
      ['A2', 'mixture'],
      ['A3', 'blank'],
    ] as const) {
      const w = well(position);
      const code = ROLE_CODE[role];
      expect(w.getAttribute('data-role')).toBe(role);
      const svg = decodeURIComponent(w.style.backgroundImage);
      expect(svg).toContain(`fill="${code.fill}"`);
      expect(w.style.backgroundSize).toBe(`${ROLE_PATTERN_TILE}px ${ROLE_PATTERN_TILE}px`);
      expect(w.style.getPropertyValue('--eq-role-ink')).toBe(code.ink);
      expect(w.querySelector('.eq-letter')!.getAttribute('data-letter')).toBe(code.letter);
    }
    // a pattern with marks draws them in the ink; the plain one has none
    expect(decodeURIComponent(well('A2').style.backgroundImage)).toContain('<circle');
    expect(decodeURIComponent(well('A3').style.backgroundImage)).not.toMatch(/<line|<circle/);
    expect(well('B1').style.backgroundImage).toBe('');
  });

  it('draws a 96-well plate as an ARIA grid of 8 rows and 12 columns', async () => {
    const { el } = await setup();
    const grid = el.querySelector('[role="grid"]')!;
    expect(grid.getAttribute('aria-multiselectable')).toBe('true');
    expect(el.querySelectorAll('[role="row"]')).toHaveLength(9);
    expect(el.querySelectorAll('[role="gridcell"]')).toHaveLength(96);
    expect(el.querySelectorAll('[role="rowheader"]')).toHaveLength(8);
    expect(el.querySelectorAll('[role="columnheader"]')).toHaveLength(13);
  });

  it('draws 384 wells compactly and a cuvette sequence in rows of twelve', async () => {
    const { fixture, el, host } = await setup((h) => h.format.set('384'));
    expect(el.querySelectorAll('[role="gridcell"]')).toHaveLength(384);
    expect(el.querySelector('.eq-grid')!.classList).toContain('eq-compact');
    host.format.set('cuvette');
    host.cuvetteCount.set(14);
    await fixture.whenStable();
    expect(el.querySelectorAll('[role="gridcell"]')).toHaveLength(14);
    expect(el.querySelector('[data-position="C14"]')).not.toBeNull();
    expect(el.querySelectorAll('[role="columnheader"]')).toHaveLength(0);
  });

  it('labels every well with its position, role, group and a letter besides the colour', async () => {
    const { well } = await setup((h) =>
      h.cells.set({ B7: { role: 'standard', replicateGroup: 'S1' }, A1: { role: 'blank' } }),
    );
    expect(well('B7').getAttribute('aria-label')).toBe('B7, standard, group S1');
    expect(well('B7').querySelector('.eq-letter')!.getAttribute('data-letter')).toBe('S');
    expect(well('B7').dataset['role']).toBe('standard');
    expect(well('A1').querySelector('.eq-letter')!.getAttribute('data-letter')).toBe('B');
    expect(well('C3').getAttribute('aria-label')).toBe('C3, empty');
    expect(describePosition('D4', { role: 'unknown', label: 'U-17' })).toBe('D4, unknown, sample U-17');
  });

  it('toggles a well on click and marks it aria-selected', async () => {
    const { click, selected, well } = await setup();
    await click('B2');
    expect(selected()).toEqual(['B2']);
    expect(well('B2').getAttribute('aria-selected')).toBe('true');
    expect(well('B2').classList).toContain('eq-selected');
    await click('C3');
    expect(selected()).toEqual(['B2', 'C3']);
    await click('B2');
    expect(selected()).toEqual(['C3']);
  });

  it('selects the rectangle from the last clicked well on shift-click', async () => {
    const { click, selected } = await setup();
    await click('B2');
    await click('C4', { shiftKey: true });
    expect(selected()).toEqual(['B2', 'B3', 'B4', 'C2', 'C3', 'C4']);
  });

  it('selects a dragged rectangle, adding to the selection', async () => {
    const { fixture, click, mouse, well, selected } = await setup();
    await click('H12');
    mouse(well('A1'), 'mousedown');
    mouse(well('A2'), 'mouseenter');
    mouse(well('B3'), 'mouseenter');
    await fixture.whenStable();
    expect(well('B2').classList).toContain('eq-selected');
    mouse(document.body, 'mouseup');
    await fixture.whenStable();
    expect(selected()).toEqual(['A1', 'A2', 'A3', 'B1', 'B2', 'B3', 'H12']);
  });

  it('selects a whole row or column from its header, and clears it on a second click', async () => {
    const { fixture, el, selected } = await setup();
    el.querySelector<HTMLElement>('[role="rowheader"][data-r="2"]')!.click();
    await fixture.whenStable();
    expect(selected()).toHaveLength(12);
    expect(selected().every((p) => p.startsWith('C'))).toBe(true);
    el.querySelector<HTMLElement>('[role="rowheader"][data-r="2"]')!.click();
    await fixture.whenStable();
    expect(selected()).toEqual([]);
    el.querySelector<HTMLElement>('[role="columnheader"][data-c="6"]')!.click();
    await fixture.whenStable();
    expect(selected()).toEqual(['A7', 'B7', 'C7', 'D7', 'E7', 'F7', 'G7', 'H7']);
  });

  it('moves focus with arrow keys, toggles with space and enter, extends with shift+arrows', async () => {
    const { fixture, well, key, selected, el } = await setup();
    well('A1').focus();
    await fixture.whenStable();
    await key('ArrowRight');
    await key('ArrowDown');
    expect(document.activeElement).toBe(well('B2'));
    expect(well('B2').getAttribute('tabindex')).toBe('0');
    expect(well('A1').getAttribute('tabindex')).toBe('-1');
    await key(' ');
    expect(selected()).toEqual(['B2']);
    await key('ArrowRight', { shiftKey: true });
    await key('ArrowDown', { shiftKey: true });
    expect(selected()).toEqual(['B2', 'B3', 'C2', 'C3']);
    await key('ArrowRight');
    await key('Enter');
    expect(selected()).toEqual(['B2', 'B3', 'C2', 'C3', 'C4']);
    await key('Escape');
    expect(selected()).toEqual([]);
    // Up past row A reaches the column header; Enter there selects the column.
    for (let i = 0; i < 3; i++) await key('ArrowUp');
    expect(document.activeElement?.getAttribute('role')).toBe('columnheader');
    await key('Enter');
    expect(selected()).toEqual(['A4', 'B4', 'C4', 'D4', 'E4', 'F4', 'G4', 'H4']);
    expect(el.querySelectorAll('[tabindex="0"]')).toHaveLength(1);
  });

  it('selects every well with Ctrl+A or Cmd+A', async () => {
    const { fixture, well, key, selected } = await setup();
    well('D5').focus();
    await fixture.whenStable();
    await key('a', { ctrlKey: true });
    expect(selected()).toHaveLength(96);
    await key('Escape');
    await key('a', { metaKey: true });
    expect(selected()).toHaveLength(96);
  });

  it('keeps 384-well plates keyboard-navigable to the last well', async () => {
    const { fixture, well, key } = await setup((h) => h.format.set('384'));
    well('A1').focus();
    await fixture.whenStable();
    await key('End', { ctrlKey: true });
    expect(document.activeElement).toBe(well('P24'));
  });

  it('changes nothing when read-only, but still lets focus move', async () => {
    const { fixture, click, key, well, selected, el } = await setup((h) => h.readonly.set(true));
    await click('A1');
    el.querySelector<HTMLElement>('[role="rowheader"]')!.click();
    well('A1').focus();
    await fixture.whenStable();
    await key(' ');
    await key('a', { ctrlKey: true });
    expect(selected()).toEqual([]);
    await key('ArrowRight');
    expect(document.activeElement).toBe(well('A2'));
    expect(well('A2').hasAttribute('aria-selected')).toBe(false);
    expect(el.querySelector('[role="grid"]')!.getAttribute('aria-readonly')).toBe('true');
  });

  it('names positions by format', () => {
    expect(plateGeometry('96').positionAt(7, 11)).toBe('H12');
    expect(plateGeometry('384').positionAt(15, 23)).toBe('P24');
    expect(plateGeometry('cuvette', 14).positionAt(1, 1)).toBe('C14');
    expect(plateGeometry('cuvette', 14).positionAt(1, 2)).toBeNull();
  });
});
