/**
 * Many batches written in bulk after one real batch the app analysed (the template): each clone gets the
 * rows the app itself writes for a batch — the batch, its stored file, optionally the file's readings,
 * its approval record when approved, and its stored summary — with its own name, run, dates, state, file
 * hash and K. Multi-row INSERTs for the rows, INSERT … SELECT for the readings (copied from the template
 * file's, absorbances varied a little per file), in chunks of their own transactions so the SQLite WAL
 * stays small. Benchmarks only.
 */
import { createHash } from 'node:crypto';
import type { DataSource, EntityManager } from 'typeorm';
import { bulkInsert } from '../../server/src/database/bulk-insert';
import { markTemperatureSystemChanged } from '../../server/src/temperatures/temperature-systems';
import type { Batch, BatchState } from '../../server/src/batches/batch.entity';
import type { BatchResultRecord } from '../../server/src/batches/batch-result.entity';
import type { BatchAnalysisRow } from '../../server/src/batches/batch-analysis.entity';
import type { BatchSummaryRow } from '../../server/src/batches/batch-summary.entity';
import { inputsHash } from '../../server/src/batches/batch-summary-store';
import type { IntakeFile } from '../../server/src/ingest/intake-file.entity';

/** The real batch the clones copy, with the rows the app wrote for it. */
export interface BatchTemplate {
  batch: Batch;
  /** Its stored summary and whole analysis as the analysis wrote them (source `analysis`). */
  summary: BatchSummaryRow;
  analysis: BatchAnalysisRow;
  /** Its stored file (with readings when the clones get readings). */
  file: IntakeFile;
  /** Its approval record: approved clones get one like it; without it they get none. */
  record?: BatchResultRecord;
}

/** One batch to write. */
export interface BatchPlan {
  name: string;
  state: BatchState;
  profileId: number;
  runId: string;
  systemName: string | null;
  temperatureC: number | null;
  /** ISO time the batch was made; its file comes an hour later, review and approval a day later. */
  createdAt: string;
  /** K of its stored headline (the template's when undefined). */
  k?: number | null;
}

export interface SyntheticOptions {
  /** Copy the template file's readings to every clone's file. */
  readings?: boolean;
  /** Who reviewed and approved the reviewed and approved clones. */
  managerId?: number;
  /** Every n-th batch also has a duplicate file and a quarantined one (Intake lists them); 0: none. */
  extraFilesEvery?: number;
  /** Called after each chunk of readings with the number of files done. */
  progress?: (filesDone: number, filesTotal: number) => void;
}

/** Database time text for a `created_at` column on SQLite and PostgreSQL alike. */
const dbTime = (iso: string): string => iso.replace('T', ' ').slice(0, 19);
const plus = (iso: string, ms: number): string => new Date(Date.parse(iso) + ms).toISOString();
const HOUR = 3_600_000;

const FILES_PER_READINGS_CHUNK = 200;

async function idsAfter(manager: EntityManager, table: string, after: number): Promise<number[]> {
  const numbered = manager.connection.driver.options.type === 'postgres';
  const rows = await manager.query<{ id: number | string }[]>(
    `SELECT id FROM ${table} WHERE id > ${numbered ? '$1' : '?'} ORDER BY id`,
    [after],
  );
  return rows.map((r) => Number(r.id));
}

async function maxId(manager: EntityManager, table: string): Promise<number> {
  const [row] = await manager.query<{ m: number | string | null }[]>(`SELECT MAX(id) AS m FROM ${table}`);
  return Number(row?.m ?? 0);
}

/** A file hash of its own per clone (the clones' readings are the template's, varied). */
const fakeSha256 = (text: string): string => createHash('sha256').update(text).digest('hex');

