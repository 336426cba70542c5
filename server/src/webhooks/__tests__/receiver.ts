import crypto from 'node:crypto';
import http from 'node:http';
import type { AddressInfo } from 'node:net';

export interface Received {
  path: string;
  headers: http.IncomingHttpHeaders;
  body: string;
  payload: { id: string; event: string; occurredAt: string; data: Record<string, unknown> };
  signatureValid: boolean;
  answered: number;
}

/**
 * A real HTTP receiver on 127.0.0.1, as a LIMS would run one: it checks the signature with the shared
 * secret (recomputed here from the raw body, independently of the server's code) and answers by path:
 * /ok → 200; /flaky → 500 for the first two tries of each event id, then 200; /down → 503 while `down`;
 * /silent → never answers.
 */
export class Receiver {
  readonly received: Received[] = [];
  down = true;
  private readonly server: http.Server;
  private readonly tries = new Map<string, number>();
  port = 0;

  constructor(private readonly secret: string) {
    this.server = http.createServer((req, res) => {
      const chunks: Buffer[] = [];
      req.on('data', (c: Buffer) => chunks.push(c));
      req.on('end', () => {
        const body = Buffer.concat(chunks).toString('utf8');
        const header = String(req.headers['x-equilight-signature'] ?? '');
        const match = /^t=(\d+),v1=([0-9a-f]{64})$/.exec(header);
        const expected = match
          ? crypto.createHmac('sha256', this.secret).update(`${match[1]}.${body}`).digest('hex')
          : '';
        const signatureValid =
          !!match && crypto.timingSafeEqual(Buffer.from(expected, 'hex'), Buffer.from(match[2]!, 'hex'));
        const payload = JSON.parse(body) as Received['payload'];
        const path = req.url ?? '/';
        if (path === '/silent') return; // keep the connection hanging: the sender must time out
        let status = 200;
        const n = (this.tries.get(`${path} ${payload.id}`) ?? 0) + 1;
        this.tries.set(`${path} ${payload.id}`, n);
        if (!signatureValid) status = 401;
        else if (path === '/flaky' && n <= 2) status = 500;
        else if (path === '/down' && this.down) status = 503;
        this.received.push({ path, headers: req.headers, body, payload, signatureValid, answered: status });
        res.writeHead(status, { 'Content-Type': 'text/plain' }).end(status === 200 ? 'ok' : 'try later');
      });
    });
  }

  async listen(): Promise<void> {
    await new Promise<void>((resolve) => this.server.listen(0, '127.0.0.1', resolve));
    this.port = (this.server.address() as AddressInfo).port;
  }

  url(path: string): string {
    return `http://127.0.0.1:${this.port}${path}`;
  }

  /** Requests for one event id that the receiver accepted (2xx). */
  accepted(eventId: string): Received[] {
    return this.received.filter((r) => r.payload.id === eventId && r.answered === 200);
  }

  close(): Promise<void> {
    this.server.closeAllConnections();
    return new Promise((resolve) => this.server.close(() => resolve()));
  }
}
