import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

/** Deterministic bytes (a linear congruential generator), so a failure can be reproduced. */
export function junkBytes(size: number, seed: number, alphabet?: string): Buffer {
  const out = Buffer.alloc(size);
  let state = seed >>> 0;
  for (let i = 0; i < size; i++) {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    const byte = state >>> 24;
    out[i] = alphabet === undefined ? byte : alphabet.charCodeAt(byte % alphabet.length);
  }
  return out;
}

/** Writes generated files into a fresh temporary folder: large fixtures are never committed. */
export function writeTempFiles(files: Record<string, Buffer>): string {
  const dir = mkdtempSync(join(tmpdir(), 'equilight-parsers-'));
  for (const [name, content] of Object.entries(files)) writeFileSync(join(dir, name), content);
  return dir;
}
