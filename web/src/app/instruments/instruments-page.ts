import { ChangeDetectionStrategy, Component, type OnInit, inject, signal, viewChild } from '@angular/core';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatMenuModule } from '@angular/material/menu';
import { MatSort, MatSortModule } from '@angular/material/sort';
import { MatTableModule } from '@angular/material/table';
import { MatTooltipModule } from '@angular/material/tooltip';
import { filter, switchMap } from 'rxjs';
import { AuthService } from '../core/auth/auth.service';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import { LoadState } from '../shared/page/load-state';
import { PageHeader } from '../shared/page/page-header';
import { sortedDataSource } from '../shared/page/sorted-data-source';
import { ConfirmDialog, type ConfirmDialogData } from './confirm-dialog';
import {
  FILE_FORMAT_LABELS,
  type InstrumentProfile,
  KIND_LABELS,
  PLATE_FORMAT_LABELS,
} from './instrument-profile';
import { InstrumentsService } from './instruments.service';
import { ProfileDialog, type ProfileDialogData, type ProfileDialogResult } from './profile-dialog';
import { TokenDialog, type TokenDialogData } from './token-dialog';
import { type WatcherCredential, type WatcherPresence, WatchersService } from './watchers.service';
import { DateTimePipe, formatDateTime } from '../shared/format/date-format';
import { TableScroll } from '../shared/table-scroll/table-scroll';
import { Notice } from '../shared/page/notice';

/**
 * The instruments whose exports Equilight accepts, how they are read, whether a watcher watches each
 * drop folder, and (admins) their tokens and the watcher credentials. Lab managers read, admins change.
 */
