import { execFile } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import Database from 'better-sqlite3';
import request from 'supertest';
import { loadConfig } from '../../config';
import { openDatabase } from '../../database/data-source';
import { createProfile, longTableCsv, settled } from '../../ingest/__tests__/ingest-helpers';
import { startTestApp, sqliteOnly } from '../../testing/test-app';
import { checkDatabaseAndArchive } from '../database-check';

const REPO_ROOT = path.resolve(__dirname, '../../../..');

/** A data folder holding a database with `files` received exports (readings, archive), server stopped. */
async function folderWithReadings(files = 2): Promise<string> {
  const t = await startTestApp();
  const { token } = await createProfile(await t.agent('admin'));
  for (let i = 0; i < files; i++) {
    const res = await request(t.app)
      .post('/api/ingest')
      .set('Authorization', `Bearer ${token}`)
      .attach('file', Buffer.from(longTableCsv(200 + i)), `RUN-${200 + i}.csv`);
    expect((await settled(t, res.body.id)).status).not.toBe('quarantined');
  }
  await t.shutDown();
  return t.dir;
}

const databaseOf = (dir: string): string => path.join(dir, 'equilight.sqlite');
const configOf = (dir: string) => loadConfig({ NODE_ENV: 'test', DATA_DIR: dir });

/** The archived raw files under <dir>/archive, by SHA-256. */
function archivedFiles(dir: string): string[] {
  const root = path.join(dir, 'archive');
  return fs
    .readdirSync(root)
    .flatMap((sub) => fs.readdirSync(path.join(root, sub)).map((f) => path.join(root, sub, f)));
}

sqliteOnly('damaged data is noticed at start', () => {
  const folders: string[] = [];
  const folder = (dir: string): string => {
    folders.push(dir);
    return dir;
  };
  afterAll(() => {
    for (const dir of folders) fs.rmSync(dir, { recursive: true, force: true });
  });

  it('when the database file exists but is empty then the start refuses with a clear message and seeds nothing', async () => {
    const dir = folder(fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-empty-')));
    fs.writeFileSync(databaseOf(dir), '');
    await expect(openDatabase(configOf(dir))).rejects.toThrow(
      /equilight\.sqlite exists but is empty \(0 bytes\).*npm run restore/s,
    );
    expect(fs.statSync(databaseOf(dir)).size).toBe(0);
  });

  it('when random bytes overwrite the pages of the readings table then the start refuses naming quick_check', async () => {
    const dir = folder(await folderWithReadings(3));
    const file = databaseOf(dir);
    const db = new Database(file, { readonly: true });
    const pageSize = db.pragma('page_size', { simple: true }) as number;
    const pages = (
      db.prepare("SELECT pageno FROM dbstat WHERE name = 'readings' ORDER BY pageno").all() as {
        pageno: number;
      }[]
    ).map((p) => p.pageno);
    db.close();
    expect(pages.length).toBeGreaterThan(1);
    const handle = fs.openSync(file, 'r+');
    const random = crypto.createHash('sha256').update('seeded damage').digest();
    for (const page of pages.slice(0, 3)) {
      const noise = Buffer.alloc(pageSize);
      for (let i = 0; i < pageSize; i++) noise[i] = random[i % random.length]! ^ (i * 31);
      fs.writeSync(handle, noise, 0, pageSize, (page - 1) * pageSize);
    }
    fs.closeSync(handle);
    await expect(openDatabase(configOf(dir))).rejects.toThrow(/is damaged; SQLite's quick_check reports/);
  });

  it('when the archive folder is missing then health is degraded with the reason (HTTP 200)', async () => {
    const dir = folder(await folderWithReadings(1));
    fs.rmSync(path.join(dir, 'archive'), { recursive: true });
    const t = await startTestApp({}, dir);
    try {
      const res = await request(t.app).get('/api/health');
      expect(res.status).toBe(200);
      expect(res.body.status).toBe('degraded');
      expect(res.body.reasons).toEqual([
        expect.stringMatching(/^archive: the raw-file folder .*archive is missing, but 1 received file/),
      ]);
    } finally {
      await t.shutDown();
    }
  });

  it('when an archived file was changed then health names the SHA-256 mismatch, and db:check finds it too', async () => {
    const dir = folder(await folderWithReadings(2));
    const [victim] = archivedFiles(dir);
    fs.appendFileSync(victim!, 'A9,450,0.123\n');
    const t = await startTestApp({}, dir);
    try {
      const res = await request(t.app).get('/api/health');
      expect(res.body.status).toBe('degraded');
      expect(res.body.reasons).toEqual([
        expect.stringMatching(
          new RegExp(
            `^archive: 1 of 2 sampled archived files no longer match their SHA-256 \\(${path.basename(victim!).slice(0, 12)}`,
          ),
        ),
      ]);
    } finally {
      await t.shutDown();
    }
    expect(await checkDatabaseAndArchive(configOf(dir))).toEqual([
      expect.stringMatching(/^archive: 1 of 2 archived files no longer match their SHA-256/),
    ]);
    const { stdout } = await promisify(execFile)('npm', ['run', '--silent', 'db:check'], {
      cwd: REPO_ROOT,
      env: { ...process.env, DATA_DIR: dir, NODE_ENV: 'test' },
    }).catch((err: { stdout: string; code: number }) => {
      expect(err.code).toBe(1);
      return err;
    });
    expect(stdout).toMatch(/no longer match their SHA-256/);
  }, 60_000);

  it('when everything is in order then health is ok and db:check passes', async () => {
    const dir = folder(await folderWithReadings(1));
    const t = await startTestApp({}, dir);
    try {
      const res = await request(t.app).get('/api/health');
      expect(res.status).toBe(200);
      expect(res.body).toEqual({ status: 'ok', service: 'equilight' });
    } finally {
      await t.shutDown();
    }
    expect(await checkDatabaseAndArchive(configOf(dir))).toEqual([]);
  });

  it('when the database stops answering then health is 503 degraded', async () => {
    const t = await startTestApp();
    try {
      await t.dataSource.destroy();
      const res = await request(t.app).get('/api/health');
      expect(res.status).toBe(503);
      expect(res.body.status).toBe('degraded');
      expect(res.body.reasons[0]).toMatch(/^database: does not answer/);
    } finally {
      await t.stop();
    }
  });
});
