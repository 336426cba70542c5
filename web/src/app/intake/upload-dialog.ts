import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { FileSizePipe } from './file-size-pipe';
import type { IngestReceipt } from './intake-file';
import { IntakeService } from './intake.service';

export interface UploadProfileChoice {
  id: number;
  name: string;
}

export interface UploadDialogData {
  /** The profiles to choose from; null when they could not be listed (then the id is typed). */
  profiles: UploadProfileChoice[] | null;
}

/** A manual upload of one export: it joins the same queue as the watcher's files. */
@Component({
  selector: 'eq-upload-dialog',
  imports: [
    ReactiveFormsModule,
    MatDialogModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatButtonModule,
    MatIconModule,
    MatProgressBarModule,
    FileSizePipe,
  ],
  templateUrl: './upload-dialog.html',
  styleUrl: './upload-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UploadDialog {
  private readonly intake = inject(IntakeService);
  protected readonly data = inject<UploadDialogData>(MAT_DIALOG_DATA);
  protected readonly form = inject(FormBuilder).nonNullable.group({
    profileId: [
      (this.data.profiles?.length === 1 ? this.data.profiles[0].id : null) as number | null,
      [Validators.required, Validators.min(1)],
    ],
  });
  protected readonly file = signal<File | null>(null);
  protected readonly fileMissing = signal(false);
  protected readonly busy = signal(false);
  protected readonly receipt = signal<IngestReceipt | null>(null);
  protected readonly error = signal<string | null>(null);

  protected chooseFile(input: HTMLInputElement): void {
    const file = input.files?.[0] ?? null;
    input.value = '';
    if (!file) return;
    this.file.set(file);
    this.fileMissing.set(false);
    this.receipt.set(null);
    this.error.set(null);
  }

  protected send(): void {
    const file = this.file();
    const profileId = this.form.controls.profileId.value;
    this.fileMissing.set(!file);
    if (this.form.invalid || !file || profileId === null) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    this.receipt.set(null);
    this.error.set(null);
    this.intake.upload(profileId, file).subscribe({
      next: (receipt) => {
        this.receipt.set(receipt);
        this.file.set(null);
        this.busy.set(false);
      },
      error: (err: unknown) => {
        this.error.set(apiErrorMessage(err, 'The file could not be sent; nothing was stored.'));
        this.busy.set(false);
      },
    });
  }
}
