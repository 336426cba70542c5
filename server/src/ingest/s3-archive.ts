import crypto from 'node:crypto';
import { pipeline, Transform, type TransformCallback } from 'node:stream';
import {
  GetObjectCommand,
  HeadBucketCommand,
  HeadObjectCommand,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from '@aws-sdk/client-s3';
import {
  type Archive,
  type ArchivedFileState,
  archivedFileMissing,
  assertSha256,
  sha256Hex,
  sha256OfStream,
} from './archive';
import type { S3ArchiveConfig } from '../config';

/** A client for the archive: a short connect time-out and a bounded idle time, so a dead service fails a store quickly. */
export function s3ClientFor(config: S3ArchiveConfig): S3Client {
  return new S3Client({
    region: config.region,
    endpoint: config.endpoint ?? undefined,
    forcePathStyle: config.forcePathStyle,
    credentials: config.credentials ?? undefined,
    maxAttempts: 3,
    requestHandler: { connectionTimeout: 5_000, socketTimeout: 60_000 },
  });
}

/** An archived object whose bytes no longer hash to the SHA-256 it is filed under. */
export class ArchivedFileChangedError extends Error {
  readonly code = 'EARCHIVECHANGED';
  constructor(sha256: string, where: string) {
    super(`the archived copy of ${sha256} (${where}) no longer matches its SHA-256`);
  }
}

/** The object (not the bucket) is not there: S3 says NoSuchKey for GET and a bare 404 for HEAD. */
function isMissingObject(err: unknown): boolean {
  return (
    err instanceof S3ServiceException &&
    (err.name === 'NoSuchKey' || (err.name === 'NotFound' && err.$metadata.httpStatusCode === 404))
  );
}

/**
 * Passes the bytes on while hashing them and holds back the last chunk until the hash is known: a
 * changed object ends in an error before its end reaches the reader, so no one receives it whole.
 */
class Sha256Gate extends Transform {
  private readonly hash = crypto.createHash('sha256');
  private held: Buffer | null = null;

  constructor(
    private readonly expected: string,
    private readonly where: string,
  ) {
    super();
  }

  override _transform(chunk: Buffer, _encoding: BufferEncoding, done: TransformCallback): void {
    this.hash.update(chunk);
    const previous = this.held;
    this.held = chunk;
    done(null, previous ?? undefined);
  }

  override _flush(done: TransformCallback): void {
    if (this.hash.digest('hex') !== this.expected)
      return done(new ArchivedFileChangedError(this.expected, this.where));
    done(null, this.held ?? undefined);
  }
}

/**
 * Raw files on S3-compatible storage: key `<prefix>/ab/abcdef…`, the same SHA-256 addressing as the
 * local folder. A PUT is all or nothing on S3, so a failed store leaves no half object; an object
 * already there is not sent again (HEAD first: conditional PUTs are not offered by every S3-compatible
 * service). The service checks the upload against its SHA-256 (`x-amz-checksum-sha256`) where it
 * supports that, and every read is checked here.
 */
export class S3RawFileArchive implements Archive {
  readonly location: string;

  constructor(
    private readonly client: S3Client,
    private readonly bucket: string,
    private readonly prefix: string,
  ) {
    this.location = `s3://${bucket}/${prefix}`;
  }

  keyOf(sha256: string): string {
    assertSha256(sha256);
    return `${this.prefix ? `${this.prefix}/` : ''}${sha256.slice(0, 2)}/${sha256}`;
  }

  async has(sha256: string): Promise<boolean> {
    try {
      await this.client.send(new HeadObjectCommand({ Bucket: this.bucket, Key: this.keyOf(sha256) }));
      return true;
    } catch (err) {
      if (isMissingObject(err)) return false;
      throw err;
    }
  }

  async store(sha256: string, content: Buffer): Promise<void> {
    const key = this.keyOf(sha256);
    if (sha256Hex(content) !== sha256) throw new Error(`the content given does not hash to ${sha256}`);
    if (await this.has(sha256)) return; // same content already archived
    await this.client.send(
      new PutObjectCommand({
        Bucket: this.bucket,
        Key: key,
        Body: content,
        ContentLength: content.length,
        ContentType: 'application/octet-stream',
        ChecksumSHA256: Buffer.from(sha256, 'hex').toString('base64'),
      }),
    );
  }

  private async get(sha256: string): Promise<{ body: NodeJS.ReadableStream; size: number }> {
    try {
      const answer = await this.client.send(
        new GetObjectCommand({ Bucket: this.bucket, Key: this.keyOf(sha256) }),
      );
      return { body: answer.Body as NodeJS.ReadableStream, size: Number(answer.ContentLength ?? 0) };
    } catch (err) {
      if (isMissingObject(err)) throw archivedFileMissing(sha256, this.location);
      throw err;
    }
  }

  async read(sha256: string): Promise<Buffer> {
    const { body } = await this.get(sha256);
    const chunks: Buffer[] = [];
    for await (const chunk of body as AsyncIterable<Buffer>) chunks.push(chunk);
    const content = Buffer.concat(chunks);
    if (sha256Hex(content) !== sha256) throw new ArchivedFileChangedError(sha256, this.location);
    return content;
  }

  async open(sha256: string): Promise<{ stream: NodeJS.ReadableStream; size: number }> {
    const { body, size } = await this.get(sha256);
    const gate = new Sha256Gate(sha256, this.location);
    pipeline(body, gate, () => undefined); // an error reaches the reader as the gate's error
    return { stream: gate, size };
  }

  async verify(sha256: string): Promise<ArchivedFileState> {
    let body;
    try {
      ({ body } = await this.get(sha256));
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === 'ENOENT') return 'missing';
      throw err;
    }
    return (await sha256OfStream(body as AsyncIterable<unknown>)) === sha256 ? 'intact' : 'changed';
  }

  async unreachable(): Promise<string | null> {
    try {
      await this.client.send(new HeadBucketCommand({ Bucket: this.bucket }));
      return null;
    } catch (err) {
      const name = err instanceof Error ? err.name : 'error';
      const status = (err as Partial<S3ServiceException>).$metadata?.httpStatusCode;
      return `the bucket of ${this.location} does not answer (${name}${status ? `, HTTP ${status}` : ''})`;
    }
  }

  close(): void {
    this.client.destroy();
  }
}
