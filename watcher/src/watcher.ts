import { EventEmitter } from 'node:events';
import fsp from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { type FSWatcher, watch } from 'chokidar';
import { backoffDelayMs } from './backoff';
import { RESERVED_FOLDERS, type WatcherConfig } from './config';
import { classifyDropPath } from './drop-paths';
import { hashFile, moveLinkWithoutOverwrite, placeWithoutOverwrite, writeFileAtomic } from './file-moves';
import { consoleLogger, type WatcherLogger } from './logger';
import { SettleTracker } from './settle';
import { Spool, type SpoolEntry } from './spool';
import { FINAL_STATES, fetchFileStatus, fetchFolders, sendHeartbeat, watcherVersion } from './server-api';
import { uploadFile } from './upload';

export interface WatcherEvents {
  /** The initial scan of the drop folder is complete. */
  ready: [];
  /** A settled file was copied into the spool. */
  spooled: [entry: SpoolEntry];
  /** The server acknowledged the file (202). */
  uploaded: [entry: SpoolEntry, ack: { intakeId: number; status: string; duplicateOfId?: number }];
  /** The original went to done/ (movedTo null when it had already left the drop folder) and the spool entry is gone. */
  done: [entry: SpoolEntry, result: { movedTo: string | null; status: string }];
  /** The server took the file but could not read it: it is in quarantined/ with a .reason.txt. */
  quarantined: [entry: SpoolEntry, result: { message: string; movedTo: string }];
  /** The folders watched changed (a watcher credential learnt them from the server). */
  folders: [info: { folders: string[]; added: string[]; removed: string[] }];
  /** The watcher reported itself to the server. */
  reported: [info: { folders: string[] }];
  /** The server refused the file for good; it is in rejected/ with a .reason.txt. */
  rejected: [
    entry: SpoolEntry,
    result: { httpStatus: number; code: string; message: string; movedTo: string },
  ];
  /** An upload will be tried again after `delayMs`. */
  retry: [entry: SpoolEntry, info: { delayMs: number; reason: string; httpStatus?: number }];
  /** A link (or a file reached through one) was refused without being read; the link is in rejected/. */
  refused: [info: { file: string; reason: string; movedTo: string | null }];
  /** Something went wrong locally (disk, permissions); nothing was lost and it is tried again. */
  problem: [info: { message: string }];
}

export interface DropFolderWatcher {
  start(): Promise<void>;
  stop(): Promise<void>;
  on<E extends keyof WatcherEvents>(event: E, listener: (...args: WatcherEvents[E]) => void): this;
  off<E extends keyof WatcherEvents>(event: E, listener: (...args: WatcherEvents[E]) => void): this;
  /** Entries still in the spool (waiting, being sent, or being finished). */
  pending(): SpoolEntry[];
  /** The instrument folders watched now. */
  folders(): string[];
}

export interface WatcherOptions {
  logger?: WatcherLogger;
}

/** Create the drop-folder watcher. Nothing happens until `start()`. */
export function createWatcher(config: WatcherConfig, options: WatcherOptions = {}): DropFolderWatcher {
  return new Watcher(config, options.logger ?? consoleLogger);
}

interface Task {
  promise: Promise<void>;
  controller: AbortController;
}

/** How long to wait before retrying after a local failure (disk, permissions) on one file. */
const LOCAL_RETRY_MS = 30_000;
/** Files being finished at once (a status request and a local move each), beside the uploads. */
const MAX_CONCURRENT_FINISHING = 4;
/** A queued file is usually parsed and stored within this time (see `firstStatusDelayMs`). */
const FIRST_STATUS_DELAY_MS = 500;
const RETRY_AFTER_CAP_MS = 10 * 60_000;
const RESERVED: readonly string[] = RESERVED_FOLDERS;

class Watcher extends EventEmitter<WatcherEvents> implements DropFolderWatcher {
  private readonly spool: Spool;
  private readonly tokens: Map<string, string>;
  /** Folders the server named (watcher credential), and every folder watched now. */
  private readonly serverFolders = new Set<string>();
  private readonly known = new Set<string>();
  private folderRevision: string | undefined;
  private readonly version = watcherVersion();
  private readonly settle: SettleTracker;
  private fsw: FSWatcher | undefined;
  private state: 'new' | 'running' | 'stopping' | 'stopped' = 'new';

