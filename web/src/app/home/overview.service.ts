import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { overviewSchema } from '@equilight/contracts';
import type { Observable } from 'rxjs';
import { parsed } from '../core/http/api-response';
import { type Overview, startOfLocalDay } from './overview';

/** GET /api/overview, with "today" starting at the browser's local midnight. */
@Injectable({ providedIn: 'root' })
export class OverviewService {
  private readonly http = inject(HttpClient);

  get(now = new Date()): Observable<Overview> {
    return this.http
      .get<unknown>('/api/overview', { params: { since: startOfLocalDay(now).toISOString() } })
      .pipe(parsed(overviewSchema, 'overview'));
  }
}
