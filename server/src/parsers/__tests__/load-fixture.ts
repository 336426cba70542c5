import { readFileSync } from 'node:fs';
import { join } from 'node:path';

export const FIXTURES = join(__dirname, 'fixtures');

export function fixture(...parts: string[]): Buffer {
  return readFileSync(join(FIXTURES, ...parts));
}
