import fs from 'node:fs';
import path from 'node:path';
import { type DataSource, In, IsNull, type Repository } from 'typeorm';
import type { Actor, AuditService } from '../audit/audit.service';
import { AppError } from '../common/app-error';
import type { WebhooksConfig } from '../config';
import type { Job, JobQueue } from '../queue/job-queue';
import { SecretBox, signatureHeader, uuidV5 } from './webhook-crypto';
import { type DeliveryStatus, WebhookDelivery } from './webhook-delivery.entity';
import { Webhook, type WebhookEvent } from './webhook.entity';
import type { DeliveryDto, WebhookDto } from '../contracts/webhooks';
import type { CreateWebhookInput, DeliveriesQuery, UpdateWebhookInput } from '../contracts/webhooks';

export interface WebhookJobData {
  deliveryId: number;
}

export type { DeliveryDto, WebhookDto } from '../contracts/webhooks';

/** What the receiver gets as the JSON body. */
export interface WebhookPayload {
  id: string;
  event: WebhookEvent;
  occurredAt: string;
  data: Record<string, unknown>;
}

const RESPONSE_SNIPPET_CHARS = 300;
const RESPONSE_READ_BYTES = 4096;

function readVersion(): string {
  try {
    // server/src/webhooks and server/dist/webhooks both sit three levels below the repository root.
    const file = path.resolve(__dirname, '../../../package.json');
    return (JSON.parse(fs.readFileSync(file, 'utf8')) as { version?: string }).version ?? '0';
  } catch {
    return '0';
  }
}

export const USER_AGENT = `Equilight-Webhooks/${readVersion()}`;

function mask(hint: string): string {
  return `••••••••${hint}`;
}

/** The first characters of a receiver's answer, so a person can see why it refused; never more than 4 kB read. */
async function responseSnippet(res: Response): Promise<string> {
  const reader = res.body?.getReader();
  if (!reader) return '';
  const decoder = new TextDecoder();
  let text = '';
  let bytes = 0;
  try {
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      bytes += value.byteLength;
      text += decoder.decode(value, { stream: true });
      if (bytes > RESPONSE_READ_BYTES) {
        await reader.cancel();
        break;
      }
    }
  } catch {
    // the answer's code is what counts; a broken body only loses the snippet
  }
  text = text.trim();
  return text.length > RESPONSE_SNIPPET_CHARS ? `${text.slice(0, RESPONSE_SNIPPET_CHARS)}…` : text;
}

function describeFetchError(err: unknown, timeoutMs: number): string {
  const e = err as { name?: string; message?: string; cause?: { code?: string; message?: string } };
  if (e?.name === 'TimeoutError' || e?.name === 'AbortError') return `No answer within ${timeoutMs / 1000} s`;
  const cause = e?.cause?.code ?? e?.cause?.message;
  return `Could not reach the receiver: ${e?.message ?? String(err)}${cause ? ` (${cause})` : ''}`;
}

/**
 * Outbound webhooks: receivers and their secrets, one delivery row per event and receiver, and the
 * sender the queue runs. A delivery is sent until the receiver answers 2xx, at most `maxAttempts` times
 * with doubling waits, then marked failed; a person can send it again.
 */
export class WebhooksService {
  private readonly hooks: Repository<Webhook>;
  private readonly deliveriesRepo: Repository<WebhookDelivery>;
  private readonly box: SecretBox;
  /** Deliveries being sent right now in this process: never two requests for one at once. */
  private readonly sending = new Set<number>();

  constructor(
    private readonly dataSource: DataSource,
    private readonly audit: AuditService,
    private readonly queue: JobQueue<WebhookJobData>,
    private readonly config: WebhooksConfig,
    sessionSecret: string,
  ) {
    this.hooks = dataSource.getRepository(Webhook);
    this.deliveriesRepo = dataSource.getRepository(WebhookDelivery);
    this.box = new SecretBox(sessionSecret);
  }

