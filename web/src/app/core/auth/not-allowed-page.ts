import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatIconModule } from '@angular/material/icon';
import { ActivatedRoute, RouterLink } from '@angular/router';
import { map } from 'rxjs';
import { AuthService } from './auth.service';
import { ROLE_LABELS, type Role } from './user';

/** "A, B and C" */
function joinWords(words: string[]): string {
  return words.length < 2 ? (words[0] ?? '') : `${words.slice(0, -1).join(', ')} and ${words.at(-1)}`;
}

/** The roles a page is for, read from the guard's `for` parameter; unknown names are left out. */
export function rolesFromParam(value: string | null): Role[] {
  return (value ?? '').split(',').filter((r): r is Role => r in ROLE_LABELS);
}

/** What the role guard shows instead of a page the signed-in role may not open. */
@Component({
  selector: 'eq-not-allowed-page',
  imports: [MatButtonModule, MatCardModule, MatIconModule, RouterLink],
  template: `
    <section class="eq-page">
      <mat-card appearance="outlined" class="eq-not-allowed" role="alert">
        <mat-card-header>
          <mat-icon mat-card-avatar aria-hidden="true">block</mat-icon>
          <h1 mat-card-title>Not allowed for your role</h1>
        </mat-card-header>
        <mat-card-content>
          <p data-testid="not-allowed-message">{{ message() }}</p>
          <p>If you need it for your work, ask an administrator.</p>
        </mat-card-content>
        <mat-card-actions>
          <a mat-flat-button routerLink="/">Back to the Overview</a>
        </mat-card-actions>
      </mat-card>
    </section>
  `,
  styles: `
    .eq-not-allowed {
      max-width: 560px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class NotAllowedPage {
  private readonly user = inject(AuthService).currentUser;
  private readonly roles = toSignal(
    inject(ActivatedRoute).queryParamMap.pipe(map((q) => rolesFromParam(q.get('for')))),
    { initialValue: [] as Role[] },
  );
  protected readonly message = computed(() => {
    const roles = this.roles();
    const user = this.user();
    const forWhom = roles.length
      ? `This page is for ${joinWords(roles.map((r) => ROLE_LABELS[r]))}.`
      : 'This page is not for your role.';
    return user ? `${forWhom} You are signed in as ${ROLE_LABELS[user.role]}.` : forWhom;
  });
}
