import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';

/** Which analysis code produced a result: the product version and a content hash of the analysis module. */
export interface EngineVersion {
  /** `version` of the root package.json. */
  packageVersion: string;
  /** SHA-256 (hex) over the analysis module's files, sorted by name (see `hashSourceFiles`). */
  sourceSha256: string;
  /** Which files were hashed: the TypeScript sources, or the compiled JavaScript when no source is at hand. */
  hashedFrom: 'source' | 'compiled';
  /** `0.1.0+3f9a0c1e2b4d`: the package version and the first 12 hex digits of the hash. */
  label: string;
}

const ROOT_CANDIDATES = (here: string) => [
  // server/src/analysis-engine → server/src/analysis
  { dir: path.resolve(here, '../analysis'), ext: '.ts', hashedFrom: 'source' as const },
  // server/dist/analysis-engine → server/src/analysis (a checkout that was built)
  { dir: path.resolve(here, '../../src/analysis'), ext: '.ts', hashedFrom: 'source' as const },
  // server/dist/analysis-engine → server/dist/analysis (a deployment without sources)
  { dir: path.resolve(here, '../analysis'), ext: '.js', hashedFrom: 'compiled' as const },
];

/** The module's own files in one folder: tests and type declarations left out, sorted by name. */
export function moduleFiles(dir: string, ext: '.ts' | '.js'): string[] {
  if (!fs.existsSync(dir)) return [];
  return fs
    .readdirSync(dir, { withFileTypes: true })
    .filter((e) => e.isFile() && e.name.endsWith(ext) && !e.name.endsWith('.d.ts'))
    .filter((e) => !/\.(spec|test)\.[jt]s$/.test(e.name))
    .map((e) => e.name)
    .sort();
}

/**
 * One SHA-256 over named files: for each file in name order, the line `<name> <sha256 of its bytes>\n`.
 * A renamed, added, removed or edited file changes it; the folder it lies in does not.
 */
export function hashSourceFiles(files: readonly { name: string; content: Buffer | string }[]): string {
  const all = createHash('sha256');
  for (const f of [...files].sort((a, b) => (a.name < b.name ? -1 : a.name > b.name ? 1 : 0))) {
    all.update(`${f.name} ${createHash('sha256').update(f.content).digest('hex')}\n`);
  }
  return all.digest('hex');
}

export function engineLabel(packageVersion: string, sourceSha256: string): string {
  return `${packageVersion}+${sourceSha256.slice(0, 12)}`;
}

/** Read the version of the analysis code this process runs. Done once at start (a few ms). */
export function readEngineVersion(here: string = __dirname): EngineVersion {
  const pkgFile = path.resolve(here, '../../../package.json');
  const packageVersion = fs.existsSync(pkgFile)
    ? String((JSON.parse(fs.readFileSync(pkgFile, 'utf8')) as { version?: unknown }).version ?? '0.0.0')
    : '0.0.0';
  for (const candidate of ROOT_CANDIDATES(here)) {
    const names = moduleFiles(candidate.dir, candidate.ext as '.ts' | '.js');
    if (!names.length) continue;
    const sourceSha256 = hashSourceFiles(
      names.map((name) => ({ name, content: fs.readFileSync(path.join(candidate.dir, name)) })),
    );
    return {
      packageVersion,
      sourceSha256,
      hashedFrom: candidate.hashedFrom,
      label: engineLabel(packageVersion, sourceSha256),
    };
  }
  throw new Error(`The analysis module was not found next to ${here}; cannot tell the engine version.`);
}
