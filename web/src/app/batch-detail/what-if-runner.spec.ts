import { TestBed } from '@angular/core/testing';
import { MessageChannel, type MessagePort } from 'node:worker_threads';
import { firstValueFrom } from 'rxjs';
import { FIXTURE_K, fixtureAnalysis } from './analysis-fixture';
import { NO_EDITS, type WhatIfEdits, type WhatIfOutcome, withExclusion } from './what-if';
import { runWhatIf } from './what-if-compute';
import { type WhatIfRequest, type WorkerResponse, answerWhatIf } from './what-if-protocol';
import { WHAT_IF_WORKER, WhatIfRunner } from './what-if-runner';
import type { WhatIfWorker } from './what-if-worker';
import { APP_UPDATED_TEXT } from '../core/routing/app-updated';

// The runner talks to the worker through real message passing (Node's MessageChannel clones every
// message the way a browser Worker does); the far port answers with the function what-if.worker.ts runs.

const bestK = (o: WhatIfOutcome | undefined) => {
  const s = o?.result?.stoichiometry;
  return s?.candidates.find((c) => c.model === s.best)?.fit?.k;
};

interface Channel {
  worker: WhatIfWorker;
  far: MessagePort;
  requests: WhatIfRequest[];
}

function channel(answer: (request: WhatIfRequest, far: MessagePort) => void): Channel {
  const { port1, port2 } = new MessageChannel();
  const requests: WhatIfRequest[] = [];
  port2.on('message', (request: WhatIfRequest) => {
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

describe('what-if runner and its worker messages', () => {
  const analysis = fixtureAnalysis();
  const edits: WhatIfEdits = withExclusion(NO_EDITS, { position: 'C15', reason: 'bubble in the cuvette' });
  const ports: MessagePort[] = [];

  function runnerWith(factory: () => WhatIfWorker | null): WhatIfRunner {
    TestBed.configureTestingModule({
      providers: [WhatIfRunner, { provide: WHAT_IF_WORKER, useValue: factory }],
    });
    return TestBed.inject(WhatIfRunner);
  }
  const run = (runner: WhatIfRunner, e = edits) =>
    runner.run(analysis.readings, analysis.samples, analysis.settings, e);

  afterEach(() => {
    TestBed.resetTestingModule();
    ports.splice(0).forEach((p) => p.close());
  });

  it('when an edit goes to the worker, then the answer equals the analysis run in this thread', async () => {
    const c = channel((request, far) => far.postMessage(answerWhatIf(request)));
    ports.push(c.far);
    const outcome = await firstValueFrom(run(runnerWith(() => c.worker)));
    const inThread = runWhatIf(analysis.readings, analysis.samples, analysis.settings, edits);

    expect(c.requests).toHaveLength(1);
    expect(c.requests[0].edits).toEqual(edits);
    expect(outcome.error).toBeNull();
    expect(bestK(outcome)).toBe(bestK(inThread));
    // The invented fixture was generated with K = 620 L/mol: the excluded mixture leaves it close.
    expect(Math.abs((bestK(outcome) ?? 0) / FIXTURE_K - 1)).toBeLessThan(0.05);
    expect(outcome.result?.positions.find((p) => p.position === 'C15')?.status).toBe('excluded');
  });

  it('when answers come back out of order, then each goes to its own request by id', async () => {
    const held: WhatIfRequest[] = [];
    const c = channel((request, far) => {
      held.push(request);
      if (held.length === 2) held.reverse().forEach((r) => far.postMessage(answerWhatIf(r)));
    });
    ports.push(c.far);
    const runner = runnerWith(() => c.worker);
    const other = withExclusion(NO_EDITS, { position: 'C17', reason: 'scratched cuvette wall' });
    const [first, second] = await Promise.all([
      firstValueFrom(run(runner)),
      firstValueFrom(run(runner, other)),
    ]);
    expect(c.requests.map((r) => r.id)).toEqual([1, 2]);
    expect(first.result?.positions.find((p) => p.position === 'C15')?.status).toBe('excluded');
    expect(second.result?.positions.find((p) => p.position === 'C17')?.status).toBe('excluded');
    expect(second.result?.positions.find((p) => p.position === 'C15')?.status).not.toBe('excluded');
  });

  it('when a newer edit replaces a request, then the stale answer is dropped', async () => {
    const c = channel((request, far) => far.postMessage(answerWhatIf(request)));
    ports.push(c.far);
    const runner = runnerWith(() => c.worker);
    const seen: WhatIfOutcome[] = [];
    run(runner)
      .subscribe((o) => seen.push(o))
      .unsubscribe();
    const latest = await firstValueFrom(run(runner));
    expect(c.requests).toHaveLength(2);
    expect(seen).toEqual([]);
    expect(latest.result).not.toBeNull();
  });

  it('when the worker fails, then the waiting edit gets an error and the next edit starts a new worker', async () => {
    let started = 0;
    const failing = channel(() => undefined);
    ports.push(failing.far);
    const healthy = channel((request, far) => far.postMessage(answerWhatIf(request)));
    ports.push(healthy.far);
    const runner = runnerWith(() => (++started === 1 ? failing.worker : healthy.worker));
    const pending = firstValueFrom(run(runner));
    await new Promise((r) => setTimeout(r, 10));
    failing.worker.onerror?.({ message: 'out of memory' } as ErrorEvent);
    const failed = await pending;
    expect(failed.result).toBeNull();
    expect(failed.error).toContain('out of memory');

    const next = await firstValueFrom(run(runner));
    expect(started).toBe(2);
    expect(next.error).toBeNull();
  });

  it("when the worker's own script cannot be loaded, then this and later edits run in this thread", async () => {
    let started = 0;
    const unloadable = channel(() => undefined);
    ports.push(unloadable.far);
    const posted = jest.spyOn(unloadable.worker, 'postMessage');
    const runner = runnerWith(() => {
      started += 1;
      return unloadable.worker;
    });
    const pending = firstValueFrom(run(runner));
    expect(posted).toHaveBeenCalledTimes(1);
    // What a browser dispatches for a module worker whose script answered 404: an error with no message.
    unloadable.worker.onerror?.({} as ErrorEvent);
    const inThread = runWhatIf(analysis.readings, analysis.samples, analysis.settings, edits);
    const first = await pending;
    expect(first.error).toBeNull();
    expect(bestK(first)).toBe(bestK(inThread));

    const next = await firstValueFrom(run(runner));
    expect(started).toBe(1);
    expect(posted).toHaveBeenCalledTimes(1);
    expect(bestK(next)).toBe(bestK(inThread));
  });

  it('when neither the worker nor the in-thread code can be loaded (a new build), then reloading is offered', async () => {
    jest.doMock('./what-if-compute', () => {
      throw new TypeError('Failed to fetch dynamically imported module: /chunk-gone.js');
    });
    const confirm = jest.spyOn(window, 'confirm').mockReturnValue(false);
    try {
      const outcome = await firstValueFrom(run(runnerWith(() => null)));
      expect(confirm).toHaveBeenCalledTimes(1);
      expect(confirm.mock.calls[0][0]).toContain(APP_UPDATED_TEXT);
      expect(outcome.result).toBeNull();
      expect(outcome.error).toBe(APP_UPDATED_TEXT);
    } finally {
      confirm.mockRestore();
      jest.dontMock('./what-if-compute');
    }
  });

  it('when the platform has no Worker, then the same analysis runs in this thread', async () => {
    const outcome = await firstValueFrom(run(runnerWith(() => null)));
    const inThread = runWhatIf(analysis.readings, analysis.samples, analysis.settings, edits);
    expect(bestK(outcome)).toBe(bestK(inThread));
  });

  it('when the analysis cannot run, then the answer carries the reason instead of throwing', () => {
    const response = answerWhatIf({
      id: 9,
      readings: analysis.readings,
      samples: analysis.samples,
      saved: analysis.settings,
      edits: { ...NO_EDITS, pathLengthCm: -1 },
    });
    expect(response.id).toBe(9);
    expect(response.outcome.result).toBeNull();
    expect(response.outcome.error).toMatch(/path/i);
  });
});
