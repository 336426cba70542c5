import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { RoleBadge } from '../role-code/role-badge';
import { ROLE_CODE, SAMPLE_ROLES, type SampleRole } from './plate-geometry';

/** The key to the role code: each role's swatch (colour, pattern, letter), name and (optionally) how many positions. */
@Component({
  selector: 'eq-plate-legend',
  imports: [RoleBadge],
  template: `
    <ul class="eq-legend" [attr.aria-label]="label()" data-testid="role-legend">
      @for (item of items(); track item.role) {
        <li [attr.data-role]="item.role">
          <eq-role-badge [role]="item.role" [size]="size()" />
          <span>{{ item.label }}</span>
          @if (item.count !== null) {
            <span class="eq-num eq-count">{{ item.count }}</span>
          }
          <span class="eq-visually-hidden">, letter {{ item.letter }}, {{ item.patternLabel }}</span>
        </li>
      }
    </ul>
  `,
  styleUrl: './plate-legend.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PlateLegend {
  /** Positions per role; leave empty to show the key without counts. */
  readonly counts = input<Partial<Record<SampleRole, number>> | null>(null);
  /** Show only these roles (e.g. those on the plate); all when null. */
  readonly only = input<ReadonlySet<SampleRole> | null>(null);
  readonly label = input('Roles');
  readonly size = input<'md' | 'lg'>('lg');

  protected readonly items = computed(() => {
    const counts = this.counts();
    const only = this.only();
    return SAMPLE_ROLES.filter((role) => !only || only.has(role)).map((role) => ({
      role,
      ...ROLE_CODE[role],
      count: counts ? (counts[role] ?? 0) : null,
    }));
  });
}
