import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatRadioModule } from '@angular/material/radio';
import { MatSelectModule } from '@angular/material/select';
import { MatSlideToggleModule } from '@angular/material/slide-toggle';
import { firstValueFrom } from 'rxjs';
import { ROLE_LABELS, type Role, type User } from '../core/auth/user';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { type CreatedPerson, PeopleService } from './people.service';

export interface PersonDialogData {
  /** Absent to add a new person. */
  person?: User;
}

export type PersonDialogResult =
  { kind: 'created'; created: CreatedPerson } | { kind: 'updated'; user: User };

@Component({
  selector: 'eq-person-dialog',
  imports: [
    ReactiveFormsModule,
    MatDialogModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatRadioModule,
    MatSlideToggleModule,
    MatButtonModule,
  ],
  templateUrl: './person-dialog.html',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PersonDialog {
  private readonly people = inject(PeopleService);
  private readonly dialogRef = inject<MatDialogRef<PersonDialog, PersonDialogResult>>(MatDialogRef);
  protected readonly data = inject<PersonDialogData>(MAT_DIALOG_DATA);
  protected readonly roles = Object.entries(ROLE_LABELS) as [Role, string][];
  protected readonly editing = !!this.data.person;

  protected readonly form = inject(FormBuilder).nonNullable.group({
    email: [
      this.data.person?.email ?? '',
      [Validators.required, Validators.email, Validators.maxLength(254)],
    ],
    displayName: [this.data.person?.displayName ?? '', [Validators.required, Validators.maxLength(120)]],
    role: [this.data.person?.role ?? ('scientist' as Role), Validators.required],
    access: ['invite' as 'invite' | 'password'],
    password: ['', [Validators.minLength(10), Validators.maxLength(200)]],
    active: [this.data.person?.active ?? true],
  });
  protected readonly busy = signal(false);
  protected readonly error = signal<string | null>(null);

  protected async save(): Promise<void> {
    const v = this.form.getRawValue();
    if (!this.editing && v.access === 'password' && v.password.length < 10) {
      this.form.controls.password.setErrors({ minlength: true });
    }
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    this.error.set(null);
    try {
      if (this.data.person) {
        const user = await firstValueFrom(
          this.people.update(this.data.person.id, {
            displayName: v.displayName,
            role: v.role,
            active: v.active,
          }),
        );
        this.dialogRef.close({ kind: 'updated', user });
      } else {
        const created = await firstValueFrom(
          this.people.create({
            email: v.email,
            displayName: v.displayName,
            role: v.role,
            password: v.access === 'password' ? v.password : undefined,
          }),
        );
        this.dialogRef.close({ kind: 'created', created });
      }
    } catch (err) {
      this.error.set(apiErrorMessage(err));
    } finally {
      this.busy.set(false);
    }
  }
}
