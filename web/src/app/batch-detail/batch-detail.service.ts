import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { type Observable, map } from 'rxjs';
import { type Batch, type PlateFormat, type SettingsChange, isBatch } from '../batches/batch';
import {
  type BatchAnalysis,
  type EpsilonCandidate,
  isBatchAnalysis,
  isEpsilonCandidate,
} from './batch-analysis';

function checkBatch(value: unknown): Batch {
  if (!isBatch(value)) throw new Error('The server answered with an unexpected batch record.');
  return value;
}

/** The batch page's calls: its analysis, settings, review and approval. */
@Injectable({ providedIn: 'root' })
export class BatchDetailService {
  private readonly http = inject(HttpClient);

  /**
   * The batch's analysis; an approved batch's comes from its approval record, and with `engineCheck` the
   * server also says what today's analysis engine gives.
   */
  analysis(id: number, engineCheck = false): Observable<BatchAnalysis> {
    const query = engineCheck ? '?engineCheck=true' : '';
    return this.http.get<unknown>(`/api/batches/${id}/analysis${query}`).pipe(
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

  /** Batches of the same system, at the same wavelength (±1 nm), whose calibration can lend ε. */
  epsilonSources(id: number): Observable<EpsilonCandidate[]> {
    return this.http
      .get<unknown>(`/api/batches/${id}/epsilon-sources`)
      .pipe(map((list) => (Array.isArray(list) ? list.filter(isEpsilonCandidate) : [])));
  }

  saveSettings(id: number, settings: SettingsChange, reason: string): Observable<Batch> {
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
