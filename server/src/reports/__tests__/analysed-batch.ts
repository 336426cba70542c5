import fs from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import request from 'supertest';
import { LONG_TABLE_PROFILE, createProfile, settled } from '../../ingest/__tests__/ingest-helpers';
import type { TestApp } from '../../testing/test-app';

export const SAMPLES_DIR = path.resolve(__dirname, '../../../../samples/analysis');

export interface AnalysedBatch {
  batchId: number;
  name: string;
  profileId: number;
  token: string;
  /**
   * Upload the demo readings as a file of this batch's run and wait until it is stored. `variant` makes
   * the bytes distinct (trailing empty lines) so a second file is no duplicate of the first; `edit`
   * changes the CSV text first. Returns the bytes sent.
   */
  ingest(variant?: number, edit?: (csv: string) => string): Promise<Buffer>;
}

let counter = 0;

/**
 * A cuvette batch on the demo complex series (layout and manifest from samples/analysis/manifest.csv),
 * created by the lab manager; `ingest()` stores samples/analysis/readings.csv into it.
 */
export async function createAnalysedBatch(
  t: TestApp,
  options: {
    name?: string;
    expectedFiles?: number;
    settings?: Record<string, unknown>;
    systemName?: string;
    /** Who creates the batch (layout and manifest are always the lab manager's). */
    creator?: 'admin' | 'lab_manager';
    /** Changes to the cuvette instrument profile the batch reads from. */
    profile?: Record<string, unknown>;
  } = {},
): Promise<AnalysedBatch> {
  const seq = ++counter;
  const admin = await t.agent('admin');
  const manager = await t.agent('lab_manager');
  const creator = options.creator === 'admin' ? admin : manager;
  const cuvette = await createProfile(admin, {
    ...LONG_TABLE_PROFILE,
    name: `Cuvette bench ${seq}`,
    kind: 'cuvette_spectrophotometer',
    plateFormat: 'cuvette',
    dropSubfolder: `cuvette-bench-${seq}`,
    fileNamePattern: '^(?<run>CX-\\d+)',
    pathLengthCm: 1,
    ...options.profile,
  });
  const manifestCsv = fs.readFileSync(path.join(SAMPLES_DIR, 'manifest.csv'));
  const rows = parse(manifestCsv, { columns: true }) as {
    position: string;
    role: string;
    replicate_group: string;
  }[];
  const layout = await manager.post('/api/layouts').send({
    name: `Cuvette series ${seq}`,
    format: 'cuvette',
    cuvetteCount: rows.length,
    positions: rows.map((r) => ({
      position: r.position,
      role: r.role,
      ...(r.replicate_group ? { replicateGroup: r.replicate_group } : {}),
    })),
  });
  if (layout.status !== 201) throw new Error(`layout: ${layout.status} ${JSON.stringify(layout.body)}`);
  const manifest = await manager
    .post('/api/manifests')
    .field('layoutId', String(layout.body.id))
    .field('name', `Complex series ${seq}`)
    .attach('file', manifestCsv, 'manifest.csv');
  if (manifest.status !== 201)
    throw new Error(`manifest: ${manifest.status} ${JSON.stringify(manifest.body)}`);
  const name = options.name ?? `Ferric complex series ${seq} (25 °C)`;
  const runId = `CX-${seq}`;
  const batch = await creator.post('/api/batches').send({
    name,
    profileId: cuvette.profile.id,
    layoutId: layout.body.id,
    manifestId: manifest.body.id,
    runId,
    expectedFiles: options.expectedFiles ?? 1,
    temperatureC: 25,
    systemName: options.systemName ?? 'Ferric thiocyanate (invented demo)',
    ...(options.settings ? { settings: options.settings } : {}),
  });
  if (batch.status !== 201) throw new Error(`batch: ${batch.status} ${JSON.stringify(batch.body)}`);
  return {
    batchId: batch.body.id,
    name,
    profileId: cuvette.profile.id,
    token: cuvette.token,
    async ingest(variant = 0, edit = (csv: string) => csv) {
      const bytes = Buffer.concat([
        Buffer.from(edit(fs.readFileSync(path.join(SAMPLES_DIR, 'readings.csv'), 'utf8'))),
        Buffer.from('\n'.repeat(seq * 10 + variant)),
      ]);
      const upload = await request(t.app)
        .post('/api/ingest')
        .set('Authorization', `Bearer ${cuvette.token}`)
        .attach('file', bytes, `${runId}_readings_${variant}.csv`);
      if (upload.status !== 202 && upload.status !== 201)
        throw new Error(`ingest: ${upload.status} ${JSON.stringify(upload.body)}`);
      const file = await settled(t, upload.body.id);
      if (file.status !== 'stored') throw new Error(`file ${file.status}`);
      return bytes;
    },
  };
}
