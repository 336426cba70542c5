import { startTestApp, type TestApp } from '../../testing/test-app';
import { exclusively } from '../exclusive';

jest.setTimeout(60_000);

/** Two apps on one database (one SQLite file, or on the PostgreSQL pass one schema), as two processes. */
describe('start-up work one process at a time', () => {
  let one: TestApp;
  let two: TestApp;

  beforeAll(async () => {
    one = await startTestApp();
    two = await startTestApp({}, one.dir);
  });
  afterAll(async () => {
    await two?.shutDown();
    await one?.stop();
  });

  const onPostgres = () => one.dataSource.options.type === 'postgres';

  it('when two processes start the same work then on PostgreSQL they take turns; on SQLite (one process per file) it just runs', async () => {
    let inside = 0;
    let most = 0;
    const ran: string[] = [];
    const work = (who: string) => async () => {
      inside++;
      most = Math.max(most, inside);
      await new Promise((resolve) => setTimeout(resolve, 200));
      inside--;
      ran.push(who);
      return who;
    };
    const answers = await Promise.all([
      exclusively(one.dataSource, 'the same work', work('one')),
      exclusively(two.dataSource, 'the same work', work('two')),
    ]);
    expect(answers).toEqual(['one', 'two']);
    expect(ran.sort()).toEqual(['one', 'two']);
    if (onPostgres()) expect(most).toBe(1);
  });

  it('when the work differs then both run side by side', async () => {
    let arrived!: () => void;
    const secondIn = new Promise<void>((resolve) => (arrived = resolve));
    const firstWaits = exclusively(one.dataSource, 'one kind', () => secondIn);
    const secondRuns = exclusively(two.dataSource, 'another kind', async () => arrived());
    await Promise.all([firstWaits, secondRuns]);
  });

  it('when the work throws then the lock is let go and the error reaches the caller', async () => {
    await expect(
      exclusively(one.dataSource, 'failing work', async () => {
        throw new Error('the work failed');
      }),
    ).rejects.toThrow('the work failed');
    await expect(exclusively(two.dataSource, 'failing work', async () => 'next')).resolves.toBe('next');
  });
});
