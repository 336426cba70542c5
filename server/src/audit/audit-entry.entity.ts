import { Column, Entity, Index, PrimaryGeneratedColumn } from 'typeorm';

import type { AuditEntity } from '../contracts/enums';

export type { AuditEntity } from '../contracts/enums';

/** One change: who, when, what, why. Written by the app, never edited or deleted by it. */
@Entity('audit_entries')
@Index('idx_audit_entity', ['entity', 'entityId'])
export class AuditEntry {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('varchar', { length: 30 })
  at!: string;

  @Column('integer', { name: 'actor_id', nullable: true })
  actorId!: number | null;

  @Column('varchar', { name: 'actor_name', length: 254 })
  actorName!: string;

  @Column('varchar', { length: 30 })
  action!: string;

  @Column('varchar', { length: 30 })
  entity!: AuditEntity;

  @Column('integer', { name: 'entity_id' })
  entityId!: number;

  @Column('text')
  summary!: string;

  @Column('text', { name: 'before_json', nullable: true })
  beforeJson!: string | null;

  @Column('text', { name: 'after_json', nullable: true })
  afterJson!: string | null;

  @Column('text', { nullable: true })
  reason!: string | null;
}
