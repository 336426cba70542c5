import { DOCUMENT } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  Injector,
  afterNextRender,
  computed,
  inject,
  signal,
} from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import {
  type AbstractControl,
  FormBuilder,
  ReactiveFormsModule,
  type ValidationErrors,
  Validators,
} from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { AnalysisError, PLANNER_CAUTIONS } from '@equilight/analysis';
import {
  PLANNER_STOICHIOMETRIES,
  POSITION_SCHEMES,
  type PlanRow,
  type PlannerSettings,
  type PositionScheme,
  type SeriesKind,
  kUnit,
  manifestCsv,
  planRows,
} from './mixture-plan';
import { PipettingTable } from './pipetting-table';
import { PrepSheet } from './prep-sheet';
import { saveTextFile } from './save-text-file';

const MAX_MIXTURES = 96;

function positive(control: AbstractControl<number | null>): ValidationErrors | null {
  const v = control.value;
  return v === null || (typeof v === 'number' && v > 0) ? null : { positive: true };
}

const SAMPLE_PREFIX = /^[A-Za-z0-9][A-Za-z0-9_.-]{0,30}$/;

/**
 * Lab managers and scientists: plan a series of mixtures from two stocks. Everything is computed in the
 * browser with the analysis module; nothing is sent to the server.
 */
@Component({
  selector: 'eq-planner-page',
  imports: [
    ReactiveFormsModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatButtonModule,
    MatButtonToggleModule,
    MatIconModule,
    PipettingTable,
    PrepSheet,
  ],
  templateUrl: './planner-page.html',
  styleUrl: './planner-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PlannerPage {
  private readonly fb = inject(FormBuilder).nonNullable;
  private readonly document = inject(DOCUMENT);
  private readonly injector = inject(Injector);

  protected readonly stoichiometries = PLANNER_STOICHIOMETRIES;
  protected readonly schemes = POSITION_SCHEMES;
  protected readonly cautions = PLANNER_CAUTIONS;
  protected readonly volumeSteps = [
    { value: 0, label: 'No rounding' },
    { value: 0.001, label: '0.001 mL (1 µL)' },
    { value: 0.01, label: '0.01 mL (10 µL)' },
    { value: 0.1, label: '0.1 mL' },
  ];

  protected readonly form = this.fb.group({
    stockAM: this.fb.control(0.002, [Validators.required, positive]),
    stockBM: this.fb.control(0.002, [Validators.required, positive]),
    totalVolumeMl: this.fb.control(10, [Validators.required, positive]),
    series: this.fb.control<SeriesKind>('job'),
    mixtureCount: this.fb.control(9, [
      Validators.required,
      Validators.min(2),
      Validators.max(MAX_MIXTURES),
      Validators.pattern(/^\d+$/),
    ]),
    totalConcentrationM: this.fb.control(0.001, [Validators.required, positive]),
    fixedAM: this.fb.control(0.0002, [Validators.required, positive]),
    firstRatioBToA: this.fb.control(0.5, [Validators.required, Validators.min(0)]),
    lastRatioBToA: this.fb.control(10, [Validators.required, Validators.min(0)]),
    stoichiometry: this.fb.control('1:1'),
    kAssumed: this.fb.control(500, [Validators.required, positive]),
    epsilonLPerMolCm: this.fb.control(4000, [Validators.required, positive]),
    pathLengthCm: this.fb.control(1, [Validators.required, positive]),
    linearRangeMaxAbsorbance: this.fb.control(1, [Validators.required, positive]),
    loqM: this.fb.control<number | null>(null, [positive]),
    volumeStepMl: this.fb.control(0.01),
    scheme: this.fb.control<PositionScheme>('cuvette'),
    samplePrefix: this.fb.control('mix', [Validators.required, Validators.pattern(SAMPLE_PREFIX)]),
  });

  private readonly value = toSignal(this.form.valueChanges, { initialValue: this.form.getRawValue() });
  protected readonly series = computed(() => this.value().series ?? 'job');
  protected readonly kUnit = computed(() => kUnit(this.value().stoichiometry ?? '1:1'));
  protected readonly preparedAt = signal(new Date());

  /** The controls that matter for the chosen series: a hidden, invalid field must not block the plan. */
  private relevantControls(): AbstractControl[] {
    const c = this.form.controls;
    const common = [
      c.stockAM,
      c.stockBM,
      c.totalVolumeMl,
      c.mixtureCount,
      c.kAssumed,
      c.epsilonLPerMolCm,
      c.pathLengthCm,
      c.linearRangeMaxAbsorbance,
      c.loqM,
      c.samplePrefix,
    ];
    return c.series.value === 'job'
      ? [...common, c.totalConcentrationM]
      : [...common, c.fixedAM, c.firstRatioBToA, c.lastRatioBToA];
  }

  protected readonly result = computed<
    | { kind: 'plan'; settings: PlannerSettings; rows: PlanRow[] }
    | { kind: 'invalid' }
    | { kind: 'error'; message: string }
  >(() => {
    this.value();
    if (this.relevantControls().some((c) => c.invalid)) return { kind: 'invalid' };
    const { scheme, samplePrefix, ...settings } = this.form.getRawValue();
    const capacity = POSITION_SCHEMES.find((p) => p.value === scheme)?.capacity ?? 999;
    if (settings.mixtureCount > capacity)
      return { kind: 'error', message: `The plate holds only ${capacity} positions.` };
    try {
      const { rows } = planRows(settings, scheme, samplePrefix);
      return { kind: 'plan', settings, rows };
    } catch (err) {
      if (err instanceof AnalysisError) return { kind: 'error', message: `Cannot plan: ${err.message}.` };
      throw err;
    }
  });

  protected readonly plan = computed(() => {
    const r = this.result();
    return r.kind === 'plan' ? r : null;
  });

  protected readonly counts = computed(() => {
    const rows = this.plan()?.rows ?? [];
    return {
      above: rows.filter((r) => r.aboveLinearRange).length,
      belowLoq: rows.filter((r) => r.belowLoq).length,
      impossible: rows.filter((r) => r.cannotBeMade).map((r) => r.position),
    };
  });

  /** A plan with mixtures that cannot be made is not exported or printed. */
  protected readonly canExport = computed(() => !!this.plan() && this.counts().impossible.length === 0);

  protected exportCsv(): void {
    const plan = this.plan();
    if (!plan || !this.canExport()) return;
    const stamp = new Date().toISOString().slice(0, 10);
    saveTextFile(this.document, `mixture-plan-${stamp}.csv`, manifestCsv(plan.rows, plan.settings));
  }

  protected print(): void {
    if (!this.canExport()) return;
    this.preparedAt.set(new Date());
    // Print once the sheet shows the new time.
    afterNextRender(() => this.document.defaultView?.print(), { injector: this.injector });
  }
}
