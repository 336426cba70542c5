import net from 'node:net';
import path from 'node:path';
import * as z from 'zod';

/**
 * All configuration, read from the environment once and validated at start.
 * No other file reads process.env.
 */
const booleanText = z
  .enum(['true', 'false', '1', '0', 'yes', 'no'])
  .transform((value) => value === 'true' || value === '1' || value === 'yes');

/**
 * Which proxies may set X-Forwarded-For (Express' `trust proxy`): a hop count, or addresses, subnets and
 * the names loopback / linklocal / uniquelocal, comma-separated. `true` (trust anyone) is refused: a
 * client could then choose its own address and escape the sign-in limit.
 */
const trustProxyText = z
  .string()
  .trim()
  .refine((value) => {
    if (/^(false|none|)$/i.test(value) || /^\d+$/.test(value)) return true;
    return value.split(',').every((part) => {
      const item = part.trim();
      if (['loopback', 'linklocal', 'uniquelocal'].includes(item)) return true;
      const [address, prefix, ...rest] = item.split('/');
      return (
        rest.length === 0 &&
        net.isIP(address ?? '') !== 0 &&
        (prefix === undefined || /^\d{1,3}$/.test(prefix))
      );
    });
  }, 'name the proxy: a hop count, or addresses/subnets (e.g. 10.0.0.5, 10.0.0.0/8, loopback), comma-separated')
  .transform((value): false | number | string => {
    if (/^(false|none|)$/i.test(value)) return false;
    if (/^\d+$/.test(value)) return Number(value);
    return value
      .split(',')
      .map((part) => part.trim())
      .join(',');
  });

/** bcrypt's cost for stored passwords (2¹⁰ rounds; common practice for interactive sign-in). */
export const PASSWORD_HASH_ROUNDS = 10;

