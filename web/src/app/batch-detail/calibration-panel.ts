import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import type { CalibrationResult } from '@equilight/analysis';
import { MatIconModule } from '@angular/material/icon';
import { calibrationChart, residualChart } from './chart-data';
import { formatAbsorbance, formatNumber } from './number-format';
import { ScatterChart } from './scatter-chart';

/** Beer–Lambert calibration: the statistics, the line and residual plots, and the standards as a table. */
@Component({
  selector: 'eq-calibration-panel',
  imports: [ScatterChart, MatIconModule],
  templateUrl: './calibration-panel.html',
  styleUrl: './panels.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CalibrationPanel {
  readonly calibration = input.required<CalibrationResult | null>();
  /** True when ε comes from somewhere else than this calibration (a what-if or a saved setting). */
  readonly epsilonOverride = input<number | null>(null);

  protected readonly fmt = formatNumber;
  protected readonly abs = formatAbsorbance;
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
