import { ChangeDetectionStrategy, Component, type OnInit, inject, signal } from '@angular/core';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { ConfirmDialog, type ConfirmDialogData } from '../instruments/confirm-dialog';
import { DeliveriesTable } from './deliveries-table';
import { WebhookDialog } from './webhook-dialog';
import {
  type DeliveryStatus,
  WEBHOOK_EVENT_LABELS,
  type Webhook,
  type WebhookDelivery,
  WebhooksService,
} from './webhooks.service';
import { Notice } from '../shared/page/notice';

/** Admins: the lab's LIMS/ELN receivers, and the log of what was sent to them. */
@Component({
  selector: 'eq-webhooks-page',
  imports: [
    FormsModule,
    MatButtonModule,
    MatButtonToggleModule,
    MatIconModule,
    MatPaginatorModule,
    MatSlideToggleModule,
    DeliveriesTable,
  ],
  templateUrl: './webhooks-page.html',
  styleUrl: './webhooks-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class WebhooksPage implements OnInit {
  private readonly webhooks = inject(WebhooksService);
  private readonly dialog = inject(MatDialog);
  private readonly notice = inject(Notice);

  protected readonly eventLabels = WEBHOOK_EVENT_LABELS;
  protected readonly hooks = signal<Webhook[]>([]);
  protected readonly hooksLoading = signal(true);
  protected readonly error = signal<string | null>(null);

  protected readonly deliveries = signal<WebhookDelivery[]>([]);
  protected readonly total = signal(0);
  protected readonly status = signal<DeliveryStatus | ''>('');
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(25);
  protected readonly deliveriesLoading = signal(true);
  protected readonly resending = signal<ReadonlySet<number>>(new Set());

  ngOnInit(): void {
    this.loadHooks();
    this.loadDeliveries();
  }

  protected refresh(): void {
    this.loadHooks();
    this.loadDeliveries();
  }

  protected loadHooks(): void {
    this.hooksLoading.set(true);
    this.webhooks.list().subscribe({
      next: (hooks) => {
        this.hooks.set(hooks);
        this.error.set(null);
        this.hooksLoading.set(false);
      },
      error: (err: unknown) => {
        this.error.set(apiErrorMessage(err));
        this.hooksLoading.set(false);
      },
    });
  }

  protected loadDeliveries(): void {
    this.deliveriesLoading.set(true);
    const status = this.status();
    this.webhooks
      .deliveries({ page: this.pageIndex(), pageSize: this.pageSize(), ...(status ? { status } : {}) })
      .subscribe({
        next: (page) => {
          this.deliveries.set(page.items);
          this.total.set(page.total);
          this.deliveriesLoading.set(false);
        },
        error: (err: unknown) => {
          this.error.set(apiErrorMessage(err));
          this.deliveriesLoading.set(false);
        },
      });
  }

  protected filter(status: DeliveryStatus | ''): void {
    this.status.set(status);
    this.pageIndex.set(0);
    this.loadDeliveries();
  }

  protected page(event: PageEvent): void {
    this.pageIndex.set(event.pageIndex);
    this.pageSize.set(event.pageSize);
    this.loadDeliveries();
  }

  protected add(): void {
    this.dialog
      .open<WebhookDialog, void, Webhook>(WebhookDialog, { width: '560px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((created) => {
        if (!created) return;
        void this.notice.show(`Webhook ${created.url} added`, { action: 'OK', durationMs: 4000 });
        this.loadHooks();
      });
  }

  protected setActive(hook: Webhook, active: boolean): void {
    this.webhooks.setActive(hook.id, active).subscribe({
      next: (updated) => this.hooks.update((list) => list.map((h) => (h.id === updated.id ? updated : h))),
      error: (err: unknown) => {
        this.error.set(apiErrorMessage(err));
        this.loadHooks();
      },
    });
  }

  protected remove(hook: Webhook): void {
    this.dialog
      .open<ConfirmDialog, ConfirmDialogData, boolean>(ConfirmDialog, {
        data: {
          title: 'Remove this webhook?',
          message: `${hook.url} gets no further events, and its delivery log is removed with it.`,
          confirmLabel: 'Remove',
        },
      })
      .afterClosed()
      .subscribe((yes) => {
        if (!yes) return;
        this.webhooks.remove(hook.id).subscribe({
          next: () => this.refresh(),
          error: (err: unknown) => this.error.set(apiErrorMessage(err)),
        });
      });
  }

  protected resend(delivery: WebhookDelivery): void {
    this.resending.update((ids) => new Set([...ids, delivery.id]));
    const done = () => this.resending.update((ids) => new Set([...ids].filter((id) => id !== delivery.id)));
    this.webhooks.resend(delivery.id).subscribe({
      next: (updated) => {
        done();
        this.deliveries.update((list) => list.map((d) => (d.id === updated.id ? updated : d)));
        void this.notice.show('Queued to be sent again', { action: 'OK', durationMs: 3000 });
      },
      error: (err: unknown) => {
        done();
        this.error.set(apiErrorMessage(err));
      },
    });
  }
}
