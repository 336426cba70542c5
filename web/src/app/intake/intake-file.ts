export type IntakeStatus = 'queued' | 'parsing' | 'stored' | 'duplicate' | 'quarantined' | 'unassigned';

/** One received file as the API lists it. */
export interface IntakeFile {
  id: number;
  profileId: number | null;
  profileName: string | null;
  originalName: string;
  sha256: string;
  sizeBytes: number;
  status: IntakeStatus;
  duplicateOfId: number | null;
  error: string | null;
  runId: string | null;
  /** The batch it was stored in; null while unassigned. */
  batchId?: number | null;
  readingCount: number;
  source: 'watcher' | 'upload';
  receivedAt: string;
  finishedAt: string | null;
}

export interface IntakePage {
  items: IntakeFile[];
  total: number;
}

export type IntakeSort =
  'receivedAt' | 'finishedAt' | 'originalName' | 'status' | 'sizeBytes' | 'readingCount';

export interface IntakeQuery {
  status: IntakeStatus | '';
  profileId: number | null;
  q: string;
  sort: IntakeSort;
  dir: 'asc' | 'desc';
  page: number;
  pageSize: number;
}

/** What POST /api/ingest answers at once (202): the file is queued, or known already. */
export interface IngestReceipt {
  id: number;
  status: 'queued' | 'duplicate';
  duplicateOfId?: number;
}

/** Text and icon of each state: the icon and the word carry the meaning, colour only repeats it. */
export const STATUS_DISPLAY: Record<IntakeStatus, { label: string; icon: string; hint: string }> = {
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

export const INTAKE_STATUSES = Object.keys(STATUS_DISPLAY) as IntakeStatus[];

export function isIntakeFile(value: unknown): value is IntakeFile {
  const v = value as Partial<IntakeFile> | null;
  return (
    !!v &&
    typeof v.id === 'number' &&
    typeof v.originalName === 'string' &&
    typeof v.sha256 === 'string' &&
    typeof v.sizeBytes === 'number' &&
    typeof v.status === 'string' &&
    v.status in STATUS_DISPLAY &&
    typeof v.readingCount === 'number' &&
    typeof v.receivedAt === 'string'
  );
}

export function isIngestReceipt(value: unknown): value is IngestReceipt {
  const v = value as Partial<IngestReceipt> | null;
  return !!v && typeof v.id === 'number' && (v.status === 'queued' || v.status === 'duplicate');
}
