import type {
  ApprovalRecordDto,
  BatchAnalysisDto,
  EngineCheckDto,
  EpsilonCandidateDto,
  PlateFormat,
} from '@equilight/contracts';

/** GET /api/batches/:id/analysis: the batch, every input of the analysis, and its result. */
export type BatchAnalysis = BatchAnalysisDto;
/** What one approval froze: who, when, the engine, the input files' SHA-256 and the headline. */
export type ApprovalRecord = ApprovalRecordDto;
export type EngineCheck = EngineCheckDto;
/** GET /api/batches/:id/epsilon-sources: a batch of the same system and wavelength that can lend ε. */
export type EpsilonCandidate = EpsilonCandidateDto;

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
