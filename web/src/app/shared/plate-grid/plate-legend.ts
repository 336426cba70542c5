import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { ROLE_INFO, SAMPLE_ROLES, type SampleRole } from './plate-geometry';

/** The key to the plate map: each role's fill, letter, pattern, name and (optionally) how many positions. */
@Component({
  selector: 'eq-plate-legend',
  template: `
    <ul class="eq-legend" aria-label="Legend">
      @for (item of items(); track item.role) {
        <li>
          <span class="eq-swatch" [attr.data-role]="item.role" aria-hidden="true"
            ><span class="eq-swatch-letter">{{ item.letter }}</span></span
          >
          <span>{{ item.label }}</span>
          @if (item.count !== null) {
            <span class="eq-num eq-count">{{ item.count }}</span>
          }
          <span class="eq-visually-hidden">, letter {{ item.letter }}, {{ item.pattern }}</span>
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

  protected readonly items = computed(() => {
    const counts = this.counts();
    return SAMPLE_ROLES.map((role) => ({
      role,
      ...ROLE_INFO[role],
      count: counts ? (counts[role] ?? 0) : null,
    }));
  });
}