  private readonly inFlight = new Map<string, Task>();
  /** Tasks of `inFlight` that are uploading now (the rest are finishing). */
  private uploading = 0;
  /** Per entry: attempts so far and the earliest time of the next one (entry-specific back-off). */
  private readonly entryRetry = new Map<string, { attempts: number; notBefore: number }>();
  /** Server unreachable / overloaded: every upload waits. */
  private serverFailures = 0;
  private serverBlockedUntil = 0;
  /** Token refused: uploads of that instrument folder wait. */
  private readonly folderFailures = new Map<string, number>();
  private readonly folderBlockedUntil = new Map<string, number>();
  private pumpTimer: NodeJS.Timeout | undefined;

  /** One operation at a time per drop-folder file (spooling it, finishing it). */
  private readonly pathLocks = new Map<string, Promise<void>>();
  private readonly background = new Set<Promise<void>>();
  private readonly timers = new Set<NodeJS.Timeout>();
  private readonly warned = new Set<string>();
  /** The drop folder with every link in its own path resolved: files must really lie below it. */
  private dropRealPath = '';

  constructor(
    private readonly config: WatcherConfig,
    private readonly log: WatcherLogger,
  ) {
    super();
    this.spool = new Spool(config.spoolDir);
    this.tokens = new Map(config.instruments.map((i) => [i.folder, i.token]));
    this.settle = new SettleTracker(config.settleMs, (file, firstSeenAt) =>
      this.onSettled(file, firstSeenAt),
    );
  }

  pending(): SpoolEntry[] {
    return this.spool.entries();
  }

  folders(): string[] {
    return [...this.known].sort();
  }

  /** The token (and, with a watcher credential, the folder field) to send a folder's files with. */
  private senderFor(folder: string): { token: string; folder?: string } | undefined {
    const own = this.tokens.get(folder);
    if (own) return { token: own };
    if (this.config.watcherToken && this.serverFolders.has(folder))
      return { token: this.config.watcherToken, folder };
    return undefined;
  }

  async start(): Promise<void> {
    if (this.state !== 'new') throw new Error('a watcher can be started once');
    this.state = 'running';
    const { dropDir, spoolDir, serverUrl, settleMs } = this.config;
    for (const folder of this.tokens.keys()) this.known.add(folder);
    if (this.config.watcherToken) {
      // The server names the folders; if it cannot be reached now, the folder poll tries again.
      await this.refreshFolders({ initial: true });
    }
    const folders = [...this.known];
    this.log.info(
      `watching ${dropDir} (instrument folders: ${folders.join(', ') || 'none yet'}), spool ${spoolDir}, ` +
        `server ${serverUrl}, settle ${settleMs} ms, ${this.config.maxConcurrentUploads} uploads at a time` +
        (this.config.watcherToken ? `, folders from the server every ${this.config.folderPollMs} ms` : ''),
    );
    try {
      for (const folder of folders) {
        await fsp.mkdir(path.join(dropDir, folder), { recursive: true }).catch((err: Error) => {
          throw new Error(`cannot open the drop folder ${path.join(dropDir, folder)}: ${err.message}`);
        });
        if ((await fsp.lstat(path.join(dropDir, folder))).isSymbolicLink()) {
          this.warnOnce(
            `link-folder:${folder}`,
            `the instrument folder ${path.join(dropDir, folder)} is a link; links are never followed, so nothing in it is sent`,
          );
        }
      }
      this.dropRealPath = await fsp.realpath(dropDir);
      const { entries, problems } = await this.spool.open();
      for (const problem of problems) this.report(problem);
      if (entries.length > 0) this.log.info(`resuming ${entries.length} file(s) from the spool`);
      for (const entry of entries) {
        if (!entry.outcome && !this.senderFor(entry.folder)) {
          this.warnOnce(
            `spool-folder:${entry.folder}`,
            `spooled files of folder "${entry.folder}" wait: it has no token in the watcher configuration`,
          );
        }
      }
    } catch (err) {
      this.state = 'stopped';
      await this.spool.close().catch(() => undefined);
      throw err;
    }
    this.pump();

    const known = this.known;
    this.fsw = watch(dropDir, {
      ignoreInitial: false,
      persistent: true,
      followSymlinks: false,
      depth: 16,
      usePolling: this.config.usePolling,
      interval: 500,
      binaryInterval: 500,
      ignorePermissionErrors: true,
      // Settling is ours (SettleTracker): chokidar's own does not apply to files found at start.
      awaitWriteFinish: false,
      ignored: (file: string) => {
        const where = classifyDropPath(dropDir, file, known);
        if (where.kind !== 'ignored') return false;
        if (where.reason === 'unknown-folder') {
          this.warnOnce(
            `folder:${where.folder}`,
            `ignoring ${path.join(dropDir, where.folder ?? '')}: no instrument in the watcher configuration uses this folder`,
          );
        }
        return true;
      },
    });
    this.fsw.on('add', (file) => this.settle.touch(file));
    this.fsw.on('change', (file) => this.settle.touch(file));
    // A folder link is never entered (followSymlinks: false); it is refused like a file link.
    this.fsw.on('addDir', (dir) => this.onFolderFound(dir));
    this.fsw.on('error', (err) => this.report(`watching the drop folder: ${(err as Error).message}`));
    await new Promise<void>((resolve) => this.fsw!.once('ready', () => resolve()));
    if (this.state === 'running') {
      this.log.info('initial scan of the drop folder done');
      this.emit('ready');
      void this.heartbeat();
      if (this.config.watcherToken) this.later(this.config.folderPollMs, () => void this.pollFolders());
    }
  }

