// The overview's answer is defined once, in the contracts (the web parses it with the same schema).
export type {
  OverviewBatch,
  OverviewDto,
  OverviewQc,
  OverviewQuarantinedFile,
  OverviewReviewItem,
  OverviewSilentInstrument,
} from '../contracts/overview';
