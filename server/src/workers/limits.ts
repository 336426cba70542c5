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
/**
 * Files smaller than this are parsed on the calling thread: a 384-well, 3-wavelength plate (~30 kB)
 * takes ~2 ms to parse, about what the hop to a worker thread and back costs on a busy 2-core server.
 * Larger files go to the worker thread, so one big file never holds up other requests.
 */
export const IN_THREAD_PARSE_MAX_BYTES = 64 * 1024;