  // ── folders from the server, and reports to it ─────────────────────────────────────────────────

  private foldersTrouble: string | undefined;

  private async pollFolders(): Promise<void> {
    try {
      await this.refreshFolders({ initial: false });
    } finally {
      this.later(this.config.folderPollMs, () => void this.pollFolders());
    }
  }

  /** Ask the server for the active profiles' folders; watch new ones and drop removed ones, without a restart. */
  private async refreshFolders({ initial }: { initial: boolean }): Promise<void> {
    const token = this.config.watcherToken;
    if (!token || this.state !== 'running') return;
    const answer = await fetchFolders(
      this.config.serverUrl,
      token,
      Math.min(this.config.requestTimeoutMs, 15_000),
    );
    if (answer.kind !== 'ok') {
      const trouble =
        answer.kind === 'unauthorized'
          ? `WATCHER CREDENTIAL REFUSED (${answer.httpStatus}): check watcherToken; the folders watched stay as they are`
          : answer.kind === 'unknown'
            ? 'the server does not list folders for watchers (an older server?); only the folders in the configuration are watched'
            : `cannot ask the server which folders to watch (${answer.reason}); asking again in ${seconds(this.config.folderPollMs)} s`;
      if (trouble !== this.foldersTrouble) {
        this.foldersTrouble = trouble;
        if (answer.kind === 'unauthorized') this.log.error(trouble);
        else this.log.warn(trouble);
      }
      return;
    }
    if (this.foldersTrouble) this.log.info('the server lists the folders to watch again');
    this.foldersTrouble = undefined;
    const { revision, folders } = answer.value;
    if (revision === this.folderRevision) return;
    this.folderRevision = revision;
    const next = new Set(folders.map((f) => f.folder).filter((f) => !RESERVED.includes(f.toLowerCase())));
    const added: string[] = [];
    const removed: string[] = [];
    for (const folder of this.serverFolders) {
      if (next.has(folder)) continue;
      this.serverFolders.delete(folder);
      if (!this.tokens.has(folder)) {
        this.known.delete(folder);
        removed.push(folder);
        if (!initial) await this.fsw?.unwatch(path.join(this.config.dropDir, folder));
      }
    }
    for (const folder of next) {
      if (this.serverFolders.has(folder)) continue;
      const dir = path.join(this.config.dropDir, folder);
      const rel = path.relative(dir, this.config.spoolDir);
      if (rel === '' || (!rel.startsWith('..') && !path.isAbsolute(rel))) {
        this.warnOnce(`spool-in:${folder}`, `not watching ${dir}: the spool lies inside it`);
        continue;
      }
      this.serverFolders.add(folder);
      if (this.known.has(folder)) continue;
      if (!initial) {
        try {
          await fsp.mkdir(dir, { recursive: true });
          if ((await fsp.lstat(dir)).isSymbolicLink()) {
            this.warnOnce(
              `link-folder:${folder}`,
              `the instrument folder ${dir} is a link; links are never followed, so nothing in it is sent`,
            );
          }
        } catch (err) {
          this.report(
            `cannot open the drop folder ${dir}: ${(err as Error).message}; trying again at the next poll`,
          );
          this.serverFolders.delete(folder);
          this.folderRevision = undefined;
          continue;
        }
      }
      this.known.add(folder);
      this.warned.delete(`folder:${folder}`);
      added.push(folder);
      if (!initial) this.fsw?.add(dir);
    }
    if (!initial && (added.length || removed.length)) {
      this.log.info(
        `folders from the server: now watching ${this.folders().join(', ') || 'none'}` +
          (added.length ? `; added ${added.join(', ')}` : '') +
          (removed.length ? `; no longer watching ${removed.join(', ')} (their spooled files wait)` : ''),
      );
      this.emit('folders', { folders: this.folders(), added, removed });
      void this.heartbeat();
      this.pump();
    }
  }

