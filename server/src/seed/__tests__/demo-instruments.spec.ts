import fs from 'node:fs';
import path from 'node:path';
import { parseWatcherConfig } from '../../../../watcher/src/config';
import { startTestApp, type TestApp } from '../../testing/test-app';
import { DEMO_INSTRUMENTS, seedDemoInstruments } from '../demo-instruments';

describe('demo instrument profiles', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp();
  });
  afterAll(() => t.stop());

  it('seeds the demo profiles once, with drop folders and a watcher configuration the watcher accepts', async () => {
    const setup = await seedDemoInstruments(t.services.instruments, {
      dataDir: t.dir,
      serverUrl: 'http://127.0.0.1:4999',
    });
    expect(setup).toBeDefined();
    const profiles = await t.services.instruments.list();
    expect(profiles.map((p) => p.dropSubfolder).sort()).toEqual(
      DEMO_INSTRUMENTS.map((d) => d.dropSubfolder).sort(),
    );
    const config = parseWatcherConfig(JSON.parse(fs.readFileSync(setup!.configFile, 'utf8')), t.dir);
    expect(config.instruments).toHaveLength(DEMO_INSTRUMENTS.length);
    for (const instrument of config.instruments) {
      expect(fs.existsSync(path.join(setup!.dropDir, instrument.folder))).toBe(true);
      expect(await t.services.instruments.findByToken(instrument.token)).toBeDefined();
    }
    expect(
      await seedDemoInstruments(t.services.instruments, { dataDir: t.dir, serverUrl: 'x' }),
    ).toBeUndefined();
  });
});
