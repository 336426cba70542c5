import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { CalibrationResult } from '@equilight/analysis';
import { MatIconModule } from '@angular/material/icon';
import { calibrationChart, residualChart } from '../shared/chart/chart-data';
import {
  EPSILON_UNIT,
  formatAbsorbance,
  formatNumber,
  formatQuantity,
  significantDigits,
} from '../shared/format/number-format';
import { ScatterChart } from '../shared/chart/scatter-chart';
import { TableScroll } from '../shared/table-scroll/table-scroll';

/** Beer–Lambert calibration: the statistics, the line and residual plots, and the standards as a table. */
@Component({
  selector: 'eq-calibration-panel',
  imports: [TableScroll, ScatterChart, MatIconModule],
  templateUrl: './calibration-panel.html',
  styleUrl: './panels.scss',
  styles: `
    .eq-stats dd.eq-extrapolated {
      display: flex;
      gap: 4px;
      align-items: flex-start;
      margin-top: 2px;
      font: var(--mat-sys-body-small);
      color: var(--mat-sys-on-surface-variant);
    }
    .eq-extrapolated mat-icon {
      flex: none;
      overflow: visible;
    }
    .eq-linearity__text {
      font: var(--mat-sys-body-medium);
    }
    .eq-linearity {
      grid-column: 1 / -1;
    }
    .eq-linearity dd {
      display: flex;
      flex-wrap: wrap;
      gap: 4px 8px;
      align-items: baseline;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CalibrationPanel {
  readonly calibration = input.required<CalibrationResult | null>();
  /** True when ε comes from somewhere else than this calibration (a what-if or a saved setting). */
  readonly epsilonOverride = input<number | null>(null);

  protected readonly fmt = formatNumber;
  protected readonly abs = formatAbsorbance;
  protected readonly quantity = formatQuantity;
  protected readonly epsilonUnit = EPSILON_UNIT;
  /** ε ± SE with the digits its uncertainty supports (GUM §7.2.6). */
  protected readonly epsilon = computed(() => {
    const c = this.calibration();
    if (!c) return '';
    const d = significantDigits(c.epsilonLPerMolCm, c.epsilonSe);
    return `${formatNumber(c.epsilonLPerMolCm, d)} ± ${formatNumber(c.epsilonSe, 2)} ${EPSILON_UNIT}`;
  });
  protected readonly line = computed(() => {
    const c = this.calibration();
    return c ? calibrationChart(c) : null;
  });
  protected readonly residuals = computed(() => {
    const c = this.calibration();
    return c ? residualChart(c) : null;
  });
  protected readonly flaggedCount = computed(
    () => this.calibration()?.points.filter((p) => p.aboveLinearRange || p.outlier).length ?? 0,
  );
}
