import fs from 'node:fs';
import path from 'node:path';
import { pathLengthFromFillVolume } from '../analysis';
import type { Actor } from '../audit/audit.service';
import type { EquilightApp } from '../app';
import { parseManifestCsv } from '../parsers';

/** samples/demo of the repository, from server/src/seed or server/dist/seed alike. */
export const DEMO_SAMPLES_DIR = path.resolve(__dirname, '../../../samples/demo');

const SYSTEM = 'Metal–ligand complex (demo)';
const SPECTRA_SYSTEM = 'Dye–receptor binding (demo)';

async function layoutFromManifest(
  services: EquilightApp['services'],
  name: string,
  file: string,
  format: '96' | 'cuvette',
  actor: Actor,
) {
  const content = fs.readFileSync(path.join(DEMO_SAMPLES_DIR, file));
  const { samples } = await parseManifestCsv(content, path.basename(file));
  const layout = await services.layouts.create(
    {
      name,
      format,
      cuvetteCount: format === 'cuvette' ? samples.length : null,
      positions: samples.map((s) => ({
        position: s.position,
        role: s.role,
        ...(s.replicateGroup ? { replicateGroup: s.replicateGroup } : {}),
      })),
    },
    actor,
  );
  const manifest = await services.manifests.create(
    `${name} samples`,
    { layoutId: layout.id, file: { buffer: content, originalName: path.basename(file) } },
    false,
    actor,
  );
  return { layout, manifest };
}

async function waitUntilSettled(services: EquilightApp['services'], id: number): Promise<void> {
  const deadline = Date.now() + 30_000;
  while (Date.now() < deadline) {
    const file = await services.ingest.getDto(id);
    if (!['queued', 'parsing'].includes(file.status)) return;
    await new Promise((r) => setTimeout(r, 50));
  }
}

/**
 * The invented demo scenario: an iron-in-water plate batch and a complex measured at 15, 25 and 35 °C.
 * 15 and 35 °C arrive complete and approved; 25 °C and the water plate wait for the demo instrument, as
 * does a scanning-spectrophotometer run SP-7 (spectra of a dye–receptor series, JCAMP-DX) whose
 * whole-spectrum K the batch analysis gives as the spectra arrive.
 * Seeds only into a database without layouts; needs the demo people and instrument profiles.
 */
export async function seedDemoScenario(equilight: EquilightApp): Promise<boolean> {
  const { services } = equilight;
  if ((await services.layouts.list()).length > 0) return false;
  const people = await services.users.list();
  const person = (role: string): Actor | null => {
    const u = people.find((p) => p.role === role && p.active);
    return u ? { id: u.id, email: u.email } : null;
  };
  const manager = person('lab_manager');
  // Three people for the three steps, so the approved batches keep the four-eyes rule too.
  const creator = person('admin') ?? manager;
  const reviewer = person('scientist') ?? manager;
  const profiles = await services.instruments.list();
  const plateReader = profiles.find((p) => p.dropSubfolder === 'plate-reader-1');
  const cuvette = profiles.find((p) => p.dropSubfolder === 'cuvette-1');
  const scanner = profiles.find((p) => p.dropSubfolder === 'scanner-1');
  if (!manager || !creator || !reviewer || !plateReader || !cuvette) return false;
  const actor: Actor = manager;

  const water = await layoutFromManifest(
    services,
    'Tap-water iron plate (demo)',
    'water/manifest.csv',
    '96',
    actor,
  );
  await services.batches.create(
    {
      name: 'Iron in tap water, run FE-101 (demo)',
      profileId: plateReader.id,
      layoutId: water.layout.id,
      manifestId: water.manifest.id,
      runId: 'FE-101',
      expectedFiles: 1,
      settings: {
        wavelengthNm: 510,
        pathLengthCm: Number(pathLengthFromFillVolume(200, 6.4).toFixed(4)),
        candidates: ['1:1'],
        // A water lab reports iron in mg/L: molar mass of Fe, 55.845 g/mol (IUPAC standard atomic weight).
        concentrationUnit: 'mg/L',
        molarMassGPerMol: 55.845,
      },
    },
    creator,
  );

  const complex = await layoutFromManifest(
    services,
    'Complex series, 30 cuvettes (demo)',
    'complex/manifest.csv',
    'cuvette',
    actor,
  );
  const profileEntity = await services.instruments.get(cuvette.id);
  for (const temperatureC of [15, 35, 25]) {
    const batch = await services.batches.create(
      {
        name: `${SYSTEM} at ${temperatureC} °C`,
        profileId: cuvette.id,
        layoutId: complex.layout.id,
        manifestId: complex.manifest.id,
        runId: `CX-${temperatureC}`,
        expectedFiles: temperatureC === 25 ? 3 : 1,
        systemName: SYSTEM,
        temperatureC,
        settings: { wavelengthNm: 640, pathLengthCm: 1, candidates: ['1:1', '1:2', '2:1', '1:3'] },
      },
      creator,
    );
    if (temperatureC === 25) continue; // filled live by the demo instrument
    const file = `complex/CX-${temperatureC}.csv`;
    const receipt = await services.ingest.receive({
      content: fs.readFileSync(path.join(DEMO_SAMPLES_DIR, file)),
      originalName: path.basename(file),
      profile: profileEntity,
      source: 'upload',
    });
    await waitUntilSettled(services, receipt.id);
    await services.batches.review(batch.id, reviewer);
    await services.batches.approve(batch.id, 'Demo: calibration and K checked.', manager);
  }

  if (scanner) {
    const spectra = await layoutFromManifest(
      services,
      'Dye–receptor series, 19 cuvettes (demo)',
      'spectra/manifest.csv',
      'cuvette',
      actor,
    );
    await services.batches.create(
      {
        name: `${SPECTRA_SYSTEM}, spectra 350–700 nm`,
        profileId: scanner.id,
        layoutId: spectra.layout.id,
        manifestId: spectra.manifest.id,
        runId: 'SP-7',
        expectedFiles: 2,
        systemName: SPECTRA_SYSTEM,
        // No temperature: one run is no van 't Hoff series (Temperatures lists the metal–ligand system).
        settings: { wavelengthNm: 496, pathLengthCm: 1, candidates: ['1:1', '1:2', '2:1'] },
      },
      creator,
    );
  }
  return true;
}
