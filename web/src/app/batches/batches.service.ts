import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import {
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

  list(): Observable<Batch[]> {
    return this.http.get<unknown>('/api/batches').pipe(parsed(batchSchema.array(), 'list of batch records'));
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