  /** Report to the server: version, computer, folders watched. Repeats every `heartbeatMs`. */
  private async heartbeat(): Promise<void> {
    if (this.state !== 'running') return;
    clearTimeout(this.heartbeatTimer);
    const folders = this.folders();
    const report = { version: this.version, hostname: os.hostname().slice(0, 120), folders };
    const timeoutMs = Math.min(this.config.requestTimeoutMs, 15_000);
    const calls = this.config.watcherToken
      ? [sendHeartbeat(this.config.serverUrl, this.config.watcherToken, report, timeoutMs)]
      : [...this.tokens].map(([folder, token]) =>
          sendHeartbeat(this.config.serverUrl, token, { ...report, folders: [folder] }, timeoutMs),
        );
    const results = await Promise.all(calls);
    const failed = results.find((r) => r.kind !== 'ok');
    if (failed && failed.kind !== 'unknown') {
      this.warnOnce(
        `heartbeat:${failed.kind}`,
        `could not report to the server (${failed.kind === 'failed' ? failed.reason : failed.kind}); trying again`,
      );
    } else if (!failed) {
      this.warned.delete('heartbeat:failed');
      this.emit('reported', { folders });
    }
    if (this.state === 'running') {
      this.heartbeatTimer = setTimeout(() => void this.heartbeat(), this.config.heartbeatMs);
    }
  }

  private heartbeatTimer: NodeJS.Timeout | undefined;

  async stop(): Promise<void> {
    if (this.state !== 'running') return;
    this.state = 'stopping';
    clearTimeout(this.pumpTimer);
    clearTimeout(this.heartbeatTimer);
    for (const timer of this.timers) clearTimeout(timer);
    this.settle.close();
    await this.fsw?.close();
    const all = () => [...[...this.inFlight.values()].map((t) => t.promise), ...this.background];
    if (this.inFlight.size > 0) {
      this.log.info(
        `stopping: waiting up to ${this.config.shutdownGraceMs} ms for ${this.inFlight.size} upload(s)`,
      );
    }
    let graceTimer: NodeJS.Timeout | undefined;
    await Promise.race([
      Promise.allSettled(all()),
      new Promise((resolve) => (graceTimer = setTimeout(resolve, this.config.shutdownGraceMs))),
    ]);
    clearTimeout(graceTimer);
    // Abandoned uploads stay in the spool and are sent again at the next start.
    for (const task of this.inFlight.values()) task.controller.abort();
    await Promise.allSettled(all());
    await this.spool.close();
    this.state = 'stopped';
    const left = this.spool.entries().length;
    this.log.info(`stopped${left > 0 ? `; ${left} file(s) wait in the spool for the next start` : ''}`);
  }

  // ── drop folder → spool ────────────────────────────────────────────────────────────────────────

  private onFolderFound(dir: string): void {
    const where = classifyDropPath(this.config.dropDir, dir, this.known);
    if (where.kind !== 'candidate' || this.state !== 'running') return;
    const { folder, relativePath } = where;
    this.runInBackground(
      this.withPathLock(`${folder}/${relativePath}`, async () => {
        const stat = await fsp.lstat(dir).catch(() => undefined);
        if (stat?.isSymbolicLink()) await this.refuseLink(dir, folder, relativePath);
      }),
    );
  }

  private onSettled(file: string, firstSeenAt: Date): void {
    const where = classifyDropPath(this.config.dropDir, file, this.known);
    if (where.kind !== 'candidate' || this.state !== 'running') return;
    const { folder, relativePath } = where;
    this.runInBackground(
      this.withPathLock(`${folder}/${relativePath}`, () =>
        this.spoolFile(file, folder, relativePath, firstSeenAt),
      ),
    );
  }

