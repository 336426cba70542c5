import { Column, Entity, PrimaryGeneratedColumn } from 'typeorm';

export { WEBHOOK_EVENTS, type WebhookEvent } from '../contracts/enums';

/** A receiver the lab registered (its LIMS or ELN): where to post, which events, and the signing secret. */
@Entity('webhooks')
export class Webhook {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('varchar', { length: 2048 })
  url!: string;

  /** The signing secret, AES-256-GCM encrypted (`webhook-secret.ts`); never sent back in full. */
  @Column('text', { name: 'secret_encrypted' })
  secretEncrypted!: string;

  /** The last four characters of the secret, so a person can tell secrets apart. */
  @Column('varchar', { name: 'secret_hint', length: 8 })
  secretHint!: string;

  /** JSON array of WebhookEvent names. */
  @Column('text', { name: 'events_json' })
  eventsJson!: string;

  @Column('boolean', { default: true })
  active!: boolean;

  @Column('integer', { name: 'created_by_id', nullable: true })
  createdById!: number | null;

  @Column('varchar', { name: 'created_at', length: 30 })
  createdAt!: string;

  @Column('varchar', { name: 'updated_at', length: 30 })
  updatedAt!: string;
}
