import { LowerCasePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject, signal } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import {
  type AbstractControl,
  FormBuilder,
  ReactiveFormsModule,
  type ValidationErrors,
  Validators,
} from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatChipsModule } from '@angular/material/chips';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatRadioModule } from '@angular/material/radio';
import { MatSelectModule } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import { EMPTY, catchError, distinctUntilChanged, forkJoin, of, switchMap } from 'rxjs';
import { apiErrorMessage } from '../core/http/auth.interceptor';
import {
  CANDIDATE_STOICHIOMETRIES,
  type CalibrationModel,
  FORMAT_LABELS,
  type InstrumentChoice,
  type LayoutChoice,
  type ManifestChoice,
  type NewBatch,
  type VersionChoice,
  defaultFormSettings,
} from './batch';
import { BatchesService } from './batches.service';
import { CONCENTRATION_UNITS, type ConcentrationUnit, isMassUnit } from '../shared/format/number-format';
import { DateTimePipe } from '../shared/format/date-format';
import { Notice } from '../shared/page/notice';

function positive(control: AbstractControl<number | null>): ValidationErrors | null {
  const v = control.value;
  return v === null || v > 0 ? null : { positive: true };
}

function atLeastOne(control: AbstractControl<string[]>): ValidationErrors | null {
  return control.value.length ? null : { required: true };
}

const WHOLE = Validators.pattern(/^\d+$/);

/** The settings group: a mass unit needs a molar mass; the low recovery limit lies below the high one. */
function reportingChecks(group: AbstractControl): ValidationErrors | null {
  const v = (
    group as AbstractControl<{
      concentrationUnit: ConcentrationUnit;
      molarMassGPerMol: number | null;
      recoveryLowPct: number | null;
      recoveryHighPct: number | null;
    }>
  ).getRawValue();
  const errors: ValidationErrors = {};
  if (isMassUnit(v.concentrationUnit) && v.molarMassGPerMol === null) errors['molarMassNeeded'] = true;
  if (v.recoveryLowPct !== null && v.recoveryHighPct !== null && !(v.recoveryLowPct < v.recoveryHighPct))
    errors['recoveryOrder'] = true;
  return Object.keys(errors).length ? errors : null;
}

