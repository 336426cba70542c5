import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';

const ROOT = resolve(__dirname, '../../../..');
const TSX = resolve(ROOT, 'node_modules/.bin/tsx');
const SAMPLES = resolve(ROOT, 'samples/analysis');

function run(args: string[]): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(TSX, ['--tsconfig', 'server/tsconfig.json', 'scripts/analyze.ts', ...args], {
    cwd: ROOT,
    encoding: 'utf8',
    timeout: 60_000,
  });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe('npm run analyze (CLI)', () => {
  jest.setTimeout(90_000);

  it('prints one JSON object with the documented shape for the invented demo files', () => {
    const r = run([
      '--readings',
      join(SAMPLES, 'readings.csv'),
      '--manifest',
      join(SAMPLES, 'manifest.csv'),
      '--wavelength',
      '640',
      '--path-cm',
      '1',
      '--json',
    ]);
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(Object.keys(out.calibration).sort()).toEqual(
      ['epsilon', 'intercept', 'interceptSE', 'loq', 'lod', 'n', 'r2', 'slope', 'slopeSE'].sort(),
    );
    expect(out.calibration.n).toBe(7);
    expect(out.unknowns).toHaveLength(3);
    expect(Object.keys(out.unknowns[0])).toEqual(
      expect.arrayContaining(['sample_id', 'concentration_M', 'se_M']),
    );
    expect(out.mixtures).toHaveLength(15);
    expect(Object.keys(out.mixtures[0])).toEqual(['sample_id', 'a0_M', 'b0_M', 'product_M']);
    const first = out.stoichiometry[0];
    expect(first.model).toBe('1:1');
    for (const k of ['K_mean', 'K_sd', 'K_cv', 'aic', 'fitK', 'fitK_ci95', 'fitEpsilon'])
      expect(first).toHaveProperty(k);
    expect(first.fitK_ci95).toHaveLength(2);
    expect(out.best).toBe('1:1');
    expect(Array.isArray(out.warnings)).toBe(true);
    // The demo was generated with K = 850 L/mol (invented): the 95 % interval must contain it.
    expect(first.fitK_ci95[0]).toBeLessThan(850);
    expect(first.fitK_ci95[1]).toBeGreaterThan(850);
  });

  it('prints a human summary without --json', () => {
    const r = run(['--readings', join(SAMPLES, 'readings.csv'), '--manifest', join(SAMPLES, 'manifest.csv')]);
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/Verdict: 1:1 fits best/);
  });

  it('exits with code 2 and one line naming file, row and column for a bad readings file', () => {
    const dir = mkdtempSync(join(tmpdir(), 'analyze-'));
    const bad = join(dir, 'bad-readings.csv');
    writeFileSync(bad, 'position,wavelength_nm,absorbance\nC1,640,0.123\nC2,640,abc\n');
    const r = run(['--readings', bad, '--manifest', join(SAMPLES, 'manifest.csv'), '--json']);
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    const lines = r.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/bad-readings\.csv/);
    expect(lines[0]).toMatch(/line 3/);
    expect(lines[0]).toMatch(/absorbance/);
  });

  it('exits with code 2 for a manifest with a bad cell, naming row and column', () => {
    const dir = mkdtempSync(join(tmpdir(), 'analyze-'));
    const bad = join(dir, 'bad-manifest.csv');
    writeFileSync(bad, 'position,sample_id,role,concentration_M\nC1,B,blank,\nC2,S1,standard,lots\n');
    const r = run(['--readings', join(SAMPLES, 'readings.csv'), '--manifest', bad]);
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/bad-manifest\.csv row 3, column "concentration_M"/);
  });

  it('exits with code 2 for a missing file', () => {
    const r = run(['--readings', join(SAMPLES, 'nope.csv'), '--manifest', join(SAMPLES, 'manifest.csv')]);
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/nope\.csv: cannot be read/);
  });
});
