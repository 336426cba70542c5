import { Directive, computed, input } from '@angular/core';
import { ROLE_STYLE, type SampleRole } from './role-style';

/**
 * Paints its element with a sample role's colour and pattern (from the contracts' role code) and sets
 * `--eq-role-ink` / `--eq-role-fill` for the letter and the rim. No role: the element keeps its own look.
 */
@Directive({
  selector: '[eqRoleFill]',
  host: {
    '[attr.data-role]': 'role()',
    '[style.background-image]': 'style()?.backgroundImage ?? null',
    '[style.background-size]': 'style()?.backgroundSize ?? null',
    '[style.--eq-role-ink]': 'style()?.ink ?? null',
    '[style.--eq-role-fill]': 'style()?.fill ?? null',
  },
})
export class RoleFill {
  readonly role = input.required<SampleRole | null>({ alias: 'eqRoleFill' });
  protected readonly style = computed(() => {
    const role = this.role();
    return role ? ROLE_STYLE[role] : null;
  });
}