const envSchema = z.object({
  NODE_ENV: z.enum(['development', 'production', 'test']).default('development'),
  PORT: z.coerce.number().int().min(0).max(65535).default(4210),
  HOST: z.string().min(1).default('127.0.0.1'),
  DATA_DIR: z.string().min(1).default('data'),
  DATABASE_URL: z
    .string()
    .regex(/^(sqlite:|postgres(ql)?:\/\/)/, 'must start with sqlite: (a file path) or postgres://')
    .optional(),
  /** PostgreSQL only: the schema Equilight's tables live in (created when missing); default `public`. */
  DATABASE_SCHEMA: z
    .string()
    .regex(/^[a-z_][a-z0-9_]{0,62}$/, 'must be a plain lower-case SQL name (letters, digits, _)')
    .optional(),
  SESSION_SECRET: z.string().min(16, 'must be at least 16 characters').optional(),
  SESSION_MAX_AGE_HOURS: z.coerce.number().positive().default(12),
  COOKIE_SECURE: booleanText.default(false),
  DEMO_PASSWORD: z.string().min(8, 'must be at least 8 characters').default('equilight-demo'),
  SEED_DEMO: booleanText.default(true),
  LOGIN_RATE_LIMIT: z.coerce.number().int().positive().default(20),
  LOGIN_RATE_WINDOW_MINUTES: z.coerce.number().positive().default(15),
  UPLOAD_MAX_MB: z.coerce.number().positive().max(512).default(20),
  WEB_DIST_DIR: z.string().optional(),
  PUBLIC_URL: z.string().url().optional(),
  TRUST_PROXY: trustProxyText.default(false),
  SMTP_URL: z
    .string()
    .regex(/^smtps?:\/\//, 'must start with smtp:// or smtps://')
    .optional(),
  MAIL_FROM: z.string().min(3).default('Equilight <equilight@localhost>'),
  SMTP_STANDIN: booleanText.optional(),
  SMTP_STANDIN_PORT: z.coerce.number().int().min(0).max(65535).optional(),
  WORKER_THREADS: z.coerce.number().int().min(2).max(16).default(2),
  WORKERS_IN_THREAD_FOR_TESTS: booleanText.default(false),
  /** bcrypt's cost in tests (4 hashes in a few ms); only with NODE_ENV=test. Elsewhere the cost is 10. */
  PASSWORD_HASH_ROUNDS_FOR_TESTS: z.preprocess(
    (v) => (v === '' ? undefined : v),
    z.coerce.number().int().min(4).max(10).optional(),
  ),
  FOUR_EYES_APPROVAL: booleanText.default(true),
  WEBHOOK_MAX_ATTEMPTS: z.coerce.number().int().min(1).max(20).default(6),
  WEBHOOK_TIMEOUT_SECONDS: z.coerce.number().positive().max(120).default(10),
  WEBHOOK_RETRY_BASE_SECONDS: z.coerce.number().positive().max(3600).default(30),
  INSTRUMENT_SILENT_MINUTES: z.coerce.number().positive().max(10080).default(10),
  ARCHIVE_URL: z.string().trim().optional(),
  /** Unset: the job queue lives in the database (one process). redis://…: BullMQ on that Redis. */
  QUEUE_URL: z.string().trim().optional(),
  /** The first part of every Redis key and channel name Equilight uses (queues, events, sign-in limits). */
  QUEUE_PREFIX: z
    .string()
    .regex(/^[A-Za-z0-9_.-]{1,40}$/, 'must be 1–40 letters, digits, ".", "_" or "-"')
    .default('equilight'),
  /** Redis for live events across processes and shared sign-in limits; default QUEUE_URL when that is Redis. */
  REDIS_URL: z.string().trim().optional(),
  ARCHIVE_S3_ENDPOINT: z
    .string()
    .url()
    .regex(/^https?:\/\//, 'must start with http:// or https://')
    .optional(),
  ARCHIVE_S3_REGION: z.string().trim().min(1).default('us-east-1'),
  ARCHIVE_S3_ACCESS_KEY_ID: z.string().min(1).optional(),
  ARCHIVE_S3_SECRET_ACCESS_KEY: z.string().min(1).optional(),
  ARCHIVE_S3_FORCE_PATH_STYLE: booleanText.optional(),
});

/** S3 bucket names: 3–63 lower-case letters, digits, dots and hyphens, beginning and ending with a letter or digit. */
const S3_BUCKET = /^[a-z0-9][a-z0-9.-]{1,61}[a-z0-9]$/;

/**
 * ARCHIVE_URL: unset keeps raw files in <DATA_DIR>/archive; `s3://bucket/prefix` puts them on
 * S3-compatible storage. Returns the archive, or the sentence that says what is wrong.
 */
function archiveConfigOf(e: z.infer<typeof envSchema>, dataDir: string): ArchiveConfig | string {
  const s3Settings = (
    [
      'ARCHIVE_S3_ENDPOINT',
      'ARCHIVE_S3_ACCESS_KEY_ID',
      'ARCHIVE_S3_SECRET_ACCESS_KEY',
      'ARCHIVE_S3_FORCE_PATH_STYLE',
    ] as const
  ).filter((name) => e[name] !== undefined);
  if (!e.ARCHIVE_URL) {
    if (s3Settings.length)
      return `${s3Settings.join(', ')}: only with ARCHIVE_URL=s3://bucket/prefix (unset, raw files stay in ${path.join(dataDir, 'archive')})`;
    return { type: 'local', root: path.join(dataDir, 'archive') };
  }
  const match = /^s3:\/\/([^/]+)(?:\/(.*))?$/.exec(e.ARCHIVE_URL);
  if (!match)
    return 'ARCHIVE_URL: must be s3://bucket/prefix (or unset, for the folder archive/ under DATA_DIR)';
  const [, bucket = '', rawPrefix = ''] = match;
  if (!S3_BUCKET.test(bucket) || bucket.includes('..'))
    return `ARCHIVE_URL: "${bucket}" is not an S3 bucket name (3–63 lower-case letters, digits, dots, hyphens)`;
  const prefix = rawPrefix.replace(/^\/+|\/+$/g, '');
  if (prefix.split('/').some((part) => part === '.' || part === '..' || (prefix !== '' && part === '')))
    return 'ARCHIVE_URL: the prefix after the bucket must not hold empty, "." or ".." parts';
  const hasKey = e.ARCHIVE_S3_ACCESS_KEY_ID !== undefined;
  if (hasKey !== (e.ARCHIVE_S3_SECRET_ACCESS_KEY !== undefined))
    return 'ARCHIVE_S3_ACCESS_KEY_ID, ARCHIVE_S3_SECRET_ACCESS_KEY: give both, or neither (the SDK then finds credentials itself)';
  return {
    type: 's3',
    bucket,
    prefix,
    endpoint: e.ARCHIVE_S3_ENDPOINT ?? null,
    region: e.ARCHIVE_S3_REGION,
    forcePathStyle: e.ARCHIVE_S3_FORCE_PATH_STYLE ?? e.ARCHIVE_S3_ENDPOINT !== undefined,
    credentials: hasKey
      ? { accessKeyId: e.ARCHIVE_S3_ACCESS_KEY_ID!, secretAccessKey: e.ARCHIVE_S3_SECRET_ACCESS_KEY! }
      : null,
  };
}

const REDIS_SCHEME = /^rediss?:\/\/[^/]/;

/**
 * QUEUE_URL and REDIS_URL: the queue's home (the database, or BullMQ on Redis) and the Redis that carries
 * live events and sign-in limits between processes. Returns both, or the sentence that says what is wrong.
 */
function redisConfigOf(
  e: z.infer<typeof envSchema>,
): { queue: QueueConfig; redis: RedisConfig | null } | string {
  const problems: string[] = [];
  if (e.QUEUE_URL && !REDIS_SCHEME.test(e.QUEUE_URL))
    problems.push(
      `QUEUE_URL: "${redactUrl(e.QUEUE_URL)}" is not a queue Equilight knows; give redis://host:port[/db] (or rediss:// for TLS), or leave it unset for the queue in the database`,
    );
  if (e.REDIS_URL && !REDIS_SCHEME.test(e.REDIS_URL))
    problems.push(`REDIS_URL: must start with redis:// or rediss:// (got "${redactUrl(e.REDIS_URL)}")`);
  if (problems.length) return problems.join('\n  ');
  const prefix = e.QUEUE_PREFIX;
  const queue: QueueConfig = e.QUEUE_URL ? { type: 'redis', url: e.QUEUE_URL, prefix } : { type: 'database' };
  const redisUrl = e.REDIS_URL ?? e.QUEUE_URL;
  return { queue, redis: redisUrl ? { url: redisUrl, prefix } : null };
}

/** A URL as it may appear in a message: without its password. */
export function redactUrl(url: string): string {
  return url.replace(
    /\/\/([^@/]*)@/,
    (_m, auth: string) => `//${auth.includes(':') ? `${auth.split(':')[0]}:***` : auth}@`,
  );
}

export type DatabaseConfig =
  { type: 'sqlite'; file: string } | { type: 'postgres'; url: string; schema?: string };

export interface AppConfig {
  env: 'development' | 'production' | 'test';
  port: number;
  host: string;
  dataDir: string;
  database: DatabaseConfig;
  sessionSecret: string;
  sessionMaxAgeMs: number;
  cookieSecure: boolean;
  demoPassword: string;
  seedDemo: boolean;
  loginRateLimit: { max: number; windowMs: number };
  uploadMaxBytes: number;
  /** Folder of the built Angular app; served with an index.html fallback when it exists. */
  webDistDir: string;
  publicUrl: string;
  /** Express `trust proxy`: false (the default) ignores X-Forwarded-For; otherwise the named proxies. */
  trustProxy: false | number | string;
  mail: MailConfig;
  /** Worker threads for parsing and analysis (server/src/workers). */
  workers: { threads: number; inThreadForTests: boolean };
  /** bcrypt cost of stored passwords (10; lower only in tests). */
  passwordHashRounds: number;
  /** Lab policy: whoever approves a batch did not create it nor mark it reviewed. */
  fourEyesApproval: boolean;
  webhooks: WebhooksConfig;
  /** An active instrument whose watcher has not reported for this long is "silent": admins get a mail. */
  instrumentSilentMs: number;
  /** Where raw files are archived (ARCHIVE_URL): a local folder or S3-compatible storage. */
  archive: ArchiveConfig;
  /** Where the ingest and webhooks queues live (QUEUE_URL): the app's database, or BullMQ on Redis. */
  queue: QueueConfig;
  /** Redis for live events across processes and shared sign-in limits (REDIS_URL); null: in-process only. */
  redis: RedisConfig | null;
}

export type QueueConfig = { type: 'database' } | ({ type: 'redis' } & RedisConfig);

export interface RedisConfig {
  /** redis://[user:password@]host:port[/db] or rediss://… (TLS). Never logged with its password. */
  url: string;
  /** First part of every key and channel (QUEUE_PREFIX), so several installations or tests share one Redis. */
  prefix: string;
}

export type ArchiveConfig = { type: 'local'; root: string } | ({ type: 's3' } & S3ArchiveConfig);

/** Where an S3 archive is and how to sign in to it (ARCHIVE_URL and ARCHIVE_S3_*). */
export interface S3ArchiveConfig {
  bucket: string;
  /** Key prefix without leading or trailing slash; '' keeps the files at the top of the bucket. */
  prefix: string;
  /** An S3-compatible service's address; null for AWS itself. */
  endpoint: string | null;
  region: string;
  forcePathStyle: boolean;
  /** null: the SDK's own credential chain (e.g. a role of the machine). Never logged. */
  credentials: { accessKeyId: string; secretAccessKey: string } | null;
}

export interface WebhooksConfig {
  /** Tries per delivery before it is marked failed (a re-send by hand starts another round). */
  maxAttempts: number;
  /** How long to wait for the receiver's answer. */
  timeoutMs: number;
  /** The wait before the second try; it doubles before each further one. */
  retryBaseMs: number;
}

export interface MailConfig {
  /** Where mail goes; null means the built-in stand-in (when it runs) or no mail at all. */
  smtpUrl: string | null;
  from: string;
  /** Run the local SMTP stand-in that keeps every message in the outbox (not in production by default). */
  standIn: boolean;
  /** Its port; 0 picks any free port (the default in tests). */
  standInPort: number;
}

export class ConfigError extends Error {}

/** Read and check the environment. Throws a ConfigError naming every bad variable. */
export function loadConfig(env: NodeJS.ProcessEnv = process.env, cwd = process.cwd()): AppConfig {
  const parsed = envSchema.safeParse(env);
  if (!parsed.success) {
    const lines = parsed.error.issues.map((issue) => `  ${issue.path.join('.')}: ${issue.message}`);
    throw new ConfigError(`Invalid configuration:\n${lines.join('\n')}`);
  }
  const e = parsed.data;
  const dataDir = path.resolve(cwd, e.DATA_DIR);
  const database: DatabaseConfig = e.DATABASE_URL?.startsWith('postgres')
    ? { type: 'postgres', url: e.DATABASE_URL, schema: e.DATABASE_SCHEMA }
    : {
        type: 'sqlite',
        file: path.resolve(
          cwd,
          e.DATABASE_URL?.slice('sqlite:'.length) || path.join(dataDir, 'equilight.sqlite'),
        ),
      };
  if (e.WORKERS_IN_THREAD_FOR_TESTS && e.NODE_ENV !== 'test') {
    throw new ConfigError('Invalid configuration:\n  WORKERS_IN_THREAD_FOR_TESTS: only with NODE_ENV=test');
  }
  if (e.PASSWORD_HASH_ROUNDS_FOR_TESTS !== undefined && e.NODE_ENV !== 'test') {
    throw new ConfigError(
      'Invalid configuration:\n  PASSWORD_HASH_ROUNDS_FOR_TESTS: only with NODE_ENV=test',
    );
  }
  const archive = archiveConfigOf(e, dataDir);
  if (typeof archive === 'string') throw new ConfigError(`Invalid configuration:\n  ${archive}`);
  const redisSetup = redisConfigOf(e);
  if (typeof redisSetup === 'string') throw new ConfigError(`Invalid configuration:\n  ${redisSetup}`);
  if (e.NODE_ENV === 'production' && !e.SESSION_SECRET) {
    throw new ConfigError('Invalid configuration:\n  SESSION_SECRET: required when NODE_ENV=production');
  }
  return {
    env: e.NODE_ENV,
    port: e.PORT,
    host: e.HOST,
    dataDir,
    database,
    // Development default only; production refuses to start without SESSION_SECRET (above).
    sessionSecret: e.SESSION_SECRET ?? 'equilight-development-secret-not-for-production',
    sessionMaxAgeMs: e.SESSION_MAX_AGE_HOURS * 3_600_000,
    cookieSecure: e.COOKIE_SECURE,
    demoPassword: e.DEMO_PASSWORD,
    seedDemo: e.SEED_DEMO,
    loginRateLimit: { max: e.LOGIN_RATE_LIMIT, windowMs: e.LOGIN_RATE_WINDOW_MINUTES * 60_000 },
    uploadMaxBytes: Math.round(e.UPLOAD_MAX_MB * 1024 * 1024),
    webDistDir: path.resolve(cwd, e.WEB_DIST_DIR ?? 'dist/web/browser'),
    publicUrl: e.PUBLIC_URL ?? `http://localhost:${e.PORT}`,
    trustProxy: e.TRUST_PROXY,
    mail: {
      smtpUrl: e.SMTP_URL ?? null,
      from: e.MAIL_FROM,
      standIn: e.SMTP_STANDIN ?? e.NODE_ENV !== 'production',
      standInPort: e.SMTP_STANDIN_PORT ?? (e.NODE_ENV === 'test' ? 0 : 2525),
    },
    workers: { threads: e.WORKER_THREADS, inThreadForTests: e.WORKERS_IN_THREAD_FOR_TESTS },
    passwordHashRounds: e.PASSWORD_HASH_ROUNDS_FOR_TESTS ?? PASSWORD_HASH_ROUNDS,
    fourEyesApproval: e.FOUR_EYES_APPROVAL,
    webhooks: {
      maxAttempts: e.WEBHOOK_MAX_ATTEMPTS,
      timeoutMs: Math.round(e.WEBHOOK_TIMEOUT_SECONDS * 1000),
      retryBaseMs: Math.round(e.WEBHOOK_RETRY_BASE_SECONDS * 1000),
    },
    instrumentSilentMs: Math.round(e.INSTRUMENT_SILENT_MINUTES * 60_000),
    archive,
    ...redisSetup,
  };
}
