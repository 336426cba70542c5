/// <reference lib="webworker" />
import { type WorkerRequest, answerWorker } from './what-if-protocol';

// The what-if analysis (fits, Monte Carlo draws) and the whole-spectrum analysis run here, so the batch
// page stays responsive.
addEventListener('message', ({ data }: MessageEvent<WorkerRequest>) => {
  postMessage(answerWorker(data));
});
