import { HttpClient, HttpParams } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { ingestReceiptSchema, intakeFileSchema, intakePageSchema } from '@equilight/contracts';
import type { Observable } from 'rxjs';
import { parsed } from '../core/http/api-response';
import type { IngestReceipt, IntakeFile, IntakePage, IntakeQuery } from './intake-file';

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
    return this.http.get<unknown>('/api/intake', { params }).pipe(parsed(intakePageSchema, 'intake list'));
  }

  /** Sends a quarantined file through the parser again, e.g. after its profile was fixed. */
  requeue(id: number): Observable<IntakeFile> {
    return this.http
      .post<unknown>(`/api/intake/${id}/requeue`, {})
      .pipe(parsed(intakeFileSchema, 'intake record'));
  }

  /** Put an unassigned file into a batch of the same instrument (lab managers, admins). */
  assign(id: number, batchId: number): Observable<IntakeFile> {
    return this.http
      .post<unknown>(`/api/intake/${id}/assign`, { batchId })
      .pipe(parsed(intakeFileSchema, 'intake record'));
  }

  /** A person's upload: the same route the watcher uses, answered at once with the intake id. */
  upload(profileId: number, file: File): Observable<IngestReceipt> {
    const body = new FormData();
    body.append('profileId', String(profileId));
    body.append('file', file, file.name);
    return this.http.post<unknown>('/api/ingest', body).pipe(parsed(ingestReceiptSchema, 'upload receipt'));
  }
}
