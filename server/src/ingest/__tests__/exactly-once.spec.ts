import request from 'supertest';
import { startTestApp, type TestApp, testQuery, itSqliteOnly } from '../../testing/test-app';
import { createProfile, longTableCsv, readingCount, settled } from './ingest-helpers';

describe('storing is all-or-nothing and happens once', () => {
  let t: TestApp;
  let token: string;
  beforeAll(async () => {
    t = await startTestApp();
    token = (await createProfile(await t.agent('admin'))).token;
  });
  afterAll(() => t.stop());

  const send = (content: string, name: string) =>
    request(t.app)
      .post('/api/ingest')
      .set('Authorization', `Bearer ${token}`)
      .attach('file', Buffer.from(content), name);

  itSqliteOnly(
    'when the database refuses one reading mid-file then none of the file lands and it is quarantined with the cause',
    async () => {
      // A real fault inside the transaction: SQLite aborts the insert of the last well of the plate.
      await testQuery(
        t.dataSource,
        "CREATE TRIGGER refuse_h12 BEFORE INSERT ON readings WHEN NEW.position = 'H12' BEGIN SELECT RAISE(ABORT, 'simulated write fault'); END",
      );
      try {
        const res = await send(longTableCsv(100), 'RUN-0100.csv');
        const file = await settled(t, res.body.id, 20_000);
        expect(file.status).toBe('quarantined');
        expect(file.error).toMatch(
          /Storing failed after 3 tries \(.*simulated write fault.*\); no reading of it was kept/,
        );
        expect(await readingCount(t, res.body.id)).toBe(0);
      } finally {
        await testQuery(t.dataSource, 'DROP TRIGGER refuse_h12');
      }
    },
    // Three tries with their waits (0.5 s, 1 s): a loaded machine needs more than jest's 5 s.
    30_000,
  );

  it('when a finished job runs again (as after a restart) then nothing is stored twice', async () => {
    const res = await send(longTableCsv(101), 'RUN-0101.csv');
    await settled(t, res.body.id);
    const before = await readingCount(t);
    const status = await t.services.ingest.process({
      id: 'again',
      name: 'parse-and-store',
      data: { intakeFileId: res.body.id },
      attemptsMade: 0,
    });
    expect(status).toBe('unassigned');
    expect(await readingCount(t)).toBe(before);
  });

  it('when a file was left half-way (parsing) then processing it again stores it exactly once', async () => {
    const res = await send(longTableCsv(102), 'RUN-0102.csv');
    await settled(t, res.body.id);
    // simulate a crash after some rows were written outside a transaction, then a restart
    await testQuery(t.dataSource, "UPDATE intake_files SET status = 'parsing' WHERE id = ?", [res.body.id]);
    await testQuery(
      t.dataSource,
      "INSERT INTO readings (intake_file_id, position, wavelength_nm, absorbance) VALUES (?, 'A1', 450, 0.1)",
      [res.body.id],
    );
    await t.services.ingest.process({
      id: 'again',
      name: 'parse-and-store',
      data: { intakeFileId: res.body.id },
      attemptsMade: 0,
    });
    expect(await readingCount(t, res.body.id)).toBe(96);
  });

  it('when two runs of the same file overlap then it is stored and announced once', async () => {
    // Listening from before the file is sent: its first run's announcement comes just after that run's
    // commit, and may come after the file already reads as stored (the test must not count it as a rerun's).
    const announced: { data: { id: number } }[] = [];
    const stop = t.events.subscribe((event) => {
      if (event.type === 'file.stored') announced.push(event);
    });
    try {
      const res = await send(longTableCsv(103), 'RUN-0103.csv');
      const id: number = res.body.id;
      const ofFile = () => announced.filter((e) => e.data.id === id);
      await settled(t, id);
      const deadline = Date.now() + 10_000;
      while (ofFile().length === 0 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 10));
      expect(ofFile()).toHaveLength(1);
      // As if the job had been picked up twice before either finished (a retry racing the first run).
      await testQuery(t.dataSource, "UPDATE intake_files SET status = 'parsing' WHERE id = ?", [id]);
      const job = { id: 'twice', name: 'parse-and-store', data: { intakeFileId: id }, attemptsMade: 0 };
      const statuses = await Promise.all([t.services.ingest.process(job), t.services.ingest.process(job)]);
      expect(statuses).toEqual(['unassigned', 'unassigned']);
      // Both runs have returned, and a run announces before it returns: one more, not two.
      expect(ofFile()).toHaveLength(2);
      expect(await readingCount(t, id)).toBe(96);
    } finally {
      stop();
    }
  });

  it('when two workers take the same file at once then its readings are stored once', async () => {
    const res = await send(longTableCsv(103), 'RUN-0103.csv');
    const id: number = res.body.id;
    await settled(t, id);
    // As before any job ran; then two jobs for it side by side (a take-over from a stuck worker, or the
    // file queued twice), each in its own transaction (on PostgreSQL, two connections of the pool).
    await testQuery(t.dataSource, 'DELETE FROM readings WHERE intake_file_id = ?', [id]);
    await testQuery(
      t.dataSource,
      "UPDATE intake_files SET status = 'queued', finished_at = NULL WHERE id = ?",
      [id],
    );
    const job = (n: number) => ({
      id: `race-${n}`,
      name: 'parse-and-store',
      data: { intakeFileId: id },
      attemptsMade: 0,
    });
    // PostgreSQL: hold the readings table until all three wait at their storing transactions, so that
    // they surely meet there (SQLite has one connection: the transactions take turns anyway).
    const onPostgres = t.dataSource.options.type === 'postgres';
    const holder = t.dataSource.createQueryRunner();
    if (onPostgres) {
      await holder.startTransaction();
      await holder.query('LOCK TABLE readings IN SHARE MODE');
    }
    const racing = Promise.allSettled([1, 2, 3].map((n) => t.services.ingest.process(job(n))));
    if (onPostgres) {
      const waiting = async () =>
        Number(
          (
            await testQuery(
              t.dataSource,
              "SELECT COUNT(*) AS n FROM pg_locks WHERE NOT granted AND (relation = 'readings'::regclass OR locktype IN ('transactionid', 'tuple'))",
            )
          )[0].n,
        );
      const deadline = Date.now() + 20_000;
      while ((await waiting()) < 3 && Date.now() < deadline) await new Promise((r) => setTimeout(r, 20));
      await holder.commitTransaction();
    }
    await holder.release();
    const runs = await racing;
    // A try may fail outright (SQLite: one connection, one transaction at a time); the queue runs it again.
    const outcomes = await Promise.all(
      runs.map((run, i) => (run.status === 'fulfilled' ? run.value : t.services.ingest.process(job(i + 1)))),
    );
    expect(outcomes).toEqual(['unassigned', 'unassigned', 'unassigned']);
    expect(await readingCount(t, id)).toBe(96);
    expect((await t.services.ingest.getDto(id)).status).toBe('unassigned');
  });
});
