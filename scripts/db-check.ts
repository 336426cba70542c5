/**
 * Full check of the database and the raw-file archive, on demand.
 *
 *   npm run db:check [-- --sample <n>]
 *
 * Reads the same configuration as the server (DATA_DIR, DATABASE_URL, ARCHIVE_URL). Runs SQLite's
 * integrity_check and re-hashes every archived raw file, in the folder or the bucket (or a random sample
 * of n). Exits 0 when all is well, 1 with one line per problem otherwise. Read-only; safe while the
 * server runs.
 */
import { parseArgs } from 'node:util';
import { loadConfig } from '../server/src/config';
import { checkDatabaseAndArchive } from '../server/src/maintenance/database-check';

async function main(): Promise<void> {
  const { values } = parseArgs({ options: { sample: { type: 'string' } } });
  const sample = values.sample === undefined ? undefined : Number(values.sample);
  if (sample !== undefined && !(Number.isInteger(sample) && sample > 0))
    throw new Error(`--sample needs a positive whole number, got "${values.sample}"`);
  const config = loadConfig();
  const problems = await checkDatabaseAndArchive(config, sample);
  const where = config.database.type === 'sqlite' ? config.database.file : 'PostgreSQL';
  if (problems.length === 0) {
    console.log(`ok: ${where} passes integrity_check and the archive matches`);
    return;
  }
  for (const problem of problems) console.log(problem);
  process.exitCode = 1;
}

main().catch((err: unknown) => {
  console.error(err instanceof Error ? err.message : err);
  process.exitCode = 2;
});
