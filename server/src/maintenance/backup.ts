import fs from 'node:fs';
import path from 'node:path';
import Database from 'better-sqlite3';
import type { AppConfig } from '../config';

/** A backup or restore that cannot go ahead; the message says why and what to do. */
export class MaintenanceError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'MaintenanceError';
  }
}

function sqliteFile(config: Pick<AppConfig, 'database'>): string {
  if (config.database.type !== 'sqlite')
    throw new MaintenanceError(
      'Backup and restore here are for the SQLite database; use pg_dump for PostgreSQL.',
    );
  return config.database.file;
}

/** `2026-12-02T03-04-05Z`: sorts by time and is a valid file name everywhere. */
function stamp(now = new Date()): string {
  return now
    .toISOString()
    .replace(/\.\d+Z$/, 'Z')
    .replace(/:/g, '-');
}

/** SQLite's `integrity_check` of a file opened read-only; [] when it is sound. */
export function integrityProblems(file: string): string[] {
  let db: Database.Database | undefined;
  try {
    db = new Database(file, { readonly: true, fileMustExist: true });
    const lines = (db.pragma('integrity_check') as Record<string, string>[]).map((row) =>
      String(Object.values(row)[0]),
    );
    return lines.length === 1 && lines[0] === 'ok' ? [] : lines;
  } catch (err) {
    return [err instanceof Error ? err.message : String(err)];
  } finally {
    db?.close();
  }
}

/**
 * Copy the live database with SQLite's online backup API (a consistent snapshot, safe while the server
 * runs) to `target`, or to `<DATA_DIR>/backups/equilight-<time>.sqlite`; the copy is checked with
 * `integrity_check` before its path is returned.
 */
export async function backupDatabase(
  config: Pick<AppConfig, 'database' | 'dataDir'>,
  target?: string,
): Promise<string> {
  const source = sqliteFile(config);
  if (!fs.existsSync(source)) throw new MaintenanceError(`There is no database at ${source} to back up.`);
  const destination = path.resolve(
    target ?? path.join(config.dataDir, 'backups', `equilight-${stamp()}.sqlite`),
  );
  if (fs.existsSync(destination))
    throw new MaintenanceError(`${destination} already exists; choose another file name.`);
  fs.mkdirSync(path.dirname(destination), { recursive: true });
  const db = new Database(source, { readonly: true, fileMustExist: true });
  try {
    await db.backup(destination);
  } finally {
    db.close();
  }
  const problems = integrityProblems(destination);
  if (problems.length)
    throw new MaintenanceError(
      `The backup ${destination} failed its integrity check: ${problems.join('; ')}`,
    );
  return destination;
}

/**
 * Whether another connection (a running server) holds the database. Leaving WAL mode needs the only
 * connection, so SQLite answers "database is locked" while anyone else has the file open.
 */
function assertNotInUse(file: string): void {
  if (!fs.existsSync(file)) return;
  const db = new Database(file, { fileMustExist: true, timeout: 200 });
  try {
    db.pragma('journal_mode = DELETE');
  } catch (err) {
    if ((err as { code?: string }).code === 'SQLITE_BUSY')
      throw new MaintenanceError(
        `The database ${file} is in use (a server or another program has it open). Stop the server first, then restore.`,
      );
    throw err;
  } finally {
    db.close();
  }
}

export interface RestoreResult {
  restored: string;
  /** Where the database that was replaced now is, so a restore never loses data. */
  previousCopy: string | null;
}

/**
 * Replace the database with a backup: the backup must pass `integrity_check` and be an Equilight
 * database; the server must be stopped; the current file is kept as `<DATA_DIR>/backups/before-restore-
 * <time>.sqlite`; the new file is written beside the old one and renamed over it in one step.
 */
export async function restoreDatabase(
  config: Pick<AppConfig, 'database' | 'dataDir'>,
  backupFile: string,
): Promise<RestoreResult> {
  const target = sqliteFile(config);
  const source = path.resolve(backupFile);
  if (!fs.existsSync(source)) throw new MaintenanceError(`There is no backup file ${source}.`);
  if (source === path.resolve(target)) throw new MaintenanceError('The backup file is the database itself.');
  const problems = integrityProblems(source);
  if (problems.length)
    throw new MaintenanceError(
      `${source} is not a sound database (integrity_check: ${problems.slice(0, 5).join('; ')}); nothing was changed.`,
    );
  const probe = new Database(source, { readonly: true, fileMustExist: true });
  try {
    const tables = new Set(
      (probe.prepare("SELECT name FROM sqlite_master WHERE type = 'table'").all() as { name: string }[]).map(
        (t) => t.name,
      ),
    );
    if (!tables.has('migrations') || !tables.has('users'))
      throw new MaintenanceError(`${source} is not an Equilight database (no migrations or users table).`);
  } finally {
    probe.close();
  }

  assertNotInUse(target);
  let previousCopy: string | null = null;
  if (fs.existsSync(target) && fs.statSync(target).size > 0) {
    previousCopy = path.join(config.dataDir, 'backups', `before-restore-${stamp()}.sqlite`);
    fs.mkdirSync(path.dirname(previousCopy), { recursive: true });
    fs.copyFileSync(target, previousCopy, fs.constants.COPYFILE_EXCL);
  }
  fs.mkdirSync(path.dirname(target), { recursive: true });
  const temporary = `${target}.restoring-${process.pid}`;
  fs.copyFileSync(source, temporary);
  const handle = fs.openSync(temporary, 'r+');
  try {
    fs.fsyncSync(handle);
  } finally {
    fs.closeSync(handle);
  }
  // A journal left beside the old file would be replayed into the new one.
  for (const suffix of ['-wal', '-shm', '-journal']) fs.rmSync(`${target}${suffix}`, { force: true });
  fs.renameSync(temporary, target);
  const after = integrityProblems(target);
  if (after.length)
    throw new MaintenanceError(`The restored database fails its integrity check: ${after.join('; ')}`);
  return { restored: target, previousCopy };
}
