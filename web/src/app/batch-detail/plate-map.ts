import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  ElementRef,
  computed,
  inject,
  input,
  output,
  signal,
} from '@angular/core';
import type { PositionResult, QcFlag, SampleRole } from '@equilight/analysis';
import type { PlateFormat } from '../batches/batch';
import { VIRIDIS_NAME, legendGradient } from '../shared/chart/colour-scale';
import { formatAbsorbance, formatNumber } from '../shared/format/number-format';
import { PlateLegend } from '../shared/plate-grid/plate-legend';
import { RoleBadge } from '../shared/role-code/role-badge';
import { type CellMarker, MARKERS, type PlateCell, buildPlateModel, statusWord } from './plate-map-model';
import { TableScroll } from '../shared/table-scroll/table-scroll';

let nextId = 0;

interface Hover {
  cell: PlateCell;
  left: number;
  top: number;
}

interface CellHit {
  cell: PlateCell;
  el: HTMLElement;
}

/**
 * A plate (96 or 384 wells) or a cuvette sequence, coloured by blank-corrected absorbance on the
 * viridis scale. Role letters and symbols carry the meaning colour alone must not. An ARIA grid
 * with a roving tab stop: arrow keys move, Home/End jump along a row, Enter or Space selects.
 */
@Component({
  selector: 'eq-plate-map',
  imports: [TableScroll, RoleBadge, PlateLegend],
  templateUrl: './plate-map.html',
  styleUrl: './plate-map.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PlateMap {
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);

  readonly format = input.required<PlateFormat>();
  readonly positions = input.required<readonly PositionResult[]>();
  readonly layoutPositions = input<readonly { position: string; role: string; replicateGroup?: string }[]>(
    [],
  );
  readonly qc = input<readonly QcFlag[]>([]);
  readonly wavelengthNm = input<number | null>(null);
  readonly pathLengthCm = input<number | null>(null);
  /** Per-well path lengths from the water peak (cm, by position), when the plate was read near 977/900 nm. */
  readonly waterPeakPathsCm = input<Readonly<Record<string, number>> | null>(null);
  /** The position chosen for a what-if exclusion. */
  readonly selected = input<string | null>(null);
  /** Accessible name of the grid. */
  readonly label = input('Plate map');

  readonly positionSelect = output<string>();

  protected readonly tooltipId = `eq-plate-tooltip-${nextId++}`;
  protected readonly model = computed(() =>
    buildPlateModel(this.format(), this.positions(), this.layoutPositions(), this.qc()),
  );
  protected readonly flatCells = computed(() => this.model().rows.flat());
  private readonly cellsByPosition = computed(() => new Map(this.flatCells().map((c) => [c.position, c])));
  private readonly active = signal<string | null>(null);
  /** The cell holding the tab stop: the one last focused, else the selected one, else the first used. */
  protected readonly activePosition = computed(() => {
    const wanted = this.active() ?? this.selected();
    if (wanted && this.cellsByPosition().has(wanted)) return wanted;
    const cells = this.flatCells();
    return (cells.find((c) => !c.empty) ?? cells[0])?.position ?? null;
  });
  protected readonly hover = signal<Hover | null>(null);

  protected readonly gradient = legendGradient();
  protected readonly scaleName = VIRIDIS_NAME;
  protected readonly markerLegend = (Object.keys(MARKERS) as CellMarker[]).map((m) => ({
    key: m,
    ...MARKERS[m],
  }));
  protected readonly markers = MARKERS;
  protected readonly usedRoles = computed(
    () => new Set(this.flatCells().flatMap((c) => (c.role ? [c.role] : []))) as ReadonlySet<SampleRole>,
  );
  protected readonly usedMarkers = computed(() => new Set(this.flatCells().map((c) => c.marker)));
  protected readonly rangeText = computed(() => {
    const r = this.model().range;
    return r ? { min: formatAbsorbance(r.min), max: formatAbsorbance(r.max) } : null;
  });
  protected readonly unitText = computed(() => {
    const parts = ['absorbance units (AU)'];
    if (this.wavelengthNm() !== null) parts.push(`${this.wavelengthNm()} nm`);
    if (this.waterPeakPathsCm()) parts.push('path length per well from the water peak');
    else if (this.pathLengthCm() !== null) parts.push(`${this.pathLengthCm()} cm path`);
    return parts.join(', ');
  });

  protected readonly abs = formatAbsorbance;
  protected readonly statusWord = statusWord;
  /** "0.52 cm (water peak)" for a well whose path length came from the water peak, else null. */
  protected pathText(position: string): string | null {
    const l = this.waterPeakPathsCm()?.[position.toUpperCase()];
    return l === undefined ? null : `${formatNumber(l, 2)} cm (water peak)`;
  }

  constructor() {
    // One listener of each kind on the map, not five on every cell (96 to 384 of them, made in the frame
    // that shows the map): the cell is found from the event's target. Outside the template, so a pointer
    // moving over the map checks the view only when the tooltip changes.
    const host = this.host.nativeElement;
    const destroyRef = inject(DestroyRef);
    const on = <K extends 'click' | 'focusin' | 'focusout' | 'mouseover' | 'mouseout'>(
      type: K,
      handle: (hit: CellHit, event: HTMLElementEventMap[K]) => void,
    ) => {
      const listener = (event: HTMLElementEventMap[K]) => {
        const hit = this.cellAt(event.target);
        if (hit) handle(hit, event);
      };
      host.addEventListener(type, listener);
      destroyRef.onDestroy(() => host.removeEventListener(type, listener));
    };
    // mouseover/mouseout also fire between a cell's own children: only entering or leaving the cell counts.
    const within = (hit: CellHit, other: EventTarget | null) =>
      other instanceof Node && hit.el.contains(other);
    on('click', ({ cell }) => this.choose(cell));
    on('focusin', ({ cell, el }) => {
      this.active.set(cell.position);
      this.show(cell, el);
    });
    on('focusout', ({ cell }) => this.hide(cell));
    on('mouseover', (hit, e) => within(hit, e.relatedTarget) || this.show(hit.cell, hit.el));
    on('mouseout', (hit, e) => within(hit, e.relatedTarget) || this.hide(hit.cell));
  }

  /** The cell an event happened in (or in one of its children), with its element. */
  private cellAt(target: EventTarget | null): CellHit | null {
    const el = target instanceof Element ? target.closest<HTMLElement>('[data-position]') : null;
    const cell =
      el && this.host.nativeElement.contains(el) ? this.cellsByPosition().get(el.dataset['position']!) : null;
    return el && cell ? { cell, el } : null;
  }

  private show(cell: PlateCell, el: HTMLElement): void {
    this.hover.set({ cell, left: el.offsetLeft + el.offsetWidth / 2, top: el.offsetTop + el.offsetHeight });
  }

  private hide(cell: PlateCell): void {
    if (this.hover()?.cell.position === cell.position) this.hover.set(null);
  }

  protected choose(cell: PlateCell): void {
    this.active.set(cell.position);
    if (!cell.empty) this.positionSelect.emit(cell.position);
  }

  protected onKeydown(event: KeyboardEvent): void {
    const rows = this.model().rows;
    const position = this.activePosition();
    const current = position === null ? undefined : this.cellsByPosition().get(position);
    if (!current) return;
    let { row, col } = current;
    switch (event.key) {
      case 'ArrowRight':
        col += 1;
        break;
      case 'ArrowLeft':
        col -= 1;
        break;
      case 'ArrowDown':
        row += 1;
        break;
      case 'ArrowUp':
        row -= 1;
        break;
      case 'Home':
        col = 0;
        if (event.ctrlKey) row = 0;
        break;
      case 'End':
        col = Number.MAX_SAFE_INTEGER;
        if (event.ctrlKey) row = rows.length - 1;
        break;
      case 'Enter':
      case ' ':
        event.preventDefault();
        this.choose(current);
        return;
      case 'Escape':
        this.hover.set(null);
        return;
      default:
        return;
    }
    event.preventDefault();
    row = Math.max(0, Math.min(rows.length - 1, row));
    col = Math.max(0, Math.min(rows[row].length - 1, col));
    const next = rows[row][col];
    this.active.set(next.position);
    this.host.nativeElement.querySelector<HTMLElement>(`[data-position="${next.position}"]`)?.focus();
  }
}
