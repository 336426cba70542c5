import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import {
  type AbstractControl,
  FormBuilder,
  ReactiveFormsModule,
  type ValidationErrors,
  Validators,
} from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { firstValueFrom } from 'rxjs';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import {
  WEBHOOK_EVENTS,
  WEBHOOK_EVENT_LABELS,
  type Webhook,
  type WebhookEvent,
  WebhooksService,
} from './webhooks.service';

const LOCAL_HOSTS = ['localhost', '127.0.0.1', '[::1]'];

/** The server's rule, checked early: https, or plain http only to this machine. */
export function receiverUrlError(value: string): string | null {
  let url: URL;
  try {
    url = new URL(value.trim());
  } catch {
    return 'Enter a full URL, e.g. https://lims.example.org/hooks.';
  }
  if (url.protocol === 'https:') return null;
  if (url.protocol === 'http:')
    return LOCAL_HOSTS.includes(url.hostname) ? null : 'Use https; plain http only for localhost (testing).';
  return 'Use an https:// address.';
}

function urlValidator(control: AbstractControl<string>): ValidationErrors | null {
  const message = control.value ? receiverUrlError(control.value) : null;
  return message ? { receiverUrl: message } : null;
}

/** 32 random bytes as hex: a secret to paste into the receiver's settings. */
export function randomSecret(): string {
  const bytes = crypto.getRandomValues(new Uint8Array(32));
  return [...bytes].map((b) => b.toString(16).padStart(2, '0')).join('');
}

/** Register a receiver: URL, signing secret (typed or generated), and which events it gets. */
@Component({
  selector: 'eq-webhook-dialog',
  imports: [
    ReactiveFormsModule,
    MatDialogModule,
    MatFormFieldModule,
    MatInputModule,
    MatCheckboxModule,
    MatButtonModule,
    MatIconModule,
  ],
  templateUrl: './webhook-dialog.html',
  styleUrl: './webhook-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class WebhookDialog {
  private readonly webhooks = inject(WebhooksService);
  private readonly dialogRef = inject<MatDialogRef<WebhookDialog, Webhook>>(MatDialogRef);
  protected readonly eventNames = WEBHOOK_EVENTS;
  protected readonly eventLabels = WEBHOOK_EVENT_LABELS;

  protected readonly form = inject(FormBuilder).nonNullable.group({
    url: ['', [Validators.required, Validators.maxLength(2048), urlValidator]],
    secret: [
      '',
      [
        Validators.required,
        Validators.minLength(16),
        Validators.maxLength(200),
        Validators.pattern(/^[\x21-\x7e]+$/),
      ],
    ],
    'batch.approved': [true],
    'batch.qc_failed': [true],
    'file.quarantined': [false],
  });
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly noEvent = signal(false);

  protected generate(): void {
    this.form.controls.secret.setValue(randomSecret());
  }

  protected async save(): Promise<void> {
    const v = this.form.getRawValue();
    const events = WEBHOOK_EVENTS.filter((e: WebhookEvent) => v[e]);
    this.noEvent.set(events.length === 0);
    if (this.form.invalid || !events.length) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    this.error.set(null);
    try {
      const created = await firstValueFrom(
        this.webhooks.create({ url: v.url.trim(), secret: v.secret, events }),
      );
      this.dialogRef.close(created);
    } catch (err) {
      this.error.set(apiErrorMessage(err));
      this.busy.set(false);
    }
  }
}
