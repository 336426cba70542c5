import { Column, Entity, PrimaryColumn } from 'typeorm';

/**
 * One chemical system of the Temperatures page: a generation that grows with every change to one of its
 * batches (made, a state change, a stored or recomputed headline: inside that change's own transaction),
 * and its stored answers (fit, counts, groups; approved batches only and all batches) with the generation
 * and format they were worked out for. An answer of an older generation or format is worked out again.
 */
@Entity('temperature_systems')
export class TemperatureSystemRow {
  @PrimaryColumn('varchar', { name: 'system_name', length: 120 })
  systemName!: string;

  @Column('integer')
  generation!: number;

  @Column('integer', { name: 'answers_generation', nullable: true })
  answersGeneration!: number | null;

  /** The shape and analysis engine `answers_json` is of (`answersFormat`); another is worked out again. */
  @Column('varchar', { name: 'answers_format', length: 160, nullable: true })
  answersFormat!: string | null;

  /** `{ approved, all }`: the system's answer over approved batches only, and over all of them. */
  @Column('text', { name: 'answers_json', nullable: true })
  answersJson!: string | null;
}
