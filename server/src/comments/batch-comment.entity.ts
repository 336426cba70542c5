import { Column, Entity, Index, PrimaryGeneratedColumn } from 'typeorm';

import type { Role } from '../contracts/roles';

/**
 * A comment on a batch. Comments never change the analysis, so an approved batch takes them too.
 * Removing one empties `text` and sets `removedAt`: the thread keeps its place, the audit keeps the words.
 */
@Entity('batch_comments')
@Index('idx_batch_comments_batch', ['batchId', 'id'])
export class BatchCommentRow {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('integer', { name: 'batch_id' })
  batchId!: number;

  /** The comment that opens this one's thread; null when this one opens it. */
  @Column('integer', { name: 'reply_to_id', nullable: true })
  replyToId!: number | null;

  @Column('integer', { name: 'author_id', nullable: true })
  authorId!: number | null;

  /** The author's name and role when they wrote it. */
  @Column('varchar', { name: 'author_name', length: 120 })
  authorName!: string;

  @Column('varchar', { name: 'author_role', length: 20 })
  authorRole!: Role;

  @Column('varchar', { name: 'created_at', length: 30 })
  createdAt!: string;

  @Column('text')
  text!: string;

  @Column('varchar', { name: 'removed_at', length: 30, nullable: true })
  removedAt!: string | null;

  @Column('integer', { name: 'removed_by_id', nullable: true })
  removedById!: number | null;

  @Column('varchar', { name: 'removed_by_name', length: 120, nullable: true })
  removedByName!: string | null;
}
