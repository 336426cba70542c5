import type { AnalysisSettings, Reading, SampleDefinition } from '@equilight/analysis';
import type { WhatIfEdits, WhatIfOutcome } from './what-if';
import { runWhatIf } from './what-if-compute';

/** Page → worker: analyse this batch with these edits. `id` pairs the answer with its question. */
export interface WhatIfRequest {
  id: number;
  readings: readonly Reading[];
  samples: readonly SampleDefinition[];
  saved: AnalysisSettings;
  edits: WhatIfEdits;
}

/** Worker → page. */
export interface WhatIfResponse {
  id: number;
  outcome: WhatIfOutcome;
}

/** What the worker does with one message; never throws, a failed analysis is an outcome with an error. */
export function answerWhatIf(request: WhatIfRequest): WhatIfResponse {
  return {
    id: request.id,
    outcome: runWhatIf(request.readings, request.samples, request.saved, request.edits),
  };
}
