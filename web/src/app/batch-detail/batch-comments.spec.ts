import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { signal } from '@angular/core';
import { DeferBlockState, TestBed } from '@angular/core/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import type { BatchComment } from '@equilight/contracts';
import { Subject, filter } from 'rxjs';
import type { Role } from '../core/auth/user';
import { AuthService } from '../core/auth/auth.service';
import { type LiveEvent, LiveEventsService } from '../core/live/live-events.service';
import { formatDateTime } from '../shared/format/date-format';
import { BatchComments, COMMENTS_LIVE_DEBOUNCE_MS, threadsOf } from './batch-comments';

const URL = '/api/batches/7/comments';
const wait = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));
const text = (el: Element | null) => (el?.textContent ?? '').replace(/\s+/g, ' ').trim();

const ME = { scientist: 21, lab_manager: 22, admin: 23 } as const;

function comment(id: number, more: Partial<BatchComment> = {}): BatchComment {
  return {
    id,
    batchId: 7,
    replyToId: null,
    authorId: ME.scientist,
    authorName: 'Rosa Quint',
    authorRole: 'scientist',
    createdAt: `2031-05-02T08:${String(10 + id).padStart(2, '0')}:00Z`,
    text: `Comment ${id}`,
    removed: false,
    removedAt: null,
    removedBy: null,
    ...more,
  };
}

/** Two threads in the server's reading order: 1 with replies 3 and 5, then 2 with reply 4 (removed). */
const LIST: BatchComment[] = [
  comment(1, { text: 'C4 reads high; bubble?' }),
  comment(3, { replyToId: 1, authorId: ME.lab_manager, authorName: 'Ivo Brandt', authorRole: 'lab_manager' }),
  comment(5, { replyToId: 1 }),
  comment(2, { authorId: ME.lab_manager, authorName: 'Ivo Brandt', authorRole: 'lab_manager' }),
  comment(4, {
    replyToId: 2,
    text: null,
    removed: true,
    removedAt: '2031-05-02T09:00:00Z',
    removedBy: 'Rosa Quint',
  }),
];

describe('threadsOf', () => {
  it('groups the server order into threads with their replies', () => {
    const threads = threadsOf(LIST);
    expect(threads.map((t) => [t.opener.id, t.replies.map((r) => r.id)])).toEqual([
      [1, [3, 5]],
      [2, [4]],
    ]);
  });
});

