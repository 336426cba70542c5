import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { batchAnalysisSchema, batchSchema, epsilonCandidateSchema, layoutSchema } from '@equilight/contracts';
import { type Observable, map } from 'rxjs';
import { parsed } from '../core/http/api-response';
import type { Batch, PlateFormat, SettingsChange } from '../batches/batch';
import type { BatchAnalysis, EpsilonCandidate } from './batch-analysis';

const batch = parsed(batchSchema, 'batch record');

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
    return this.http
      .get<unknown>(`/api/batches/${id}/analysis${query}`)
      .pipe(parsed(batchAnalysisSchema, 'analysis'));
  }

  /** The plate format of a layout (96, 384 or cuvette). */
  layoutFormat(layoutId: number): Observable<PlateFormat> {
    return this.http.get<unknown>(`/api/layouts/${layoutId}`).pipe(
      parsed(layoutSchema, 'layout'),
      map((l) => l.format),
    );
  }

  /** Batches of the same system, at the same wavelength (±1 nm), whose calibration can lend ε. */
  epsilonSources(id: number): Observable<EpsilonCandidate[]> {
    return this.http
      .get<unknown>(`/api/batches/${id}/epsilon-sources`)
      .pipe(parsed(epsilonCandidateSchema.array(), 'list of ε sources'));
  }

  saveSettings(id: number, settings: SettingsChange, reason: string): Observable<Batch> {
    return this.http.put<unknown>(`/api/batches/${id}/settings`, { settings, reason }).pipe(batch);
  }

  review(id: number): Observable<Batch> {
    return this.http.post<unknown>(`/api/batches/${id}/review`, {}).pipe(batch);
  }

  approve(id: number, comment: string): Observable<Batch> {
    return this.http.post<unknown>(`/api/batches/${id}/approve`, { comment }).pipe(batch);
  }

  reopen(id: number, reason: string): Observable<Batch> {
    return this.http.post<unknown>(`/api/batches/${id}/reopen`, { reason }).pipe(batch);
  }
}
