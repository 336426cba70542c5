import fs from 'node:fs';
import type { DataSource } from 'typeorm';

/** A database that must not be opened as it is; the message says what was found and what to do. */
export class DatabaseProblemError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'DatabaseProblemError';
  }
}

const RESTORE_HINT =
  'Restore the latest backup with `npm run restore -- <backup file>` (see DEVELOPERS.md), or move the file ' +
  'away to start with an empty database.';

/**
 * Refuse a database file that exists but is empty. SQLite would treat it as a new database, and the
 * start would seed demo people and tokens into what was the lab's data file.
 */
export function assertDatabaseFileNotEmpty(file: string): void {
  let size: number;
  try {
    size = fs.statSync(file).size;
  } catch {
    return; // not there yet: a first start creates it
  }
  if (size === 0)
    throw new DatabaseProblemError(
      `The database file ${file} exists but is empty (0 bytes): the data it held is gone. ` +
        `Equilight does not start on it, so nothing is seeded over it. ${RESTORE_HINT}`,
    );
}

/** SQLite's own check: `quick_check` (pages and structure, fast) or `integrity_check` (also indexes). */
export async function sqliteCheck(
  dataSource: DataSource,
  kind: 'quick_check' | 'integrity_check',
): Promise<string[]> {
  const rows: Record<string, string>[] = await dataSource.query(`PRAGMA ${kind}`);
  const lines = rows.map((row) => String(Object.values(row)[0]));
  return lines.length === 1 && lines[0] === 'ok' ? [] : lines;
}

/** Run `quick_check` on an opened SQLite database; throws a DatabaseProblemError naming what it found. */
export async function assertQuickCheckPasses(dataSource: DataSource, file: string): Promise<void> {
  let problems: string[];
  try {
    problems = await sqliteCheck(dataSource, 'quick_check');
  } catch (err) {
    problems = [err instanceof Error ? err.message : String(err)];
  }
  if (problems.length > 0)
    throw new DatabaseProblemError(
      `The database file ${file} is damaged; SQLite's quick_check reports:\n  ${problems.slice(0, 5).join('\n  ')}` +
        `${problems.length > 5 ? `\n  … and ${problems.length - 5} more` : ''}\n` +
        `Equilight does not start on a damaged database, so nothing more is written into it. ${RESTORE_HINT}`,
    );
}

/** A failure to open the file at all (not a database, unreadable) in the same words. */
export function openFailure(file: string, err: unknown): DatabaseProblemError {
  const reason = err instanceof Error ? err.message : String(err);
  return new DatabaseProblemError(
    `The database file ${file} could not be opened (${reason}). ${RESTORE_HINT}`,
  );
}
