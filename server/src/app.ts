import compression from 'compression';
import cookieParser from 'cookie-parser';
import express, { type Express, type RequestHandler } from 'express';
import session from 'express-session';
import helmet from 'helmet';
import type { DataSource } from 'typeorm';
import type { AnalysisEngine } from './analysis-engine/analysis-engine';
import { auditRouter } from './audit/audit.router';
import { AuditService } from './audit/audit.service';
import { authRouter } from './auth/auth.router';
import { batchesRouter } from './batches/batches.router';
import { BatchesService } from './batches/batches.service';
import { commentsRouter } from './comments/comments.router';
import { CommentsService } from './comments/comments.service';
import { createCsrfProtection } from './auth/csrf';
import { createPassport } from './auth/passport';
import { SessionRow } from './auth/session.entity';
import { TypeOrmSessionStore } from './auth/typeorm-session-store';
import { apiNotFound, createErrorHandler } from './common/error-handler';
import type { AppConfig } from './config';
import { EventBus } from './events/event-bus';
import { createArchive } from './ingest/create-archive';
import { type IngestJobData, IngestService } from './ingest/ingest.service';
import { ingestRouter } from './ingest/ingest.router';
import { intakeRouter } from './ingest/intake.router';
import { instrumentsRouter } from './instruments/instruments.router';
import { InstrumentsService } from './instruments/instruments.service';
import { layoutsRouter } from './layouts/layouts.router';
import { createMailModule, type MailModule } from './mail/mail.module';
import { LayoutsService } from './layouts/layouts.service';
import { HealthService } from './maintenance/health.service';
import { manifestsRouter } from './manifests/manifests.router';
import { ReportsService } from './reports/reports.service';
import { reportsRouter } from './reports/reports.router';
import { ManifestsService } from './manifests/manifests.service';
import type { JobWorker } from './queue/job-queue';
import { createQueues, type Queues } from './queue/queues';
import { RedisEventBus } from './events/redis-event-bus';
import { closeRedis, openRedis } from './redis/redis-connection';
import { inProcessCounts, redisRateLimitStores } from './redis/rate-limit-stores';
import { buildOpenApiDocument } from './openapi/openapi-document';
import { overviewRouter } from './overview/overview.router';
import { OverviewService } from './overview/overview.service';
import { temperaturesRouter } from './temperatures/temperatures.router';
import { TemperaturesService } from './temperatures/temperatures.service';
import { TemperatureSystemStore } from './temperatures/temperature-systems';
import { usersRouter } from './users/users.router';
import { UsersService } from './users/users.service';
import { serveWebApp } from './web-app/serve-web-app';
import { closeWorkers, configureWorkers } from './workers';
import { watcherApiRouter, watchersRouter } from './watchers/watchers.router';
import { WatchersService } from './watchers/watchers.service';
import { createWebhooksModule, type WebhooksModule } from './webhooks/webhooks.module';

export const SESSION_COOKIE = 'equilight.sid';

export interface AppContext {
  config: AppConfig;
  dataSource: DataSource;
  log?: (message: string, err?: unknown) => void;
  /** The analysis and its version; this build's module unless a test simulates another. */
  engine?: AnalysisEngine;
}

export interface EquilightApp {
  app: Express;
  /** The session middleware, for authenticating WebSocket upgrades with the same cookie. */
  sessionParser: RequestHandler;
  services: {
    users: UsersService;
    instruments: InstrumentsService;
    ingest: IngestService;
    audit: AuditService;
    layouts: LayoutsService;
    manifests: ManifestsService;
    batches: BatchesService;
    watchers: WatchersService;
    temperatures: TemperaturesService;
  };
  events: EventBus;
  /** E-mail: sender, local SMTP stand-in and outbox, notification settings. */
  mail: MailModule;
  /** Outbound webhooks: receivers, delivery log, and their own queue. */
  webhooks: WebhooksModule;
  worker: JobWorker<IngestJobData>;
  /** Where the ingest and webhooks queues live (QUEUE_URL). */
  queues: Queues;
  /** /api/health: touches the database; keeps what the start checks found. */
  health: HealthService;
  /** Start background work: resume queued jobs left by a previous run, fill in missing batch summaries. */
  start(): Promise<void>;
  /** Stop background work and wait for running jobs. */
  close(): Promise<void>;
}

