import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
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
 * Links in the drop folder, with the real server and the real watcher as their own processes: a link is
 * never followed. It is moved (the link itself) to rejected/ with a reason, and nothing it points at is
 * read, sent or quoted anywhere.
 */
jest.setTimeout(120_000);

const SECRET = 'LIMS_API_KEY=k7Qz-not-for-anyone-9f2c';

describe('links in the drop folder (real server and watcher processes)', () => {
  let root: string;
  let dataDir: string;
  let dropFolder: string;
  let outside: string;
  let server: Child | undefined;
  let watcher: Child | undefined;
  let admin: Session;
  let profileId: number;

  function logs(): string {
    return `--- server ---\n${server?.output().slice(-3000) ?? ''}\n--- watcher ---\n${watcher?.output().slice(-4000) ?? ''}`;
  }

  async function until(what: string, check: () => Promise<boolean> | boolean, timeoutMs = 30_000) {
    const deadline = Date.now() + timeoutMs;
    while (!(await check())) {
      if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}\n${logs()}`);
      await sleep(100);
    }
  }

  async function intake(): Promise<IntakeItem[]> {
    const page = await admin.json<{ items: IntakeItem[] }>(
      'GET',
      `/api/intake?pageSize=500&profileId=${profileId}`,
    );
    return page.items;
  }

  /** Every byte the server keeps in its data folder (database, WAL, archive), as text. */
  function everythingStored(dir: string): string {
    let text = '';
    for (const entry of fs.readdirSync(dir, { withFileTypes: true, recursive: true })) {
      if (entry.isFile()) text += fs.readFileSync(path.join(entry.parentPath, entry.name)).toString('latin1');
    }
    return text;
  }

  beforeAll(async () => {
    requireBuilt();
    root = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-watcher-links-'));
    dataDir = path.join(root, 'data');
    const dropDir = path.join(root, 'drop');
    dropFolder = path.join(dropDir, 'link-reader');
    outside = path.join(root, 'outside');
    fs.mkdirSync(dropFolder, { recursive: true });
    fs.mkdirSync(path.join(outside, 'exports'), { recursive: true });
    fs.writeFileSync(path.join(outside, 'lims.env'), `${SECRET}\nLIMS_URL=https://lims.invalid\n`);
    fs.writeFileSync(path.join(outside, 'exports', 'RUN-0002.csv'), `${SECRET}\n`);

    const port = await freePort();
    const baseUrl = `http://127.0.0.1:${port}`;
    server = await startServer(port, dataDir);
    admin = await Session.signIn(baseUrl, 'admin@equilight.test', E2E_PASSWORD);
    const created = await admin.json<{ profile: { id: number }; token: string }>('POST', '/api/instruments', {
      name: 'Link reader',
      kind: 'plate_reader',
      plateFormat: '96',
      fileFormat: 'long_table',
      dropSubfolder: 'link-reader',
    });
    profileId = created.profile.id;
    const configFile = path.join(root, 'watcher.json');
    fs.writeFileSync(
      configFile,
      JSON.stringify({
        serverUrl: baseUrl,
        dropDir,
        spoolDir: path.join(root, 'spool'),
        settleMs: 200,
        retryInitialMs: 100,
        retryMaxMs: 1000,
        instruments: [{ folder: 'link-reader', token: created.token }],
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

  it('when a link to a secrets file outside appears then the link goes to rejected/ and the secret is nowhere', async () => {
    fs.symlinkSync(path.join(outside, 'lims.env'), path.join(dropFolder, 'RUN-0001.csv'));
    // A link to a folder outside, holding a file that looks like an export.
    fs.symlinkSync(path.join(outside, 'exports'), path.join(dropFolder, 'more'), 'dir');
    // A real export beside them still goes through.
    fs.writeFileSync(
      path.join(dropFolder, 'RUN-0003.csv'),
      'position,wavelength_nm,absorbance\nA1,450,0.1\nA2,450,0.2\n',
    );

    const rejected = path.join(dropFolder, 'rejected');
    await until('the link to be moved to rejected/', () =>
      listFiles(rejected).includes('RUN-0001.csv.reason.txt'),
    );
    await until('the real export to be stored', async () =>
      (await intake()).some((i) => i.originalName === 'RUN-0003.csv' && i.readingCount === 2),
    );
    // The link itself moved: rejected/RUN-0001.csv is a link; its target is where it was, unchanged.
    expect(fs.lstatSync(path.join(rejected, 'RUN-0001.csv')).isSymbolicLink()).toBe(true);
    expect(fs.existsSync(path.join(dropFolder, 'RUN-0001.csv'))).toBe(false);
    expect(fs.readFileSync(path.join(outside, 'lims.env'), 'utf8')).toContain(SECRET);
    const reason = fs.readFileSync(path.join(rejected, 'RUN-0001.csv.reason.txt'), 'utf8');
    expect(reason).toMatch(/link/i);
    expect(reason).not.toContain(SECRET);
    // The folder link is refused too, and nothing below it is read.
    await until('the folder link to be moved to rejected/', () => listFiles(rejected).includes('more'));
    expect(fs.lstatSync(path.join(rejected, 'more')).isSymbolicLink()).toBe(true);
    expect(fs.readFileSync(path.join(outside, 'exports', 'RUN-0002.csv'), 'utf8')).toContain(SECRET);

    // Give a (wrong) upload time to land, then look everywhere the server keeps things.
    await sleep(1500);
    const items = await intake();
    expect(items.map((i) => i.originalName).sort()).toEqual(['RUN-0003.csv']);
    expect(JSON.stringify(items)).not.toContain('LIMS_API_KEY');
    expect(everythingStored(dataDir)).not.toContain('LIMS_API_KEY');
    expect(watcher!.output()).not.toContain('LIMS_API_KEY');
  });
});
