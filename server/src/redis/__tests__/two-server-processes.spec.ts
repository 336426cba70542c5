import { type ChildProcess, spawn } from 'node:child_process';
import crypto from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { type Job as BullJob, Queue } from 'bullmq';
import type { DataSource } from 'typeorm';
import WebSocket from 'ws';
import { loadConfig } from '../../config';
import { openDatabase } from '../../database/data-source';
import type { LiveEvent } from '../../events/event-bus';
import { longTableCsv } from '../../ingest/__tests__/ingest-helpers';
import { seedDemoPeople } from '../../seed/demo-people';
import { describeWithRedis, removeRedisKeys, TEST_REDIS_URL, testRedisConfig } from '../../testing/redis';
import { UsersService } from '../../users/users.service';
import { freePort } from '../../testing/free-port';

/**
 * Two real server processes (the built server) on one PostgreSQL schema and one Redis prefix: 200 files
 * sent to both in turn, a signed-in WebSocket on each, and one server killed with SIGKILL while it holds
 * a job. The other finishes every job, each file is stored exactly once, and its socket hears of every one.
 */
jest.setTimeout(180_000);

const REPO_ROOT = path.resolve(__dirname, '../../../..');
const SERVER_MAIN = path.join(REPO_ROOT, 'server/dist/main.js');
const POSTGRES_URL = process.env['EQUILIGHT_TEST_POSTGRES_URL'] ?? 'postgres://postgres@127.0.0.1:5432/test';
const PASSWORD = 'equilight-two-processes';
const FILES = 200;
const WELLS = 96;

/** PostgreSQL is needed too: skipped when the jest run found none (it said so), or was told to go without. */
const describeOnBoth = process.env['EQUILIGHT_TEST_POSTGRES'] === 'off' ? describe.skip : describeWithRedis;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Poll until `check` holds; fail naming `what` (and the servers' output) after a generous time. */
async function until(
  what: string,
  check: () => Promise<boolean> | boolean,
  output: () => string,
  timeoutMs = 90_000,
): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}\n${output()}`);
    await sleep(50);
  }
}

/** One server process and its output. */
class ServerProcess {
  private log = '';
  readonly child: ChildProcess;
  readonly exited: Promise<void>;
  readonly url: string;

  constructor(
    readonly name: string,
    readonly port: number,
    env: Record<string, string>,
  ) {
    this.url = `http://127.0.0.1:${port}`;
    this.child = spawn(process.execPath, [SERVER_MAIN], {
      cwd: REPO_ROOT,
      env: { ...process.env, ...env, PORT: String(port), HOST: '127.0.0.1' },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    this.child.stdout!.on('data', (d) => (this.log += d));
    this.child.stderr!.on('data', (d) => (this.log += d));
    this.exited = new Promise((resolve) => this.child.once('exit', () => resolve()));
  }

  /** The name its queue worker records on the jobs it takes (bullmq-queue.ts). */
  get workerName(): string {
    return `${os.hostname()}:${this.child.pid}`;
  }

  get running(): boolean {
    return this.child.exitCode === null && this.child.signalCode === null;
  }

  output(): string {
    return `--- ${this.name} (pid ${this.child.pid}) ---\n${this.log.slice(-4000)}`;
  }

  async ready(): Promise<void> {
    await until(
      `${this.name} to answer`,
      async () => {
        if (!this.running) throw new Error(`${this.name} exited early:\n${this.output()}`);
        try {
          return (await fetch(`${this.url}/api/health`)).ok;
        } catch {
          return false;
        }
      },
      () => this.output(),
      30_000,
    );
  }

  async stop(signal: NodeJS.Signals = 'SIGTERM'): Promise<void> {
    if (this.running) this.child.kill(signal);
    await this.exited;
  }
}

/** A signed-in browser: cookies kept, the XSRF token echoed on writes. */
class Browser {
  private readonly cookies = new Map<string, string>();

  constructor(readonly server: ServerProcess) {}

