import fs from 'node:fs';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import request from 'supertest';
import { createProfile, LONG_TABLE_PROFILE } from '../../../server/src/ingest/__tests__/ingest-helpers';
import { startTestApp, type TestApp } from '../../../server/src/testing/test-app';
import { createWatcher, type DropFolderWatcher } from '../watcher';
import { listFiles, longTable, memoryLogger, sandbox, type Sandbox, waitFor } from './support';

/**
 * The watcher against a real server (in this process, on a temporary SQLite file): with one watcher
 * credential it learns the active profiles' folders, joins a new one without a restart, reports itself,
 * and moves a file the server quarantines to quarantined/ with the reason, a good one to done/.
 */
jest.setTimeout(120_000);

/** A long table without a wavelength column: received, then quarantined by the parser. */
const UNREADABLE = 'position,absorbance\nA1,0.100\nA2,0.200\n';

describe('watcher with a credential, against the real server', () => {
  let t: TestApp;
  let http: Server;
  let box: Sandbox;
  let watcher: DropFolderWatcher | undefined;
  let credential: string;
  const log = memoryLogger();

  beforeAll(async () => {
    t = await startTestApp();
    http = t.app.listen(0, '127.0.0.1');
    await new Promise((resolve) => http.once('listening', resolve));
    const url = `http://127.0.0.1:${(http.address() as AddressInfo).port}`;
    box = sandbox(() => url);
    credential = (await (await t.agent('admin')).post('/api/watchers').send({ name: 'Bench PC' })).body.token;
  });
  afterAll(async () => {
    await watcher?.stop();
    await new Promise((resolve) => http.close(resolve));
    await t.stop();
    box.remove();
  });

  it('joins a new profile live, sends with the credential, quarantines and finishes files, and reports itself', async () => {
    watcher = createWatcher(
      box.config({
        instruments: [],
        watcherToken: credential,
        folderPollMs: 200,
        heartbeatMs: 500,
        statusPollMs: 100,
      }),
      { logger: log },
    );
    const joined: string[] = [];
    watcher.on('folders', (info) => joined.push(...info.added));
    await watcher.start();
    expect(watcher.folders()).toEqual([]);

    // A file that is already in the folder before the profile exists is picked up once it is watched.
    fs.mkdirSync(box.folder('reader-1'), { recursive: true });
    fs.writeFileSync(path.join(box.folder('reader-1'), 'RUN-1.csv'), longTable(1));
    const admin = await t.agent('admin');
    const profile = await createProfile(admin, LONG_TABLE_PROFILE);
    await waitFor('the watcher to join reader-1', () => joined.includes('reader-1'), 20_000);

    await waitFor(
      'RUN-1.csv in done/',
      () => listFiles(path.join(box.folder('reader-1'), 'done')).includes('RUN-1.csv'),
      30_000,
    );
    fs.writeFileSync(path.join(box.folder('reader-1'), 'RUN-2.csv'), UNREADABLE);
    const quarantinedDir = path.join(box.folder('reader-1'), 'quarantined');
    await waitFor(
      'RUN-2.csv in quarantined/',
      () => listFiles(quarantinedDir).includes('RUN-2.csv.reason.txt'),
      30_000,
    );
    expect(listFiles(quarantinedDir)).toEqual(['RUN-2.csv', 'RUN-2.csv.reason.txt']);
    expect(fs.readFileSync(path.join(quarantinedDir, 'RUN-2.csv'), 'utf8')).toBe(UNREADABLE);
    const reason = fs.readFileSync(path.join(quarantinedDir, 'RUN-2.csv.reason.txt'), 'utf8');
    expect(reason).toMatch(/wavelength/i);
    expect(listFiles(path.join(box.folder('reader-1'), 'done'))).toEqual(['RUN-1.csv']);
    await waitFor('the spool to empty', () => watcher!.pending().length === 0);

    // Exactly once: the server has each file one time, the quarantined one as quarantined.
    const intake = (await t.agent('admin')).get('/api/intake?pageSize=50');
    const items = (await intake).body.items as Array<{
      originalName: string;
      status: string;
      source: string;
    }>;
    expect(items.map((i) => `${i.originalName}:${i.status}:${i.source}`).sort()).toEqual([
      'RUN-1.csv:unassigned:watcher',
      'RUN-2.csv:quarantined:watcher',
    ]);

    // Presence: the profile's folder is watched, with the watcher's version.
    const manager = await t.agent('lab_manager');
    let presence: Array<{ profileId: number; watcherName: string; version: string }> = [];
    for (let i = 0; i < 50 && !presence.some((p) => p.profileId === profile.profile.id); i++) {
      presence = (await manager.get('/api/watchers/presence')).body;
      await new Promise((r) => setTimeout(r, 100));
    }
    expect(presence).toEqual([
      expect.objectContaining({ profileId: profile.profile.id, watcherName: 'Bench PC', version: '0.1.0' }),
    ]);

    // Deactivated: the watcher lets the folder go without a restart.
    const left: string[] = [];
    watcher.on('folders', (info) => left.push(...info.removed));
    await admin.patch(`/api/instruments/${profile.profile.id}`).send({ active: false });
    await waitFor('the watcher to leave reader-1', () => left.includes('reader-1'), 20_000);
    expect(watcher.folders()).toEqual([]);
  });

  it('with a per-folder instrument token (the older configuration), also learns the final state', async () => {
    await watcher?.stop();
    const admin = await t.agent('admin');
    const other = await createProfile(admin, {
      ...LONG_TABLE_PROFILE,
      name: 'Cuvette side',
      dropSubfolder: 'cuv-3',
    });
    watcher = createWatcher(
      box.config({
        spoolDir: path.join(box.root, 'spool-2'),
        instruments: [{ folder: 'cuv-3', token: other.token }],
        statusPollMs: 100,
        heartbeatMs: 500,
      }),
      { logger: log },
    );
    await watcher.start();
    fs.writeFileSync(path.join(box.folder('cuv-3'), 'RUN-7.csv'), `${UNREADABLE}A3,0.3\n`);
    const dir = path.join(box.folder('cuv-3'), 'quarantined');
    await waitFor('RUN-7.csv in quarantined/', () => listFiles(dir).includes('RUN-7.csv.reason.txt'), 30_000);
    expect(listFiles(path.join(box.folder('cuv-3'), 'done'))).toEqual([]);
    const presence = async () => (await request(t.app).get('/api/watchers/presence')).status;
    expect(await presence()).toBe(401);
  });
});
