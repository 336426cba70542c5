import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { type Observable, map } from 'rxjs';
import {
  type Batch,
  type InstrumentChoice,
  type LayoutChoice,
  type ManifestChoice,
  type ManifestVersions,
  type NewBatch,
  type VersionChoice,
  isBatch,
  isInstrumentChoice,
  isLayoutChoice,
  isManifestChoice,
  versionsOf,
} from './batch';

function checked<T>(guard: (v: unknown) => v is T, what: string): (value: unknown) => T {
  return (value) => {
    if (!guard(value)) throw new Error(`The server answered with an unexpected ${what}.`);
    return value;
  };
}

function checkedList<T>(guard: (v: unknown) => v is T, what: string): (value: unknown) => T[] {
  const one = checked(guard, what);
  return (value) => {
    if (!Array.isArray(value))
      throw new Error(`The server answered with something other than a list of ${what}s.`);
    return value.map(one);
  };
}

const checkBatch = checked(isBatch, 'batch record');

/** The /api/batches resource, and the instruments, layouts and manifests a new batch is made of. */
@Injectable({ providedIn: 'root' })
export class BatchesService {
  private readonly http = inject(HttpClient);

  list(): Observable<Batch[]> {
    return this.http.get<unknown>('/api/batches').pipe(map(checkedList(isBatch, 'batch record')));
  }

  get(id: number): Observable<Batch> {
    return this.http.get<unknown>(`/api/batches/${id}`).pipe(map(checkBatch));
  }

  create(batch: NewBatch): Observable<Batch> {
    return this.http.post<unknown>('/api/batches', batch).pipe(map(checkBatch));
  }

  instruments(): Observable<InstrumentChoice[]> {
    return this.http
      .get<unknown>('/api/instruments/summary')
      .pipe(map(checkedList(isInstrumentChoice, 'instrument')));
  }

  layouts(): Observable<LayoutChoice[]> {
    return this.http.get<unknown>('/api/layouts').pipe(map(checkedList(isLayoutChoice, 'layout')));
  }

  layoutVersions(layoutId: number): Observable<VersionChoice[]> {
    return this.http.get<unknown>(`/api/layouts/${layoutId}`).pipe(map(versionsOf));
  }

  manifests(): Observable<ManifestChoice[]> {
    return this.http.get<unknown>('/api/manifests').pipe(map(checkedList(isManifestChoice, 'manifest')));
  }

  manifestVersions(manifestId: number): Observable<ManifestVersions> {
    return this.http.get<unknown>(`/api/manifests/${manifestId}`).pipe(
      map((m) => ({
        layoutVersion: Number((m as { layoutVersion?: unknown }).layoutVersion) || 0,
        versions: versionsOf(m),
      })),
    );
  }
}
