import { createHash } from 'node:crypto';
import type TestAgent from 'supertest/lib/agent';
import { analyzeBatch } from '../../analysis';
import type { AnalysisEngine } from '../../analysis-engine/analysis-engine';
import { readEngineVersion } from '../../analysis-engine/engine-version';
import { type EquilightApp, createApp } from '../../app';
import type { TemperaturePointsPage } from '../../contracts/temperatures';
import { extractPdfText } from '../../testing/pdf-text';
import { type AnalysedBatch, createAnalysedBatch } from '../../reports/__tests__/analysed-batch';
import { signedInAgent, startTestApp, type TestApp } from '../../testing/test-app';

/**
 * A later engine, simulated: the same analysis module with one default changed (a baseline term in the
 * global fit, off by default today) and a version of its own.
 */
const LATER_ENGINE: AnalysisEngine = {
  version: {
    packageVersion: '9.9.9',
    sourceSha256: 'f'.repeat(64),
    hashedFrom: 'source',
    label: '9.9.9+ffffffffffff',
  },
  // A later engine that fits a constant baseline whatever the settings say: another K on the same inputs.
  analyze: (readings, samples, settings) =>
    analyzeBatch(readings, samples, { ...settings, fitBaseline: true }),
};

/** The PDF's text without the line that says when it was generated. */
function pdfText(body: Buffer): string {
  return extractPdfText(body)
    .replace(/generated \d{4}-\d\d-\d\dT\d\d:\d\dZ/g, 'generated …')
    .replace(/\s+/g, ' ');
}

async function download(agent: TestAgent, url: string): Promise<Buffer> {
  const res = await agent
    .get(url)
    .buffer(true)
    .parse((r, done) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => done(null, Buffer.concat(chunks)));
    });
  expect(res.status).toBe(200);
  return res.body as Buffer;
}

