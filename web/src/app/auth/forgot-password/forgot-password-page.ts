import { HttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { RouterLink } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { apiErrorMessage } from '../../core/http/auth.interceptor';

/** Ask for a one-time link to set a new password. The answer never reveals whether the e-mail exists. */
@Component({
  selector: 'eq-forgot-password-page',
  imports: [
    ReactiveFormsModule,
    MatCardModule,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    RouterLink,
  ],
  template: `
    <main class="eq-center">
      <mat-card appearance="outlined" class="eq-card">
        <mat-card-header
          ><mat-card-title><h1>Reset your password</h1></mat-card-title></mat-card-header
        >
        @if (sent()) {
          <mat-card-content>
            <p role="status" data-testid="reset-sent">
              If an account uses that address, a one-time link to set a new password is on its way. It is
              valid for 2 hours.
            </p>
          </mat-card-content>
          <mat-card-actions align="end"
            ><a mat-button routerLink="/sign-in">Back to sign-in</a></mat-card-actions
          >
        } @else {
          <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
            <mat-card-content>
              @if (error(); as message) {
                <p class="eq-error-text" role="alert">{{ message }}</p>
              }
              <mat-form-field appearance="outline">
                <mat-label>E-mail</mat-label>
                <input matInput type="email" formControlName="email" autocomplete="username" />
                @if (form.controls.email.invalid) {
                  <mat-error>Enter your e-mail address.</mat-error>
                }
              </mat-form-field>
            </mat-card-content>
            <mat-card-actions align="end">
              <a mat-button routerLink="/sign-in">Cancel</a>
              <button mat-flat-button type="submit" [disabled]="busy()">Send the link</button>
            </mat-card-actions>
          </form>
        }
      </mat-card>
    </main>
  `,
  styleUrl: '../sign-in/sign-in-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ForgotPasswordPage {
  private readonly http = inject(HttpClient);
  protected readonly form = inject(FormBuilder).nonNullable.group({
    email: ['', [Validators.required, Validators.email, Validators.maxLength(254)]],
  });
  protected readonly busy = signal(false);
  protected readonly sent = signal(false);
  protected readonly error = signal<string | null>(null);

  protected async submit(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    this.error.set(null);
    try {
      await firstValueFrom(this.http.post('/api/auth/forgot-password', this.form.getRawValue()));
      this.sent.set(true);
    } catch (err) {
      this.error.set(apiErrorMessage(err));
    } finally {
      this.busy.set(false);
    }
  }
}
