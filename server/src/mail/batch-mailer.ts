import type { DataSource } from 'typeorm';
import { type BatchResult, describeControl, type QcFlag } from '../analysis';
import type { BatchDto, BatchesService } from '../batches/batches.service';
import type { EventBus, LiveEvent } from '../events/event-bus';
import { BatchNotice } from './mail.entity';
import { type BatchSummary, batchApprovedMail, batchCompleteMail, qcFailureMail } from './mail-templates';
import type { MailService } from './mail.service';
import type { NotificationsService } from './notifications.service';

/** The batch's one K as the page and the PDF state it (a bound or a failed fit reads as such). */
function bestOf(result: BatchResult): BatchSummary['best'] {
  return result.headline ? { model: result.headline.model, kText: result.headline.text } : null;
}

/** A batch whose QC-failure notice was just claimed: told to other channels than mail (webhooks). */
export interface QcFailureNotice {
  batch: BatchDto;
  best: { model: string; kText: string } | null;
  errors: QcFlag[];
}

/**
 * Turns batch events into mail: "batch complete" and "QC errors" once per batch when all its expected
 * files are stored, and "batch approved" on each approval.
 */
export class BatchMailer {
  private readonly chains = new Map<number, Promise<void>>();
  private unsubscribe: (() => void) | null = null;
  private readonly qcFailureListeners: ((notice: QcFailureNotice) => Promise<void>)[] = [];

  constructor(
    private readonly dataSource: DataSource,
    private readonly batches: BatchesService,
    private readonly notifications: NotificationsService,
    private readonly mail: MailService,
    private readonly publicUrl: string,
    private readonly log: (message: string, err?: unknown) => void = console.error,
  ) {}

  start(events: EventBus): void {
    // This process's events only: with several processes, each event is then handled once in all.
    this.unsubscribe ??= events.subscribeLocal((event) => this.onEvent(event));
  }

  /** Also tell `listener` once per batch when its QC-failure notice is claimed (the same trigger as the mail). */
  onQcFailure(listener: (notice: QcFailureNotice) => Promise<void>): void {
    this.qcFailureListeners.push(listener);
  }

  stop(): void {
    this.unsubscribe?.();
    this.unsubscribe = null;
  }

  /** Wait for the work already triggered (tests, shutdown). */
  async idle(): Promise<void> {
    while (this.chains.size) await Promise.allSettled([...this.chains.values()]);
  }

  private onEvent(event: LiveEvent): void {
    if (event.type === 'batch.updated') {
      const state = event.data['state'];
      if (state === 'approved') this.enqueue(event.data.id, () => this.approved(event.data.id));
      else if (state === undefined || state === 'open')
        this.enqueue(event.data.id, () => this.checkComplete(event.data.id));
    } else if (event.type === 'file.stored' && typeof event.data['batchId'] === 'number') {
      const batchId = event.data['batchId'];
      this.enqueue(batchId, () => this.checkComplete(batchId));
    }
  }

  /** One batch at a time, in event order, so two events never send one notice twice. */
  private enqueue(batchId: number, work: () => Promise<void>): void {
    const previous = this.chains.get(batchId) ?? Promise.resolve();
    const next = previous
      .then(work)
      .catch((err: unknown) => this.log(`Could not prepare the mail for batch ${batchId}`, err));
    this.chains.set(batchId, next);
    void next.then(() => {
      if (this.chains.get(batchId) === next) this.chains.delete(batchId);
    });
  }

  private batchUrl(id: number): string {
    return `${this.publicUrl}/batches/${id}`;
  }

  /** Claim a once-per-batch notice; false when it has gone out before. */
  private async claim(batchId: number, kind: string): Promise<boolean> {
    const repo = this.dataSource.getRepository(BatchNotice);
    if (await repo.existsBy({ batchId, kind })) return false;
    try {
      await repo.insert({ batchId, kind, sentAt: new Date().toISOString() });
      return true;
    } catch {
      return false; // another process claimed it first (unique index)
    }
  }

  private async checkComplete(batchId: number): Promise<void> {
    const batch = await this.batches.get(batchId);
    if (batch.fileCount < batch.expectedFiles) return;
    if (!(await this.claim(batchId, 'complete'))) return;
    const analysis = await this.batches.analysis(batchId);
    const result = analysis.result;
    const errors = result.qc.filter((f) => f.severity === 'error');
    const summary: BatchSummary = {
      id: batch.id,
      name: batch.name,
      instrument: batch.profileName,
      fileCount: batch.fileCount,
      url: this.batchUrl(batch.id),
      best: bestOf(result),
      verdict: result.stoichiometry?.verdict ?? null,
      errorFlags: errors.length,
      controls: result.controls.map((c) => describeControl(c, result.settings)),
    };
    const people = await this.notifications.recipients('batchComplete', ['scientist', 'lab_manager']);
    for (const person of people) this.mail.send(person.email, batchCompleteMail(person.displayName, summary));
    if (errors.length && (await this.claim(batchId, 'qc_failure'))) {
      const qcPeople = await this.notifications.recipients('qcFailure', ['scientist', 'lab_manager']);
      for (const person of qcPeople)
        this.mail.send(
          person.email,
          qcFailureMail(person.displayName, { name: batch.name, url: this.batchUrl(batch.id) }, errors),
        );
      for (const listener of this.qcFailureListeners)
        await listener({ batch, best: summary.best, errors }).catch((err: unknown) =>
          this.log(`Could not pass on the QC failure of batch ${batchId}`, err),
        );
    }
  }

  private async approved(batchId: number): Promise<void> {
    const entity = await this.batches.getBatch(batchId);
    // An approved batch's analysis is its approval record: the mail states what was signed.
    const analysis = await this.batches.analysis(batchId);
    const batch = analysis.batch;
    if (batch.state !== 'approved') return;
    const record = analysis.record
      ? {
          id: analysis.record.id,
          engineVersion: analysis.record.engine.version,
          best: bestOf(analysis.result),
        }
      : undefined;
    const people = await this.notifications.recipients(
      'batchApproved',
      ['scientist', 'lab_manager'],
      entity.createdById ? [entity.createdById] : [],
    );
    for (const person of people)
      this.mail.send(
        person.email,
        batchApprovedMail(person.displayName, {
          name: batch.name,
          url: this.batchUrl(batch.id),
          approver: batch.approvedBy ?? 'A lab manager',
          comment: batch.approvalComment ?? '',
          approvedAt: batch.approvedAt,
          record,
        }),
      );
  }
}
