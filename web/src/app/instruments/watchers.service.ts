import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { type Observable, map } from 'rxjs';

/** The last report of a watcher watching a profile's drop folder. */
export interface WatcherPresence {
  profileId: number;
  watcherName: string;
  version: string | null;
  hostname: string | null;
  lastSeenAt: string;
  /** No report for longer than the server's INSTRUMENT_SILENT_MINUTES. */
  silent: boolean;
}

/** A watcher credential (the token itself is shown once, at creation). */
export interface WatcherCredential {
  id: number;
  name: string;
  tokenPrefix: string;
  createdAt: string;
  revokedAt: string | null;
  lastSeenAt: string | null;
  version: string | null;
  hostname: string | null;
  folders: string[];
}

function isPresence(v: unknown): v is WatcherPresence {
  const p = v as Partial<WatcherPresence> | null;
  return (
    !!p &&
    typeof p.profileId === 'number' &&
    typeof p.watcherName === 'string' &&
    typeof p.lastSeenAt === 'string' &&
    typeof p.silent === 'boolean'
  );
}

function isCredential(v: unknown): v is WatcherCredential {
  const c = v as Partial<WatcherCredential> | null;
  return !!c && typeof c.id === 'number' && typeof c.name === 'string' && Array.isArray(c.folders);
}

function checked<T>(guard: (v: unknown) => v is T, what: string) {
  return (rows: unknown): T[] => {
    if (!Array.isArray(rows) || !rows.every(guard))
      throw new Error(`The server answered with unexpected ${what}.`);
    return rows;
  };
}

/** /api/watchers: credentials (admins) and presence per profile (admins, lab managers). */
@Injectable({ providedIn: 'root' })
export class WatchersService {
  private readonly http = inject(HttpClient);

  presence(): Observable<WatcherPresence[]> {
    return this.http.get<unknown>('/api/watchers/presence').pipe(map(checked(isPresence, 'watcher reports')));
  }

  list(): Observable<WatcherCredential[]> {
    return this.http.get<unknown>('/api/watchers').pipe(map(checked(isCredential, 'watcher credentials')));
  }

  create(name: string): Observable<{ watcher: WatcherCredential; token: string }> {
    return this.http.post<unknown>('/api/watchers', { name }).pipe(
      map((res) => {
        const r = res as { watcher?: unknown; token?: unknown } | null;
        if (!isCredential(r?.watcher) || typeof r?.token !== 'string')
          throw new Error('The server answered without the watcher credential.');
        return { watcher: r.watcher, token: r.token };
      }),
    );
  }

  revoke(id: number): Observable<WatcherCredential> {
    return this.http.delete<unknown>(`/api/watchers/${id}`).pipe(
      map((res) => {
        if (!isCredential(res)) throw new Error('The server answered with an unexpected credential.');
        return res;
      }),
    );
  }
}
