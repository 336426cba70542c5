import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { type OutboxPage, outboxPageSchema, outboxStatusSchema } from '@equilight/contracts';
import { type Observable, map } from 'rxjs';
import { parsed } from '../core/http/api-response';

export type { OutboxMessageDto as OutboxMessage, OutboxPage } from '@equilight/contracts';

/** The /api/outbox resource (admins; only while the server runs its mail stand-in). */
@Injectable({ providedIn: 'root' })
export class OutboxService {
  private readonly http = inject(HttpClient);

  list(page: number, pageSize: number): Observable<OutboxPage> {
    const params = new HttpParams().set('page', page).set('pageSize', pageSize);
    return this.http.get<unknown>('/api/outbox', { params }).pipe(parsed(outboxPageSchema, 'outbox page'));
  }

  /** Whether the server runs the stand-in at all. */
  status(): Observable<boolean> {
    return this.http.get<unknown>('/api/outbox/status').pipe(
      parsed(outboxStatusSchema, 'outbox status'),
      map((res) => res.standIn),
    );
  }
}
