import { ChangeDetectionStrategy, Component, type OnInit, inject, signal, viewChild } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatChipsModule } from '@angular/material/chips';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { ROLE_LABELS, type User } from '../core/auth/user';
import { LoadState } from '../shared/page/load-state';
import { PageHeader } from '../shared/page/page-header';
import { sortedDataSource } from '../shared/page/sorted-data-source';
import { PeopleService } from './people.service';
import { PersonDialog, type PersonDialogData, type PersonDialogResult } from './person-dialog';
import { TableScroll } from '../shared/table-scroll/table-scroll';
import { Notice } from '../shared/page/notice';

/**
 * What a person's account is now: invited (no password set yet, so they cannot sign in), active, or
 * deactivated. An invitation that was deactivated reads as deactivated.
 */
export function personStatus(user: User): {
  word: string;
  icon: string;
  muted: boolean;
  hint: string | null;
} {
  if (!user.active) return { word: 'Deactivated', icon: 'block', muted: true, hint: null };
  if (user.invited)
    return {
      word: 'Invited',
      icon: 'schedule',
      muted: true,
      hint: 'Has not set a password yet with the one-time link',
    };
  return { word: 'Active', icon: 'check_circle', muted: false, hint: null };
}

/** Admins: everyone who may sign in, with their role and whether they are active. */
@Component({
  selector: 'eq-people-page',
  imports: [
    TableScroll,
    MatTableModule,
    MatSortModule,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    MatIconModule,
    MatChipsModule,
    PageHeader,
  ],
  templateUrl: './people-page.html',
  styleUrl: './people-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PeoplePage implements OnInit {
  private readonly people = inject(PeopleService);
  private readonly dialog = inject(MatDialog);
  private readonly notice = inject(Notice);

  protected readonly columns = ['displayName', 'email', 'role', 'active', 'actions'];
  private readonly sort = viewChild(MatSort);
  protected readonly dataSource = sortedDataSource<User>(this.sort);
  protected readonly state = new LoadState();
  protected readonly inviteLink = signal<string | null>(null);

  constructor() {
    this.dataSource.filterPredicate = (user, filter) =>
      `${user.displayName} ${user.email} ${ROLE_LABELS[user.role]} ${personStatus(user).word}`
        .toLowerCase()
        .includes(filter);
  }

  ngOnInit(): void {
    this.load();
  }

  protected readonly status = personStatus;

  protected load(): void {
    this.state.load(this.people.list(), (users) => (this.dataSource.data = users));
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
          void this.notice.show(`${result.created.user.displayName} added`, {
            action: 'OK',
            durationMs: 4000,
          });
        } else {
          void this.notice.show(`${result.user.displayName} saved`, { action: 'OK', durationMs: 4000 });
        }
        this.load();
      });
  }
}
