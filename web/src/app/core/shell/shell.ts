import { BreakpointObserver } from '@angular/cdk/layout';
import { ChangeDetectionStrategy, Component, afterNextRender, computed, inject, signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatDialog } from '@angular/material/dialog';
import { MatIconModule } from '@angular/material/icon';
import { MatListModule } from '@angular/material/list';
import { MatMenuModule } from '@angular/material/menu';
import { MatSidenavModule } from '@angular/material/sidenav';
import { MatToolbarModule } from '@angular/material/toolbar';
import { MatTooltipModule } from '@angular/material/tooltip';
import { Router, RouterLink, RouterLinkActive, RouterOutlet } from '@angular/router';
import { map } from 'rxjs';
import { AuthService } from '../auth/auth.service';
import { LiveEventsService } from '../live/live-events.service';
import { ROLE_LABELS } from '../auth/user';
import { isDark, setDark } from './theme';
import { navItemsFor } from './navigation';
import { loadOrOfferReload } from '../routing/app-updated';

@Component({
  selector: 'eq-shell',
  imports: [
    RouterOutlet,
    RouterLink,
    RouterLinkActive,
    MatToolbarModule,
    MatSidenavModule,
    MatListModule,
    MatIconModule,
    MatButtonModule,
    MatMenuModule,
    MatTooltipModule,
  ],
  templateUrl: './shell.html',
  styleUrl: './shell.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Shell {
  private readonly auth = inject(AuthService);
  private readonly router = inject(Router);
  private readonly dialog = inject(MatDialog);
  /** Opened with the shell, so live events flow from sign-in on, whichever page comes first. */
  protected readonly live = inject(LiveEventsService);

  protected readonly user = this.auth.currentUser;
  protected readonly roleLabel = computed(() => {
    const user = this.user();
    return user ? ROLE_LABELS[user.role] : '';
  });
  protected readonly navItems = computed(() => navItemsFor(this.user()?.role));
  protected readonly narrow = toSignal(
    inject(BreakpointObserver)
      .observe('(max-width: 840px)')
      .pipe(map((state) => state.matches)),
    { initialValue: typeof matchMedia === 'function' && matchMedia('(max-width: 840px)').matches },
  );
  protected readonly dark = signal(isDark());
  /**
   * The navigation's links and the routed page come a task after the frame's first render: each render
   * then stays well under 50 ms on a busy 2-core machine, and the side navigation measures its width (a
   * forced layout; the drawer's width is fixed in CSS) while neither is there yet. The outlet then shows
   * the route already activated.
   */
  protected readonly pageShown = signal(false);

  constructor() {
    afterNextRender(() => setTimeout(() => this.pageShown.set(true)));
  }

  protected toggleDark(): void {
    this.dark.update((dark) => !dark);
    setDark(this.dark());
  }

  protected async openNotificationSettings(): Promise<void> {
    const loaded = await loadOrOfferReload(() => import('../../notifications/notification-settings-dialog'));
    if (loaded) this.dialog.open(loaded.NotificationSettingsDialog, { width: '480px' });
  }

  protected async signOut(): Promise<void> {
    await this.auth.signOut();
    await this.router.navigate(['/sign-in']);
  }
}
