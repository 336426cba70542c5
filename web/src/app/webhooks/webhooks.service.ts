import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import {
  type CreateWebhookRequest,
  type DeliveriesPage,
  type DeliveryDto,
  type DeliveryStatus,
  type WebhookDto,
  deliveriesPageSchema,
  deliverySchema,
  webhookSchema,
} from '@equilight/contracts';
import type { Observable } from 'rxjs';
import { parsed } from '../core/http/api-response';

export type {
  DeliveriesPage,
  DeliveryStatus,
  DeliveryDto as WebhookDelivery,
  WebhookDto as Webhook,
  WebhookEvent,
} from '@equilight/contracts';
export { WEBHOOK_EVENTS, WEBHOOK_EVENT_LABELS } from '@equilight/contracts';

export interface DeliveriesQuery {
  status?: DeliveryStatus;
  webhookId?: number;
  page: number;
  pageSize: number;
}

const webhook = parsed(webhookSchema, 'webhook');

/** The /api/webhooks resource (admins). */
@Injectable({ providedIn: 'root' })
export class WebhooksService {
  private readonly http = inject(HttpClient);

  list(): Observable<WebhookDto[]> {
    return this.http.get<unknown>('/api/webhooks').pipe(parsed(webhookSchema.array(), 'webhook list'));
  }

  create(body: CreateWebhookRequest): Observable<WebhookDto> {
    return this.http.post<unknown>('/api/webhooks', body).pipe(webhook);
  }

  setActive(id: number, active: boolean): Observable<WebhookDto> {
    return this.http.patch<unknown>(`/api/webhooks/${id}`, { active }).pipe(webhook);
  }

  remove(id: number): Observable<void> {
    return this.http.delete<void>(`/api/webhooks/${id}`);
  }

  deliveries(query: DeliveriesQuery): Observable<DeliveriesPage> {
    let params = new HttpParams().set('page', query.page).set('pageSize', query.pageSize);
    if (query.status) params = params.set('status', query.status);
    if (query.webhookId !== undefined) params = params.set('webhookId', query.webhookId);
    return this.http
      .get<unknown>('/api/webhooks/deliveries', { params })
      .pipe(parsed(deliveriesPageSchema, 'page of deliveries'));
  }

  resend(id: number): Observable<DeliveryDto> {
    return this.http
      .post<unknown>(`/api/webhooks/deliveries/${id}/resend`, {})
      .pipe(parsed(deliverySchema, 'delivery'));
  }
}
