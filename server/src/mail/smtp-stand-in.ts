import type { AddressInfo } from 'node:net';
import { type AddressObject, simpleParser } from 'mailparser';
import { SMTPServer } from 'smtp-server';
import type { DataSource, Repository } from 'typeorm';
import { OutboxMessage } from './mail.entity';

const MAX_MESSAGE_BYTES = 10 * 1024 * 1024;

function addressText(value: AddressObject | AddressObject[] | undefined): string {
  if (!value) return '';
  return (Array.isArray(value) ? value : [value]).map((a) => a.text).join(', ');
}

/**
 * A real SMTP server on the loopback interface for development and tests: it accepts every message
 * and keeps it in the `outbox_messages` table, where admins read it on the Outbox page.
 */
export class SmtpStandIn {
  private server: SMTPServer | null = null;
  private readonly outbox: Repository<OutboxMessage>;
  private boundPort: number | null = null;
  private readonly received = new Set<Promise<void>>();

  constructor(
    dataSource: DataSource,
    private readonly log: (message: string, err?: unknown) => void = console.error,
  ) {
    this.outbox = dataSource.getRepository(OutboxMessage);
  }

  get running(): boolean {
    return this.boundPort !== null;
  }

  /** The port it listens on, once started. */
  get port(): number | null {
    return this.boundPort;
  }

  get url(): string | null {
    return this.boundPort === null ? null : `smtp://127.0.0.1:${this.boundPort}`;
  }

  /** Listen on 127.0.0.1; port 0 takes any free port. */
  async start(port: number): Promise<number> {
    const server = new SMTPServer({
      authOptional: true,
      disabledCommands: ['STARTTLS', 'AUTH'],
      logger: false,
      banner: 'Equilight local mail stand-in',
      size: MAX_MESSAGE_BYTES,
      onData: (stream, _session, callback) => {
        const chunks: Buffer[] = [];
        stream.on('data', (chunk: Buffer) => chunks.push(chunk));
        stream.on('error', (err) => callback(err));
        stream.on('end', () => {
          if (stream.sizeExceeded) {
            callback(Object.assign(new Error('Message too large'), { responseCode: 552 }));
            return;
          }
          const job = this.store(Buffer.concat(chunks)).then(
            () => callback(),
            (err: unknown) => {
              this.log('The mail stand-in could not store a message', err);
              callback(Object.assign(new Error('Could not store the message'), { responseCode: 451 }));
            },
          );
          this.received.add(job);
          void job.finally(() => this.received.delete(job));
        });
      },
    });
    server.on('error', (err) => this.log('Mail stand-in error', err));
    await new Promise<void>((resolve, reject) => {
      const onError = (err: Error): void => reject(err);
      server.server.once('error', onError);
      server.listen(port, '127.0.0.1', () => {
        server.server.off('error', onError);
        resolve();
      });
    });
    this.server = server;
    this.boundPort = (server.server.address() as AddressInfo).port;
    return this.boundPort;
  }

  private async store(raw: Buffer): Promise<void> {
    const mail = await simpleParser(raw, { skipImageLinks: true, skipTextToHtml: true });
    await this.outbox.insert({
      from: addressText(mail.from),
      to: addressText(mail.to),
      subject: mail.subject ?? '',
      text: mail.text ?? null,
      html: typeof mail.html === 'string' ? mail.html : null,
      rawSize: raw.length,
      receivedAt: new Date().toISOString(),
    });
  }

  /** Wait until every message received so far is stored. */
  async idle(): Promise<void> {
    while (this.received.size) await Promise.allSettled([...this.received]);
  }

  async stop(): Promise<void> {
    const server = this.server;
    this.server = null;
    this.boundPort = null;
    if (!server) return;
    await new Promise<void>((resolve) => server.close(() => resolve()));
    await Promise.allSettled([...this.received]);
  }
}
