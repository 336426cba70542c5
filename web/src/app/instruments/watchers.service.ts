import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import {
  type PresenceDto,
  type WatcherCredentialDto,
  createdWatcherSchema,
  presenceSchema,
  watcherCredentialSchema,
} from '@equilight/contracts';
import type { Observable } from 'rxjs';
import * as z from 'zod';
import { parsed } from '../core/http/api-response';

/** The last report of a watcher watching a profile's drop folder. */
export type WatcherPresence = PresenceDto;
/** A watcher credential (the token itself is shown once, at creation). */
export type WatcherCredential = WatcherCredentialDto;

/** /api/watchers: credentials (admins) and presence per profile (admins, lab managers). */
@Injectable({ providedIn: 'root' })
export class WatchersService {
  private readonly http = inject(HttpClient);

  presence(): Observable<WatcherPresence[]> {
    return this.http
      .get<unknown>('/api/watchers/presence')
      .pipe(parsed(z.array(presenceSchema), 'watcher reports'));
  }

  list(): Observable<WatcherCredential[]> {
    return this.http
      .get<unknown>('/api/watchers')
      .pipe(parsed(z.array(watcherCredentialSchema), 'watcher credentials'));
  }

  create(name: string): Observable<{ watcher: WatcherCredential; token: string }> {
    return this.http
      .post<unknown>('/api/watchers', { name })
      .pipe(parsed(createdWatcherSchema, 'new watcher credential'));
  }

  revoke(id: number): Observable<WatcherCredential> {
    return this.http
      .delete<unknown>(`/api/watchers/${id}`)
      .pipe(parsed(watcherCredentialSchema, 'watcher credential'));
  }
}
