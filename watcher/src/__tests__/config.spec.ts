import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { loadWatcherConfig, parseWatcherConfig, WatcherConfigError } from '../config';
import { TOKEN_A, TOKEN_B } from './support';

describe('watcher configuration', () => {
  let dir: string;
  beforeEach(() => (dir = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-watcher-config-'))));
  afterEach(() => fs.rmSync(dir, { recursive: true, force: true }));

  it('when a file gives the settings then paths are resolved against the file and defaults filled in', () => {
    const file = path.join(dir, 'watcher.json');
    fs.writeFileSync(
      file,
      JSON.stringify({
        dropDir: 'drop',
        spoolDir: 'spool',
        instruments: [{ folder: 'reader-1', token: TOKEN_A }],
      }),
    );
    const config = loadWatcherConfig({ EQUILIGHT_WATCHER_CONFIG: file }, '/elsewhere');
    expect(config).toMatchObject({
      serverUrl: 'http://127.0.0.1:4210',
      dropDir: path.join(dir, 'drop'),
      spoolDir: path.join(dir, 'spool'),
      settleMs: 1500,
      maxConcurrentUploads: 4,
      retryInitialMs: 500,
      retryMaxMs: 30_000,
    });
  });

  it('when environment variables are set then they win over the file', () => {
    const file = path.join(dir, 'watcher.json');
    fs.writeFileSync(
      file,
      JSON.stringify({
        dropDir: 'drop',
        spoolDir: 'spool',
        settleMs: 900,
        instruments: [{ folder: 'x', token: TOKEN_A }],
      }),
    );
    const config = loadWatcherConfig(
      {
        EQUILIGHT_WATCHER_CONFIG: file,
        EQUILIGHT_SERVER_URL: 'http://10.0.0.5:4210/',
        EQUILIGHT_SETTLE_MS: '2500',
        EQUILIGHT_INSTRUMENTS: `reader-1=${TOKEN_A}, cuvette-2=${TOKEN_B}`,
      },
      dir,
    );
    expect(config.serverUrl).toBe('http://10.0.0.5:4210');
    expect(config.settleMs).toBe(2500);
    expect(config.instruments).toEqual([
      { folder: 'reader-1', token: TOKEN_A },
      { folder: 'cuvette-2', token: TOKEN_B },
    ]);
  });

  it('when settings are wrong then every problem is named, and the token value is never echoed', () => {
    let message = '';
    try {
      parseWatcherConfig({
        serverUrl: 'ftp://x',
        dropDir: '/d',
        settleMs: -1,
        instruments: [
          { folder: '../up', token: 'eqt_short-secret' },
          { folder: 'done', token: TOKEN_A },
        ],
      });
    } catch (err) {
      expect(err).toBeInstanceOf(WatcherConfigError);
      message = (err as Error).message;
    }
    expect(message).toContain('serverUrl: must be an http:// or https:// address');
    expect(message).toContain('spoolDir:');
    expect(message).toContain('settleMs:');
    expect(message).toContain('instruments.0.folder: must be one folder name');
    expect(message).toContain('instruments.0.token: must be an instrument token');
    expect(message).toContain('instruments.1.folder: must not be "done", "rejected" or "quarantined"');
    expect(message).not.toContain('short-secret');
  });

  it('when the same folder is listed twice or the spool sits in an instrument folder then it is refused', () => {
    const base = { dropDir: '/d', spoolDir: '/s' };
    expect(() =>
      parseWatcherConfig({
        ...base,
        instruments: [
          { folder: 'r', token: TOKEN_A },
          { folder: 'r', token: TOKEN_B },
        ],
      }),
    ).toThrow(/instruments: lists the same folder twice/);
    expect(() =>
      parseWatcherConfig({
        dropDir: '/d',
        spoolDir: '/d/r/spool',
        instruments: [{ folder: 'r', token: TOKEN_A }],
      }),
    ).toThrow(/spoolDir: must not be the drop folder or inside an instrument folder/);
  });

  it('when the file is missing or not JSON then the message says which file and why', () => {
    expect(() => loadWatcherConfig({ EQUILIGHT_WATCHER_CONFIG: path.join(dir, 'nope.json') })).toThrow(
      /Cannot read the watcher configuration file .*nope\.json/,
    );
    fs.writeFileSync(path.join(dir, 'bad.json'), '{ "dropDir": ');
    expect(() => loadWatcherConfig({ EQUILIGHT_WATCHER_CONFIG: path.join(dir, 'bad.json') })).toThrow(
      /bad\.json is not valid JSON/,
    );
    expect(() => loadWatcherConfig({ EQUILIGHT_INSTRUMENTS: 'reader-1' })).toThrow(/folder=token pairs/);
  });

  it('when a watcher credential is given then no instrument list is needed, and neither alone is refused', () => {
    const credential = `eqw_${'c'.repeat(43)}`;
    const config = loadWatcherConfig({
      EQUILIGHT_DROP_DIR: '/tmp/drop',
      EQUILIGHT_SPOOL_DIR: '/tmp/spool',
      EQUILIGHT_WATCHER_TOKEN: credential,
    });
    expect(config).toMatchObject({
      watcherToken: credential,
      instruments: [],
      folderPollMs: 5000,
      heartbeatMs: 60_000,
    });
    expect(() => parseWatcherConfig({ dropDir: '/tmp/d', spoolDir: '/tmp/s' })).toThrow(
      /instruments: needs at least one \{ folder, token \}, or a watcherToken/,
    );
    let message = '';
    try {
      parseWatcherConfig({
        dropDir: '/tmp/d',
        spoolDir: '/tmp/s',
        watcherToken: 'eqt_wrong-kind-of-token-here',
      });
    } catch (err) {
      message = (err as Error).message;
    }
    expect(message).toContain('watcherToken: must be a watcher credential (eqw_…)');
    expect(message).not.toContain('wrong-kind');
  });
});
