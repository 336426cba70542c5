export interface BackoffOptions {
  initialMs: number;
  maxMs: number;
}

/**
 * Delay before retry number `attempt` (1-based): initialMs doubling up to maxMs, with "equal jitter"
 * (half fixed, half random) so that many waiting clients do not return in step.
 */
export function backoffDelayMs(
  attempt: number,
  { initialMs, maxMs }: BackoffOptions,
  random = Math.random,
): number {
  const exponent = Math.min(Math.max(attempt, 1) - 1, 30);
  const ceiling = Math.min(maxMs, initialMs * 2 ** exponent);
  return Math.round(ceiling / 2 + random() * (ceiling / 2));
}

/** `Retry-After` in seconds or as an HTTP date, in milliseconds from now; undefined when absent or unreadable. */
export function retryAfterMs(header: string | null, now = Date.now()): number | undefined {
  if (!header) return undefined;
  const seconds = Number(header);
  if (Number.isFinite(seconds) && seconds >= 0) return seconds * 1000;
  const date = Date.parse(header);
  return Number.isNaN(date) ? undefined : Math.max(0, date - now);
}
