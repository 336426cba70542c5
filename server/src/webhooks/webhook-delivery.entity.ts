import { Column, Entity, Index, PrimaryGeneratedColumn } from 'typeorm';
import type { WebhookEvent } from './webhook.entity';

import type { DeliveryStatus } from '../contracts/enums';

export type { DeliveryStatus } from '../contracts/enums';

/**
 * One event for one receiver: the exact body it gets, and how the tries went. The unique index on
 * (event id, webhook) keeps an event from being recorded, and so sent, twice to the same receiver.
 */
@Entity('webhook_deliveries')
@Index('uq_webhook_deliveries_event', ['eventId', 'webhookId'], { unique: true })
@Index('idx_webhook_deliveries_status', ['webhookId', 'status'])
export class WebhookDelivery {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  /** The payload's `id` (a UUID): the same on every try and for every receiver of the event. */
  @Column('varchar', { name: 'event_id', length: 36 })
  eventId!: string;

  @Column('varchar', { length: 30 })
  event!: WebhookEvent;

  @Column('integer', { name: 'webhook_id' })
  webhookId!: number;

  /** The JSON body exactly as it is signed and sent. */
  @Column('text')
  payload!: string;

  @Column('varchar', { length: 12 })
  status!: DeliveryStatus;

  @Column('integer', { default: 0 })
  attempts!: number;

  @Column('integer', { name: 'last_response_code', nullable: true })
  lastResponseCode!: number | null;

  @Column('text', { name: 'last_error', nullable: true })
  lastError!: string | null;

  /** The queue job that sends it; null until queued (a crash in between is recovered at start). */
  @Column('integer', { name: 'job_id', nullable: true })
  jobId!: number | null;

  @Column('varchar', { name: 'created_at', length: 30 })
  createdAt!: string;

  @Column('varchar', { name: 'last_attempt_at', length: 30, nullable: true })
  lastAttemptAt!: string | null;

  @Column('varchar', { name: 'delivered_at', length: 30, nullable: true })
  deliveredAt!: string | null;
}
