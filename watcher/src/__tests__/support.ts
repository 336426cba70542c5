import crypto from 'node:crypto';
import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { parseWatcherConfig, type WatcherConfig, type WatcherConfigInput } from '../config';
import type { WatcherLogger } from '../logger';

export interface RecordedUpload {
  authorization: string | undefined;
  fileName: string;
  sourcePath: string | null;
  contentType: string;
  bytes: Buffer;
  sha256: string;
}

export interface Answer {
  status: number;
  body?: unknown;
  headers?: Record<string, string>;
}

/**
 * A small real HTTP server standing in for the ingest route: records every upload and answers
 * what the test tells it to (by default 202, with `duplicate` for content it has seen).
 */
export class IngestTestServer {
  readonly uploads: RecordedUpload[] = [];
  /** The status answered to each of `uploads`. */
  readonly statuses: number[] = [];
  /** Every request, including refused ones. */
  requests = 0;
  /** Hold each answer this long (to make overlapping uploads observable). */
  answerDelayMs = 0;
  active = 0;
  maxActive = 0;
  answer: (upload: RecordedUpload) => Answer = (upload) => this.accept(upload);
  /** Answers GET /api/watcher/files/:id when set (otherwise 404, as an older server). */
  fileStatus: ((id: number) => Answer) | undefined;
  /** How often each file's state was asked for. */
  readonly statusQuestions: number[] = [];
  private server: http.Server | undefined;
  private nextId = 1;
  private readonly firstIdBySha = new Map<string, number>();
  port = 0;

  get url(): string {
    return `http://127.0.0.1:${this.port}`;
  }

  /** The 202 the real server gives: queued the first time, duplicate after. */
  accept(upload: RecordedUpload): Answer {
    const id = this.nextId++;
    const first = this.firstIdBySha.get(upload.sha256);
    if (first !== undefined) return { status: 202, body: { id, status: 'duplicate', duplicateOfId: first } };
    this.firstIdBySha.set(upload.sha256, id);
    return { status: 202, body: { id, status: 'queued' } };
  }

  /** Uploads answered with this status. */
  answeredWith(status: number): RecordedUpload[] {
    return this.statuses.flatMap((s, i) => (s === status ? [this.uploads[i]!] : []));
  }

  async listen(port = this.port): Promise<void> {
    const server = http.createServer((req, res) => void this.handle(req, res));
    await new Promise<void>((resolve, reject) => {
      server.once('error', reject);
      server.listen(port, '127.0.0.1', () => resolve());
    });
    this.server = server;
    this.port = (server.address() as AddressInfo).port;
  }

  async close(): Promise<void> {
    const server = this.server;
    if (!server) return;
    this.server = undefined;
    server.closeAllConnections();
    await new Promise<void>((resolve) => server.close(() => resolve()));
  }

  private async handle(req: http.IncomingMessage, res: http.ServerResponse): Promise<void> {
    this.requests++;
    // Uploads only: the watcher's reports and state questions are not uploads.
    const upload = req.url === '/api/ingest';
    if (upload) this.active++;
    this.maxActive = Math.max(this.maxActive, this.active);
    try {
      await this.respond(req, res);
    } finally {
      if (upload) this.active--;
    }
  }

