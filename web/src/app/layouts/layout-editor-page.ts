import { ChangeDetectionStrategy, Component, computed, inject, input, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable, toSignal } from '@angular/core/rxjs-interop';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { Router } from '@angular/router';
import { EMPTY, Subject, catchError, finalize, of, startWith, switchMap } from 'rxjs';
import { AuthService } from '../core/auth/auth.service';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { PlateGrid } from '../shared/plate-grid/plate-grid';
import {
  FORMAT_LABELS,
  type PlateCell,
  type PlateFormat,
  ROLE_CODE,
  SAMPLE_ROLES,
  type SampleRole,
  allPositions,
  comparePositions,
  plateGeometry,
} from '../shared/plate-grid/plate-geometry';
import { PageHeader } from '../shared/page/page-header';
import { PlateLegend } from '../shared/plate-grid/plate-legend';
import { RoleBadge } from '../shared/role-code/role-badge';
import { VersionHistory } from '../shared/version-history/version-history';
import type { Layout, LayoutPosition } from './layout';
import { LayoutsService } from './layouts.service';
import { Notice } from '../shared/page/notice';

export function positionsToCells(positions: readonly LayoutPosition[]): Record<string, PlateCell> {
  const cells: Record<string, PlateCell> = {};
  for (const p of positions) cells[p.position] = { role: p.role, replicateGroup: p.replicateGroup };
  return cells;
}

export function cellsToPositions(cells: Readonly<Record<string, PlateCell>>): LayoutPosition[] {
  return Object.entries(cells)
    .filter(([, cell]) => cell.role)
    .sort(([a], [b]) => comparePositions(a, b))
    .map(([position, cell]) => ({
      position,
      role: cell.role!,
      ...(cell.replicateGroup ? { replicateGroup: cell.replicateGroup } : {}),
    }));
}

