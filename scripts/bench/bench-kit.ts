/** What the database benchmarks share: command-line options, medians and timing of HTTP answers. */
import type TestAgent from 'supertest/lib/agent';

/** The value after `--name` on the command line, or the fallback. */
export function option(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i > 0 && process.argv[i + 1] ? process.argv[i + 1]! : fallback;
}

export function median(values: readonly number[]): number {
  const s = [...values].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2;
}

/** Milliseconds since `t0` (performance.now()), to one decimal. */
export const since = (t0: number): number => Math.round((performance.now() - t0) * 10) / 10;

/**
 * One GET through the agent, timed until the last byte is in; throws unless it answers 200. The body is
 * not parsed here (that is the client's work, not the server's): the answer's size in bytes comes back.
 */
export async function timedGet(agent: TestAgent, url: string): Promise<{ ms: number; bytes: number }> {
  const t0 = performance.now();
  const res = await agent
    .get(url)
    .buffer(true)
    .parse((stream, done) => {
      let bytes = 0;
      stream.on('data', (chunk: Buffer) => (bytes += chunk.length));
      stream.on('end', () => done(null, bytes));
    });
  const ms = performance.now() - t0;
  if (res.status !== 200) throw new Error(`GET ${url}: ${res.status}`);
  return { ms, bytes: res.body as number };
}
