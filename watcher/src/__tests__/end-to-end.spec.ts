import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { DataSource } from 'typeorm';
import {
  type Child,
  E2E_PASSWORD,
  freePort,
  type IntakeItem,
  requireBuilt,
  Session,
  startServer,
  startWatcherProcess,
} from './processes';
import { listFiles, sleep } from './support';

/**
 * The real server (built, its own process, a temporary SQLite file) and the real watcher process on
 * temporary folders: files arrive exactly once through server stops, crashes and watcher crashes.
 */
jest.setTimeout(180_000);

const ROWS = 'ABCDEFGH';
const WELLS_PER_FILE = 96;

/** A 96-well long-table export at 450 nm whose absorbances differ for every `seed`. */
function plateExport(seed: number): string {
  const lines = ['position,wavelength_nm,absorbance'];
  for (let r = 0; r < 8; r++) {
    for (let c = 1; c <= 12; c++) {
      const a = 0.05 + (((seed * 131 + r * 17 + c * 7) % 997) / 997) * 1.4;
      lines.push(`${ROWS[r]}${c},450,${a.toFixed(4)}`);
    }
  }
  return `${lines.join('\r\n')}\r\n`;
}

describe('watcher and server as real processes', () => {
  let root: string;
  let dataDir: string;
  let dropFolder: string;
  let spoolDir: string;
  let port: number;
  let baseUrl: string;
  let server: Child | undefined;
  let watcher: Child | undefined;
  let admin: Session;
  let profileId: number;
  let seed = 0;

  function drop(count: number): void {
    for (let i = 0; i < count; i++) {
      seed++;
      const name = `RUN-${String(seed).padStart(4, '0')}.csv`;
      // Written under a temporary name and renamed, as many exporters do; half written in place.
      if (seed % 2 === 0) {
        fs.writeFileSync(path.join(dropFolder, `${name}.part`), plateExport(seed));
        fs.renameSync(path.join(dropFolder, `${name}.part`), path.join(dropFolder, name));
      } else {
        fs.writeFileSync(path.join(dropFolder, name), plateExport(seed));
      }
    }
  }

  function logs(): string {
    return `--- server ---\n${server?.output().slice(-4000) ?? ''}\n--- watcher ---\n${watcher?.output().slice(-6000) ?? ''}`;
  }

  async function until(
    what: string,
    check: () => Promise<boolean> | boolean,
    timeoutMs = 60_000,
  ): Promise<void> {
    const deadline = Date.now() + timeoutMs;
    while (!(await check())) {
      if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}\n${logs()}`);
      await sleep(100);
    }
  }

  async function intake(): Promise<IntakeItem[]> {
    // Only this test's instrument: the server's own demo seed brings files of its demo instruments too.
    const page = await admin.json<{ items: IntakeItem[]; total: number }>(
      'GET',
      `/api/intake?pageSize=500&profileId=${profileId}`,
    );
    expect(page.total).toBe(page.items.length);
    return page.items;
  }

  /** Every dropped file stored exactly once, with all its readings, and nothing left behind. */
  async function expectExactlyOnce(expected: number): Promise<void> {
    await until(`${expected} files stored`, async () => {
      const items = await intake();
      return items.filter(landed).length >= expected && !items.some(isPending);
    });
    const items = await intake();
    const stored = items.filter(landed);
    expect(stored).toHaveLength(expected);
    expect(new Set(stored.map((i) => i.sha256)).size).toBe(expected);
    expect(new Set(stored.map((i) => i.originalName)).size).toBe(expected);
    expect(stored.every((i) => i.readingCount === WELLS_PER_FILE)).toBe(true);
    // Anything else can only be a re-delivery the server recognised (same content), never a second copy.
    expect(items.filter((i) => !landed(i) && i.status !== 'duplicate')).toEqual([]);

    // The readings table itself: each stored file's readings exactly once, none for duplicates.
    const db = new DataSource({
      type: 'better-sqlite3',
      database: path.join(dataDir, 'equilight.sqlite'),
      readonly: true,
    });
    await db.initialize();
    try {
      const rows = (await db.query(
        'SELECT r.intake_file_id AS id, COUNT(*) AS n FROM readings r JOIN intake_files f ON f.id = r.intake_file_id ' +
          'WHERE f.profile_id = ? GROUP BY r.intake_file_id',
        [profileId],
      )) as Array<{ id: number; n: number }>;
      expect(rows).toHaveLength(expected);
      expect(rows.every((r) => Number(r.n) === WELLS_PER_FILE)).toBe(true);
      expect(new Set(rows.map((r) => r.id))).toEqual(new Set(stored.map((i) => i.id)));
    } finally {
      await db.destroy();
    }

    await until('the drop folder and spool to empty', () => {
      const waiting = listFiles(dropFolder).filter((n) => n.endsWith('.csv'));
      const spooled = listFiles(spoolDir).filter((n) => n.endsWith('.json'));
      return waiting.length === 0 && spooled.length === 0;
    });
    expect(listFiles(path.join(dropFolder, 'done')).filter((n) => n.startsWith('RUN-'))).toHaveLength(
      expected,
    );
  }

  const isPending = (i: IntakeItem) => i.status === 'queued' || i.status === 'parsing';
  /** Readings stored: `stored` when the run matched a batch, `unassigned` while no batch claims it. */
  const landed = (i: IntakeItem) => i.status === 'stored' || i.status === 'unassigned';

  beforeAll(async () => {
    requireBuilt();
    root = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-watcher-e2e-'));
    dataDir = path.join(root, 'data');
    spoolDir = path.join(root, 'spool');
    const dropDir = path.join(root, 'drop');
    dropFolder = path.join(dropDir, 'e2e-reader');
    port = await freePort();
    baseUrl = `http://127.0.0.1:${port}`;
    server = await startServer(port, dataDir);
    admin = await Session.signIn(baseUrl, 'admin@equilight.test', E2E_PASSWORD);
    const created = await admin.json<{ profile: { id: number }; token: string }>('POST', '/api/instruments', {
      name: 'E2E reader',
      kind: 'plate_reader',
      plateFormat: '96',
      fileFormat: 'long_table',
      dropSubfolder: 'e2e-reader',
    });
    expect(created.token).toMatch(/^eqt_/);
    profileId = created.profile.id;
    const configFile = path.join(root, 'watcher.json');
    fs.writeFileSync(
      configFile,
      JSON.stringify({
        serverUrl: baseUrl,
        dropDir,
        spoolDir,
        settleMs: 300,
        retryInitialMs: 100,
        retryMaxMs: 1000,
        instruments: [{ folder: 'e2e-reader', token: created.token }],
      }),
    );
    watcher = startWatcherProcess(configFile);
    await until('the watcher to finish its first scan', () => watcher!.output().includes('initial scan'));
  });

  afterAll(async () => {
    await watcher?.stop();
    await server?.stop();
    if (root) fs.rmSync(root, { recursive: true, force: true });
  });

  it('when 50 files are dropped then 50 are stored exactly once and moved to done/', async () => {
    drop(50);
    await expectExactlyOnce(50);
  });

  it('when the server is stopped and 20 more arrive then all 20 arrive after it starts again, none twice', async () => {
    await server!.stop('SIGTERM');
    drop(20);
    await until(
      '20 files spooled while the server is away',
      () => listFiles(spoolDir).filter((n) => n.endsWith('.json')).length === 20,
    );
    await until('a retry line', () =>
      /server unreachable \(ECONNREFUSED\); retry in/.test(watcher!.output()),
    );
    expect(listFiles(dropFolder).filter((n) => n.endsWith('.csv'))).toHaveLength(20);
    server = await startServer(port, dataDir);
    await expectExactlyOnce(70);
  });

  it('when the server is killed (-9) while its queue is busy then after a restart every file is stored exactly once', async () => {
    drop(40);
    let receivedAtKill = 0;
    await until(
      'the server to be receiving',
      async () => (receivedAtKill = (await intake()).length) >= 75,
      30_000,
    );
    await server!.stop('SIGKILL');
    expect(receivedAtKill).toBeLessThan(110); // killed part-way, not after the last file
    server = await startServer(port, dataDir);
    await expectExactlyOnce(110);
  });

  it('when the watcher is killed (-9) while busy then a new watcher finishes the job, each file once', async () => {
    const configFile = path.join(root, 'watcher.json');
    drop(30);
    await until('uploads under way', async () => (await intake()).length >= 115, 30_000);
    await watcher!.stop('SIGKILL');
    const leftOver =
      listFiles(spoolDir).filter((n) => n.endsWith('.json')).length +
      listFiles(dropFolder).filter((n) => n.endsWith('.csv')).length;
    expect(leftOver).toBeGreaterThan(0); // killed part-way: work was left for the next watcher
    watcher = startWatcherProcess(configFile);
    await expectExactlyOnce(140);
  });
});
