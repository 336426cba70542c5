import { execFile } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { promisify } from 'node:util';
import { GetObjectCommand, PutObjectCommand } from '@aws-sdk/client-s3';
import request from 'supertest';
import { loadConfig } from '../../config';
import { createProfile, longTableCsv, settled } from '../../ingest/__tests__/ingest-helpers';
import { STAND_IN_KEY, startS3StandIn, type S3StandIn } from '../../ingest/__tests__/s3-stand-in';
import { sqliteOnly, startTestApp } from '../../testing/test-app';
import { checkDatabaseAndArchive } from '../database-check';

jest.setTimeout(120_000);

const REPO_ROOT = path.resolve(__dirname, '../../../..');
const PREFIX = 'checks/raw';

// db:check reads the SQLite file, so these run on the SQLite pass only.
sqliteOnly('archive checks with the raw archive on S3', () => {
  let s3: S3StandIn;
  let dir: string;
  let shas: string[];
  const configOf = () => loadConfig({ NODE_ENV: 'test', DATA_DIR: dir, ...s3.env(PREFIX) });
  const keyOf = (sha256: string) => `${PREFIX}/${sha256.slice(0, 2)}/${sha256}`;
  const dbCheck = () =>
    promisify(execFile)('npm', ['run', '--silent', 'db:check'], {
      cwd: REPO_ROOT,
      env: { ...process.env, NODE_ENV: 'test', DATA_DIR: dir, ...s3.env(PREFIX) },
    }).then(
      ({ stdout, stderr }) => ({ code: 0, stdout, stderr }),
      (err: { code: number; stdout: string; stderr: string }) => err,
    );

  beforeAll(async () => {
    s3 = await startS3StandIn();
    const t = await startTestApp(s3.env(PREFIX));
    dir = t.dir;
    const { token } = await createProfile(await t.agent('admin'));
    const ids: number[] = [];
    for (const seed of [41, 42]) {
      const res = await request(t.app)
        .post('/api/ingest')
        .set('Authorization', `Bearer ${token}`)
        .attach('file', Buffer.from(longTableCsv(seed)), `RUN-${seed}.csv`);
      expect(res.status).toBe(202);
      ids.push(res.body.id);
    }
    shas = [];
    for (const id of ids) shas.push((await settled(t, id, 30_000)).sha256);
    await t.shutDown();
  });
  afterAll(async () => {
    await s3.remove();
    fs.rmSync(dir, { recursive: true, force: true });
  });

  it('when all objects are intact then health is ok and db:check passes', async () => {
    const t = await startTestApp(s3.env(PREFIX), dir);
    try {
      expect((await request(t.app).get('/api/health')).body).toEqual({ status: 'ok', service: 'equilight' });
    } finally {
      await t.shutDown();
    }
    expect(await checkDatabaseAndArchive(configOf())).toEqual([]);
  });

  it('when an object was changed in the bucket then health names the SHA-256 mismatch, and db:check finds it too', async () => {
    const victim = shas[0]!;
    const original = await s3.client.send(new GetObjectCommand({ Bucket: s3.bucket, Key: keyOf(victim) }));
    const bytes = Buffer.from(await original.Body!.transformToByteArray());
    await s3.client.send(
      new PutObjectCommand({
        Bucket: s3.bucket,
        Key: keyOf(victim),
        Body: Buffer.concat([bytes, Buffer.from('A9,450,0.123\n')]),
      }),
    );
    try {
      const t = await startTestApp(s3.env(PREFIX), dir);
      try {
        const res = await request(t.app).get('/api/health');
        expect(res.status).toBe(200);
        expect(res.body.reasons).toEqual([
          expect.stringMatching(
            new RegExp(
              `^archive: 1 of 2 sampled archived files no longer match their SHA-256 \\(${victim.slice(0, 12)}`,
            ),
          ),
        ]);
      } finally {
        await t.shutDown();
      }
      expect(await checkDatabaseAndArchive(configOf())).toEqual([
        expect.stringMatching(/^archive: 1 of 2 archived files no longer match their SHA-256/),
      ]);
      const run = await dbCheck();
      expect(run.code).toBe(1);
      expect(run.stdout).toMatch(/no longer match their SHA-256/);
      expect(`${run.stdout}${run.stderr}`).not.toContain(STAND_IN_KEY.secretAccessKey);
    } finally {
      await s3.client.send(new PutObjectCommand({ Bucket: s3.bucket, Key: keyOf(victim), Body: bytes }));
    }
    expect(await checkDatabaseAndArchive(configOf())).toEqual([]);
  });

  it('when the bucket is not there then the check says the archive does not answer, without the secret', async () => {
    const config = loadConfig({
      NODE_ENV: 'test',
      DATA_DIR: dir,
      ...s3.env(PREFIX),
      ARCHIVE_URL: `s3://no-such-bucket/${PREFIX}`,
    });
    const problems = await checkDatabaseAndArchive(config);
    expect(problems).toEqual([
      expect.stringMatching(
        /^archive: the bucket of s3:\/\/no-such-bucket\/checks\/raw does not answer \(.*\), but 2 received file\(s\) should be archived there$/,
      ),
    ]);
    expect(problems.join('\n')).not.toContain(STAND_IN_KEY.secretAccessKey);
  });
});