  async list(): Promise<WebhookDto[]> {
    const rows = await this.hooks.find({ order: { id: 'ASC' } });
    const counts: { webhookId: number; status: DeliveryStatus; n: number | string }[] =
      await this.deliveriesRepo
        .createQueryBuilder('d')
        .select('d.webhook_id', 'webhookId')
        .addSelect('d.status', 'status')
        .addSelect('COUNT(*)', 'n')
        .groupBy('d.webhook_id')
        .addGroupBy('d.status')
        .getRawMany();
    return rows.map((row) => {
      const dto = this.toDto(row);
      for (const c of counts) if (Number(c.webhookId) === row.id) dto.counts[c.status] = Number(c.n);
      return dto;
    });
  }

  async get(id: number): Promise<WebhookDto> {
    const dto = (await this.list()).find((h) => h.id === id);
    if (!dto) throw AppError.notFound(`No webhook with id ${id}.`);
    return dto;
  }

  async create(input: CreateWebhookInput, actor: Actor): Promise<WebhookDto> {
    const now = new Date().toISOString();
    const id = await this.dataSource.transaction(async (manager) => {
      const row = await manager.save(
        manager.create(Webhook, {
          url: input.url,
          secretEncrypted: this.box.seal(input.secret),
          secretHint: input.secret.slice(-4),
          eventsJson: JSON.stringify(input.events),
          active: true,
          createdById: actor.id,
          createdAt: now,
          updatedAt: now,
        }),
      );
      await this.audit.record(
        {
          actor,
          action: 'create',
          entity: 'webhook',
          entityId: row.id,
          summary: `Registered webhook ${input.url} for ${input.events.join(', ')}`,
          after: { url: input.url, events: input.events },
        },
        manager,
      );
      return row.id;
    });
    return this.get(id);
  }

  async update(id: number, input: UpdateWebhookInput, actor: Actor): Promise<WebhookDto> {
    const row = await this.hooks.findOneBy({ id });
    if (!row) throw AppError.notFound(`No webhook with id ${id}.`);
    const before = { url: row.url, events: JSON.parse(row.eventsJson) as WebhookEvent[], active: row.active };
    const after = {
      url: input.url ?? before.url,
      events: input.events ?? before.events,
      active: input.active ?? before.active,
    };
    const changes: Partial<Webhook> = {
      url: after.url,
      eventsJson: JSON.stringify(after.events),
      active: after.active,
      updatedAt: new Date().toISOString(),
    };
    if (input.secret) {
      changes.secretEncrypted = this.box.seal(input.secret);
      changes.secretHint = input.secret.slice(-4);
    }
    const what = [
      input.url && input.url !== before.url ? 'URL' : null,
      input.events ? 'events' : null,
      input.secret ? 'secret' : null,
      input.active === false && before.active ? 'disabled' : null,
      input.active === true && !before.active ? 'enabled' : null,
    ].filter(Boolean);
    await this.dataSource.transaction(async (manager) => {
      await manager.update(Webhook, { id }, changes);
      await this.audit.record(
        {
          actor,
          action: 'update',
          entity: 'webhook',
          entityId: id,
          summary: `Changed webhook ${after.url}${what.length ? `: ${what.join(', ')}` : ''}`,
          before,
          after: { ...after, ...(input.secret ? { secret: 'replaced' } : {}) },
        },
        manager,
      );
    });
    return this.get(id);
  }

  /** Remove a receiver with its delivery log; queued tries for it then find nothing to send. */
  async remove(id: number, actor: Actor): Promise<void> {
    const row = await this.hooks.findOneBy({ id });
    if (!row) throw AppError.notFound(`No webhook with id ${id}.`);
    await this.dataSource.transaction(async (manager) => {
      await manager.delete(WebhookDelivery, { webhookId: id });
      await manager.delete(Webhook, { id });
      await this.audit.record(
        {
          actor,
          action: 'delete',
          entity: 'webhook',
          entityId: id,
          summary: `Removed webhook ${row.url} and its delivery log`,
          before: { url: row.url, events: JSON.parse(row.eventsJson) as unknown },
        },
        manager,
      );
    });
  }

