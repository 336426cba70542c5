import { TestBed } from '@angular/core/testing';
import type { SpectralSettings } from '@equilight/analysis';
import { MessageChannel, type MessagePort } from 'node:worker_threads';
import { firstValueFrom } from 'rxjs';
import { fixtureAnalysis } from './analysis-fixture';
import { runSpectra } from './spectra-compute';
import { SPECTRA_K, spectraPlate } from './spectra-fixture';
import { NO_EDITS, withExclusion } from './what-if';
import { type WorkerRequest, type WorkerResponse, answerSpectra, answerWorker } from './what-if-protocol';
import { WHAT_IF_WORKER, WhatIfRunner } from './what-if-runner';
import type { WhatIfWorker } from './what-if-worker';

// The whole-spectrum request travels the what-if worker's real message passing (Node's MessageChannel
// clones every message as a browser Worker does); the far port answers with what what-if.worker.ts runs.

function channel(answer: (request: WorkerRequest, far: MessagePort) => void) {
  const { port1, port2 } = new MessageChannel();
  const requests: WorkerRequest[] = [];
  port2.on('message', (request: WorkerRequest) => {
    requests.push(request);
    answer(request, port2);
  });
  const worker: WhatIfWorker = {
    postMessage: (message) => port1.postMessage(message),
    set onmessage(handler: ((event: MessageEvent<WorkerResponse>) => void) | null) {
      port1.removeAllListeners('message');
      if (handler)
        port1.on('message', (data: WorkerResponse) => handler({ data } as MessageEvent<WorkerResponse>));
    },
    get onmessage() {
      return null;
    },
    onerror: null,
    terminate: () => {
      port1.close();
    },
  };
  return { worker, far: port2, requests };
}

describe('whole-spectrum requests to the what-if worker', () => {
  const plate = spectraPlate();
  const settings: SpectralSettings = { candidates: ['1:1', '1:2'], reactantB: 'none' };
  const ports: MessagePort[] = [];

  function runnerWith(factory: () => WhatIfWorker | null): WhatIfRunner {
    TestBed.configureTestingModule({
      providers: [WhatIfRunner, { provide: WHAT_IF_WORKER, useValue: factory }],
    });
    return TestBed.inject(WhatIfRunner);
  }

  afterEach(() => {
    TestBed.resetTestingModule();
    ports.splice(0).forEach((p) => p.close());
  });

  it('when spectra go to the worker, then the answer equals the analysis run in this thread', async () => {
    const c = channel((request, far) => far.postMessage(answerWorker(request)));
    ports.push(c.far);
    const outcome = await firstValueFrom(
      runnerWith(() => c.worker).runSpectra(plate.readings, plate.samples, settings),
    );
    const inThread = runSpectra(plate.readings, plate.samples, settings);
    expect(c.requests).toHaveLength(1);
    expect(c.requests[0].kind).toBe('spectra');
    expect(outcome.error).toBeNull();
    expect(outcome.result?.best).toBe('1:1');
    const k = outcome.result?.candidates.find((x) => x.model === '1:1')?.k ?? 0;
    expect(k).toBe(inThread.result?.candidates.find((x) => x.model === '1:1')?.k);
    // The invented plate was made from K = 2500 L/mol.
    expect(Math.abs(k / SPECTRA_K - 1)).toBeLessThan(0.05);
  });

  it('when a what-if and a spectra request share the worker, then each gets the answer of its kind', async () => {
    const c = channel((request, far) => far.postMessage(answerWorker(request)));
    ports.push(c.far);
    const runner = runnerWith(() => c.worker);
    const analysis = fixtureAnalysis();
    const edits = withExclusion(NO_EDITS, { position: 'C15', reason: 'bubble in the cuvette' });
    const [whatIf, spectra] = await Promise.all([
      firstValueFrom(runner.run(analysis.readings, analysis.samples, analysis.settings, edits)),
      firstValueFrom(runner.runSpectra(plate.readings, plate.samples, settings)),
    ]);
    expect(c.requests.map((r) => r.kind ?? 'what-if')).toEqual(['what-if', 'spectra']);
    expect(whatIf.result?.positions.find((p) => p.position === 'C15')?.status).toBe('excluded');
    expect(spectra.result?.speciesCount).toBe(2);
  });

  it('when the worker fails, then the waiting spectra request gets the error', async () => {
    const failing = channel(() => undefined);
    ports.push(failing.far);
    const runner = runnerWith(() => failing.worker);
    const pending = firstValueFrom(runner.runSpectra(plate.readings, plate.samples, settings));
    await new Promise((r) => setTimeout(r, 10));
    failing.worker.onerror?.({ message: 'out of memory' } as ErrorEvent);
    const failed = await pending;
    expect(failed.result).toBeNull();
    expect(failed.error).toContain('out of memory');
  });

  it('when the platform has no Worker, then the same analysis runs in this thread', async () => {
    const outcome = await firstValueFrom(
      runnerWith(() => null).runSpectra(plate.readings, plate.samples, { ...settings, profile: false }),
    );
    expect(outcome.result?.best).toBe('1:1');
  });

  it('when the settings are wrong, then the answer carries the reason instead of throwing', () => {
    const response = answerSpectra({
      kind: 'spectra',
      id: 4,
      readings: plate.readings,
      samples: plate.samples,
      settings: { fromNm: 600, toNm: 400 },
    });
    expect(response).toMatchObject({ kind: 'spectra', id: 4 });
    expect(response.spectra.result).toBeNull();
    expect(response.spectra.error).toMatch(/starts after it ends/);
  });
});
