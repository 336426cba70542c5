import { execFile } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { promisify } from 'node:util';
import { loadConfig } from '../../config';
import { startTestApp, type TestApp, testQuery, sqliteOnly } from '../../testing/test-app';
import { backupDatabase, integrityProblems, restoreDatabase } from '../backup';

const REPO_ROOT = path.resolve(__dirname, '../../../..');
const run = promisify(execFile);

async function emails(t: TestApp): Promise<string[]> {
  return (
    (await testQuery(t.dataSource, 'SELECT email FROM users ORDER BY email')) as { email: string }[]
  ).map((r) => r.email);
}

sqliteOnly('backup and restore of the database', () => {
  let dir: string;
  afterAll(() => {
    if (dir) fs.rmSync(dir, { recursive: true, force: true });
  });

  it('when backed up while running, changed, and restored after a stop then the data is as at the backup', async () => {
    let t = await startTestApp();
    dir = t.dir;
    await t.services.users.create({
      email: 'before.backup@lab.test',
      displayName: 'Before',
      role: 'scientist',
    });

    const backup = await backupDatabase(t.config);
    expect(path.dirname(backup)).toBe(path.join(dir, 'backups'));
    expect(path.basename(backup)).toMatch(/^equilight-\d{4}-\d\d-\d\dT\d\d-\d\d-\d\dZ\.sqlite$/);
    expect(integrityProblems(backup)).toEqual([]);

    await t.services.users.create({
      email: 'after.backup@lab.test',
      displayName: 'After',
      role: 'scientist',
    });
    await testQuery(t.dataSource, "DELETE FROM users WHERE email = 'before.backup@lab.test'");

    // While the server holds the database, a restore refuses and changes nothing.
    await expect(restoreDatabase(t.config, backup)).rejects.toThrow(/is in use .*Stop the server first/);
    expect(await emails(t)).toContain('after.backup@lab.test');

    await t.shutDown();
    const result = await restoreDatabase(t.config, backup);
    expect(result.previousCopy).toMatch(/backups[/\\]before-restore-.*\.sqlite$/);

    t = await startTestApp({}, dir);
    try {
      const now = await emails(t);
      expect(now).toContain('before.backup@lab.test');
      expect(now).not.toContain('after.backup@lab.test');
    } finally {
      await t.shutDown();
    }
    // Nothing is lost: the replaced database is kept, with the later change in it.
    expect(integrityProblems(result.previousCopy!)).toEqual([]);
    const kept = await startTestApp({ DATABASE_URL: `sqlite:${result.previousCopy!}` }, dir);
    try {
      expect(await emails(kept)).toContain('after.backup@lab.test');
    } finally {
      await kept.shutDown();
    }
  });

  it('when the backup file is damaged then the restore refuses and the database stays as it was', async () => {
    const backup = path.join(dir, 'backups', 'damaged.sqlite');
    const good = fs.readdirSync(path.join(dir, 'backups')).find((f) => f.startsWith('equilight-'))!;
    const bytes = fs.readFileSync(path.join(dir, 'backups', good));
    bytes.fill(0x5a, 4096, 4096 * 3);
    fs.writeFileSync(backup, bytes);
    const before = fs.readFileSync(path.join(dir, 'equilight.sqlite'));
    const config = loadConfig({ NODE_ENV: 'test', DATA_DIR: dir });
    await expect(restoreDatabase(config, backup)).rejects.toThrow(
      /is not a sound database \(integrity_check/,
    );
    expect(fs.readFileSync(path.join(dir, 'equilight.sqlite')).equals(before)).toBe(true);
  });

  it('when the npm scripts run then they read DATA_DIR as the server does and back up and restore', async () => {
    const env = { ...process.env, DATA_DIR: dir, NODE_ENV: 'test' as const };
    const target = path.join(dir, 'by-script.sqlite');
    const backedUp = await run('npm', ['run', '--silent', 'backup', '--', target], { cwd: REPO_ROOT, env });
    expect(backedUp.stdout).toMatch(/Backed up to .*by-script\.sqlite/);
    const restored = await run('npm', ['run', '--silent', 'restore', '--', target], { cwd: REPO_ROOT, env });
    expect(restored.stdout).toMatch(/Restored .*equilight\.sqlite from/);
    const refused = await run(
      'npm',
      ['run', '--silent', 'restore', '--', path.join(dir, 'backups', 'damaged.sqlite')],
      {
        cwd: REPO_ROOT,
        env,
      },
    ).catch((err: { code: number; stderr: string }) => err);
    expect((refused as { code: number }).code).toBe(1);
    expect((refused as { stderr: string }).stderr).toMatch(/not a sound database/);
  }, 60_000);
});
