import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { type BatchComment, ROLE_LABELS } from '@equilight/contracts';
import { formatDateTime } from '../shared/format/date-format';

/**
 * One comment: who (name and role), when, what; a removed one says so in place. Reply and Remove are
 * offered as the caller allows; removing asks once more in place.
 */
@Component({
  selector: 'eq-comment-item',
  imports: [MatButtonModule, MatIconModule],
  template: `
    @let c = comment();
    <article
      class="eq-comment"
      [class.eq-comment--removed]="c.removed"
      [attr.aria-labelledby]="'eq-comment-head-' + c.id"
      [attr.data-comment-id]="c.id"
      data-testid="comment"
    >
      <header class="eq-comment__head" [id]="'eq-comment-head-' + c.id">
        <span class="eq-comment__author" data-testid="comment-author">{{ c.authorName }}</span>
        <span class="eq-comment__role" data-testid="comment-role">{{ roleLabel() }}</span>
        <time class="eq-comment__time eq-num" [attr.datetime]="c.createdAt" data-testid="comment-time">{{
          when()
        }}</time>
      </header>
      @if (c.removed) {
        <p class="eq-comment__removed" data-testid="comment-removed">
          <mat-icon inline aria-hidden="true">block</mat-icon>
          Comment removed{{ c.removedBy ? ' by ' + c.removedBy : '' }}, {{ removedWhen() }}
        </p>
      } @else {
        <p class="eq-comment__text" data-testid="comment-body">{{ c.text }}</p>
      }
      @if (canReply() || canRemove()) {
        <div class="eq-comment__actions">
          @if (canReply()) {
            <button
              mat-button
              type="button"
              (click)="reply.emit()"
              [attr.aria-label]="'Reply to ' + c.authorName + ', ' + when()"
              data-testid="comment-reply"
            >
              <mat-icon aria-hidden="true">reply</mat-icon>Reply
            </button>
          }
          @if (canRemove()) {
            @if (confirming()) {
              <span class="eq-comment__confirm" role="status">Remove this comment?</span>
              <button
                mat-flat-button
                type="button"
                class="eq-comment__remove-confirm"
                [disabled]="busy()"
                (click)="confirmRemove.emit()"
                data-testid="comment-remove-confirm"
              >
                Remove
              </button>
              <button
                mat-button
                type="button"
                (click)="cancelRemove.emit()"
                data-testid="comment-remove-keep"
              >
                Keep
              </button>
            } @else {
              <button
                mat-button
                type="button"
                (click)="askRemove.emit()"
                [attr.aria-label]="'Remove the comment by ' + c.authorName + ', ' + when()"
                data-testid="comment-remove"
              >
                <mat-icon aria-hidden="true">delete</mat-icon>Remove
              </button>
            }
          }
        </div>
      }
    </article>
  `,
  styleUrl: './comment-item.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CommentItem {
  readonly comment = input.required<BatchComment>();
  readonly canReply = input(false);
  readonly canRemove = input(false);
  /** The person asked to remove it and is asked to confirm. */
  readonly confirming = input(false);
  readonly busy = input(false);
  readonly reply = output<void>();
  readonly askRemove = output<void>();
  readonly confirmRemove = output<void>();
  readonly cancelRemove = output<void>();

  protected readonly roleLabel = computed(() => ROLE_LABELS[this.comment().authorRole]);
  protected readonly when = computed(() => formatDateTime(this.comment().createdAt));
  protected readonly removedWhen = computed(() => formatDateTime(this.comment().removedAt));
}
