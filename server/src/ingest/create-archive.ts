import type { ArchiveConfig } from '../config';
import { type Archive, RawFileArchive } from './archive';
import { S3RawFileArchive, s3ClientFor } from './s3-archive';

/** The raw-file archive the configuration names: the local folder, or a bucket on S3-compatible storage. */
export function createArchive(config: ArchiveConfig): Archive {
  return config.type === 's3'
    ? new S3RawFileArchive(s3ClientFor(config), config.bucket, config.prefix)
    : new RawFileArchive(config.root);
}

/** Where the archive is, for a log line: the folder, or the bucket and the service's address. No credentials. */
export function describeArchive(config: ArchiveConfig): string {
  if (config.type === 'local') return config.root;
  return `s3://${config.bucket}/${config.prefix}${config.endpoint ? ` at ${new URL(config.endpoint).origin}` : ''} (region ${config.region})`;
}
