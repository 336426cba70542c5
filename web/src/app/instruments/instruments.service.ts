import { HttpClient, HttpErrorResponse } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { type Observable, catchError, map, throwError } from 'rxjs';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import {
  type InstrumentProfile,
  type ProfileFields,
  type ProfileWithToken,
  type TryFailure,
  type TryResult,
  type TryRules,
  isInstrumentProfile,
  isTryResult,
} from './instrument-profile';

function checkProfile(value: unknown): InstrumentProfile {
  if (!isInstrumentProfile(value))
    throw new Error('The server answered with an unexpected instrument profile.');
  return value;
}

function checkWithToken(value: unknown): ProfileWithToken {
  const v = value as { profile?: unknown; token?: unknown } | null;
  if (typeof v?.token !== 'string') throw new Error('The server answered without the instrument token.');
  return { profile: checkProfile(v.profile), token: v.token };
}

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
  summary(): Observable<{ id: number; name: string; plateFormat: string; active: boolean }[]> {
    return this.http.get<unknown[]>('/api/instruments/summary').pipe(
      map((rows) =>
        rows.map((row) => {
          const r = row as { id?: unknown; name?: unknown; plateFormat?: unknown; active?: unknown };
          if (typeof r.id !== 'number' || typeof r.name !== 'string')
            throw new Error('Unexpected instrument summary.');
          return { id: r.id, name: r.name, plateFormat: String(r.plateFormat), active: r.active === true };
        }),
      ),
    );
  }

  list(): Observable<InstrumentProfile[]> {
    return this.http.get<unknown[]>('/api/instruments').pipe(map((rows) => rows.map(checkProfile)));
  }

  /** Creates the profile and its first token; the token is in the answer this once only. */
  create(fields: ProfileFields): Observable<ProfileWithToken> {
    return this.http.post<unknown>('/api/instruments', fields).pipe(map(checkWithToken));
  }

  update(id: number, changes: Partial<ProfileFields>): Observable<InstrumentProfile> {
    return this.http.patch<unknown>(`/api/instruments/${id}`, changes).pipe(map(checkProfile));
  }

  /** A new token replaces the old one at once. */
  rotateToken(id: number): Observable<ProfileWithToken> {
    return this.http.post<unknown>(`/api/instruments/${id}/token`, {}).pipe(map(checkWithToken));
  }

  revokeToken(id: number): Observable<InstrumentProfile> {
    return this.http.delete<unknown>(`/api/instruments/${id}/token`).pipe(map(checkProfile));
  }

  /** Parses a sample file with rules not yet saved. Errors arrive as a TryFailure. */
  tryFile(file: File, rules: TryRules): Observable<TryResult> {
    const body = new FormData();
    body.append('file', file, file.name);
    body.append('rules', JSON.stringify(rules));
    return this.http.post<unknown>('/api/instruments/try', body).pipe(
      map((res) => {
        if (!isTryResult(res)) throw new Error('The server answered the try with an unexpected shape.');
        return res;
      }),
      catchError((err: unknown) => throwError(() => tryFailure(err))),
    );
  }
}
