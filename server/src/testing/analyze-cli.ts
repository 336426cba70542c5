import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { buildSync } from 'esbuild';

const ROOT = resolve(__dirname, '../../..');
let bundled: string | undefined;

/**
 * The CLI (`npm run analyze`, scripts/analyze.ts) bundled once per test file: the same code tsx runs,
 * without compiling it again for every run.
 */
function analyzeCliBundle(): string {
  if (!bundled) {
    const outfile = join(mkdtempSync(join(tmpdir(), 'analyze-cli-')), 'analyze.cjs');
    buildSync({
      entryPoints: [join(ROOT, 'scripts/analyze.ts')],
      bundle: true,
      platform: 'node',
      format: 'cjs',
      target: 'node20',
      tsconfig: join(ROOT, 'server/tsconfig.json'),
      outfile,
      logLevel: 'silent',
    });
    bundled = outfile;
  }
  return bundled;
}

export interface CliRun {
  status: number | null;
  stdout: string;
  stderr: string;
}

/** Run the CLI as a real child process from the repository root. */
export function runAnalyzeCli(args: readonly string[], timeoutMs = 90_000): CliRun {
  const r = spawnSync(process.execPath, [analyzeCliBundle(), ...args], {
    cwd: ROOT,
    encoding: 'utf8',
    timeout: timeoutMs,
  });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** Run the CLI as `npm run analyze` does: tsx on the TypeScript source. */
export function runAnalyzeCliSource(args: readonly string[], timeoutMs = 90_000): CliRun {
  const r = spawnSync(
    resolve(ROOT, 'node_modules/.bin/tsx'),
    ['--tsconfig', 'server/tsconfig.json', 'scripts/analyze.ts', ...args],
    { cwd: ROOT, encoding: 'utf8', timeout: timeoutMs },
  );
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}
