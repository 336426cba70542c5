import { DecimalPipe } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  ElementRef,
  computed,
  inject,
  input,
  signal,
} from '@angular/core';
import { takeUntilDestroyed, toObservable, toSignal } from '@angular/core/rxjs-interop';
import {
  FormArray,
  FormBuilder,
  type FormGroup,
  type FormControl,
  ReactiveFormsModule,
  Validators,
} from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { Router } from '@angular/router';
import {
  EMPTY,
  type Observable,
  Subject,
  catchError,
  distinctUntilChanged,
  of,
  startWith,
  switchMap,
} from 'rxjs';
import { AuthService } from '../core/auth/auth.service';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import type { Layout } from '../layouts/layout';
import { LayoutsService } from '../layouts/layouts.service';
import { PageHeader } from '../shared/page/page-header';
import { PlateGrid } from '../shared/plate-grid/plate-grid';
import {
  FORMAT_LABELS,
  type PlateCell,
  SAMPLE_ROLES,
  comparePositions,
} from '../shared/plate-grid/plate-geometry';
import { PlateLegend } from '../shared/plate-grid/plate-legend';
import { VersionHistory } from '../shared/version-history/version-history';
import {
  COLUMN_UNITS,
  MANIFEST_COLUMNS,
  type Manifest,
  type ManifestColumn,
  type ManifestProblem,
  type ManifestRow,
  type SampleDefinition,
  emptyRow,
  sampleToRow,
  templateCsv,
} from './manifest';
import { ManifestProblemList } from './manifest-problem-list';
import {
  type ManifestReview,
  NOT_CHECKED,
  changedReview,
  checkedReview,
  refusedReview,
} from './manifest-review';
import { type ManifestInput, ManifestsService } from './manifests.service';
import { TableScroll } from '../shared/table-scroll/table-scroll';
import { Notice } from '../shared/page/notice';

type RowGroup = FormGroup<Record<ManifestColumn, FormControl<string>>>;

/** The mapped view: each layout position with its role and group, labelled with the manifest's sample id. */
export function mapOntoLayout(
  positions: Layout['positions'],
  samples: readonly SampleDefinition[],
): Record<string, PlateCell> {
  const cells: Record<string, PlateCell> = {};
  for (const p of positions) cells[p.position] = { role: p.role, replicateGroup: p.replicateGroup };
  for (const s of samples) {
    const cell = cells[s.position];
    cells[s.position] = cell ? { ...cell, label: s.sampleId } : { role: s.role, label: s.sampleId };
  }
  return cells;
}

