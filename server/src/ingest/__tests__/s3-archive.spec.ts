import crypto from 'node:crypto';
import {
  DeleteObjectCommand,
  GetObjectCommand,
  ListObjectsV2Command,
  PutObjectCommand,
} from '@aws-sdk/client-s3';
import { loadConfig, type S3ArchiveConfig } from '../../config';
import { sha256Hex } from '../archive';
import { createArchive } from '../create-archive';
import { S3RawFileArchive, s3ClientFor } from '../s3-archive';
import { startS3StandIn, type S3StandIn } from './s3-stand-in';

jest.setTimeout(60_000);

/** The archive settings a server would read from this environment (through config.ts, as at start). */
function s3ConfigFrom(env: Record<string, string>): S3ArchiveConfig & { type: 's3' } {
  const config = loadConfig({ NODE_ENV: 'test', DATA_DIR: '/tmp/unused', ...env }).archive;
  if (config.type !== 's3') throw new Error('ARCHIVE_URL=s3://… did not select S3');
  return config;
}

function archiveFrom(env: Record<string, string>): S3RawFileArchive {
  const archive = createArchive(s3ConfigFrom(env));
  if (!(archive instanceof S3RawFileArchive)) throw new Error('ARCHIVE_URL=s3://… did not select S3');
  return archive;
}

async function collect(stream: NodeJS.ReadableStream): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of stream as AsyncIterable<Buffer>) chunks.push(chunk);
  return Buffer.concat(chunks);
}

async function objectBytes(s3: S3StandIn, key: string): Promise<Buffer> {
  const answer = await s3.client.send(new GetObjectCommand({ Bucket: s3.bucket, Key: key }));
  return Buffer.from(await answer.Body!.transformToByteArray());
}