describe('approved means frozen: the approval record', () => {
  let t: TestApp;
  let batch: AnalysedBatch;
  let fileBytes: Buffer;
  let later: EquilightApp;

  beforeAll(async () => {
    t = await startTestApp();
    batch = await createAnalysedBatch(t, { name: 'Ferric complex, approval record check' });
    fileBytes = await batch.ingest();
    // The same database, served by a server whose analysis has changed since the approval.
    later = createApp({ config: t.config, dataSource: t.dataSource, engine: LATER_ENGINE, log: () => {} });
  }, 60_000);
  afterAll(async () => {
    await later.close();
    await t.stop();
  });

  it('when a batch is approved then its record holds the full result, the settings, the engine version and every file SHA-256', async () => {
    const scientist = await t.agent('scientist');
    const manager = await t.agent('lab_manager');
    const before = (await scientist.get(`/api/batches/${batch.batchId}/analysis`)).body;
    expect(before.record).toBeNull();
    expect((await scientist.post(`/api/batches/${batch.batchId}/review`)).status).toBe(200);
    const approved = await manager
      .post(`/api/batches/${batch.batchId}/approve`)
      .send({ comment: 'Calibration and fit checked.' });
    expect(approved.status).toBe(200);

    const list = await scientist.get(`/api/batches/${batch.batchId}/results`);
    expect(list.status).toBe(200);
    expect(list.body).toHaveLength(1);
    const [summary] = list.body;
    const record = (await scientist.get(`/api/batches/${batch.batchId}/results/${summary.id}`)).body;
    expect(record.schemaVersion).toBe(1);
    expect(record.engine.version).toBe(readEngineVersion().label);
    expect(record.engine.sourceSha256).toMatch(/^[0-9a-f]{64}$/);
    expect(record.approvedBy).toBe(approved.body.approvedBy);
    expect(record.approvalComment).toBe('Calibration and fit checked.');
    expect(record.settings).toEqual(before.batch.settings);
    expect(record.analysisSettings).toEqual(before.settings);
    expect(record.result).toEqual(before.result);
    // SHA-256 of the bytes sent, computed here with Node's own crypto (an implementation outside the app)
    expect(record.files.map((f: { sha256: string }) => f.sha256)).toEqual([
      createHash('sha256').update(fileBytes).digest('hex'),
    ]);
    expect(record.supersededAt).toBeNull();

    // The audit entry of the approval is as before: one, with the comment as its reason.
    const audit = await manager.get(`/api/audit?entity=batch&entityId=${batch.batchId}&action=approve`);
    expect(audit.body.items).toHaveLength(1);
    expect(audit.body.items[0].reason).toBe('Calibration and fit checked.');
  });

  it('when the engine changes after approval then K, the list, CSV, PDF and Temperatures do not move, and a note says what today gives', async () => {
    const nowAgent = await t.agent('scientist');
    const laterAgent = await signedInAgent(later.app, 'scientist');
    const id = batch.batchId;
    const signed = (await nowAgent.get(`/api/batches/${id}/analysis`)).body;
    expect(signed.record).not.toBeNull();

    const after = (await laterAgent.get(`/api/batches/${id}/analysis?engineCheck=true`)).body;
    expect(after.result).toEqual(signed.result);
    expect(after.record.id).toBe(signed.record.id);
    expect(after.record.engine.version).toBe(readEngineVersion().label);
    const check = after.engineCheck;
    expect(check.engineVersion).toBe('9.9.9+ffffffffffff');
    expect(check.sameEngine).toBe(false);
    expect(check.error).toBeNull();
    expect(check.inputsMatch).toBe(true);
    // The simulated engine really does compute another K: otherwise this test could not fail.
    expect(check.differs).toBe(true);
    expect(check.current.k).not.toBeCloseTo(signed.record.summary.k, 6);

    // Without asking, no recomputation is sent; with today's engine, no difference is found.
    expect((await laterAgent.get(`/api/batches/${id}/analysis`)).body.engineCheck).toBeUndefined();
    const same = (await nowAgent.get(`/api/batches/${id}/analysis?engineCheck=true`)).body.engineCheck;
    expect(same).toMatchObject({ sameEngine: true, differs: false });

    const listed = (await laterAgent.get('/api/batches')).body.items.find((b: { id: number }) => b.id === id);
    expect(listed.summary).toEqual(signed.record.summary);

    for (const content of ['results', 'readings']) {
      const url = `/api/batches/${id}/export.csv?content=${content}`;
      expect((await download(laterAgent, url)).toString('utf8')).toBe(
        (await download(nowAgent, url)).toString('utf8'),
      );
    }
    const pdfNow = pdfText(await download(nowAgent, `/api/batches/${id}/report.pdf`));
    const pdfLater = pdfText(await download(laterAgent, `/api/batches/${id}/report.pdf`));
    expect(pdfLater).toBe(pdfNow);
    expect(pdfLater).toContain(`record ${signed.record.id}, approved by`);
    expect(pdfLater).toContain(readEngineVersion().label);

    const pointOf = async (agent: TestAgent) => {
      const systems = (await agent.get('/api/temperatures')).body as { systemName: string }[];
      for (const { systemName } of systems) {
        const res = await agent.get('/api/temperatures/points').query({ system: systemName, pageSize: 200 });
        const found = (res.body as TemperaturePointsPage).items.find((p) => p.batchId === id);
        if (found) return found;
      }
      return undefined;
    };
    expect((await pointOf(laterAgent))?.k).toBe(signed.record.summary.k);
    expect((await pointOf(nowAgent))?.k).toBe(signed.record.summary.k);
  }, 30_000);

  it('when the batch is reopened then its record stays in the history; a new approval stores a new one', async () => {
    const manager = await signedInAgent(later.app, 'lab_manager');
    const scientist = await signedInAgent(later.app, 'scientist');
    const id = batch.batchId;
    const first = (await scientist.get(`/api/batches/${id}/results`)).body[0];

    expect(
      (await manager.post(`/api/batches/${id}/reopen`).send({ reason: 'Re-analyse with the new engine' }))
        .status,
    ).toBe(200);
    const reopened = (await scientist.get(`/api/batches/${id}/analysis`)).body;
    expect(reopened.record).toBeNull();
    // Open again: the batch is analysed live, now by the later engine.
    expect(reopened.result).not.toEqual(first.result);
    const history = (await scientist.get(`/api/batches/${id}/results`)).body;
    expect(history).toHaveLength(1);
    expect(history[0]).toMatchObject({
      id: first.id,
      supersededReason: 'Re-analyse with the new engine',
      approvedAt: first.approvedAt,
      summary: first.summary,
    });
    expect(history[0].supersededAt).toEqual(expect.any(String));

    await scientist.post(`/api/batches/${id}/review`).expect(200);
    await manager.post(`/api/batches/${id}/approve`).send({ comment: 'Approved again.' }).expect(200);
    const records = (await scientist.get(`/api/batches/${id}/results`)).body;
    expect(records.map((r: { id: number }) => r.id)).toEqual([expect.any(Number), first.id]);
    expect(records[0].engine.version).toBe('9.9.9+ffffffffffff');
    expect(records[0].supersededAt).toBeNull();
    expect(records[0].summary.k).toBe(reopened.batch.summary.k);
    const now = (await scientist.get(`/api/batches/${id}/analysis`)).body;
    expect(now.record.id).toBe(records[0].id);

    const audit = await manager.get(`/api/audit?entity=batch&entityId=${id}&pageSize=50`);
    expect(
      audit.body.items.map((e: { action: string }) => e.action).filter((a: string) => a !== 'settings'),
    ).toEqual(['approve', 'review', 'reopen', 'approve', 'review', 'create']);
  });

  it('when a record is asked for that the batch does not have then 404; signed out then 401', async () => {
    const scientist = await t.agent('scientist');
    expect((await scientist.get(`/api/batches/${batch.batchId}/results/999999`)).status).toBe(404);
    expect((await scientist.get(`/api/batches/999999/results`)).status).toBe(404);
    expect((await scientist.get(`/api/batches/${batch.batchId}/analysis?engineCheck=maybe`)).status).toBe(
      400,
    );
    expect((await (await t.agent()).get(`/api/batches/${batch.batchId}/results`)).status).toBe(401);
  });
});