/** Create or edit a manifest: upload a file or type rows, check it against a layout, see it mapped, save. */
@Component({
  selector: 'eq-manifest-page',
  imports: [
    TableScroll,
    ReactiveFormsModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatButtonModule,
    MatButtonToggleModule,
    MatIconModule,
    DecimalPipe,
    PlateGrid,
    PlateLegend,
    ManifestProblemList,
    PageHeader,
    VersionHistory,
  ],
  templateUrl: './manifest-page.html',
  styleUrl: './manifest-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ManifestPage {
  private readonly manifests = inject(ManifestsService);
  private readonly layoutsApi = inject(LayoutsService);
  private readonly router = inject(Router);
  private readonly notice = inject(Notice);
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  private readonly fb = inject(FormBuilder).nonNullable;
  protected readonly canEdit = inject(AuthService).hasRole('admin', 'lab_manager');

  /** Route parameter; absent for a new manifest. */
  readonly id = input<string>();
  protected readonly manifestId = computed(() => {
    const id = Number(this.id());
    return Number.isInteger(id) && id > 0 ? id : null;
  });

  protected readonly columns = MANIFEST_COLUMNS;
  protected readonly units = COLUMN_UNITS;
  protected readonly roles = SAMPLE_ROLES;
  protected readonly templateHref = `data:text/csv;charset=utf-8,${encodeURIComponent(templateCsv())}`;

  protected readonly form = this.fb.group({
    name: ['', [Validators.required, Validators.maxLength(120)]],
    layoutId: [0, Validators.min(1)],
    source: ['file' as 'file' | 'form'],
    reason: ['', Validators.maxLength(500)],
  });
  protected readonly rows = new FormArray<RowGroup>([]);
  protected readonly source = toSignal(
    this.form.controls.source.valueChanges.pipe(startWith(this.form.controls.source.value)),
    { requireSync: true },
  );
  private readonly layoutIdValue = toSignal(
    this.form.controls.layoutId.valueChanges.pipe(startWith(this.form.controls.layoutId.value)),
    { requireSync: true },
  );

  protected readonly error = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly file = signal<File | null>(null);
  protected readonly rowCount = signal(0);
  /** The manifest of the route's id, or the one just saved. */
  protected readonly manifest = signal<Manifest | null>(null);
  /** An older version shown read-only, or null for the current one. */
  protected readonly viewed = signal<Manifest | null>(null);
  private readonly review = signal<ManifestReview>(NOT_CHECKED);
  /** Older versions asked for; null for the current one. A later request replaces one still running. */
  private readonly versionRequests = new Subject<{ id: number; version: number } | null>();

  protected readonly layoutList = toSignal(this.orError(this.layoutsApi.list()), { initialValue: [] });
  /** The chosen layout; choosing another replaces a request still running, so the last choice wins. */
  protected readonly layout = toSignal(
    toObservable(this.layoutIdValue).pipe(
      distinctUntilChanged(),
      switchMap((id) => (id ? this.orError(this.layoutsApi.get(id)) : of(null))),
    ),
    { initialValue: null },
  );

  protected readonly result = computed(() => this.review().result);
  protected readonly problems = computed(() => this.review().problems);
  protected readonly mismatches = computed(() => this.review().mismatches);
  protected readonly checked = computed(() => this.review().checked);
  protected readonly stale = computed(() => this.review().stale);
  protected readonly offerAccept = computed(() => this.review().offerAccept);

  protected readonly readonly = computed(() => !this.canEdit || this.viewed() !== null);
  protected readonly shownSamples = computed(
    () => this.viewed()?.samples ?? this.result()?.samples ?? this.manifest()?.samples ?? [],
  );
  protected readonly mappedCells = computed(() =>
    mapOntoLayout(this.layout()?.positions ?? [], this.shownSamples()),
  );
  protected readonly sortedSamples = computed(() =>
    [...(this.viewed()?.samples ?? [])].sort((a, b) => comparePositions(a.position, b.position)),
  );
  protected readonly layoutName = computed(
    () => this.layoutList().find((l) => l.id === this.layoutIdValue())?.name ?? '',
  );
  protected readonly formatLabel = computed(() => {
    const l = this.layout();
    return l ? (l.format === 'cuvette' ? `${l.cuvetteCount} cuvettes` : FORMAT_LABELS[l.format]) : '';
  });

  constructor() {
    // The manifest of the route's id; a later id replaces a request still running, so the last one wins.
    toObservable(this.manifestId)
      .pipe(
        switchMap((id) => (id === null ? EMPTY : this.orError(this.manifests.get(id)))),
        takeUntilDestroyed(),
      )
      .subscribe((m) => this.applyManifest(m));
    this.versionRequests
      .pipe(
        switchMap((request) =>
          request === null ? of(null) : this.orError(this.manifests.get(request.id, request.version)),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((older) => this.viewed.set(older));
    this.form.valueChanges.pipe(takeUntilDestroyed()).subscribe(() => this.markChanged());
    this.rows.valueChanges.pipe(takeUntilDestroyed()).subscribe(() => this.markChanged());
    if (!this.canEdit) this.form.disable();
  }

  /** A failed request shows its message and answers nothing, keeping what is on screen. */
  private orError<T>(request: Observable<T>): Observable<T> {
    return request.pipe(
      catchError((err: unknown) => {
        this.error.set(apiErrorMessage(err));
        return EMPTY;
      }),
    );
  }

  private applyManifest(m: Manifest): void {
    this.manifest.set(m);
    this.versionRequests.next(null);
    this.form.patchValue({ name: m.name, layoutId: m.layoutId, source: 'form', reason: '' });
    this.form.controls.name.disable();
    this.setRows(m.samples.map(sampleToRow));
    this.file.set(null);
    this.review.set(NOT_CHECKED);
  }

  private markChanged(): void {
    this.review.update(changedReview);
  }

  // ---- the typed table ----

  private newRow(values: ManifestRow = emptyRow()): RowGroup {
    const controls = Object.fromEntries(
      MANIFEST_COLUMNS.map((c) => [c, this.fb.control(values[c], Validators.maxLength(200))]),
    ) as Record<ManifestColumn, FormControl<string>>;
    return this.fb.group(controls) as unknown as RowGroup;
  }

  private setRows(rows: ManifestRow[]): void {
    this.rows.clear({ emitEvent: false });
    for (const row of rows) this.rows.push(this.newRow(row), { emitEvent: false });
    this.rows.updateValueAndValidity();
    this.rowCount.set(this.rows.length);
  }

  protected addRow(): void {
    this.rows.push(this.newRow());
    this.rowCount.set(this.rows.length);
    const last = this.rows.length - 1;
    queueMicrotask(() => this.focusCell(last, 'position'));
  }

  protected removeRow(index: number): void {
    this.rows.removeAt(index);
    this.rowCount.set(this.rows.length);
  }

  /** One row per used position of the layout, with its role and group, ready for sample ids and amounts. */
  protected fillFromLayout(): void {
    const layout = this.layout();
    if (!layout) return;
    this.setRows(
      layout.positions.map((p) => ({
        ...emptyRow(),
        position: p.position,
        role: p.role,
        replicate_group: p.replicateGroup ?? '',
      })),
    );
  }

  protected focusProblem(problem: ManifestProblem): void {
    if (this.result()?.source !== 'form' && this.source() !== 'form') return;
    const index = problem.row - 2;
    if (index < 0 || index >= this.rows.length) return;
    const column = (MANIFEST_COLUMNS as readonly string[]).includes(problem.column)
      ? (problem.column as ManifestColumn)
      : 'position';
    this.focusCell(index, column);
  }

  private focusCell(index: number, column: ManifestColumn): void {
    const cell = this.host.nativeElement.querySelector<HTMLElement>(`#mf-${index}-${column}`);
    cell?.scrollIntoView?.({ block: 'center' });
    cell?.focus();
  }

  protected cellLabel(index: number, column: ManifestColumn): string {
    const unit = COLUMN_UNITS[column];
    return `Row ${index + 2}, ${column}${unit ? ` (${unit})` : ''}`;
  }

  // ---- file ----

  protected pickFile(event: Event): void {
    const target = event.target as HTMLInputElement;
    const file = target.files?.[0] ?? null;
    this.file.set(file);
    target.value = '';
    this.markChanged();
  }

  // ---- check and save ----

  private manifestInput(): ManifestInput | null {
    const layoutId = this.form.controls.layoutId.value;
    if (!layoutId) {
      this.error.set('Choose the layout this manifest fills.');
      return null;
    }
    if (this.source() === 'file') {
      const file = this.file();
      if (!file) {
        this.error.set('Choose a CSV or XLSX file first.');
        return null;
      }
      return { layoutId, file };
    }
    // Every row goes, blank ones included, so that the problems' row numbers match the table.
    const rows = this.rows.getRawValue();
    if (!rows.some((r) => Object.values(r).some((v) => v.trim() !== ''))) {
      this.error.set('Type at least one row.');
      return null;
    }
    return { layoutId, rows };
  }

  protected check(): void {
    const input = this.manifestInput();
    if (!input || this.busy()) return;
    this.busy.set(true);
    this.error.set(null);
    this.manifests.check(input).subscribe({
      next: (result) => {
        this.busy.set(false);
        this.review.set(checkedReview(result));
      },
      error: (err: unknown) => {
        this.busy.set(false);
        this.showRefusal(err);
      },
    });
  }

  protected save(acceptMismatches = false): void {
    if (this.readonly() || this.busy()) return;
    const existing = this.manifest();
    if (!existing && this.form.controls.name.invalid) {
      this.form.controls.name.markAsTouched();
      this.error.set('Give the manifest a name.');
      return;
    }
    const input = this.manifestInput();
    if (!input) return;
    this.busy.set(true);
    this.error.set(null);
    const v = this.form.getRawValue();
    const request = existing
      ? this.manifests.update(existing.id, input, acceptMismatches, v.reason)
      : this.manifests.create(v.name.trim(), input, acceptMismatches);
    request.subscribe({
      next: (saved) => {
        this.busy.set(false);
        this.applyManifest(saved);
        void this.notice.show(`${saved.name} saved as version ${saved.version}`, {
          action: 'OK',
          durationMs: 4000,
        });
        if (!existing) void this.router.navigate(['/manifests', saved.id], { replaceUrl: true });
      },
      error: (err: unknown) => {
        this.busy.set(false);
        this.showRefusal(err);
      },
    });
  }

  private showRefusal(err: unknown): void {
    this.error.set(apiErrorMessage(err));
    this.review.update((review) => refusedReview(review, err));
  }

  // ---- versions ----

  protected viewVersion(version: number): void {
    const m = this.manifest();
    if (!m) return;
    this.versionRequests.next(version === m.currentVersion ? null : { id: m.id, version });
  }
}
