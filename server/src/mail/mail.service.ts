import nodemailer, { type Transporter } from 'nodemailer';
import type { MailConfig } from '../config';
import type { MailContent } from './mail-templates';

export interface MailServiceOptions {
  /** Tries per message, the first included. */
  attempts?: number;
  /** Wait before the first retry; it doubles on each further retry. */
  retryDelayMs?: number;
}

/**
 * Sends mail over SMTP with nodemailer. Sending happens in the background: a failure is logged and
 * retried a few times, and never reaches the request that caused the mail.
 */
export class MailService {
  private transport: Transporter | null = null;
  private readonly pending = new Set<Promise<void>>();
  private readonly attempts: number;
  private readonly retryDelayMs: number;

  constructor(
    private readonly config: MailConfig,
    private readonly log: (message: string, err?: unknown) => void = console.error,
    options: MailServiceOptions = {},
  ) {
    this.attempts = options.attempts ?? 4;
    this.retryDelayMs = options.retryDelayMs ?? 2_000;
    if (config.smtpUrl) this.transport = nodemailer.createTransport(config.smtpUrl);
  }

  /** Send through the local stand-in when no SMTP_URL is configured. */
  useStandIn(port: number): void {
    if (this.config.smtpUrl) return;
    this.transport?.close();
    this.transport = nodemailer.createTransport({ host: '127.0.0.1', port, secure: false, ignoreTLS: true });
  }

  get enabled(): boolean {
    return this.transport !== null;
  }

  /** Queue one message to one address; resolves at once. */
  send(to: string, content: MailContent): void {
    if (!this.transport) {
      this.log(`No SMTP server is configured; not sending "${content.subject}" to ${to}.`);
      return;
    }
    const job = this.deliver(to, content);
    this.pending.add(job);
    void job.finally(() => this.pending.delete(job));
  }

  private async deliver(to: string, content: MailContent): Promise<void> {
    for (let attempt = 1; ; attempt++) {
      const transport = this.transport;
      if (!transport) return;
      try {
        await transport.sendMail({
          from: this.config.from,
          to,
          subject: content.subject,
          text: content.text,
          html: content.html,
        });
        return;
      } catch (err) {
        if (attempt >= this.attempts) {
          this.log(`Could not send "${content.subject}" to ${to} after ${attempt} tries`, err);
          return;
        }
        await new Promise((resolve) => setTimeout(resolve, this.retryDelayMs * 2 ** (attempt - 1)));
      }
    }
  }

  /** Wait until every queued message has been delivered or given up (tests, shutdown). */
  async idle(): Promise<void> {
    while (this.pending.size) await Promise.allSettled([...this.pending]);
  }

  close(): void {
    this.transport?.close();
    this.transport = null;
  }
}