  private async spoolFile(
    file: string,
    folder: string,
    relativePath: string,
    firstSeenAt: Date,
  ): Promise<void> {
    if (this.state !== 'running') return;
    const label = `${folder}/${relativePath}`;
    try {
      // Never through a link: lstat, a real path below the drop folder, and no other hard links.
      const before = await fsp.lstat(file).catch(() => undefined);
      if (before?.isSymbolicLink()) return await this.refuseLink(file, folder, relativePath);
      if (!before?.isFile()) return;
      const real = await fsp.realpath(file).catch(() => undefined);
      if (!real || !real.startsWith(this.dropRealPath + path.sep)) {
        this.warnOnce(
          `outside:${label}`,
          `refused ${label}: it lies outside the drop folder when links are resolved; it is not read or sent`,
        );
        this.emit('refused', { file: label, reason: 'outside the drop folder', movedTo: null });
        return;
      }
      if (before.nlink > 1) return await this.refuseLink(file, folder, relativePath, 'hard');
      const staged = await this.spool.stage(file);
      const after = await fsp.lstat(file).catch(() => undefined);
      if (!after) {
        await this.spool.discard(staged);
        return;
      }
      if (after.size !== before.size || after.mtimeMs !== before.mtimeMs || staged.size !== after.size) {
        // Written to while we copied: wait for it to settle again.
        await this.spool.discard(staged);
        this.settle.touch(file);
        return;
      }
      if (this.spool.find(folder, relativePath, staged.sha256)) {
        await this.spool.discard(staged);
        return;
      }
      const entry = await this.spool.commit(staged, { folder, relativePath, firstSeenAt });
      this.log.info(`received ${label} (${entry.size} bytes, sha256 ${entry.sha256.slice(0, 12)}…)`);
      this.emit('spooled', entry);
      this.pump();
    } catch (err) {
      this.report(
        `cannot copy ${label} into the spool (${(err as Error).message}); it stays in the drop folder, ` +
          `next try in ${Math.round(LOCAL_RETRY_MS / 1000)} s`,
      );
      this.later(LOCAL_RETRY_MS, () => this.settle.touch(file));
    }
  }

  /**
   * Move a link (the link itself, never its target) to rejected/ with a reason. A file with other hard
   * links is moved by name the same way (its other names are left alone). Nothing is read through it.
   */
  private async refuseLink(
    file: string,
    folder: string,
    relativePath: string,
    kind: 'symbolic' | 'hard' = 'symbolic',
  ): Promise<void> {
    const label = `${folder}/${relativePath}`;
    const folderDir = path.join(this.config.dropDir, folder);
    const rejectedDir = path.join(folderDir, 'rejected');
    const name = path.posix.basename(relativePath);
    const movedTo =
      kind === 'symbolic'
        ? await moveLinkWithoutOverwrite(file, rejectedDir, name)
        : await placeWithoutOverwrite(file, rejectedDir, name);
    const why =
      kind === 'symbolic'
        ? 'it is a link, and the watcher never follows links: a link can point at any file on this computer'
        : 'it has other hard links, so it may be a file from elsewhere on this computer';
    const reason =
      `Not sent: ${why}. Nothing was read from it or sent to the server.
` +
      `Put the export itself into the drop folder.

file: ${label}
at: ${new Date().toISOString()}
`;
    await writeFileAtomic(`${movedTo}.reason.txt`, reason);
    this.log.error(
      `refused ${label} (${kind === 'symbolic' ? 'a link' : 'a hard-linked file'}, never read) → ` +
        path.relative(folderDir, movedTo).split(path.sep).join('/'),
    );
    this.emit('refused', { file: label, reason: why, movedTo });
  }

  // ── spool → server ─────────────────────────────────────────────────────────────────────────────

  /**
   * Start as many due tasks as the limits allow, and wake up when the next one falls due. Uploads and
   * finishing (asking the server for a file's final state, moving the original) have limits of their
   * own, so files waiting to be finished never hold up the uploads of new ones.
   */
  private pump(): void {
    if (this.state !== 'running') return;
    clearTimeout(this.pumpTimer);
    this.pumpTimer = undefined;
    const now = Date.now();
    let wakeAt = Infinity;
    for (const entry of this.spool.entries()) {
      const uploadsFull = this.uploading >= this.config.maxConcurrentUploads;
      const finishingFull = this.inFlight.size - this.uploading >= MAX_CONCURRENT_FINISHING;
      if (uploadsFull && finishingFull) break;
      if (this.inFlight.has(entry.id)) continue;
      if (entry.outcome ? finishingFull : uploadsFull) continue;
      let dueAt = this.entryRetry.get(entry.id)?.notBefore ?? 0;
      if (!entry.outcome) {
        if (!this.senderFor(entry.folder)) continue;
        dueAt = Math.max(dueAt, this.serverBlockedUntil, this.folderBlockedUntil.get(entry.folder) ?? 0);
      }
      if (dueAt > now) {
        wakeAt = Math.min(wakeAt, dueAt);
        continue;
      }
      this.startTask(entry);
    }
    if (wakeAt !== Infinity) this.pumpTimer = setTimeout(() => this.pump(), wakeAt - now);
  }

