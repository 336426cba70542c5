/**
 * What one request may cost the server's worker threads (documented in DEVELOPERS.md). No imports:
 * schemas use these too.
 */

/** An analysis draws at most this many Monte Carlo samples (about 0.4 s of one worker thread). */
export { MAX_MONTE_CARLO_DRAWS } from '../contracts/settings';
/** Beyond this many tasks waiting for a worker thread, a request is answered 503 (busy, try again). */
export const MAX_QUEUED_TASKS = 500;
/** Files with at least this many readings are stored by the worker, in chunks (see tasks.ts). */
export const WORKER_STORE_MIN_READINGS = 20_000;
