import type { AnalysisSettings, BatchResult, Exclusion, Reading } from '@equilight/analysis';
import type { BatchSettings, SettingsChange } from '../batches/batch';

/** Where ε of the complex comes from in a what-if: this batch's standards, or another batch's calibration. */
export interface EpsilonChoice {
  /** L·mol⁻¹·cm⁻¹; null = this batch's own standards. */
  lPerMolCm: number | null;
  sourceBatchId: number | null;
  /** The approval record of the source batch the value comes from; null when it is not approved. */
  sourceRecordId?: number | null;
  label: string;
}

/** "batch "Run 12", approval record 4" — which calibration lent ε, in the words the page and report use. */
export function epsilonSourceLabel(source: { batchName: string; recordId: number | null }): string {
  return `batch "${source.batchName}", ${source.recordId !== null ? `approval record ${source.recordId}` : 'not approved (its analysis now)'}`;
}

/**
 * Unsaved what-if edits, kept apart from the saved settings so that fresh data from the server
 * (a file landing) is analysed again with the same edits on top.
 */
export interface WhatIfEdits {
  addExclusions: Exclusion[];
  /** Saved exclusions taken back. */
  removeExclusions: string[];
  candidates?: string[];
  wavelengthNm?: number | null;
  pathLengthCm?: number;
  epsilon?: EpsilonChoice;
  /** Fit a constant absorbance offset with K and ε. */
  fitBaseline?: boolean;
}

export const NO_EDITS: WhatIfEdits = { addExclusions: [], removeExclusions: [] };

export function hasEdits(e: WhatIfEdits): boolean {
  return (
    e.addExclusions.length > 0 ||
    e.removeExclusions.length > 0 ||
    e.candidates !== undefined ||
    e.wavelengthNm !== undefined ||
    e.pathLengthCm !== undefined ||
    e.epsilon !== undefined ||
    e.fitBaseline !== undefined
  );
}

/** The saved exclusions, minus those taken back, plus the new ones (a new reason replaces an old one). */
export function effectiveExclusions(saved: readonly Exclusion[], e: WhatIfEdits): Exclusion[] {
  const added = new Map(e.addExclusions.map((x) => [x.position.toUpperCase(), x]));
  const removed = new Set(e.removeExclusions.map((p) => p.toUpperCase()));
  const kept = saved.filter(
    (x) => !removed.has(x.position.toUpperCase()) && !added.has(x.position.toUpperCase()),
  );
  return [...kept, ...added.values()];
}

export function withExclusion(e: WhatIfEdits, exclusion: Exclusion): WhatIfEdits {
  const position = exclusion.position.toUpperCase();
  return {
    ...e,
    addExclusions: [
      ...e.addExclusions.filter((x) => x.position !== position),
      { position, reason: exclusion.reason.trim() },
    ],
    removeExclusions: e.removeExclusions.filter((p) => p !== position),
  };
}

export function withoutExclusion(e: WhatIfEdits, position: string, saved: readonly Exclusion[]): WhatIfEdits {
  const p = position.toUpperCase();
  const wasSaved = saved.some((x) => x.position.toUpperCase() === p);
  return {
    ...e,
    addExclusions: e.addExclusions.filter((x) => x.position !== p),
    removeExclusions: wasSaved ? [...new Set([...e.removeExclusions, p])] : e.removeExclusions,
  };
}

/** The settings the analysis module gets: the saved ones with the edits on top. */
export function whatIfSettings(saved: AnalysisSettings, e: WhatIfEdits): AnalysisSettings {
  return {
    ...saved,
    exclusions: effectiveExclusions(saved.exclusions ?? [], e),
    ...(e.candidates !== undefined ? { candidates: e.candidates } : {}),
    ...(e.wavelengthNm !== undefined ? { wavelengthNm: e.wavelengthNm } : {}),
    ...(e.pathLengthCm !== undefined ? { pathLengthCm: e.pathLengthCm } : {}),
    ...(e.epsilon !== undefined ? { epsilonLPerMolCm: e.epsilon.lPerMolCm } : {}),
    ...(e.fitBaseline !== undefined ? { fitBaseline: e.fitBaseline } : {}),
  };
}

export interface WhatIfOutcome {
  result: BatchResult | null;
  error: string | null;
  /** Time the analysis took in the browser, ms. */
  elapsedMs: number;
}

/**
 * The body of PUT /api/batches/:id/settings: only what the edits change. ε from another batch goes as
 * that batch's id, so the server checks it and records which batch and record it came from.
 */
export function settingsPatch(saved: BatchSettings, e: WhatIfEdits): SettingsChange {
  const patch: SettingsChange = {};
  if (e.addExclusions.length || e.removeExclusions.length) {
    patch.exclusions = effectiveExclusions(saved.exclusions, e);
  }
  if (e.candidates !== undefined) patch.candidates = e.candidates;
  if (e.wavelengthNm !== undefined) patch.wavelengthNm = e.wavelengthNm;
  if (e.pathLengthCm !== undefined) patch.pathLengthCm = e.pathLengthCm;
  if (e.epsilon !== undefined) {
    if (e.epsilon.sourceBatchId !== null) patch.epsilonFromBatchId = e.epsilon.sourceBatchId;
    else patch.epsilonLPerMolCm = e.epsilon.lPerMolCm;
  }
  if (e.fitBaseline !== undefined) patch.fitBaseline = e.fitBaseline;
  return patch;
}

/** One line per edit, for the "unsaved what-if" banner. */
export function describeEdits(e: WhatIfEdits): string[] {
  const lines = e.addExclusions.map((x) => `Exclude ${x.position} (${x.reason})`);
  lines.push(...e.removeExclusions.map((p) => `Include ${p} again`));
  if (e.candidates !== undefined) lines.push(`Candidates ${e.candidates.join(', ')}`);
  if (e.wavelengthNm !== undefined)
    lines.push(
      e.wavelengthNm === null ? 'Wavelength chosen automatically' : `Wavelength ${e.wavelengthNm} nm`,
    );
  if (e.pathLengthCm !== undefined) lines.push(`Path length ${e.pathLengthCm} cm`);
  if (e.epsilon !== undefined) lines.push(`ε from ${e.epsilon.label}`);
  if (e.fitBaseline !== undefined)
    lines.push(e.fitBaseline ? 'Constant baseline fitted' : 'No constant baseline');
  return lines;
}

/** The wavelengths present in the readings, ascending. */
export function wavelengthsOf(readings: readonly Reading[]): number[] {
  return [...new Set(readings.map((r) => r.wavelengthNm))].sort((a, b) => a - b);
}
