import type { Batch, BatchListItem } from './batch';
import { DEFAULT_BATCH_SETTINGS } from '@equilight/contracts';

/** An invented batch for component tests. */
export function batchFixture(overrides: Partial<Batch> = {}): Batch {
  return {
    id: 1,
    name: 'Iron–ligand Job series',
    state: 'open',
    profileId: 2,
    profileName: 'Reader Bay 2',
    layoutId: 3,
    layoutName: 'Job plate',
    layoutVersion: 2,
    manifestId: 4,
    manifestName: 'Job mixtures',
    manifestVersion: 1,
    runId: 'RUN-0417',
    expectedFiles: 3,
    fileCount: 1,
    systemName: 'Fe(III) + ligand L',
    temperatureC: 25,
    settings: {
      ...DEFAULT_BATCH_SETTINGS,
      wavelengthNm: 480,
      candidates: ['1:1', '1:2'],
    },
    createdAt: '2026-03-02T09:00:00.000Z',
    updatedAt: '2026-03-02T09:00:00.000Z',
    lastActivityAt: '2026-03-02T09:30:00.000Z',
    reviewedBy: null,
    reviewedAt: null,
    approvedBy: null,
    createdBy: null,
    approvedAt: null,
    approvalComment: null,
    summary: null,
    ...overrides,
  };
}

/** An invented row of the batches list: a batch and where its stored headline stands. */
export function batchListItemFixture(overrides: Partial<BatchListItem> = {}): BatchListItem {
  const { summaryState, summaryError, ...batch } = overrides;
  const item = batchFixture(batch);
  return {
    ...item,
    summaryState: summaryState ?? (item.summary ? 'current' : item.fileCount ? 'pending' : 'none'),
    summaryError: summaryError ?? null,
  };
}
