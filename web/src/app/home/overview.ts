// The answer of GET /api/overview, as the contracts define it (the service parses it with their schema).
export type {
  OverviewDto as Overview,
  OverviewBatch,
  OverviewQc,
  OverviewQuarantinedFile,
  OverviewReviewItem,
  OverviewSilentInstrument,
} from '@equilight/contracts';

/** Local midnight of `now`: where "today" starts for the person looking. */
export function startOfLocalDay(now = new Date()): Date {
  return new Date(now.getFullYear(), now.getMonth(), now.getDate());
}
