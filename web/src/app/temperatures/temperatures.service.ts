import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { systemTemperaturesSchema } from '@equilight/contracts';
import type { Observable } from 'rxjs';
import { parsed } from '../core/http/api-response';
import type { SystemTemperatures } from './temperature-system';

/** GET /api/temperatures. */
@Injectable({ providedIn: 'root' })
export class TemperaturesService {
  private readonly http = inject(HttpClient);

  systems(includeUnapproved: boolean): Observable<SystemTemperatures[]> {
    return this.http
      .get<unknown>('/api/temperatures', { params: { includeUnapproved: String(includeUnapproved) } })
      .pipe(parsed(systemTemperaturesSchema.array(), 'list of systems'));
  }
}
