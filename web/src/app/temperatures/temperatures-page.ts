import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { Subject, catchError, groupBy, map, mergeMap, of, switchMap, tap } from 'rxjs';
import { formatNumber, kUnitOf } from '../shared/format/number-format';
import { ScatterChart } from '../shared/chart/scatter-chart';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { TableScroll } from '../shared/table-scroll/table-scroll';
import { type PointsState, TemperaturePoints } from './temperature-points';
import {
  POINTS_PAGE_SIZE,
  type PointsRequest,
  type SystemTemperatures,
  vantHoffChart,
} from './temperature-system';
import { TemperaturesService } from './temperatures.service';

const NO_POINTS: PointsState = { page: null, loading: true, error: null };

/**
 * K of each chemical system at several temperatures, and ΔH° and ΔS° from the van 't Hoff fit: the fit and
 * the per-temperature groups of every system in one answer, each system's batches a page at a time.
 */
@Component({
  selector: 'eq-temperatures-page',
  imports: [
    TableScroll,
    MatCardModule,
    MatIconModule,
    MatProgressBarModule,
    MatSlideToggleModule,
    ScatterChart,
    TemperaturePoints,
  ],
  templateUrl: './temperatures-page.html',
  styleUrl: './temperatures-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TemperaturesPage {
  private readonly service = inject(TemperaturesService);

  protected readonly includeUnapproved = signal(false);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  protected readonly systems = signal<SystemTemperatures[]>([]);
  /** Each system's page of batches, by system name. */
  private readonly points = signal<ReadonlyMap<string, PointsState>>(new Map());
  /** Charts only change with the systems, not with a page of their batches. */
  private readonly charts = computed(() => this.systems().map(vantHoffChart));
  protected readonly views = computed(() => {
    const charts = this.charts();
    const points = this.points();
    return this.systems().map((system, i) => ({
      system,
      chart: charts[i]!,
      kUnit: system.model ? kUnitOf(system.model) : '',
      points: points.get(system.systemName) ?? NO_POINTS,
    }));
  });

  protected readonly fmt = formatNumber;

  private readonly pageRequests$ = new Subject<PointsRequest>();

  constructor() {
    toObservable(this.includeUnapproved)
      .pipe(
        tap(() => this.loading.set(true)),
        switchMap((include) =>
          this.service.systems(include).pipe(
            catchError((err: unknown) => {
              this.error.set(apiErrorMessage(err, 'The temperatures could not be loaded.'));
              return of(null);
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((systems) => {
        this.loading.set(false);
        if (!systems) return;
        this.error.set(null);
        this.systems.set(systems);
        for (const s of systems) this.loadPoints(s.systemName, 0);
      });

    // One request at a time per system: a newer page (or the toggle) replaces the one on its way.
    this.pageRequests$
      .pipe(
        groupBy((request) => request.system),
        mergeMap((forSystem) =>
          forSystem.pipe(
            switchMap((request) =>
              this.service.points(request).pipe(
                map((page) => ({ request, page, error: null })),
                catchError((err: unknown) =>
                  of({
                    request,
                    page: null,
                    error: apiErrorMessage(err, 'The batches of this system could not be loaded.'),
                  }),
                ),
              ),
            ),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe(({ request, page, error }) =>
        this.setPoints(request.system, (old) => ({ page: page ?? old.page, loading: false, error })),
      );
  }

  protected onPage(system: string, pageIndex: number): void {
    this.loadPoints(system, pageIndex);
  }

  private loadPoints(system: string, page: number): void {
    this.setPoints(system, (old) => ({ ...old, loading: true }));
    this.pageRequests$.next({
      system,
      includeUnapproved: this.includeUnapproved(),
      page,
      pageSize: POINTS_PAGE_SIZE,
    });
  }

  private setPoints(system: string, change: (old: PointsState) => PointsState): void {
    this.points.update((all) => new Map(all).set(system, change(all.get(system) ?? NO_POINTS)));
  }

  protected kj(jPerMol: number | null): string {
    return jPerMol === null ? '—' : formatNumber(jPerMol / 1000, 4);
  }

  protected kjSe(jPerMol: number | null): string {
    return jPerMol === null ? '—' : formatNumber(jPerMol / 1000, 2);
  }
}
