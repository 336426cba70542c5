import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { MatIconModule } from '@angular/material/icon';
import {
  type ControlResult,
  ownFindings,
  type QcFlag,
  type ResolvedAnalysisSettings,
  type UnknownResult,
} from '@equilight/analysis';
import {
  formatAbsorbance,
  formatNumber,
  inReportingUnit,
  reportingUnitOf,
} from '../shared/format/number-format';
import { guidanceFor } from '../shared/qc/qc-guidance';
import { TableScroll } from '../shared/table-scroll/table-scroll';

/** Concentrations of the unknowns (and controls) read from the calibration, with SE and QC marks. */
@Component({
  selector: 'eq-unknowns-table',
  imports: [TableScroll, MatIconModule],
  template: `
    @if (rows().length) {
      <eq-table-scroll class="eq-table-wrap" label="Unknowns table">
        <table class="eq-table" data-testid="unknowns-table">
          <caption>
            Concentrations in the original sample (after the dilution factor), in
            {{
              unit().unit
            }}
            @if (unit().molarMassGPerMol !== null) {
              (molar mass {{ unit().molarMassGPerMol }} g/mol)
            }
          </caption>
          <thead>
            <tr>
              <th scope="col">Sample</th>
              <th scope="col">Kind</th>
              <th scope="col">Positions</th>
              <th scope="col" class="eq-n">n</th>
              <th scope="col" class="eq-n">A corrected (AU)</th>
              <th scope="col" class="eq-n">Dilution factor</th>
              <th scope="col" class="eq-n" data-testid="unknowns-c-header">c ({{ unit().unit }})</th>
              <th scope="col" class="eq-n">SE ({{ unit().unit }})</th>
              @if (recovery(); as limits) {
                <th scope="col" class="eq-n" data-testid="recovery-header">
                  Recovery (%)
                  <span class="eq-muted eq-th-note">of nominal; limits {{ limits[0] }}–{{ limits[1] }}</span>
                </th>
              }
              <th scope="col">QC</th>
            </tr>
          </thead>
          <tbody>
            @for (u of rows(); track u.kind + u.row.group) {
              <tr [attr.data-sample]="u.row.sampleId">
                <th scope="row">{{ u.row.sampleId }}</th>
                <td>{{ u.kind }}</td>
                <td>{{ u.row.positions.join(', ') }}</td>
                <td class="eq-n">{{ u.row.n }}</td>
                <td class="eq-n">{{ abs(u.row.absorbance) }}</td>
                <td class="eq-n">× {{ u.row.dilutionFactor }}</td>
                <td class="eq-n" data-testid="unknown-concentration">
                  {{ fmt(inUnit(u.row.concentrationM), 4) }}
                </td>
                <td class="eq-n">{{ fmt(inUnit(u.row.seM), 2) }}</td>
                @if (recovery()) {
                  <td class="eq-n" data-testid="control-recovery">
                    @if (u.recoveryPct === null) {
                      {{ fmt(null) }}
                    } @else if (u.outOfLimits) {
                      <span class="eq-out-of-limits"
                        ><mat-icon inline aria-hidden="true">warning</mat-icon>{{ u.recoveryPct.toFixed(1) }}
                        <span class="eq-small">out of limits</span></span
                      >
                    } @else {
                      {{ u.recoveryPct.toFixed(1) }}
                    }
                    @if (u.nominalM !== null) {
                      <span class="eq-visually-hidden">, </span>
                      <span class="eq-muted eq-th-note" data-testid="control-nominal"
                        >of {{ fmt(inUnit(u.nominalM), 4) }} {{ unit().unit }}</span
                      >
                    }
                  </td>
                }
                <td data-testid="unknown-qc">
                  @for (f of u.findings; track f.code) {
                    <span class="eq-flag" [attr.title]="f.detail"
                      ><mat-icon inline aria-hidden="true">flag</mat-icon>{{ f.title }}</span
                    >
                  } @empty {
                    <span class="eq-flag"><mat-icon inline aria-hidden="true">check</mat-icon>none</span>
                  }
                </td>
              </tr>
            }
          </tbody>
        </table>
      </eq-table-scroll>
    } @else {
      <p class="eq-empty">This batch has no unknowns or controls.</p>
    }
  `,
  styleUrl: './panels.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class UnknownsTable {
  readonly unknowns = input.required<readonly UnknownResult[]>();
  /** Results stored before recovery existed have controls without `nominalM` and `recoveryPct`. */
  readonly controls = input<readonly (UnknownResult & Partial<ControlResult>)[]>([]);
  /** The batch's QC findings; each row shows those naming its sample or one of its positions. */
  readonly qc = input<readonly QcFlag[]>([]);
  /** The settings the result was computed with: the reporting unit and recovery limits. */
  readonly settings = input<Partial<ResolvedAnalysisSettings>>({});

  /** Results hold mol/L; the table shows the batch's unit (mol/L for results from before units). */
  protected readonly unit = computed(() => reportingUnitOf(this.settings()));
  /** The recovery limits, when a control has a nominal value to recover. */
  protected readonly recovery = computed(() =>
    this.controls().some((c) => c.nominalM != null) ? (this.settings().recoveryLimitsPct ?? null) : null,
  );
  protected readonly rows = computed(() => [
    ...this.unknowns().map((row) => ({
      kind: 'unknown',
      row,
      findings: sampleFindings(row, this.qc()),
      nominalM: null,
      recoveryPct: null,
      outOfLimits: false,
    })),
    ...this.controls().map((row) => ({
      kind: 'control',
      row,
      findings: sampleFindings(row, this.qc()),
      nominalM: row.nominalM ?? null,
      recoveryPct: row.recoveryPct ?? null,
      outOfLimits: row.flags.includes('recovery-out-of-limits'),
    })),
  ]);
  protected inUnit(valueM: number | null): number | null {
    return inReportingUnit(valueM, this.unit());
  }
  protected readonly fmt = formatNumber;
  protected readonly abs = formatAbsorbance;
}

/**
 * One sample's own QC findings: the codes on its row plus every batch finding that names its sample id
 * or one of its positions (a replicate-group finding naming "C10 C11" counts for both), each code once.
 */
export function sampleFindings(
  row: UnknownResult,
  qc: readonly QcFlag[],
): { code: string; title: string; detail: string }[] {
  const messages = new Map<string, string[]>();
  for (const code of row.flags) messages.set(code, messages.get(code) ?? []);
  for (const f of ownFindings(qc, row.sampleId, row.positions)) {
    messages.set(f.code, [...(messages.get(f.code) ?? []), f.message]);
  }
  return [...messages].map(([code, list]) => {
    const title = guidanceFor(code).title;
    return { code, title, detail: [...new Set(list)].join(' ') || title };
  });
}