  async deliveries(query: DeliveriesQuery): Promise<{ items: DeliveryDto[]; total: number }> {
    const qb = this.deliveriesRepo
      .createQueryBuilder('d')
      .leftJoin(Webhook, 'w', 'w.id = d.webhook_id')
      .select('d')
      .addSelect('w.url', 'url')
      .orderBy('d.id', 'DESC')
      .offset(query.page * query.pageSize)
      .limit(query.pageSize);
    if (query.webhookId !== undefined)
      qb.andWhere('d.webhook_id = :webhookId', { webhookId: query.webhookId });
    if (query.status) qb.andWhere('d.status = :status', { status: query.status });
    const [{ entities, raw }, total] = await Promise.all([qb.getRawAndEntities(), qb.getCount()]);
    return {
      items: entities.map((d, i) => this.toDeliveryDto(d, (raw[i] as { url?: string }).url ?? null)),
      total,
    };
  }

  async getDelivery(id: number): Promise<DeliveryDto> {
    const row = await this.deliveriesRepo.findOneBy({ id });
    if (!row) throw AppError.notFound(`No webhook delivery with id ${id}.`);
    const hook = await this.hooks.findOneBy({ id: row.webhookId });
    return this.toDeliveryDto(row, hook?.url ?? null);
  }

  /** Send a delivered or failed event again, with the same id and body (a fresh signature). */
  async resend(id: number, actor: Actor): Promise<DeliveryDto> {
    const row = await this.deliveriesRepo.findOneBy({ id });
    if (!row) throw AppError.notFound(`No webhook delivery with id ${id}.`);
    const hook = await this.hooks.findOneBy({ id: row.webhookId });
    if (!hook?.active) throw AppError.conflict('The webhook is disabled; enable it before sending again.');
    await this.dataSource.transaction(async (manager) => {
      const claimed = await manager
        .createQueryBuilder()
        .update(WebhookDelivery)
        .set({ status: 'pending', jobId: null })
        .where('id = :id AND status IN (:...final)', { id, final: ['delivered', 'failed'] })
        .execute();
      if (!claimed.affected)
        throw AppError.conflict('This delivery is still being sent; wait until it is delivered or failed.');
      await this.audit.record(
        {
          actor,
          action: 'resend',
          entity: 'webhook',
          entityId: hook.id,
          summary: `Sent ${row.event} ${row.eventId} to ${hook.url} again (it was ${row.status})`,
        },
        manager,
      );
    });
    await this.enqueue(id);
    return this.getDelivery(id);
  }

  /**
   * Record an event for every active receiver that wants it and queue the sending. `occurrence` names the
   * happening (e.g. "batch.approved:12:<approvedAt>"): the event id is derived from it, so the same
   * happening reported twice is recorded, and sent, once per receiver (the unique index).
   */
  async emit(
    event: WebhookEvent,
    occurrence: string,
    occurredAt: string,
    data: Record<string, unknown>,
  ): Promise<number> {
    const hooks = (await this.hooks.findBy({ active: true })).filter((h) =>
      (JSON.parse(h.eventsJson) as WebhookEvent[]).includes(event),
    );
    if (!hooks.length) return 0;
    const payload: WebhookPayload = { id: uuidV5(occurrence), event, occurredAt, data };
    const body = JSON.stringify(payload);
    let recorded = 0;
    for (const hook of hooks) {
      let deliveryId: number;
      try {
        const result = await this.deliveriesRepo.insert({
          eventId: payload.id,
          event,
          webhookId: hook.id,
          payload: body,
          status: 'pending',
          attempts: 0,
          lastResponseCode: null,
          lastError: null,
          jobId: null,
          createdAt: new Date().toISOString(),
          lastAttemptAt: null,
          deliveredAt: null,
        });
        deliveryId = Number((result.identifiers[0] as { id: number }).id);
      } catch (err) {
        if (await this.deliveriesRepo.existsBy({ eventId: payload.id, webhookId: hook.id })) continue;
        throw err;
      }
      recorded++;
      await this.enqueue(deliveryId);
    }
    return recorded;
  }

  private async enqueue(deliveryId: number): Promise<void> {
    const job = await this.queue.add('deliver', { deliveryId }, { attempts: this.config.maxAttempts });
    await this.deliveriesRepo.update({ id: deliveryId }, { jobId: Number(job.id) });
  }

  /** Deliveries recorded but never queued (a crash between the two steps) get their job now. */
  async recoverUnqueued(): Promise<number> {
    const rows = await this.deliveriesRepo.find({ where: { status: 'pending', jobId: IsNull() } });
    for (const row of rows) await this.enqueue(row.id);
    return rows.length;
  }

