/// <reference lib="webworker" />
import { type WhatIfRequest, answerWhatIf } from './what-if-protocol';

// The what-if analysis (fits, Monte Carlo draws) runs here, so the batch page stays responsive.
addEventListener('message', ({ data }: MessageEvent<WhatIfRequest>) => {
  postMessage(answerWhatIf(data));
});
