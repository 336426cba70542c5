import type { BatchState } from '../batches/batch.entity';
import type { Role } from '../users/user.entity';

/** QC of a batch as far as it is known without running an analysis. */
export interface OverviewQc {
  /** `known`: worked out already (the batches list or batch page ran it); `not-analysed`: not yet, open the batch. */
  state: 'known' | 'not-analysed' | 'no-files';
  flagCount: number | null;
  errorCount: number | null;
}

export interface OverviewBatch {
  id: number;
  name: string;
  state: BatchState;
  profileName: string | null;
  expectedFiles: number;
  storedFiles: number;
  readingCount: number;
  lastActivityAt: string;
  qc: OverviewQc;
}

/** A batch this person may take the next step on. */
export interface OverviewReviewItem extends OverviewBatch {
  /** `review`: mark an open batch with all its files reviewed; `approve`: approve a reviewed batch. */
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
  /** When the instrument last sent anything; null if never. */
  lastSeenAt: string | null;
}

/** GET /api/overview: the starting point of the signed-in person, only what their role may see. */
export interface OverviewDto {
  role: Role;
  generatedAt: string;
  openBatches: { total: number; items: OverviewBatch[] };
  awaitingMe: { total: number; items: OverviewReviewItem[]; fourEyes: boolean };
  /** Lab managers and admins only (the roles of the intake). */
  quarantinedToday?: { since: string; count: number; latest: OverviewQuarantinedFile[] };
  /** Lab managers and admins only: active instruments silent for longer than `silentAfterHours`. */
  silentInstruments?: { silentAfterHours: number; items: OverviewSilentInstrument[] };
}
