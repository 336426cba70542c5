import { createAnalysedBatch } from '../../reports/__tests__/analysed-batch';
import { startTestApp, type TestApp } from '../../testing/test-app';

describe('changing a batch setting', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp();
  });
  afterAll(() => t.stop());

  it("when a batch is created without settings then it takes the instrument profile's path length and wavelength", async () => {
    const batch = await createAnalysedBatch(t, {
      name: 'Settings from the instrument',
      profile: { pathLengthCm: 0.8, defaultWavelengthNm: 640 },
    });
    const saved = (await (await t.agent('scientist')).get(`/api/batches/${batch.batchId}`)).body.settings;
    expect(saved).toMatchObject({
      pathLengthCm: 0.8,
      wavelengthNm: 640,
      candidates: ['1:1', '1:2', '2:1', '1:3'],
    });
  });

  it('when one setting changes then every other saved setting stays as it was', async () => {
    const batch = await createAnalysedBatch(t, {
      name: 'One change at a time',
      settings: { candidates: ['1:1', '1:2'], r2Min: 0.99, wavelengthNm: 640, epsilonLPerMolCm: 1250 },
    });
    const scientist = await t.agent('scientist');
    const excluded = await scientist.put(`/api/batches/${batch.batchId}/settings`).send({
      settings: { exclusions: [{ position: 'C20', reason: 'cracked cuvette' }] },
      reason: 'C20 cracked',
    });
    expect(excluded.status).toBe(200);
    const changed = await scientist
      .put(`/api/batches/${batch.batchId}/settings`)
      .send({ settings: { pathLengthCm: 0.5 }, reason: 'Half-centimetre cells' });
    expect(changed.status).toBe(200);
    expect(changed.body.settings).toEqual({
      wavelengthNm: 640,
      pathLengthCm: 0.5,
      candidates: ['1:1', '1:2'],
      calibrationModel: 'linear',
      linearRangeMaxAbsorbance: 1,
      r2Min: 0.99,
      replicateCvMax: 0.05,
      kCvMax: 0.15,
      epsilonLPerMolCm: 1250,
      epsilonSource: null,
      monteCarloDraws: 0,
      exclusions: [{ position: 'C20', reason: 'cracked cuvette' }],
      fitBaseline: false,
      concentrationUnit: 'mol/L',
      molarMassGPerMol: null,
      recoveryLimitsPct: [90, 110],
    });
  });
});
