import http from 'node:http';
import { createApp } from './app';
import { ConfigError, loadConfig } from './config';
import { describeArchive } from './ingest/create-archive';
import { openDatabase } from './database/data-source';
import { exclusively } from './database/exclusive';
import { DatabaseProblemError } from './database/integrity';
import { attachLiveEvents } from './events/live-events';
import { RedisUnavailableError } from './redis/redis-connection';
import { seedDemoInstruments } from './seed/demo-instruments';
import { seedDemoScenario } from './seed/demo-scenario';
import { seedDemoPeople } from './seed/demo-people';

async function main(): Promise<void> {
  const config = loadConfig();
  const dataSource = await openDatabase(config);
  const equilight = createApp({ config, dataSource });
  console.log(`Raw-file archive: ${describeArchive(config.archive)}`);
  console.log(`Job queue: ${equilight.queues.describe()}`);
  console.log(`Live events and sign-in limits: ${equilight.events.describe()}`);
  // Several processes on one database seed one after another: the second finds the demo there.
  if (config.seedDemo)
    await exclusively(dataSource, 'demo-seed', async () => {
      if (await seedDemoPeople(equilight.services.users, config.demoPassword))
        console.log(
          'Seeded demo people (admin@, manager@, scientist@equilight.test) with the demo password.',
        );
      const host = config.host === '0.0.0.0' || config.host === '::' ? '127.0.0.1' : config.host;
      const watcher = await seedDemoInstruments(equilight.services.instruments, {
        dataDir: config.dataDir,
        serverUrl: `http://${host}:${config.port}`,
      });
      if (watcher) console.log(`Seeded demo instrument profiles; drop folder ${watcher.dropDir}`);
      if (await seedDemoScenario(equilight))
        console.log('Seeded the demo scenario (invented data): layouts, manifests, batches.');
    });
  const server = http.createServer(equilight.app);
  const live = attachLiveEvents(server, {
    sessionParser: equilight.sessionParser,
    users: equilight.services.users,
    events: equilight.events,
  });
  await equilight.start();
  await new Promise<void>((resolve) => server.listen(config.port, config.host, resolve));
  console.log(
    `Equilight listening on http://${config.host === '0.0.0.0' ? 'localhost' : config.host}:${config.port}`,
  );

  let stopping = false;
  const stop = async (signal: string): Promise<void> => {
    if (stopping) return;
    stopping = true;
    console.log(`${signal}: shutting down`);
    live.close();
    server.closeAllConnections();
    await new Promise<void>((resolve) => server.close(() => resolve()));
    await equilight.close();
    await dataSource.destroy();
    process.exit(0);
  };
  process.on('SIGINT', () => void stop('SIGINT'));
  process.on('SIGTERM', () => void stop('SIGTERM'));
  process.on('unhandledRejection', (reason) => console.error('Unhandled rejection:', reason));
}

main().catch((err: unknown) => {
  const explained =
    err instanceof ConfigError || err instanceof DatabaseProblemError || err instanceof RedisUnavailableError;
  console.error(explained ? err.message : err);
  process.exit(1);
});
