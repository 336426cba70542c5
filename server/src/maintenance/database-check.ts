import type { AppConfig } from '../config';
import { createDataSource } from '../database/data-source';
import { assertDatabaseFileNotEmpty } from '../database/integrity';
import { createArchive } from '../ingest/create-archive';
import { checkArchive } from './archive-check';
import { integrityProblems } from './backup';

/**
 * The full check an administrator runs on demand (`npm run db:check`): SQLite's `integrity_check` of the
 * whole file (pages, records and every index), then the raw-file archive (folder or bucket) — every file, or a random
 * sample of `archiveSample`. Returns one sentence per problem; [] when all is well. Read-only.
 */
export async function checkDatabaseAndArchive(
  config: Pick<AppConfig, 'database' | 'dataDir' | 'archive'>,
  archiveSample?: number,
): Promise<string[]> {
  if (config.database.type !== 'sqlite')
    return ['database: the full check is for SQLite; use PostgreSQL tools'];
  const file = config.database.file;
  try {
    assertDatabaseFileNotEmpty(file);
  } catch (err) {
    return [`database: ${(err as Error).message}`];
  }
  const problems = integrityProblems(file).map((line) => `database: ${line}`);
  if (problems.length) return problems;
  const dataSource = createDataSource(config);
  await dataSource.initialize();
  const archive = createArchive(config.archive);
  try {
    return await checkArchive(dataSource, archive, archiveSample ?? 'all');
  } finally {
    archive.close();
    await dataSource.destroy();
  }
}
