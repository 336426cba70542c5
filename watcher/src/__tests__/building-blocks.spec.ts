import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { backoffDelayMs, retryAfterMs } from '../backoff';
import { classifyDropPath, isTemporaryName } from '../drop-paths';
import { placeWithoutOverwrite, suffixedName } from '../file-moves';
import { Spool } from '../spool';

describe('back-off', () => {
  it('when attempts repeat then the delay doubles from the initial value up to the cap, with jitter in the upper half', () => {
    const opts = { initialMs: 500, maxMs: 30_000 };
    const ceilings = [1, 2, 3, 4, 5, 6, 7, 8, 20].map((n) => backoffDelayMs(n, opts, () => 1));
    expect(ceilings).toEqual([500, 1000, 2000, 4000, 8000, 16000, 30000, 30000, 30000]);
    expect(backoffDelayMs(3, opts, () => 0)).toBe(1000);
    for (let i = 0; i < 100; i++) {
      const d = backoffDelayMs(4, opts);
      expect(d).toBeGreaterThanOrEqual(2000);
      expect(d).toBeLessThanOrEqual(4000);
    }
  });

  it('when the server sends Retry-After then seconds and dates are both understood', () => {
    expect(retryAfterMs('3')).toBe(3000);
    expect(retryAfterMs(new Date(10_000).toUTCString(), 4000)).toBe(6000);
    expect(retryAfterMs('soon')).toBeUndefined();
    expect(retryAfterMs(null)).toBeUndefined();
  });
});

describe('drop-folder paths', () => {
  const drop = path.join(path.sep, 'lab', 'drop');
  const folders = new Set(['reader-1']);
  const at = (...parts: string[]) => classifyDropPath(drop, path.join(drop, ...parts), folders);

  it('when a name is a temporary or hidden file then it is recognised', () => {
    for (const name of ['~$run.csv', 'run.tmp', 'run.CSV.TMP', 'run.part', '.DS_Store']) {
      expect(isTemporaryName(name)).toBe(true);
    }
    for (const name of ['run.csv', 'run.partial.csv', 'tmp.csv']) expect(isTemporaryName(name)).toBe(false);
  });

  it('when a path is classified then only files of listed instrument folders outside done/ and rejected/ qualify', () => {
    expect(at('reader-1', 'run.csv')).toEqual({
      kind: 'candidate',
      folder: 'reader-1',
      relativePath: 'run.csv',
    });
    expect(at('reader-1', 'june', 'run.csv')).toEqual({
      kind: 'candidate',
      folder: 'reader-1',
      relativePath: 'june/run.csv',
    });
    expect(at('reader-1')).toEqual({ kind: 'instrument-folder', folder: 'reader-1' });
    expect(at('reader-1', 'done')).toMatchObject({ kind: 'ignored', reason: 'finished' });
    expect(at('reader-1', 'done', 'run.csv')).toMatchObject({ kind: 'ignored', reason: 'finished' });
    expect(at('reader-1', 'Rejected', 'run.csv')).toMatchObject({ kind: 'ignored', reason: 'finished' });
    expect(at('reader-1', '.git', 'x')).toMatchObject({ kind: 'ignored', reason: 'temporary' });
    expect(at('other', 'run.csv')).toMatchObject({
      kind: 'ignored',
      reason: 'unknown-folder',
      folder: 'other',
    });
    expect(at('loose.csv')).toMatchObject({ kind: 'ignored', reason: 'unknown-folder' });
    expect(classifyDropPath(drop, path.join(path.sep, 'lab', 'x.csv'), folders)).toMatchObject({
      reason: 'outside',
    });
  });
});

describe('file moves and the spool', () => {
  let dir: string;
  beforeEach(() => (dir = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-watcher-fs-'))));
  afterEach(() => fs.rmSync(dir, { recursive: true, force: true }));

  it('when names collide then numeric suffixes are used before the extension', () => {
    expect(suffixedName('run.csv', 0)).toBe('run.csv');
    expect(suffixedName('run.csv', 2)).toBe('run-2.csv');
    expect(suffixedName('README', 1)).toBe('README-1');
    expect(suffixedName('.csv', 1)).toBe('.csv-1');
  });

  it('when a file is placed then an existing file of that name is never overwritten', async () => {
    const target = path.join(dir, 'done');
    fs.mkdirSync(target);
    fs.writeFileSync(path.join(target, 'a.csv'), 'old');
    fs.writeFileSync(path.join(dir, 'a.csv'), 'new');
    const placed = await placeWithoutOverwrite(path.join(dir, 'a.csv'), target, 'a.csv');
    expect(placed).toBe(path.join(target, 'a-1.csv'));
    expect(fs.readFileSync(path.join(target, 'a.csv'), 'utf8')).toBe('old');
    expect(fs.readFileSync(placed, 'utf8')).toBe('new');
    expect(fs.existsSync(path.join(dir, 'a.csv'))).toBe(false);
  });

  it('when the spool reopens then leftovers are cleared and damaged entries set aside, not deleted', async () => {
    const spoolDir = path.join(dir, 'spool');
    const source = path.join(dir, 'x.csv');
    fs.writeFileSync(source, 'position,wavelength_nm,absorbance\nA1,450,0.5\n');
    const spool = new Spool(spoolDir);
    await spool.open();
    const good = await spool.commit(await spool.stage(source), {
      folder: 'r',
      relativePath: 'x.csv',
      firstSeenAt: new Date(),
    });
    const bad = await spool.commit(await spool.stage(source), {
      folder: 'r',
      relativePath: 'y.csv',
      firstSeenAt: new Date(),
    });
    await spool.stage(source); // an interrupted copy: a .tmp left behind
    fs.writeFileSync(path.join(spoolDir, 'orphan.bin'), 'bytes without a description');
    fs.writeFileSync(spool.binPath(bad), 'tampered');
    await spool.close();

    const reopened = new Spool(spoolDir);
    const { entries, problems } = await reopened.open();
    expect(entries.map((e) => e.id)).toEqual([good.id]);
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(/r\/y\.csv set aside in damaged\/: its bytes do not match/);
    expect(fs.readdirSync(path.join(spoolDir, 'damaged')).sort()).toEqual([
      `${bad.id}.bin`,
      `${bad.id}.json`,
    ]);
    expect(fs.readdirSync(spoolDir).filter((n) => n.endsWith('.tmp') || n === 'orphan.bin')).toEqual([]);
    expect(reopened.find('r', 'x.csv', good.sha256)?.id).toBe(good.id);
    await reopened.close();
  });
});