/** Write the planned batches after the template; returns the new batch ids in plan order. */
export async function writeSyntheticBatches(
  dataSource: DataSource,
  template: BatchTemplate,
  plans: readonly BatchPlan[],
  options: SyntheticOptions = {},
): Promise<number[]> {
  const t = template.batch;
  const managerId = options.managerId ?? t.createdById;
  const { batchIds, fileIds } = await dataSource.transaction(async (manager) => {
    const batchesBefore = await maxId(manager, 'batches');
    await bulkInsert(
      manager,
      'batches',
      [
        'name',
        'state',
        'profile_id',
        'layout_id',
        'layout_version',
        'manifest_id',
        'manifest_version',
        'run_id',
        'expected_files',
        'system_name',
        'temperature_c',
        'settings_json',
        'created_by_id',
        'reviewed_by_id',
        'reviewed_at',
        'approved_by_id',
        'approved_at',
        'approval_comment',
        'created_at',
        'updated_at',
      ],
      plans.map((p) => {
        const reviewed = p.state !== 'open';
        const approved = p.state === 'approved';
        const doneAt = plus(p.createdAt, 24 * HOUR);
        return [
          p.name,
          p.state,
          p.profileId,
          t.layoutId,
          t.layoutVersion,
          t.manifestId,
          t.manifestVersion,
          p.runId,
          1,
          p.systemName,
          p.temperatureC,
          t.settingsJson,
          t.createdById,
          reviewed ? managerId : null,
          reviewed ? doneAt : null,
          approved ? managerId : null,
          approved ? doneAt : null,
          approved ? 'Calibration and K checked.' : null,
          dbTime(p.createdAt),
          dbTime(reviewed ? doneAt : plus(p.createdAt, HOUR)),
        ];
      }),
    );
    const batchIds = await idsAfter(manager, 'batches', batchesBefore);
    if (batchIds.length !== plans.length) throw new Error('batch ids do not match the plans');

    const filesBefore = await maxId(manager, 'intake_files');
    const files = plans.map((p, i) => {
      const sha256 = fakeSha256(`synthetic file of batch ${batchIds[i]}`);
      const receivedAt = plus(p.createdAt, HOUR);
      return [
        p.profileId,
        `${p.runId}_readings.csv`,
        sha256,
        sha256,
        template.file.sizeBytes,
        'stored',
        null,
        null,
        p.runId,
        template.file.readingCount,
        i % 4 ? 'watcher' : 'upload',
        batchIds[i],
        receivedAt,
        plus(receivedAt, 2_000),
      ];
    });
    await bulkInsert(manager, 'intake_files', FILE_COLUMNS, files);
    const fileIds = await idsAfter(manager, 'intake_files', filesBefore);
    const every = options.extraFilesEvery ?? 0;
    if (every > 0) {
      const extras = plans.flatMap((p, i) => {
        if (i % every !== every - 1) return [];
        const at = plus(p.createdAt, 2 * HOUR);
        const original = files[i]!;
        return [
          [
            p.profileId,
            original[1],
            original[2],
            null,
            original[4],
            'duplicate',
            fileIds[i],
            null,
            p.runId,
            0,
            'watcher',
            null,
            at,
            plus(at, 500),
          ],
          [
            p.profileId,
            `${p.runId}_readings (2).csv`,
            fakeSha256(`bad file ${i}`),
            fakeSha256(`bad file ${i}`),
            812,
            'quarantined',
            null,
            'Line 3: absorbance "n/a" is not a number.',
            p.runId,
            0,
            'upload',
            null,
            at,
            plus(at, 300),
          ],
        ];
      });
      await bulkInsert(manager, 'intake_files', FILE_COLUMNS, extras);
    }

    if (template.record) {
      const r = template.record;
      const approved = plans.flatMap((p, i) => (p.state === 'approved' ? [{ p, i }] : []));
      await bulkInsert(
        manager,
        'batch_results',
        [
          'batch_id',
          'schema_version',
          'engine_version',
          'engine_package_version',
          'engine_source_sha256',
          'settings_json',
          'analysis_settings_json',
          'result_json',
          'files_json',
          'approved_by_id',
          'approved_at',
          'approval_comment',
        ],
        approved.map(({ p, i }) => [
          batchIds[i],
          r.schemaVersion,
          r.engineVersion,
          r.enginePackageVersion,
          r.engineSourceSha256,
          r.settingsJson,
          r.analysisSettingsJson,
          r.resultJson,
          JSON.stringify([
            {
              id: fileIds[i],
              originalName: files[i]![1],
              sha256: files[i]![2],
              readingCount: template.file.readingCount,
              receivedAt: files[i]![12],
            },
          ]),
          managerId,
          plus(p.createdAt, 24 * HOUR),
          'Calibration and K checked.',
        ]),
      );
    }

    const s = template.summary;
    const hashes = plans.map((_, i) => inputsHash(t, [{ id: fileIds[i]!, sha256: files[i]![2] as string }]));
    const headline = s.summaryJson ? (JSON.parse(s.summaryJson) as Record<string, unknown>) : null;
    await bulkInsert(
      manager,
      'batch_summaries',
      [
        'batch_id',
        'revision',
        'stored_files',
        'last_file_at',
        'last_activity_at',
        'sample_ids',
        'status',
        'source',
        'inputs_hash',
        'engine_version',
        'analysed_at',
        'summary_json',
        'qc_flag_count',
        'qc_error_count',
        'best_model',
        'k',
        'k_se',
        'k_ci95_low',
        'k_ci95_high',
        'k_text',
      ],
      plans.map((p, i) => {
        const fromRecord = p.state === 'approved' && template.record !== undefined;
        const k = p.k === undefined ? s.k : p.k;
        const fileAt = files[i]![13] as string;
        const activity = p.state === 'open' ? fileAt : plus(p.createdAt, 24 * HOUR);
        return [
          batchIds[i],
          p.state === 'open' ? 2 : 3,
          1,
          fileAt,
          activity,
          s.sampleIds,
          s.status,
          fromRecord ? 'record' : s.source,
          hashes[i],
          fromRecord ? template.record!.engineVersion : s.engineVersion,
          activity,
          headline ? JSON.stringify({ ...headline, k }) : null,
          s.qcFlagCount,
          s.qcErrorCount,
          s.bestModel,
          k,
          s.kSe,
          s.kCi95Low,
          s.kCi95High,
          s.kText,
        ];
      }),
    );
    await bulkInsert(
      manager,
      'batch_analyses',
      ['batch_id', 'inputs_hash', 'engine_version', 'result_json', 'spectral_json'],
      batchIds.map((id, i) => [
        id,
        hashes[i],
        template.analysis.engineVersion,
        template.analysis.resultJson,
        template.analysis.spectralJson,
      ]),
    );
    // As every change does: each chemical system met moves on a generation (its Temperatures answers are stale).
    const systems = new Map(plans.flatMap((p, i) => (p.systemName ? [[p.systemName, batchIds[i]!]] : [])));
    for (const batchId of systems.values()) await markTemperatureSystemChanged(manager, batchId);
    return { batchIds, fileIds };
  });

  if (options.readings) await copyReadings(dataSource, template.file.id, fileIds, options.progress);
  return batchIds;
}

