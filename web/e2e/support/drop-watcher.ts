import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { parseWatcherConfig, type WatcherConfigInput } from '../../../watcher/src/config';
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
 * credential (`watcherToken`), with any other settings of the watcher's own; settling is shortened so a
 * test does not wait on it.
 */
export async function startDropWatcher(
  serverUrl: string,
  settings: Omit<WatcherConfigInput, 'serverUrl' | 'dropDir' | 'spoolDir'>,
): Promise<RunningDropWatcher> {
  const dropDir = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-e2e-drop-'));
  const spoolDir = `${dropDir}-spool`;
  const watcher = createWatcher(
    parseWatcherConfig({ serverUrl, dropDir, spoolDir, settleMs: 300, ...settings }),
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
