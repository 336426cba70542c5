import { ChangeDetectionStrategy, Component, type OnInit, inject, signal } from '@angular/core';
import { FormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { firstValueFrom } from 'rxjs';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { type NotificationSettings, NotificationsService } from './notifications.service';

/** The signed-in person chooses which mails they get. */
@Component({
  selector: 'eq-notification-settings-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatSlideToggleModule, MatButtonModule],
  template: `
    <h2 mat-dialog-title>Notification settings</h2>
    <mat-dialog-content>
      <p class="eq-hint">Choose which e-mails Equilight sends you.</p>
      @if (loaded()) {
        <form [formGroup]="form" id="eq-notification-form" (ngSubmit)="save()" class="eq-toggles">
          <mat-slide-toggle formControlName="batchComplete" data-testid="notify-batch-complete">
            A batch is complete (all its files arrived and were analysed)
          </mat-slide-toggle>
          <mat-slide-toggle formControlName="qcFailure" data-testid="notify-qc-failure">
            A completed batch has QC errors
          </mat-slide-toggle>
          <mat-slide-toggle formControlName="batchApproved" data-testid="notify-batch-approved">
            A batch is approved
          </mat-slide-toggle>
        </form>
      } @else if (!error()) {
        <p>Loading…</p>
      }
      @if (error(); as message) {
        <p class="eq-error-text" role="alert">{{ message }}</p>
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button mat-dialog-close type="button">Cancel</button>
      <button
        mat-flat-button
        type="submit"
        form="eq-notification-form"
        [disabled]="!loaded() || busy()"
        data-testid="notify-save"
      >
        Save
      </button>
    </mat-dialog-actions>
  `,
  styles: `
    .eq-hint {
      margin-top: 0;
    }
    .eq-toggles {
      display: flex;
      flex-direction: column;
      gap: 16px;
      padding: 4px 0;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NotificationSettingsDialog implements OnInit {
  private readonly notifications = inject(NotificationsService);
  private readonly dialogRef =
    inject<MatDialogRef<NotificationSettingsDialog, NotificationSettings>>(MatDialogRef);

  protected readonly form = inject(FormBuilder).nonNullable.group({
    batchComplete: [true],
    qcFailure: [true],
    batchApproved: [true],
  });
  protected readonly loaded = signal(false);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);

  ngOnInit(): void {
    this.notifications.get().subscribe({
      next: (settings) => {
        this.form.setValue(settings);
        this.loaded.set(true);
      },
      error: (err: unknown) => this.error.set(apiErrorMessage(err)),
    });
  }

  protected async save(): Promise<void> {
    this.busy.set(true);
    this.error.set(null);
    try {
      const saved = await firstValueFrom(this.notifications.save(this.form.getRawValue()));
      this.dialogRef.close(saved);
    } catch (err) {
      this.error.set(apiErrorMessage(err));
    } finally {
      this.busy.set(false);
    }
  }
}
