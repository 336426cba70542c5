import { ClipboardModule } from '@angular/cdk/clipboard';
import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';

export interface TokenDialogData {
  profileName: string;
  token: string;
  /** A watcher credential rather than one instrument's token. */
  kind?: 'instrument' | 'watcher';
}

/** The one moment a plaintext instrument token is visible; the server keeps only its hash. */
@Component({
  selector: 'eq-token-dialog',
  imports: [MatDialogModule, MatButtonModule, MatIconModule, ClipboardModule],
  template: `
    <h2 mat-dialog-title>
      {{ data.kind === 'watcher' ? 'Watcher credential' : 'Instrument token' }} for {{ data.profileName }}
    </h2>
    <mat-dialog-content>
      <p class="eq-token-warning" role="alert">
        <mat-icon>warning</mat-icon>
        <span
          >Copy this token now and put it in the watcher's configuration
          {{ data.kind === 'watcher' ? '(watcherToken)' : 'for this instrument' }}. It is
          <strong>shown only this once</strong>; if it is lost,
          {{ data.kind === 'watcher' ? 'revoke it and create another' : 'rotate the token' }}.</span
        >
      </p>
      <div class="eq-token-box">
        <code data-testid="token-value">{{ data.token }}</code>
        <button
          mat-stroked-button
          type="button"
          [cdkCopyToClipboard]="data.token"
          (cdkCopyToClipboardCopied)="copied.set($event)"
          data-testid="copy-token"
        >
          <mat-icon>{{ copied() ? 'check' : 'content_copy' }}</mat-icon>
          {{ copied() ? 'Copied' : 'Copy' }}
        </button>
      </div>
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-flat-button mat-dialog-close data-testid="token-done">I have stored it</button>
    </mat-dialog-actions>
  `,
  styles: `
    .eq-token-warning {
      display: flex;
      gap: 8px;
      padding: 8px 12px;
      border-radius: 12px;
      background: var(--mat-sys-tertiary-container);
      color: var(--mat-sys-on-tertiary-container);
    }
    .eq-token-warning mat-icon {
      flex: none;
    }
    .eq-token-box {
      display: flex;
      align-items: center;
      gap: 12px;
      flex-wrap: wrap;
    }
    code {
      flex: 1;
      min-width: 0;
      padding: 8px 12px;
      border-radius: 8px;
      background: var(--mat-sys-surface-container-high);
      word-break: break-all;
      user-select: all;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class TokenDialog {
  protected readonly data = inject<TokenDialogData>(MAT_DIALOG_DATA);
  protected readonly copied = signal(false);
}
