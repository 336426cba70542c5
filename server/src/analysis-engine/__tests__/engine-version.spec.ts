import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { engineLabel, hashSourceFiles, moduleFiles, readEngineVersion } from '../engine-version';

const sha256 = (text: string) => createHash('sha256').update(text).digest('hex');

describe('analysis engine version', () => {
  it('hashes each file, then the sorted "name digest" lines (SHA-256 checked on the FIPS 180-2 "abc" example)', () => {
    // FIPS 180-2, appendix B.1: SHA-256("abc")
    const abc = 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad';
    expect(sha256('abc')).toBe(abc);
    expect(hashSourceFiles([{ name: 'a.ts', content: 'abc' }])).toBe(sha256(`a.ts ${abc}\n`));
    const two = [
      { name: 'b.ts', content: 'export const b = 2;\n' },
      { name: 'a.ts', content: 'abc' },
    ];
    expect(hashSourceFiles(two)).toBe(hashSourceFiles([...two].reverse()));
    expect(hashSourceFiles(two)).toBe(sha256(`a.ts ${abc}\nb.ts ${sha256('export const b = 2;\n')}\n`));
    expect(hashSourceFiles([{ name: 'a.ts', content: 'abd' }])).not.toBe(
      hashSourceFiles([{ name: 'a.ts', content: 'abc' }]),
    );
    expect(hashSourceFiles([{ name: 'c.ts', content: 'abc' }])).not.toBe(
      hashSourceFiles([{ name: 'a.ts', content: 'abc' }]),
    );
  });

  it('takes the module files only: no tests, no declarations, no other kinds, sorted by name', () => {
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-engine-'));
    try {
      for (const name of ['z.ts', 'a.ts', 'a.spec.ts', 'types.d.ts', 'notes.md', 'b.js'])
        fs.writeFileSync(path.join(dir, name), name);
      fs.mkdirSync(path.join(dir, '__tests__'));
      expect(moduleFiles(dir, '.ts')).toEqual(['a.ts', 'z.ts']);
      expect(moduleFiles(dir, '.js')).toEqual(['b.js']);
      expect(moduleFiles(path.join(dir, 'missing'), '.ts')).toEqual([]);
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });

  it('is the package version plus the hash of server/src/analysis as it is now', () => {
    const root = path.resolve(__dirname, '../../../..');
    const pkg = JSON.parse(fs.readFileSync(path.join(root, 'package.json'), 'utf8')) as { version: string };
    const dir = path.join(root, 'server/src/analysis');
    const files = fs
      .readdirSync(dir)
      .filter((n) => n.endsWith('.ts') && !n.endsWith('.spec.ts') && !n.endsWith('.d.ts'))
      .map((name) => ({ name, content: fs.readFileSync(path.join(dir, name)) }));
    const version = readEngineVersion(path.join(root, 'server/src/analysis-engine'));
    expect(version.packageVersion).toBe(pkg.version);
    expect(version.hashedFrom).toBe('source');
    expect(version.sourceSha256).toBe(hashSourceFiles(files));
    expect(version.label).toBe(engineLabel(pkg.version, version.sourceSha256));
    expect(version.label).toMatch(/^\d+\.\d+\.\d+\+[0-9a-f]{12}$/);
  });
});
