import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { CreateBucketCommand, S3Client } from '@aws-sdk/client-s3';
import S3rver from 's3rver';

/**
 * s3rver refuses access key ids it does not know (its own is S3RVER) but does not check V4 signatures,
 * so the secret can be a string that tests look for in logs and messages, where it must never appear.
 */
export const STAND_IN_KEY = {
  accessKeyId: 'S3RVER',
  secretAccessKey: 'stand-in-secret-never-logged',
} as const;

export interface S3StandIn {
  endpoint: string;
  bucket: string;
  /** A client of the test's own, to look at or change what the archive stored. */
  client: S3Client;
  /** The server's environment for an archive under `prefix` in the bucket. */
  env(prefix: string): Record<string, string>;
  /** Stop answering (the archive's service is down); the stored objects stay in the folder. */
  stop(): Promise<void>;
  /** Stop and remove the folder. */
  remove(): Promise<void>;
}

/** A local S3 stand-in (s3rver) on a free port of 127.0.0.1, keeping its objects in a temporary folder, with one bucket. */
export async function startS3StandIn(bucket = 'raw-files'): Promise<S3StandIn> {
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-s3-'));
  const server = new S3rver({ address: '127.0.0.1', port: 0, silent: true, directory: dir });
  const { port } = await server.run();
  const endpoint = `http://127.0.0.1:${port}`;
  const client = new S3Client({
    endpoint,
    region: 'us-east-1',
    forcePathStyle: true,
    credentials: STAND_IN_KEY,
    maxAttempts: 1,
  });
  await client.send(new CreateBucketCommand({ Bucket: bucket }));
  let running = true;
  const stop = async (): Promise<void> => {
    if (!running) return;
    running = false;
    client.destroy();
    await server.close();
  };
  return {
    endpoint,
    bucket,
    client,
    env: (prefix) => ({
      ARCHIVE_URL: `s3://${bucket}/${prefix}`,
      ARCHIVE_S3_ENDPOINT: endpoint,
      ARCHIVE_S3_ACCESS_KEY_ID: STAND_IN_KEY.accessKeyId,
      ARCHIVE_S3_SECRET_ACCESS_KEY: STAND_IN_KEY.secretAccessKey,
    }),
    stop,
    async remove() {
      await stop();
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}
