import { Column, Entity, Index, PrimaryColumn, PrimaryGeneratedColumn } from 'typeorm';

/** One message the local SMTP stand-in received. */
@Entity('outbox_messages')
export class OutboxMessage {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('text', { name: 'from_address' })
  from!: string;

  @Column('text', { name: 'to_address' })
  to!: string;

  @Column('text')
  subject!: string;

  @Column('text', { name: 'text_body', nullable: true })
  text!: string | null;

  @Column('text', { name: 'html_body', nullable: true })
  html!: string | null;

  @Column('integer', { name: 'raw_size' })
  rawSize!: number;

  @Column('varchar', { name: 'received_at', length: 30 })
  receivedAt!: string;
}

/** Which mails a person wants; a person without a row gets all of them. */
@Entity('notification_settings')
export class NotificationSettingsRow {
  @PrimaryColumn('integer', { name: 'user_id' })
  userId!: number;

  @Column('boolean', { name: 'batch_complete', default: true })
  batchComplete!: boolean;

  @Column('boolean', { name: 'qc_failure', default: true })
  qcFailure!: boolean;

  @Column('boolean', { name: 'batch_approved', default: true })
  batchApproved!: boolean;

  @Column('varchar', { name: 'updated_at', length: 30 })
  updatedAt!: string;
}

/** A once-per-batch notice (complete, QC failure) that has gone out, so a restart sends it no second time. */
@Entity('batch_notices')
@Index('uq_batch_notices', ['batchId', 'kind'], { unique: true })
export class BatchNotice {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('integer', { name: 'batch_id' })
  batchId!: number;

  @Column('varchar', { length: 30 })
  kind!: string;

  @Column('varchar', { name: 'sent_at', length: 30 })
  sentAt!: string;
}
