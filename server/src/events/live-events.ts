import type http from 'node:http';
import type { Duplex } from 'node:stream';
import type { Request, RequestHandler, Response } from 'express';
import { WebSocket, WebSocketServer } from 'ws';
import type { UsersService } from '../users/users.service';
import type { EventBus } from './event-bus';

export const LIVE_EVENTS_PATH = '/api/events';
const HEARTBEAT_MS = 30_000;

interface SessionWithPassport {
  passport?: { user?: number };
}

function refuse(socket: Duplex, status: number, reason: string): void {
  socket.write(`HTTP/1.1 ${status} ${reason}\r\nConnection: close\r\nContent-Length: 0\r\n\r\n`);
  socket.destroy();
}

/** No Origin (not a browser) or one naming this host; an Origin that does not parse is foreign. */
function isSameOrigin(origin: string | undefined, host: string | undefined): boolean {
  if (origin === undefined) return true;
  try {
    return new URL(origin).host === host;
  } catch {
    return false;
  }
}

/** The signed-in, active user of an upgrade request, found through the same session cookie as the API. */
function sessionUserId(
  sessionParser: RequestHandler,
  req: http.IncomingMessage,
): Promise<number | undefined> {
  return new Promise((resolve) => {
    sessionParser(req as Request, {} as Response, () => {
      resolve((req as Request & { session?: SessionWithPassport }).session?.passport?.user);
    });
  });
}

/**
 * WebSocket endpoint that streams live events to signed-in browsers. An upgrade without a valid
 * session, or from another origin, is refused before the socket opens.
 */
export function attachLiveEvents(
  server: http.Server,
  deps: { sessionParser: RequestHandler; users: UsersService; events: EventBus },
): { close(): void; clientCount(): number } {
  const wss = new WebSocketServer({ noServer: true, maxPayload: 4096 });
  const alive = new WeakMap<WebSocket, boolean>();

  server.on('upgrade', (req, socket, head) => {
    void (async () => {
      const url = new URL(req.url ?? '/', 'http://placeholder');
      if (url.pathname !== LIVE_EVENTS_PATH) return refuse(socket, 404, 'Not Found');
      if (!isSameOrigin(req.headers.origin, req.headers.host)) return refuse(socket, 403, 'Forbidden');
      const userId = await sessionUserId(deps.sessionParser, req);
      const user = userId ? await deps.users.findById(userId) : null;
      if (!user || !user.active) return refuse(socket, 401, 'Unauthorized');
      wss.handleUpgrade(req, socket, head, (ws) => {
        alive.set(ws, true);
        ws.on('pong', () => alive.set(ws, true));
        ws.on('message', () => undefined); // the stream is one-way; client messages are ignored
        ws.send(JSON.stringify({ type: 'hello', data: { userId: user.id }, at: new Date().toISOString() }));
      });
    })().catch(() => refuse(socket, 500, 'Internal Server Error'));
  });

  const unsubscribe = deps.events.subscribe((event) => {
    const text = JSON.stringify(event);
    for (const client of wss.clients) if (client.readyState === WebSocket.OPEN) client.send(text);
  });

  const heartbeat = setInterval(() => {
    for (const client of wss.clients) {
      if (!alive.get(client)) {
        client.terminate();
        continue;
      }
      alive.set(client, false);
      client.ping();
    }
  }, HEARTBEAT_MS);
  heartbeat.unref();

  return {
    close() {
      clearInterval(heartbeat);
      unsubscribe();
      for (const client of wss.clients) client.terminate();
      wss.close();
    },
    clientCount: () => wss.clients.size,
  };
}