@Component({
  selector: 'eq-instruments-page',
  imports: [
    DateTimePipe,
    TableScroll,
    MatTableModule,
    MatSortModule,
    MatFormFieldModule,
    MatInputModule,
    MatButtonModule,
    MatIconModule,
    MatMenuModule,
    MatTooltipModule,
    PageHeader,
  ],
  templateUrl: './instruments-page.html',
  styleUrl: './instruments-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class InstrumentsPage implements OnInit {
  private readonly instruments = inject(InstrumentsService);
  private readonly dialog = inject(MatDialog);
  private readonly notice = inject(Notice);
  private readonly watchers = inject(WatchersService);
  /** Admins change profiles and tokens; lab managers only read them. */
  protected readonly canEdit = inject(AuthService).hasRole('admin');

  protected readonly columns = [
    'name',
    'kind',
    'plateFormat',
    'fileFormat',
    'dropSubfolder',
    'watched',
    ...(this.canEdit ? ['token'] : []),
    'active',
    'actions',
  ];
  /** Last watcher report per profile id. */
  protected readonly presence = signal<ReadonlyMap<number, WatcherPresence>>(new Map());
  protected readonly credentials = signal<WatcherCredential[]>([]);
  protected readonly newWatcherName = signal('');
  private readonly now = signal(Date.now());
  private readonly sort = viewChild(MatSort);
  protected readonly dataSource = sortedDataSource<InstrumentProfile>(this.sort);
  protected readonly state = new LoadState();

  constructor() {
    this.dataSource.filterPredicate = (p, text) =>
      [
        p.name,
        KIND_LABELS[p.kind],
        PLATE_FORMAT_LABELS[p.plateFormat],
        FILE_FORMAT_LABELS[p.fileFormat],
        p.dropSubfolder,
        p.hasToken ? `token ${p.tokenPrefix ?? ''}` : 'no token',
        p.active ? 'active' : 'inactive',
      ]
        .join(' ')
        .toLowerCase()
        .includes(text);
    this.dataSource.sortingDataAccessor = (p, column) => {
      switch (column) {
        case 'kind':
          return KIND_LABELS[p.kind];
        case 'plateFormat':
          return PLATE_FORMAT_LABELS[p.plateFormat];
        case 'fileFormat':
          return FILE_FORMAT_LABELS[p.fileFormat];
        case 'token':
          return p.hasToken ? 1 : 0;
        case 'active':
          return p.active ? 1 : 0;
        case 'dropSubfolder':
          return p.dropSubfolder.toLowerCase();
        default:
          return p.name.toLowerCase();
      }
    };
  }

  ngOnInit(): void {
    this.load();
  }

  protected load(): void {
    this.now.set(Date.now());
    this.watchers.presence().subscribe({
      next: (rows) => this.presence.set(new Map(rows.map((r) => [r.profileId, r]))),
      error: () => this.presence.set(new Map()),
    });
    if (this.canEdit) {
      this.watchers.list().subscribe({
        next: (rows) => this.credentials.set(rows),
        error: () => this.credentials.set([]),
      });
    }
    this.state.load(this.instruments.list(), (profiles) => (this.dataSource.data = profiles));
  }

  protected kindLabel(p: InstrumentProfile): string {
    return KIND_LABELS[p.kind];
  }

  protected plateFormatLabel(p: InstrumentProfile): string {
    return PLATE_FORMAT_LABELS[p.plateFormat];
  }

  protected fileFormatLabel(p: InstrumentProfile): string {
    return FILE_FORMAT_LABELS[p.fileFormat];
  }

  /** "2 min ago", "3 h ago", or the date: how long since a watcher last reported. */
  protected ago(iso: string | null): string {
    if (!iso) return 'never';
    const seconds = Math.max(0, Math.round((this.now() - Date.parse(iso)) / 1000));
    if (seconds < 90) return seconds < 10 ? 'just now' : `${seconds} s ago`;
    const minutes = Math.round(seconds / 60);
    if (minutes < 90) return `${minutes} min ago`;
    const hours = Math.round(minutes / 60);
    if (hours < 36) return `${hours} h ago`;
    return formatDateTime(iso, 'date');
  }

  protected watcherSummary(w: WatcherCredential): string {
    return [
      `last report ${this.ago(w.lastSeenAt)}`,
      w.version ? `version ${w.version}` : '',
      w.hostname ? `on ${w.hostname}` : '',
      w.folders.length ? `watching ${w.folders.join(', ')}` : '',
    ]
      .filter(Boolean)
      .join(', ');
  }

  protected createWatcher(): void {
    const name = this.newWatcherName().trim();
    if (!name) return;
    this.watchers.create(name).subscribe({
      next: ({ watcher, token }) => {
        this.newWatcherName.set('');
        this.dialog.open<TokenDialog, TokenDialogData>(TokenDialog, {
          data: { profileName: watcher.name, token, kind: 'watcher' },
          width: '560px',
          maxWidth: '96vw',
          disableClose: true,
        });
        this.load();
      },
      error: (err: unknown) => void this.notice.show(apiErrorMessage(err), { action: 'OK' }),
    });
  }

  protected revokeWatcher(watcher: WatcherCredential): void {
    this.confirm({
      title: `Revoke the watcher credential ${watcher.name}?`,
      message:
        'That watcher can no longer learn its folders or send files; files it holds wait in its spool. Files already received are kept.',
      confirmLabel: 'Revoke',
    })
      .pipe(switchMap(() => this.watchers.revoke(watcher.id)))
      .subscribe({
        next: () => {
          void this.notice.show(`${watcher.name} revoked`, { action: 'OK', durationMs: 4000 });
          this.load();
        },
        error: (err: unknown) => void this.notice.show(apiErrorMessage(err), { action: 'OK' }),
      });
  }

  protected applyFilter(value: string): void {
    this.dataSource.filter = value.trim().toLowerCase();
  }

  protected openDialog(profile?: InstrumentProfile): void {
    this.dialog
      .open<ProfileDialog, ProfileDialogData, ProfileDialogResult>(ProfileDialog, {
        data: { profile, readOnly: !this.canEdit },
        width: '960px',
        maxWidth: '96vw',
        autoFocus: 'first-tabbable',
      })
      .afterClosed()
      .subscribe((result) => {
        if (!result) return;
        if (result.kind === 'created') {
          this.showToken(result.created.profile, result.created.token);
        } else {
          void this.notice.show(`${result.profile.name} saved`, { action: 'OK', durationMs: 4000 });
        }
        this.load();
      });
  }

  protected rotateToken(profile: InstrumentProfile): void {
    this.confirm({
      title: `Rotate the token of ${profile.name}?`,
      message: profile.hasToken
        ? 'The current token stops working at once. The watcher needs the new token before it can send files again.'
        : 'A new token is created; the watcher needs it before it can send files.',
      confirmLabel: profile.hasToken ? 'Rotate' : 'Create token',
    })
      .pipe(switchMap(() => this.instruments.rotateToken(profile.id)))
      .subscribe({
        next: ({ profile: updated, token }) => {
          this.showToken(updated, token);
          this.load();
        },
        error: (err: unknown) => void this.notice.show(apiErrorMessage(err), { action: 'OK' }),
      });
  }

  protected revokeToken(profile: InstrumentProfile): void {
    this.confirm({
      title: `Revoke the token of ${profile.name}?`,
      message:
        'The instrument can no longer send files until a new token is created. Files already received are kept.',
      confirmLabel: 'Revoke',
    })
      .pipe(switchMap(() => this.instruments.revokeToken(profile.id)))
      .subscribe({
        next: (updated) => {
          void this.notice.show(`Token of ${updated.name} revoked`, { action: 'OK', durationMs: 4000 });
          this.load();
        },
        error: (err: unknown) => void this.notice.show(apiErrorMessage(err), { action: 'OK' }),
      });
  }

  private confirm(data: ConfirmDialogData) {
    return this.dialog
      .open<ConfirmDialog, ConfirmDialogData, boolean>(ConfirmDialog, { data, width: '440px' })
      .afterClosed()
      .pipe(filter((yes) => yes === true));
  }

  private showToken(profile: InstrumentProfile, token: string): void {
    this.dialog.open<TokenDialog, TokenDialogData>(TokenDialog, {
      data: { profileName: profile.name, token },
      width: '560px',
      maxWidth: '96vw',
      disableClose: true,
    });
  }
}
