import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import {
  GENERAL_CAUTION,
  H_STATEMENTS_SOURCE,
  REAGENT_HAZARDS_SOURCE,
  type ReagentCaution,
  TABLE_DISCLAIMER,
  lookupReagent,
} from './reagent-hazards';

/** One stock or diluent the user named. */
export interface NamedReagent {
  /** What it is in the plan: "Stock A", "Stock B", "Diluent". */
  role: string;
  name: string;
  cas: string;
}

/** A reagent's caution as one line of text, for the printed prep sheet. */
export function cautionLine(role: string, c: ReagentCaution): string {
  const name = c.query.name.trim() || c.query.cas?.trim() || 'unnamed';
  if (c.kind === 'unknown') return `${role} (${name}): ${GENERAL_CAUTION}`;
  const statements = c.statements.length
    ? c.statements.map((s) => `${s.code} ${s.text}`).join('; ')
    : 'not classified as hazardous in the app’s table';
  return `${role} (${c.entry.name}, CAS ${c.entry.cas}): ${statements}.${c.entry.note ? ' ' + c.entry.note : ''}`;
}

/**
 * The hazard statements of the reagents the user named, from the app's small table (by CAS number,
 * then by name), or the general caution for a reagent it does not hold. Always says that the table is
 * a convenience and the safety data sheet rules.
 */
@Component({
  selector: 'eq-reagent-cautions',
  imports: [MatIconModule],
  template: `
    <ul class="eq-reagents" data-testid="reagent-cautions">
      @for (item of items(); track item.role) {
        <li data-testid="reagent-caution">
          <span class="eq-reagent-role">{{ item.role }}:</span>
          @if (item.caution.kind === 'known') {
            <span class="eq-reagent-name"
              >{{ item.caution.entry.name }} (CAS {{ item.caution.entry.cas }}, matched by
              {{ item.caution.matchedBy === 'cas' ? 'CAS number' : 'name' }})</span
            >
            @if (item.caution.statements.length) {
              <ul class="eq-h-statements">
                @for (s of item.caution.statements; track s.code) {
                  <li>
                    <strong>{{ s.code }}</strong> {{ s.text }}
                  </li>
                }
              </ul>
            } @else {
              <span>: not classified as hazardous in the app’s table; follow the SDS.</span>
            }
            @if (item.caution.entry.note) {
              <p class="eq-reagent-note">{{ item.caution.entry.note }}</p>
            }
          } @else {
            <span class="eq-reagent-name">{{ item.label }}</span>
            <p class="eq-reagent-note" data-testid="general-caution">{{ general }}</p>
          }
        </li>
      }
    </ul>
    <p class="eq-reagent-source" data-testid="reagent-source">
      {{ disclaimer }} Hazard statement texts: {{ textSource }}. Classifications: {{ tableSource }}.
    </p>
  `,
  styles: `
    :host {
      display: block;
    }
    .eq-reagents {
      margin: 0;
      padding-left: 20px;
    }
    .eq-reagents > li {
      margin: 4px 0;
      overflow-wrap: anywhere;
    }
    .eq-reagent-role {
      font-weight: 600;
      margin-right: 4px;
    }
    .eq-h-statements {
      margin: 2px 0;
      padding-left: 18px;
    }
    .eq-reagent-note,
    .eq-reagent-source {
      margin: 2px 0;
    }
    .eq-reagent-source {
      font: var(--mat-sys-body-small);
      margin-top: 8px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ReagentCautions {
  readonly reagents = input.required<readonly NamedReagent[]>();

  protected readonly general = GENERAL_CAUTION;
  protected readonly disclaimer = TABLE_DISCLAIMER;
  protected readonly textSource = H_STATEMENTS_SOURCE;
  protected readonly tableSource = REAGENT_HAZARDS_SOURCE;

  protected readonly items = computed(() =>
    this.reagents().map((r) => ({
      role: r.role,
      label: r.name.trim() || r.cas.trim() || 'not named yet',
      caution: lookupReagent({ name: r.name, cas: r.cas }),
    })),
  );
}
