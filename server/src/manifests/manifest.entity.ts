import { Column, CreateDateColumn, Entity, Index, PrimaryGeneratedColumn, UpdateDateColumn } from 'typeorm';

/** A named sample manifest mapped onto a layout; its content lives in numbered versions. */
@Entity('manifests')
export class Manifest {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('varchar', { length: 120, unique: true })
  name!: string;

  @Column('integer', { name: 'layout_id' })
  layoutId!: number;

  @Column('integer', { name: 'current_version' })
  currentVersion!: number;

  @CreateDateColumn({ name: 'created_at' })
  createdAt!: Date;

  @UpdateDateColumn({ name: 'updated_at' })
  updatedAt!: Date;
}

@Entity('manifest_versions')
@Index('uq_manifest_versions', ['manifestId', 'version'], { unique: true })
export class ManifestVersion {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('integer', { name: 'manifest_id' })
  manifestId!: number;

  @Column('integer')
  version!: number;

  /** The layout version this manifest version was checked against. */
  @Column('integer', { name: 'layout_version' })
  layoutVersion!: number;

  /** JSON array of SampleDefinition. */
  @Column('text', { name: 'samples_json' })
  samplesJson!: string;

  @Column('varchar', { length: 10 })
  source!: 'csv' | 'xlsx' | 'form';

  @Column('varchar', { name: 'file_name', length: 255, nullable: true })
  fileName!: string | null;

  @Column('integer', { name: 'created_by_id', nullable: true })
  createdById!: number | null;

  @Column('varchar', { name: 'created_at', length: 30 })
  createdAt!: string;
}
