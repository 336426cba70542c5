import fs from 'node:fs';
import path from 'node:path';
import 'reflect-metadata';
import { DataSource, type DataSourceOptions } from 'typeorm';
import type { AppConfig } from '../config';
import { AuditEntry } from '../audit/audit-entry.entity';
import { SessionRow } from '../auth/session.entity';
import { Batch } from '../batches/batch.entity';
import { BatchResultRecord } from '../batches/batch-result.entity';
import { BatchSummaryRow } from '../batches/batch-summary.entity';
import { BatchAnalysisRow } from '../batches/batch-analysis.entity';
import { BatchCommentRow } from '../comments/batch-comment.entity';
import { BatchNotice, NotificationSettingsRow, OutboxMessage } from '../mail/mail.entity';
import { IntakeFile } from '../ingest/intake-file.entity';
import { ReadingRow } from '../ingest/reading.entity';
import { InstrumentProfile } from '../instruments/instrument-profile.entity';
import { Layout, LayoutVersion } from '../layouts/layout.entity';
import { Manifest, ManifestVersion } from '../manifests/manifest.entity';
import { JobRow } from '../queue/job.entity';
import { User } from '../users/user.entity';
import { WebhookDelivery } from '../webhooks/webhook-delivery.entity';
import { Webhook } from '../webhooks/webhook.entity';
import { assertDatabaseFileNotEmpty, assertQuickCheckPasses, openFailure } from './integrity';
import { migrations } from './migrations';
import { serialiseSqliteTransactions } from './sqlite-transactions';
import { InstrumentPresence, WatcherCredential } from '../watchers/watcher-credential.entity';
import { TemperatureSystemRow } from '../temperatures/temperature-system.entity';

export const entities = [
  User,
  SessionRow,
  InstrumentProfile,
  IntakeFile,
  ReadingRow,
  JobRow,
  AuditEntry,
  Layout,
  LayoutVersion,
  Manifest,
  ManifestVersion,
  Batch,
  BatchResultRecord,
  BatchSummaryRow,
  BatchAnalysisRow,
  OutboxMessage,
  NotificationSettingsRow,
  BatchNotice,
  Webhook,
  WebhookDelivery,
  WatcherCredential,
  InstrumentPresence,
  BatchCommentRow,
  TemperatureSystemRow,
];

/** The one DataSource. SQLite (WAL) by default; PostgreSQL when DATABASE_URL says so. */
export function createDataSource(config: Pick<AppConfig, 'database'>): DataSource {
  const common = { entities, migrations, migrationsRun: false, synchronize: false, logging: false } as const;
  let options: DataSourceOptions;
  if (config.database.type === 'postgres') {
    const schema = config.database.schema;
    options = {
      ...common,
      type: 'postgres',
      url: config.database.url,
      // Every connection of the pool works in the schema, raw SQL included (the migrations' too).
      extra: schema ? { options: `-c search_path=${schema}` } : undefined,
    };
  } else {
    fs.mkdirSync(path.dirname(config.database.file), { recursive: true });
    options = {
      ...common,
      type: 'better-sqlite3',
      database: config.database.file,
      enableWAL: true,
      prepareDatabase: (db: { pragma(sql: string): unknown }) => {
        db.pragma('foreign_keys = ON');
        db.pragma('busy_timeout = 5000');
      },
    };
  }
  return new DataSource(options);
}

/**
 * Open the database and bring its schema up to date. A SQLite file is checked first: an existing empty
 * file and a file that fails `PRAGMA quick_check` are refused with a DatabaseProblemError (before any
 * migration or seed writes into it).
 */
export async function openDatabase(config: Pick<AppConfig, 'database'>): Promise<DataSource> {
  if (config.database.type === 'sqlite') assertDatabaseFileNotEmpty(config.database.file);
  const dataSource = createDataSource(config);
  if (config.database.type === 'sqlite') {
    const file = config.database.file;
    try {
      await dataSource.initialize();
    } catch (err) {
      throw openFailure(file, err);
    }
    try {
      await assertQuickCheckPasses(dataSource, file);
    } catch (err) {
      await dataSource.destroy();
      throw err;
    }
  } else {
    await dataSource.initialize();
    const schema = config.database.schema;
    if (schema) await dataSource.query(`CREATE SCHEMA IF NOT EXISTS ${dataSource.driver.escape(schema)}`);
  }
  await dataSource.runMigrations({ transaction: 'each' });
  if (config.database.type === 'sqlite') serialiseSqliteTransactions(dataSource);
  return dataSource;
}
