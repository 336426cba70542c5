import { ADMIN_ONLY, EVERYONE, MANAGERS, type Role } from './roles';

/**
 * Who may call each API operation: the one list the server's role checks (routes.ts, checked against the
 * mounted routes by a test) and the web app's pages (their navigation and guards) read. Kept apart from the
 * request and response schemas so that the web app's first script need not build every schema to know a
 * page's roles. `instrument`: an instrument token or a signed-in uploader; `watcher`: a watcher credential
 * (eqw_) or an instrument token.
 */
export type Access = 'public' | 'instrument' | 'watcher' | readonly Role[];

export const ROUTE_ACCESS = {
  'get /api/health': 'public',
  'post /api/auth/login': 'public',
  'post /api/auth/logout': 'public',
  'get /api/auth/me': EVERYONE,
  'post /api/auth/set-password': 'public',
  'get /api/users': ADMIN_ONLY,
  'post /api/users': ADMIN_ONLY,
  'patch /api/users/{id}': ADMIN_ONLY,
  'get /api/instruments': MANAGERS,
  'get /api/overview': EVERYONE,
  'get /api/instruments/summary': EVERYONE,
  'post /api/instruments': ADMIN_ONLY,
  'patch /api/instruments/{id}': ADMIN_ONLY,
  'post /api/instruments/{id}/token': ADMIN_ONLY,
  'delete /api/instruments/{id}/token': ADMIN_ONLY,
  'post /api/instruments/try': ADMIN_ONLY,
  'post /api/ingest': 'instrument',
  'get /api/watcher/folders': 'watcher',
  'post /api/watcher/heartbeat': 'watcher',
  'get /api/watcher/files/{id}': 'watcher',
  'get /api/watchers': ADMIN_ONLY,
  'post /api/watchers': ADMIN_ONLY,
  'delete /api/watchers/{id}': ADMIN_ONLY,
  'get /api/watchers/presence': MANAGERS,
  'get /api/intake': MANAGERS,
  'get /api/intake/{id}': MANAGERS,
  'get /api/intake/raw/{sha256}': MANAGERS,
  'post /api/intake/{id}/requeue': MANAGERS,
  'post /api/intake/{id}/assign': MANAGERS,
  'get /api/layouts': EVERYONE,
  'get /api/layouts/{id}': EVERYONE,
  'get /api/layouts/{id}/versions/{version}': EVERYONE,
  'post /api/layouts': MANAGERS,
  'put /api/layouts/{id}': MANAGERS,
  'get /api/manifests': EVERYONE,
  'get /api/manifests/{id}': EVERYONE,
  'get /api/manifests/{id}/versions/{version}': EVERYONE,
  'post /api/manifests/check': MANAGERS,
  'post /api/manifests': MANAGERS,
  'put /api/manifests/{id}': MANAGERS,
  'get /api/batches': EVERYONE,
  'post /api/batches': MANAGERS,
  'get /api/batches/{id}': EVERYONE,
  'get /api/batches/{id}/analysis': EVERYONE,
  'get /api/batches/{id}/results': EVERYONE,
  'get /api/batches/{id}/results/{recordId}': EVERYONE,
  'get /api/batches/{id}/epsilon-sources': EVERYONE,
  'put /api/batches/{id}/settings': ['lab_manager', 'scientist'] as const,
  'post /api/batches/{id}/review': ['lab_manager', 'scientist'] as const,
  'post /api/batches/{id}/approve': ['lab_manager'] as const,
  'post /api/batches/{id}/reopen': ['lab_manager'] as const,
  'get /api/batches/{id}/comments': EVERYONE,
  'post /api/batches/{id}/comments': ['lab_manager', 'scientist'] as const,
  'delete /api/batches/{id}/comments/{commentId}': ['lab_manager', 'scientist'] as const,
  'get /api/audit': MANAGERS,
  'get /api/batches/{id}/export.csv': EVERYONE,
  'get /api/batches/{id}/report.pdf': EVERYONE,
  'get /api/batches/{id}/report.xlsx': EVERYONE,
  'post /api/auth/forgot-password': 'public',
  'get /api/me/notifications': EVERYONE,
  'put /api/me/notifications': EVERYONE,
  'get /api/outbox/status': EVERYONE,
  'get /api/outbox': ADMIN_ONLY,
  'get /api/outbox/{id}': ADMIN_ONLY,
  'get /api/webhooks': ADMIN_ONLY,
  'post /api/webhooks': ADMIN_ONLY,
  'get /api/webhooks/{id}': ADMIN_ONLY,
  'patch /api/webhooks/{id}': ADMIN_ONLY,
  'delete /api/webhooks/{id}': ADMIN_ONLY,
  'get /api/webhooks/deliveries': ADMIN_ONLY,
  'get /api/webhooks/deliveries/{id}': ADMIN_ONLY,
  'post /api/webhooks/deliveries/{id}/resend': ADMIN_ONLY,
  'get /api/temperatures': EVERYONE,
  'get /api/temperatures/points': EVERYONE,
  'get /api/openapi.json': 'public',
} as const satisfies Record<string, Access>;

export type RouteKey = keyof typeof ROUTE_ACCESS;

/** The roles a signed-in operation lets through (the web's pages take theirs from here). */
export function rolesOf(method: string, path: string): readonly Role[] {
  const access: Access | undefined = (ROUTE_ACCESS as Record<string, Access>)[`${method} ${path}`];
  if (!access || typeof access === 'string') throw new Error(`No signed-in operation ${method} ${path}`);
  return access;
}
