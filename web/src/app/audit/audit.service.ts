import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { type Observable, map } from 'rxjs';
import { type AuditPage, type AuditQuery, isAuditPage } from './audit-entry';

/** The /api/audit resource: read-only, filtered and paged on the server. */
@Injectable({ providedIn: 'root' })
export class AuditService {
  private readonly http = inject(HttpClient);

  list(query: AuditQuery): Observable<AuditPage> {
    let params = new HttpParams();
    for (const [key, value] of Object.entries(query)) {
      if (value !== undefined && value !== null && value !== '') params = params.set(key, String(value));
    }
    return this.http.get<unknown>('/api/audit', { params }).pipe(
      map((page) => {
        if (!isAuditPage(page)) throw new Error('The server answered with an unexpected audit page.');
        return page;
      }),
    );
  }
}
