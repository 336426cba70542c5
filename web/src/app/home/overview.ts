import type { Role } from '../core/auth/user';

// The answer of GET /api/overview (server/src/overview/overview.dto.ts).

export type OverviewBatchState = 'open' | 'reviewed' | 'approved';

export interface OverviewQc {
  state: 'known' | 'not-analysed' | 'no-files';
  flagCount: number | null;
  errorCount: number | null;
}

export interface OverviewBatch {
  id: number;
  name: string;
  state: OverviewBatchState;
  profileName: string | null;
  expectedFiles: number;
  storedFiles: number;
  readingCount: number;
  lastActivityAt: string;
  qc: OverviewQc;
}

export interface OverviewReviewItem extends OverviewBatch {
  action: 'review' | 'approve';
}

export interface OverviewQuarantinedFile {
  id: number;
  originalName: string;
  profileName: string | null;
  receivedAt: string;
  error: string | null;
}

export interface OverviewSilentInstrument {
  id: number;
  name: string;
  lastSeenAt: string | null;
}

export interface Overview {
  role: Role;
  generatedAt: string;
  openBatches: { total: number; items: OverviewBatch[] };
  awaitingMe: { total: number; items: OverviewReviewItem[]; fourEyes: boolean };
  quarantinedToday?: { since: string; count: number; latest: OverviewQuarantinedFile[] };
  silentInstruments?: { silentAfterHours: number; items: OverviewSilentInstrument[] };
}

/** Check the shape where it arrives from the API. */
export function isOverview(value: unknown): value is Overview {
  const v = value as Partial<Overview> | null;
  return (
    !!v &&
    typeof v.role === 'string' &&
    Array.isArray(v.openBatches?.items) &&
    typeof v.openBatches?.total === 'number' &&
    Array.isArray(v.awaitingMe?.items) &&
    typeof v.awaitingMe?.total === 'number'
  );
}

/** Local midnight of `now`: where "today" starts for the person looking. */
export function startOfLocalDay(now = new Date()): Date {
  return new Date(now.getFullYear(), now.getMonth(), now.getDate());
}
