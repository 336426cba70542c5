import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { type Observable, map } from 'rxjs';
import type { PlateFormat } from '../shared/plate-grid/plate-geometry';
import { type Layout, type LayoutPosition, type LayoutSummary, isLayout, isLayoutSummary } from './layout';

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

function checkLayout(value: unknown): Layout {
  if (!isLayout(value)) throw new Error('The server answered with an unexpected layout record.');
  return value;
}

function checkSummary(value: unknown): LayoutSummary {
  if (!isLayoutSummary(value)) throw new Error('The server answered with an unexpected layout summary.');
  return value;
}

/** The /api/layouts resource. */
@Injectable({ providedIn: 'root' })
export class LayoutsService {
  private readonly http = inject(HttpClient);

  list(): Observable<LayoutSummary[]> {
    return this.http.get<unknown[]>('/api/layouts').pipe(map((rows) => rows.map(checkSummary)));
  }

  /** The current version, or the given older one. */
  get(id: number, version?: number): Observable<Layout> {
    const url = version === undefined ? `/api/layouts/${id}` : `/api/layouts/${id}/versions/${version}`;
    return this.http.get<unknown>(url).pipe(map(checkLayout));
  }

  create(layout: NewLayout): Observable<Layout> {
    return this.http.post<unknown>('/api/layouts', layout).pipe(map(checkLayout));
  }

  /** Saves a new version; old versions stay. */
  update(id: number, changes: LayoutChanges): Observable<Layout> {
    return this.http.put<unknown>(`/api/layouts/${id}`, changes).pipe(map(checkLayout));
  }
}
