import type { DataSource } from 'typeorm';
import type { AuditService } from '../audit/audit.service';
import type { BatchesService } from '../batches/batches.service';
import type { AppConfig } from '../config';
import type { EventBus } from '../events/event-bus';
import type { IngestService } from '../ingest/ingest.service';
import type { BatchMailer } from '../mail/batch-mailer';
import type { JobWorker } from '../queue/job-queue';
import type { Queues } from '../queue/queues';
import { WebhookEvents } from './webhook-events';
import { webhooksRouter } from './webhooks.router';
import { type WebhookJobData, WebhooksService } from './webhooks.service';

export interface WebhooksModule {
  service: WebhooksService;
  events: WebhookEvents;
  worker: JobWorker<WebhookJobData>;
  router: ReturnType<typeof webhooksRouter>;
  /** Listen to the app's events and resume deliveries left queued by a previous run. */
  start(): Promise<void>;
  /** Wait until every event seen so far is recorded (not until it is delivered). */
  idle(): Promise<void>;
  close(): Promise<void>;
}

/** Outbound webhooks on their own queue ("webhooks") beside the ingest queue. */
export function createWebhooksModule(deps: {
  config: AppConfig;
  dataSource: DataSource;
  audit: AuditService;
  batches: BatchesService;
  ingest: IngestService;
  events: EventBus;
  batchMailer: BatchMailer;
  /** Where the `webhooks` queue lives: the database, or Redis (QUEUE_URL). */
  queues: Queues;
  log: (message: string, err?: unknown) => void;
}): WebhooksModule {
  const { config, dataSource, log } = deps;
  const queue = deps.queues.queue<WebhookJobData>('webhooks');
  const service = new WebhooksService(dataSource, deps.audit, queue, config.webhooks, config.sessionSecret);
  const events = new WebhookEvents(service, deps.batches, deps.ingest, config.publicUrl, log);
  const worker = deps.queues.worker(queue, (job) => service.process(job), {
    concurrency: 2,
    retryBaseMs: config.webhooks.retryBaseMs,
  });
  worker.on('failed', (job, err) => {
    log(`Webhook delivery ${job.data.deliveryId} failed after ${job.attemptsMade} tries: ${err.message}`);
    void service.markFailed(job).catch((e: unknown) => log('Could not mark a failed webhook delivery', e));
  });
  worker.on('error', (err) => log('Webhook worker error', err));
  return {
    service,
    events,
    worker,
    router: webhooksRouter(service),
    async start() {
      events.start(deps.events, deps.batchMailer);
      await worker.start();
      await service.recoverUnqueued();
    },
    idle: () => events.idle(),
    async close() {
      events.stop();
      await events.idle();
      await worker.close();
      await queue.close();
    },
  };
}