  private startTask(entry: SpoolEntry): void {
    const controller = new AbortController();
    let holdsUploadSlot = !entry.outcome;
    if (holdsUploadSlot) this.uploading++;
    const freeUploadSlot = () => {
      if (!holdsUploadSlot) return;
      holdsUploadSlot = false;
      this.uploading--;
    };
    const promise = (async () => {
      try {
        if (!entry.outcome) {
          await this.send(entry, controller.signal);
          // The next upload starts while this file is finished.
          freeUploadSlot();
          this.pump();
          const outcome = entry.outcome as SpoolEntry['outcome'];
          if (outcome?.kind === 'acknowledged' && !FINAL_STATES.has(outcome.status)) {
            // Just queued: the server is parsing it now. Asking at once would only hear "queued" and
            // cost the busy server a request; ask once it has had a moment (its outcome is in the spool).
            this.entryRetry.set(entry.id, { attempts: 0, notBefore: Date.now() + this.firstStatusDelayMs() });
            return;
          }
        }
        // Finishing is local and quick: done even while stopping, so an acknowledged file is not sent twice.
        let later = false;
        if (entry.outcome) {
          await this.withPathLock(`${entry.folder}/${entry.relativePath}`, async () => {
            later = (await this.finish(entry)) === 'later';
          });
        }
        if (later) {
          // The server is still parsing it: ask again soon, without counting it as a failure.
          this.entryRetry.set(entry.id, { attempts: 0, notBefore: Date.now() + this.config.statusPollMs });
        } else this.entryRetry.delete(entry.id);
      } catch (err) {
        const retry = this.entryRetry.get(entry.id) ?? { attempts: 0, notBefore: 0 };
        retry.attempts++;
        retry.notBefore = Date.now() + LOCAL_RETRY_MS;
        this.entryRetry.set(entry.id, retry);
        this.report(
          `${entry.folder}/${entry.relativePath}: ${(err as Error).message}; ` +
            `it stays in the spool, next try in ${Math.round(LOCAL_RETRY_MS / 1000)} s`,
        );
      } finally {
        freeUploadSlot();
        this.inFlight.delete(entry.id);
        this.pump();
      }
    })();
    this.inFlight.set(entry.id, { promise, controller });
  }

  /** The wait before the first question about a file the server has just queued. */
  private firstStatusDelayMs(): number {
    return Math.min(this.config.statusPollMs, FIRST_STATUS_DELAY_MS);
  }

  private async send(entry: SpoolEntry, signal: AbortSignal): Promise<void> {
    const sender = this.senderFor(entry.folder);
    if (!sender) return;
    const label = `${entry.folder}/${entry.relativePath}`;
    const result = await uploadFile({
      serverUrl: this.config.serverUrl,
      token: sender.token,
      ...(sender.folder !== undefined ? { folder: sender.folder } : {}),
      file: this.spool.binPath(entry),
      fileName: path.posix.basename(entry.relativePath),
      sourcePath: label,
      timeoutMs: this.config.requestTimeoutMs,
      signal,
    });
    const backoff = { initialMs: this.config.retryInitialMs, maxMs: this.config.retryMaxMs };
    const now = Date.now();
    switch (result.kind) {
      case 'aborted':
        return;
      case 'acknowledged': {
        this.serverFailures = 0;
        this.folderFailures.delete(entry.folder);
        const ack = {
          intakeId: result.intakeId,
          status: result.status,
          ...(result.duplicateOfId !== undefined ? { duplicateOfId: result.duplicateOfId } : {}),
        };
        await this.spool.recordOutcome(entry, { kind: 'acknowledged', ...ack, at: new Date().toISOString() });
        const dup = result.duplicateOfId !== undefined ? ` of #${result.duplicateOfId}` : '';
        this.log.info(`uploaded ${label} → intake #${result.intakeId} (${result.status}${dup})`);
        this.emit('uploaded', entry, ack);
        return;
      }
      case 'rejected':
        this.serverFailures = 0;
        this.folderFailures.delete(entry.folder);
        await this.spool.recordOutcome(entry, {
          kind: 'rejected',
          httpStatus: result.httpStatus,
          code: result.code,
          message: result.message,
          at: new Date().toISOString(),
        });
        return;
      case 'unauthorized': {
        const attempts = (this.folderFailures.get(entry.folder) ?? 0) + 1;
        this.folderFailures.set(entry.folder, attempts);
        const delayMs = backoffDelayMs(attempts, backoff);
        this.folderBlockedUntil.set(entry.folder, now + delayMs);
        this.log.error(
          `TOKEN REFUSED (${result.httpStatus}) for instrument folder "${entry.folder}": ${result.message} ` +
            `Files of this folder wait in the spool; check its token in the watcher configuration. ` +
            `${label}: retry in ${seconds(delayMs)} s`,
        );
        this.emit('retry', entry, { delayMs, reason: result.message, httpStatus: result.httpStatus });
        return;
      }
      case 'retry': {
        let delayMs: number;
        if (result.scope === 'file') {
          // Possibly about this file only: back off this entry, let the others go on.
          const retry = this.entryRetry.get(entry.id) ?? { attempts: 0, notBefore: 0 };
          retry.attempts++;
          delayMs = backoffDelayMs(retry.attempts, backoff);
          retry.notBefore = now + delayMs;
          this.entryRetry.set(entry.id, retry);
        } else {
          // The server is away or busy: everyone waits. Two uploads failing together count once.
          if (now >= this.serverBlockedUntil) this.serverFailures++;
          delayMs = backoffDelayMs(this.serverFailures, backoff);
          if (result.retryAfterMs !== undefined) {
            delayMs = Math.max(delayMs, Math.min(result.retryAfterMs, RETRY_AFTER_CAP_MS));
          }
          this.serverBlockedUntil = Math.max(this.serverBlockedUntil, now + delayMs);
        }
        const line = `upload of ${label} failed: ${result.reason}; retry in ${seconds(delayMs)} s`;
        if (result.unexpected) this.log.error(line);
        else this.log.warn(line);
        this.emit('retry', entry, { delayMs, reason: result.reason });
        return;
      }
    }
  }

