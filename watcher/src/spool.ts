import crypto from 'node:crypto';
import fs from 'node:fs';
import fsp from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { Transform } from 'node:stream';
import { pipeline } from 'node:stream/promises';
import * as z from 'zod';
import { fsyncDir, hashFile, writeFileAtomic } from './file-moves';

const outcomeSchema = z.discriminatedUnion('kind', [
  z.object({
    kind: z.literal('acknowledged'),
    intakeId: z.number(),
    status: z.string(),
    duplicateOfId: z.number().optional(),
    at: z.string(),
    /** The file's final state on the server, once known (parsing may finish after the 202). */
    final: z
      .object({ status: z.string(), error: z.string().nullable().optional(), at: z.string() })
      .optional(),
  }),
  z.object({
    kind: z.literal('rejected'),
    httpStatus: z.number(),
    code: z.string(),
    message: z.string(),
    at: z.string(),
  }),
]);

const entrySchema = z.object({
  id: z.uuid(),
  folder: z.string().min(1),
  relativePath: z.string().min(1),
  size: z.number().int().min(0),
  sha256: z.string().regex(/^[0-9a-f]{64}$/),
  firstSeenAt: z.string(),
  spooledAt: z.string(),
  outcome: outcomeSchema.optional(),
});

/** One file kept locally until the server has acknowledged (or refused) it. */
export type SpoolEntry = z.infer<typeof entrySchema>;
export type SpoolOutcome = z.infer<typeof outcomeSchema>;

/** A copy in progress: bytes written to a temporary file, not yet an entry. */
export interface StagedFile {
  tmpPath: string;
  sha256: string;
  size: number;
}

const LOCK_FILE = 'watcher.pid';
const DAMAGED_DIR = 'damaged';
const locksHeldHere = new Set<string>();

export class SpoolLockedError extends Error {}

/**
 * The local spool: `<id>.bin` (the bytes) + `<id>.json` (what they are), each written atomically.
 * An entry exists once its .json exists; the .bin is always written first.
 */
export class Spool {
  private readonly byId = new Map<string, SpoolEntry>();

  constructor(readonly dir: string) {}

  /**
   * Take the spool for this process, clear leftovers of an interrupted write and load every entry.
   * Entries whose bytes are missing or damaged are set aside in `damaged/` (and reported), never deleted.
   */
  async open(): Promise<{ entries: SpoolEntry[]; problems: string[] }> {
    await fsp.mkdir(this.dir, { recursive: true });
    await this.lock();
    const problems: string[] = [];
    const names = await fsp.readdir(this.dir);
    const jsonIds = new Set<string>();
    for (const name of names) {
      if (name.endsWith('.tmp')) await fsp.rm(path.join(this.dir, name), { force: true });
      else if (name.endsWith('.json')) jsonIds.add(name.slice(0, -'.json'.length));
    }
    for (const name of names) {
      // A .bin without its .json: the watcher stopped between the two writes. The original is still in
      // the drop folder (it is only moved after an acknowledgement), so this copy is not needed.
      if (name.endsWith('.bin') && !jsonIds.has(name.slice(0, -'.bin'.length))) {
        await fsp.rm(path.join(this.dir, name), { force: true });
      }
    }
    for (const id of [...jsonIds].sort()) {
      const problem = await this.load(id);
      if (problem) problems.push(problem);
    }
    return { entries: this.entries(), problems };
  }

  /** Release the spool lock. */
  async close(): Promise<void> {
    locksHeldHere.delete(this.dir);
    const lockPath = path.join(this.dir, LOCK_FILE);
    const owner = await fsp.readFile(lockPath, 'utf8').catch(() => '');
    if (owner.trim() === String(process.pid)) await fsp.rm(lockPath, { force: true });
  }

  entries(): SpoolEntry[] {
    return [...this.byId.values()].sort((a, b) => a.firstSeenAt.localeCompare(b.firstSeenAt));
  }

  get(id: string): SpoolEntry | undefined {
    return this.byId.get(id);
  }

  /** The entry holding exactly these bytes from exactly this drop-folder file, if any. */
  find(folder: string, relativePath: string, sha256: string): SpoolEntry | undefined {
    for (const entry of this.byId.values()) {
      if (entry.sha256 === sha256 && entry.folder === folder && entry.relativePath === relativePath)
        return entry;
    }
    return undefined;
  }

  binPath(entry: Pick<SpoolEntry, 'id'>): string {
    return path.join(this.dir, `${entry.id}.bin`);
  }

  /**
   * Copy a file into the spool folder under a temporary name, hashing it on the way, and flush it.
   * The source is opened without following a link (where the platform allows it).
   */
  async stage(source: string): Promise<StagedFile> {
    const tmpPath = path.join(this.dir, `${crypto.randomUUID()}.bin.tmp`);
    const hash = crypto.createHash('sha256');
    let size = 0;
    const tap = new Transform({
      transform(chunk: Buffer, _encoding, callback) {
        hash.update(chunk);
        size += chunk.length;
        callback(null, chunk);
      },
    });
    try {
      const input = await fsp.open(source, fs.constants.O_RDONLY | (fs.constants.O_NOFOLLOW ?? 0));
      await pipeline(input.createReadStream(), tap, fs.createWriteStream(tmpPath, { flags: 'wx' }));
      const handle = await fsp.open(tmpPath, 'r+');
      try {
        await handle.sync();
      } finally {
        await handle.close();
      }
    } catch (err) {
      await fsp.rm(tmpPath, { force: true });
      throw err;
    }
    return { tmpPath, sha256: hash.digest('hex'), size };
  }

