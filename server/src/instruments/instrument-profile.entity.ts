import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn, UpdateDateColumn } from 'typeorm';

import type { FileFormat, InstrumentKind, PlateFormat } from '../contracts/enums';
import type { ParsingRules } from '../contracts/settings';

export type { InstrumentKind } from '../contracts/enums';
export type ProfilePlateFormat = PlateFormat;
export type ProfileFileFormat = FileFormat;
export type ProfileRules = ParsingRules;

/** One instrument: how its exports are read, where they land, and its service-account token. */
@Entity('instrument_profiles')
export class InstrumentProfile {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  @Column('varchar', { length: 120, unique: true })
  name!: string;

  @Column('varchar', { length: 40 })
  kind!: InstrumentKind;

  @Column('varchar', { name: 'plate_format', length: 10 })
  plateFormat!: ProfilePlateFormat;

  @Column('varchar', { name: 'file_format', length: 20 })
  fileFormat!: ProfileFileFormat;

  /** Parsing rules as JSON text (delimiter, decimal mark, encoding, skipped lines, column names). */
  @Column('text', { name: 'rules_json' })
  rulesJson!: string;

  @Column('double precision', { name: 'path_length_cm', nullable: true })
  pathLengthCm!: number | null;

  @Column('double precision', { name: 'fill_volume_ul', nullable: true })
  fillVolumeUl!: number | null;

  @Column('double precision', { name: 'well_diameter_mm', nullable: true })
  wellDiameterMm!: number | null;

  @Column('double precision', { name: 'default_wavelength_nm', nullable: true })
  defaultWavelengthNm!: number | null;

  @Column('varchar', { name: 'drop_subfolder', length: 80, unique: true })
  dropSubfolder!: string;

  /** A regular expression on the file name; its `run` group (or first group) names the run. */
  @Column('varchar', { name: 'file_name_pattern', length: 200, nullable: true })
  fileNamePattern!: string | null;

  @Column('boolean', { default: true })
  active!: boolean;

  /** SHA-256 of the instrument token; the token itself is shown once and never stored. */
  @Column('varchar', { name: 'token_hash', length: 64, nullable: true, unique: true })
  tokenHash!: string | null;

  @Column('varchar', { name: 'token_prefix', length: 16, nullable: true })
  tokenPrefix!: string | null;

  @Column('varchar', { name: 'token_created_at', length: 30, nullable: true })
  tokenCreatedAt!: string | null;

  @CreateDateColumn({ name: 'created_at' })
  createdAt!: Date;

  @UpdateDateColumn({ name: 'updated_at' })
  updatedAt!: Date;
}