  cookieHeader(): string {
    return [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ');
  }

  async request(method: string, url: string, json?: unknown): Promise<Response> {
    const headers: Record<string, string> = { cookie: this.cookieHeader() };
    const xsrf = this.cookies.get('XSRF-TOKEN');
    if (method !== 'GET' && xsrf) headers['x-xsrf-token'] = decodeURIComponent(xsrf);
    if (json !== undefined) headers['content-type'] = 'application/json';
    const res = await fetch(`${this.server.url}${url}`, {
      method,
      headers,
      body: json === undefined ? undefined : JSON.stringify(json),
    });
    for (const line of res.headers.getSetCookie()) {
      const pair = line.split(';')[0]!;
      const eq = pair.indexOf('=');
      this.cookies.set(pair.slice(0, eq).trim(), pair.slice(eq + 1).trim());
    }
    return res;
  }

  async signIn(email: string): Promise<this> {
    await this.request('GET', '/api/health');
    const res = await this.request('POST', '/api/auth/login', { email, password: PASSWORD });
    if (res.status !== 200)
      throw new Error(`sign-in on ${this.server.name}: ${res.status} ${await res.text()}`);
    return this;
  }

  /** The live-event socket, open; every file.stored id it hears goes into `stored`. */
  async listen(stored: Set<number>): Promise<WebSocket> {
    const host = `127.0.0.1:${this.server.port}`;
    const ws = new WebSocket(`ws://${host}/api/events`, {
      headers: { cookie: this.cookieHeader(), origin: `http://${host}` },
    });
    ws.on('message', (data) => {
      const event = JSON.parse(String(data)) as LiveEvent;
      if (event.type === 'file.stored') stored.add(event.data.id);
    });
    ws.on('error', () => undefined); // the socket of the killed server breaks; that is the point
    await new Promise<void>((resolve, reject) => {
      ws.once('open', () => resolve());
      ws.once('unexpected-response', (_req, res) => reject(new Error(`socket refused: ${res.statusCode}`)));
    });
    return ws;
  }
}

describeOnBoth('two server processes on PostgreSQL and Redis', () => {
  const redis = testRedisConfig('two-servers');
  const schema = `t_two_servers_${crypto.randomBytes(4).toString('hex')}`;
  let dataDir: string;
  let dataSource: DataSource;
  let queue: Queue;
  const servers: ServerProcess[] = [];
  const sockets: WebSocket[] = [];
  const output = () => servers.map((s) => s.output()).join('\n');

  beforeAll(async () => {
    if (!fs.existsSync(SERVER_MAIN))
      throw new Error('Build first: npm run build:server (this test runs server/dist/main.js).');
    // Both processes share the data folder (the raw-file archive) as they would share a volume.
    dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'equilight-two-servers-'));
    const config = loadConfig({
      NODE_ENV: 'test',
      DATA_DIR: dataDir,
      DATABASE_URL: POSTGRES_URL,
      DATABASE_SCHEMA: schema,
    });
    // The schema and its people made here, before the servers start (they then seed nothing).
    dataSource = await openDatabase(config);
    await seedDemoPeople(new UsersService(dataSource), PASSWORD);
    queue = new Queue('ingest', { connection: { url: redis.url }, prefix: redis.prefix });
  });

  afterAll(async () => {
    for (const ws of sockets) ws.terminate();
    for (const server of servers) await server.stop();
    await queue?.close();
    if (dataSource?.isInitialized) {
      await dataSource.query(`DROP SCHEMA IF EXISTS "${schema}" CASCADE`);
      await dataSource.destroy();
    }
    await removeRedisKeys(redis.prefix);
    if (dataDir) fs.rmSync(dataDir, { recursive: true, force: true });
  });

  const count = async (sql: string, params: unknown[] = []): Promise<number> =>
    Number(((await dataSource.query(sql, params)) as { n: string }[])[0]!.n);

