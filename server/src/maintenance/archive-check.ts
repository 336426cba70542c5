import type { DataSource } from 'typeorm';
import type { Archive } from '../ingest/archive';

/** How many archived raw files the start check reads and hashes again (a random sample). */
export const ARCHIVE_SAMPLE_SIZE = 20;

const short = (sha256: string): string => sha256.slice(0, 12);

/**
 * Check the raw-file archive against the database: the archive (its folder, or its bucket) must be
 * there once any file was received, and a random sample of archived files (or all of them) must still
 * be there with the SHA-256 they are filed under. Returns one sentence per problem; [] when all is well.
 */
export async function checkArchive(
  dataSource: DataSource,
  archive: Archive,
  sample: number | 'all' = ARCHIVE_SAMPLE_SIZE,
): Promise<string[]> {
  const [{ n }] = (await dataSource.query('SELECT COUNT(DISTINCT sha256) AS n FROM intake_files')) as {
    n: number;
  }[];
  const received = Number(n);
  if (received === 0) return [];
  const unreachable = await archive.unreachable();
  if (unreachable)
    return [`archive: ${unreachable}, but ${received} received file(s) should be archived there`];
  // A random sample of the distinct hashes (written so SQLite and PostgreSQL both take it).
  const limit = sample === 'all' ? '' : ` LIMIT ${Math.floor(sample)}`;
  const rows = (await dataSource.query(
    `SELECT d.sha256 FROM (SELECT DISTINCT sha256 FROM intake_files) d ORDER BY RANDOM()${limit}`,
  )) as { sha256: string }[];
  const missing: string[] = [];
  const changed: string[] = [];
  for (const { sha256 } of rows) {
    const state = await archive.verify(sha256);
    if (state === 'missing') missing.push(sha256);
    else if (state === 'changed') changed.push(sha256);
  }
  const problems: string[] = [];
  const of = `of ${rows.length} ${sample === 'all' ? '' : 'sampled '}archived files`;
  if (missing.length)
    problems.push(`archive: ${missing.length} ${of} are missing (${missing.map(short).join(', ')}…)`);
  if (changed.length)
    problems.push(
      `archive: ${changed.length} ${of} no longer match their SHA-256 (${changed.map(short).join(', ')}…)`,
    );
  return problems;
}
