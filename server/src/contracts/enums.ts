import * as z from 'zod';
import { lazySchema } from './lazy-schema';
import { ROLES } from './roles';

/**
 * The closed word lists the API speaks, each with the words people see. Server (validation, entities),
 * web (forms, lists) and watcher take them from here.
 */

/** Who a signed-in person is (the words themselves are in roles.ts). */
export const roleSchema = /* @__PURE__ */ lazySchema(() => z.enum(ROLES));

/** How positions are laid out: a plate of 96 or 384 wells, or a numbered sequence of cuvettes. */
export const PLATE_FORMATS = ['96', '384', 'cuvette'] as const;
export const plateFormatSchema = /* @__PURE__ */ lazySchema(() => z.enum(PLATE_FORMATS));
export type PlateFormat = z.infer<typeof plateFormatSchema>;
export const PLATE_FORMAT_LABELS: Record<PlateFormat, string> = {
  '96': '96-well plate',
  '384': '384-well plate',
  cuvette: 'Cuvette sequence',
};

export const INSTRUMENT_KINDS = ['plate_reader', 'cuvette_spectrophotometer'] as const;
export const instrumentKindSchema = /* @__PURE__ */ lazySchema(() => z.enum(INSTRUMENT_KINDS));
export type InstrumentKind = z.infer<typeof instrumentKindSchema>;
export const KIND_LABELS: Record<InstrumentKind, string> = {
  plate_reader: 'Plate reader',
  cuvette_spectrophotometer: 'Cuvette spectrophotometer',
};

/** How an instrument writes its readings. */
export const FILE_FORMATS = ['long_table', 'plate_grid', 'spectrum', 'jcamp_dx'] as const;
export const fileFormatSchema = /* @__PURE__ */ lazySchema(() => z.enum(FILE_FORMATS));
export type FileFormat = z.infer<typeof fileFormatSchema>;
export const FILE_FORMAT_LABELS: Record<FileFormat, string> = {
  long_table: 'Long table',
  plate_grid: 'Plate grid',
  spectrum: 'Spectrum',
  jcamp_dx: 'JCAMP-DX (UV-Vis)',
};

/** JCAMP-DX files: where a block's position is read. */
export const JCAMP_POSITION_SOURCES = ['title', 'sample_description'] as const;
export type JcampPositionFrom = (typeof JCAMP_POSITION_SOURCES)[number];
export const JCAMP_POSITION_LABELS: Record<JcampPositionFrom, string> = {
  title: 'Block title (##TITLE)',
  sample_description: 'Sample description (##SAMPLE DESCRIPTION)',
};

export const DELIMITERS = ['auto', ',', ';', '\t'] as const;
export type Delimiter = (typeof DELIMITERS)[number];
export const DELIMITER_LABELS: Record<Delimiter, string> = {
  auto: 'Detect from the file',
  ',': 'Comma ( , )',
  ';': 'Semicolon ( ; )',
  '\t': 'Tab',
};

export const DECIMAL_MARKS = ['.', ','] as const;
export type DecimalMark = (typeof DECIMAL_MARKS)[number];
export const DECIMAL_MARK_LABELS: Record<DecimalMark, string> = {
  '.': 'Point ( 1.25 )',
  ',': 'Comma ( 1,25 )',
};

export const TEXT_ENCODINGS = ['utf-8', 'latin1', 'utf-16le'] as const;
export type TextEncoding = (typeof TEXT_ENCODINGS)[number];
export const ENCODING_LABELS: Record<TextEncoding, string> = {
  'utf-8': 'UTF-8',
  latin1: 'Latin-1 (ISO 8859-1)',
  'utf-16le': 'UTF-16 LE',
};

/** Where a batch stands. Every state has its own icon and word, so colour is never the only cue. */
export const BATCH_STATES = ['open', 'reviewed', 'approved'] as const;
export const batchStateSchema = /* @__PURE__ */ lazySchema(() => z.enum(BATCH_STATES));
export type BatchState = z.infer<typeof batchStateSchema>;
export const BATCH_STATE_DISPLAY: Record<BatchState, { label: string; icon: string }> = {
  open: { label: 'Open', icon: 'pending' },
  reviewed: { label: 'Reviewed', icon: 'rate_review' },
  approved: { label: 'Approved', icon: 'verified' },
};

