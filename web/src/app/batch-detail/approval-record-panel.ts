import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import type { BatchResultSummary } from '../batches/batch';
import type { ApprovalRecord, EngineCheck } from './batch-analysis';
import { formatNumber, kUnitOf } from '../shared/format/number-format';
import { DateTimePipe } from '../shared/format/date-format';
import { TableScroll } from '../shared/table-scroll/table-scroll';

/**
 * "K (1:1) = 612 L·mol⁻¹ (95 % CI 590 to 635)" — the K text every screen and report uses — or what stands
 * in for it. A record from before K statements existed is written from its value and interval.
 */
export function describeHeadline(s: BatchResultSummary | null): string {
  if (!s || !s.best) return 'no equilibrium result';
  if (s.kText) return `K (${s.best}) = ${s.kText}`;
  if (s.k === null) return `${s.best} as the best model, without a K`;
  const unit = kUnitOf(s.best);
  const ci = s.kCi95 ? ` (95 % CI ${formatNumber(s.kCi95[0])} to ${formatNumber(s.kCi95[1])})` : '';
  return `K (${s.best}) = ${formatNumber(s.k)}${unit ? ` ${unit}` : ''}${ci}`;
}

/**
 * What an approval froze, shown beside the result it froze: who approved and when, the analysis engine,
 * each input file's SHA-256, earlier records a reopening set aside, and — as a note, never a replacement —
 * what today's engine would give when it differs.
 */
@Component({
  selector: 'eq-approval-record-panel',
  imports: [TableScroll, DateTimePipe, MatIconModule],
  templateUrl: './approval-record-panel.html',
  styleUrl: './approval-record-panel.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ApprovalRecordPanel {
  /** The record the batch is shown from; null for a batch approved before records were kept. */
  readonly record = input<ApprovalRecord | null>(null);
  readonly engineCheck = input<EngineCheck | null>(null);
  /** Records of earlier approvals, superseded by a reopening. */
  readonly earlier = input<readonly ApprovalRecord[]>([]);
  /** Whether the batch is approved now (a record without it is history only). */
  readonly approved = input(false);

  protected readonly note = computed(() => {
    const check = this.engineCheck();
    if (!check || !this.record()) return null;
    if (check.inputsMatch === false)
      return 'The files stored for this batch now are not the ones this record names (SHA-256 differs); ask an administrator to look into it.';
    const keep =
      ' The approved record above stays as it is; to adopt the new result, a lab manager reopens the batch and approves it again.';
    if (check.error)
      return `Re-analysis with the current engine (${check.engineVersion}) fails: ${check.error}.${keep}`;
    if (!check.differs) return null;
    return `Re-analysis with the current engine (${check.engineVersion}) gives ${describeHeadline(check.current)}.${keep}`;
  });
  protected readonly sameAsToday = computed(() => {
    const check = this.engineCheck();
    return !!check && !check.differs && !check.error && check.inputsMatch !== false;
  });
  protected readonly headline = describeHeadline;
}
