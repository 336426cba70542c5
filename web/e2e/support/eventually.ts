/**
 * The app renders after each event on its own schedule (zoneless change detection), so a value read right
 * after a click or a key press can still be the old one. Poll until it matches, then assert as usual.
 */
export async function eventually<T>(
  read: () => Promise<T>,
  matches: (value: T) => boolean,
  timeoutMs = 10_000,
): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  let value = await read();
  while (!matches(value) && Date.now() < deadline) {
    await new Promise((r) => setTimeout(r, 50));
    value = await read();
  }
  return value;
}

/** Poll `read` until it equals `expected` (or time runs out), then assert it equals. */
export async function expectEventually<T>(
  read: () => Promise<T>,
  expected: T,
  timeoutMs?: number,
): Promise<void> {
  const value = await eventually(read, (v) => JSON.stringify(v) === JSON.stringify(expected), timeoutMs);
  expect(value).toEqual(expected);
}
