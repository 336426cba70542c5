import type TestAgent from 'supertest/lib/agent';
import { batchCommentListSchema, batchCommentSchema, COMMENT_MAX_CHARS } from '../../contracts/comments';
import type { LiveEvent } from '../../contracts/events';
import { eventForRole } from '../../events/event-access';
import { createAnalysedBatch } from '../../reports/__tests__/analysed-batch';
import { extractPdfText } from '../../testing/pdf-text';
import {
  DEMO_EMAILS,
  DEMO_PASSWORD,
  signedInAgent,
  startTestApp,
  type TestApp,
  testQuery,
} from '../../testing/test-app';

interface AuditItem {
  action: string;
  actorName: string;
  summary: string;
  before: Record<string, unknown> | null;
  after: Record<string, unknown> | null;
}

describe('comments on a batch', () => {
  let t: TestApp;
  let batchId: number;
  let admin: TestAgent;
  let manager: TestAgent;
  let scientist: TestAgent;
  /** A second scientist, to show one scientist cannot remove another's comment. */
  let colleague: TestAgent;
  const events: LiveEvent[] = [];

  beforeAll(async () => {
    t = await startTestApp();
    t.events.subscribe((e) => events.push(e));
    batchId = (await createAnalysedBatch(t, { name: 'Comments: open batch' })).batchId;
    admin = await t.agent('admin');
    manager = await t.agent('lab_manager');
    scientist = await t.agent('scientist');
    const created = await admin.post('/api/users').send({
      email: 'second.scientist@equilight.test',
      displayName: 'Second Scientist',
      role: 'scientist',
      password: DEMO_PASSWORD,
    });
    expect(created.status).toBe(201);
    colleague = await signedInAgent(t.app);
    await colleague
      .post('/api/auth/login')
      .send({ email: 'second.scientist@equilight.test', password: DEMO_PASSWORD })
      .expect(200);
  });
  afterAll(() => t.stop());

  const url = (id = batchId) => `/api/batches/${id}/comments`;
  const auditOf = async (id: number): Promise<AuditItem[]> =>
    (await manager.get(`/api/audit?entity=batch&entityId=${id}`)).body.items as AuditItem[];

  it('when a scientist and a lab manager comment then both are answered 201 in the contract shape, and an admin reads them but may not write', async () => {
    const first = await scientist
      .post(url())
      .send({ text: '  C4 looks cloudy; re-read before trusting it.  ' });
    expect(first.status).toBe(201);
    const comment = batchCommentSchema.parse(first.body);
    expect(comment).toMatchObject({
      batchId,
      replyToId: null,
      authorName: expect.any(String),
      authorRole: 'scientist',
      text: 'C4 looks cloudy; re-read before trusting it.',
      removed: false,
    });
    expect(new Date(comment.createdAt).toISOString()).toBe(comment.createdAt);
    expect((await manager.post(url()).send({ text: 'Noted.' })).status).toBe(201);

    const refused = await admin.post(url()).send({ text: 'Admins only read.' });
    expect(refused.status).toBe(403);
    const read = await admin.get(url());
    expect(read.status).toBe(200);
    expect(batchCommentListSchema.parse(read.body).map((c) => c.text)).toEqual([
      'C4 looks cloudy; re-read before trusting it.',
      'Noted.',
    ]);
  });

  it('when nobody is signed in then reading and writing are refused (401)', async () => {
    const anon = await signedInAgent(t.app);
    expect((await anon.get(url())).status).toBe(401);
    expect((await anon.post(url()).send({ text: 'Hello' })).status).toBe(401);
  });

  it('when the CSRF header is missing then a comment is refused (403) and nothing is stored', async () => {
    const before = (await scientist.get(url())).body.length;
    const res = await scientist.post(url()).set('X-XSRF-TOKEN', 'forged').send({ text: 'Sneaky' });
    expect(res.status).toBe(403);
    expect((await scientist.get(url())).body.length).toBe(before);
  });

  it.each([
    ['empty text', { text: '' }, 'Invalid request: text: write something first'],
    ['only white space', { text: '   \n  ' }, 'Invalid request: text: write something first'],
    [
      '4001 characters',
      { text: 'x'.repeat(COMMENT_MAX_CHARS + 1) },
      'Invalid request: text: must be at most 4000 characters',
    ],
    ['no text', {}, 'Invalid request: text: write the comment as text'],
    ['a number for text', { text: 42 }, 'Invalid request: text: write the comment as text'],
    ['a word for replyToId', { text: 'ok', replyToId: 'one' }, 'Invalid request: replyToId: '],
    ['an unknown field', { text: 'ok', colour: 'red' }, 'Invalid request: '],
  ])('when the body has %s then the answer is 400 naming the problem', async (_what, body, message) => {
    const res = await scientist.post(url()).send(body);
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('bad_request');
    expect(res.body.error.message.startsWith(message)).toBe(true);
  });

  it('when a comment is exactly 4000 characters then it is kept whole', async () => {
    const res = await scientist.post(url()).send({ text: 'a'.repeat(COMMENT_MAX_CHARS) });
    expect(res.status).toBe(201);
    expect(res.body.text).toHaveLength(COMMENT_MAX_CHARS);
    await scientist.delete(`${url()}/${res.body.id}`).expect(200);
  });

  it('when comments and replies arrive out of thread order then the list reads thread by thread, oldest first', async () => {
    const id = (await createAnalysedBatch(t, { name: 'Comments: threads' })).batchId;
    const post = async (agent: TestAgent, text: string, replyToId?: number) => {
      const res = await agent.post(url(id)).send({ text, ...(replyToId ? { replyToId } : {}) });
      expect(res.status).toBe(201);
      return res.body.id as number;
    };
    const a = await post(scientist, 'A: first thread');
    const b = await post(manager, 'B: second thread');
    await post(manager, 'A1: reply to A', a);
    await post(scientist, 'B1: reply to B', b);
    await post(colleague, 'A2: second reply to A', a);
    const c = await post(colleague, 'C: third thread');
    const list = batchCommentListSchema.parse((await scientist.get(url(id))).body);
    expect(list.map((x) => x.text)).toEqual([
      'A: first thread',
      'A1: reply to A',
      'A2: second reply to A',
      'B: second thread',
      'B1: reply to B',
      'C: third thread',
    ]);
    expect(list.map((x) => x.replyToId)).toEqual([null, a, a, null, b, null]);
    // The list is in time order within each level.
    const times = list.filter((x) => x.replyToId === null).map((x) => x.createdAt);
    expect([...times].sort()).toEqual(times);

    // Replies are one level deep, and stay within their batch.
    const replyToReply = list[1]!.id;
    const deep = await scientist.post(url(id)).send({ text: 'too deep', replyToId: replyToReply });
    expect(deep.status).toBe(400);
    expect(deep.body.error.message).toBe(
      `replyToId: comment ${replyToReply} is itself a reply; reply to the comment that opens its thread (${a}).`,
    );
    const elsewhere = await scientist.post(url(batchId)).send({ text: 'wrong batch', replyToId: c });
    expect(elsewhere.status).toBe(400);
    expect(elsewhere.body.error.message).toBe(`replyToId: no comment ${c} on batch "Comments: open batch".`);
  });

  it('when a comment is added or removed then the audit trail of its batch records who, what and the text', async () => {
    const id = (await createAnalysedBatch(t, { name: 'Comments: audit' })).batchId;
    const added = (await scientist.post(url(id)).send({ text: 'Blank B1 reads high.' })).body;
    const reply = (await manager.post(url(id)).send({ text: 'Agreed.', replyToId: added.id })).body;
    await scientist.delete(`${url(id)}/${added.id}`).expect(200);

    const trail = (await auditOf(id)).filter((e) => e.action.startsWith('comment')).reverse();
    expect(trail.map((e) => [e.action, e.actorName])).toEqual([
      ['comment', DEMO_EMAILS.scientist],
      ['comment', DEMO_EMAILS.lab_manager],
      ['comment_remove', DEMO_EMAILS.scientist],
    ]);
    expect(trail[0]!.after).toEqual({ commentId: added.id, replyToId: null, text: 'Blank B1 reads high.' });
    expect(trail[1]!.after).toEqual({ commentId: reply.id, replyToId: added.id, text: 'Agreed.' });
    expect(trail[1]!.summary).toBe(`Replied to comment ${added.id} on batch "Comments: audit"`);
    // The removal keeps what the comment said; the thread does not.
    expect(trail[2]!.before).toMatchObject({ commentId: added.id, text: 'Blank B1 reads high.' });
    expect(trail[2]!.summary).toBe(`Removed their own comment ${added.id} on batch "Comments: audit"`);
    const list = batchCommentListSchema.parse((await admin.get(url(id))).body);
    expect(list.map((c) => [c.id, c.removed, c.text])).toEqual([
      [added.id, true, null],
      [reply.id, false, 'Agreed.'],
    ]);
    expect(list[0]!.removedBy).toEqual(expect.any(String));
    expect(list[0]!.removedAt).not.toBeNull();
    // Nor does the database row: only the audit entry holds the words.
    const row = await testQuery(t.dataSource, 'SELECT text, removed_at FROM batch_comments WHERE id = ?', [
      added.id,
    ]);
    expect(row[0].text).toBe('');
  });

  it('when someone other than the author removes a comment then only a lab manager may', async () => {
    const id = (await createAnalysedBatch(t, { name: 'Comments: removal rights' })).batchId;
    const mine = (await scientist.post(url(id)).send({ text: 'Mine.' })).body;

    const byColleague = await colleague.delete(`${url(id)}/${mine.id}`);
    expect(byColleague.status).toBe(403);
    expect(byColleague.body.error.message).toBe('Only its author or a lab manager may remove a comment.');
    expect((await admin.delete(`${url(id)}/${mine.id}`)).status).toBe(403);

    const byManager = await manager.delete(`${url(id)}/${mine.id}`);
    expect(byManager.status).toBe(200);
    expect(batchCommentSchema.parse(byManager.body)).toMatchObject({ removed: true, text: null });
    const again = await manager.delete(`${url(id)}/${mine.id}`);
    expect(again.status).toBe(409);
    expect((await manager.delete(`${url(id)}/999999`)).status).toBe(404);
    const entry = (await auditOf(id)).find((e) => e.action === 'comment_remove')!;
    expect(entry.actorName).toBe(DEMO_EMAILS.lab_manager);
    expect(entry.summary).toMatch(/^Removed .+'s comment \d+ on batch "Comments: removal rights"$/);

    const reply = await scientist.post(url(id)).send({ text: 'Reply to a removed one', replyToId: mine.id });
    expect(reply.status).toBe(409);
  });

  it('when the batch does not exist then the answer is 404', async () => {
    expect((await scientist.get(url(999999))).status).toBe(404);
    const res = await scientist.post(url(999999)).send({ text: 'Nobody home' });
    expect(res.status).toBe(404);
    expect(res.body.error.message).toBe('No batch with id 999999.');
  });

  it('when a batch is approved then it still takes comments, and its approval record and analysis stay as they were', async () => {
    const batch = await createAnalysedBatch(t, { name: 'Comments: approved' });
    await batch.ingest();
    await scientist.post(`/api/batches/${batch.batchId}/review`).expect(200);
    await manager.post(`/api/batches/${batch.batchId}/approve`).send({ comment: 'Fine.' }).expect(200);
    const records = (await scientist.get(`/api/batches/${batch.batchId}/results`)).body;
    const before = (await scientist.get(`/api/batches/${batch.batchId}/analysis`)).body;

    const res = await scientist.post(url(batch.batchId)).send({ text: 'Repeat at 35 °C next week.' });
    expect(res.status).toBe(201);
    const after = (await scientist.get(`/api/batches/${batch.batchId}/analysis`)).body;
    expect(after.batch.state).toBe('approved');
    expect(after.result).toEqual(before.result);
    expect((await scientist.get(`/api/batches/${batch.batchId}/results`)).body).toEqual(records);
    const entry = (await auditOf(batch.batchId)).find((e) => e.action === 'comment')!;
    expect(entry.summary).toBe('Commented on batch "Comments: approved" (approved)');

    // The report lists the comments last, the removed ones as such.
    const reply = await manager
      .post(url(batch.batchId))
      .send({ text: 'Booked the bath.', replyToId: res.body.id });
    expect(reply.status).toBe(201);
    await manager.delete(`${url(batch.batchId)}/${reply.body.id}`).expect(200);
    const csv = (await scientist.get(`/api/batches/${batch.batchId}/export.csv?content=results`)).text;
    const tail = csv.slice(csv.lastIndexOf('Comments'));
    expect(tail).toContain('Repeat at 35 °C next week.');
    expect(tail).not.toContain('Booked the bath.');
    expect(tail).toMatch(/Comment removed by /);
    const pdf = await scientist
      .get(`/api/batches/${batch.batchId}/report.pdf`)
      .buffer(true)
      .parse((r, cb) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => cb(null, Buffer.concat(chunks)));
      });
    const pdfText = await extractPdfText(pdf.body as Buffer);
    expect(pdfText).toContain('Comments');
    expect(pdfText).toContain('Repeat at 35 °C next week.');
  });

  it('when a comment is added or removed then a batch.comment live event names it and its batch, and every batch reader sees it', async () => {
    events.length = 0;
    const added = (await scientist.post(url()).send({ text: 'Live one.' })).body;
    await scientist.delete(`${url()}/${added.id}`).expect(200);
    const seen = events.filter((e) => e.type === 'batch.comment');
    expect(seen.map((e) => e.data)).toEqual([
      { id: added.id, batchId, change: 'added' },
      { id: added.id, batchId, change: 'removed' },
    ]);
    for (const role of ['admin', 'lab_manager', 'scientist'] as const)
      expect(eventForRole(role, seen[0]!)?.data).toEqual({ id: added.id, batchId, change: 'added' });
    // A refused comment sends nothing.
    events.length = 0;
    await admin.post(url()).send({ text: 'No.' }).expect(403);
    await scientist.post(url()).send({ text: '' }).expect(400);
    expect(events.filter((e) => e.type === 'batch.comment')).toEqual([]);
  });
});