  it('when one server is killed mid-queue then the other stores every file exactly once and tells its browsers', async () => {
    const env = {
      NODE_ENV: 'test',
      DATA_DIR: dataDir,
      WEB_DIST_DIR: path.join(dataDir, 'no-web'),
      DATABASE_URL: POSTGRES_URL,
      DATABASE_SCHEMA: schema,
      QUEUE_URL: TEST_REDIS_URL,
      QUEUE_PREFIX: redis.prefix,
      SEED_DEMO: 'false',
      SMTP_STANDIN: 'false',
    };
    // Side by side: the schema is already up to date, so neither migrates anything.
    const doomed = new ServerProcess('server 1', await freePort(), env);
    const survivor = new ServerProcess('server 2', await freePort(), env);
    servers.push(doomed, survivor);
    await Promise.all([doomed.ready(), survivor.ready()]);

    const admin = await new Browser(doomed).signIn('admin@equilight.test');
    const created = await admin.request('POST', '/api/instruments', {
      name: 'Reader (two servers)',
      kind: 'plate_reader',
      plateFormat: '96',
      fileFormat: 'long_table',
      dropSubfolder: 'reader-two',
      fileNamePattern: '^(?<run>RUN-\\d+)',
    });
    expect(created.status).toBe(201);
    const { profile, token } = (await created.json()) as { profile: { id: number }; token: string };

    // A lab manager's page open on each server.
    const heardOnDoomed = new Set<number>();
    const heardOnSurvivor = new Set<number>();
    for (const [server, heard] of [
      [doomed, heardOnDoomed],
      [survivor, heardOnSurvivor],
    ] as const)
      sockets.push(await (await new Browser(server).signIn('manager@equilight.test')).listen(heard));

    // Held until every file is in, so that jobs surely remain when a server dies.
    await queue.pause();
    const ids: number[] = [];
    const send = async (i: number): Promise<void> => {
      const server = i % 2 === 0 ? doomed : survivor;
      const form = new FormData();
      // Content unique per file (the wavelength), so none is a duplicate of another.
      form.append('file', new Blob([longTableCsv(i, 300 + i)]), `RUN-${9000 + i}.csv`);
      const res = await fetch(`${server.url}/api/ingest`, {
        method: 'POST',
        headers: { authorization: `Bearer ${token}` },
        body: form,
      });
      if (res.status !== 202)
        throw new Error(`file ${i} to ${server.name}: ${res.status} ${await res.text()}`);
      ids.push(((await res.json()) as { id: number }).id);
    };
    for (let i = 0; i < FILES; i += 8) await Promise.all(Array.from({ length: 8 }, (_, k) => send(i + k)));
    expect(new Set(ids).size).toBe(FILES);
    await queue.resume();

    // Let both work a while, then freeze server 1 at a moment it holds a job, and kill it there.
    const completedBy = async (server: ServerProcess): Promise<BullJob[]> =>
      (await queue.getJobs(['completed'], 0, -1)).filter((j) => j.processedBy === server.workerName);
    await until(
      'both servers to have stored files',
      async () => (await completedBy(doomed)).length >= 5 && (await completedBy(survivor)).length >= 5,
      output,
    );
    let held: BullJob[] = [];
    while (!held.length) {
      doomed.child.kill('SIGSTOP');
      held = (await queue.getJobs(['active'], 0, -1)).filter((j) => j.processedBy === doomed.workerName);
      if (!held.length) {
        doomed.child.kill('SIGCONT');
        await sleep(5);
      }
    }
    const storedByDoomed = new Set(
      (await completedBy(doomed)).map((j) => (j.data as { intakeFileId: number }).intakeFileId),
    );
    await doomed.stop('SIGKILL');
    const counts = await queue.getJobCounts('waiting', 'active', 'completed', 'failed');
    expect((counts['waiting'] ?? 0) + (counts['active'] ?? 0)).toBeGreaterThan(0);

    // Server 2 finishes everything, the jobs server 1 held included (once their hold runs out).
    let last = {};
    await until(
      'every job completed',
      async () => {
        last = await queue.getJobCounts('waiting', 'delayed', 'active', 'completed', 'failed');
        return (last as Record<string, number>)['completed'] === FILES;
      },
      () => `${JSON.stringify(last)}\n${output()}`,
    );
    const final = await queue.getJobCounts('waiting', 'delayed', 'active', 'completed', 'failed');
    expect(final).toMatchObject({ waiting: 0, delayed: 0, active: 0, completed: FILES, failed: 0 });
    for (const job of held) {
      const now = await queue.getJob(job.id!);
      expect(now?.processedBy).toBe(survivor.workerName);
      expect(now?.finishedOn).toBeGreaterThan(0);
    }

    // Every file stored exactly once: in PostgreSQL, each a final row with all its readings, no more.
    expect(
      await count(`SELECT COUNT(*) AS n FROM "${schema}".intake_files WHERE profile_id = $1`, [profile.id]),
    ).toBe(FILES);
    expect(
      await count(
        `SELECT COUNT(*) AS n FROM "${schema}".intake_files WHERE profile_id = $1 AND status = 'unassigned' AND reading_count = $2`,
        [profile.id, WELLS],
      ),
    ).toBe(FILES);
    expect(
      await count(
        `SELECT COUNT(*) AS n FROM "${schema}".readings r JOIN "${schema}".intake_files f ON f.id = r.intake_file_id WHERE f.profile_id = $1`,
        [profile.id],
      ),
    ).toBe(FILES * WELLS);
    expect(
      await count(
        `SELECT COUNT(*) AS n FROM (SELECT r.intake_file_id FROM "${schema}".readings r JOIN "${schema}".intake_files f ON f.id = r.intake_file_id WHERE f.profile_id = $1 GROUP BY r.intake_file_id HAVING COUNT(*) = $2) s`,
        [profile.id, WELLS],
      ),
    ).toBe(FILES);

    // The survivor's page heard of every file, those server 1 stored before it died included; server
    // 1's page heard of files server 2 stored while both ran.
    await until(
      'every file.stored on server 2’s socket',
      () => heardOnSurvivor.size >= FILES,
      output,
      20_000,
    );
    expect([...heardOnSurvivor].sort((a, b) => a - b)).toEqual([...ids].sort((a, b) => a - b));
    expect(storedByDoomed.size).toBeGreaterThanOrEqual(5);
    for (const id of storedByDoomed) expect(heardOnSurvivor.has(id)).toBe(true);
    const storedBySurvivor = (await completedBy(survivor)).map(
      (j) => (j.data as { intakeFileId: number }).intakeFileId,
    );
    expect(storedBySurvivor.some((id) => heardOnDoomed.has(id))).toBe(true);
  });
});