  // ── finishing: drop folder → done/ or rejected/ ────────────────────────────────────────────────

  private async finish(entry: SpoolEntry): Promise<'finished' | 'later'> {
    const outcome = entry.outcome;
    if (!outcome) return 'finished';
    const label = `${entry.folder}/${entry.relativePath}`;
    // The 202 says the server has the bytes; where the original goes depends on what parsing makes of them.
    let final: { status: string; error?: string | null | undefined } | undefined;
    if (outcome.kind === 'acknowledged') {
      final = outcome.final ?? (FINAL_STATES.has(outcome.status) ? { status: outcome.status } : undefined);
      final ??= await this.learnFinalState(entry);
      if (!final) return 'later';
    }
    const folderDir = path.join(this.config.dropDir, entry.folder);
    const original = path.join(folderDir, ...entry.relativePath.split('/'));
    const name = path.posix.basename(entry.relativePath);
    const state = await this.originalState(original, entry);
    if (state === 'changed') {
      this.log.warn(`${label} changed after it was sent; its new content is sent as well`);
      this.settle.touch(original);
    }

    if (outcome.kind === 'acknowledged' && final?.status === 'quarantined') {
      // Received but not readable: beside done/, so the person at the instrument sees it did not work.
      const message = final.error || 'The server could not read this file.';
      const quarantinedDir = path.join(folderDir, 'quarantined');
      const movedTo =
        state === 'same'
          ? await placeWithoutOverwrite(original, quarantinedDir, name)
          : await placeWithoutOverwrite(this.spool.binPath(entry), quarantinedDir, name, {
              keepSource: true,
            });
      const reason =
        `${message}\n\n` +
        `The server received this file (intake #${outcome.intakeId}) but set it aside. A lab manager can queue it ` +
        `again on the Intake page once the instrument profile is fixed; do not drop it again unchanged.\n\n` +
        `file: ${label}\nsha256: ${entry.sha256}\nsize: ${entry.size} bytes\nat: ${new Date().toISOString()}\n`;
      await writeFileAtomic(`${movedTo}.reason.txt`, reason);
      this.log.error(
        `quarantined ${label} (intake #${outcome.intakeId}: ${message}) → ` +
          path.relative(folderDir, movedTo).split(path.sep).join('/'),
      );
      await this.spool.remove(entry);
      this.emit('quarantined', entry, { message, movedTo });
      return 'finished';
    }

    if (outcome.kind === 'acknowledged') {
      let movedTo: string | null = null;
      if (state === 'same') {
        movedTo = await placeWithoutOverwrite(original, path.join(folderDir, 'done'), name);
        this.log.info(`moved ${label} → ${path.relative(folderDir, movedTo).split(path.sep).join('/')}`);
      } else if (state === 'missing') {
        this.log.info(
          `${label} had already left the drop folder; the server has it (intake #${outcome.intakeId})`,
        );
      }
      await this.spool.remove(entry);
      this.emit('done', entry, { movedTo, status: final?.status ?? outcome.status });
      return 'finished';
    }

    // Rejected: keep the bytes for a person to look at, beside the reason.
    const rejectedDir = path.join(folderDir, 'rejected');
    const movedTo =
      state === 'same'
        ? await placeWithoutOverwrite(original, rejectedDir, name)
        : await placeWithoutOverwrite(this.spool.binPath(entry), rejectedDir, name, { keepSource: true });
    const reason =
      `${outcome.message}\n\n` +
      `file: ${label}\nsha256: ${entry.sha256}\nsize: ${entry.size} bytes\n` +
      `server answer: ${outcome.httpStatus} ${outcome.code}\nat: ${outcome.at}\n`;
    await writeFileAtomic(`${movedTo}.reason.txt`, reason);
    this.log.error(
      `rejected ${label} (${outcome.httpStatus} ${outcome.code}: ${outcome.message}) → ` +
        path.relative(folderDir, movedTo).split(path.sep).join('/'),
    );
    await this.spool.remove(entry);
    this.emit('rejected', entry, {
      httpStatus: outcome.httpStatus,
      code: outcome.code,
      message: outcome.message,
      movedTo,
    });
    return 'finished';
  }

