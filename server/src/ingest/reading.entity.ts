import { Column, Entity, Index, PrimaryGeneratedColumn } from 'typeorm';

/** One stored absorbance reading, traceable to the intake file it came from. */
@Entity('readings')
@Index('idx_readings_intake_file', ['intakeFileId'])
export class ReadingRow {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('integer', { name: 'intake_file_id' })
  intakeFileId!: number;

  @Column('varchar', { length: 8 })
  position!: string;

  @Column('double precision', { name: 'wavelength_nm' })
  wavelengthNm!: number;

  /** Null when the instrument gave no number (see flag): never a zero. */
  @Column('double precision', { nullable: true })
  absorbance!: number | null;

  @Column('varchar', { length: 12, nullable: true })
  flag!: string | null;

  @Column('varchar', { name: 'read_time', length: 40, nullable: true })
  readTime!: string | null;

  @Column('double precision', { name: 'temperature_c', nullable: true })
  temperatureC!: number | null;

  @Column('integer', { nullable: true })
  replicate!: number | null;
}
