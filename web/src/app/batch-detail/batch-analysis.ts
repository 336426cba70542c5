import type {
  AnalysisSettings,
  BatchResult,
  Reading,
  SampleDefinition,
  SpectralAnalysisResult,
  WaterPeakPathLengths,
} from '@equilight/analysis';
import {
  type Batch,
  type BatchResultSummary,
  type BatchSettings,
  type PlateFormat,
  isBatch,
} from '../batches/batch';

/** GET /api/batches/:id/analysis: the batch, every input of the analysis, and its result. */
export interface BatchAnalysis {
  batch: Batch;
  readings: (Reading & { intakeFileId?: number })[];
  samples: SampleDefinition[];
  layoutPositions: { position: string; role: string; replicateGroup?: string }[];
  files: {
    id: number;
    originalName: string;
    sha256: string;
    status: string;
    readingCount: number;
    receivedAt: string;
  }[];
  /** The settings as the analysis module took them. */
  settings: AnalysisSettings;
  result: BatchResult;
  /** Approved: the approval record `result` comes from (null when approved before records were kept). */
  record?: ApprovalRecord | null;
  /** Approved, when asked for: what today's analysis engine gives, compared with the record. */
  engineCheck?: EngineCheck;
  /** Every approval record of the batch, newest first; earlier ones were superseded by a reopening. */
  approvals?: ApprovalRecord[];
  /** Plates read near 977 and 900 nm: each well's path length from the water peak; else null. */
  wellPathLengths?: WaterPeakPathLengths | null;
  /** Batches read at 10 or more wavelengths: the whole-spectrum analysis (null otherwise or on failure). */
  spectral?: SpectralAnalysisResult | null;
  spectralError?: string | null;
}

/** What one approval froze: who, when, the engine, the input files' SHA-256 and the headline. */
export interface ApprovalRecord {
  id: number;
  batchId: number;
  schemaVersion: number;
  engine: { version: string; packageVersion: string; sourceSha256: string };
  approvedBy: string | null;
  approvedAt: string;
  approvalComment: string;
  settings: BatchSettings;
  files: { id: number; originalName: string; sha256: string; readingCount: number; receivedAt: string }[];
  summary: BatchResultSummary;
  supersededAt: string | null;
  supersededBy: string | null;
  supersededReason: string | null;
}

export interface EngineCheck {
  engineVersion: string;
  sameEngine: boolean;
  differs: boolean;
  /** False when the files stored now are not those the record names. */
  inputsMatch?: boolean;
  current: BatchResultSummary | null;
  error: string | null;
}

/** GET /api/batches/:id/epsilon-sources: a batch of the same system and wavelength that can lend ε. */
export interface EpsilonCandidate {
  batchId: number;
  batchName: string;
  state: string;
  temperatureC: number | null;
  recordId: number | null;
  wavelengthNm: number;
  epsilonLPerMolCm: number;
  epsilonSe: number;
}

export function isEpsilonCandidate(v: unknown): v is EpsilonCandidate {
  return (
    isObj(v) &&
    typeof v['batchId'] === 'number' &&
    typeof v['batchName'] === 'string' &&
    typeof v['epsilonLPerMolCm'] === 'number' &&
    typeof v['wavelengthNm'] === 'number' &&
    (v['recordId'] === null || typeof v['recordId'] === 'number')
  );
}

const isObj = (v: unknown): v is Record<string, unknown> => !!v && typeof v === 'object';

export function isBatchAnalysis(value: unknown): value is BatchAnalysis {
  if (!isObj(value)) return false;
  const r = value['result'];
  return (
    isBatch(value['batch']) &&
    Array.isArray(value['readings']) &&
    Array.isArray(value['samples']) &&
    Array.isArray(value['layoutPositions']) &&
    Array.isArray(value['files']) &&
    isObj(value['settings']) &&
    isObj(r) &&
    Array.isArray(r['positions']) &&
    Array.isArray(r['qc'])
  );
}

/** The plate format, when the layout is not at hand: a cuvette number past 24 or a row past P is telling. */
export function guessFormat(positions: readonly string[]): PlateFormat {
  let maxRow = 0;
  let maxCol = 0;
  for (const p of positions) {
    const m = /^([A-Z])(\d+)$/.exec(p);
    if (!m) continue;
    maxRow = Math.max(maxRow, m[1].charCodeAt(0) - 64);
    maxCol = Math.max(maxCol, Number(m[2]));
  }
  const onlyC = positions.length > 0 && positions.every((p) => p.startsWith('C'));
  if (onlyC && maxCol > 12) return 'cuvette';
  if (maxRow > 8 || maxCol > 12) return '384';
  return onlyC ? 'cuvette' : '96';
}
