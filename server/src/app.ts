import fs from 'node:fs';
import path from 'node:path';
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
import { csrfProtection } from './auth/csrf';
import { createPassport } from './auth/passport';
import { SessionRow } from './auth/session.entity';
import { TypeOrmSessionStore } from './auth/typeorm-session-store';
import { apiNotFound, createErrorHandler } from './common/error-handler';
import type { AppConfig } from './config';
import { EventBus } from './events/event-bus';
import { RawFileArchive } from './ingest/archive';
import { type IngestJobData, IngestService } from './ingest/ingest.service';
import { ingestRouter } from './ingest/ingest.router';
import { intakeRouter } from './ingest/intake.router';
import { instrumentsRouter } from './instruments/instruments.router';
import { InstrumentsService } from './instruments/instruments.service';
import { layoutsRouter } from './layouts/layouts.router';
import { createMailModule, type MailModule } from './mail/mail.module';
import { LayoutsService } from './layouts/layouts.service';
import { manifestsRouter } from './manifests/manifests.router';
import { ReportsService } from './reports/reports.service';
import { reportsRouter } from './reports/reports.router';
import { ManifestsService } from './manifests/manifests.service';
import { SqliteJobQueue, SqliteJobWorker } from './queue/sqlite-queue';
import { buildOpenApiDocument } from './openapi/openapi-document';
import { temperaturesRouter } from './temperatures/temperatures.router';
import { TemperaturesService } from './temperatures/temperatures.service';
import { usersRouter } from './users/users.router';
import { UsersService } from './users/users.service';

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
  };
  events: EventBus;
  /** E-mail: sender, local SMTP stand-in and outbox, notification settings. */
  mail: MailModule;
  worker: SqliteJobWorker<IngestJobData>;
  /** Start background work: resume queued jobs left by a previous run. */
  start(): Promise<void>;
  /** Stop background work and wait for running jobs. */
  close(): Promise<void>;
}

/** Build the Express app without listening: tests drive it with supertest. */
export function createApp({ config, dataSource, log = console.error, engine }: AppContext): EquilightApp {
  const users = new UsersService(dataSource);
  const store = new TypeOrmSessionStore(dataSource.getRepository(SessionRow), config.sessionMaxAgeMs);
  const passport = createPassport(users);
  const events = new EventBus();
  const audit = new AuditService(dataSource);
  const instruments = new InstrumentsService(dataSource, audit);
  const queue = new SqliteJobQueue<IngestJobData>('ingest', dataSource);
  const ingest = new IngestService(
    dataSource,
    new RawFileArchive(path.join(config.dataDir, 'archive')),
    queue,
    events,
  );
  const layouts = new LayoutsService(dataSource, audit);
  const manifests = new ManifestsService(dataSource, layouts, audit);
  const batches = new BatchesService(dataSource, layouts, manifests, audit, events, {
    engine,
    fourEyesApproval: config.fourEyesApproval,
  });
  const mail = createMailModule({ config, dataSource, users, batches, events, log });
  const reports = new ReportsService(batches, audit);
  ingest.useBatchMatcher((manager, profileId, runId) => batches.attachStoredFile(manager, profileId, runId));
  const worker = new SqliteJobWorker(queue, (job) => ingest.process(job), { concurrency: 2 });
  worker.on('failed', (job, err) => {
    log(`Ingest job ${job.id} failed after ${job.attemptsMade} tries`, err);
    void ingest.markFailed(job, err).catch((e: unknown) => log('Could not mark a failed ingest job', e));
  });
  worker.on('error', (err) => log('Ingest worker error', err));

  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          // Angular Material injects component styles at run time.
          'style-src': ["'self'", "'unsafe-inline'"],
          'connect-src': ["'self'", 'ws:', 'wss:'],
          'img-src': ["'self'", 'data:', 'blob:'],
          'upgrade-insecure-requests': config.cookieSecure ? [] : null,
        },
      },
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
  api.use(csrfProtection({ secret: config.sessionSecret, secureCookie: config.cookieSecure }));
  api.get('/health', (_req, res) => {
    res.json({ status: 'ok', service: 'equilight' });
  });
  const openApi = buildOpenApiDocument(config.publicUrl);
  api.get('/openapi.json', (_req, res) => {
    res.json(openApi);
  });
  api.use(sessionParser, passport.initialize(), passport.session());
  api.use('/auth', authRouter(passport, users, config.loginRateLimit));
  api.use('/users', usersRouter(users, config.publicUrl));
  api.use('/instruments', instrumentsRouter(instruments, config.uploadMaxBytes));
  api.use('/ingest', ingestRouter(ingest, instruments, config.uploadMaxBytes));
  api.use('/intake', intakeRouter(ingest, batches));
  api.use('/layouts', layoutsRouter(layouts));
  api.use('/manifests', manifestsRouter(manifests, config.uploadMaxBytes));
  api.use('/batches', batchesRouter(batches));
  api.use('/batches', reportsRouter(reports));
  mail.mount(api);
  api.use('/audit', auditRouter(audit));
  api.use('/temperatures', temperaturesRouter(new TemperaturesService(batches)));
  api.use(apiNotFound);
  app.use('/api', api);

  serveWebApp(app, config.webDistDir);
  app.use(createErrorHandler(log));

  return {
    app,
    sessionParser,
    services: { users, instruments, ingest, audit, layouts, manifests, batches },
    events,
    mail,
    worker,
    async start() {
      await mail.start();
      await worker.start();
      await ingest.recoverUnqueued();
    },
    async close() {
      await worker.close();
      await queue.close();
      await mail.close();
      store.close();
    },
  };
}

/** Serve the built Angular app, with index.html for any client route. */
function serveWebApp(app: Express, webDistDir: string): void {
  const indexFile = path.join(webDistDir, 'index.html');
  app.use(express.static(webDistDir, { index: false, maxAge: '1h' }));
  app.get('/{*any}', (_req, res, next) => {
    if (!fs.existsSync(indexFile)) return next();
    res.setHeader('Cache-Control', 'no-cache');
    res.sendFile(indexFile);
  });
}
