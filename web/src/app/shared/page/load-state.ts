import { DestroyRef, inject, signal } from '@angular/core';
import { EMPTY, type Observable, Subject, catchError, switchMap, tap } from 'rxjs';
import { apiErrorMessage } from '../../core/http/auth.interceptor';

/**
 * Whether a page's data is loading and the message of its last failure, for pages that load (and reload)
 * one thing. A new `load` cancels the one still running, so the last request wins and a late answer to an
 * earlier one never replaces it. Create it in a field initialiser (it needs the injection context).
 */
export class LoadState {
  readonly loading = signal(true);
  readonly error = signal<string | null>(null);
  private readonly requests = new Subject<Observable<unknown>>();

  constructor() {
    const subscription = this.requests.pipe(switchMap((request) => request)).subscribe();
    inject(DestroyRef).onDestroy(() => subscription.unsubscribe());
  }

  /**
   * Runs `request`; its answer goes to `apply`, then the error clears. A failure shows the server's message,
   * unless `failed` handles it (returns true).
   */
  load<T>(request: Observable<T>, apply: (value: T) => void, failed?: (err: unknown) => boolean): void {
    this.loading.set(true);
    this.requests.next(
      request.pipe(
        tap((value) => {
          apply(value);
          this.error.set(null);
          this.loading.set(false);
        }),
        catchError((err: unknown) => {
          if (!failed?.(err)) this.error.set(apiErrorMessage(err));
          this.loading.set(false);
          return EMPTY;
        }),
      ),
    );
  }
}
