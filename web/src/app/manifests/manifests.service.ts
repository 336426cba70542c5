import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { manifestCheckSchema, manifestSchema, manifestSummarySchema } from '@equilight/contracts';
import type { Observable } from 'rxjs';
import { parsed } from '../core/http/api-response';
import type { Manifest, ManifestCheck, ManifestRow, ManifestSummary } from './manifest';

/** A manifest to check or save: an uploaded file, or rows typed into the app. */
export interface ManifestInput {
  layoutId: number;
  file?: File;
  rows?: ManifestRow[];
}

function body(input: ManifestInput, extra: Record<string, string | boolean | undefined>): FormData | object {
  const fields = Object.fromEntries(Object.entries(extra).filter(([, v]) => v !== undefined && v !== ''));
  if (input.file) {
    const form = new FormData();
    form.append('layoutId', String(input.layoutId));
    for (const [k, v] of Object.entries(fields)) form.append(k, String(v));
    form.append('file', input.file, input.file.name);
    return form;
  }
  return { layoutId: input.layoutId, rows: input.rows ?? [], ...fields };
}

/** The /api/manifests resource. */
@Injectable({ providedIn: 'root' })
export class ManifestsService {
  private readonly http = inject(HttpClient);

  list(): Observable<ManifestSummary[]> {
    return this.http
      .get<unknown>('/api/manifests')
      .pipe(parsed(manifestSummarySchema.array(), 'list of manifests'));
  }

  get(id: number, version?: number): Observable<Manifest> {
    const url = version === undefined ? `/api/manifests/${id}` : `/api/manifests/${id}/versions/${version}`;
    return this.http.get<unknown>(url).pipe(parsed(manifestSchema, 'manifest'));
  }

  /** Every problem and every mismatch with the layout; saves nothing. */
  check(input: ManifestInput): Observable<ManifestCheck> {
    return this.http
      .post<unknown>('/api/manifests/check', body(input, {}))
      .pipe(parsed(manifestCheckSchema, 'manifest check'));
  }

  create(name: string, input: ManifestInput, acceptMismatches = false): Observable<Manifest> {
    return this.http
      .post<unknown>('/api/manifests', body(input, { name, acceptMismatches: acceptMismatches || undefined }))
      .pipe(parsed(manifestSchema, 'manifest'));
  }

  /** Saves a new version. */
  update(id: number, input: ManifestInput, acceptMismatches = false, reason?: string): Observable<Manifest> {
    return this.http
      .put<unknown>(
        `/api/manifests/${id}`,
        body(input, { acceptMismatches: acceptMismatches || undefined, reason: reason?.trim() }),
      )
      .pipe(parsed(manifestSchema, 'manifest'));
  }
}
