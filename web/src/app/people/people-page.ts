import {
  ChangeDetectionStrategy,
  Component,
  type OnInit,
  effect,
  inject,
  signal,
  viewChild,
} from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatChipsModule } from '@angular/material/chips';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSnackBar } from '@angular/material/snack-bar';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableDataSource, MatTableModule } from '@angular/material/table';
import { ROLE_LABELS, type User } from '../core/auth/user';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { PeopleService } from './people.service';
import { PersonDialog, type PersonDialogData, type PersonDialogResult } from './person-dialog';

/** Admins: everyone who may sign in, with their role and whether they are active. */
@Component({
  selector: 'eq-people-page',
  imports: [
    MatTableModule,
    MatSortModule,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    MatIconModule,
    MatChipsModule,
  ],
  templateUrl: './people-page.html',
  styleUrl: './people-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PeoplePage implements OnInit {
  private readonly people = inject(PeopleService);
  private readonly dialog = inject(MatDialog);
  private readonly snackBar = inject(MatSnackBar);

  protected readonly columns = ['displayName', 'email', 'role', 'active', 'actions'];
  protected readonly dataSource = new MatTableDataSource<User>([]);
  protected readonly loading = signal(true);
  protected readonly error = signal<string | null>(null);
  protected readonly inviteLink = signal<string | null>(null);
  private readonly sort = viewChild(MatSort);

  constructor() {
    this.dataSource.filterPredicate = (user, filter) =>
      `${user.displayName} ${user.email} ${ROLE_LABELS[user.role]} ${user.active ? 'active' : 'deactivated'}`
        .toLowerCase()
        .includes(filter);
    effect(() => {
      const sort = this.sort();
      if (sort) this.dataSource.sort = sort;
    });
  }

  ngOnInit(): void {
    this.load();
  }

  protected load(): void {
    this.loading.set(true);
    this.people.list().subscribe({
      next: (users) => {
        this.dataSource.data = users;
        this.error.set(null);
        this.loading.set(false);
      },
      error: (err: unknown) => {
        this.error.set(apiErrorMessage(err));
        this.loading.set(false);
      },
    });
  }

  protected roleLabel(user: User): string {
    return ROLE_LABELS[user.role];
  }

  protected applyFilter(value: string): void {
    this.dataSource.filter = value.trim().toLowerCase();
  }

  protected openDialog(person?: User): void {
    this.dialog
      .open<PersonDialog, PersonDialogData, PersonDialogResult>(PersonDialog, {
        data: { person },
        width: '480px',
      })
      .afterClosed()
      .subscribe((result) => {
        if (!result) return;
        if (result.kind === 'created') {
          this.inviteLink.set(result.created.setPasswordUrl ?? null);
          this.snackBar.open(`${result.created.user.displayName} added`, 'OK', { duration: 4000 });
        } else {
          this.snackBar.open(`${result.user.displayName} saved`, 'OK', { duration: 4000 });
        }
        this.load();
      });
  }
}
