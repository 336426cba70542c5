import { ChangeDetectionStrategy, Component, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatTooltipModule } from '@angular/material/tooltip';
import { type DeliveryStatus, WEBHOOK_EVENT_LABELS, type WebhookDelivery } from './webhooks.service';
import { DateTimePipe } from '../shared/format/date-format';
import { TableScroll } from '../shared/table-scroll/table-scroll';

export const DELIVERY_STATUS: Record<DeliveryStatus, { label: string; icon: string }> = {
  pending: { label: 'Pending', icon: 'schedule' },
  delivered: { label: 'Delivered', icon: 'check_circle' },
  failed: { label: 'Failed', icon: 'error' },
};

/** The delivery log: one row per event and receiver, with a button to send it again. */
@Component({
  selector: 'eq-deliveries-table',
  imports: [TableScroll, DateTimePipe, MatButtonModule, MatIconModule, MatTooltipModule],
  templateUrl: './deliveries-table.html',
  styleUrl: './deliveries-table.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DeliveriesTable {
  readonly deliveries = input.required<WebhookDelivery[]>();
  readonly loading = input(false);
  /** Ids being re-sent right now (their buttons wait). */
  readonly busyIds = input<ReadonlySet<number>>(new Set());
  readonly resend = output<WebhookDelivery>();

  protected readonly statuses = DELIVERY_STATUS;
  protected readonly eventLabels = WEBHOOK_EVENT_LABELS;
}