  /**
   * Ask the server for the final state of an acknowledged file. Undefined: not final yet, or the server
   * cannot be asked now (asked again later). A server that does not report states (404) or refuses the
   * token counts as "accepted": it has the bytes, and the original goes to done/ as it always did.
   */
  private async learnFinalState(
    entry: SpoolEntry,
  ): Promise<{ status: string; error?: string | null } | undefined> {
    const outcome = entry.outcome;
    if (outcome?.kind !== 'acknowledged') return undefined;
    const label = `${entry.folder}/${entry.relativePath}`;
    const token = this.tokens.get(entry.folder) ?? this.config.watcherToken;
    let final: { status: string; error?: string | null; at: string } | undefined;
    if (!token) {
      final = { status: 'accepted', at: new Date().toISOString() };
    } else {
      const answer = await fetchFileStatus(
        this.config.serverUrl,
        token,
        outcome.intakeId,
        Math.min(this.config.requestTimeoutMs, 15_000),
      );
      if (answer.kind === 'ok') {
        if (!FINAL_STATES.has(answer.value.status)) return undefined;
        final = {
          status: answer.value.status,
          error: answer.value.error ?? null,
          at: new Date().toISOString(),
        };
      } else if (answer.kind === 'failed') {
        this.log.warn(`${label}: cannot learn its state yet (${answer.reason}); asking again`);
        return undefined;
      } else {
        this.warnOnce(
          `no-states:${answer.kind}`,
          answer.kind === 'unknown'
            ? 'the server does not report the state of sent files (an older server?): files go to done/ once the server has them'
            : `the server refused to report a file's state (${answer.httpStatus}); files go to done/ once the server has them`,
        );
        final = { status: 'accepted', at: new Date().toISOString() };
      }
    }
    await this.spool.recordOutcome(entry, { ...outcome, final });
    return final;
  }

  /** Is the drop-folder file still the one that was spooled? */
  private async originalState(file: string, entry: SpoolEntry): Promise<'same' | 'changed' | 'missing'> {
    try {
      const stat = await fsp.lstat(file);
      if (!stat.isFile()) return 'missing';
      if (stat.size !== entry.size) return 'changed';
      return (await hashFile(file)).sha256 === entry.sha256 ? 'same' : 'changed';
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === 'ENOENT') return 'missing';
      throw err;
    }
  }

  // ── plumbing ───────────────────────────────────────────────────────────────────────────────────

  private withPathLock(key: string, work: () => Promise<void>): Promise<void> {
    const previous = this.pathLocks.get(key) ?? Promise.resolve();
    const next = previous.then(work, work);
    const tail = next.catch(() => undefined);
    this.pathLocks.set(key, tail);
    void tail.then(() => {
      if (this.pathLocks.get(key) === tail) this.pathLocks.delete(key);
    });
    return next;
  }

  private runInBackground(work: Promise<void>): void {
    const tracked = work.catch((err: unknown) => this.report(String((err as Error)?.message ?? err)));
    this.background.add(tracked);
    void tracked.finally(() => this.background.delete(tracked));
  }

  private later(ms: number, fn: () => void): void {
    if (this.state !== 'running') return;
    const timer = setTimeout(() => {
      this.timers.delete(timer);
      if (this.state === 'running') fn();
    }, ms);
    this.timers.add(timer);
  }

  private report(message: string): void {
    this.log.error(message);
    this.emit('problem', { message });
  }

  private warnOnce(key: string, message: string): void {
    if (this.warned.has(key)) return;
    this.warned.add(key);
    this.log.warn(message);
  }
}

function seconds(ms: number): string {
  return (ms / 1000).toFixed(1);
}