export const CALIBRATION_MODELS = ['linear', 'through-origin'] as const;
export type CalibrationModel = (typeof CALIBRATION_MODELS)[number];

/** Where a received file stands. The icon and the word carry the meaning, colour only repeats it. */
export const INTAKE_STATUSES = [
  'queued',
  'parsing',
  'stored',
  'duplicate',
  'quarantined',
  'unassigned',
] as const;
export const intakeStatusSchema = /* @__PURE__ */ lazySchema(() => z.enum(INTAKE_STATUSES));
export type IntakeStatus = z.infer<typeof intakeStatusSchema>;
export const INTAKE_STATUS_DISPLAY: Record<IntakeStatus, { label: string; icon: string; hint: string }> = {
  queued: { label: 'Queued', icon: 'schedule', hint: 'Waiting to be parsed' },
  parsing: { label: 'Parsing', icon: 'sync', hint: 'Being parsed and stored' },
  stored: { label: 'Stored', icon: 'check_circle', hint: 'Readings stored' },
  duplicate: {
    label: 'Duplicate',
    icon: 'content_copy',
    hint: 'Same content as an earlier file; not stored again',
  },
  quarantined: { label: 'Quarantined', icon: 'report', hint: 'Did not parse; kept for a fix and a re-queue' },
  unassigned: {
    label: 'Unassigned',
    icon: 'help',
    hint: 'Readings stored, but no batch waits for its run id — create one, or assign by hand',
  },
};
export const INTAKE_SOURCES = ['watcher', 'upload'] as const;
export type IntakeSource = (typeof INTAKE_SOURCES)[number];

/** What an audit entry is about. */
export const AUDIT_ENTITIES = [
  'layout',
  'manifest',
  'batch',
  'instrument_profile',
  'user',
  'intake_file',
  'webhook',
  'watcher',
] as const;
export const auditEntitySchema = /* @__PURE__ */ lazySchema(() => z.enum(AUDIT_ENTITIES));
export type AuditEntity = z.infer<typeof auditEntitySchema>;
export const AUDIT_ENTITY_LABELS: Record<AuditEntity, string> = {
  batch: 'Batch',
  layout: 'Layout',
  manifest: 'Manifest',
  instrument_profile: 'Instrument profile',
  intake_file: 'Intake file',
  user: 'Person',
  webhook: 'Webhook',
  watcher: 'Watcher credential',
};

/** Where a manifest came from. */
export const MANIFEST_SOURCES = ['csv', 'xlsx', 'form'] as const;
export type ManifestSource = (typeof MANIFEST_SOURCES)[number];

/** What a webhook receiver may subscribe to. */
export const WEBHOOK_EVENTS = ['batch.approved', 'batch.qc_failed', 'file.quarantined'] as const;
export const webhookEventSchema = /* @__PURE__ */ lazySchema(() => z.enum(WEBHOOK_EVENTS));
export type WebhookEvent = z.infer<typeof webhookEventSchema>;
export const WEBHOOK_EVENT_LABELS: Record<WebhookEvent, string> = {
  'batch.approved': 'Batch approved',
  'batch.qc_failed': 'Batch failed QC',
  'file.quarantined': 'File quarantined',
};
export const DELIVERY_STATUSES = ['pending', 'delivered', 'failed'] as const;
export const deliveryStatusSchema = /* @__PURE__ */ lazySchema(() => z.enum(DELIVERY_STATUSES));
export type DeliveryStatus = z.infer<typeof deliveryStatusSchema>;

/** A drop sub-folder's name: letters, digits, - or _ (no slashes or dots), so it is never a path. */
export const dropFolderNameSchema = /* @__PURE__ */ lazySchema(() =>
  z
    .string()
    .trim()
    .regex(/^[A-Za-z0-9][A-Za-z0-9_-]{0,79}$/, 'must be letters, digits, - or _ (no slashes or dots)'),
);
