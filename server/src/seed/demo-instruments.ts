import fs from 'node:fs';
import path from 'node:path';
import type { InstrumentsService } from '../instruments/instruments.service';
import { rulesSchema } from '../contracts/instruments';

/**
 * Demo-only instrument profiles of an invented lab, and a watcher configuration that holds their tokens
 * so `npm start` can run the drop-folder watcher at once. A real installation issues tokens on the
 * Instruments page and keeps them in the watcher's own configuration on the instrument PC.
 */
export const DEMO_INSTRUMENTS = [
  {
    name: 'Plate reader 1 (demo)',
    kind: 'plate_reader',
    plateFormat: '96',
    fileFormat: 'plate_grid',
    pathLengthCm: null,
    fillVolumeUl: 200,
    wellDiameterMm: 6.4,
    defaultWavelengthNm: 510,
    dropSubfolder: 'plate-reader-1',
    fileNamePattern: '^(?<run>[A-Za-z]+-\\d+)',
  },
  {
    name: 'Cuvette spectrophotometer 1 (demo)',
    kind: 'cuvette_spectrophotometer',
    plateFormat: 'cuvette',
    fileFormat: 'long_table',
    pathLengthCm: 1,
    fillVolumeUl: null,
    wellDiameterMm: null,
    defaultWavelengthNm: 640,
    dropSubfolder: 'cuvette-1',
    fileNamePattern: '^(?<run>[A-Za-z]+-\\d+)',
  },
  {
    // A scanning instrument: whole spectra per cuvette, exported as JCAMP-DX linked blocks.
    name: 'Scanning spectrophotometer 1 (demo)',
    kind: 'cuvette_spectrophotometer',
    plateFormat: 'cuvette',
    fileFormat: 'jcamp_dx',
    pathLengthCm: 1,
    fillVolumeUl: null,
    wellDiameterMm: null,
    defaultWavelengthNm: 496,
    dropSubfolder: 'scanner-1',
    fileNamePattern: '^(?<run>[A-Za-z]+-\\d+)',
  },
] as const;

export interface DemoWatcherSetup {
  configFile: string;
  dropDir: string;
}

/** Seed the demo profiles into a database without any, and write the demo watcher configuration. */
export async function seedDemoInstruments(
  instruments: InstrumentsService,
  options: { dataDir: string; serverUrl: string },
): Promise<DemoWatcherSetup | undefined> {
  if ((await instruments.list()).length > 0) return undefined;
  const dropDir = path.join(options.dataDir, 'drop');
  const entries: { folder: string; token: string }[] = [];
  for (const demo of DEMO_INSTRUMENTS) {
    const { profile, token } = await instruments.create({
      ...demo,
      rules: rulesSchema.parse({}),
      active: true,
    });
    entries.push({ folder: profile.dropSubfolder, token });
    fs.mkdirSync(path.join(dropDir, profile.dropSubfolder), { recursive: true });
  }
  const configFile = path.join(options.dataDir, 'watcher.demo.json');
  const config = {
    serverUrl: options.serverUrl,
    dropDir,
    spoolDir: path.join(options.dataDir, 'watcher-spool'),
    settleMs: 1000,
    instruments: entries,
  };
  fs.writeFileSync(configFile, `${JSON.stringify(config, null, 2)}\n`, { mode: 0o600 });
  return { configFile, dropDir };
}