/** Lab managers and admins: a new batch from an instrument, a layout version, a manifest version and settings. */
@Component({
  selector: 'eq-batch-form-page',
  imports: [
    DateTimePipe,
    LowerCasePipe,
    ReactiveFormsModule,
    RouterLink,
    MatFormFieldModule,
    MatInputModule,
    MatSelectModule,
    MatRadioModule,
    MatChipsModule,
    MatButtonModule,
    MatIconModule,
  ],
  templateUrl: './batch-form-page.html',
  styleUrl: './batch-form-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class BatchFormPage {
  private readonly batches = inject(BatchesService);
  private readonly router = inject(Router);
  private readonly notice = inject(Notice);
  private readonly fb = inject(FormBuilder).nonNullable;

  protected readonly candidateOptions = CANDIDATE_STOICHIOMETRIES;
  protected readonly formatLabels = FORMAT_LABELS;

  private readonly defaults = defaultFormSettings();
  protected readonly form = this.fb.group({
    name: this.fb.control('', [Validators.required, Validators.maxLength(120)]),
    profileId: this.fb.control<number | null>(null, Validators.required),
    layoutId: this.fb.control<number | null>(null, Validators.required),
    /** null: the current version when the batch is created. */
    layoutVersion: this.fb.control<number | null>(null),
    manifestId: this.fb.control<number | null>(null, Validators.required),
    manifestVersion: this.fb.control<number | null>(null),
    runId: this.fb.control('', [Validators.required, Validators.maxLength(120)]),
    expectedFiles: this.fb.control(1, [Validators.required, Validators.min(1), Validators.max(1000), WHOLE]),
    systemName: this.fb.control('', Validators.maxLength(120)),
    temperatureC: this.fb.control<number | null>(null, [Validators.min(-80), Validators.max(200)]),
    settings: this.fb.group(
      {
        wavelengthNm: this.fb.control<number | null>(null, [Validators.min(100), Validators.max(3300)]),
        pathLengthCm: this.fb.control<number | null>(null, [positive, Validators.max(100)]),
        candidates: this.fb.control<string[]>([...this.defaults.candidates], atLeastOne),
        calibrationModel: this.fb.control<CalibrationModel>(this.defaults.calibrationModel),
        linearRangeMaxAbsorbance: this.fb.control(this.defaults.linearRangeMaxAbsorbance, [
          Validators.required,
          positive,
          Validators.max(10),
        ]),
        r2Min: this.fb.control(this.defaults.r2Min, [
          Validators.required,
          Validators.min(0),
          Validators.max(1),
        ]),
        replicateCvMaxPercent: this.fb.control(this.defaults.replicateCvMaxPercent, [
          Validators.required,
          positive,
          Validators.max(100),
        ]),
        kCvMaxPercent: this.fb.control(this.defaults.kCvMaxPercent, [
          Validators.required,
          positive,
          Validators.max(1000),
        ]),
        concentrationUnit: this.fb.control<ConcentrationUnit>(this.defaults.concentrationUnit),
        molarMassGPerMol: this.fb.control<number | null>(null, [positive, Validators.max(1e7)]),
        recoveryLowPct: this.fb.control<number | null>(this.defaults.recoveryLimitsPct[0], [
          Validators.required,
          Validators.min(0),
          Validators.max(1000),
        ]),
        recoveryHighPct: this.fb.control<number | null>(this.defaults.recoveryLimitsPct[1], [
          Validators.required,
          Validators.min(0),
          Validators.max(1000),
        ]),
      },
      { validators: reportingChecks },
    ),
  });
  protected readonly concentrationUnits = CONCENTRATION_UNITS;
  private readonly unitChoice = toSignal(
    this.form.controls.settings.controls.concentrationUnit.valueChanges,
    {
      initialValue: this.defaults.concentrationUnit,
    },
  );
  /** mg/L and µg/L need the analyte's molar mass. */
  protected readonly massUnit = computed(() => isMassUnit(this.unitChoice()));

  protected readonly instruments = signal<InstrumentChoice[]>([]);
  private readonly allLayouts = signal<LayoutChoice[]>([]);
  private readonly allManifests = signal<ManifestChoice[]>([]);
  protected readonly layoutVersions = signal<VersionChoice[]>([]);
  protected readonly manifestVersions = signal<VersionChoice[]>([]);
  /** The layout version the chosen manifest was last checked against. */
  protected readonly manifestLayoutVersion = signal<number | null>(null);
  protected readonly loadError = signal<string | null>(null);
  protected readonly submitError = signal<string | null>(null);
  protected readonly saving = signal(false);

  private readonly profileId = toSignal(this.form.controls.profileId.valueChanges, { initialValue: null });
  private readonly layoutId = toSignal(this.form.controls.layoutId.valueChanges, { initialValue: null });
  protected readonly layoutVersion = toSignal(this.form.controls.layoutVersion.valueChanges, {
    initialValue: null,
  });

  protected readonly instrument = computed(() => this.instruments().find((i) => i.id === this.profileId()));
  /** Only layouts of the instrument's plate format: the server refuses any other. */
  protected readonly layouts = computed(() => {
    const instrument = this.instrument();
    return instrument
      ? this.allLayouts().filter((l) => l.format === instrument.plateFormat)
      : this.allLayouts();
  });
  /** Only manifests mapped onto the chosen layout. */
  protected readonly manifests = computed(() =>
    this.allManifests().filter((m) => m.layoutId === this.layoutId()),
  );
  private readonly manifestId = toSignal(this.form.controls.manifestId.valueChanges, { initialValue: null });
  protected readonly layout = computed(() => this.allLayouts().find((l) => l.id === this.layoutId()));
  protected readonly manifest = computed(() => this.allManifests().find((m) => m.id === this.manifestId()));
  /** The layout version the batch will use: the chosen one, or the current one. */
  protected readonly effectiveLayoutVersion = computed(
    () => this.layoutVersion() ?? this.layout()?.currentVersion ?? null,
  );

  constructor() {
    forkJoin([this.batches.instruments(), this.batches.layouts(), this.batches.manifests()])
      .pipe(takeUntilDestroyed())
      .subscribe({
        next: ([instruments, layouts, manifests]) => {
          this.instruments.set(instruments.filter((i) => i.active));
          this.allLayouts.set(layouts);
          this.allManifests.set(manifests);
        },
        error: (err: unknown) =>
          this.loadError.set(
            apiErrorMessage(err, 'The instruments, layouts and manifests could not be loaded.'),
          ),
      });

    const c = this.form.controls;
    c.profileId.valueChanges.pipe(distinctUntilChanged(), takeUntilDestroyed()).subscribe(() => {
      const layoutId = c.layoutId.value;
      if (layoutId !== null && !this.layouts().some((l) => l.id === layoutId)) c.layoutId.setValue(null);
    });

    c.layoutId.valueChanges
      .pipe(
        distinctUntilChanged(),
        switchMap((id) => {
          this.layoutVersions.set([]);
          c.layoutVersion.setValue(null);
          c.manifestId.setValue(null);
          if (id === null) return EMPTY;
          return this.batches.layoutVersions(id).pipe(
            catchError((err: unknown) => {
              this.loadError.set(apiErrorMessage(err, 'The versions of this layout could not be loaded.'));
              return of([]);
            }),
          );
        }),
        takeUntilDestroyed(),
      )
      .subscribe((versions) => this.layoutVersions.set(versions));

    c.manifestId.valueChanges
      .pipe(
        distinctUntilChanged(),
        switchMap((id) => {
          this.manifestVersions.set([]);
          this.manifestLayoutVersion.set(null);
          c.manifestVersion.setValue(null);
          if (id === null) return EMPTY;
          return this.batches.manifestVersions(id).pipe(
            catchError((err: unknown) => {
              this.loadError.set(apiErrorMessage(err, 'The versions of this manifest could not be loaded.'));
              return EMPTY;
            }),
          );
        }),
        takeUntilDestroyed(),
      )
      .subscribe(({ versions, layoutVersion }) => {
        this.manifestVersions.set(versions);
        this.manifestLayoutVersion.set(layoutVersion || null);
      });
  }

  /** The request body for the form's values: percentages become fractions, blanks are left to the server. */
  protected body(): NewBatch {
    const v = this.form.getRawValue();
    const s = v.settings;
    const settings: NewBatch['settings'] = {
      candidates: s.candidates,
      calibrationModel: s.calibrationModel,
      linearRangeMaxAbsorbance: s.linearRangeMaxAbsorbance,
      r2Min: s.r2Min,
      replicateCvMax: s.replicateCvMaxPercent / 100,
      kCvMax: s.kCvMaxPercent / 100,
      concentrationUnit: s.concentrationUnit,
      recoveryLimitsPct: [s.recoveryLowPct!, s.recoveryHighPct!],
    };
    if (s.molarMassGPerMol !== null) settings.molarMassGPerMol = s.molarMassGPerMol;
    if (s.wavelengthNm !== null) settings.wavelengthNm = s.wavelengthNm;
    if (s.pathLengthCm !== null) settings.pathLengthCm = s.pathLengthCm;
    const body: NewBatch = {
      name: v.name.trim(),
      profileId: v.profileId!,
      layoutId: v.layoutId!,
      manifestId: v.manifestId!,
      runId: v.runId.trim(),
      expectedFiles: v.expectedFiles,
      systemName: v.systemName.trim() || null,
      temperatureC: v.temperatureC,
      settings,
    };
    if (v.layoutVersion !== null) body.layoutVersion = v.layoutVersion;
    if (v.manifestVersion !== null) body.manifestVersion = v.manifestVersion;
    return body;
  }

  protected submit(): void {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      this.submitError.set('Some fields need attention; they are marked below.');
      return;
    }
    this.saving.set(true);
    this.submitError.set(null);
    this.batches.create(this.body()).subscribe({
      next: (batch) => {
        this.saving.set(false);
        void this.notice.show(`Batch "${batch.name}" created; it waits for its files.`, {
          action: 'OK',
          durationMs: 5000,
        });
        void this.router.navigate(['/batches']);
      },
      error: (err: unknown) => {
        this.saving.set(false);
        this.submitError.set(apiErrorMessage(err, 'The batch could not be created; try again.'));
      },
    });
  }
}
