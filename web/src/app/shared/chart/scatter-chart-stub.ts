import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import type { ScatterChartModel } from './chart-data';

/**
 * For component tests only: jsdom has no canvas, so tests put this in place of ScatterChart. It keeps
 * the canvas and its accessible summary; the data mapping is tested on its own.
 */
@Component({
  selector: 'eq-scatter-chart',
  template: `<canvas
    role="img"
    [attr.aria-label]="model().summary"
    [attr.data-series]="model().series.length"
  ></canvas>`,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ScatterChartStub {
  readonly model = input.required<ScatterChartModel>();
  readonly height = input(260);
}
