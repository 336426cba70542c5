/** Where the watcher writes its one line per event. Tests pass their own to keep output quiet. */
export interface WatcherLogger {
  info(message: string): void;
  warn(message: string): void;
  error(message: string): void;
}

function line(level: string, message: string): string {
  return `${new Date().toISOString()} ${level} ${message}\n`;
}

export const consoleLogger: WatcherLogger = {
  info: (message) => process.stdout.write(line('info ', message)),
  warn: (message) => process.stderr.write(line('warn ', message)),
  error: (message) => process.stderr.write(line('ERROR', message)),
};

export const silentLogger: WatcherLogger = {
  info: () => undefined,
  warn: () => undefined,
  error: () => undefined,
};
