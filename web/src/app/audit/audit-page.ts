import { JsonPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatDatepickerModule } from '@angular/material/datepicker';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { MatSelectModule } from '@angular/material/select';
import { MatTableModule } from '@angular/material/table';
import { ActivatedRoute } from '@angular/router';
import { catchError, debounceTime, of, switchMap, tap } from 'rxjs';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import {
  AUDIT_ACTIONS,
  AUDIT_ENTITY_LABELS,
  type AuditEntity,
  type AuditEntry,
  type AuditQuery,
} from './audit-entry';
import { AuditService } from './audit.service';
import { DateTimePipe, formatDateTime } from '../shared/format/date-format';
import { provideDateInput } from '../shared/format/date-input';
import { TableScroll } from '../shared/table-scroll/table-scroll';

export const AUDIT_FILTER_DEBOUNCE_MS = 300;
export const AUDIT_PAGE_SIZE = 50;

/** Start of the local calendar day of `day` (the datepicker's value) as ISO 8601, or undefined when empty. */
export function startOfDayIso(day: Date | null): string | undefined {
  return day ? new Date(day.getFullYear(), day.getMonth(), day.getDate()).toISOString() : undefined;
}

/** Last millisecond of the local calendar day of `day` as ISO 8601, so "to" includes that whole day. */
export function endOfDayIso(day: Date | null): string | undefined {
  return day
    ? new Date(day.getFullYear(), day.getMonth(), day.getDate(), 23, 59, 59, 999).toISOString()
    : undefined;
}

/** Lab managers and admins: who changed what, when and why. Read-only: entries are never edited or deleted. */
@Component({
  selector: 'eq-audit-page',
  providers: [provideDateInput()],
  imports: [
    DateTimePipe,
    TableScroll,
    JsonPipe,
    ReactiveFormsModule,
    MatTableModule,
    MatPaginatorModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatButtonModule,
    MatDatepickerModule,
    MatIconModule,
  ],
  templateUrl: './audit-page.html',
  styleUrl: './audit-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AuditPage {
  private readonly audit = inject(AuditService);
  private readonly fb = inject(FormBuilder).nonNullable;

  protected readonly entityLabels = AUDIT_ENTITY_LABELS;
  protected readonly entities = Object.keys(AUDIT_ENTITY_LABELS) as AuditEntity[];
  protected readonly actions = AUDIT_ACTIONS;
  protected readonly columns = ['expand', 'at', 'actor', 'action', 'entity', 'summary', 'reason'];
  /** A date as the field shows it, for its error message. */
  protected readonly exampleDay = formatDateTime(new Date(2026, 2, 14), 'date');

  protected readonly filters = this.fb.group({
    entity: this.fb.control<AuditEntity | ''>(''),
    entityId: this.fb.control<number | null>(null, [Validators.min(1), Validators.pattern(/^\d+$/)]),
    action: this.fb.control(''),
    q: this.fb.control('', Validators.maxLength(200)),
    from: this.fb.control<Date | null>(null),
    to: this.fb.control<Date | null>(null),
  });

  private readonly query = signal<AuditQuery>({ page: 0, pageSize: AUDIT_PAGE_SIZE });
  protected readonly entries = signal<AuditEntry[]>([]);
  protected readonly total = signal(0);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  protected readonly expandedId = signal<number | null>(null);
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(AUDIT_PAGE_SIZE);

  constructor() {
    // A link such as /audit?entity=batch&entityId=3 opens with those filters.
    const params = inject(ActivatedRoute).snapshot.queryParamMap;
    const entity = params.get('entity');
    const entityId = Number(params.get('entityId'));
    if (entity && entity in AUDIT_ENTITY_LABELS) this.filters.controls.entity.setValue(entity as AuditEntity);
    if (Number.isInteger(entityId) && entityId > 0) this.filters.controls.entityId.setValue(entityId);
    this.query.set(this.queryFor(0, AUDIT_PAGE_SIZE));

    this.filters.valueChanges
      .pipe(debounceTime(AUDIT_FILTER_DEBOUNCE_MS), takeUntilDestroyed())
      .subscribe(() => {
        if (this.filters.invalid) return;
        this.pageIndex.set(0);
        this.query.set(this.queryFor(0, this.pageSize()));
      });

    toObservable(this.query)
      .pipe(
        tap(() => this.loading.set(true)),
        switchMap((query) =>
          this.audit.list(query).pipe(
            catchError((err: unknown) => {
              this.error.set(apiErrorMessage(err));
              return of(null);
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((page) => {
        this.loading.set(false);
        if (!page) return;
        this.error.set(null);
        this.entries.set(page.items);
        this.total.set(page.total);
      });
  }

  private queryFor(page: number, pageSize: number): AuditQuery {
    const f = this.filters.getRawValue();
    const query: AuditQuery = { page, pageSize };
    if (f.entity) query.entity = f.entity;
    if (f.entityId !== null) query.entityId = f.entityId;
    if (f.action) query.action = f.action;
    if (f.q.trim()) query.q = f.q.trim();
    const from = startOfDayIso(f.from);
    const to = endOfDayIso(f.to);
    if (from) query.from = from;
    if (to) query.to = to;
    return query;
  }

  protected onPage(event: PageEvent): void {
    this.pageIndex.set(event.pageIndex);
    this.pageSize.set(event.pageSize);
    this.query.set(this.queryFor(event.pageIndex, event.pageSize));
  }

  protected clearFilters(): void {
    this.filters.reset();
  }

  protected toggle(entry: AuditEntry): void {
    this.expandedId.update((id) => (id === entry.id ? null : entry.id));
  }

  protected hasDetail(entry: AuditEntry): boolean {
    return entry.before !== null || entry.after !== null;
  }

  protected entityLabel(entity: string): string {
    return AUDIT_ENTITY_LABELS[entity as AuditEntity] ?? entity;
  }
}
