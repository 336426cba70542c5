import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { type Observable, map } from 'rxjs';

export const WEBHOOK_EVENTS = ['batch.approved', 'batch.qc_failed', 'file.quarantined'] as const;
export type WebhookEvent = (typeof WEBHOOK_EVENTS)[number];
export type DeliveryStatus = 'pending' | 'delivered' | 'failed';

export const WEBHOOK_EVENT_LABELS: Record<WebhookEvent, string> = {
  'batch.approved': 'Batch approved',
  'batch.qc_failed': 'Batch failed QC',
  'file.quarantined': 'File quarantined',
};

/** A registered receiver, as GET /api/webhooks sends it (the secret only masked). */
export interface Webhook {
  id: number;
  url: string;
  events: WebhookEvent[];
  active: boolean;
  secretMasked: string;
  createdAt: string;
  updatedAt: string;
  counts: Record<DeliveryStatus, number>;
}

export interface WebhookDelivery {
  id: number;
  eventId: string;
  event: WebhookEvent;
  webhookId: number;
  url: string | null;
  status: DeliveryStatus;
  attempts: number;
  lastResponseCode: number | null;
  lastError: string | null;
  createdAt: string;
  lastAttemptAt: string | null;
  deliveredAt: string | null;
  payload: unknown;
}

export interface DeliveriesPage {
  items: WebhookDelivery[];
  total: number;
}

export interface DeliveriesQuery {
  status?: DeliveryStatus;
  webhookId?: number;
  page: number;
  pageSize: number;
}

function isWebhook(value: unknown): value is Webhook {
  const w = value as Partial<Webhook> | null;
  return (
    !!w &&
    typeof w.id === 'number' &&
    typeof w.url === 'string' &&
    Array.isArray(w.events) &&
    typeof w.active === 'boolean' &&
    typeof w.secretMasked === 'string' &&
    !!w.counts
  );
}

function isDelivery(value: unknown): value is WebhookDelivery {
  const d = value as Partial<WebhookDelivery> | null;
  return (
    !!d &&
    typeof d.id === 'number' &&
    typeof d.eventId === 'string' &&
    typeof d.event === 'string' &&
    typeof d.status === 'string' &&
    typeof d.attempts === 'number'
  );
}

function checked<T>(value: unknown, is: (v: unknown) => v is T, what: string): T {
  if (!is(value)) throw new Error(`The server answered with an unexpected ${what}.`);
  return value;
}

/** The /api/webhooks resource (admins). */
@Injectable({ providedIn: 'root' })
export class WebhooksService {
  private readonly http = inject(HttpClient);

  list(): Observable<Webhook[]> {
    return this.http.get<unknown[]>('/api/webhooks').pipe(
      map((res) => {
        if (!Array.isArray(res) || !res.every(isWebhook))
          throw new Error('The server answered with an unexpected webhook list.');
        return res;
      }),
    );
  }

  create(body: { url: string; secret: string; events: WebhookEvent[] }): Observable<Webhook> {
    return this.http
      .post<unknown>('/api/webhooks', body)
      .pipe(map((res) => checked(res, isWebhook, 'webhook')));
  }

  setActive(id: number, active: boolean): Observable<Webhook> {
    return this.http
      .patch<unknown>(`/api/webhooks/${id}`, { active })
      .pipe(map((res) => checked(res, isWebhook, 'webhook')));
  }

  remove(id: number): Observable<void> {
    return this.http.delete<void>(`/api/webhooks/${id}`);
  }

  deliveries(query: DeliveriesQuery): Observable<DeliveriesPage> {
    let params = new HttpParams().set('page', query.page).set('pageSize', query.pageSize);
    if (query.status) params = params.set('status', query.status);
    if (query.webhookId !== undefined) params = params.set('webhookId', query.webhookId);
    return this.http.get<{ items?: unknown; total?: unknown }>('/api/webhooks/deliveries', { params }).pipe(
      map((res) => {
        if (!Array.isArray(res?.items) || typeof res.total !== 'number' || !res.items.every(isDelivery))
          throw new Error('The server answered with an unexpected page of deliveries.');
        return { items: res.items, total: res.total };
      }),
    );
  }

  resend(id: number): Observable<WebhookDelivery> {
    return this.http
      .post<unknown>(`/api/webhooks/deliveries/${id}/resend`, {})
      .pipe(map((res) => checked(res, isDelivery, 'delivery')));
  }
}