  async discard(staged: StagedFile): Promise<void> {
    await fsp.rm(staged.tmpPath, { force: true });
  }

  /** Turn a staged copy into an entry: rename the bytes into place, then write the description. */
  async commit(
    staged: StagedFile,
    meta: { folder: string; relativePath: string; firstSeenAt: Date },
  ): Promise<SpoolEntry> {
    const entry: SpoolEntry = {
      id: crypto.randomUUID(),
      folder: meta.folder,
      relativePath: meta.relativePath,
      size: staged.size,
      sha256: staged.sha256,
      firstSeenAt: meta.firstSeenAt.toISOString(),
      spooledAt: new Date().toISOString(),
    };
    await fsp.rename(staged.tmpPath, this.binPath(entry));
    await fsyncDir(this.dir);
    await writeFileAtomic(this.jsonPath(entry), JSON.stringify(entry, null, 2));
    this.byId.set(entry.id, entry);
    return entry;
  }

  /** Remember the server's answer, so that a restart finishes the entry instead of sending it again. */
  async recordOutcome(entry: SpoolEntry, outcome: SpoolOutcome): Promise<void> {
    const updated: SpoolEntry = { ...entry, outcome };
    await writeFileAtomic(this.jsonPath(entry), JSON.stringify(updated, null, 2));
    entry.outcome = outcome;
  }

  /** Forget an entry: description first (then it no longer exists), then the bytes. */
  async remove(entry: SpoolEntry): Promise<void> {
    await fsp.rm(this.jsonPath(entry), { force: true });
    await fsyncDir(this.dir);
    await fsp.rm(this.binPath(entry), { force: true });
    this.byId.delete(entry.id);
  }

  private jsonPath(entry: Pick<SpoolEntry, 'id'>): string {
    return path.join(this.dir, `${entry.id}.json`);
  }

  /** Load one entry; returns a problem description when it had to be set aside. */
  private async load(id: string): Promise<string | undefined> {
    const jsonPath = this.jsonPath({ id });
    let entry: SpoolEntry;
    try {
      const parsed = entrySchema.safeParse(JSON.parse(await fsp.readFile(jsonPath, 'utf8')));
      if (!parsed.success || parsed.data.id !== id) throw new Error('not a spool entry');
      entry = parsed.data;
    } catch (err) {
      await this.setAside(id);
      return `spool entry ${id}.json is unreadable (${(err as Error).message}); moved to ${DAMAGED_DIR}/`;
    }
    try {
      const { sha256, size } = await hashFile(this.binPath(entry));
      if (sha256 !== entry.sha256 || size !== entry.size)
        throw new Error('its bytes do not match the recorded SHA-256');
    } catch (err) {
      await this.setAside(id);
      const reason =
        (err as NodeJS.ErrnoException).code === 'ENOENT' ? 'its bytes are missing' : (err as Error).message;
      return (
        `spool entry for ${entry.folder}/${entry.relativePath} set aside in ${DAMAGED_DIR}/: ${reason}; ` +
        'the original is sent again if it is still in the drop folder'
      );
    }
    this.byId.set(id, entry);
    return undefined;
  }

  private async setAside(id: string): Promise<void> {
    const damaged = path.join(this.dir, DAMAGED_DIR);
    await fsp.mkdir(damaged, { recursive: true });
    for (const ext of ['.json', '.bin']) {
      await fsp.rename(path.join(this.dir, id + ext), path.join(damaged, id + ext)).catch(() => undefined);
    }
  }

  /** One watcher per spool: two would send the same entries. A lock left by a dead process is taken over. */
  private async lock(): Promise<void> {
    if (locksHeldHere.has(this.dir))
      throw new SpoolLockedError(`the spool ${this.dir} is already in use in this process`);
    const lockPath = path.join(this.dir, LOCK_FILE);
    const owner = Number((await fsp.readFile(lockPath, 'utf8').catch(() => '')).trim());
    // A lock written before the machine last started is stale even if its process id is in use again.
    const writtenAt = (await fsp.stat(lockPath).catch(() => undefined))?.mtimeMs ?? 0;
    const bootedAt = Date.now() - os.uptime() * 1000;
    if (
      Number.isInteger(owner) &&
      owner > 0 &&
      owner !== process.pid &&
      writtenAt > bootedAt &&
      processAlive(owner)
    ) {
      throw new SpoolLockedError(
        `the spool ${this.dir} is in use by another watcher (process ${owner}); stop it first or use another spoolDir`,
      );
    }
    await writeFileAtomic(lockPath, String(process.pid));
    locksHeldHere.add(this.dir);
  }
}

function processAlive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM';
  }
}
