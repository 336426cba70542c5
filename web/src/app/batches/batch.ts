import {
  type BatchDto,
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

/** A batch as the API sends it (GET /api/batches, /api/batches/:id). */
export type Batch = BatchDto;

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

/** The defaults the server applies, shown in the form (CVs in per cent). */
export const DEFAULT_SETTINGS = {
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
