import fs from 'node:fs';
import path from 'node:path';
import { createWatcher, type DropFolderWatcher } from '../watcher';
import {
  IngestTestServer,
  listFiles,
  longTable,
  memoryLogger,
  reservePort,
  sandbox,
  type Sandbox,
  sleep,
  TOKEN_A,
  TOKEN_B,
  waitFor,
} from './support';

jest.setTimeout(30_000);

describe('drop-folder watcher against a real HTTP server', () => {
  let server: IngestTestServer;
  let box: Sandbox;
  let watcher: DropFolderWatcher | undefined;
  let log: ReturnType<typeof memoryLogger>;

  beforeEach(async () => {
    server = new IngestTestServer();
    await server.listen(0);
    box = sandbox(() => server.url);
    log = memoryLogger();
  });

  afterEach(async () => {
    await watcher?.stop();
    watcher = undefined;
    await server.close();
    box.remove();
  });

  async function startWatcher(overrides = {}): Promise<DropFolderWatcher> {
    const w = createWatcher(box.config(overrides), { logger: log });
    watcher = w;
    await w.start();
    return w;
  }

  function spoolFiles(): string[] {
    return listFiles(box.spoolDir).filter((n) => n.endsWith('.bin') || n.endsWith('.json'));
  }

  it('when a file is dropped then it is uploaded once with its folder token and moved to done/', async () => {
    const w = await startWatcher();
    const done = new Promise((resolve) => w.on('done', (_entry, result) => resolve(result)));
    const content = longTable(1);
    fs.writeFileSync(path.join(box.folder(), 'run-17.csv'), content);

    const result = (await done) as { movedTo: string };
    expect(server.uploads).toHaveLength(1);
    const [upload] = server.uploads;
    expect(upload!.authorization).toBe(`Bearer ${TOKEN_A}`);
    expect(upload!.bytes.toString()).toBe(content);
    expect(upload!.fileName).toBe('run-17.csv');
    expect(upload!.sourcePath).toBe('reader-1/run-17.csv');
    expect(upload!.contentType).toBe('text/csv');
    expect(result.movedTo).toBe(path.join(box.folder(), 'done', 'run-17.csv'));
    expect(fs.readFileSync(result.movedTo, 'utf8')).toBe(content);
    expect(fs.existsSync(path.join(box.folder(), 'run-17.csv'))).toBe(false);
    expect(spoolFiles()).toEqual([]);
    expect(log.lines.some((l) => l.includes('uploaded reader-1/run-17.csv → intake #1 (queued)'))).toBe(true);
    await sleep(500);
    expect(server.uploads).toHaveLength(1);
  });

  it('when files land in two instrument folders then each goes with its own token', async () => {
    const w = await startWatcher();
    let finished = 0;
    w.on('done', () => finished++);
    fs.writeFileSync(path.join(box.folder('reader-1'), 'a.csv'), longTable(2));
    fs.mkdirSync(path.join(box.folder('cuvette-2'), '2025-06'), { recursive: true });
    fs.writeFileSync(path.join(box.folder('cuvette-2'), '2025-06', 'b.csv'), longTable(3));
    await waitFor('two files done', () => finished === 2);
    const bySource = new Map(server.uploads.map((u) => [u.sourcePath, u.authorization]));
    expect(bySource.get('reader-1/a.csv')).toBe(`Bearer ${TOKEN_A}`);
    expect(bySource.get('cuvette-2/2025-06/b.csv')).toBe(`Bearer ${TOKEN_B}`);
    expect(listFiles(path.join(box.folder('cuvette-2'), 'done'))).toEqual(['b.csv']);
  });

  it('when a file is still growing then it is not sent until it has settled', async () => {
    const settleMs = 400;
    const w = await startWatcher({ settleMs });
    const spooledAt: number[] = [];
    w.on('spooled', () => spooledAt.push(Date.now()));
    const file = path.join(box.folder(), 'slow-export.csv');
    const lines = longTable(4, 40).split('\n');
    fs.writeFileSync(file, `${lines[0]}\n`);
    for (const line of lines.slice(1)) {
      await sleep(60);
      fs.appendFileSync(file, `${line}\n`);
      expect(server.uploads).toHaveLength(0);
    }
    const lastWrite = Date.now();
    await waitFor('moved to done', () => listFiles(path.join(box.folder(), 'done')).length === 1);
    expect(server.uploads).toHaveLength(1);
    expect(spooledAt[0]! - lastWrite).toBeGreaterThanOrEqual(settleMs - 20);
    expect(server.uploads[0]!.bytes.toString()).toBe(
      fs.readFileSync(path.join(box.folder(), 'done', 'slow-export.csv'), 'utf8'),
    );
    expect(server.uploads[0]!.bytes.toString().trim().split('\n')).toHaveLength(41);
  });

  it('when a file is still being written as the watcher starts then it waits for it to settle', async () => {
    const file = path.join(box.folder(), 'started-early.csv');
    fs.mkdirSync(box.folder(), { recursive: true });
    const lines = longTable(20, 30).split('\n');
    fs.writeFileSync(file, `${lines[0]}\n`);
    const w = createWatcher(box.config({ settleMs: 400 }), { logger: log });
    watcher = w;
    const started = w.start();
    for (const line of lines.slice(1)) {
      await sleep(50);
      fs.appendFileSync(file, `${line}\n`);
    }
    await started;
    await waitFor('upload', () => server.uploads.length === 1);
    expect(server.uploads[0]!.bytes.toString()).toBe(lines.join('\n') + '\n');
  });

  it('when the watcher is stopped during an upload then it stops promptly and the next start delivers the file', async () => {
    // The server holds its answer far longer than the grace: a stop that waited for it would take 8 s.
    server.answerDelayMs = 8000;
    const first = await startWatcher({ shutdownGraceMs: 200 });
    const file = path.join(box.folder(), 'in-flight.csv');
    fs.writeFileSync(file, longTable(21));
    await waitFor('an upload in flight', () => server.active === 1);
    const stopStarted = Date.now();
    await first.stop();
    watcher = undefined;
    expect(Date.now() - stopStarted).toBeLessThan(5000);
    expect(fs.existsSync(file)).toBe(true);
    expect(spoolFiles()).toHaveLength(2);

    server.answerDelayMs = 0;
    const second = await startWatcher();
    const done = new Promise((resolve) => second.on('done', resolve));
    await done;
    expect(listFiles(path.join(box.folder(), 'done'))).toEqual(['in-flight.csv']);
    expect(spoolFiles()).toEqual([]);
  });

  it('when temporary, hidden, finished or unlisted files are present then none is sent', async () => {
    const folder = box.folder();
    fs.mkdirSync(path.join(folder, 'done'), { recursive: true });
    fs.mkdirSync(path.join(folder, 'rejected'), { recursive: true });
    fs.mkdirSync(path.join(box.dropDir, 'unknown-reader'), { recursive: true });
    fs.writeFileSync(path.join(folder, 'done', 'old.csv'), longTable(5));
    fs.writeFileSync(path.join(folder, 'rejected', 'bad.csv'), 'junk');
    fs.writeFileSync(path.join(box.dropDir, 'unknown-reader', 'x.csv'), longTable(6));
    fs.writeFileSync(path.join(box.dropDir, 'loose.csv'), longTable(7));
    const w = await startWatcher();
    let spooled = 0;
    w.on('spooled', () => spooled++);
    for (const name of ['~$run.csv', 'run.csv.tmp', 'run.csv.part', '.hidden.csv', 'RUN.TMP']) {
      fs.writeFileSync(path.join(folder, name), longTable(8));
    }
    fs.mkdirSync(path.join(folder, '.cache'));
    fs.writeFileSync(path.join(folder, '.cache', 'inside.csv'), longTable(9));
    fs.writeFileSync(path.join(folder, 'real.csv'), longTable(10));
    await waitFor('the real file', () => server.uploads.length === 1);
    await sleep(600);
    expect(server.uploads.map((u) => u.sourcePath)).toEqual(['reader-1/real.csv']);
    expect(spooled).toBe(1);
    expect(fs.existsSync(path.join(folder, 'run.csv.part'))).toBe(true);
    expect(log.lines.filter((l) => l.includes('unknown-reader'))).toHaveLength(1);
  });

  it('when a temporary file is renamed to its final name then the final file is sent', async () => {
    const w = await startWatcher();
    const done = new Promise((resolve) => w.on('done', resolve));
    const folder = box.folder();
    fs.writeFileSync(path.join(folder, 'plate.csv.part'), longTable(11));
    await sleep(400);
    expect(server.uploads).toHaveLength(0);
    fs.renameSync(path.join(folder, 'plate.csv.part'), path.join(folder, 'plate.csv'));
    await done;
    expect(server.uploads.map((u) => u.fileName)).toEqual(['plate.csv']);
  });

  it('when the server is offline then the file waits in spool and drop folder, and is sent once when it returns', async () => {
    await server.close();
    const port = await reservePort();
    const offline = new IngestTestServer();
    box.remove();
    box = sandbox(() => `http://127.0.0.1:${port}`);
    const w = await startWatcher();
    let finished = 0;
    w.on('done', () => finished++);
    const retries: number[] = [];
    w.on('retry', (_e, info) => retries.push(info.delayMs));
    const file = path.join(box.folder(), 'while-away.csv');
    fs.writeFileSync(file, longTable(12));
    await waitFor('a few retries', () => retries.length >= 3);
    expect(fs.existsSync(file)).toBe(true);
    expect(spoolFiles()).toHaveLength(2);
    expect(w.pending()).toHaveLength(1);
    expect(log.lines.some((l) => /server unreachable \(ECONNREFUSED\); retry in \d+\.\d s/.test(l))).toBe(
      true,
    );

    server = offline;
    await server.listen(port);
    await waitFor('done', () => finished === 1);
    expect(listFiles(path.join(box.folder(), 'done'))).toEqual(['while-away.csv']);
    expect(server.uploads).toHaveLength(1);
    expect(fs.existsSync(file)).toBe(false);
    expect(spoolFiles()).toEqual([]);
    await sleep(500);
    expect(server.uploads).toHaveLength(1);
  });

  it('when the server answers 500 or 503 then it retries with back-off until a 202', async () => {
    let calls = 0;
    server.answer = (upload) => {
      calls++;
      if (calls === 1) return { status: 503, body: { error: { code: 'busy', message: 'Try later.' } } };
      if (calls === 2) return { status: 500, body: { error: { code: 'internal', message: 'Oops.' } } };
      return server.accept(upload);
    };
    const w = await startWatcher();
    const done = new Promise((resolve) => w.on('done', resolve));
    fs.writeFileSync(path.join(box.folder(), 'flaky.csv'), longTable(13));
    await done;
    expect(calls).toBe(3);
    expect(listFiles(path.join(box.folder(), 'done'))).toEqual(['flaky.csv']);
  });

  it('when the server refuses the file as too large then it goes to rejected/ with the reason', async () => {
    server.answer = () => ({
      status: 413,
      body: { error: { code: 'payload_too_large', message: 'The file is larger than the upload limit.' } },
    });
    const w = await startWatcher();
    const rejected = new Promise((resolve) => w.on('rejected', resolve));
    fs.writeFileSync(path.join(box.folder(), 'huge.csv'), longTable(14));
    await rejected;
    const dir = path.join(box.folder(), 'rejected');
    expect(listFiles(dir)).toEqual(['huge.csv', 'huge.csv.reason.txt']);
    const reason = fs.readFileSync(path.join(dir, 'huge.csv.reason.txt'), 'utf8');
    expect(reason).toContain('The file is larger than the upload limit.');
    expect(reason).toContain('413 payload_too_large');
    expect(fs.readFileSync(path.join(dir, 'huge.csv'), 'utf8')).toBe(longTable(14));
    expect(listFiles(path.join(box.folder(), 'done'))).toEqual([]);
    expect(spoolFiles()).toEqual([]);
    expect(server.uploads).toHaveLength(1);
    expect(
      log.lines.some((l) => l.startsWith('ERROR rejected reader-1/huge.csv (413 payload_too_large')),
    ).toBe(true);
  });

  it('when the token is refused then the file stays, is retried loudly, and goes once the token works', async () => {
    let tokenValid = false;
    server.answer = (upload) =>
      tokenValid
        ? server.accept(upload)
        : {
            status: 401,
            body: { error: { code: 'unauthorized', message: 'Unknown or revoked instrument token.' } },
          };
    const w = await startWatcher();
    const refusals: number[] = [];
    w.on('retry', (_e, info) => refusals.push(info.httpStatus ?? 0));
    const file = path.join(box.folder(), 'needs-token.csv');
    fs.writeFileSync(file, longTable(15));
    await waitFor('two refusals', () => refusals.length >= 2);
    expect(refusals.every((s) => s === 401)).toBe(true);
    expect(fs.existsSync(file)).toBe(true);
    expect(listFiles(path.join(box.folder(), 'rejected'))).toEqual([]);
    expect(
      log.lines.some((l) => l.startsWith('ERROR TOKEN REFUSED (401) for instrument folder "reader-1"')),
    ).toBe(true);
    tokenValid = true;
    await waitFor('moved to done', () => listFiles(path.join(box.folder(), 'done')).length === 1);
    expect(server.answeredWith(202)).toHaveLength(1);
  });

  it('when a file of that name is already in done/ then the new one gets a suffix, nothing is overwritten', async () => {
    const doneDir = path.join(box.folder(), 'done');
    fs.mkdirSync(doneDir, { recursive: true });
    fs.writeFileSync(path.join(doneDir, 'run.csv'), 'yesterday');
    fs.writeFileSync(path.join(doneDir, 'run-1.csv'), 'the day before');
    const w = await startWatcher();
    const done = new Promise((resolve) => w.on('done', (_e, r) => resolve(r.movedTo)));
    fs.writeFileSync(path.join(box.folder(), 'run.csv'), longTable(16));
    expect(await done).toBe(path.join(doneDir, 'run-2.csv'));
    expect(fs.readFileSync(path.join(doneDir, 'run.csv'), 'utf8')).toBe('yesterday');
    expect(fs.readFileSync(path.join(doneDir, 'run-1.csv'), 'utf8')).toBe('the day before');
    expect(fs.readFileSync(path.join(doneDir, 'run-2.csv'), 'utf8')).toBe(longTable(16));
  });

  it('when the server says duplicate then that is an acknowledgement and the file goes to done/', async () => {
    const w = await startWatcher();
    const statuses: string[] = [];
    w.on('uploaded', (_e, ack) => statuses.push(ack.status));
    let finished = 0;
    w.on('done', () => finished++);
    fs.writeFileSync(path.join(box.folder(), 'first.csv'), longTable(17));
    await waitFor('first', () => finished === 1);
    fs.writeFileSync(path.join(box.folder(), 'copy-of-first.csv'), longTable(17));
    await waitFor('second', () => finished === 2);
    expect(statuses).toEqual(['queued', 'duplicate']);
    expect(listFiles(path.join(box.folder(), 'done'))).toEqual(['copy-of-first.csv', 'first.csv']);
  });

  it('when the watcher restarts with files in the spool then each is sent exactly once', async () => {
    await server.close();
    const port = await reservePort();
    box.remove();
    box = sandbox(() => `http://127.0.0.1:${port}`);
    const first = await startWatcher();
    let spooled = 0;
    first.on('spooled', () => spooled++);
    for (let i = 0; i < 5; i++)
      fs.writeFileSync(path.join(box.folder(), `queued-${i}.csv`), longTable(100 + i));
    await waitFor('five spooled', () => spooled === 5);
    await first.stop();
    watcher = undefined;
    expect(spoolFiles()).toHaveLength(10);

    // Two more arrive while no watcher runs.
    for (let i = 5; i < 7; i++)
      fs.writeFileSync(path.join(box.folder(), `queued-${i}.csv`), longTable(100 + i));
    server = new IngestTestServer();
    await server.listen(port);
    const second = await startWatcher();
    let finished = 0;
    second.on('done', () => finished++);
    await waitFor('seven done', () => finished === 7);
    await sleep(500);
    expect(server.uploads).toHaveLength(7);
    expect(new Set(server.uploads.map((u) => u.sha256)).size).toBe(7);
    expect(listFiles(path.join(box.folder(), 'done'))).toHaveLength(7);
    expect(listFiles(box.folder()).filter((n) => n.endsWith('.csv'))).toEqual([]);
    expect(spoolFiles()).toEqual([]);
  });

  it('when the watcher stopped after the 202 but before moving the file then a restart moves it without sending again', async () => {
    const first = await startWatcher();
    // Stand-in for a crash right after the acknowledgement was written to the spool.
    const stopAfterAck = new Promise<void>((resolve) => first.on('uploaded', () => resolve()));
    const file = path.join(box.folder(), 'acked.csv');
    fs.writeFileSync(file, longTable(18));
    await stopAfterAck;
    await first.stop();
    watcher = undefined;
    // Put the original and the acknowledged entry back as a crash would have left them.
    if (!fs.existsSync(file)) fs.writeFileSync(file, longTable(18));
    const entryJson = JSON.stringify({
      id: '4f1c2c1e-6d0b-4e4a-9a59-0b8a1f0d9c11',
      folder: 'reader-1',
      relativePath: 'acked.csv',
      size: Buffer.byteLength(longTable(18)),
      sha256: server.uploads[0]!.sha256,
      firstSeenAt: new Date().toISOString(),
      spooledAt: new Date().toISOString(),
      outcome: { kind: 'acknowledged', intakeId: 1, status: 'queued', at: new Date().toISOString() },
    });
    fs.writeFileSync(path.join(box.spoolDir, '4f1c2c1e-6d0b-4e4a-9a59-0b8a1f0d9c11.bin'), longTable(18));
    fs.writeFileSync(path.join(box.spoolDir, '4f1c2c1e-6d0b-4e4a-9a59-0b8a1f0d9c11.json'), entryJson);
    fs.rmSync(path.join(box.folder(), 'done'), { recursive: true, force: true });

    const second = await startWatcher();
    const done = new Promise((resolve) => second.on('done', resolve));
    await done;
    await sleep(400);
    expect(server.uploads).toHaveLength(1);
    expect(listFiles(path.join(box.folder(), 'done'))).toEqual(['acked.csv']);
    expect(fs.existsSync(file)).toBe(false);
  });

  it('when the original vanished before the 202 then the spool copy still completes the delivery', async () => {
    let release!: () => void;
    const gate = new Promise<void>((resolve) => (release = resolve));
    await server.close();
    const port = await reservePort();
    box.remove();
    box = sandbox(() => `http://127.0.0.1:${port}`);
    const w = await startWatcher();
    w.on('spooled', () => release());
    const file = path.join(box.folder(), 'gone.csv');
    fs.writeFileSync(file, longTable(19));
    await gate;
    fs.rmSync(file);
    server = new IngestTestServer();
    await server.listen(port);
    const done = new Promise((resolve) => w.on('done', (_e, r) => resolve(r.movedTo)));
    expect(await done).toBeNull();
    expect(server.uploads.map((u) => u.bytes.toString())).toEqual([longTable(19)]);
    expect(spoolFiles()).toEqual([]);
  });

  it('when many files arrive then no more than the configured number of uploads run at once', async () => {
    server.answerDelayMs = 80;
    const w = await startWatcher({ maxConcurrentUploads: 2 });
    let finished = 0;
    w.on('done', () => finished++);
    for (let i = 0; i < 8; i++)
      fs.writeFileSync(path.join(box.folder(), `batch-${i}.csv`), longTable(200 + i));
    await waitFor('eight done', () => finished === 8);
    expect(server.maxActive).toBe(2);
    expect(server.uploads).toHaveLength(8);
  });

  it('when a second watcher is started on the same spool then it refuses', async () => {
    await startWatcher();
    const second = createWatcher(box.config(), { logger: log });
    await expect(second.start()).rejects.toThrow(/already in use/);
  });

  it('when a link points at an export inside the drop folder then it is still refused, and the export sent once', async () => {
    const w = await startWatcher();
    const refused: Array<{ file: string; movedTo: string | null }> = [];
    w.on('refused', (info) => refused.push(info));
    let finished = 0;
    w.on('done', () => finished++);
    fs.mkdirSync(path.join(box.folder(), 'exports'), { recursive: true });
    fs.writeFileSync(path.join(box.folder(), 'exports', 'run-40.csv'), longTable(40));
    fs.symlinkSync(
      path.join(box.folder(), 'exports', 'run-40.csv'),
      path.join(box.folder(), 'run-40-link.csv'),
    );

    await waitFor('the link refused and the export sent', () => refused.length === 1 && finished === 1);
    expect(refused[0]!.file).toBe('reader-1/run-40-link.csv');
    expect(fs.lstatSync(refused[0]!.movedTo!).isSymbolicLink()).toBe(true);
    expect(fs.readFileSync(`${refused[0]!.movedTo!}.reason.txt`, 'utf8')).toMatch(/never follows links/);
    expect(server.uploads.map((u) => u.sourcePath)).toEqual(['reader-1/exports/run-40.csv']);
  });

  it('when a file has another hard link then it is moved to rejected/ unread and never uploaded', async () => {
    const outside = path.join(box.root, 'elsewhere.csv');
    fs.writeFileSync(outside, longTable(41));
    const w = await startWatcher();
    const refused = new Promise<{ movedTo: string | null }>((resolve) => w.on('refused', resolve));
    fs.linkSync(outside, path.join(box.folder(), 'run-41.csv'));

    const { movedTo } = await refused;
    expect(movedTo).toBe(path.join(box.folder(), 'rejected', 'run-41.csv'));
    expect(fs.readFileSync(outside, 'utf8')).toBe(longTable(41));
    await sleep(400);
    expect(server.uploads).toEqual([]);
  });
});
