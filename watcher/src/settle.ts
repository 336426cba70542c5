import fsp from 'node:fs/promises';

interface Tracked {
  size: number;
  mtimeMs: number;
  /** Last time the size or modification time was seen to change (or a change event arrived). */
  changedAt: number;
  firstSeenAt: Date;
  timer?: NodeJS.Timeout;
}

/**
 * Decides when a file has finished being written: its size and modification time have not changed
 * for `settleMs`. Applies to files found at start as much as to new ones (an export may be in progress
 * while the watcher starts).
 */
export class SettleTracker {
  private readonly tracked = new Map<string, Tracked>();
  private closed = false;

  constructor(
    private readonly settleMs: number,
    private readonly onSettled: (file: string, firstSeenAt: Date) => void,
    private readonly pollMs = Math.min(50, Math.max(10, Math.round(settleMs / 10))),
  ) {}

  /** A file appeared or changed: (re)start its quiet period. */
  touch(file: string): void {
    if (this.closed) return;
    const known = this.tracked.get(file);
    if (known) {
      known.changedAt = Date.now();
      return;
    }
    const entry: Tracked = { size: -1, mtimeMs: -1, changedAt: Date.now(), firstSeenAt: new Date() };
    this.tracked.set(file, entry);
    void this.poll(file, entry);
  }

  get size(): number {
    return this.tracked.size;
  }

  close(): void {
    this.closed = true;
    for (const entry of this.tracked.values()) clearTimeout(entry.timer);
    this.tracked.clear();
  }

  private async poll(file: string, entry: Tracked): Promise<void> {
    let size: number;
    let mtimeMs: number;
    try {
      // lstat: a link settles as itself (and is refused later); it is never followed.
      const stat = await fsp.lstat(file);
      if (!stat.isFile() && !stat.isSymbolicLink()) throw new Error('not a file');
      ({ size, mtimeMs } = stat);
    } catch {
      // Deleted or renamed before it settled: nothing to send.
      if (this.tracked.get(file) === entry) this.tracked.delete(file);
      return;
    }
    if (this.closed || this.tracked.get(file) !== entry) return;
    const now = Date.now();
    if (size !== entry.size || mtimeMs !== entry.mtimeMs) {
      if (entry.size !== -1) entry.changedAt = now;
      entry.size = size;
      entry.mtimeMs = mtimeMs;
    }
    if (now - entry.changedAt >= this.settleMs) {
      this.tracked.delete(file);
      this.onSettled(file, entry.firstSeenAt);
      return;
    }
    const wait = Math.min(this.pollMs, Math.max(1, this.settleMs - (now - entry.changedAt)));
    entry.timer = setTimeout(() => void this.poll(file, entry), wait);
  }
}
