import { createAnalysedBatch, type AnalysedBatch } from '../../reports/__tests__/analysed-batch';
import { extractPdfText } from '../../testing/pdf-text';
import { startTestApp, type TestApp } from '../../testing/test-app';

const SYSTEM = 'Ferric thiocyanate (invented demo)';
/** The same readings as if the instrument had been set `nm` nanometres higher. */
const shifted = (nm: number) => (csv: string) => csv.replace(/,640,/g, `,${640 + nm},`);

describe('ε from another batch', () => {
  let t: TestApp;
  let target: AnalysedBatch;
  let approved: AnalysedBatch;
  let near: AnalysedBatch;
  let far: AnalysedBatch;
  let otherSystem: AnalysedBatch;
  let empty: AnalysedBatch;

  beforeAll(async () => {
    t = await startTestApp();
    target = await createAnalysedBatch(t, { name: 'ε target, 640 nm', systemName: SYSTEM });
    approved = await createAnalysedBatch(t, { name: 'ε lender, approved, 640 nm', systemName: SYSTEM });
    near = await createAnalysedBatch(t, { name: 'ε lender, open, 641 nm', systemName: SYSTEM });
    far = await createAnalysedBatch(t, { name: 'same system, 645 nm', systemName: SYSTEM });
    otherSystem = await createAnalysedBatch(t, {
      name: 'other system, 640 nm',
      systemName: 'Another complex',
    });
    empty = await createAnalysedBatch(t, { name: 'same system, no files yet', systemName: SYSTEM });
    await target.ingest();
    await approved.ingest();
    await near.ingest(0, shifted(1));
    await far.ingest(0, shifted(5));
    await otherSystem.ingest();
    const manager = await t.agent('lab_manager');
    await manager.post(`/api/batches/${approved.batchId}/review`).expect(200);
    await manager
      .post(`/api/batches/${approved.batchId}/approve`)
      .send({ comment: 'Lends its ε.' })
      .expect(200);
  }, 90_000);
  afterAll(() => t.stop());

  it('when the candidates are listed then only the same system within ±1 nm with a calibration is offered, the approved one from its record', async () => {
    const scientist = await t.agent('scientist');
    const res = await scientist.get(`/api/batches/${target.batchId}/epsilon-sources`);
    expect(res.status).toBe(200);
    const offered = res.body as {
      batchId: number;
      recordId: number | null;
      wavelengthNm: number;
      epsilonLPerMolCm: number;
    }[];
    expect(offered.map((c) => c.batchId).sort((a, b) => a - b)).toEqual(
      [approved.batchId, near.batchId].sort((a, b) => a - b),
    );
    const fromApproved = offered.find((c) => c.batchId === approved.batchId)!;
    const record = (await scientist.get(`/api/batches/${approved.batchId}/results`)).body[0];
    expect(fromApproved.recordId).toBe(record.id);
    const full = (await scientist.get(`/api/batches/${approved.batchId}/results/${record.id}`)).body;
    expect(fromApproved.epsilonLPerMolCm).toBe(full.result.calibration.epsilonLPerMolCm);
    expect(fromApproved.wavelengthNm).toBe(640);
    const fromNear = offered.find((c) => c.batchId === near.batchId)!;
    expect(fromNear).toMatchObject({ recordId: null, wavelengthNm: 641 });
    // A batch outside the system lists none of these.
    const others = (await scientist.get(`/api/batches/${otherSystem.batchId}/epsilon-sources`)).body;
    expect(others).toEqual([]);
  });

  it('when ε is taken from the approved batch then the settings say which batch and record, and the PDF says so', async () => {
    const scientist = await t.agent('scientist');
    const record = (await scientist.get(`/api/batches/${approved.batchId}/results`)).body[0];
    const saved = await scientist
      .put(`/api/batches/${target.batchId}/settings`)
      .send({ settings: { epsilonFromBatchId: approved.batchId }, reason: 'Use the approved calibration' });
    expect(saved.status).toBe(200);
    const source = saved.body.settings.epsilonSource;
    expect(source).toMatchObject({
      batchId: approved.batchId,
      batchName: 'ε lender, approved, 640 nm',
      recordId: record.id,
      wavelengthNm: 640,
    });
    expect(saved.body.settings.epsilonLPerMolCm).toBe(source.epsilonLPerMolCm);
    const analysis = (await scientist.get(`/api/batches/${target.batchId}/analysis`)).body;
    expect(analysis.settings.epsilonLPerMolCm).toBe(source.epsilonLPerMolCm);

    const pdf = await scientist
      .get(`/api/batches/${target.batchId}/report.pdf`)
      .buffer(true)
      .parse((r, done) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => done(null, Buffer.concat(chunks)));
      });
    const text = extractPdfText(pdf.body as Buffer).replace(/\s+/g, ' ');
    expect(text).toContain(
      `from batch "ε lender, approved, 640 nm" (id ${approved.batchId}), approval record ${record.id}`,
    );

    // A typed value replaces the source; back to own standards clears both.
    const typed = await scientist
      .put(`/api/batches/${target.batchId}/settings`)
      .send({ settings: { epsilonLPerMolCm: 1234 }, reason: 'Typed from the lab book' });
    expect(typed.body.settings).toMatchObject({ epsilonLPerMolCm: 1234, epsilonSource: null });
    const own = await scientist
      .put(`/api/batches/${target.batchId}/settings`)
      .send({ settings: { epsilonLPerMolCm: null }, reason: 'Own standards again' });
    expect(own.body.settings).toMatchObject({ epsilonLPerMolCm: null, epsilonSource: null });
  }, 30_000);

  it('when the batch named is another system, another wavelength, without files, itself or missing then 400 says why and nothing changes', async () => {
    const scientist = await t.agent('scientist');
    const before = (await scientist.get(`/api/batches/${target.batchId}`)).body.settings;
    const tryFrom = (id: number) =>
      scientist
        .put(`/api/batches/${target.batchId}/settings`)
        .send({ settings: { epsilonFromBatchId: id }, reason: 'Try another calibration' });
    const cases: [number, RegExp][] = [
      [otherSystem.batchId, /not a calibration of the same chemical system/],
      [far.batchId, /no calibration at this batch's wavelength \(±1 nm\)/],
      [empty.batchId, /no calibration at this batch's wavelength/],
      [target.batchId, /choose another batch, not this one/],
      [999999, /no batch with id 999999/],
    ];
    for (const [id, message] of cases) {
      const res = await tryFrom(id);
      expect(res.status).toBe(400);
      expect(res.body.error.message).toMatch(message);
    }
    const both = await scientist.put(`/api/batches/${target.batchId}/settings`).send({
      settings: { epsilonFromBatchId: approved.batchId, epsilonLPerMolCm: 1000 },
      reason: 'Both at once',
    });
    expect(both.status).toBe(400);
    expect(both.body.error.message).toMatch(/not both/);
    // The source is for the server to fill in; a client cannot write one.
    const forged = await scientist.put(`/api/batches/${target.batchId}/settings`).send({
      settings: {
        epsilonSource: {
          batchId: 1,
          batchName: 'x',
          recordId: 1,
          wavelengthNm: 640,
          epsilonLPerMolCm: 1,
          takenAt: '',
        },
      },
      reason: 'forged source',
    });
    expect(forged.status).toBe(400);
    expect((await scientist.get(`/api/batches/${target.batchId}`)).body.settings).toEqual(before);
  });
});
