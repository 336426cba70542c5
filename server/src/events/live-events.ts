import type http from 'node:http';
import type { Duplex } from 'node:stream';
import type { Request, RequestHandler, Response } from 'express';
import type { SessionData, Store } from 'express-session';
import { WebSocket, WebSocketServer } from 'ws';
import type { Role } from '../users/user.entity';
import type { UsersService } from '../users/users.service';
import { eventForRole } from './event-access';
import type { EventBus } from './event-bus';

export const LIVE_EVENTS_PATH = '/api/events';
const HEARTBEAT_MS = 30_000;
/** Sessions and people are read again this often, so an expiry or a change made elsewhere ends a socket too. */
export const ACCESS_RECHECK_MS = 60_000;
/** Close codes (4000–4999 are the application's): the session ended; the person's access changed. */
export const CLOSE_SESSION_ENDED = 4401;
export const CLOSE_ACCESS_CHANGED = 4403;

interface SessionWithPassport {
  passport?: { user?: number };
}

/** Who is at the other end of a socket, as checked at the upgrade. */
interface Listener {
  userId: number;
  role: Role;
  sessionId: string;
  store: Store | undefined;
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

/** The session of an upgrade request, found through the same session cookie as the API. */
function readSession(
  sessionParser: RequestHandler,
  req: http.IncomingMessage,
): Promise<{ userId: number | undefined; sessionId: string; store: Store | undefined }> {
  return new Promise((resolve) => {
    sessionParser(req as Request, {} as Response, () => {
      const r = req as Request & { session?: SessionWithPassport };
      resolve({ userId: r.session?.passport?.user, sessionId: r.sessionID, store: r.sessionStore });
    });
  });
}

function storedSession(store: Store, sessionId: string): Promise<SessionData | null> {
  return new Promise((resolve, reject) =>
    store.get(sessionId, (err: unknown, data?: SessionData | null) =>
      err ? reject(err) : resolve(data ?? null),
    ),
  );
}

/**
 * WebSocket endpoint that streams live events to signed-in browsers. An upgrade without a valid
 * session, or from another origin, is refused before the socket opens. Each event is sent as the
 * person's role may see it (event-access.ts). A socket closes when its session ends (sign-out), or its
 * person is deactivated or changes role: at once on those changes, and at the latest at the next
 * re-check (every ACCESS_RECHECK_MS) for anything else, such as an expired session.
 */
export function attachLiveEvents(
  server: http.Server,
  deps: { sessionParser: RequestHandler; users: UsersService; events: EventBus },
): { close(): void; clientCount(): number } {
  const wss = new WebSocketServer({ noServer: true, maxPayload: 4096 });
  const alive = new WeakMap<WebSocket, boolean>();
  const listeners = new Map<WebSocket, Listener>();

  const end = (ws: WebSocket, code: number, reason: string) => {
    listeners.delete(ws);
    ws.close(code, reason);
    // A peer that does not answer the close handshake is cut off.
    setTimeout(() => ws.terminate(), 2000).unref();
  };

  /** Is this socket's session still there, and its person still active with the same role? */
  const recheck = async (ws: WebSocket, who: Listener): Promise<void> => {
    const session = who.store ? await storedSession(who.store, who.sessionId) : null;
    if ((session as SessionWithPassport | null)?.passport?.user !== who.userId) {
      return end(ws, CLOSE_SESSION_ENDED, 'session ended');
    }
    const user = await deps.users.findById(who.userId);
    if (!user || !user.active || user.role !== who.role) end(ws, CLOSE_ACCESS_CHANGED, 'access changed');
  };
  const recheckAll = (match: (who: Listener) => boolean = () => true) => {
    for (const [ws, who] of listeners) {
      if (match(who)) void recheck(ws, who).catch(() => end(ws, CLOSE_ACCESS_CHANGED, 'access unknown'));
    }
  };

  server.on('upgrade', (req, socket, head) => {
    void (async () => {
      const url = new URL(req.url ?? '/', 'http://placeholder');
      if (url.pathname !== LIVE_EVENTS_PATH) return refuse(socket, 404, 'Not Found');
      if (!isSameOrigin(req.headers.origin, req.headers.host)) return refuse(socket, 403, 'Forbidden');
      const { userId, sessionId, store } = await readSession(deps.sessionParser, req);
      const user = userId ? await deps.users.findById(userId) : null;
      if (!user || !user.active) return refuse(socket, 401, 'Unauthorized');
      wss.handleUpgrade(req, socket, head, (ws) => {
        listeners.set(ws, { userId: user.id, role: user.role, sessionId, store });
        ws.on('close', () => listeners.delete(ws));
        alive.set(ws, true);
        ws.on('pong', () => alive.set(ws, true));
        ws.on('message', () => undefined); // the stream is one-way; client messages are ignored
        ws.send(JSON.stringify({ type: 'hello', data: { userId: user.id }, at: new Date().toISOString() }));
      });
    })().catch(() => refuse(socket, 500, 'Internal Server Error'));
  });

  const unsubscribe = deps.events.subscribe((event) => {
    // One serialisation and one UTF-8 encoding per role, not per socket; sent as text frames.
    const texts = new Map<Role, Buffer | null>();
    for (const [client, who] of listeners) {
      if (client.readyState !== WebSocket.OPEN) continue;
      if (!texts.has(who.role)) {
        const seen = eventForRole(who.role, event);
        texts.set(who.role, seen ? Buffer.from(JSON.stringify(seen)) : null);
      }
      const text = texts.get(who.role);
      if (text) client.send(text, { binary: false });
    }
  });
  const stopAccess = deps.events.onAccessChange((change) => {
    if (change.kind === 'session-ended') {
      for (const [ws, who] of listeners) {
        if (who.sessionId === change.sessionId) end(ws, CLOSE_SESSION_ENDED, 'session ended');
      }
    } else {
      recheckAll((who) => who.userId === change.userId);
    }
  });
  const accessTimer = setInterval(() => recheckAll(), ACCESS_RECHECK_MS);
  accessTimer.unref();

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
      clearInterval(accessTimer);
      unsubscribe();
      stopAccess();
      for (const client of wss.clients) client.terminate();
      wss.close();
    },
    clientCount: () => wss.clients.size,
  };
}
