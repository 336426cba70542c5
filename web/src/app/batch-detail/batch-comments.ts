import {
  ChangeDetectionStrategy,
  Component,
  DestroyRef,
  computed,
  inject,
  input,
  signal,
} from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { FormControl } from '@angular/forms';
import { rolesOf } from '@equilight/contracts';
import { EMPTY, Subject, auditTime, catchError, filter, merge, of, switchMap } from 'rxjs';
import { AuthService } from '../core/auth/auth.service';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { LiveEventsService } from '../core/live/live-events.service';
import { type BatchComment, BatchCommentsService } from './batch-comments.service';
import { CommentForm } from './comment-form';
import { CommentItem } from './comment-item';
import { PartNotLoaded } from '../shared/page/part-not-loaded';

/** Quiet time after the last live comment event before the list is asked again. */
export const COMMENTS_LIVE_DEBOUNCE_MS = 300;

/** A thread: the comment that opens it and its replies, oldest first. */
export interface CommentThread {
  opener: BatchComment;
  replies: BatchComment[];
}

/** Threads from the server's reading order (each opener followed by its replies). */
export function threadsOf(comments: readonly BatchComment[]): CommentThread[] {
  const threads: CommentThread[] = [];
  const byOpener = new Map<number, CommentThread>();
  for (const c of comments) {
    const thread = c.replyToId === null ? undefined : byOpener.get(c.replyToId);
    if (thread) {
      thread.replies.push(c);
    } else {
      const opened = { opener: c, replies: [] };
      threads.push(opened);
      byOpener.set(c.id, opened);
    }
  }
  return threads;
}

/**
 * The comments of a batch, live: threads oldest first with replies under their first comment, a field
 * for a new comment, Reply and Remove as the person's role allows. Comments are notes beside the
 * analysis, so an approved batch takes them too.
 */
@Component({
  selector: 'eq-batch-comments',
  imports: [CommentForm, CommentItem, PartNotLoaded],
  templateUrl: './batch-comments.html',
  styleUrl: './batch-comments.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BatchComments {
  private readonly service = inject(BatchCommentsService);
  private readonly auth = inject(AuthService);
  private readonly live = inject(LiveEventsService);
  private readonly destroyRef = inject(DestroyRef);

  readonly batchId = input.required<number>();
  /** The batch is approved: comments still go in, and the page says they do not change its result. */
  readonly approved = input(false);

  protected readonly comments = signal<BatchComment[] | null>(null);
  protected readonly loadError = signal<string | null>(null);
  protected readonly busy = signal(false);
  /** Where the last failed request came from: `new`, `reply-<thread>` or `remove-<comment>`. */
  protected readonly failure = signal<{ at: string; message: string } | null>(null);
  /** The thread whose reply form is open. */
  protected readonly replyTo = signal<number | null>(null);
  /** The comment whose removal waits for a confirmation. */
  protected readonly confirming = signal<number | null>(null);
  protected readonly newText = new FormControl('', { nonNullable: true });
  protected readonly replyText = new FormControl('', { nonNullable: true });
  private readonly reload$ = new Subject<void>();

  protected readonly canWrite = computed(() =>
    this.auth.hasRole(...rolesOf('post', '/api/batches/{id}/comments')),
  );
  protected readonly threads = computed(() => threadsOf(this.comments() ?? []));
  protected readonly count = computed(() => (this.comments() ?? []).filter((c) => !c.removed).length);

  constructor() {
    toObservable(this.batchId)
      .pipe(
        switchMap((id) =>
          merge(
            of(undefined),
            this.reload$,
            this.live.ofType('batch.comment').pipe(
              filter((e) => e.data.batchId === id),
              auditTime(COMMENTS_LIVE_DEBOUNCE_MS),
            ),
          ).pipe(
            switchMap(() =>
              this.service.list(id).pipe(
                catchError((err: unknown) => {
                  this.loadError.set(apiErrorMessage(err, 'The comments could not be loaded.'));
                  return EMPTY;
                }),
              ),
            ),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((comments) => {
        this.comments.set(comments);
        this.loadError.set(null);
      });
  }

  /** Its author may remove a comment, and a lab manager may remove any. */
  protected canRemove(c: BatchComment): boolean {
    if (c.removed || !this.canWrite()) return false;
    return c.authorId === this.auth.currentUser()?.id || this.auth.hasRole('lab_manager');
  }

  protected errorAt(at: string): string | null {
    const f = this.failure();
    return f && f.at === at ? f.message : null;
  }

  /** Reply on any comment of a thread answers the thread's first comment (replies are one level deep). */
  protected openReply(threadId: number): void {
    if (this.replyTo() !== threadId) this.replyText.reset();
    this.replyTo.set(threadId);
    this.failure.set(null);
  }

  protected closeReply(): void {
    this.replyTo.set(null);
    this.replyText.reset();
  }

  protected send(text: string, replyToId: number | null): void {
    const control = replyToId === null ? this.newText : this.replyText;
    this.busy.set(true);
    this.failure.set(null);
    this.service
      .add(this.batchId(), { text, replyToId })
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: () => {
          control.reset();
          if (replyToId !== null) this.replyTo.set(null);
          this.busy.set(false);
          this.reload$.next();
        },
        error: (err: unknown) => {
          this.failure.set({
            at: replyToId === null ? 'new' : `reply-${replyToId}`,
            message: apiErrorMessage(err, 'The comment could not be saved; try again.'),
          });
          this.busy.set(false);
        },
      });
  }

  protected remove(c: BatchComment): void {
    this.busy.set(true);
    this.failure.set(null);
    this.service
      .remove(this.batchId(), c.id)
      .pipe(takeUntilDestroyed(this.destroyRef))
      .subscribe({
        next: () => {
          this.confirming.set(null);
          this.busy.set(false);
          this.reload$.next();
        },
        error: (err: unknown) => {
          this.failure.set({
            at: `remove-${c.id}`,
            message: apiErrorMessage(err, 'The comment could not be removed; try again.'),
          });
          this.confirming.set(null);
          this.busy.set(false);
        },
      });
  }
}
