import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import type { DataSource } from 'typeorm';

/** How many archived raw files the start check reads and hashes again (a random sample). */
export const ARCHIVE_SAMPLE_SIZE = 20;

async function sha256OfFile(file: string): Promise<string> {
  const hash = crypto.createHash('sha256');
  for await (const chunk of fs.createReadStream(file)) hash.update(chunk as Buffer);
  return hash.digest('hex');
}

const short = (sha256: string): string => sha256.slice(0, 12);

/**
 * Check the raw-file archive against the database: the folder must exist once any file was received,
 * and a random sample of archived files (or all of them) must still be there
 * with the SHA-256 they are filed under. Returns one sentence per problem; [] when all is well.
 */
export async function checkArchive(
  dataSource: DataSource,
  archiveRoot: string,
  sample: number | 'all' = ARCHIVE_SAMPLE_SIZE,
): Promise<string[]> {
  const [{ n }] = (await dataSource.query('SELECT COUNT(DISTINCT sha256) AS n FROM intake_files')) as {
    n: number;
  }[];
  const received = Number(n);
  if (received === 0) return [];
  if (!fs.existsSync(archiveRoot))
    return [
      `archive: the raw-file folder ${archiveRoot} is missing, but ${received} received file(s) should be archived there`,
    ];
  const rows = (await dataSource.query(
    `SELECT DISTINCT sha256 FROM intake_files ORDER BY RANDOM()${sample === 'all' ? '' : ' LIMIT ?'}`,
    sample === 'all' ? [] : [sample],
  )) as { sha256: string }[];
  const missing: string[] = [];
  const changed: string[] = [];
  for (const { sha256 } of rows) {
    const file = path.join(archiveRoot, sha256.slice(0, 2), sha256);
    if (!fs.existsSync(file)) missing.push(sha256);
    else if ((await sha256OfFile(file)) !== sha256) changed.push(sha256);
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
