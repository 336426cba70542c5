import crypto from 'node:crypto';
import fs from 'node:fs/promises';
import path from 'node:path';

export function sha256Hex(content: Buffer): string {
  return crypto.createHash('sha256').update(content).digest('hex');
}

/**
 * Raw files, unchanged, addressed by their SHA-256: `<root>/ab/abcdef…`. Writes are atomic
 * (temporary file, fsync, rename), so a crash or a full disk never leaves half a file under a hash.
 */
export class RawFileArchive {
  constructor(private readonly root: string) {}

  private pathOf(sha256: string): string {
    if (!/^[0-9a-f]{64}$/.test(sha256)) throw new Error(`not a SHA-256: ${sha256}`);
    return path.join(this.root, sha256.slice(0, 2), sha256);
  }

  async store(sha256: string, content: Buffer): Promise<void> {
    const target = this.pathOf(sha256);
    try {
      await fs.access(target);
      return; // same content already archived
    } catch {
      // not there yet
    }
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

  /** A stream of the archived bytes; throws ENOENT (as the stream's error) when they are not there. */
  async open(sha256: string): Promise<{ stream: NodeJS.ReadableStream; size: number }> {
    const file = this.pathOf(sha256);
    const stat = await fs.stat(file);
    const handle = await fs.open(file, 'r');
    return { stream: handle.createReadStream(), size: stat.size };
  }

  async read(sha256: string): Promise<Buffer> {
    return fs.readFile(this.pathOf(sha256));
  }
}
