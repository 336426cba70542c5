import fs from 'node:fs';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import path from 'node:path';
import { analyzeBatch } from '../../analysis/batch';
import { updateSettingsSchema } from '../../contracts/batches';
import { loadConfig } from '../../config';
import { createProfile, readingCount, settled } from '../../ingest/__tests__/ingest-helpers';
import { parseInstrumentFile, parseManifestCsv, ParseError } from '../../parsers';
import { startTestApp, type TestApp } from '../../testing/test-app';
import {
  closeWorkers,
  configureWorkers,
  fromColumns,
  IN_THREAD_PARSE_MAX_BYTES,
  MAX_MONTE_CARLO_DRAWS,
  parseFile,
  runAnalysis,
} from '..';

jest.setTimeout(180_000);

const SAMPLES = path.resolve(__dirname, '../../../../samples/analysis');
const ROWS = 'ABCDEFGH';

/** A long-table export of `wavelengths` × 96 readings (about 17 bytes a reading). */
function largeLongTable(wavelengths: number): string {
  const lines = ['position,wavelength_nm,absorbance'];
  for (let w = 0; w < wavelengths; w++) {
    for (let r = 0; r < 8; r++) {
      for (let c = 1; c <= 12; c++) {
        lines.push(`${ROWS[r]}${c},${200 + w},${(0.05 + ((w * 7 + r * 12 + c) % 250) / 100).toFixed(4)}`);
      }
    }
  }
  return `${lines.join('\n')}\n`;
}

/** The invented demo batch of the analysis CLI (samples/analysis). */
async function demoBatch() {
  const manifest = await parseManifestCsv(
    fs.readFileSync(path.join(SAMPLES, 'manifest.csv')),
    'manifest.csv',
  );
  const run = await parseInstrumentFile(fs.readFileSync(path.join(SAMPLES, 'readings.csv')), 'readings.csv', {
    plateFormat: 'cuvette',
  });
  return { readings: run.readings, samples: manifest.samples };
}

