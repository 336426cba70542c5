import {
  ChangeDetectionStrategy,
  Component,
  computed,
  effect,
  input,
  output,
  viewChild,
} from '@angular/core';
import { FormControl, FormGroup, FormGroupDirective, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import type { Exclusion } from '@equilight/analysis';
import { CANDIDATE_STOICHIOMETRIES } from '../batches/batch';
import type { EpsilonCandidate } from './batch-analysis';
import { formatNumber } from '../shared/format/number-format';
import { REASON_MIN_LENGTH } from './reason-dialog';
import { PartNotLoaded } from '../shared/page/part-not-loaded';

export interface ExclusionRow extends Exclusion {
  /** True for an exclusion made in this what-if and not saved yet. */
  unsaved: boolean;
}

export interface PositionChoice {
  position: string;
  sampleId: string | null;
  role: string | null;
}

/** `own`: this batch's standards; `saved`: the ε already in the settings; `batch:<id>`: another batch. */
export type EpsilonSourceValue = string;

/**
 * What-if controls: exclude a position with a reason, switch candidates, wavelength, path length, the
 * source of ε or the constant baseline. It only emits; the page recomputes with the analysis module and
 * keeps the edits.
 */
@Component({
  selector: 'eq-what-if-panel',
  imports: [
    PartNotLoaded,
    ReactiveFormsModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatButtonModule,
    MatCheckboxModule,
    MatIconModule,
  ],
  templateUrl: './what-if-panel.html',
  styleUrl: './what-if-panel.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class WhatIfPanel {
  readonly readOnly = input(false);
  readonly readOnlyNote = input<string | null>(null);
  readonly positions = input.required<readonly PositionChoice[]>();
  readonly selected = input<string | null>(null);
  readonly exclusions = input.required<readonly ExclusionRow[]>();
  readonly candidates = input.required<readonly string[]>();
  readonly wavelengths = input<readonly number[]>([]);
  /** The wavelength setting (null = chosen automatically) and the one the analysis used. */
  readonly wavelengthNm = input<number | null>(null);
  readonly analysedWavelengthNm = input<number | null>(null);
  readonly pathLengthCm = input.required<number>();
  readonly epsilonSource = input<EpsilonSourceValue>('own');
  readonly savedEpsilon = input<number | null>(null);
  /** Where the saved ε came from, e.g. `batch "Run 12", approval record 4`; null when typed. */
  readonly savedEpsilonFrom = input<string | null>(null);
  /** Calibrations of the same system at this wavelength (±1 nm), as the server offers them. */
  readonly epsilonCandidates = input<readonly EpsilonCandidate[]>([]);
  readonly fitBaseline = input(false);
  /** False for a batch without equilibrium mixtures: candidates, ε of the complex and the baseline fit are hidden. */
  readonly equilibrium = input(true);

  readonly exclude = output<Exclusion>();
  readonly restore = output<string>();
  readonly candidatesChange = output<string[]>();
  readonly wavelengthChange = output<number | null>();
  readonly pathLengthChange = output<number>();
  readonly epsilonSourceChange = output<EpsilonSourceValue>();
  readonly fitBaselineChange = output<boolean>();

  protected readonly allCandidates = CANDIDATE_STOICHIOMETRIES;
  protected readonly fmt = formatNumber;
  protected readonly form = new FormGroup({
    position: new FormControl('', { nonNullable: true, validators: [Validators.required] }),
    reason: new FormControl('', {
      nonNullable: true,
      validators: [Validators.required, Validators.minLength(REASON_MIN_LENGTH)],
    }),
  });
  private readonly formDirective = viewChild(FormGroupDirective);
  protected readonly pathLength = new FormControl(1, {
    nonNullable: true,
    validators: [Validators.required, Validators.min(0.001), Validators.max(100)],
  });
  protected readonly excludable = computed(() => {
    const excluded = new Set(this.exclusions().map((e) => e.position));
    return this.positions().filter((p) => !excluded.has(p.position));
  });

  constructor() {
    effect(() => {
      const p = this.selected();
      if (p) this.form.controls.position.setValue(p);
    });
    effect(() => this.pathLength.setValue(this.pathLengthCm(), { emitEvent: false }));
    effect(() => {
      if (this.readOnly()) {
        this.form.disable({ emitEvent: false });
        this.pathLength.disable({ emitEvent: false });
      } else {
        this.form.enable({ emitEvent: false });
        this.pathLength.enable({ emitEvent: false });
      }
    });
  }

  protected submitExclusion(): void {
    const { position, reason } = this.form.getRawValue();
    if (this.form.invalid || reason.trim().length < REASON_MIN_LENGTH) {
      this.form.markAllAsTouched();
      return;
    }
    this.exclude.emit({ position, reason: reason.trim() });
    // resetForm also clears "submitted", so the emptied fields do not show as errors.
    const directive = this.formDirective();
    if (directive) directive.resetForm();
    else this.form.reset();
  }

  protected applyPathLength(): void {
    if (this.pathLength.invalid) return;
    const v = Number(this.pathLength.value);
    if (v !== this.pathLengthCm()) this.pathLengthChange.emit(v);
  }

  protected changeCandidates(value: string[]): void {
    if (value.length) this.candidatesChange.emit(value);
  }

  protected changeWavelength(value: number | 'auto'): void {
    this.wavelengthChange.emit(value === 'auto' ? null : value);
  }

  protected wavelengthValue(): number | 'auto' {
    return this.wavelengthNm() ?? 'auto';
  }
}
