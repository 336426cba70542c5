import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { RouterLink } from '@angular/router';
import { catchError, of, switchMap, tap } from 'rxjs';
import { formatNumber } from '../shared/format/number-format';
import { ScatterChart } from '../shared/chart/scatter-chart';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { type SystemTemperatures, vantHoffChart } from './temperature-system';
import { TemperaturesService } from './temperatures.service';
import { TableScroll } from '../shared/table-scroll/table-scroll';

/** K of each chemical system at several temperatures, and ΔH° and ΔS° from the van 't Hoff fit. */
@Component({
  selector: 'eq-temperatures-page',
  imports: [
    TableScroll,
    RouterLink,
    MatCardModule,
    MatIconModule,
    MatProgressBarModule,
    MatSlideToggleModule,
    ScatterChart,
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
  protected readonly views = computed(() =>
    this.systems().map((system) => ({ system, chart: vantHoffChart(system) })),
  );

  protected readonly fmt = formatNumber;

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
        if (systems) {
          this.error.set(null);
          this.systems.set(systems);
        }
      });
  }

  protected kj(jPerMol: number | null): string {
    return jPerMol === null ? '—' : formatNumber(jPerMol / 1000, 4);
  }

  protected kjSe(jPerMol: number | null): string {
    return jPerMol === null ? '—' : formatNumber(jPerMol / 1000, 2);
  }
}
