import crypto from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { DeleteObjectCommand, GetObjectCommand, PutObjectCommand } from '@aws-sdk/client-s3';
import request from 'supertest';
import type TestAgent from 'supertest/lib/agent';
import { startTestApp, type TestApp } from '../../testing/test-app';
import { createProfile, longTableCsv, readingCount, settled } from './ingest-helpers';
import { startS3StandIn, type S3StandIn } from './s3-stand-in';

jest.setTimeout(60_000);

const sha256Of = (content: Buffer): string => crypto.createHash('sha256').update(content).digest('hex');

/** The download's bytes, whatever their content type. */
function rawBytes(agent: TestAgent, sha256: string) {
  return agent
    .get(`/api/intake/raw/${sha256}`)
    .buffer(true)
    .parse((r, done) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => done(null, Buffer.concat(chunks)));
      r.on('error', (err: Error) => done(err, Buffer.concat(chunks)));
    });
}

async function intakeRows(t: TestApp): Promise<number> {
  const [{ n }] = (await t.dataSource.query('SELECT COUNT(*) AS n FROM intake_files')) as { n: number }[];
  return Number(n);
}

describe('ingest with the raw archive on S3 (ARCHIVE_URL=s3://…)', () => {
  let s3: S3StandIn;
  let t: TestApp;
  let token: string;
  const send = (content: Buffer, name: string) =>
    request(t.app).post('/api/ingest').set('Authorization', `Bearer ${token}`).attach('file', content, name);

  beforeAll(async () => {
    s3 = await startS3StandIn();
    t = await startTestApp(s3.env('equilight/raw'));
    token = (await createProfile(await t.agent('admin'))).token;
  });
  afterAll(async () => {
    await t.stop();
    await s3.remove();
  });

  it('when a file is sent then it is archived in the bucket, parsed and stored, and the download gives the same bytes', async () => {
    const content = Buffer.from(longTableCsv(31));
    const sha256 = sha256Of(content);
    const sent = await send(content, 'RUN-31.csv');
    expect(sent.status).toBe(202);
    const file = await settled(t, sent.body.id);
    expect(['stored', 'unassigned']).toContain(file.status);
    expect(file.readingCount).toBe(96);
    expect(await readingCount(t, file.id)).toBe(96);
    // In the bucket under the content address, and not in the local folder.
    const object = await s3.client.send(
      new GetObjectCommand({ Bucket: s3.bucket, Key: `equilight/raw/${sha256.slice(0, 2)}/${sha256}` }),
    );
    expect(Buffer.from(await object.Body!.transformToByteArray())).toEqual(content);
    expect(fs.existsSync(path.join(t.dir, 'archive'))).toBe(false);

    const res = await rawBytes(await t.agent('lab_manager'), sha256);
    expect(res.status).toBe(200);
    expect(res.headers['x-content-sha256']).toBe(sha256);
    expect(sha256Of(res.body as Buffer)).toBe(sha256);
    expect(res.body).toEqual(content);

    // The same content again is a duplicate of the first.
    const again = await send(content, 'RUN-31-copy.csv');
    expect(again.status).toBe(202);
    expect(again.body).toMatchObject({ status: 'duplicate', duplicateOfId: file.id });
  });

  it('when the object is gone from the bucket then the download answers archive_missing (410) and the start check names it', async () => {
    const content = Buffer.from(longTableCsv(32));
    const sha256 = sha256Of(content);
    const sent = await send(content, 'RUN-32.csv');
    await settled(t, sent.body.id);
    await s3.client.send(
      new DeleteObjectCommand({ Bucket: s3.bucket, Key: `equilight/raw/${sha256.slice(0, 2)}/${sha256}` }),
    );
    const res = await (await t.agent('lab_manager')).get(`/api/intake/raw/${sha256}`);
    expect(res.status).toBe(410);
    expect(res.body.error.code).toBe('archive_missing');
    const problems = await t.health.checkAtStart();
    expect(problems).toEqual([
      expect.stringMatching(
        new RegExp(`^archive: 1 of 2 sampled archived files are missing \\(${sha256.slice(0, 12)}`),
      ),
    ]);
    expect((await request(t.app).get('/api/health')).body.status).toBe('degraded');
  });

  it('when the object was changed in the bucket then the download never hands over the changed bytes whole', async () => {
    const content = Buffer.from(longTableCsv(34).repeat(40));
    const sha256 = sha256Of(content);
    const sent = await send(content, 'RUN-34.csv');
    await settled(t, sent.body.id);
    const tampered = Buffer.from(content);
    tampered[100] = tampered[100] === 0x31 ? 0x32 : 0x31;
    await s3.client.send(
      new PutObjectCommand({
        Bucket: s3.bucket,
        Key: `equilight/raw/${sha256.slice(0, 2)}/${sha256}`,
        Body: tampered,
      }),
    );
    const manager = await t.agent('lab_manager');
    const outcome = await rawBytes(manager, sha256).then(
      (res) => res.body as Buffer,
      (err: unknown) => err,
    );
    const receivedWhole = Buffer.isBuffer(outcome) && outcome.length >= tampered.length;
    expect(receivedWhole).toBe(false);
    // The server goes on answering.
    expect((await manager.get('/api/intake?pageSize=1')).status).toBe(200);
  });

  it('when the S3 service is down then the ingest answers "send again later" (503) and records nothing', async () => {
    const before = await intakeRows(t);
    await s3.stop();
    const res = await send(Buffer.from(longTableCsv(33)), 'RUN-33.csv');
    expect(res.status).toBe(503);
    expect(res.body.error.code).toBe('storage_unavailable');
    expect(res.body.error.message).toMatch(/nothing was stored\. Send the file again later/);
    expect(await intakeRows(t)).toBe(before);
    expect(await t.health.checkAtStart()).toEqual([
      expect.stringMatching(/^archive: the bucket of s3:\/\/raw-files\/equilight\/raw does not answer/),
    ]);
  });
});
