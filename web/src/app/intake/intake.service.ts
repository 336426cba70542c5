import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { type Observable, map } from 'rxjs';
import {
  type IngestReceipt,
  type IntakeFile,
  type IntakePage,
  type IntakeQuery,
  isIngestReceipt,
  isIntakeFile,
} from './intake-file';

function checkFile(value: unknown): IntakeFile {
  if (!isIntakeFile(value)) throw new Error('The server answered with an unexpected intake record.');
  return value;
}

/** The /api/intake resource and the manual upload to /api/ingest. */
@Injectable({ providedIn: 'root' })
export class IntakeService {
  private readonly http = inject(HttpClient);

  list(query: IntakeQuery): Observable<IntakePage> {
    let params = new HttpParams()
      .set('sort', query.sort)
      .set('dir', query.dir)
      .set('page', query.page)
      .set('pageSize', query.pageSize);
    if (query.status) params = params.set('status', query.status);
    if (query.profileId !== null) params = params.set('profileId', query.profileId);
    if (query.q.trim()) params = params.set('q', query.q.trim());
    return this.http.get<{ items?: unknown; total?: unknown }>('/api/intake', { params }).pipe(
      map((res) => {
        if (!Array.isArray(res.items) || typeof res.total !== 'number') {
          throw new Error('The server answered the intake list with an unexpected shape.');
        }
        return { items: res.items.map(checkFile), total: res.total };
      }),
    );
  }

  /** Sends a quarantined file through the parser again, e.g. after its profile was fixed. */
  requeue(id: number): Observable<IntakeFile> {
    return this.http.post<unknown>(`/api/intake/${id}/requeue`, {}).pipe(map(checkFile));
  }

  /** Put an unassigned file into a batch of the same instrument (lab managers, admins). */
  assign(id: number, batchId: number): Observable<IntakeFile> {
    return this.http.post<unknown>(`/api/intake/${id}/assign`, { batchId }).pipe(map(checkFile));
  }

  /** A person's upload: the same route the watcher uses, answered at once with the intake id. */
  upload(profileId: number, file: File): Observable<IngestReceipt> {
    const body = new FormData();
    body.append('profileId', String(profileId));
    body.append('file', file, file.name);
    return this.http.post<unknown>('/api/ingest', body).pipe(
      map((res) => {
        if (!isIngestReceipt(res))
          throw new Error('The server answered the upload with an unexpected shape.');
        return res;
      }),
    );
  }
}
