import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { type Observable, map } from 'rxjs';

/** One message the local SMTP stand-in received. */
export interface OutboxMessage {
  id: number;
  from: string;
  to: string;
  subject: string;
  text: string | null;
  html: string | null;
  rawSize: number;
  receivedAt: string;
}

export interface OutboxPage {
  items: OutboxMessage[];
  total: number;
}

function isMessage(value: unknown): value is OutboxMessage {
  const m = value as Partial<OutboxMessage> | null;
  return (
    !!m &&
    typeof m.id === 'number' &&
    typeof m.from === 'string' &&
    typeof m.to === 'string' &&
    typeof m.subject === 'string' &&
    typeof m.receivedAt === 'string'
  );
}

/** The /api/outbox resource (admins; only while the server runs its mail stand-in). */
@Injectable({ providedIn: 'root' })
export class OutboxService {
  private readonly http = inject(HttpClient);

  list(page: number, pageSize: number): Observable<OutboxPage> {
    const params = new HttpParams().set('page', page).set('pageSize', pageSize);
    return this.http.get<{ items: unknown[]; total: unknown }>('/api/outbox', { params }).pipe(
      map((res) => {
        if (!Array.isArray(res?.items) || typeof res.total !== 'number' || !res.items.every(isMessage))
          throw new Error('The server answered with an unexpected outbox page.');
        return { items: res.items, total: res.total };
      }),
    );
  }

  /** Whether the server runs the stand-in at all. */
  status(): Observable<boolean> {
    return this.http
      .get<{ standIn?: unknown }>('/api/outbox/status')
      .pipe(map((res) => res?.standIn === true));
  }
}
