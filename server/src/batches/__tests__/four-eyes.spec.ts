import { loadConfig } from '../../config';
import { createAnalysedBatch } from '../../reports/__tests__/analysed-batch';
import { DEMO_EMAILS, startTestApp, type TestApp } from '../../testing/test-app';

describe('four-eyes approval setting', () => {
  it('when nothing is set then a new installation keeps the rule; FOUR_EYES_APPROVAL=false turns it off', () => {
    expect(loadConfig({}).fourEyesApproval).toBe(true);
    expect(loadConfig({ FOUR_EYES_APPROVAL: 'false' }).fourEyesApproval).toBe(false);
    expect(() => loadConfig({ FOUR_EYES_APPROVAL: 'sometimes' })).toThrow(/FOUR_EYES_APPROVAL/);
  });
});

describe('when four-eyes approval is on', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp({ FOUR_EYES_APPROVAL: 'true' });
  });
  afterAll(() => t.stop());

  it('then the lab manager who created the batch cannot approve it, and is told why; nothing changes', async () => {
    const batch = await createAnalysedBatch(t, { name: 'Four-eyes: created by the approver' });
    await batch.ingest();
    const scientist = await t.agent('scientist');
    const manager = await t.agent('lab_manager');
    await scientist.post(`/api/batches/${batch.batchId}/review`).expect(200);
    const refused = await manager
      .post(`/api/batches/${batch.batchId}/approve`)
      .send({ comment: 'Looks fine.' });
    expect(refused.status).toBe(403);
    expect(refused.body.error.code).toBe('four_eyes');
    expect(refused.body.error.message).toMatch(/^Four-eyes approval: .* you created it\./);
    const after = (await scientist.get(`/api/batches/${batch.batchId}`)).body;
    expect(after.state).toBe('reviewed');
    expect((await scientist.get(`/api/batches/${batch.batchId}/results`)).body).toEqual([]);
  });

  it('then the lab manager who marked it reviewed cannot approve it either', async () => {
    const batch = await createAnalysedBatch(t, {
      name: 'Four-eyes: reviewed by the approver',
      creator: 'admin',
    });
    await batch.ingest();
    const manager = await t.agent('lab_manager');
    await manager.post(`/api/batches/${batch.batchId}/review`).expect(200);
    const refused = await manager
      .post(`/api/batches/${batch.batchId}/approve`)
      .send({ comment: 'Looks fine.' });
    expect(refused.status).toBe(403);
    expect(refused.body.error.message).toMatch(/you marked it reviewed\./);
  });

  it('then three people create, review and approve, and the Audit shows who did each step', async () => {
    const batch = await createAnalysedBatch(t, { name: 'Four-eyes: three people', creator: 'admin' });
    await batch.ingest();
    const scientist = await t.agent('scientist');
    const manager = await t.agent('lab_manager');
    await scientist.post(`/api/batches/${batch.batchId}/review`).expect(200);
    const approved = await manager
      .post(`/api/batches/${batch.batchId}/approve`)
      .send({ comment: 'Checked by a second person.' });
    expect(approved.status).toBe(200);
    expect(approved.body.state).toBe('approved');
    const audit = await manager.get(`/api/audit?entity=batch&entityId=${batch.batchId}`);
    const steps = (audit.body.items as { action: string; actorName: string }[])
      .filter((e) => ['create', 'review', 'approve'].includes(e.action))
      .map((e) => [e.action, e.actorName])
      .reverse();
    expect(steps).toEqual([
      ['create', DEMO_EMAILS.admin],
      ['review', DEMO_EMAILS.scientist],
      ['approve', DEMO_EMAILS.lab_manager],
    ]);
  });
});

describe('when four-eyes approval is off (the demo)', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp({ FOUR_EYES_APPROVAL: 'false' });
  });
  afterAll(() => t.stop());

  it('then the lab manager who created and reviewed a batch may approve it', async () => {
    const batch = await createAnalysedBatch(t, { name: 'One person, demo rules' });
    await batch.ingest();
    const manager = await t.agent('lab_manager');
    await manager.post(`/api/batches/${batch.batchId}/review`).expect(200);
    const approved = await manager.post(`/api/batches/${batch.batchId}/approve`).send({ comment: 'Demo.' });
    expect(approved.status).toBe(200);
    expect(approved.body.state).toBe('approved');
  });
});
