import crypto from 'node:crypto';
import fsSync from 'node:fs';
import fs from 'node:fs/promises';
import path from 'node:path';

/** Archived files up to this size are read synchronously (see `RawFileArchive.read`). */
const SYNC_READ_MAX_BYTES = 256 * 1024;

export function sha256Hex(content: Buffer): string {
  return crypto.createHash('sha256').update(content).digest('hex');
}

/** What a re-hash of one archived file found. */
export type ArchivedFileState = 'intact' | 'missing' | 'changed';

/**
 * Where raw files are kept, unchanged, addressed by their SHA-256. Every implementation keeps the same
 * promises: `store` is idempotent and leaves either the whole file or nothing under a hash (a failure
 * throws, so the sender is told to send again); a file that is not there is an error with
 * `code: 'ENOENT'` from `read` and `open`, as the file system gives it.
 */
export interface Archive {
  /** Where the files are, for messages: a folder or `s3://bucket/prefix`. Never holds a secret. */
  readonly location: string;
  store(sha256: string, content: Buffer): Promise<void>;
  read(sha256: string): Promise<Buffer>;
  /** A stream of the archived bytes and their size; rejects with ENOENT when they are not there. */
  open(sha256: string): Promise<{ stream: NodeJS.ReadableStream; size: number }>;
  has(sha256: string): Promise<boolean>;
  /** Read the file again and compare it with the SHA-256 it is filed under. */
  verify(sha256: string): Promise<ArchivedFileState>;
  /** Why the archive as a whole cannot be reached (its folder missing, its bucket not answering); null when it can. */
  unreachable(): Promise<string | null>;
  /** Release connections; the archive is not used afterwards. */
  close(): void;
}

export function assertSha256(sha256: string): void {
  if (!/^[0-9a-f]{64}$/.test(sha256)) throw new Error(`not a SHA-256: ${sha256}`);
}

/** The file-system-like error every archive gives for a file it does not hold. */
export function archivedFileMissing(sha256: string, where: string): NodeJS.ErrnoException {
  return Object.assign(new Error(`ENOENT: the archive holds no file ${sha256} (${where})`), {
    code: 'ENOENT',
  });
}

/** SHA-256 of everything a stream gives. */
export async function sha256OfStream(stream: AsyncIterable<unknown>): Promise<string> {
  const hash = crypto.createHash('sha256');
  for await (const chunk of stream) hash.update(chunk as Buffer);
  return hash.digest('hex');
}

/**
 * Raw files in a local folder: `<root>/ab/abcdef…`. Writes are atomic (temporary file, fsync, rename),
 * so a crash or a full disk never leaves half a file under a hash.
 */
export class RawFileArchive implements Archive {
  constructor(private readonly root: string) {}

  get location(): string {
    return this.root;
  }

  private pathOf(sha256: string): string {
    assertSha256(sha256);
    return path.join(this.root, sha256.slice(0, 2), sha256);
  }

  async store(sha256: string, content: Buffer): Promise<void> {
    const target = this.pathOf(sha256);
    if (await this.has(sha256)) return; // same content already archived
    await fs.mkdir(path.dirname(target), { recursive: true });
    const temp = `${target}.${process.pid}.${crypto.randomBytes(6).toString('hex')}.tmp`;
    const handle = await fs.open(temp, 'wx');
    try {
      await handle.writeFile(content);
      await handle.sync();
    } finally {
      await handle.close();
    }
    try {
      await fs.rename(temp, target);
    } catch (err) {
      await fs.rm(temp, { force: true });
      throw err;
    }
  }

  async open(sha256: string): Promise<{ stream: NodeJS.ReadableStream; size: number }> {
    const file = this.pathOf(sha256);
    const stat = await fs.stat(file);
    const handle = await fs.open(file, 'r');
    return { stream: handle.createReadStream(), size: stat.size };
  }

  async read(sha256: string): Promise<Buffer> {
    const file = this.pathOf(sha256);
    // A typical export in one synchronous read (~0.05 ms): the four thread-pool hops of an asynchronous
    // read each wait for a free core on a busy server (measured: ~7 ms for a 30 kB plate under load).
    if (fsSync.statSync(file).size <= SYNC_READ_MAX_BYTES) return fsSync.readFileSync(file);
    return fs.readFile(file);
  }

  async has(sha256: string): Promise<boolean> {
    try {
      await fs.access(this.pathOf(sha256));
      return true;
    } catch {
      return false;
    }
  }

  async verify(sha256: string): Promise<ArchivedFileState> {
    let opened;
    try {
      opened = await this.open(sha256);
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === 'ENOENT') return 'missing';
      throw err;
    }
    return (await sha256OfStream(opened.stream as AsyncIterable<unknown>)) === sha256 ? 'intact' : 'changed';
  }

  async unreachable(): Promise<string | null> {
    try {
      await fs.access(this.root);
      return null;
    } catch {
      return `the raw-file folder ${this.root} is missing`;
    }
  }

  close(): void {
    // nothing held open
  }
}
