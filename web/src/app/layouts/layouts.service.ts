import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { layoutSchema, layoutSummarySchema } from '@equilight/contracts';
import type { Observable } from 'rxjs';
import { parsed } from '../core/http/api-response';
import type { PlateFormat } from '../shared/plate-grid/plate-geometry';
import type { Layout, LayoutPosition, LayoutSummary } from './layout';

export interface NewLayout {
  name: string;
  format: PlateFormat;
  cuvetteCount?: number;
  positions: LayoutPosition[];
}

export interface LayoutChanges {
  name?: string;
  cuvetteCount?: number;
  positions: LayoutPosition[];
  reason?: string;
}

const layoutRecord = parsed(layoutSchema, 'layout record');

/** The /api/layouts resource. */
@Injectable({ providedIn: 'root' })
export class LayoutsService {
  private readonly http = inject(HttpClient);

  list(): Observable<LayoutSummary[]> {
    return this.http
      .get<unknown>('/api/layouts')
      .pipe(parsed(layoutSummarySchema.array(), 'list of layouts'));
  }

  /** The current version, or the given older one. */
  get(id: number, version?: number): Observable<Layout> {
    const url = version === undefined ? `/api/layouts/${id}` : `/api/layouts/${id}/versions/${version}`;
    return this.http.get<unknown>(url).pipe(layoutRecord);
  }

  create(layout: NewLayout): Observable<Layout> {
    return this.http.post<unknown>('/api/layouts', layout).pipe(layoutRecord);
  }

  /** Saves a new version; old versions stay. */
  update(id: number, changes: LayoutChanges): Observable<Layout> {
    return this.http.put<unknown>(`/api/layouts/${id}`, changes).pipe(layoutRecord);
  }
}
