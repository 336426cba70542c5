import type { DataSource } from 'typeorm';
import type { AuditService } from '../audit/audit.service';
import { Batch } from '../batches/batch.entity';
import { AppError } from '../common/app-error';
import type { BatchComment } from '../contracts/comments';
import type { Role } from '../contracts/roles';
import type { EventBus } from '../events/event-bus';
import { BatchCommentRow } from './batch-comment.entity';

/** Who writes or removes a comment: the signed-in person. */
export interface Commenter {
  id: number;
  email: string;
  displayName: string;
  role: Role;
}

/** The role that may remove anyone's comment; everyone else removes only their own. */
export const COMMENT_MODERATOR_ROLE: Role = 'lab_manager';

function toDto(row: BatchCommentRow): BatchComment {
  const removed = row.removedAt !== null;
  return {
    id: row.id,
    batchId: row.batchId,
    replyToId: row.replyToId,
    authorId: row.authorId,
    authorName: row.authorName,
    authorRole: row.authorRole,
    createdAt: row.createdAt,
    text: removed ? null : row.text,
    removed,
    removedAt: row.removedAt,
    removedBy: row.removedByName,
  };
}

/**
 * Threads in reading order: each comment that opens a thread, oldest first, followed by its replies,
 * oldest first. Ids grow with time, so they break ties between comments of the same millisecond.
 */
export function threadOrder<T extends { id: number; replyToId: number | null; createdAt: string }>(
  comments: readonly T[],
): T[] {
  const byTime = (a: T, b: T) => a.createdAt.localeCompare(b.createdAt) || a.id - b.id;
  const replies = new Map<number, T[]>();
  for (const c of comments) {
    if (c.replyToId !== null) replies.set(c.replyToId, [...(replies.get(c.replyToId) ?? []), c]);
  }
  const known = new Set(comments.map((c) => c.id));
  // A reply whose first comment is not in the list still shows, as a thread of its own.
  const openers = comments.filter((c) => c.replyToId === null || !known.has(c.replyToId)).sort(byTime);
  return openers.flatMap((c) =>
    c.replyToId === null ? [c, ...(replies.get(c.id) ?? []).sort(byTime)] : [c],
  );
}

/**
 * Comments on a batch: read by everyone who reads batches, written by scientists and lab managers.
 * Comments are notes beside the analysis, never part of it, so an approved batch still takes them and
 * its approval record does not change. Every comment and removal is audited against its batch.
 */
export class CommentsService {
  constructor(
    private readonly dataSource: DataSource,
    private readonly audit: AuditService,
    private readonly events: EventBus,
  ) {}

  private async batch(batchId: number): Promise<Batch> {
    const batch = await this.dataSource.getRepository(Batch).findOneBy({ id: batchId });
    if (!batch) throw AppError.notFound(`No batch with id ${batchId}.`);
    return batch;
  }

  async list(batchId: number): Promise<BatchComment[]> {
    await this.batch(batchId);
    const rows = await this.dataSource
      .getRepository(BatchCommentRow)
      .find({ where: { batchId }, order: { id: 'ASC' } });
    return threadOrder(rows.map(toDto));
  }

  async add(
    batchId: number,
    input: { text: string; replyToId?: number | null },
    author: Commenter,
  ): Promise<BatchComment> {
    const batch = await this.batch(batchId);
    const replyToId = input.replyToId ?? null;
    const id = await this.dataSource.transaction(async (manager) => {
      if (replyToId !== null) {
        const parent = await manager.findOneBy(BatchCommentRow, { id: replyToId, batchId });
        if (!parent)
          throw AppError.badRequest(`replyToId: no comment ${replyToId} on batch "${batch.name}".`);
        if (parent.replyToId !== null)
          throw AppError.badRequest(
            `replyToId: comment ${replyToId} is itself a reply; reply to the comment that opens its thread (${parent.replyToId}).`,
          );
        if (parent.removedAt !== null)
          throw AppError.conflict(`Comment ${replyToId} was removed; it takes no more replies.`);
      }
      const inserted = await manager.insert(BatchCommentRow, {
        batchId,
        replyToId,
        authorId: author.id,
        authorName: author.displayName,
        authorRole: author.role,
        createdAt: new Date().toISOString(),
        text: input.text,
        removedAt: null,
        removedById: null,
        removedByName: null,
      });
      const newId = Number(inserted.identifiers[0]!['id']);
      await this.audit.record(
        {
          actor: author,
          action: 'comment',
          entity: 'batch',
          entityId: batchId,
          summary: `${replyToId === null ? 'Commented on' : `Replied to comment ${replyToId} on`} batch "${batch.name}"${batch.state === 'approved' ? ' (approved)' : ''}`,
          after: { commentId: newId, replyToId, text: input.text },
        },
        manager,
      );
      return newId;
    });
    this.events.publish('batch.comment', { id, batchId, change: 'added' });
    return this.get(batchId, id);
  }

  /**
   * Remove a comment: its author may, and so may a lab manager. The thread keeps a "comment removed"
   * placeholder (replies stay under it); the audit entry keeps what it said.
   */
  async remove(batchId: number, commentId: number, actor: Commenter): Promise<BatchComment> {
    const batch = await this.batch(batchId);
    await this.dataSource.transaction(async (manager) => {
      const row = await manager.findOneBy(BatchCommentRow, { id: commentId, batchId });
      if (!row) throw AppError.notFound(`No comment ${commentId} on batch "${batch.name}".`);
      if (row.authorId !== actor.id && actor.role !== COMMENT_MODERATOR_ROLE)
        throw AppError.forbidden('Only its author or a lab manager may remove a comment.');
      if (row.removedAt !== null) throw AppError.conflict(`Comment ${commentId} was already removed.`);
      const now = new Date().toISOString();
      // Conditional, so two removals at once record one.
      const result = await manager
        .createQueryBuilder()
        .update(BatchCommentRow)
        .set({ removedAt: now, removedById: actor.id, removedByName: actor.displayName, text: '' })
        .where('id = :id AND removed_at IS NULL', { id: commentId })
        .execute();
      if (result.affected !== 1) throw AppError.conflict(`Comment ${commentId} was already removed.`);
      await this.audit.record(
        {
          actor,
          action: 'comment_remove',
          entity: 'batch',
          entityId: batchId,
          summary: `Removed ${row.authorId === actor.id ? 'their own' : `${row.authorName}'s`} comment ${commentId} on batch "${batch.name}"`,
          before: {
            commentId,
            replyToId: row.replyToId,
            author: row.authorName,
            createdAt: row.createdAt,
            text: row.text,
          },
          after: { commentId, removedAt: now },
        },
        manager,
      );
    });
    this.events.publish('batch.comment', { id: commentId, batchId, change: 'removed' });
    return this.get(batchId, commentId);
  }

  private async get(batchId: number, id: number): Promise<BatchComment> {
    const row = await this.dataSource.getRepository(BatchCommentRow).findOneBy({ id, batchId });
    if (!row) throw AppError.notFound(`No comment ${id} on batch ${batchId}.`);
    return toDto(row);
  }
}
