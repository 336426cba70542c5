import { Column, CreateDateColumn, Entity, Index, PrimaryGeneratedColumn, UpdateDateColumn } from 'typeorm';

import type { PlateFormat as LayoutFormat } from '../contracts/enums';

export type { PlateFormat as LayoutFormat } from '../contracts/enums';

/** A named, reusable plate or cuvette layout; its content lives in numbered versions. */
@Entity('layouts')
export class Layout {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('varchar', { length: 120, unique: true })
  name!: string;

  @Column('varchar', { length: 10 })
  format!: LayoutFormat;

  /** Cuvette sequences: how many positions C1…Cn. */
  @Column('integer', { name: 'cuvette_count', nullable: true })
  cuvetteCount!: number | null;

  @Column('integer', { name: 'current_version' })
  currentVersion!: number;

  @CreateDateColumn({ name: 'created_at' })
  createdAt!: Date;

  @UpdateDateColumn({ name: 'updated_at' })
  updatedAt!: Date;
}

/** One saved state of a layout. Batches point at a version, so later edits never change them. */
@Entity('layout_versions')
@Index('uq_layout_versions', ['layoutId', 'version'], { unique: true })
export class LayoutVersion {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('integer', { name: 'layout_id' })
  layoutId!: number;

  @Column('integer')
  version!: number;

  /** JSON array of { position, role, replicateGroup? }. */
  @Column('text', { name: 'positions_json' })
  positionsJson!: string;

  @Column('integer', { name: 'created_by_id', nullable: true })
  createdById!: number | null;

  @Column('varchar', { name: 'created_at', length: 30 })
  createdAt!: string;
}
