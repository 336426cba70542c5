import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { RoleFill } from './role-fill';
import { ROLE_CODE, type SampleRole } from './role-style';

/**
 * A sample role's mark: a round swatch in the role's colour and pattern with its letter. Decorative
 * (aria-hidden): whoever shows it says the role in words too.
 */
@Component({
  selector: 'eq-role-badge',
  imports: [RoleFill],
  template: `<span class="eq-role-badge" [eqRoleFill]="role()" [attr.data-size]="size()" aria-hidden="true"
    ><span class="eq-role-badge__letter">{{ letter() }}</span></span
  >`,
  styleUrl: './role-badge.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'eq-role-badge-host' },
})
export class RoleBadge {
  readonly role = input.required<SampleRole>();
  /** `sm` 16 px (plate cells), `md` 22 px (buttons, lists), `lg` 26 px (legends). */
  readonly size = input<'sm' | 'md' | 'lg'>('md');
  protected readonly letter = computed(() => ROLE_CODE[this.role()].letter);
}
