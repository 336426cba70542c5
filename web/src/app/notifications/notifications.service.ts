import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { type Observable, map } from 'rxjs';

/** Which mails the signed-in person wants. */
export interface NotificationSettings {
  batchComplete: boolean;
  qcFailure: boolean;
  batchApproved: boolean;
}

function checkSettings(value: unknown): NotificationSettings {
  const s = value as Partial<NotificationSettings> | null;
  if (
    !s ||
    typeof s.batchComplete !== 'boolean' ||
    typeof s.qcFailure !== 'boolean' ||
    typeof s.batchApproved !== 'boolean'
  )
    throw new Error('The server answered with unexpected notification settings.');
  return { batchComplete: s.batchComplete, qcFailure: s.qcFailure, batchApproved: s.batchApproved };
}

/** The /api/me/notifications resource. */
@Injectable({ providedIn: 'root' })
export class NotificationsService {
  private readonly http = inject(HttpClient);

  get(): Observable<NotificationSettings> {
    return this.http.get<unknown>('/api/me/notifications').pipe(map(checkSettings));
  }

  save(settings: NotificationSettings): Observable<NotificationSettings> {
    return this.http.put<unknown>('/api/me/notifications', settings).pipe(map(checkSettings));
  }
}
