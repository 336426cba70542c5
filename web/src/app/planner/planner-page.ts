import { DOCUMENT } from '@angular/common';
import {
  ChangeDetectionStrategy,
  Component,
  Injector,
  afterNextRender,
  computed,
  effect,
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
import { catchError, distinctUntilChanged, map, of, switchMap } from 'rxjs';
import type { Layout, LayoutSummary } from '../layouts/layout';
import { LayoutsService } from '../layouts/layouts.service';
import { PlateGrid } from '../shared/plate-grid/plate-grid';
import type { PlateCell } from '../shared/plate-grid/plate-geometry';
import {
  DEFAULT_FILL_VOLUME_UL,
  PLANNER_STOICHIOMETRIES,
  POSITION_SCHEMES,
  type PlanRow,
  type PlannerSettings,
  type PositionScheme,
  type SeriesKind,
  type WellTarget,
  freePositions,
  kUnit,
  manifestCsv,
  planRows,
} from './mixture-plan';
import { PipettingTable } from './pipetting-table';
import { PrepSheet } from './prep-sheet';
import { type NamedReagent, ReagentCautions, cautionLine } from './reagent-cautions';
import { lookupReagent } from './reagent-hazards';
import { saveTextFile } from './save-text-file';
import { TableScroll } from '../shared/table-scroll/table-scroll';

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
    TableScroll,
    ReactiveFormsModule,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatButtonModule,
    MatButtonToggleModule,
    MatIconModule,
    PipettingTable,
    PrepSheet,
    PlateGrid,
    ReagentCautions,
  ],
  templateUrl: './planner-page.html',
  styleUrl: './planner-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PlannerPage {
  private readonly fb = inject(FormBuilder).nonNullable;
  private readonly document = inject(DOCUMENT);
  private readonly injector = inject(Injector);
  private readonly layoutsService = inject(LayoutsService);

  protected readonly stoichiometries = PLANNER_STOICHIOMETRIES;
  protected readonly schemes = POSITION_SCHEMES;
  protected readonly cautions = PLANNER_CAUTIONS;
  protected readonly volumeSteps = [
    { value: 0, label: 'No rounding' },
    { value: 0.001, label: '0.001 mL (1 µL)' },
    { value: 0.01, label: '0.01 mL (10 µL)' },
    { value: 0.1, label: '0.1 mL' },
  ];
  protected readonly wellSteps = [
    { value: 0, label: 'No rounding' },
    { value: 0.1, label: '0.1 µL' },
    { value: 0.5, label: '0.5 µL' },
    { value: 1, label: '1 µL' },
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
    /** A saved layout whose free positions take the mixtures; null = positions by scheme. */
    layoutId: this.fb.control<number | null>(null),
    fillVolumeUl: this.fb.control(DEFAULT_FILL_VOLUME_UL['96'], [
      Validators.required,
      positive,
      Validators.max(5000),
    ]),
    volumeStepUl: this.fb.control(1),
    reagentA: this.fb.control(''),
    casA: this.fb.control(''),
    reagentB: this.fb.control(''),
    casB: this.fb.control(''),
    diluent: this.fb.control('Deionised water'),
  });

  /** Saved layouts to choose from; null while loading or when they cannot be read. */
  protected readonly layouts = toSignal(
    this.layoutsService.list().pipe(catchError(() => of<LayoutSummary[] | 'error'>('error'))),
    { initialValue: null },
  );

  /** The chosen layout's current version, once loaded (or the reason it is not there). */
  protected readonly layout = toSignal(
    this.form.controls.layoutId.valueChanges.pipe(
      distinctUntilChanged(),
      switchMap((id) =>
        id === null
          ? of<Layout | 'loading' | 'error' | null>(null)
          : this.layoutsService.get(id).pipe(
              map((l): Layout | 'loading' | 'error' => l),
              catchError(() => of<'error'>('error')),
            ),
      ),
    ),
    { initialValue: null },
  );

  protected readonly loadedLayout = computed(() => {
    const l = this.layout();
    return l && typeof l === 'object' ? l : null;
  });

  /** A plate layout: plan in µL to the fill volume on its free wells. */
  protected readonly plateLayout = computed(() => {
    const l = this.loadedLayout();
    return l && l.format !== 'cuvette' ? l : null;
  });

  /** A 384-well layout starts from its own usual fill volume, unless the user typed one. */
  private readonly fillDefault = effect(() => {
    const plate = this.plateLayout();
    const fill = this.form.controls.fillVolumeUl;
    if (plate && fill.pristine) fill.setValue(DEFAULT_FILL_VOLUME_UL[plate.format as '96' | '384']);
  });

  protected readonly free = computed(() => {
    const l = this.loadedLayout();
    return l ? freePositions(l.format, l.cuvetteCount, l.positions) : [];
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
    if (this.plateLayout()) {
      common.splice(common.indexOf(c.totalVolumeMl), 1);
      common.push(c.fillVolumeUl);
    }
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
    const layout = this.layout();
    if (layout === 'error') return { kind: 'error', message: 'The layout could not be loaded.' };
    if (this.form.controls.layoutId.value !== null && layout === null) return { kind: 'invalid' };
    if (this.relevantControls().some((c) => c.invalid)) return { kind: 'invalid' };
    const {
      scheme,
      samplePrefix,
      layoutId: _layoutId,
      fillVolumeUl,
      volumeStepUl,
      reagentA: _a,
      casA: _ca,
      reagentB: _b,
      casB: _cb,
      diluent: _d,
      ...settings
    } = this.form.getRawValue();
    const free = this.free();
    const loaded = this.loadedLayout();
    const capacity = loaded
      ? free.length
      : (POSITION_SCHEMES.find((p) => p.value === scheme)?.capacity ?? 999);
    if (settings.mixtureCount > capacity)
      return {
        kind: 'error',
        message: loaded
          ? `The layout has only ${capacity} free position(s); plan fewer mixtures or free some positions.`
          : `The plate holds only ${capacity} positions.`,
      };
    const wells: WellTarget | undefined = this.plateLayout()
      ? { positions: free, fillVolumeUl, volumeStepUl }
      : undefined;
    // A cuvette layout keeps mL and takes its free cuvettes in order.
    const cuvettes = loaded && !wells;
    try {
      const planned = planRows(settings, scheme, samplePrefix, wells);
      const rows = cuvettes ? planned.rows.map((r, i) => ({ ...r, position: free[i] })) : planned.rows;
      return { kind: 'plan', settings, rows };
    } catch (err) {
      if (err instanceof AnalysisError) return { kind: 'error', message: `Cannot plan: ${err.message}.` };
      throw err;
    }
  });

  /** The plate preview: the layout's own positions with their roles, and the planned mixtures. */
  protected readonly previewCells = computed(() => {
    const cells: Record<string, PlateCell> = {};
    for (const p of this.loadedLayout()?.positions ?? [])
      cells[p.position] = { role: p.role, replicateGroup: p.replicateGroup };
    for (const row of this.plan()?.rows ?? []) cells[row.position] = { role: 'mixture', label: row.sampleId };
    return cells;
  });

  /** The LOQ as the absorbance it gives at the assumed ε and path length (A = ε·l·c), 3 decimals. */
  protected readonly loqAbsorbance = computed(() => {
    const v = this.value();
    const loq = v.loqM;
    if (!(typeof loq === 'number' && loq > 0) || !v.epsilonLPerMolCm || !v.pathLengthCm) return null;
    return (v.epsilonLPerMolCm * v.pathLengthCm * loq).toFixed(3);
  });

  /** The reagents the user named, for the cautions. */
  protected readonly reagents = computed<NamedReagent[]>(() => {
    const v = this.value();
    return [
      { role: 'Stock A', name: v.reagentA ?? '', cas: v.casA ?? '' },
      { role: 'Stock B', name: v.reagentB ?? '', cas: v.casB ?? '' },
      { role: 'Diluent', name: v.diluent ?? '', cas: '' },
    ];
  });

  /** General cautions and one line per named reagent, for the printed sheet. */
  protected readonly sheetCautions = computed(() => [
    ...this.reagents().map((r) => cautionLine(r.role, lookupReagent({ name: r.name, cas: r.cas }))),
    ...this.cautions,
  ]);

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
