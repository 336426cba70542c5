import {
  type BatchDto,
  type BatchListItemDto,
  type BatchListQuery,
  type CalibrationModel,
  type CreateBatchRequest,
  DEFAULT_BATCH_SETTINGS,
  type LayoutSummaryDto,
  type ManifestSummaryDto,
} from '@equilight/contracts';

export type {
  BatchResultSummary,
  BatchSettings,
  BatchState,
  CalibrationModel,
  EpsilonSource,
  InstrumentSummary as InstrumentChoice,
  PlateFormat,
  SettingsChange,
} from '@equilight/contracts';
export {
  BATCH_STATES,
  BATCH_STATE_DISPLAY,
  CANDIDATE_STOICHIOMETRIES,
  PLATE_FORMAT_LABELS as FORMAT_LABELS,
} from '@equilight/contracts';

/** A batch as the API sends it (GET /api/batches/:id). */
export type Batch = BatchDto;

/** One row of the batches list: the batch and where its stored headline stands. */
export type BatchListItem = BatchListItemDto;
export type { BatchPage, SummaryState } from '@equilight/contracts';

export type BatchSort = NonNullable<BatchListQuery['sort']>;

/** What the batches list asks for; '' and null leave a filter out. */
export interface BatchListRequest {
  state?: BatchDto['state'] | '';
  profileId?: number | null;
  /** Only open and reviewed batches (the ones a file may still join). */
  unapproved?: boolean;
  q?: string;
  sort?: BatchSort;
  dir?: 'asc' | 'desc';
  page?: number;
  pageSize?: number;
}

/** POST /api/batches. Settings left out take the instrument's or the product's defaults. */
export type NewBatch = CreateBatchRequest;

/** The choices a new batch is made of. */
export type LayoutChoice = Pick<
  LayoutSummaryDto,
  'id' | 'name' | 'format' | 'currentVersion' | 'positionCount'
>;
export type ManifestChoice = Pick<
  ManifestSummaryDto,
  'id' | 'name' | 'layoutId' | 'currentVersion' | 'sampleCount'
>;

export interface VersionChoice {
  version: number;
  createdAt: string;
}

export interface ManifestVersions {
  /** The layout version the current manifest version was checked against. */
  layoutVersion: number;
  versions: VersionChoice[];
}

/** The defaults the server applies, shown in the form (CVs in per cent); built when a form asks. */
export function defaultFormSettings() {
  return {
    candidates: DEFAULT_BATCH_SETTINGS.candidates,
    calibrationModel: DEFAULT_BATCH_SETTINGS.calibrationModel as CalibrationModel,
    linearRangeMaxAbsorbance: DEFAULT_BATCH_SETTINGS.linearRangeMaxAbsorbance,
    r2Min: DEFAULT_BATCH_SETTINGS.r2Min,
    replicateCvMaxPercent: DEFAULT_BATCH_SETTINGS.replicateCvMax * 100,
    kCvMaxPercent: DEFAULT_BATCH_SETTINGS.kCvMax * 100,
    concentrationUnit: DEFAULT_BATCH_SETTINGS.concentrationUnit,
    /** Per cent [low, high]. */
    recoveryLimitsPct: DEFAULT_BATCH_SETTINGS.recoveryLimitsPct,
  };
}