describe('BatchComments', () => {
  let events: Subject<LiveEvent>;
  let http: HttpTestingController;

  async function setup(role: Role = 'scientist', list = LIST, approved = false) {
    events = new Subject<LiveEvent>();
    TestBed.configureTestingModule({
      imports: [BatchComments],
      providers: [
        provideHttpClient(),
        provideHttpClientTesting(),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
        {
          provide: LiveEventsService,
          useValue: {
            connected: signal(true),
            ofType: (...types: string[]) => events.pipe(filter((e) => types.includes(e.type))),
          },
        },
        {
          provide: AuthService,
          useValue: {
            hasRole: (...roles: Role[]) => roles.includes(role),
            currentUser: signal({ id: ME[role], role }),
          },
        },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(BatchComments);
    fixture.componentRef.setInput('batchId', 7);
    fixture.componentRef.setInput('approved', approved);
    await fixture.whenStable();
    http.expectOne(URL).flush(list);
    // The section's body waits for the viewport, which jsdom lacks.
    for (const block of await fixture.getDeferBlocks()) await block.render(DeferBlockState.Complete);
    await fixture.whenStable();
    const el = fixture.nativeElement as HTMLElement;
    return { fixture, el };
  }

  afterEach(() => http.verify());

  async function type(
    fixture: { whenStable(): Promise<unknown> },
    field: HTMLTextAreaElement,
    value: string,
  ) {
    field.value = value;
    field.dispatchEvent(new Event('input'));
    await fixture.whenStable();
  }

  it('shows threads oldest first, replies indented under their first comment, with author, role and date', async () => {
    const { el } = await setup();
    expect(text(el.querySelector('h2'))).toBe('Comments (4)');
    const threads = [...el.querySelectorAll('[data-testid="comment-thread"]')];
    expect(threads).toHaveLength(2);
    const first = threads[0]!;
    expect(text(first.querySelector('[data-testid="comment-body"]'))).toBe('C4 reads high; bubble?');
    const replies = first.querySelector('[data-testid="comment-replies"]')!;
    expect(replies.getAttribute('aria-label')).toBe('Replies to Rosa Quint');
    expect(
      [...replies.querySelectorAll('[data-testid="comment"]')].map((c) => c.getAttribute('data-comment-id')),
    ).toEqual(['3', '5']);
    const reply = replies.querySelector('[data-testid="comment"]')!;
    expect(text(reply.querySelector('[data-testid="comment-author"]'))).toBe('Ivo Brandt');
    expect(text(reply.querySelector('[data-testid="comment-role"]'))).toBe('Lab manager');
    const time = reply.querySelector('time')!;
    expect(time.getAttribute('datetime')).toBe('2031-05-02T08:13:00Z');
    expect(text(time)).toBe(formatDateTime('2031-05-02T08:13:00Z'));
    // A removed comment keeps its place and says who removed it; its words are gone.
    const removed = threads[1]!.querySelector('[data-comment-id="4"]')!;
    // (The icon's ligature text, "block", is hidden from assistive technology.)
    expect(text(removed.querySelector('[data-testid="comment-removed"]'))).toBe(
      `block Comment removed by Rosa Quint, ${formatDateTime('2031-05-02T09:00:00Z')}`,
    );
    expect(removed.querySelector('[data-testid="comment-body"]')).toBeNull();
  });

  it('adds a comment: counts characters, sends the text, clears the field and reads the list again', async () => {
    const { fixture, el } = await setup();
    const field = el.querySelector<HTMLTextAreaElement>('.eq-comments__new textarea')!;
    const send = el.querySelector<HTMLButtonElement>('.eq-comments__new [data-testid="comment-send"]')!;
    expect(field.getAttribute('maxlength')).toBe('4000');
    expect(send.disabled).toBe(true);
    await type(fixture, field, '  Re-read plate at 35 °C.  ');
    expect(text(el.querySelector('.eq-comments__new [data-testid="comment-count"]'))).toBe(
      '27 / 4000 characters',
    );
    // The count is the field's description for assistive technology.
    const countId = el.querySelector('.eq-comments__new [data-testid="comment-count"]')!.id;
    expect(field.getAttribute('aria-describedby')).toContain(countId);
    expect(send.disabled).toBe(false);
    send.click();
    await fixture.whenStable();
    const post = http.expectOne({ method: 'POST', url: URL });
    expect(post.request.body).toEqual({ text: 'Re-read plate at 35 °C.', replyToId: null });
    post.flush(comment(6, { text: 'Re-read plate at 35 °C.' }));
    await fixture.whenStable();
    http.expectOne(URL).flush([...LIST, comment(6, { text: 'Re-read plate at 35 °C.' })]);
    await fixture.whenStable();
    expect(field.value).toBe('');
    expect(text(el.querySelector('.eq-comments__new [data-testid="comment-count"]'))).toBe(
      '0 / 4000 characters',
    );
    expect(el.querySelectorAll('[data-testid="comment-thread"]')).toHaveLength(3);
  });

  it("shows the server's 400 message beside the field and keeps the text", async () => {
    const { fixture, el } = await setup();
    const field = el.querySelector<HTMLTextAreaElement>('.eq-comments__new textarea')!;
    await type(fixture, field, 'Too long, says the server');
    el.querySelector<HTMLButtonElement>('.eq-comments__new [data-testid="comment-send"]')!.click();
    await fixture.whenStable();
    http
      .expectOne({ method: 'POST', url: URL })
      .flush(
        { error: { code: 'bad_request', message: 'Invalid request: text: must be at most 4000 characters' } },
        { status: 400, statusText: 'Bad Request' },
      );
    await fixture.whenStable();
    const alert = el.querySelector('.eq-comments__new [role="alert"]');
    expect(text(alert)).toBe('Invalid request: text: must be at most 4000 characters');
    expect(field.value).toBe('Too long, says the server');
  });

  it('Reply on a reply opens a labelled, focused field under the thread and answers its first comment', async () => {
    const { fixture, el } = await setup();
    const replyButton = el.querySelector<HTMLButtonElement>(
      '[data-comment-id="5"] [data-testid="comment-reply"]',
    )!;
    expect(replyButton.getAttribute('aria-label')).toMatch(/^Reply to Rosa Quint, /);
    replyButton.click();
    await fixture.whenStable();
    const form = el.querySelector('.eq-comments__reply-form')!;
    expect(
      form.closest('[data-testid="comment-thread"]')!.querySelector('[data-comment-id="1"]'),
    ).not.toBeNull();
    expect(text(form.querySelector('mat-label'))).toBe('Reply to Rosa Quint');
    const field = form.querySelector('textarea')!;
    expect(document.activeElement).toBe(field);
    await type(fixture, field, 'Yes, a bubble: excluded.');
    form.querySelector<HTMLButtonElement>('[data-testid="comment-send"]')!.click();
    await fixture.whenStable();
    const post = http.expectOne({ method: 'POST', url: URL });
    expect(post.request.body).toEqual({ text: 'Yes, a bubble: excluded.', replyToId: 1 });
    post.flush(comment(7, { replyToId: 1 }));
    await fixture.whenStable();
    http.expectOne(URL).flush(LIST);
    await fixture.whenStable();
    expect(el.querySelector('.eq-comments__reply-form')).toBeNull();
  });

  it('reads the list again on a live event for this batch only, once per burst', async () => {
    const { fixture } = await setup();
    events.next({ type: 'batch.comment', data: { id: 9, batchId: 8, change: 'added' }, at: '' });
    await wait(COMMENTS_LIVE_DEBOUNCE_MS + 50);
    http.expectNone(URL);
    events.next({ type: 'batch.comment', data: { id: 10, batchId: 7, change: 'added' }, at: '' });
    events.next({ type: 'batch.comment', data: { id: 10, batchId: 7, change: 'removed' }, at: '' });
    await wait(COMMENTS_LIVE_DEBOUNCE_MS + 50);
    http.expectOne(URL).flush(LIST.slice(0, 1));
    await fixture.whenStable();
    expect(
      (fixture.nativeElement as HTMLElement).querySelectorAll('[data-testid="comment-thread"]'),
    ).toHaveLength(1);
  });

  it('a scientist removes only their own comments, after confirming', async () => {
    const { fixture, el } = await setup('scientist');
    const removable = [...el.querySelectorAll('[data-testid="comment-remove"]')].map((b) =>
      b.closest('[data-comment-id]')!.getAttribute('data-comment-id'),
    );
    expect(removable).toEqual(['1', '5']);
    el.querySelector<HTMLButtonElement>('[data-comment-id="5"] [data-testid="comment-remove"]')!.click();
    await fixture.whenStable();
    http.expectNone({ method: 'DELETE' });
    el.querySelector<HTMLButtonElement>(
      '[data-comment-id="5"] [data-testid="comment-remove-confirm"]',
    )!.click();
    await fixture.whenStable();
    http.expectOne({ method: 'DELETE', url: `${URL}/5` }).flush(comment(5, { removed: true, text: null }));
    await fixture.whenStable();
    http.expectOne(URL).flush(LIST);
  });

  it('a lab manager may remove anyone’s comment; an admin reads and is told who writes', async () => {
    const manager = await setup('lab_manager');
    expect(manager.el.querySelectorAll('[data-testid="comment-remove"]')).toHaveLength(4);
    TestBed.resetTestingModule();
    const { el } = await setup('admin', LIST, true);
    expect(el.querySelector('[data-testid="comment-remove"]')).toBeNull();
    expect(el.querySelector('[data-testid="comment-reply"]')).toBeNull();
    expect(el.querySelector('textarea')).toBeNull();
    expect(text(el.querySelector('[data-testid="comments-read-only"]'))).toBe(
      'Scientists and lab managers write comments; you can read them.',
    );
    expect(text(el.querySelector('[data-testid="comments-approved-note"]'))).toContain('do not change it');
  });

  it('says so when there are no comments yet', async () => {
    const { el } = await setup('scientist', []);
    expect(text(el.querySelector('[data-testid="comments-empty"]'))).toBe('No comments yet.');
    expect(text(el.querySelector('h2'))).toBe('Comments (0)');
  });
});
