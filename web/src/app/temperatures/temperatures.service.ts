import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { type Observable, map } from 'rxjs';
import { type SystemTemperatures, isSystemTemperatures } from './temperature-system';

/** GET /api/temperatures. */
@Injectable({ providedIn: 'root' })
export class TemperaturesService {
  private readonly http = inject(HttpClient);

  systems(includeUnapproved: boolean): Observable<SystemTemperatures[]> {
    return this.http
      .get<unknown>('/api/temperatures', { params: { includeUnapproved: String(includeUnapproved) } })
      .pipe(
        map((list) => {
          if (!Array.isArray(list) || !list.every(isSystemTemperatures))
            throw new Error('The server answered with an unexpected list of systems.');
          return list;
        }),
      );
  }
}