describe('worker threads (parse and analysis off the main thread)', () => {
  afterAll(() => closeWorkers());

  it('when a file is parsed on a worker then the readings are the same as parsed in-thread', async () => {
    configureWorkers({ threads: 2, inThreadForTests: false });
    // Over IN_THREAD_PARSE_MAX_BYTES, so it goes to the worker thread.
    const content = Buffer.from(largeLongTable(60));
    expect(content.length).toBeGreaterThanOrEqual(IN_THREAD_PARSE_MAX_BYTES);
    const direct = await parseInstrumentFile(content, 'large.csv', {});
    const viaWorker = await parseFile(content, 'large.csv', {});
    expect(viaWorker.readingCount).toBe(direct.readings.length);
    expect(fromColumns(viaWorker.readings!)).toEqual(direct.readings);
    expect(viaWorker.metadata).toEqual(direct.metadata);
  });

  it('when a small file is parsed then it is read on the calling thread with the same readings', async () => {
    configureWorkers({ threads: 2, inThreadForTests: false });
    const content = fs.readFileSync(path.join(SAMPLES, 'readings.csv'));
    expect(content.length).toBeLessThan(IN_THREAD_PARSE_MAX_BYTES);
    const direct = await parseInstrumentFile(content, 'readings.csv', { plateFormat: 'cuvette' });
    const parsed = await parseFile(content, 'readings.csv', { plateFormat: 'cuvette' });
    expect(fromColumns(parsed.readings!)).toEqual(direct.readings);
    expect(parsed.metadata).toEqual(direct.metadata);
  });

  it('when a file is bad then the worker gives the same ParseError as in-thread parsing', async () => {
    // A large file whose last line holds one cell too many.
    const bad = Buffer.from(`${largeLongTable(60)}A1,450,0,12\n`);
    expect(bad.length).toBeGreaterThanOrEqual(IN_THREAD_PARSE_MAX_BYTES);
    const direct = await parseInstrumentFile(bad, 'bad.csv', {}).catch((e: unknown) => e);
    const viaWorker = await parseFile(bad, 'bad.csv', {}).catch((e: unknown) => e);
    expect(viaWorker).toBeInstanceOf(ParseError);
    expect((viaWorker as ParseError).message).toBe((direct as ParseError).message);
    expect((viaWorker as ParseError).line).toBe(60 * 96 + 2);
  });

  it('when an analysis runs on a worker then its result equals the in-thread analysis', async () => {
    const { readings, samples } = await demoBatch();
    const settings = { wavelengthNm: 640, monteCarlo: { draws: 200, seed: 3 } };
    expect(await runAnalysis(readings, samples, settings)).toEqual(analyzeBatch(readings, samples, settings));
  });

  it('when an analysis asks for 20 000 Monte Carlo draws then it gets the capped number', async () => {
    const { readings, samples } = await demoBatch();
    const result = await runAnalysis(readings, samples, {
      wavelengthNm: 640,
      candidates: ['1:1'],
      monteCarlo: { draws: 20_000, seed: 3 },
    });
    expect(result.uncertainty?.monteCarlo?.draws).toBe(MAX_MONTE_CARLO_DRAWS);
  });

  it('when batch settings ask for more Monte Carlo draws than the cap then they are refused', () => {
    const ask = (draws: number) =>
      updateSettingsSchema.safeParse({ settings: { monteCarloDraws: draws }, reason: 'tighter interval' })
        .success;
    expect(ask(MAX_MONTE_CARLO_DRAWS)).toBe(true);
    expect(ask(20_000)).toBe(false);
  });

  it('when running in-thread is asked for outside tests then the configuration is refused', () => {
    expect(() =>
      loadConfig({
        NODE_ENV: 'production',
        SESSION_SECRET: 'x'.repeat(32),
        WORKERS_IN_THREAD_FOR_TESTS: 'true',
      }),
    ).toThrow(/WORKERS_IN_THREAD_FOR_TESTS: only with NODE_ENV=test/);
    expect(loadConfig({ NODE_ENV: 'test' }).workers).toEqual({ threads: 2, inThreadForTests: false });
  });
});

describe('a large file does not hold up the server', () => {
  let t: TestApp;
  let server: http.Server;
  let base: string;

  beforeAll(async () => {
    t = await startTestApp();
    server = http.createServer(t.app);
    await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
    base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  });
  afterAll(async () => {
    await new Promise((r) => server.close(r));
    await t.stop();
  });

  it('when a 300 000-reading file is parsed and stored then /api/health keeps answering throughout', async () => {
    const { token } = await createProfile(await t.agent('admin'));
    const wavelengths = 3100;
    const form = new FormData();
    form.append('file', new Blob([largeLongTable(wavelengths)]), 'RUN-0500.csv');
    const res = await fetch(`${base}/api/ingest`, {
      method: 'POST',
      headers: { authorization: `Bearer ${token}` },
      body: form,
    });
    expect(res.status).toBe(202);
    const { id } = (await res.json()) as { id: number };

    const latencies: number[] = [];
    const began = performance.now();
    let done = false;
    const finished = settled(t, id, 150_000).finally(() => (done = true));
    while (!done) {
      const start = performance.now();
      const health = await fetch(`${base}/api/health`);
      expect(health.status).toBe(200);
      latencies.push(performance.now() - start);
      await new Promise((r) => setTimeout(r, 50));
    }
    const file = await finished;
    const processing = performance.now() - began;
    expect(file.status).toBe('unassigned');
    expect(file.readingCount).toBe(wavelengths * 96);
    expect(await readingCount(t, id)).toBe(wavelengths * 96);
    // Parsing this file takes seconds of CPU; on the main thread the health check waited for all of it
    // (one or two answers in all). No wall-clock bound here: a loaded CI machine stretches every figure,
    // so the test asks that the server answered many times and that no single wait took a large share
    // of the processing time.
    expect(latencies.length).toBeGreaterThan(10);
    expect(Math.max(...latencies)).toBeLessThan(processing / 3);
  });
});
