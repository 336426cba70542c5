import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { type Observable, map } from 'rxjs';
import { type Batch, type BatchSettings, type PlateFormat, isBatch } from '../batches/batch';
import { type BatchAnalysis, isBatchAnalysis } from './batch-analysis';

function checkBatch(value: unknown): Batch {
  if (!isBatch(value)) throw new Error('The server answered with an unexpected batch record.');
  return value;
}

/** The batch page's calls: its analysis, settings, review and approval. */
@Injectable({ providedIn: 'root' })
export class BatchDetailService {
  private readonly http = inject(HttpClient);

  analysis(id: number): Observable<BatchAnalysis> {
    return this.http.get<unknown>(`/api/batches/${id}/analysis`).pipe(
      map((value) => {
        if (!isBatchAnalysis(value)) throw new Error('The server answered with an unexpected analysis.');
        return value;
      }),
    );
  }

  /** The plate format of a layout (96, 384 or cuvette). */
  layoutFormat(layoutId: number): Observable<PlateFormat> {
    return this.http.get<{ format?: unknown }>(`/api/layouts/${layoutId}`).pipe(
      map((l) => {
        if (l.format !== '96' && l.format !== '384' && l.format !== 'cuvette')
          throw new Error('The layout has no known format.');
        return l.format;
      }),
    );
  }

  batches(): Observable<Batch[]> {
    return this.http
      .get<unknown>('/api/batches')
      .pipe(map((list) => (Array.isArray(list) ? list.filter(isBatch) : [])));
  }

  saveSettings(id: number, settings: Partial<BatchSettings>, reason: string): Observable<Batch> {
    return this.http.put<unknown>(`/api/batches/${id}/settings`, { settings, reason }).pipe(map(checkBatch));
  }

  review(id: number): Observable<Batch> {
    return this.http.post<unknown>(`/api/batches/${id}/review`, {}).pipe(map(checkBatch));
  }

  approve(id: number, comment: string): Observable<Batch> {
    return this.http.post<unknown>(`/api/batches/${id}/approve`, { comment }).pipe(map(checkBatch));
  }

  reopen(id: number, reason: string): Observable<Batch> {
    return this.http.post<unknown>(`/api/batches/${id}/reopen`, { reason }).pipe(map(checkBatch));
  }
}
