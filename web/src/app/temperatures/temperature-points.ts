import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { RouterLink } from '@angular/router';
import { TableScroll } from '../shared/table-scroll/table-scroll';
import { POINTS_PAGE_SIZE, type TemperaturePointsPage } from './temperature-system';

/** One system's page of points as the page holds it: the last answer, and whether the next is on its way. */
export interface PointsState {
  page: TemperaturePointsPage | null;
  loading: boolean;
  error: string | null;
}

/**
 * The batches of one chemical system, a page at a time: each batch's K at its temperature and whether it
 * is in the van 't Hoff fit (or why not). The page fetches; this shows and asks for another page.
 */
@Component({
  selector: 'eq-temperature-points',
  imports: [TableScroll, RouterLink, MatIconModule, MatPaginatorModule],
  templateUrl: './temperature-points.html',
  styleUrl: './temperature-points.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TemperaturePoints {
  readonly systemName = input.required<string>();
  readonly state = input.required<PointsState>();
  /** Whether the system has a fit: without one, no batch claims to be in it. */
  readonly hasFit = input.required<boolean>();
  readonly pageIndexChange = output<number>();

  protected readonly pageSize = POINTS_PAGE_SIZE;

  protected onPage(event: PageEvent): void {
    this.pageIndexChange.emit(event.pageIndex);
  }
}