const FILE_COLUMNS = [
  'profile_id',
  'original_name',
  'sha256',
  'content_key',
  'size_bytes',
  'status',
  'duplicate_of_id',
  'error',
  'run_id',
  'reading_count',
  'source',
  'batch_id',
  'received_at',
  'finished_at',
] as const;

/**
 * The template file's readings into each of the files (stored files with ids after the template's, every
 * one between the first and last of `fileIds`), a chunk of files per transaction.
 */
async function copyReadings(
  dataSource: DataSource,
  templateFileId: number,
  fileIds: readonly number[],
  progress?: (done: number, total: number) => void,
): Promise<void> {
  const numbered = dataSource.driver.options.type === 'postgres';
  const p = (n: number) => (numbered ? `$${n}` : '?');
  // Absorbances vary by ±0.4 % from file to file and well to well; null (no number) stays null.
  const sql =
    'INSERT INTO readings (intake_file_id, position, wavelength_nm, absorbance, flag, read_time, temperature_c, replicate) ' +
    `SELECT f.id, r.position, r.wavelength_nm, r.absorbance * (1 + ((f.id * 31 + r.id) % 9 - 4) * 0.001), r.flag, r.read_time, r.temperature_c, r.replicate ` +
    `FROM intake_files f CROSS JOIN readings r WHERE r.intake_file_id = ${p(1)} AND f.id BETWEEN ${p(2)} AND ${p(3)} ` +
    "AND f.status = 'stored' ORDER BY f.id, r.id";
  const sorted = [...fileIds].sort((a, b) => a - b);
  for (let start = 0; start < sorted.length; start += FILES_PER_READINGS_CHUNK) {
    const chunk = sorted.slice(start, start + FILES_PER_READINGS_CHUNK);
    await dataSource.transaction((manager) => manager.query(sql, [templateFileId, chunk[0], chunk.at(-1)]));
    progress?.(start + chunk.length, sorted.length);
  }
}