  /**
   * The queue's processor: one try. Skips what is already final (a job re-run after a restart sends
   * nothing twice); a 2xx answer is delivered; anything else is recorded and thrown so the queue retries.
   */
  async process(job: Job<WebhookJobData>): Promise<DeliveryStatus | 'gone'> {
    const id = job.data.deliveryId;
    if (this.sending.has(id)) return 'pending';
    this.sending.add(id);
    try {
      return await this.sendOnce(id);
    } finally {
      this.sending.delete(id);
    }
  }

  private async sendOnce(id: number): Promise<DeliveryStatus | 'gone'> {
    const delivery = await this.deliveriesRepo.findOneBy({ id });
    if (!delivery) return 'gone';
    if (delivery.status !== 'pending') return delivery.status;
    const hook = await this.hooks.findOneBy({ id: delivery.webhookId });
    if (!hook) return 'gone';
    const attempts = delivery.attempts + 1;
    const now = new Date();
    const record = (changes: Partial<WebhookDelivery>) =>
      this.deliveriesRepo.update(
        { id, status: 'pending' },
        { attempts, lastAttemptAt: now.toISOString(), ...changes },
      );
    if (!hook.active) {
      await record({ status: 'failed', lastError: 'The webhook is disabled.', lastResponseCode: null });
      return 'failed';
    }
    let secret: string;
    try {
      secret = this.box.open(hook.secretEncrypted);
    } catch (err) {
      // Trying again cannot help: say so at once.
      await record({ status: 'failed', lastError: (err as Error).message, lastResponseCode: null });
      return 'failed';
    }

    let res: Response;
    try {
      res = await fetch(hook.url, {
        method: 'POST',
        headers: {
          'Content-Type': 'application/json',
          'User-Agent': USER_AGENT,
          'X-Equilight-Signature': signatureHeader(
            secret,
            delivery.payload,
            Math.floor(now.getTime() / 1000),
          ),
        },
        body: delivery.payload,
        // A redirect is an answer that is not 2xx: the signed body goes only where the admin pointed it.
        redirect: 'manual',
        signal: AbortSignal.timeout(this.config.timeoutMs),
      });
    } catch (err) {
      const message = describeFetchError(err, this.config.timeoutMs);
      await record({ lastError: message, lastResponseCode: null });
      throw new Error(message, { cause: err });
    }
    const snippet = await responseSnippet(res);
    if (res.status >= 200 && res.status < 300) {
      await record({
        status: 'delivered',
        lastResponseCode: res.status,
        lastError: null,
        deliveredAt: new Date().toISOString(),
      });
      return 'delivered';
    }
    const message = `The receiver answered HTTP ${res.status}${snippet ? `: ${snippet}` : ''}`;
    await record({ lastResponseCode: res.status, lastError: message });
    throw new Error(message);
  }

  /** The queue gave up after the last try. */
  async markFailed(job: Job<WebhookJobData>): Promise<void> {
    await this.deliveriesRepo.update(
      { id: job.data.deliveryId, status: In(['pending']) },
      { status: 'failed' },
    );
  }

  private toDto(row: Webhook): WebhookDto {
    return {
      id: row.id,
      url: row.url,
      events: JSON.parse(row.eventsJson) as WebhookEvent[],
      active: row.active,
      secretMasked: mask(row.secretHint),
      createdAt: row.createdAt,
      updatedAt: row.updatedAt,
      counts: { pending: 0, delivered: 0, failed: 0 },
    };
  }

  private toDeliveryDto(row: WebhookDelivery, url: string | null): DeliveryDto {
    return {
      id: row.id,
      eventId: row.eventId,
      event: row.event,
      webhookId: row.webhookId,
      url,
      status: row.status,
      attempts: row.attempts,
      lastResponseCode: row.lastResponseCode,
      lastError: row.lastError,
      createdAt: row.createdAt,
      lastAttemptAt: row.lastAttemptAt,
      deliveredAt: row.deliveredAt,
      payload: JSON.parse(row.payload) as unknown,
    };
  }
}
