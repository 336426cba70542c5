import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatSelectModule } from '@angular/material/select';
import { RouterLink } from '@angular/router';
import type { Batch } from '../batches/batch';
import { BatchesService } from '../batches/batches.service';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import type { IntakeFile } from './intake-file';
import { IntakeService } from './intake.service';

export interface AssignDialogData {
  file: IntakeFile;
}

/** Put an unassigned file into an open batch of the same instrument. */
@Component({
  selector: 'eq-assign-dialog',
  imports: [MatDialogModule, MatButtonModule, MatFormFieldModule, MatIconModule, MatSelectModule, RouterLink],
  template: `
    <h2 mat-dialog-title>Assign {{ data.file.originalName }} to a batch</h2>
    <mat-dialog-content>
      <p>
        {{ hint }}
      </p>
      @if (loading()) {
        <p>Loading batches…</p>
      } @else if (batches().length) {
        <mat-form-field appearance="outline" class="eq-batch-choice">
          <mat-label>Batch of {{ data.file.profileName ?? 'this instrument' }}</mat-label>
          <mat-select
            [value]="batchId()"
            (selectionChange)="batchId.set($event.value)"
            data-testid="assign-batch"
          >
            @for (b of batches(); track b.id) {
              <mat-option [value]="b.id"
                >{{ b.name }} · run {{ b.runId }} · {{ b.fileCount }}/{{ b.expectedFiles }} files</mat-option
              >
            }
          </mat-select>
        </mat-form-field>
      } @else {
        <p data-testid="assign-none">
          No open batch of {{ data.file.profileName ?? 'this instrument' }} to put it in.
          <a routerLink="/batches/new" mat-dialog-close>Create a batch</a> first.
        </p>
      }
      @if (error(); as message) {
        <p class="eq-error-text" role="alert">{{ message }}</p>
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" mat-dialog-close>Cancel</button>
      <button
        mat-flat-button
        type="button"
        (click)="assign()"
        [disabled]="batchId() === null || busy()"
        data-testid="assign-confirm"
      >
        Assign
      </button>
    </mat-dialog-actions>
  `,
  styles: `
    .eq-batch-choice {
      width: 100%;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AssignDialog {
  protected readonly data = inject<AssignDialogData>(MAT_DIALOG_DATA);
  private readonly ref = inject<MatDialogRef<AssignDialog, IntakeFile>>(MatDialogRef);
  private readonly intake = inject(IntakeService);
  protected readonly batches = signal<Batch[]>([]);
  protected readonly batchId = signal<number | null>(null);
  protected readonly loading = signal(true);
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly hint = unassignedHint(this.data.file.runId);

  constructor() {
    // The batches a file may still join: open or reviewed, of the file's instrument (a handful).
    inject(BatchesService)
      .list({
        profileId: this.data.file.profileId,
        unapproved: true,
        sort: 'lastActivityAt',
        dir: 'desc',
        pageSize: 500,
      })
      .subscribe({
        next: ({ items }) => {
          const open = items.filter((b) => b.profileId === this.data.file.profileId);
          this.batches.set(open);
          // The batch whose run id the file names, if there is one, comes first.
          const match = open.find((b) => b.runId === this.data.file.runId);
          this.batchId.set(match?.id ?? (open.length === 1 ? open[0]!.id : null));
          this.loading.set(false);
        },
        error: (err: unknown) => {
          this.error.set(apiErrorMessage(err));
          this.loading.set(false);
        },
      });
  }

  protected assign(): void {
    const batchId = this.batchId();
    if (batchId === null) return;
    this.busy.set(true);
    this.intake.assign(this.data.file.id, batchId).subscribe({
      next: (file) => this.ref.close(file),
      error: (err: unknown) => {
        this.busy.set(false);
        this.error.set(apiErrorMessage(err));
      },
    });
  }
}

/** Why a stored file has no batch, and what to do about it. */
export function unassignedHint(runId: string | null): string {
  return runId
    ? `No batch waits for run id ${runId} — create one, or assign by hand.`
    : 'No run id was found in its name or content, so no batch waits for it — assign it by hand.';
}
