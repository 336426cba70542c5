import http from 'node:http';
import { createApp } from './app';
import { ConfigError, loadConfig } from './config';
import { openDatabase } from './database/data-source';
import { attachLiveEvents } from './events/live-events';
import { seedDemoPeople } from './seed/demo-people';

async function main(): Promise<void> {
  const config = loadConfig();
  const dataSource = await openDatabase(config);
  const equilight = createApp({ config, dataSource });
  if (config.seedDemo && (await seedDemoPeople(equilight.services.users, config.demoPassword))) {
    console.log('Seeded demo people (admin@, manager@, scientist@equilight.test) with the demo password.');
  }
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
  console.error(err instanceof ConfigError ? err.message : err);
  process.exit(1);
});
