import { Column, Entity, Index, PrimaryGeneratedColumn } from 'typeorm';

export type JobStatus = 'waiting' | 'active' | 'completed' | 'failed';

/** A queued unit of work, kept in the database so a restart (even kill -9) resumes it. */
@Entity('jobs')
@Index('idx_jobs_queue_status', ['queue', 'status'])
export class JobRow {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('varchar', { length: 60 })
  queue!: string;

  @Column('varchar', { length: 60 })
  name!: string;

  @Column('text')
  data!: string;

  @Column('varchar', { length: 12 })
  status!: JobStatus;

  @Column('integer', { name: 'attempts_made', default: 0 })
  attemptsMade!: number;

  @Column('integer', { name: 'max_attempts', default: 3 })
  maxAttempts!: number;

  @Column('text', { name: 'failed_reason', nullable: true })
  failedReason!: string | null;

  @Column('bigint', { name: 'created_at' })
  createdAt!: number;

  @Column('bigint', { name: 'finished_at', nullable: true })
  finishedAt!: number | null;
}
