import { InstrumentPresence } from '../../watchers/watcher-credential.entity';
import request from 'supertest';
import { InstrumentProfile } from '../../instruments/instrument-profile.entity';
import { createProfile, LONG_TABLE_PROFILE, settled } from '../../ingest/__tests__/ingest-helpers';
import { type AnalysedBatch, createAnalysedBatch } from '../../reports/__tests__/analysed-batch';
import { startTestApp, type TestApp, testQuery } from '../../testing/test-app';
import type { OverviewDto } from '../overview.dto';

describe('GET /api/overview', () => {
  let t: TestApp;
  /** Open, all files in, created by the lab manager. */
  let complete: AnalysedBatch;
  /** Open, one of two files in. */
  let partial: AnalysedBatch;
  /** Created by the admin, marked reviewed by the scientist: the lab manager may approve it. */
  let reviewed: AnalysedBatch;
  /** Created by the lab manager, reviewed by the scientist: four eyes keep the lab manager from approving. */
  let ownReviewed: AnalysedBatch;
  let approved: AnalysedBatch;
  let quarantinedId: number;
  let quietProfileId: number;

  beforeAll(async () => {
    t = await startTestApp({ FOUR_EYES_APPROVAL: 'true' });
    const scientist = await t.agent('scientist');
    const manager = await t.agent('lab_manager');
    complete = await createAnalysedBatch(t, { name: 'Overview: complete' });
    await complete.ingest();
    partial = await createAnalysedBatch(t, { name: 'Overview: partial', expectedFiles: 2, creator: 'admin' });
    await partial.ingest();
    reviewed = await createAnalysedBatch(t, { name: 'Overview: reviewed', creator: 'admin' });
    await reviewed.ingest();
    await scientist.post(`/api/batches/${reviewed.batchId}/review`).expect(200);
    ownReviewed = await createAnalysedBatch(t, { name: 'Overview: own, reviewed' });
    await ownReviewed.ingest();
    await scientist.post(`/api/batches/${ownReviewed.batchId}/review`).expect(200);
    approved = await createAnalysedBatch(t, { name: 'Overview: approved', creator: 'admin' });
    await approved.ingest();
    await scientist.post(`/api/batches/${approved.batchId}/review`).expect(200);
    await manager.post(`/api/batches/${approved.batchId}/approve`).send({ comment: 'Fine.' }).expect(200);
    // A file the parser cannot read: quarantined.
    const bad = await request(t.app)
      .post('/api/ingest')
      .set('Authorization', `Bearer ${complete.token}`)
      .attach('file', Buffer.from('this is not an export\n'), 'CX-999_broken.csv');
    quarantinedId = (await settled(t, bad.body.id)).id;
    // An instrument that never sent anything, and one switched off (never listed).
    const admin = await t.agent('admin');
    quietProfileId = (
      await createProfile(admin, { ...LONG_TABLE_PROFILE, name: 'Quiet reader', dropSubfolder: 'quiet' })
    ).profile.id;
    const off = await createProfile(admin, {
      ...LONG_TABLE_PROFILE,
      name: 'Retired reader',
      dropSubfolder: 'retired',
    });
    await t.dataSource.getRepository(InstrumentProfile).update({ id: off.profile.id }, { active: false });
  }, 60_000);
  afterAll(() => t.stop());

  async function overviewAs(role: 'admin' | 'lab_manager' | 'scientist'): Promise<OverviewDto> {
    const res = await (await t.agent(role)).get('/api/overview');
    expect(res.status).toBe(200);
    return res.body as OverviewDto;
  }
  const ids = (items: { id: number }[]) => items.map((i) => i.id).sort((a, b) => a - b);

  it('when signed out then it answers 401', async () => {
    const res = await (await t.agent()).get('/api/overview');
    expect(res.status).toBe(401);
    expect(res.body.error.code).toBeDefined();
  });

  it('when the since parameter is not a time then it answers 400 and says why', async () => {
    const res = await (await t.agent('scientist')).get('/api/overview?since=yesterday');
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/since/);
  });

  it('as a scientist then open batches show progress, and nothing of the intake or instruments', async () => {
    const o = await overviewAs('scientist');
    expect(o.role).toBe('scientist');
    expect(ids(o.openBatches.items)).toEqual(
      [complete, partial, reviewed, ownReviewed].map((b) => b.batchId).sort((a, b) => a - b),
    );
    expect(o.openBatches.items.map((b) => b.id)).not.toContain(approved.batchId);
    const p = o.openBatches.items.find((b) => b.id === partial.batchId)!;
    expect([p.storedFiles, p.expectedFiles]).toEqual([1, 2]);
    expect(p.readingCount).toBeGreaterThan(0);
    // Newest activity first.
    const times = o.openBatches.items.map((b) => b.lastActivityAt);
    expect([...times].sort().reverse()).toEqual(times);
    // Scientists mark complete open batches reviewed; they approve nothing.
    expect(o.awaitingMe.items.map((b) => [b.id, b.action])).toEqual([[complete.batchId, 'review']]);
    expect(o).not.toHaveProperty('quarantinedToday');
    expect(o).not.toHaveProperty('silentInstruments');
    expect(JSON.stringify(o)).not.toContain('CX-999_broken.csv');
  });

  it('as a lab manager then they may approve what someone else created and reviewed, and see quarantine and silence', async () => {
    const o = await overviewAs('lab_manager');
    expect(o.awaitingMe.fourEyes).toBe(true);
    expect(o.awaitingMe.items.map((b) => [b.id, b.action]).sort()).toEqual(
      [
        [complete.batchId, 'review'],
        [reviewed.batchId, 'approve'],
      ].sort(),
    );
    expect(o.awaitingMe.items.map((b) => b.id)).not.toContain(ownReviewed.batchId);
    expect(o.quarantinedToday?.count).toBe(1);
    expect(o.quarantinedToday?.latest[0]).toMatchObject({
      id: quarantinedId,
      originalName: 'CX-999_broken.csv',
    });
    expect(o.silentInstruments?.silentAfterHours).toBe(24);
    const silent = o.silentInstruments!.items.map((i) => i.name);
    expect(silent).toContain('Quiet reader');
    expect(silent).not.toContain('Retired reader');
    // Instruments that sent files a moment ago are not silent.
    expect(o.silentInstruments!.items.find((i) => i.id === quietProfileId)?.lastSeenAt).toBeNull();
    expect(o.silentInstruments!.items.map((i) => i.id)).not.toContain(complete.profileId);
  });

  it('as an admin then nothing awaits their review (admins neither review nor approve), the rest is there', async () => {
    const o = await overviewAs('admin');
    expect(o.awaitingMe).toEqual({ total: 0, items: [], fourEyes: true });
    expect(o.openBatches.total).toBe(4);
    expect(o.quarantinedToday?.count).toBe(1);
    expect(o.silentInstruments).toBeDefined();
  });

  it('when a watcher reports for an instrument that sent no file then it is not silent', async () => {
    const admin = await t.agent('admin');
    const heard = await createProfile(admin, {
      ...LONG_TABLE_PROFILE,
      name: 'Heard reader',
      dropSubfolder: 'heard',
    });
    await t.dataSource.getRepository(InstrumentPresence).save({
      profileId: heard.profile.id,
      watcherName: 'bench PC',
      watcherId: null,
      version: '1.0.0',
      hostname: null,
      lastSeenAt: new Date().toISOString(),
      silentNotifiedAt: null,
    });
    const o = await overviewAs('admin');
    const silent = o.silentInstruments!.items.map((i) => i.id);
    expect(silent).not.toContain(heard.profile.id);
    expect(silent).toContain(quietProfileId);
  });

  it('when today starts after the quarantine then none is counted', async () => {
    const later = new Date(Date.now() + 60_000).toISOString();
    const res = await (await t.agent('lab_manager')).get(`/api/overview?since=${encodeURIComponent(later)}`);
    expect(res.body.quarantinedToday).toEqual({ since: later, count: 0, latest: [] });
  });

  it('then QC counts are the stored summaries, and a batch whose headline is being worked out says so', async () => {
    await t.services.batches.summariesIdle();
    const listed = await (await t.agent('scientist')).get('/api/batches').expect(200);
    const summary = (
      listed.body.items as { id: number; summary: { qcFlagCount: number; qcErrorCount: number } }[]
    ).find((b) => b.id === complete.batchId)!.summary;
    const known = (await overviewAs('scientist')).openBatches.items.find((b) => b.id === complete.batchId)!;
    expect(known.qc).toEqual({
      state: 'known',
      flagCount: summary.qcFlagCount,
      errorCount: summary.qcErrorCount,
    });
    // A change the stored headline does not know yet (as a new setting or file makes it, before its analysis lands).
    await testQuery(t.dataSource, "UPDATE batch_summaries SET status = 'pending' WHERE batch_id = ?", [
      complete.batchId,
    ]);
    const pending = (await overviewAs('scientist')).openBatches.items.find((b) => b.id === complete.batchId)!;
    expect(pending.qc).toEqual({ state: 'not-analysed', flagCount: null, errorCount: null });
  });
});
