import { HttpErrorResponse } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, type OnInit, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatPaginatorModule, type PageEvent } from '@angular/material/paginator';
import { MatTableModule } from '@angular/material/table';
import { MatTabsModule } from '@angular/material/tabs';
import { LoadState } from '../shared/page/load-state';
import { PageHeader } from '../shared/page/page-header';
import { type OutboxMessage, OutboxService } from './outbox.service';
import { DateTimePipe } from '../shared/format/date-format';
import { TableScroll } from '../shared/table-scroll/table-scroll';

/** Admins: every mail the local SMTP stand-in received, newest first, and one message in full. */
@Component({
  selector: 'eq-outbox-page',
  imports: [
    DateTimePipe,
    TableScroll,
    MatTableModule,
    MatPaginatorModule,
    MatTabsModule,
    MatButtonModule,
    MatIconModule,
    PageHeader,
  ],
  templateUrl: './outbox-page.html',
  styleUrl: './outbox-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class OutboxPage implements OnInit {
  private readonly outbox = inject(OutboxService);

  protected readonly columns = ['receivedAt', 'to', 'subject'];
  protected readonly messages = signal<OutboxMessage[]>([]);
  protected readonly total = signal(0);
  protected readonly pageIndex = signal(0);
  protected readonly pageSize = signal(25);
  protected readonly selected = signal<OutboxMessage | null>(null);
  protected readonly state = new LoadState();
  /** The server runs no stand-in: there is nothing to show. */
  protected readonly noStandIn = signal(false);

  ngOnInit(): void {
    this.load();
  }

  protected load(): void {
    this.state.load(
      this.outbox.list(this.pageIndex(), this.pageSize()),
      (page) => {
        this.messages.set(page.items);
        this.total.set(page.total);
        const selected = this.selected();
        if (selected) this.selected.set(page.items.find((m) => m.id === selected.id) ?? selected);
        this.noStandIn.set(false);
      },
      (err) => {
        const missing = err instanceof HttpErrorResponse && err.status === 404;
        if (missing) this.noStandIn.set(true);
        return missing;
      },
    );
  }

  protected page(event: PageEvent): void {
    this.pageIndex.set(event.pageIndex);
    this.pageSize.set(event.pageSize);
    this.load();
  }

  protected open(message: OutboxMessage): void {
    this.selected.set(message);
  }
}
