import { loadWatcherConfig, WatcherConfigError } from './config';
import { SpoolLockedError } from './spool';
import { createWatcher } from './watcher';

/** Process entry: configuration → watcher → run until SIGINT/SIGTERM. */
async function main(): Promise<void> {
  const config = loadWatcherConfig();
  const watcher = createWatcher(config);
  let stopping = false;
  const stop = async (signal: string): Promise<void> => {
    if (stopping) return;
    stopping = true;
    console.log(`${signal}: stopping the watcher`);
    await watcher.stop();
    process.exit(0);
  };
  process.on('SIGINT', () => void stop('SIGINT'));
  process.on('SIGTERM', () => void stop('SIGTERM'));
  process.on('unhandledRejection', (reason) => console.error('Unhandled rejection:', reason));
  await watcher.start();
}

main().catch((err: unknown) => {
  const known = err instanceof WatcherConfigError || err instanceof SpoolLockedError;
  console.error(known ? (err as Error).message : err);
  process.exit(1);
});
