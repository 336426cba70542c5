import type { KStatus } from '@equilight/analysis';

/** A batch as the API sends it (GET /api/batches, /api/batches/:id). */
export type BatchState = 'open' | 'reviewed' | 'approved';
export type PlateFormat = '96' | '384' | 'cuvette';
export type CalibrationModel = 'linear' | 'through-origin';

export interface BatchSettings {
  wavelengthNm: number | null;
  pathLengthCm: number;
  candidates: string[];
  calibrationModel: CalibrationModel;
  linearRangeMaxAbsorbance: number;
  r2Min: number;
  /** Fraction (0.05 = 5 %). */
  replicateCvMax: number;
  /** Fraction (0.15 = 15 %). */
  kCvMax: number;
  epsilonLPerMolCm: number | null;
  /** Set by the server when ε was taken from another batch's calibration. */
  epsilonSource?: EpsilonSource | null;
  monteCarloDraws: number;
  /** Fit a constant absorbance with K and ε (a reactant held at constant concentration absorbs too). */
  fitBaseline: boolean;
  exclusions: { position: string; reason: string }[];
}

/** Which batch, and which of its approval records, lent ε of the complex. */
export interface EpsilonSource {
  batchId: number;
  batchName: string;
  /** null: that batch was not approved; its analysis at `takenAt` was used. */
  recordId: number | null;
  wavelengthNm: number | null;
  epsilonLPerMolCm: number;
  takenAt: string;
}

/** A settings change as PUT /api/batches/:id/settings takes it. */
export type SettingsChange = Partial<Omit<BatchSettings, 'epsilonSource'>> & {
  /** Take ε from this batch's calibration; the server checks system and wavelength and records the source. */
  epsilonFromBatchId?: number;
};

export interface Batch {
  id: number;
  name: string;
  state: BatchState;
  profileId: number;
  profileName: string | null;
  layoutId: number;
  layoutName: string | null;
  layoutVersion: number;
  manifestId: number;
  manifestName: string | null;
  manifestVersion: number;
  runId: string;
  expectedFiles: number;
  fileCount: number;
  systemName: string | null;
  temperatureC: number | null;
  settings: BatchSettings;
  createdAt: string;
  updatedAt: string;
  lastActivityAt: string;
  reviewedBy: string | null;
  reviewedAt: string | null;
  approvedBy: string | null;
  approvedAt: string | null;
  approvalComment: string | null;
  createdBy?: string | null;
  /** The analysis headline; null until a file has arrived. */
  summary: BatchResultSummary | null;
}

export interface BatchResultSummary {
  qcFlagCount: number;
  qcErrorCount: number;
  best: string | null;
  /** K of the best candidate when it has a value (not for bounds or failed fits). */
  k: number | null;
  kSe: number | null;
  /** 95 % interval; an end is null when the data do not bound it. */
  kCi95: [number | null, number | null] | null;
  /** What is known of K; null without a best candidate (or in a result stored before K had a status). */
  kStatus: KStatus | null;
  kLowerBound95: number | null;
  kUpperBound95: number | null;
  kUnit: string | null;
  /** The K as every screen, report and mail states it (formatK). */
  kText: string | null;
}

/** POST /api/batches. Settings left out take the instrument's or the product's defaults. */
export interface NewBatch {
  name: string;
  profileId: number;
  layoutId: number;
  /** Left out: the layout's current version. */
  layoutVersion?: number;
  manifestId: number;
  /** Left out: the manifest's current version. */
  manifestVersion?: number;
  runId: string;
  expectedFiles: number;
  systemName?: string | null;
  temperatureC?: number | null;
  settings: Partial<BatchSettings>;
}

/** The choices a new batch is made of. */
export interface InstrumentChoice {
  id: number;
  name: string;
  kind: string;
  plateFormat: PlateFormat;
  active: boolean;
}

export interface LayoutChoice {
  id: number;
  name: string;
  format: PlateFormat;
  currentVersion: number;
  positionCount: number;
}

export interface ManifestChoice {
  id: number;
  name: string;
  layoutId: number;
  currentVersion: number;
  sampleCount: number;
}

export interface VersionChoice {
  version: number;
  createdAt: string;
}

export interface ManifestVersions {
  /** The layout version the current manifest version was checked against. */
  layoutVersion: number;
  versions: VersionChoice[];
}

export const BATCH_STATES: readonly BatchState[] = ['open', 'reviewed', 'approved'];

/** Every state has its own icon and word, so colour is never the only cue. */
export const BATCH_STATE_DISPLAY: Record<BatchState, { label: string; icon: string }> = {
  open: { label: 'Open', icon: 'pending' },
  reviewed: { label: 'Reviewed', icon: 'rate_review' },
  approved: { label: 'Approved', icon: 'verified' },
};

export const FORMAT_LABELS: Record<PlateFormat, string> = {
  '96': '96-well plate',
  '384': '384-well plate',
  cuvette: 'Cuvettes',
};

/** Candidate stoichiometries offered for a batch, "A:B". */
export const CANDIDATE_STOICHIOMETRIES = ['1:1', '1:2', '2:1', '1:3', '3:1', '2:2', '1:4', '4:1'] as const;

/** The defaults the server applies, shown in the form. */
export const DEFAULT_SETTINGS = {
  candidates: ['1:1', '1:2', '2:1', '1:3'],
  calibrationModel: 'linear' as CalibrationModel,
  linearRangeMaxAbsorbance: 1,
  r2Min: 0.995,
  replicateCvMaxPercent: 5,
  kCvMaxPercent: 15,
};

const isNum = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);
const isStr = (v: unknown): v is string => typeof v === 'string';
const isObj = (v: unknown): v is Record<string, unknown> => !!v && typeof v === 'object';

export function isBatch(value: unknown): value is Batch {
  if (!isObj(value)) return false;
  const v = value;
  return (
    isNum(v['id']) &&
    isStr(v['name']) &&
    isStr(v['state']) &&
    (BATCH_STATES as readonly string[]).includes(v['state']) &&
    isNum(v['profileId']) &&
    isNum(v['layoutId']) &&
    isNum(v['layoutVersion']) &&
    isNum(v['manifestId']) &&
    isNum(v['manifestVersion']) &&
    isStr(v['runId']) &&
    isNum(v['expectedFiles']) &&
    isNum(v['fileCount']) &&
    isStr(v['lastActivityAt']) &&
    isObj(v['settings']) &&
    Array.isArray(v['settings']['candidates'])
  );
}

export function isInstrumentChoice(v: unknown): v is InstrumentChoice {
  return isObj(v) && isNum(v['id']) && isStr(v['name']) && isStr(v['plateFormat']);
}

export function isLayoutChoice(v: unknown): v is LayoutChoice {
  return isObj(v) && isNum(v['id']) && isStr(v['name']) && isStr(v['format']) && isNum(v['currentVersion']);
}

export function isManifestChoice(v: unknown): v is ManifestChoice {
  return isObj(v) && isNum(v['id']) && isStr(v['name']) && isNum(v['layoutId']) && isNum(v['currentVersion']);
}

export function versionsOf(v: unknown): VersionChoice[] {
  if (!isObj(v) || !Array.isArray(v['versions'])) throw new Error('The server sent no versions.');
  return (v['versions'] as unknown[]).map((row) => {
    if (!isObj(row) || !isNum(row['version'])) throw new Error('The server sent a version without a number.');
    return { version: row['version'], createdAt: isStr(row['createdAt']) ? row['createdAt'] : '' };
  });
}
