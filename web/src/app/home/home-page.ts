import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { AuthService } from '../core/auth/auth.service';
import { ROLE_LABELS, type Role } from '../core/auth/user';
import { navItemsFor } from '../core/shell/navigation';

const ROLE_DUTIES: Record<Role, string> = {
  admin:
    'You manage the people who use Equilight, their roles, and the instrument profiles that turn exports into readings.',
  lab_manager:
    'You define plate and cuvette layouts and sample manifests, plan mixtures, and approve batches.',
  scientist:
    'You watch batches fill in as files land, judge calibration and fit quality, and report results.',
};

/** The signed-in person's starting point: who they are here and where to go next. */
@Component({
  selector: 'eq-home-page',
  imports: [MatCardModule, MatIconModule, RouterLink],
  template: `
    <section class="eq-page">
      <header class="eq-page-header">
        <h1>Welcome, {{ user()?.displayName }}</h1>
      </header>
      <mat-card appearance="outlined">
        <mat-card-header>
          <mat-icon mat-card-avatar>badge</mat-icon>
          <mat-card-title data-testid="role-label">{{ roleLabel() }}</mat-card-title>
          <mat-card-subtitle>{{ user()?.email }}</mat-card-subtitle>
        </mat-card-header>
        <mat-card-content>
          <p>{{ duty() }}</p>
          <ul class="eq-links">
            @for (item of links(); track item.path) {
              <li>
                <a [routerLink]="item.path"
                  ><mat-icon inline>{{ item.icon }}</mat-icon> {{ item.label }}</a
                >
              </li>
            }
          </ul>
        </mat-card-content>
      </mat-card>
    </section>
  `,
  styles: `
    .eq-links {
      list-style: none;
      padding: 0;
      display: flex;
      gap: 16px;
      flex-wrap: wrap;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class HomePage {
  protected readonly user = inject(AuthService).currentUser;
  protected readonly roleLabel = computed(() => (this.user() ? ROLE_LABELS[this.user()!.role] : ''));
  protected readonly duty = computed(() => (this.user() ? ROLE_DUTIES[this.user()!.role] : ''));
  protected readonly links = computed(() =>
    navItemsFor(this.user()?.role).filter((item) => item.path !== '/'),
  );
}
