import { DatePipe } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  computed,
  effect,
  inject,
  signal,
  viewChild,
} from '@angular/core';
import { takeUntilDestroyed } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { forkJoin } from 'rxjs';
import { AuthService } from '../core/auth/auth.service';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import type { LayoutSummary } from '../layouts/layout';
import { LayoutsService } from '../layouts/layouts.service';
import type { ManifestSummary } from './manifest';
import { ManifestsService } from './manifests.service';

/** Every manifest, the layout it fills, its sample count and current version. */
@Component({
  selector: 'eq-manifests-page',
  imports: [MatTableModule, MatSortModule, MatButtonModule, MatIconModule, RouterLink, DatePipe],
  templateUrl: './manifests-page.html',
  styleUrl: './manifests-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ManifestsPage {
  protected readonly canEdit = inject(AuthService).hasRole('admin', 'lab_manager');
  protected readonly columns = ['name', 'layout', 'sampleCount', 'currentVersion', 'updatedAt'];
  protected readonly dataSource = new MatTableDataSource<ManifestSummary>([]);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  private readonly layouts = signal<LayoutSummary[]>([]);
  private readonly layoutNames = computed(() => new Map(this.layouts().map((l) => [l.id, l.name])));
  private readonly sort = viewChild(MatSort);

  constructor() {
    this.dataSource.sortingDataAccessor = (m, column) =>
      column === 'layout' ? this.layoutName(m) : (m[column as keyof ManifestSummary] ?? '');
    effect(() => {
      const sort = this.sort();
      if (sort) this.dataSource.sort = sort;
    });
    forkJoin([inject(ManifestsService).list(), inject(LayoutsService).list()])
      .pipe(takeUntilDestroyed())
      .subscribe({
        next: ([manifests, layouts]) => {
          this.layouts.set(layouts);
          this.dataSource.data = manifests;
          this.loading.set(false);
        },
        error: (err: unknown) => {
          this.error.set(apiErrorMessage(err));
          this.loading.set(false);
        },
      });
  }

  protected layoutName(m: ManifestSummary): string {
    return this.layoutNames().get(m.layoutId) ?? `layout ${m.layoutId}`;
  }
}