/** Build the Express app without listening: tests drive it with supertest. */
export function createApp({ config, dataSource, log = console.error, engine }: AppContext): EquilightApp {
  configureWorkers(config.workers);
  const store = new TypeOrmSessionStore(dataSource.getRepository(SessionRow), config.sessionMaxAgeMs);
  const audit = new AuditService(dataSource);
  const users = new UsersService(dataSource, store, audit, config.passwordHashRounds);
  const passport = createPassport(users);
  // With Redis (REDIS_URL, or QUEUE_URL on Redis): live events and sign-in limits span every process.
  const redis = config.redis ? openRedis(config.redis, 'commands', log) : null;
  const events = redis && config.redis ? new RedisEventBus(redis, config.redis, log) : new EventBus();
  const rateLimitStores =
    redis && config.redis ? redisRateLimitStores(redis, config.redis.prefix) : inProcessCounts;
  // Sign-out, deactivation and role changes end live connections (events/live-events.ts).
  store.on('ended', (sessionId: string) => events.publishAccessChange({ kind: 'session-ended', sessionId }));
  users.onAccessChange((userId) => events.publishAccessChange({ kind: 'person-changed', userId }));
  const instruments = new InstrumentsService(dataSource, audit);
  const queues = createQueues(config.queue, dataSource);
  const queue = queues.queue<IngestJobData>('ingest');
  const archive = createArchive(config.archive);
  const ingest = new IngestService(dataSource, archive, queue, events);
  const health = new HealthService(
    dataSource,
    archive,
    redis && config.redis ? { url: config.redis.url, ping: () => redis.ping() } : null,
  );
  const layouts = new LayoutsService(dataSource, audit);
  const manifests = new ManifestsService(dataSource, layouts, audit);
  const batches = new BatchesService(dataSource, layouts, manifests, audit, events, {
    engine,
    fourEyesApproval: config.fourEyesApproval,
    log,
  });
  const temperatures = new TemperaturesService(batches, new TemperatureSystemStore(dataSource), events, log);
  const mail = createMailModule({ config, dataSource, users, batches, events, log, rateLimitStores });
  const comments = new CommentsService(dataSource, audit, events);
  const reports = new ReportsService(batches, audit, comments);
  const watchers = new WatchersService(dataSource, instruments, audit, mail.mail, {
    silentMs: config.instrumentSilentMs,
    publicUrl: config.publicUrl,
    log,
  });
  const webhooks = createWebhooksModule({
    config,
    dataSource,
    audit,
    batches,
    ingest,
    events,
    batchMailer: mail.batchMailer,
    queues,
    log,
  });
  ingest.useBatchMatcher((manager, profileId, runId) => batches.attachStoredFile(manager, profileId, runId), {
    stored: (manager, batchId) => batches.fileStored(manager, batchId),
    committed: (batchId) => batches.fileCommitted(batchId),
  });
  const worker = queues.worker(queue, (job) => ingest.process(job), { concurrency: 2 });
  worker.on('failed', (job, err) => {
    log(`Ingest job ${job.id} failed after ${job.attemptsMade} tries`, err);
    void ingest.markFailed(job, err).catch((e: unknown) => log('Could not mark a failed ingest job', e));
  });
  worker.on('error', (err) => log('Ingest worker error', err));

  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', config.trustProxy);
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          // Angular Material injects component styles at run time.
          'style-src': ["'self'", "'unsafe-inline'"],
          // 'self' covers ws:/wss: to this same host (CSP level 3); no other host is reachable.
          'connect-src': ["'self'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          // Fonts ship with the app: nothing from another host.
          'font-src': ["'self'", 'data:'],
          'upgrade-insecure-requests': config.cookieSecure ? [] : null,
        },
      },
      // HSTS only when the app is served over HTTPS (COOKIE_SECURE=true); over plain HTTP it is meaningless.
      strictTransportSecurity: config.cookieSecure,
    }),
  );
  app.use(express.json({ limit: '1mb' }));
  app.use(cookieParser());

  const sessionParser = session({
    name: SESSION_COOKIE,
    secret: config.sessionSecret,
    store,
    resave: false,
    saveUninitialized: false,
    rolling: true,
    cookie: { httpOnly: true, sameSite: 'lax', secure: config.cookieSecure, maxAge: config.sessionMaxAgeMs },
  });

  const api = express.Router();
  // API answers are per person and change all the time: no browser or proxy may keep them.
  api.use((_req, res, next) => {
    res.setHeader('Cache-Control', 'no-store');
    next();
  });
  const csrf = createCsrfProtection({
    secret: config.sessionSecret,
    secureCookie: config.cookieSecure,
    sessionCookie: SESSION_COOKIE,
    publicUrl: config.publicUrl,
  });
  api.use(csrf.middleware);
  api.get('/health', health.handler());
  const openApi = buildOpenApiDocument(config.publicUrl);
  api.get('/openapi.json', (_req, res) => {
    res.json(openApi);
  });
  api.use(sessionParser, passport.initialize(), passport.session());
  api.use('/auth', authRouter(passport, users, config.loginRateLimit, csrf.issue, rateLimitStores));
  api.use('/users', usersRouter(users, config.publicUrl));
  api.use('/instruments', instrumentsRouter(instruments, config.uploadMaxBytes));
  api.use('/ingest', ingestRouter(ingest, instruments, config.uploadMaxBytes, watchers));
  api.use('/watcher', watcherApiRouter(watchers));
  api.use('/watchers', watchersRouter(watchers));
  api.use('/intake', intakeRouter(ingest, batches));
  api.use('/layouts', layoutsRouter(layouts));
  api.use('/manifests', manifestsRouter(manifests, config.uploadMaxBytes));
  api.use('/batches', batchesRouter(batches));
  api.use('/batches', reportsRouter(reports));
  api.use('/batches', commentsRouter(comments));
  mail.mount(api);
  api.use('/webhooks', webhooks.router);
  api.use('/audit', auditRouter(audit));
  api.use(
    '/overview',
    overviewRouter(new OverviewService(dataSource, batches, { fourEyesApproval: config.fourEyesApproval })),
  );
  api.use('/temperatures', temperaturesRouter(temperatures));
  api.use(apiNotFound);
  // JSON and CSV answers go out gzip'd or brotli'd when the client takes it (a batch's analysis, ~46 kB, goes out as ~9 kB).
  app.use('/api', compression(), api);

  serveWebApp(app, config.webDistDir);
  app.use(createErrorHandler(log));

  return {
    app,
    sessionParser,
    services: { users, instruments, ingest, audit, layouts, manifests, batches, watchers, temperatures },
    events,
    mail,
    webhooks,
    worker,
    queues,
    health,
    async start() {
      await events.start();
      for (const problem of await health.checkAtStart()) log(`Start check: ${problem}`);
      await mail.start();
      await webhooks.start();
      await worker.start();
      await ingest.recoverUnqueued();
      watchers.start();
      // Summaries of batches made before they were stored, and any left pending: in the background.
      void batches.startSummaryBackfill();
    },
    async close() {
      await watchers.stop();
      await worker.close();
      await batches.close();
      await temperatures.close();
      await closeWorkers();
      await queue.close();
      await mail.close();
      await webhooks.close();
      store.close();
      archive.close();
      await events.close();
      if (redis) await closeRedis(redis);
    },
  };
}
