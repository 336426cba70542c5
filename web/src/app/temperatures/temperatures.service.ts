import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { systemTemperaturesSchema, temperaturePointsPageSchema } from '@equilight/contracts';
import type { Observable } from 'rxjs';
import { parsed } from '../core/http/api-response';
import type { PointsRequest, SystemTemperatures, TemperaturePointsPage } from './temperature-system';

/** GET /api/temperatures (each system's fit and groups) and /api/temperatures/points (its batches, paged). */
@Injectable({ providedIn: 'root' })
export class TemperaturesService {
  private readonly http = inject(HttpClient);

  systems(includeUnapproved: boolean): Observable<SystemTemperatures[]> {
    return this.http
      .get<unknown>('/api/temperatures', { params: { includeUnapproved: String(includeUnapproved) } })
      .pipe(parsed(systemTemperaturesSchema.array(), 'list of systems'));
  }

  points(query: PointsRequest): Observable<TemperaturePointsPage> {
    const params = new HttpParams()
      .set('system', query.system)
      .set('includeUnapproved', query.includeUnapproved)
      .set('page', query.page)
      .set('pageSize', query.pageSize);
    return this.http
      .get<unknown>('/api/temperatures/points', { params })
      .pipe(parsed(temperaturePointsPageSchema, 'page of points'));
  }
}
