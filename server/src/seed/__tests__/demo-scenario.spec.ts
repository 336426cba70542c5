import { TemperaturesService } from '../../temperatures/temperatures.service';
import { startTestApp, type TestApp } from '../../testing/test-app';
import { seedDemoInstruments } from '../demo-instruments';
import { seedDemoScenario } from '../demo-scenario';

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
    const batches = await t.services.batches.list();
    expect(batches.map((b) => [b.runId, b.state, b.fileCount]).sort()).toEqual([
      ['CX-15', 'approved', 1],
      ['CX-25', 'open', 0],
      ['CX-35', 'approved', 1],
      ['FE-101', 'open', 0],
    ]);
    const [system] = await new TemperaturesService(t.services.batches).systems();
    expect(system.model).toBe('1:1');
    expect(system.vantHoff!.n).toBe(2);
    // invented with ΔH° = −18 kJ/mol; two noisy temperatures give it back roughly
    expect(system.vantHoff!.deltaHJPerMol / 1000).toBeGreaterThan(-30);
    expect(system.vantHoff!.deltaHJPerMol / 1000).toBeLessThan(-8);
    expect(await seedDemoScenario(t)).toBe(false);
  });
});