  private async respond(req: http.IncomingMessage, res: http.ServerResponse): Promise<void> {
    const chunks: Buffer[] = [];
    for await (const chunk of req) chunks.push(chunk as Buffer);
    const status = /^\/api\/watcher\/files\/(\d+)$/.exec(req.url ?? '');
    if (req.method === 'GET' && status && this.fileStatus) {
      const id = Number(status[1]);
      this.statusQuestions.push(id);
      const answer = this.fileStatus(id);
      res.writeHead(answer.status, { 'content-type': 'application/json' });
      res.end(JSON.stringify(answer.body));
      return;
    }
    if (req.method !== 'POST' || req.url !== '/api/ingest') {
      res.writeHead(404, { 'content-type': 'application/json' });
      res.end(JSON.stringify({ error: { code: 'not_found', message: 'No such route.' } }));
      return;
    }
    const form = await new Response(Buffer.concat(chunks), {
      headers: { 'content-type': req.headers['content-type'] ?? '' },
    }).formData();
    const file = form.get('file') as File;
    const bytes = Buffer.from(await file.arrayBuffer());
    const upload: RecordedUpload = {
      authorization: req.headers.authorization,
      fileName: file.name,
      sourcePath: form.get('sourcePath') as string | null,
      contentType: file.type,
      bytes,
      sha256: crypto.createHash('sha256').update(bytes).digest('hex'),
    };
    if (this.answerDelayMs > 0) await sleep(this.answerDelayMs);
    this.uploads.push(upload);
    const answer = this.answer(upload);
    this.statuses.push(answer.status);
    res.writeHead(answer.status, { 'content-type': 'application/json', ...answer.headers });
    res.end(answer.body === undefined ? '' : JSON.stringify(answer.body));
  }
}

/** A port that was free a moment ago, for a server that starts later ("offline" first). */
export async function reservePort(): Promise<number> {
  const probe = new IngestTestServer();
  await probe.listen(0);
  const port = probe.port;
  await probe.close();
  return port;
}

export const TOKEN_A = `eqt_${'a'.repeat(43)}`;
export const TOKEN_B = `eqt_${'b'.repeat(43)}`;

export interface Sandbox {
  root: string;
  dropDir: string;
  spoolDir: string;
  folder(name?: string): string;
  config(overrides?: Partial<WatcherConfigInput>): WatcherConfig;
  remove(): void;
}

/** Temporary drop and spool folders, and a configuration for them with fast timings. */
export function sandbox(serverUrl: () => string): Sandbox {
  const root = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-watcher-'));
  const dropDir = path.join(root, 'drop');
  const spoolDir = path.join(root, 'spool');
  fs.mkdirSync(dropDir);
  return {
    root,
    dropDir,
    spoolDir,
    folder: (name = 'reader-1') => path.join(dropDir, name),
    config: (overrides = {}) =>
      parseWatcherConfig({
        serverUrl: serverUrl(),
        dropDir,
        spoolDir,
        settleMs: 200,
        retryInitialMs: 50,
        retryMaxMs: 400,
        shutdownGraceMs: 1000,
        instruments: [
          { folder: 'reader-1', token: TOKEN_A },
          { folder: 'cuvette-2', token: TOKEN_B },
        ],
        ...overrides,
      }),
    remove: () => fs.rmSync(root, { recursive: true, force: true }),
  };
}

/** A logger that keeps the lines, for assertions and for a failing test's message. */
export function memoryLogger(): WatcherLogger & { lines: string[] } {
  const lines: string[] = [];
  return {
    lines,
    info: (m) => lines.push(`info ${m}`),
    warn: (m) => lines.push(`warn ${m}`),
    error: (m) => lines.push(`ERROR ${m}`),
  };
}

export async function waitFor(what: string, check: () => boolean, timeoutMs = 10_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (!check()) {
    if (Date.now() > deadline) throw new Error(`timed out waiting for: ${what}`);
    await sleep(20);
  }
}

export function sleep(ms: number): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, ms));
}

/** A small long-table export, different for every `seed`. */
export function longTable(seed: number, rows = 12): string {
  const lines = ['position,wavelength_nm,absorbance'];
  for (let i = 0; i < rows; i++) {
    const row = String.fromCharCode(65 + (i % 8));
    lines.push(`${row}${(i % 12) + 1},450,${(0.1 + ((seed * 31 + i * 7) % 900) / 1000).toFixed(4)}`);
  }
  return `${lines.join('\n')}\n`;
}

export function listFiles(dir: string): string[] {
  return fs.existsSync(dir) ? fs.readdirSync(dir).sort() : [];
}
