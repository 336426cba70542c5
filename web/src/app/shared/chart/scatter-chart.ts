import { ChangeDetectionStrategy, Component, ElementRef, computed, inject, input } from '@angular/core';
import {
  type ChartConfiguration,
  type ChartDataset,
  Legend,
  LineElement,
  LinearScale,
  PointElement,
  ScatterController,
  Tooltip,
} from 'chart.js';
import { BaseChartDirective, provideCharts } from 'ng2-charts';
import type { ChartSeries, ScatterChartModel } from './chart-data';
import { tickLabels } from './tick-labels';

/** Only what the scatter charts use is registered, to keep the chunk small. */
const REGISTERABLES = [ScatterController, LinearScale, PointElement, LineElement, Tooltip, Legend];

const COLOURS: Record<ChartSeries['kind'], string> = {
  points: '#3b528b',
  flagged: '#b3245c',
  line: '#1f8a70',
  range: '#3b528b',
};

type ScatterDataset = ChartDataset<'scatter', { x: number; y: number }[]>;

export function toDataset(s: ChartSeries): ScatterDataset {
  const colour = s.colour ?? COLOURS[s.kind];
  return {
    label: s.label,
    data: s.points,
    borderColor: colour,
    backgroundColor: colour,
    showLine: s.kind === 'line' || s.kind === 'range',
    pointRadius: s.kind === 'line' ? 0 : s.kind === 'range' ? 6 : 5,
    pointStyle: s.kind === 'flagged' ? 'triangle' : s.kind === 'range' ? 'dash' : 'circle',
    borderWidth: s.dashed || s.kind === 'range' ? 1 : 2,
    borderDash: s.label === 'Zero' || s.dashed ? [4, 4] : undefined,
  };
}

/**
 * A thin Chart.js scatter chart: the data mapping lives in pure functions (chart-data.ts); this only
 * draws. The canvas carries a summary as its accessible name; a table beside it holds the numbers.
 */
@Component({
  selector: 'eq-scatter-chart',
  imports: [BaseChartDirective],
  providers: [provideCharts({ registerables: REGISTERABLES })],
  template: `<div class="eq-chart" [style.height.px]="height()">
    <canvas
      baseChart
      type="scatter"
      role="img"
      [attr.aria-label]="model().summary"
      [data]="data()"
      [options]="options()"
    ></canvas>
  </div>`,
  styles: `
    :host {
      display: block;
    }
    .eq-chart {
      position: relative;
      width: 100%;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ScatterChart {
  private readonly host = inject<ElementRef<HTMLElement>>(ElementRef);
  readonly model = input.required<ScatterChartModel>();
  readonly height = input(260);
  /** Logarithmic or scientific tick labels are left to Chart.js; this formats them compactly. */
  readonly compactTicks = input(true);

  protected readonly data = computed<ChartConfiguration<'scatter'>['data']>(() => ({
    datasets: this.model().series.map(toDataset),
  }));

  protected readonly options = computed<ChartConfiguration<'scatter'>['options']>(() => {
    const ink = this.cssVar('--mat-sys-on-surface-variant', '#444');
    const grid = this.cssVar('--mat-sys-outline-variant', '#ccc');
    const compact = this.compactTicks();
    // Every label of an axis is written with the digits that keep all of them distinct.
    const tick = (_v: number | string, index: number, ticks: readonly { value: number }[]) =>
      tickLabels(
        ticks.map((t) => t.value),
        compact,
      )[index];
    const axis = (title: string) => ({
      type: 'linear' as const,
      title: { display: true, text: title, color: ink },
      ticks: { color: ink, callback: tick },
      grid: { color: grid },
    });
    return {
      responsive: true,
      maintainAspectRatio: false,
      animation: false,
      scales: { x: axis(this.model().xTitle), y: axis(this.model().yTitle) },
      plugins: {
        legend: {
          display: this.model().legend ?? true,
          labels: {
            color: ink,
            usePointStyle: true,
            filter: (item: { datasetIndex?: number }) =>
              !this.model().series[item.datasetIndex ?? -1]?.hideInLegend,
          },
        },
        tooltip: { enabled: true },
      },
    };
  });

  private cssVar(name: string, fallback: string): string {
    const value = getComputedStyle(this.host.nativeElement).getPropertyValue(name).trim();
    return value || fallback;
  }
}
