import { DatePipe } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  type OnInit,
  effect,
  inject,
  signal,
  viewChild,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { AuthService } from '../core/auth/auth.service';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { FORMAT_LABELS, ROLE_INFO, SAMPLE_ROLES } from '../shared/plate-grid/plate-geometry';
import type { LayoutSummary } from './layout';
import { LayoutsService } from './layouts.service';

/** Every layout, its format, what it holds and its current version. */
@Component({
  selector: 'eq-layouts-page',
  imports: [MatTableModule, MatSortModule, MatButtonModule, MatIconModule, RouterLink, DatePipe],
  templateUrl: './layouts-page.html',
  styleUrl: './layouts-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LayoutsPage implements OnInit {
  private readonly layouts = inject(LayoutsService);
  protected readonly canEdit = inject(AuthService).hasRole('admin', 'lab_manager');

  protected readonly columns = ['name', 'format', 'positionCount', 'roles', 'currentVersion', 'updatedAt'];
  protected readonly dataSource = new MatTableDataSource<LayoutSummary>([]);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  private readonly sort = viewChild(MatSort);

  constructor() {
    effect(() => {
      const sort = this.sort();
      if (sort) this.dataSource.sort = sort;
    });
  }

  ngOnInit(): void {
    this.layouts.list().subscribe({
      next: (rows) => {
        this.dataSource.data = rows;
        this.loading.set(false);
      },
      error: (err: unknown) => {
        this.error.set(apiErrorMessage(err));
        this.loading.set(false);
      },
    });
  }

  protected formatLabel(layout: LayoutSummary): string {
    return layout.format === 'cuvette'
      ? `${FORMAT_LABELS.cuvette} (${layout.cuvetteCount ?? 0})`
      : FORMAT_LABELS[layout.format];
  }

  protected roleCounts(layout: LayoutSummary) {
    return SAMPLE_ROLES.filter((role) => layout.roleCounts[role]).map((role) => ({
      role,
      letter: ROLE_INFO[role].letter,
      label: ROLE_INFO[role].label.toLowerCase(),
      count: layout.roleCounts[role] ?? 0,
    }));
  }
}
