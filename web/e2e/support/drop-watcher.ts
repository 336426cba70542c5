import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseWatcherConfig } from '../../../watcher/src/config';
import { silentLogger } from '../../../watcher/src/logger';
import { createWatcher, type DropFolderWatcher } from '../../../watcher/src/watcher';

/** The real watcher on a drop folder (and spool) of its own in a temporary folder. */
export interface RunningDropWatcher {
  watcher: DropFolderWatcher;
  dropDir: string;
  /** Stop the watcher and remove its drop folder and spool. */
  stop(): Promise<void>;
}

/**
 * Start the real watcher against a test server, sending as an instrument (`instruments`) or as a watcher
 * credential (`watcherToken`); settling and polling are shortened so a test does not wait on them.
 */
export async function startDropWatcher(
  serverUrl: string,
  credentials: Record<string, unknown>,
): Promise<RunningDropWatcher> {
  const dropDir = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-e2e-drop-'));
  const spoolDir = `${dropDir}-spool`;
  const watcher = createWatcher(
    parseWatcherConfig({ serverUrl, dropDir, spoolDir, settleMs: 300, ...credentials }),
    { logger: silentLogger },
  );
  await watcher.start();
  return {
    watcher,
    dropDir,
    async stop() {
      await watcher.stop();
      for (const dir of [dropDir, spoolDir]) fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}