/** Create a layout or save a new version of one: pick positions on the plate and give them a role and group. */
@Component({
  selector: 'eq-layout-editor-page',
  imports: [
    RoleBadge,
    ReactiveFormsModule,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    MatButtonToggleModule,
    MatIconModule,
    PlateGrid,
    PlateLegend,
    PageHeader,
    VersionHistory,
  ],
  templateUrl: './layout-editor-page.html',
  styleUrl: './layout-editor-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LayoutEditorPage {
  private readonly layouts = inject(LayoutsService);
  private readonly router = inject(Router);
  private readonly notice = inject(Notice);
  protected readonly canEdit = inject(AuthService).hasRole('admin', 'lab_manager');

  /** Route parameter; absent for a new layout. */
  readonly id = input<string>();
  protected readonly layoutId = computed(() => {
    const id = Number(this.id());
    return Number.isInteger(id) && id > 0 ? id : null;
  });

  protected readonly roles = SAMPLE_ROLES.map((role) => ({ role, ...ROLE_CODE[role] }));
  protected readonly formats = Object.entries(FORMAT_LABELS) as [PlateFormat, string][];

  protected readonly form = inject(FormBuilder).nonNullable.group({
    name: ['', [Validators.required, Validators.maxLength(120)]],
    format: ['96' as PlateFormat],
    cuvetteCount: [12, [Validators.required, Validators.min(1), Validators.max(999)]],
    replicateGroup: ['', Validators.maxLength(60)],
    reason: ['', Validators.maxLength(500)],
  });
  protected readonly format = toSignal(
    this.form.controls.format.valueChanges.pipe(startWith(this.form.controls.format.value)),
    { requireSync: true },
  );
  private readonly cuvetteInput = toSignal(
    this.form.controls.cuvetteCount.valueChanges.pipe(startWith(this.form.controls.cuvetteCount.value)),
    { requireSync: true },
  );
  protected readonly cuvetteCount = computed(() => {
    const n = Math.floor(Number(this.cuvetteInput()));
    return n >= 1 && n <= 999 ? n : 1;
  });

  protected readonly layout = signal<Layout | null>(null);
  /** An older version shown read-only, or null for the working copy. */
  protected readonly viewed = signal<Layout | null>(null);
  protected readonly cells = signal<Record<string, PlateCell>>({});
  protected readonly selection = signal<ReadonlySet<string>>(new Set<string>());
  protected readonly dirty = signal(false);
  protected readonly loading = signal(false);
  protected readonly saving = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly status = signal('');
  private applying = false;

  protected readonly readonly = computed(() => !this.canEdit || this.viewed() !== null);
  protected readonly shownCells = computed(() => {
    const viewed = this.viewed();
    return viewed ? positionsToCells(viewed.positions) : this.cells();
  });
  protected readonly shownFormat = computed(() => this.viewed()?.format ?? this.format());
  protected readonly shownCuvetteCount = computed(() => this.viewed()?.cuvetteCount ?? this.cuvetteCount());
  protected readonly counts = computed(() => {
    const counts: Partial<Record<SampleRole, number>> = {};
    for (const cell of Object.values(this.shownCells()))
      if (cell.role) counts[cell.role] = (counts[cell.role] ?? 0) + 1;
    return counts;
  });
  protected readonly usedCount = computed(
    () => Object.values(this.shownCells()).filter((cell) => cell.role).length,
  );
  /** Older versions asked for; null for the working copy. A later request replaces one still running. */
  private readonly versionRequests = new Subject<{ id: number; version: number } | null>();

  constructor() {
    // The layout of the route's id; a later id replaces a request still running, so the last one wins.
    toObservable(this.layoutId)
      .pipe(
        switchMap((id) => (id === null ? EMPTY : this.fetch(id))),
        takeUntilDestroyed(),
      )
      .subscribe((layout) => this.applyLayout(layout));
    this.versionRequests
      .pipe(
        switchMap((request) =>
          request === null
            ? of(null)
            : this.layouts.get(request.id, request.version).pipe(
                catchError((err: unknown) => {
                  this.error.set(apiErrorMessage(err));
                  return EMPTY;
                }),
              ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((older) => this.viewed.set(older));
    // A smaller plate or a shorter sequence drops the positions it no longer has.
    this.form.valueChanges.pipe(takeUntilDestroyed()).subscribe(() => this.dropPositionsOffThePlate());
    if (!this.canEdit) this.form.disable();
  }

  private fetch(id: number) {
    this.loading.set(true);
    return this.layouts.get(id).pipe(
      catchError((err: unknown) => {
        this.error.set(apiErrorMessage(err));
        return EMPTY;
      }),
      finalize(() => this.loading.set(false)),
    );
  }

  private applyLayout(layout: Layout): void {
    this.applying = true;
    this.layout.set(layout);
    this.versionRequests.next(null);
    this.cells.set(positionsToCells(layout.positions));
    this.form.patchValue({
      name: layout.name,
      format: layout.format,
      cuvetteCount: layout.cuvetteCount ?? 12,
      reason: '',
    });
    this.form.controls.format.disable();
    this.selection.set(new Set());
    this.dirty.set(false);
    this.applying = false;
  }

  private dropPositionsOffThePlate(): void {
    if (this.applying) return;
    const onPlate = new Set(allPositions(plateGeometry(this.format(), this.cuvetteCount())));
    const cells = this.cells();
    const kept = Object.fromEntries(Object.entries(cells).filter(([p]) => onPlate.has(p)));
    const dropped = Object.keys(cells).length - Object.keys(kept).length;
    if (dropped > 0) {
      this.cells.set(kept);
      this.dirty.set(true);
      this.status.set(`${dropped} position(s) are not on this format and were removed.`);
    }
    const selection = [...this.selection()].filter((p) => onPlate.has(p));
    if (selection.length !== this.selection().size) this.selection.set(new Set(selection));
  }

  protected select(selection: Set<string>): void {
    this.selection.set(selection);
  }

  /** Gives the selected positions a role and the replicate group typed above, or clears them (role null). */
  protected assign(role: SampleRole | null): void {
    const selected = [...this.selection()];
    if (!selected.length || this.readonly()) return;
    const group = this.form.controls.replicateGroup.value.trim();
    const cells = { ...this.cells() };
    for (const position of selected) {
      if (role === null) delete cells[position];
      else cells[position] = { role, ...(group ? { replicateGroup: group } : {}) };
    }
    this.cells.set(cells);
    this.selection.set(new Set());
    this.dirty.set(true);
    this.status.set(
      role === null
        ? `Cleared ${selected.length} position(s).`
        : `Marked ${selected.length} position(s) as ${ROLE_CODE[role].label.toLowerCase()}${group ? `, group ${group}` : ''}.`,
    );
  }

  protected clearSelection(): void {
    this.selection.set(new Set());
  }

  protected viewVersion(version: number): void {
    const layout = this.layout();
    if (!layout) return;
    this.versionRequests.next(version === layout.currentVersion ? null : { id: layout.id, version });
  }

  /** Takes the older version's positions into the working copy, to be saved as a new version. */
  protected startFromViewed(): void {
    const viewed = this.viewed();
    if (!viewed) return;
    this.cells.set(positionsToCells(viewed.positions));
    this.versionRequests.next(null);
    this.dirty.set(true);
    this.status.set(`Started from version ${viewed.version}; save to make it the current version.`);
  }

  protected save(): void {
    if (this.readonly() || this.saving()) return;
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    const v = this.form.getRawValue();
    const positions = cellsToPositions(this.cells());
    const existing = this.layout();
    this.saving.set(true);
    this.error.set(null);
    const request = existing
      ? this.layouts.update(existing.id, {
          name: v.name.trim(),
          ...(existing.format === 'cuvette' ? { cuvetteCount: this.cuvetteCount() } : {}),
          positions,
          ...(v.reason.trim() ? { reason: v.reason.trim() } : {}),
        })
      : this.layouts.create({
          name: v.name.trim(),
          format: v.format,
          ...(v.format === 'cuvette' ? { cuvetteCount: this.cuvetteCount() } : {}),
          positions,
        });
    request.subscribe({
      next: (saved) => {
        this.saving.set(false);
        this.applyLayout(saved);
        void this.notice.show(`${saved.name} saved as version ${saved.version}`, {
          action: 'OK',
          durationMs: 4000,
        });
        if (!existing) void this.router.navigate(['/layouts', saved.id], { replaceUrl: true });
      },
      error: (err: unknown) => {
        this.saving.set(false);
        this.error.set(apiErrorMessage(err));
      },
    });
  }
}
