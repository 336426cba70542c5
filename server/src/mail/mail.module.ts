import type { Router } from 'express';
import type { DataSource } from 'typeorm';
import type { BatchesService } from '../batches/batches.service';
import type { AppConfig } from '../config';
import type { EventBus } from '../events/event-bus';
import type { UsersService } from '../users/users.service';
import { SET_PASSWORD_TTL_HOURS } from '../users/users.service';
import { BatchMailer } from './batch-mailer';
import { invitationMail } from './mail-templates';
import { forgotPasswordRouter, notificationsRouter, outboxRouter } from './mail.router';
import { MailService, type MailServiceOptions } from './mail.service';
import { NotificationsService } from './notifications.service';
import { OutboxService } from './outbox.service';
import { SmtpStandIn } from './smtp-stand-in';
import type { RateLimitStores } from '../redis/rate-limit-stores';

export interface MailModule {
  mail: MailService;
  standIn: SmtpStandIn;
  notifications: NotificationsService;
  outbox: OutboxService;
  batchMailer: BatchMailer;
  /** Mount the routes on the /api router. */
  mount(api: Router): void;
  /** Start the stand-in (when configured) and listen to batch events. */
  start(): Promise<void>;
  /** Wait until every mail triggered so far has gone out (or been given up). */
  idle(): Promise<void>;
  close(): Promise<void>;
}

/** E-mail: the sender, the local stand-in with its outbox, notification settings and the mails' triggers. */
export function createMailModule(deps: {
  config: AppConfig;
  dataSource: DataSource;
  users: UsersService;
  batches: BatchesService;
  events: EventBus;
  log: (message: string, err?: unknown) => void;
  options?: MailServiceOptions;
  /** Where the reset-request limits count (shared through Redis by several processes). */
  rateLimitStores?: RateLimitStores;
}): MailModule {
  const { config, dataSource, users, batches, events, log } = deps;
  const mail = new MailService(
    config.mail,
    log,
    deps.options ?? (config.env === 'test' ? { retryDelayMs: 50 } : {}),
  );
  const standIn = new SmtpStandIn(dataSource, log);
  const notifications = new NotificationsService(dataSource);
  const outbox = new OutboxService(dataSource);
  const batchMailer = new BatchMailer(dataSource, batches, notifications, mail, config.publicUrl, log);

  users.onInvitation((user, token) => {
    const link = `${config.publicUrl}/set-password?token=${encodeURIComponent(token)}`;
    mail.send(user.email, invitationMail(user.displayName, link, SET_PASSWORD_TTL_HOURS));
  });

  return {
    mail,
    standIn,
    notifications,
    outbox,
    batchMailer,
    mount(api) {
      api.use('/me/notifications', notificationsRouter(notifications));
      api.use(
        '/outbox',
        outboxRouter(outbox, () => standIn.running),
      );
      api.use(
        '/auth/forgot-password',
        forgotPasswordRouter(users, mail, config.publicUrl, config.loginRateLimit, log, deps.rateLimitStores),
      );
    },
    async start() {
      if (config.mail.standIn && !standIn.running) {
        try {
          const port = await standIn.start(config.mail.standInPort);
          mail.useStandIn(port);
          if (config.env !== 'test')
            console.log(`Mail stand-in listening on smtp://127.0.0.1:${port} (see the Outbox page)`);
        } catch (err) {
          log(`The mail stand-in could not listen on port ${config.mail.standInPort}; mail is off`, err);
        }
      }
      batchMailer.start(events);
    },
    async idle() {
      await batchMailer.idle();
      await mail.idle();
      await standIn.idle();
    },
    async close() {
      batchMailer.stop();
      await batchMailer.idle();
      await mail.idle();
      mail.close();
      await standIn.stop();
    },
  };
}
