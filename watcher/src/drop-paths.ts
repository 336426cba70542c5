import path from 'node:path';
import { RESERVED_FOLDERS } from './config';

/** Names an exporting program uses while a file is still being written, and hidden files. */
export function isTemporaryName(name: string): boolean {
  const lower = name.toLowerCase();
  return name.startsWith('.') || name.startsWith('~$') || lower.endsWith('.tmp') || lower.endsWith('.part');
}

export type DropPath =
  | { kind: 'root' }
  | { kind: 'instrument-folder'; folder: string }
  | { kind: 'candidate'; folder: string; relativePath: string }
  | { kind: 'ignored'; reason: 'temporary' | 'finished' | 'unknown-folder' | 'outside'; folder?: string };

/**
 * Where a path sits in the drop folder. `relativePath` is inside the instrument folder, with `/`.
 * Files in `done/` and `rejected/` (the watcher's own output) are never candidates.
 */
export function classifyDropPath(dropDir: string, file: string, folders: ReadonlySet<string>): DropPath {
  const rel = path.relative(dropDir, file);
  if (rel === '') return { kind: 'root' };
  if (rel.startsWith('..') || path.isAbsolute(rel)) return { kind: 'ignored', reason: 'outside' };
  const segments = rel.split(path.sep);
  if (segments.some(isTemporaryName)) return { kind: 'ignored', reason: 'temporary' };
  const [folder, ...inside] = segments as [string, ...string[]];
  if (!folders.has(folder)) return { kind: 'ignored', reason: 'unknown-folder', folder };
  if (inside.length === 0) return { kind: 'instrument-folder', folder };
  const reserved = (name: string) => (RESERVED_FOLDERS as readonly string[]).includes(name.toLowerCase());
  // `<folder>/done` itself, or anything in a done/ or rejected/ folder below the instrument folder.
  if ((inside.length === 1 && reserved(inside[0]!)) || inside.slice(0, -1).some(reserved)) {
    return { kind: 'ignored', reason: 'finished' };
  }
  return { kind: 'candidate', folder, relativePath: inside.join('/') };
}
