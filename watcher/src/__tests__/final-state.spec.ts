import fs from 'node:fs';
import path from 'node:path';
import { createWatcher, type DropFolderWatcher } from '../watcher';
import {
  IngestTestServer,
  listFiles,
  longTable,
  memoryLogger,
  sandbox,
  type Sandbox,
  sleep,
  waitFor,
} from './support';

/**
 * The server parses after its 202: the watcher keeps the original in place until the file's state is
 * final, survives a restart in between without sending it again, and then moves it where it belongs.
 */
describe("a file's final state decides where the original goes", () => {
  let server: IngestTestServer;
  let box: Sandbox;
  let watcher: DropFolderWatcher | undefined;
  const log = memoryLogger();

  beforeEach(async () => {
    server = new IngestTestServer();
    await server.listen(0);
    box = sandbox(() => server.url);
  });
  afterEach(async () => {
    await watcher?.stop();
    watcher = undefined;
    await server.close();
    box.remove();
  });

  const start = async () => {
    watcher = createWatcher(box.config({ statusPollMs: 50, heartbeatMs: 60_000 }), { logger: log });
    await watcher.start();
    return watcher;
  };

  it('waits while the server parses, across a restart, sends once, then moves it to quarantined/ with the reason', async () => {
    let state: 'parsing' | 'quarantined' = 'parsing';
    server.fileStatus = (id) => ({
      status: 200,
      body: {
        id,
        status: state,
        error:
          state === 'quarantined' ? 'RUN-3.csv line 1: expected a header row naming "wavelength_nm"' : null,
        duplicateOfId: null,
      },
    });
    fs.mkdirSync(box.folder(), { recursive: true });
    const original = path.join(box.folder(), 'RUN-3.csv');
    fs.writeFileSync(original, longTable(3));
    await start();
    await waitFor('a few state questions', () => server.statusQuestions.length >= 3);
    expect(server.uploads).toHaveLength(1);
    expect(fs.existsSync(original)).toBe(true);
    expect(listFiles(path.join(box.folder(), 'done'))).toEqual([]);

    // Stopped while the server is still parsing: the spool entry keeps the 202, the original stays.
    await watcher!.stop();
    state = 'quarantined';
    await start();
    await waitFor('the quarantine', () => listFiles(path.join(box.folder(), 'quarantined')).length === 2);
    await sleep(200);
    expect(server.uploads).toHaveLength(1); // never sent again
    expect(fs.existsSync(original)).toBe(false);
    expect(listFiles(path.join(box.folder(), 'done'))).toEqual([]);
    expect(listFiles(path.join(box.folder(), 'quarantined'))).toEqual(['RUN-3.csv', 'RUN-3.csv.reason.txt']);
    const reason = fs.readFileSync(path.join(box.folder(), 'quarantined', 'RUN-3.csv.reason.txt'), 'utf8');
    expect(reason).toContain('expected a header row naming "wavelength_nm"');
    expect(reason).toContain('intake #1');
    await waitFor('the spool to empty', () => watcher!.pending().length === 0);
  });

  it('moves a stored or unassigned file to done/, and the quarantined folder is never watched', async () => {
    server.fileStatus = (id) => ({
      status: 200,
      body: { id, status: 'unassigned', error: null, duplicateOfId: null },
    });
    fs.mkdirSync(path.join(box.folder(), 'quarantined'), { recursive: true });
    fs.writeFileSync(path.join(box.folder(), 'quarantined', 'OLD.csv'), longTable(9));
    fs.writeFileSync(path.join(box.folder(), 'RUN-4.csv'), longTable(4));
    await start();
    await waitFor('done/', () => listFiles(path.join(box.folder(), 'done')).includes('RUN-4.csv'));
    await sleep(300);
    expect(server.uploads.map((u) => u.fileName)).toEqual(['RUN-4.csv']);
  });
});
