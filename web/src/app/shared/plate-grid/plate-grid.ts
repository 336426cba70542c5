import {
  ChangeDetectionStrategy,
  Component,
  ElementRef,
  computed,
  inject,
  linkedSignal,
  input,
  output,
  signal,
} from '@angular/core';
import { RoleFill } from '../role-code/role-fill';
import {
  type GridPoint,
  type PlateCell,
  type PlateFormat,
  type SampleRole,
  ROLE_CODE,
  allPositions,
  plateGeometry,
  positionsInRect,
} from './plate-geometry';
import { TableScroll } from '../table-scroll/table-scroll';

interface CellView {
  c: number;
  position: string;
  role: SampleRole | null;
  letter: string;
  group: string;
  label: string;
  description: string;
}

interface RowView {
  r: number;
  label: string;
  cells: CellView[];
}

/** "B7, standard, group S1, sample STD-3" — what a screen reader and the tooltip say about a position. */
export function describePosition(position: string, cell: PlateCell | undefined): string {
  const parts = [position, cell?.role ? ROLE_CODE[cell.role].label.toLowerCase() : 'empty'];
  if (cell?.replicateGroup) parts.push(`group ${cell.replicateGroup}`);
  if (cell?.label) parts.push(`sample ${cell.label}`);
  return parts.join(', ');
}

/**
 * A plate (8×12, 16×24) or a cuvette sequence as an ARIA grid. Positions are selected by click
 * (toggles), shift-click (rectangle from the last clicked position), dragging a rectangle, a row
 * or column header, or the keyboard. The grid only reports the new selection; its owner keeps it.
 */
