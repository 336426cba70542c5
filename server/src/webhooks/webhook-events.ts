import type { BatchesService } from '../batches/batches.service';
import type { EventBus, LiveEvent } from '../events/event-bus';
import type { IngestService } from '../ingest/ingest.service';
import type { BatchMailer, QcFailureNotice } from '../mail/batch-mailer';
import type { WebhooksService } from './webhooks.service';

/**
 * The one place that turns the app's events into webhook events:
 * - `batch.approved`: a `batch.updated` with state `approved`, checked against the stored batch;
 * - `batch.qc_failed`: when the mail module claims a batch's once-only QC-failure notice (same trigger);
 * - `file.quarantined`: the ingest event, with the file's name, SHA-256 and the reason.
 */
export class WebhookEvents {
  private readonly pending = new Set<Promise<void>>();
  private unsubscribe: (() => void) | null = null;
  private qcHooked = false;

  constructor(
    private readonly webhooks: WebhooksService,
    private readonly batches: BatchesService,
    private readonly ingest: IngestService,
    private readonly publicUrl: string,
    private readonly log: (message: string, err?: unknown) => void,
  ) {}

  start(events: EventBus, batchMailer: BatchMailer): void {
    if (this.unsubscribe) return;
    // This process's events only: with several processes, each event is then recorded once in all.
    this.unsubscribe = events.subscribeLocal((event) => this.onEvent(event));
    if (!this.qcHooked) batchMailer.onQcFailure((notice) => this.qcFailed(notice));
    this.qcHooked = true;
  }

  stop(): void {
    this.unsubscribe?.();
    this.unsubscribe = null;
  }

  /** Wait until every event seen so far is recorded (tests, shutdown). */
  async idle(): Promise<void> {
    while (this.pending.size) await Promise.allSettled([...this.pending]);
  }

  private onEvent(event: LiveEvent): void {
    if (event.type === 'batch.updated' && event.data['state'] === 'approved')
      this.track(this.approved(event.data.id));
    else if (event.type === 'file.quarantined') this.track(this.quarantined(event.data.id));
  }

  private track(work: Promise<void>): void {
    const tracked = work.catch((err: unknown) => this.log('Could not record a webhook event', err));
    this.pending.add(tracked);
    void tracked.finally(() => this.pending.delete(tracked));
  }

  private batchUrl(id: number): string {
    return `${this.publicUrl}/batches/${id}`;
  }

  private async approved(batchId: number): Promise<void> {
    const batch = await this.batches.get(batchId);
    if (batch.state !== 'approved' || !batch.approvedAt) return;
    await this.webhooks.emit(
      'batch.approved',
      `batch.approved:${batch.id}:${batch.approvedAt}`,
      batch.approvedAt,
      {
        batchId: batch.id,
        name: batch.name,
        state: batch.state,
        runId: batch.runId,
        instrument: batch.profileName,
        approvedBy: batch.approvedBy,
        approvedAt: batch.approvedAt,
        comment: batch.approvalComment,
        bestModel: batch.summary?.best ?? null,
        kText: batch.summary?.kText ?? null,
        url: this.batchUrl(batch.id),
      },
    );
  }

  private async qcFailed({ batch, best, errors }: QcFailureNotice): Promise<void> {
    await this.webhooks.emit('batch.qc_failed', `batch.qc_failed:${batch.id}`, new Date().toISOString(), {
      batchId: batch.id,
      name: batch.name,
      state: batch.state,
      runId: batch.runId,
      instrument: batch.profileName,
      bestModel: best?.model ?? null,
      kText: best?.kText ?? null,
      qcErrors: errors.map((f) => ({ code: f.code, message: f.message, position: f.position })),
      url: this.batchUrl(batch.id),
    });
  }

  private async quarantined(fileId: number): Promise<void> {
    const file = await this.ingest.getDto(fileId);
    if (file.status !== 'quarantined') return;
    const at = file.finishedAt ?? file.receivedAt;
    await this.webhooks.emit('file.quarantined', `file.quarantined:${file.id}:${at}`, at, {
      fileId: file.id,
      name: file.originalName,
      sha256: file.sha256,
      sizeBytes: file.sizeBytes,
      instrument: file.profileName,
      reason: file.error,
      receivedAt: file.receivedAt,
    });
  }
}
