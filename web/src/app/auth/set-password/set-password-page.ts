import { HttpClient } from '@angular/common/http';
import { ChangeDetectionStrategy, Component, inject, input, signal } from '@angular/core';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { RouterLink } from '@angular/router';
import { firstValueFrom } from 'rxjs';
import { apiErrorMessage } from '../../core/http/auth.interceptor';

/** Redeem a one-time invitation or reset link. */
@Component({
  selector: 'eq-set-password-page',
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
          ><mat-card-title><h1>Set your password</h1></mat-card-title></mat-card-header
        >
        @if (done()) {
          <mat-card-content><p role="status">Your password is set. You can sign in now.</p></mat-card-content>
          <mat-card-actions align="end"
            ><a mat-flat-button routerLink="/sign-in">Sign in</a></mat-card-actions
          >
        } @else {
          <form [formGroup]="form" (ngSubmit)="submit()" novalidate>
            <mat-card-content>
              @if (error(); as message) {
                <p class="eq-error-text" role="alert">{{ message }}</p>
              }
              <mat-form-field appearance="outline">
                <mat-label>New password</mat-label>
                <input matInput type="password" formControlName="password" autocomplete="new-password" />
                <mat-hint>At least 10 characters.</mat-hint>
                @if (form.controls.password.invalid) {
                  <mat-error>Use at least 10 characters.</mat-error>
                }
              </mat-form-field>
            </mat-card-content>
            <mat-card-actions align="end">
              <button mat-flat-button type="submit" [disabled]="busy()">Set password</button>
            </mat-card-actions>
          </form>
        }
      </mat-card>
    </main>
  `,
  styleUrl: '../sign-in/sign-in-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SetPasswordPage {
  private readonly http = inject(HttpClient);
  readonly token = input<string>('');
  protected readonly form = inject(FormBuilder).nonNullable.group({
    password: ['', [Validators.required, Validators.minLength(10), Validators.maxLength(200)]],
  });
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);
  protected readonly done = signal(false);

  protected async submit(): Promise<void> {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    this.error.set(null);
    try {
      await firstValueFrom(
        this.http.post('/api/auth/set-password', {
          token: this.token(),
          password: this.form.getRawValue().password,
        }),
      );
      this.done.set(true);
    } catch (err) {
      this.error.set(apiErrorMessage(err));
    } finally {
      this.busy.set(false);
    }
  }
}
