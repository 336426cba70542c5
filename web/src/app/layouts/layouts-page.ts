import { ChangeDetectionStrategy, Component, type OnInit, inject, viewChild } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { RouterLink } from '@angular/router';
import { AuthService } from '../core/auth/auth.service';
import { LoadState } from '../shared/page/load-state';
import { PageHeader } from '../shared/page/page-header';
import { RoleBadge } from '../shared/role-code/role-badge';
import { sortedDataSource } from '../shared/page/sorted-data-source';
import { FORMAT_LABELS, ROLE_CODE, SAMPLE_ROLES } from '../shared/plate-grid/plate-geometry';
import type { LayoutSummary } from './layout';
import { LayoutsService } from './layouts.service';
import { DateTimePipe } from '../shared/format/date-format';
import { TableScroll } from '../shared/table-scroll/table-scroll';

/** Every layout, its format, what it holds and its current version. */
@Component({
  selector: 'eq-layouts-page',
  imports: [
    TableScroll,
    MatTableModule,
    MatSortModule,
    MatButtonModule,
    MatIconModule,
    RouterLink,
    DateTimePipe,
    PageHeader,
    RoleBadge,
  ],
  templateUrl: './layouts-page.html',
  styleUrl: './layouts-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LayoutsPage implements OnInit {
  private readonly layouts = inject(LayoutsService);
  protected readonly canEdit = inject(AuthService).hasRole('admin', 'lab_manager');

  protected readonly columns = ['name', 'format', 'positionCount', 'roles', 'currentVersion', 'updatedAt'];
  private readonly sort = viewChild(MatSort);
  protected readonly dataSource = sortedDataSource<LayoutSummary>(this.sort);
  protected readonly state = new LoadState();

  ngOnInit(): void {
    this.state.load(this.layouts.list(), (rows) => (this.dataSource.data = rows));
  }

  protected formatLabel(layout: LayoutSummary): string {
    return layout.format === 'cuvette'
      ? `${FORMAT_LABELS.cuvette} (${layout.cuvetteCount ?? 0})`
      : FORMAT_LABELS[layout.format];
  }

  protected roleCounts(layout: LayoutSummary) {
    return SAMPLE_ROLES.filter((role) => layout.roleCounts[role]).map((role) => ({
      role,
      letter: ROLE_CODE[role].letter,
      label: ROLE_CODE[role].label.toLowerCase(),
      count: layout.roleCounts[role] ?? 0,
    }));
  }
}
