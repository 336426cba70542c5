import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { type Observable, map } from 'rxjs';
import { type Overview, isOverview, startOfLocalDay } from './overview';

/** GET /api/overview, with "today" starting at the browser's local midnight. */
@Injectable({ providedIn: 'root' })
export class OverviewService {
  private readonly http = inject(HttpClient);

  get(now = new Date()): Observable<Overview> {
    return this.http
      .get<unknown>('/api/overview', { params: { since: startOfLocalDay(now).toISOString() } })
      .pipe(
        map((value) => {
          if (!isOverview(value)) throw new Error('The server answered with an unexpected overview.');
          return value;
        }),
      );
  }
}
