import fs from 'node:fs';
import path from 'node:path';
import { startTestApp, type TestApp } from '../../testing/test-app';
import { seedDemoInstruments } from '../demo-instruments';
import { DEMO_SAMPLES_DIR, seedDemoScenario } from '../demo-scenario';

describe('demo scenario', () => {
  let t: TestApp;
  beforeAll(async () => {
    // The demo seed keeps the four-eyes rule: three people create, review and approve.
    t = await startTestApp({ FOUR_EYES_APPROVAL: 'true' });
    await seedDemoInstruments(t.services.instruments, { dataDir: t.dir, serverUrl: 'http://127.0.0.1:1' });
  });
  afterAll(() => t.stop());

  it('seeds layouts, manifests and batches once: two approved temperatures, two open batches waiting for the demo instrument', async () => {
    expect(await seedDemoScenario(t)).toBe(true);
    const batches = (await t.services.batches.list({ pageSize: 100 })).items;
    expect(batches.map((b) => [b.runId, b.state, b.fileCount]).sort()).toEqual([
      ['CX-15', 'approved', 1],
      ['CX-25', 'open', 0],
      ['CX-35', 'approved', 1],
      ['FE-101', 'open', 0],
      ['SP-7', 'open', 0],
    ]);
    const [system] = await t.services.temperatures.systems();
    expect(system.model).toBe('1:1');
    expect(system.vantHoff!.n).toBe(2);
    // invented with ΔH° = −18 kJ/mol; two noisy temperatures give it back roughly
    expect(system.vantHoff!.deltaHJPerMol / 1000).toBeGreaterThan(-30);
    expect(system.vantHoff!.deltaHJPerMol / 1000).toBeLessThan(-8);
    expect(await seedDemoScenario(t)).toBe(false);
    // Not a speed check: two approvals with their records on a shared machine.
  }, 120_000);

  it('fills the scanning run SP-7 from its two JCAMP-DX exports, and its analysis gives the whole-spectrum K', async () => {
    const scanner = (await t.services.instruments.list()).find((p) => p.dropSubfolder === 'scanner-1')!;
    expect(scanner.fileFormat).toBe('jcamp_dx');
    const profile = await t.services.instruments.get(scanner.id);
    for (const part of ['SP-7-part1.jdx', 'SP-7-part2.jdx']) {
      const receipt = await t.services.ingest.receive({
        content: fs.readFileSync(path.join(DEMO_SAMPLES_DIR, 'exports', 'scanner-1', part)),
        originalName: part,
        profile,
        source: 'upload',
      });
      const deadline = Date.now() + 30_000;
      while (['queued', 'parsing'].includes((await t.services.ingest.getDto(receipt.id)).status)) {
        if (Date.now() > deadline) throw new Error(`${part} not settled`);
        await new Promise((r) => setTimeout(r, 50));
      }
      expect((await t.services.ingest.getDto(receipt.id)).status).toBe('stored');
    }
    const batch = (await t.services.batches.list({ q: 'SP-7' })).items.find((b) => b.runId === 'SP-7')!;
    expect(batch.fileCount).toBe(2);
    const analysis = await t.services.batches.analysis(batch.id);
    expect(analysis.spectralError).toBeNull();
    expect(analysis.spectral!.wavelengthsNm).toHaveLength(176);
    expect(analysis.spectral!.best).toBe('1:1');
    const fit = analysis.spectral!.candidates.find((c) => c.model === '1:1')!;
    // The demo spectra were invented with K = 2000 L/mol (scripts/make-spectral-samples.ts).
    expect(fit.kCi95![0]!).toBeLessThan(2000);
    expect(fit.kCi95![1]!).toBeGreaterThan(2000);
  }, 120_000);
});
