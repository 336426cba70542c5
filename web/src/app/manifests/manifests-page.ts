import { ChangeDetectionStrategy, Component, computed, inject, signal, viewChild } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { forkJoin } from 'rxjs';
import { AuthService } from '../core/auth/auth.service';
import type { LayoutSummary } from '../layouts/layout';
import { LayoutsService } from '../layouts/layouts.service';
import { LoadState } from '../shared/page/load-state';
import { PageHeader } from '../shared/page/page-header';
import { sortedDataSource } from '../shared/page/sorted-data-source';
import type { ManifestSummary } from './manifest';
import { ManifestsService } from './manifests.service';
import { DateTimePipe } from '../shared/format/date-format';
import { TableScroll } from '../shared/table-scroll/table-scroll';

/** Every manifest, the layout it fills, its sample count and current version. */
@Component({
  selector: 'eq-manifests-page',
  imports: [
    TableScroll,
    MatTableModule,
    MatSortModule,
    MatButtonModule,
    MatIconModule,
    RouterLink,
    DateTimePipe,
    PageHeader,
  ],
  templateUrl: './manifests-page.html',
  styleUrl: './manifests-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ManifestsPage {
  protected readonly canEdit = inject(AuthService).hasRole('admin', 'lab_manager');
  protected readonly columns = ['name', 'layout', 'sampleCount', 'currentVersion', 'updatedAt'];
  private readonly sort = viewChild(MatSort);
  protected readonly dataSource = sortedDataSource<ManifestSummary>(this.sort);
  protected readonly state = new LoadState();
  private readonly layouts = signal<LayoutSummary[]>([]);
  private readonly layoutNames = computed(() => new Map(this.layouts().map((l) => [l.id, l.name])));

  constructor() {
    this.dataSource.sortingDataAccessor = (m, column) =>
      column === 'layout' ? this.layoutName(m) : (m[column as keyof ManifestSummary] ?? '');
    this.state.load(
      forkJoin([inject(ManifestsService).list(), inject(LayoutsService).list()]),
      ([manifests, layouts]) => {
        this.layouts.set(layouts);
        this.dataSource.data = manifests;
      },
    );
  }

  protected layoutName(m: ManifestSummary): string {
    return this.layoutNames().get(m.layoutId) ?? `layout ${m.layoutId}`;
  }
}
