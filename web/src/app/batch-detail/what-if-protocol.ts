import type { AnalysisSettings, Reading, SampleDefinition, SpectralSettings } from '@equilight/analysis';
import { type SpectraOutcome, runSpectra } from './spectra-compute';
import type { WhatIfEdits, WhatIfOutcome } from './what-if';
import { runWhatIf } from './what-if-compute';

/** Page → worker: analyse this batch with these edits. `id` pairs the answer with its question. */
export interface WhatIfRequest {
  kind?: 'what-if';
  id: number;
  readings: readonly Reading[];
  samples: readonly SampleDefinition[];
  saved: AnalysisSettings;
  edits: WhatIfEdits;
}

/** Page → worker: the whole-spectrum analysis of this batch with these settings. */
export interface SpectraRequest {
  kind: 'spectra';
  id: number;
  readings: readonly Reading[];
  samples: readonly SampleDefinition[];
  settings: SpectralSettings;
}

export type WorkerRequest = WhatIfRequest | SpectraRequest;

/** Worker → page. */
export interface WhatIfResponse {
  kind?: 'what-if';
  id: number;
  outcome: WhatIfOutcome;
}

export interface SpectraResponse {
  kind: 'spectra';
  id: number;
  spectra: SpectraOutcome;
}

export type WorkerResponse = WhatIfResponse | SpectraResponse;

/** What the worker does with one message; never throws, a failed analysis is an outcome with an error. */
export function answerWhatIf(request: WhatIfRequest): WhatIfResponse {
  return {
    id: request.id,
    outcome: runWhatIf(request.readings, request.samples, request.saved, request.edits),
  };
}

/** The worker's answer to a whole-spectrum request; never throws. */
export function answerSpectra(request: SpectraRequest): SpectraResponse {
  return {
    kind: 'spectra',
    id: request.id,
    spectra: runSpectra(request.readings, request.samples, request.settings),
  };
}

/** Any request the worker takes, answered by its kind. */
export function answerWorker(request: WorkerRequest): WorkerResponse {
  return request.kind === 'spectra' ? answerSpectra(request) : answerWhatIf(request);
}