@Component({
  selector: 'eq-plate-grid',
  imports: [RoleFill, TableScroll],
  templateUrl: './plate-grid.html',
  styleUrl: './plate-grid.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { '(document:mouseup)': 'endDrag()' },
})
export class PlateGrid {
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);

  readonly format = input.required<PlateFormat>();
  readonly cuvetteCount = input(12);
  /** What each used position holds, by position name. */
  readonly cells = input<Readonly<Record<string, PlateCell>>>({});
  readonly selected = input<ReadonlySet<string>>(new Set<string>());
  readonly readonly = input(false);
  /** Accessible name of the grid. */
  readonly label = input('Plate map');
  /** Show each position's label (e.g. sample id) in the well where there is room. */
  readonly showLabels = input(false);

  readonly selectedChange = output<Set<string>>();

  protected readonly geometry = computed(() => plateGeometry(this.format(), this.cuvetteCount()));
  protected readonly compact = computed(() => this.geometry().cols > 12);
  protected readonly hasColumnHeaders = computed(() => this.format() !== 'cuvette');
  protected readonly rowsView = computed<RowView[]>(() => {
    const g = this.geometry();
    const cells = this.cells();
    return g.rowLabels.map((label, r) => ({
      r,
      label,
      cells: g.colLabels.flatMap((_, c) => {
        const position = g.positionAt(r, c);
        if (!position) return [];
        const cell = cells[position];
        return [
          {
            c,
            position,
            role: cell?.role ?? null,
            letter: cell?.role ? ROLE_CODE[cell.role].letter : '',
            group: cell?.replicateGroup ?? '',
            label: cell?.label ?? '',
            description: describePosition(position, cell),
          },
        ];
      }),
    }));
  });

  /** The roving focus: row -1 is the column headers, column -1 the row headers. */
  protected readonly focusPoint = signal<GridPoint>({ r: 0, c: 0 });
  private readonly dragPreview = signal<Set<string> | null>(null);
  /** What the grid shows as selected: the owner's selection, or the rectangle being dragged. */
  /**
   * The selection the next key or click builds on: what this grid last emitted, until the owner passes a
   * new selection in. Quick key presses can arrive before the owner has re-rendered with the last one.
   */
  private readonly working = linkedSignal<ReadonlySet<string>>(() => this.selected());
  protected readonly shown = computed(() => this.dragPreview() ?? this.selected());

  private drag: { start: GridPoint; base: Set<string>; moved: boolean } | null = null;
  private anchor: GridPoint | null = null;
  private extendBase: Set<string> | null = null;

  protected tabIndex(r: number, c: number): number {
    const f = this.focusPoint();
    return f.r === r && f.c === c ? 0 : -1;
  }

  protected onFocus(r: number, c: number): void {
    const f = this.focusPoint();
    if (f.r !== r || f.c !== c) this.focusPoint.set({ r, c });
  }

  // ---- mouse ----

  protected startDrag(event: MouseEvent, r: number, c: number): void {
    if (event.button !== 0) return;
    event.preventDefault();
    this.moveFocus({ r, c });
    if (this.readonly()) return;
    if (event.shiftKey && this.anchor) {
      this.emit(this.union(this.working(), positionsInRect(this.geometry(), this.anchor, { r, c })));
      return;
    }
    this.anchor = { r, c };
    this.extendBase = null;
    this.drag = { start: { r, c }, base: new Set(this.working()), moved: false };
  }

  protected dragOver(r: number, c: number): void {
    const drag = this.drag;
    if (!drag) return;
    if (r !== drag.start.r || c !== drag.start.c) drag.moved = true;
    this.dragPreview.set(this.union(drag.base, positionsInRect(this.geometry(), drag.start, { r, c })));
  }

  endDrag(): void {
    const drag = this.drag;
    if (!drag) return;
    this.drag = null;
    const preview = this.dragPreview();
    this.dragPreview.set(null);
    if (drag.moved && preview) {
      this.emit(preview);
    } else {
      const position = this.geometry().positionAt(drag.start.r, drag.start.c);
      if (position) this.toggle([position]);
    }
  }

  protected headerClick(r: number, c: number): void {
    this.moveFocus({ r, c });
    this.activateHeader(r, c);
  }

  // ---- keyboard ----

  protected onKeydown(event: KeyboardEvent): void {
    const f = this.focusPoint();
    const g = this.geometry();
    const ctrl = event.ctrlKey || event.metaKey;
    const moves: Record<string, GridPoint> = {
      ArrowUp: { r: f.r - 1, c: f.c },
      ArrowDown: { r: f.r + 1, c: f.c },
      ArrowLeft: { r: f.r, c: f.c - 1 },
      ArrowRight: { r: f.r, c: f.c + 1 },
      Home: ctrl ? { r: 0, c: 0 } : { r: f.r, c: 0 },
      End: ctrl ? { r: g.rows - 1, c: g.cols - 1 } : { r: f.r, c: g.cols - 1 },
    };
    const target = moves[event.key];
    if (target) {
      event.preventDefault();
      const next = this.clamp(target);
      const isCell = next.r >= 0 && next.c >= 0 && f.r >= 0 && f.c >= 0;
      if (event.shiftKey && isCell && !this.readonly()) {
        this.extendBase ??= new Set(this.working());
        this.anchor ??= f;
        this.emit(this.union(this.extendBase, positionsInRect(g, this.anchor, next)));
      } else {
        this.extendBase = null;
        this.anchor = next.r >= 0 && next.c >= 0 ? next : null;
      }
      this.moveFocus(next);
      return;
    }
    if (this.readonly()) return;
    if (event.key === ' ' || event.key === 'Enter') {
      event.preventDefault();
      this.extendBase = null;
      if (f.r < 0 || f.c < 0) {
        this.activateHeader(f.r, f.c);
      } else {
        this.anchor = f;
        const position = g.positionAt(f.r, f.c);
        if (position) this.toggle([position]);
      }
    } else if (ctrl && event.key.toLowerCase() === 'a') {
      event.preventDefault();
      this.emit(new Set(allPositions(g)));
    } else if (event.key === 'Escape') {
      this.extendBase = null;
      this.emit(new Set());
    }
  }

  // ---- helpers ----

  private activateHeader(r: number, c: number): void {
    if (this.readonly()) return;
    const g = this.geometry();
    let positions: string[];
    if (r < 0 && c < 0) positions = allPositions(g);
    else if (r < 0) positions = positionsInRect(g, { r: 0, c }, { r: g.rows - 1, c });
    else positions = positionsInRect(g, { r, c: 0 }, { r, c: g.cols - 1 });
    this.toggle(positions);
  }

  /** Adds the positions, or removes them when every one of them is already selected. */
  private toggle(positions: string[]): void {
    const current = this.working();
    const next = new Set(current);
    const allIn = positions.every((p) => current.has(p));
    for (const p of positions) {
      if (allIn) next.delete(p);
      else next.add(p);
    }
    this.emit(next);
  }

  private union(base: ReadonlySet<string>, positions: string[]): Set<string> {
    const next = new Set(base);
    for (const p of positions) next.add(p);
    return next;
  }

  private emit(selection: Set<string>): void {
    this.working.set(selection);
    this.selectedChange.emit(selection);
  }

  private clamp(p: GridPoint): GridPoint {
    const g = this.geometry();
    const minRow = this.hasColumnHeaders() ? -1 : 0;
    const r = Math.max(minRow, Math.min(g.rows - 1, p.r));
    let c = Math.max(-1, Math.min(g.cols - 1, p.c));
    // The last row of a cuvette sequence may be short.
    while (r >= 0 && c >= 0 && g.positionAt(r, c) === null) c--;
    return { r, c };
  }

  private moveFocus(p: GridPoint): void {
    this.focusPoint.set(p);
    this.host.nativeElement.querySelector<HTMLElement>(`[data-r="${p.r}"][data-c="${p.c}"]`)?.focus();
  }
}
