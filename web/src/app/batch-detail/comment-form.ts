import {
  ChangeDetectionStrategy,
  Component,
  type ElementRef,
  afterNextRender,
  computed,
  input,
  output,
  viewChild,
} from '@angular/core';
import { toObservable, toSignal } from '@angular/core/rxjs-interop';
import { type FormControl, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { COMMENT_MAX_CHARS } from '@equilight/contracts';
import { startWith, switchMap } from 'rxjs';

let nextId = 0;

/**
 * A comment's text field with its character count, and Send (and Cancel for a reply). The text lives
 * in the caller's control, so the caller clears it once the comment is stored.
 */
@Component({
  selector: 'eq-comment-form',
  imports: [ReactiveFormsModule, MatButtonModule, MatFormFieldModule, MatInputModule],
  template: `
    <form class="eq-comment-form" (submit)="send($event)" [attr.aria-label]="label()">
      <mat-form-field appearance="outline" class="eq-comment-form__field" subscriptSizing="dynamic">
        <mat-label>{{ label() }}</mat-label>
        <textarea
          #field
          matInput
          [formControl]="control()"
          [attr.maxlength]="max"
          rows="3"
          data-testid="comment-text"
        ></textarea>
        <mat-hint align="end" [id]="countId" data-testid="comment-count"
          >{{ count() }} / {{ max }} characters</mat-hint
        >
      </mat-form-field>
      @if (error(); as message) {
        <p class="eq-error-text" role="alert" data-testid="comment-error">{{ message }}</p>
      }
      <div class="eq-comment-form__actions">
        @if (cancellable()) {
          <button mat-button type="button" (click)="cancelled.emit()" data-testid="comment-cancel">
            Cancel
          </button>
        }
        <button mat-flat-button type="submit" [disabled]="busy() || blank()" data-testid="comment-send">
          {{ submitLabel() }}
        </button>
      </div>
    </form>
  `,
  styles: `
    .eq-comment-form {
      display: flex;
      flex-direction: column;
      gap: 4px;
    }
    .eq-comment-form__field {
      width: 100%;
    }
    .eq-comment-form__actions {
      display: flex;
      flex-wrap: wrap;
      justify-content: flex-end;
      gap: 8px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class CommentForm {
  readonly control = input.required<FormControl<string>>();
  /** The field's label, also the form's name for assistive technology ("New comment", "Reply to …"). */
  readonly label = input.required<string>();
  readonly submitLabel = input('Send');
  readonly busy = input(false);
  readonly error = input<string | null>(null);
  /** A reply's form can be closed; the new-comment form cannot. */
  readonly cancellable = input(false);
  /** Put the cursor in the field when the form appears (a reply opened by its Reply button). */
  readonly focusOnOpen = input(false);
  readonly submitted = output<string>();
  readonly cancelled = output<void>();

  protected readonly max = COMMENT_MAX_CHARS;
  protected readonly countId = `eq-comment-count-${nextId++}`;
  private readonly field = viewChild.required<ElementRef<HTMLTextAreaElement>>('field');

  private readonly text = toSignal(
    toObservable(this.control).pipe(switchMap((c) => c.valueChanges.pipe(startWith(c.value)))),
    { initialValue: '' },
  );
  /** Characters as the field's maxlength counts them (UTF-16 units; the server counts after trimming). */
  protected readonly count = computed(() => this.text().length);
  protected readonly blank = computed(() => this.text().trim().length === 0);

  constructor() {
    afterNextRender(() => {
      if (this.focusOnOpen()) this.field().nativeElement.focus();
    });
  }

  protected send(event: Event): void {
    event.preventDefault();
    const text = this.control().value.trim();
    if (text && !this.busy()) this.submitted.emit(text);
  }
}
