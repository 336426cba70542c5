import { HttpClient, HttpErrorResponse } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import {
  type InstrumentSummary,
  instrumentSummarySchema,
  profileSchema,
  profileWithTokenSchema,
  tryResultSchema,
} from '@equilight/contracts';
import { type Observable, catchError, throwError } from 'rxjs';
import { parsed } from '../core/http/api-response';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import type {
  InstrumentProfile,
  ProfileFields,
  ProfileWithToken,
  TryFailure,
  TryResult,
  TryRules,
} from './instrument-profile';

const profile = parsed(profileSchema, 'instrument profile');
const withToken = parsed(profileWithTokenSchema, 'instrument profile and token');

/** The error of a tried file: the API's message plus line and column, when it gives them. */
export function tryFailure(err: unknown): TryFailure {
  const failure: TryFailure = { message: apiErrorMessage(err, 'The file could not be tried.') };
  if (err instanceof HttpErrorResponse) {
    const details = (err.error as { error?: { details?: { line?: unknown; column?: unknown } } } | null)
      ?.error?.details;
    if (typeof details?.line === 'number') failure.line = details.line;
    if (typeof details?.column === 'string' || typeof details?.column === 'number') {
      failure.column = details.column;
    }
  } else if (err instanceof Error) {
    failure.message = err.message;
  }
  return failure;
}

/** The /api/instruments resource. */
@Injectable({ providedIn: 'root' })
export class InstrumentsService {
  private readonly http = inject(HttpClient);

  /** Names and formats only, readable by every signed-in role (for choosing an instrument). */
  summary(): Observable<InstrumentSummary[]> {
    return this.http
      .get<unknown>('/api/instruments/summary')
      .pipe(parsed(instrumentSummarySchema.array(), 'instrument summary'));
  }

  list(): Observable<InstrumentProfile[]> {
    return this.http
      .get<unknown>('/api/instruments')
      .pipe(parsed(profileSchema.array(), 'list of instrument profiles'));
  }

  /** Creates the profile and its first token; the token is in the answer this once only. */
  create(fields: ProfileFields): Observable<ProfileWithToken> {
    return this.http.post<unknown>('/api/instruments', fields).pipe(withToken);
  }

  update(id: number, changes: Partial<ProfileFields>): Observable<InstrumentProfile> {
    return this.http.patch<unknown>(`/api/instruments/${id}`, changes).pipe(profile);
  }

  /** A new token replaces the old one at once. */
  rotateToken(id: number): Observable<ProfileWithToken> {
    return this.http.post<unknown>(`/api/instruments/${id}/token`, {}).pipe(withToken);
  }

  revokeToken(id: number): Observable<InstrumentProfile> {
    return this.http.delete<unknown>(`/api/instruments/${id}/token`).pipe(profile);
  }

  /** Parses a sample file with rules not yet saved. Errors arrive as a TryFailure. */
  tryFile(file: File, rules: TryRules): Observable<TryResult> {
    const body = new FormData();
    body.append('file', file, file.name);
    body.append('rules', JSON.stringify(rules));
    return this.http.post<unknown>('/api/instruments/try', body).pipe(
      parsed(tryResultSchema, 'try result'),
      catchError((err: unknown) => throwError(() => tryFailure(err))),
    );
  }
}
