import type { DataSource, EntityManager } from 'typeorm';
import type { SystemTemperatures } from '../contracts/temperatures';
import { TemperatureSystemRow } from './temperature-system.entity';

/** The shape of the stored answers; change it when `SystemTemperatures` or how it is worked out changes. */
export const ANSWERS_FORMAT = 'system-temperatures/1';

/**
 * What stored answers must have been worked out with to be served: this shape and this analysis engine
 * (the van 't Hoff fit is the analysis module's), as a stored batch result is checked against its engine.
 */
export function answersFormat(engineVersion: string): string {
  return `${ANSWERS_FORMAT}@${engineVersion}`;
}

/** A system's two answers: over its approved batches only, and over all its batches. */
export interface SystemAnswers {
  approved: SystemTemperatures;
  all: SystemTemperatures;
}

/**
 * Inside a change's transaction (a batch made, its state changed, its headline stored): the batch's
 * chemical system, when it has one and a temperature, gets a new generation, so its stored answers are
 * worked out again. One statement both databases understand; a system met for the first time gets its row.
 */
export async function markTemperatureSystemChanged(manager: EntityManager, batchId: number): Promise<void> {
  const id = manager.connection.driver.createParameter('batchId', 0);
  await manager.query(
    'INSERT INTO temperature_systems (system_name, generation) ' +
      `SELECT b.system_name, 1 FROM batches b WHERE b.id = ${id} AND b.system_name IS NOT NULL AND b.temperature_c IS NOT NULL ` +
      'ON CONFLICT (system_name) DO UPDATE SET generation = temperature_systems.generation + 1',
    [batchId],
  );
}

/** Whether a row's stored answers are of its current generation and of this format (`answersFormat`). */
export function answersAreCurrent(row: TemperatureSystemRow, format: string): boolean {
  return row.answersGeneration === row.generation && row.answersFormat === format && !!row.answersJson;
}

/** The stored answers of a row, when they are current. */
export function currentAnswers(row: TemperatureSystemRow, format: string): SystemAnswers | null {
  return answersAreCurrent(row, format) ? (JSON.parse(row.answersJson!) as SystemAnswers) : null;
}

/** Reads and writes of `temperature_systems`. */
export class TemperatureSystemStore {
  constructor(private readonly dataSource: DataSource) {}

  /** Every system with a batch at a temperature (a handful of rows, whatever the number of batches). */
  all(): Promise<TemperatureSystemRow[]> {
    return this.dataSource.manager.find(TemperatureSystemRow);
  }

  one(systemName: string): Promise<TemperatureSystemRow | null> {
    return this.dataSource.manager.findOneBy(TemperatureSystemRow, { systemName });
  }

  /**
   * Store answers worked out at `generation` (read before the batches were), unless a change has moved
   * the system on since: those answers may already miss it, and the next read works them out again.
   */
  async save(systemName: string, generation: number, format: string, answers: SystemAnswers): Promise<void> {
    await this.dataSource
      .createQueryBuilder()
      .update(TemperatureSystemRow)
      .set({
        answersGeneration: generation,
        answersFormat: format,
        answersJson: JSON.stringify(answers),
      })
      .where('system_name = :systemName AND generation = :generation', { systemName, generation })
      .execute();
  }
}
