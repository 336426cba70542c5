import crypto from 'node:crypto';
import fs from 'node:fs';
import fsp from 'node:fs/promises';
import path from 'node:path';

/** Flush a directory entry (a rename or a new file) to disk. Not every platform allows it; then it is a no-op. */
export async function fsyncDir(dir: string): Promise<void> {
  let handle: fsp.FileHandle | undefined;
  try {
    handle = await fsp.open(dir, 'r');
    await handle.sync();
  } catch {
    // Windows and some network file systems refuse to open or sync a directory.
  } finally {
    await handle?.close().catch(() => undefined);
  }
}

/** Write a file so that a reader sees either the old content or the whole new one: temp file, fsync, rename. */
export async function writeFileAtomic(file: string, data: string | Uint8Array): Promise<void> {
  const tmp = `${file}.${crypto.randomBytes(4).toString('hex')}.tmp`;
  const handle = await fsp.open(tmp, 'wx');
  try {
    await handle.writeFile(data);
    await handle.sync();
  } finally {
    await handle.close();
  }
  try {
    await fsp.rename(tmp, file);
  } catch (err) {
    await fsp.rm(tmp, { force: true });
    throw err;
  }
  await fsyncDir(path.dirname(file));
}

/** `run.csv`, `run-1.csv`, `run-2.csv`, … */
export function suffixedName(name: string, n: number): string {
  if (n === 0) return name;
  const ext = path.extname(name);
  const stem = ext && ext !== name ? name.slice(0, -ext.length) : name;
  return `${stem}-${n}${ext && ext !== name ? ext : ''}`;
}

/**
 * Place `source` in `targetDir` under its own name, or with a numeric suffix when that name is taken.
 * Never overwrites: the target is claimed with an exclusive link (or an exclusive copy where links are
 * not possible), and only then is the source removed. With `keepSource` the source stays (a copy).
 * Returns the path written.
 */
export async function placeWithoutOverwrite(
  source: string,
  targetDir: string,
  name: string,
  { keepSource = false }: { keepSource?: boolean } = {},
): Promise<string> {
  await ensureRealDir(targetDir);
  for (let n = 0; n < 10_000; n++) {
    const target = path.join(targetDir, suffixedName(name, n));
    try {
      if (keepSource) {
        await fsp.copyFile(source, target, fs.constants.COPYFILE_EXCL);
      } else {
        await claimByLinkOrCopy(source, target);
        await fsp.unlink(source);
      }
      await fsyncDir(targetDir);
      return target;
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === 'EEXIST') continue;
      throw err;
    }
  }
  throw new Error(`no free name for ${name} in ${targetDir}`);
}

/**
 * Move a symbolic link itself (never what it points at) into `targetDir`, under its own name or with a
 * numeric suffix; never overwrites. The link is recreated with the same target text, then the old one is
 * removed: nothing is read through it. Returns the path written.
 */
export async function moveLinkWithoutOverwrite(
  link: string,
  targetDir: string,
  name: string,
): Promise<string> {
  const stat = await fsp.lstat(link);
  if (!stat.isSymbolicLink()) throw new Error(`${link} is not a link`);
  const pointsTo = await fsp.readlink(link);
  const type = process.platform === 'win32' ? await linkType(link) : undefined;
  await ensureRealDir(targetDir);
  for (let n = 0; n < 10_000; n++) {
    const target = path.join(targetDir, suffixedName(name, n));
    try {
      await fsp.symlink(pointsTo, target, type);
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code === 'EEXIST') continue;
      throw err;
    }
    await fsp.unlink(link);
    await fsyncDir(targetDir);
    return target;
  }
  throw new Error(`no free name for ${name} in ${targetDir}`);
}

async function linkType(link: string): Promise<'dir' | 'file'> {
  const target = await fsp.stat(link).catch(() => undefined);
  return target?.isDirectory() ? 'dir' : 'file';
}

/** Create a folder the watcher writes into, refusing one that is a link (writing through it could land anywhere). */
async function ensureRealDir(dir: string): Promise<void> {
  await fsp.mkdir(dir, { recursive: true });
  const stat = await fsp.lstat(dir);
  if (!stat.isDirectory()) {
    throw new Error(
      `${dir} is ${stat.isSymbolicLink() ? 'a link' : 'not a folder'}; nothing is written through it`,
    );
  }
}

async function claimByLinkOrCopy(source: string, target: string): Promise<void> {
  try {
    await fsp.link(source, target);
  } catch (err) {
    const code = (err as NodeJS.ErrnoException).code;
    // Hard links are not available on every file system (FAT, some network shares).
    if (
      code === 'EPERM' ||
      code === 'ENOTSUP' ||
      code === 'EXDEV' ||
      code === 'ENOSYS' ||
      code === 'EINVAL'
    ) {
      await fsp.copyFile(source, target, fs.constants.COPYFILE_EXCL);
      return;
    }
    throw err;
  }
}

/** SHA-256 (hex) and size of a file, streamed. */
export async function hashFile(file: string): Promise<{ sha256: string; size: number }> {
  const hash = crypto.createHash('sha256');
  let size = 0;
  for await (const chunk of fs.createReadStream(file)) {
    hash.update(chunk as Buffer);
    size += (chunk as Buffer).length;
  }
  return { sha256: hash.digest('hex'), size };
}
