import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import {
  batchPageSchema,
  batchSchema,
  instrumentSummarySchema,
  layoutSchema,
  layoutSummarySchema,
  manifestSchema,
  manifestSummarySchema,
} from '@equilight/contracts';
import { type Observable, map } from 'rxjs';
import { parsed } from '../core/http/api-response';
import type {
  Batch,
  BatchListRequest,
  BatchPage,
  InstrumentChoice,
  LayoutChoice,
  ManifestChoice,
  ManifestVersions,
  NewBatch,
  VersionChoice,
} from './batch';

/** The /api/batches resource, and the instruments, layouts and manifests a new batch is made of. */
@Injectable({ providedIn: 'root' })
export class BatchesService {
  private readonly http = inject(HttpClient);

  /** A page of batches, filtered and sorted on the server, with their stored headlines. */
  list(query: BatchListRequest = {}): Observable<BatchPage> {
    let params = new HttpParams();
    if (query.state) params = params.set('state', query.state);
    if (query.profileId != null) params = params.set('profileId', query.profileId);
    if (query.unapproved) params = params.set('unapproved', 'true');
    if (query.q?.trim()) params = params.set('q', query.q.trim());
    if (query.sort) params = params.set('sort', query.sort);
    if (query.dir) params = params.set('dir', query.dir);
    if (query.page !== undefined) params = params.set('page', query.page);
    if (query.pageSize !== undefined) params = params.set('pageSize', query.pageSize);
    return this.http
      .get<unknown>('/api/batches', { params })
      .pipe(parsed(batchPageSchema, 'list of batches'));
  }

  get(id: number): Observable<Batch> {
    return this.http.get<unknown>(`/api/batches/${id}`).pipe(parsed(batchSchema, 'batch record'));
  }

  create(batch: NewBatch): Observable<Batch> {
    return this.http.post<unknown>('/api/batches', batch).pipe(parsed(batchSchema, 'batch record'));
  }

  instruments(): Observable<InstrumentChoice[]> {
    return this.http
      .get<unknown>('/api/instruments/summary')
      .pipe(parsed(instrumentSummarySchema.array(), 'list of instruments'));
  }

  layouts(): Observable<LayoutChoice[]> {
    return this.http
      .get<unknown>('/api/layouts')
      .pipe(parsed(layoutSummarySchema.array(), 'list of layouts'));
  }

  layoutVersions(layoutId: number): Observable<VersionChoice[]> {
    return this.http.get<unknown>(`/api/layouts/${layoutId}`).pipe(
      parsed(layoutSchema, 'layout'),
      map((l) => l.versions),
    );
  }

  manifests(): Observable<ManifestChoice[]> {
    return this.http
      .get<unknown>('/api/manifests')
      .pipe(parsed(manifestSummarySchema.array(), 'list of manifests'));
  }

  manifestVersions(manifestId: number): Observable<ManifestVersions> {
    return this.http.get<unknown>(`/api/manifests/${manifestId}`).pipe(
      parsed(manifestSchema, 'manifest'),
      map((m) => ({ layoutVersion: m.layoutVersion, versions: m.versions })),
    );
  }
}
