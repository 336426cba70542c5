import {
  ChangeDetectionStrategy,
  Component,
  ElementRef,
  afterRenderEffect,
  computed,
  input,
  viewChild,
} from '@angular/core';
import { colourFor } from '../shared/chart/colour-scale';
import { type ResidualGrid, nmText, residualLegend } from './spectra-model';

/**
 * A heat grid of residuals, mixtures (rows, in the table's order) × wavelengths (columns): one canvas pixel
 * per cell, scaled up without smoothing. The canvas carries a summary as its accessible name.
 */
@Component({
  selector: 'eq-residual-map',
  template: `<div class="eq-rmap">
      <span class="eq-rmap__y">Mixtures (first at top)</span>
      <canvas
        #canvas
        role="img"
        class="eq-rmap__canvas"
        [attr.aria-label]="grid().summary"
        [attr.width]="grid().wavelengthsNm.length"
        [attr.height]="grid().rows.length"
        data-testid="residual-map"
      ></canvas>
      <div class="eq-rmap__x eq-num" aria-hidden="true">
        <span>{{ ends().from }} nm</span><span>Wavelength</span><span>{{ ends().to }} nm</span>
      </div>
    </div>
    <div class="eq-rmap__legend" aria-hidden="true">
      <span class="eq-rmap__bar" [style.background]="legend().gradient"></span>
      <div class="eq-rmap__ticks eq-num">
        @for (t of legend().ticks; track $index) {
          <span>{{ t }}</span>
        }
      </div>
      <span class="eq-rmap__unit">Measured − fitted absorbance (AU)</span>
    </div>`,
  styles: `
    :host {
      display: block;
    }
    .eq-rmap {
      display: grid;
      grid-template-columns: auto 1fr;
      grid-template-rows: auto auto;
      gap: 4px 8px;
    }
    .eq-rmap__y {
      writing-mode: vertical-rl;
      transform: rotate(180deg);
      font: var(--mat-sys-label-small);
      color: var(--mat-sys-on-surface-variant);
      text-align: center;
    }
    .eq-rmap__canvas {
      width: 100%;
      height: 220px;
      image-rendering: pixelated;
      border: 1px solid var(--mat-sys-outline-variant);
    }
    .eq-rmap__x {
      grid-column: 2;
      display: flex;
      justify-content: space-between;
      font: var(--mat-sys-label-small);
      color: var(--mat-sys-on-surface-variant);
    }
    .eq-rmap__legend {
      margin: 8px 0 0 24px;
      max-width: 320px;
    }
    .eq-rmap__bar {
      display: block;
      height: 10px;
      border-radius: 2px;
    }
    .eq-rmap__ticks {
      display: flex;
      justify-content: space-between;
      font: var(--mat-sys-label-small);
    }
    .eq-rmap__unit {
      font: var(--mat-sys-label-small);
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ResidualMap {
  readonly grid = input.required<ResidualGrid>();
  private readonly canvas = viewChild.required<ElementRef<HTMLCanvasElement>>('canvas');
  protected readonly legend = computed(() => residualLegend(this.grid()));
  protected readonly ends = computed(() => {
    const w = this.grid().wavelengthsNm;
    return { from: nmText(w[0]), to: nmText(w[w.length - 1]) };
  });

  constructor() {
    afterRenderEffect(() => this.draw(this.grid()));
  }

  private draw(grid: ResidualGrid): void {
    const canvas = this.canvas().nativeElement;
    let ctx: CanvasRenderingContext2D | null = null;
    try {
      ctx = canvas.getContext('2d');
    } catch {
      ctx = null; // no canvas (jsdom): the accessible summary still describes the map
    }
    if (!ctx) return;
    grid.values.forEach((row, i) =>
      row.forEach((v, j) => {
        ctx.fillStyle = colourFor(v, grid.range);
        ctx.fillRect(j, i, 1, 1);
      }),
    );
  }
}
