import { ChangeDetectionStrategy, Component, type Injector, inject } from '@angular/core';
import { FormControl, FormGroup, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialog, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { type Observable, filter } from 'rxjs';

export interface ReasonDialogData {
  title: string;
  message: string;
  /** Label of the text field, e.g. "Comment" or "Reason". */
  fieldLabel: string;
  confirmLabel: string;
  /** Lines listed under the message (e.g. the what-if edits to be saved). */
  details?: string[];
}

export const REASON_MIN_LENGTH = 3;

/** Asks for a required comment or reason before an audited action; closes with the text, or nothing. */
@Component({
  selector: 'eq-reason-dialog',
  imports: [MatDialogModule, MatButtonModule, MatFormFieldModule, MatInputModule, ReactiveFormsModule],
  template: `
    <h2 mat-dialog-title>{{ data.title }}</h2>
    <form [formGroup]="form" (ngSubmit)="confirm()">
      <mat-dialog-content>
        <p>{{ data.message }}</p>
        @if (data.details?.length) {
          <ul>
            @for (line of data.details; track $index) {
              <li>{{ line }}</li>
            }
          </ul>
        }
        <mat-form-field appearance="outline" class="eq-reason-field">
          <mat-label>{{ data.fieldLabel }}</mat-label>
          <textarea matInput formControlName="text" rows="3" required data-testid="reason-input"></textarea>
          <mat-hint>Required; kept in the audit trail.</mat-hint>
          @if (text.hasError('required') || text.hasError('minlength')) {
            <mat-error>Write at least {{ minLength }} characters.</mat-error>
          }
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" data-testid="reason-confirm">{{ data.confirmLabel }}</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .eq-reason-field {
      width: 100%;
      margin-top: 8px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ReasonDialog {
  protected readonly data = inject<ReasonDialogData>(MAT_DIALOG_DATA);
  private readonly ref = inject<MatDialogRef<ReasonDialog, string>>(MatDialogRef);
  protected readonly minLength = REASON_MIN_LENGTH;
  protected readonly form = new FormGroup({
    text: new FormControl('', {
      nonNullable: true,
      validators: [Validators.required, Validators.minLength(REASON_MIN_LENGTH)],
    }),
  });
  protected readonly text = this.form.controls.text;

  protected confirm(): void {
    const value = this.text.value.trim();
    if (value.length < REASON_MIN_LENGTH) {
      this.text.markAsTouched();
      this.text.setErrors({ minlength: true });
      return;
    }
    this.ref.close(value);
  }
}

/**
 * Opens the dialog and gives the text written, or nothing when it is cancelled. A page imports this file
 * on first use, so the dialog, its overlay and its form fields do not load with the page.
 */
export function askReason(injector: Injector, data: ReasonDialogData): Observable<string> {
  return injector
    .get(MatDialog)
    .open<ReasonDialog, ReasonDialogData, string>(ReasonDialog, { data, width: '480px', maxWidth: '95vw' })
    .afterClosed()
    .pipe(filter((text): text is string => !!text));
}