describe('S3RawFileArchive on a local S3 stand-in', () => {
  let s3: S3StandIn;
  let archive: S3RawFileArchive;
  beforeAll(async () => {
    s3 = await startS3StandIn();
    archive = archiveFrom(s3.env('lab-a/raw'));
  });
  afterAll(async () => {
    archive.close();
    await s3.remove();
  });

  it('when "abc" is stored then its key is <prefix>/ba/<SHA-256> with the FIPS 180-2 digest, and it reads back', async () => {
    // FIPS 180-2, Appendix B.1: SHA-256("abc").
    const sha256 = 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad';
    const content = Buffer.from('abc');
    expect(sha256Hex(content)).toBe(sha256);
    expect(await archive.has(sha256)).toBe(false);
    await archive.store(sha256, content);
    expect(await archive.has(sha256)).toBe(true);
    const listed = await s3.client.send(new ListObjectsV2Command({ Bucket: s3.bucket, Prefix: 'lab-a/' }));
    expect(listed.Contents?.map((o) => o.Key)).toEqual([`lab-a/raw/ba/${sha256}`]);
    expect(await objectBytes(s3, `lab-a/raw/ba/${sha256}`)).toEqual(content);
    expect(await archive.read(sha256)).toEqual(content);
    const opened = await archive.open(sha256);
    expect(opened.size).toBe(3);
    expect(await collect(opened.stream)).toEqual(content);
    expect(await archive.verify(sha256)).toBe('intact');
    expect(await archive.unreachable()).toBeNull();
  });

  it('when a larger file goes through open() then every byte arrives in order', async () => {
    const content = crypto.randomBytes(3 * 1024 * 1024 + 17);
    const sha256 = sha256Hex(content);
    await archive.store(sha256, content);
    const opened = await archive.open(sha256);
    expect(opened.size).toBe(content.length);
    const back = await collect(opened.stream);
    expect(sha256Hex(back)).toBe(sha256);
  });

  it('when the same content is stored twice then it is sent once', async () => {
    const client = s3ClientFor(s3ConfigFrom(s3.env('twice')));
    const puts: string[] = [];
    client.middlewareStack.add(
      (next, context) => async (args) => {
        if (context.commandName === 'PutObjectCommand') puts.push(context.commandName);
        return next(args);
      },
      { step: 'initialize' },
    );
    const counted = new S3RawFileArchive(client, s3.bucket, 'twice');
    const content = Buffer.from('position,wavelength_nm,absorbance\nA1,450,0.1234\n');
    const sha256 = sha256Hex(content);
    await counted.store(sha256, content);
    await counted.store(sha256, content);
    await Promise.all([counted.store(sha256, content), counted.store(sha256, content)]);
    expect(puts).toHaveLength(1);
    expect(await counted.read(sha256)).toEqual(content);
    counted.close();
  });

  it('when content is given under another SHA-256 then nothing is stored', async () => {
    const sha256 = sha256Hex(Buffer.from('one'));
    await expect(archive.store(sha256, Buffer.from('two'))).rejects.toThrow(/does not hash to/);
    expect(await archive.has(sha256)).toBe(false);
    await expect(archive.store('../etc/passwd', Buffer.from('x'))).rejects.toThrow(/not a SHA-256/);
  });

  it('when an object is missing then read and open reject with ENOENT, has says no and verify says missing', async () => {
    const sha256 = sha256Hex(Buffer.from('never stored'));
    await expect(archive.read(sha256)).rejects.toMatchObject({ code: 'ENOENT' });
    await expect(archive.open(sha256)).rejects.toMatchObject({ code: 'ENOENT' });
    expect(await archive.has(sha256)).toBe(false);
    expect(await archive.verify(sha256)).toBe('missing');
  });

  it('when an object was changed in the bucket then read, open and verify notice it', async () => {
    const content = Buffer.from('A1,450,0.5000\n'.repeat(5000));
    const sha256 = sha256Hex(content);
    await archive.store(sha256, content);
    const tampered = Buffer.from(content);
    tampered[tampered.length - 3] = '9'.charCodeAt(0);
    await s3.client.send(
      new PutObjectCommand({ Bucket: s3.bucket, Key: archive.keyOf(sha256), Body: tampered }),
    );
    await expect(archive.read(sha256)).rejects.toMatchObject({ code: 'EARCHIVECHANGED' });
    expect(await archive.verify(sha256)).toBe('changed');
    // A stream never hands over the whole changed object: it ends in an error, short of its last bytes.
    const opened = await archive.open(sha256);
    const received: Buffer[] = [];
    opened.stream.on('data', (chunk: Buffer) => received.push(chunk));
    await expect(
      new Promise((resolve, reject) => {
        opened.stream.on('end', resolve);
        opened.stream.on('error', reject);
      }),
    ).rejects.toThrow(/no longer matches its SHA-256/);
    expect(Buffer.concat(received).length).toBeLessThan(tampered.length);
  });

  it('when an object was removed from the bucket then it counts as missing', async () => {
    const content = Buffer.from('to be removed');
    const sha256 = sha256Hex(content);
    await archive.store(sha256, content);
    await s3.client.send(new DeleteObjectCommand({ Bucket: s3.bucket, Key: archive.keyOf(sha256) }));
    expect(await archive.verify(sha256)).toBe('missing');
    await expect(archive.open(sha256)).rejects.toMatchObject({ code: 'ENOENT' });
  });

  it('when the bucket does not exist then store fails, open is not a missing file, and the archive is unreachable', async () => {
    const elsewhere = archiveFrom({ ...s3.env('x'), ARCHIVE_URL: 's3://no-such-bucket/x' });
    const content = Buffer.from('nowhere');
    await expect(elsewhere.store(sha256Hex(content), content)).rejects.toThrow();
    const openError = await elsewhere.open(sha256Hex(content)).catch((err: unknown) => err);
    expect(openError).toBeInstanceOf(Error);
    expect((openError as NodeJS.ErrnoException).code).not.toBe('ENOENT');
    expect(await elsewhere.unreachable()).toMatch(/^the bucket of s3:\/\/no-such-bucket\/x does not answer/);
    elsewhere.close();
  });

  // s3rver knows its access key id but does not check V4 signatures, so a wrong key id is what it refuses.
  it('when the access key is unknown then the stand-in refuses the store', async () => {
    const wrong = archiveFrom({ ...s3.env('x'), ARCHIVE_S3_ACCESS_KEY_ID: 'NOT-A-KEY' });
    const content = Buffer.from('signed wrongly');
    await expect(wrong.store(sha256Hex(content), content)).rejects.toThrow();
    expect(await archive.has(sha256Hex(content))).toBe(false);
    wrong.close();
  });
});
